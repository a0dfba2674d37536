//! Engineering-economics factors: one pure function per formula.
//!
//! Discrete, end-of-year compounding throughout (the convention of engineering-economics
//! texts). Rates are fractions per year (0.10 = 10 %), periods are years.

/// Capital recovery factor: the uniform yearly payment that repays a present sum of 1 over
/// `years` at `rate`.
///
/// CRF = i(1+i)ⁿ / ((1+i)ⁿ − 1) (REFERENCES.md §9; standard engineering-economics form).
///
/// * `rate` — discount rate i [year⁻¹], ≥ 0
/// * `years` — life n [years], > 0
///
/// Returns CRF [year⁻¹]. Notes: at i = 0 the limit 1/n is returned instead of 0/0.
pub fn capital_recovery_factor(rate: f64, years: f64) -> f64 {
    if rate.abs() < 1e-12 {
        return 1.0 / years;
    }
    let g = (1.0 + rate).powf(years);
    rate * g / (g - 1.0)
}

/// Sinking-fund factor: the uniform yearly deposit that grows to 1 after `years` at `rate`.
///
/// SFF = i / ((1+i)ⁿ − 1) (REFERENCES.md §9). Also SFF = CRF − i.
///
/// * `rate` — i [year⁻¹], ≥ 0; `years` — n [years], > 0
///
/// Returns SFF [year⁻¹]. Notes: at i = 0 the limit 1/n is returned.
pub fn sinking_fund_factor(rate: f64, years: f64) -> f64 {
    if rate.abs() < 1e-12 {
        return 1.0 / years;
    }
    rate / ((1.0 + rate).powf(years) - 1.0)
}

/// Present-worth factor of a single sum paid `year` years from now: (1+i)⁻ᵗ.
///
/// * `rate` — i [year⁻¹]; `year` — t [years]
pub fn present_worth_factor(rate: f64, year: f64) -> f64 {
    (1.0 + rate).powf(-year)
}

/// Annualised cost of owning a still.
///
/// A = P·CRF + U − S·SFF (REFERENCES.md §9, [M, Tiwari-style]).
///
/// * `capital` — P, first cost (plus the present worth of replacements) [currency]
/// * `crf` — capital recovery factor [year⁻¹]
/// * `upkeep_per_year` — U, yearly upkeep and operation [currency year⁻¹]
/// * `salvage` — S, value at the end of the life [currency]
/// * `sff` — sinking-fund factor [year⁻¹]
///
/// Returns A [currency year⁻¹].
pub fn annualised_cost(
    capital: f64,
    crf: f64,
    upkeep_per_year: f64,
    salvage: f64,
    sff: f64,
) -> f64 {
    capital * crf + upkeep_per_year - salvage * sff
}

/// Cost per litre: annualised cost over the litres a year (REFERENCES.md §9).
///
/// * `annualised` — [currency year⁻¹]; `annual_litres` — [L year⁻¹]
///
/// Returns `None` when the still gives no water (the cost per litre is undefined).
pub fn cost_per_litre(annualised: f64, annual_litres: f64) -> Option<f64> {
    (annual_litres > 0.0 && annual_litres.is_finite()).then(|| annualised / annual_litres)
}

/// Levelised (equivalent uniform) yearly yield of a still whose yield falls by a fixed
/// fraction each year: CRF · Σₜ₌₁ⁿ Y₀(1−d)ᵗ⁻¹ / (1+i)ᵗ.
///
/// Dividing the annualised cost by this gives the discounted cost per litre over the life
/// (each litre is discounted like each unit of money). With d = 0 it returns Y₀.
///
/// * `first_year_litres` — Y₀ [L year⁻¹]
/// * `loss_per_year` — d [year⁻¹], [0, 1)
/// * `rate` — i [year⁻¹]; `years` — n [years] (whole years; the fraction is rounded up)
///
/// Notes: yield is taken at the end of each year, as the costs are.
pub fn levelised_yield(first_year_litres: f64, loss_per_year: f64, rate: f64, years: f64) -> f64 {
    let n = years.ceil().max(1.0) as u32;
    let pw: f64 = (1..=n)
        .map(|t| {
            let t = f64::from(t);
            first_year_litres * (1.0 - loss_per_year).powf(t - 1.0) * present_worth_factor(rate, t)
        })
        .sum();
    pw * capital_recovery_factor(rate, f64::from(n))
}

/// Replacements of a part that lasts `part_life_years` within a still life of `life_years`,
/// each bought at `cost` when the previous one wears out.
///
/// Returns (number of replacements, their present worth [currency]). A part is replaced at
/// t = k·L for k = 1, 2, … while t < n − 1e-9 (a part that wears out exactly at the end of the
/// life is not replaced).
pub fn replacements(cost: f64, part_life_years: f64, life_years: f64, rate: f64) -> (u32, f64) {
    let mut count = 0;
    let mut pw = 0.0;
    if part_life_years <= 0.0 {
        return (0, 0.0);
    }
    let mut t = part_life_years;
    while t < life_years - 1e-9 && count < 1000 {
        count += 1;
        pw += cost * present_worth_factor(rate, t);
        t += part_life_years;
    }
    (count, pw)
}
