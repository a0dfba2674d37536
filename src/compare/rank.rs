//! The ranking core: a pure function over a table of criterion values.
//!
//! Each criterion is normalised against a fixed reference scale ([`Scales`]) — never against
//! the smallest and largest value among the variants present — so a variant's score depends on
//! its own figures, the weights and the scales only. Adding or removing a variant therefore
//! never reorders the others. The score is the weighted mean of the normalised criteria;
//! both normalisations are linear and strictly monotone, so a variant better on every
//! criterion than another always scores higher, whatever the (non-negative) weights.

use std::fmt;
use std::str::FromStr;

use serde::Serialize;

/// Whether more or less of a criterion is better.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Direction {
    /// More is better (yield).
    Higher,
    /// Less is better (cost, complexity).
    Lower,
}

/// One ranking criterion.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Criterion {
    /// Annual distillate per m² of footprint [L m⁻² year⁻¹].
    AnnualYield,
    /// Mean daily distillate per m² of footprint in the worst month [L m⁻² day⁻¹].
    WorstMonth,
    /// Cost per litre over the life [currency L⁻¹].
    CostPerLitre,
    /// Capital cost per litre a day of worst-month capacity [currency (L day⁻¹)⁻¹].
    CapitalPerCapacity,
    /// Build-complexity score [points] (`economics::complexity`).
    Complexity,
}

impl Criterion {
    /// Every criterion, in the order of tables and of [`CriterionValues::as_array`].
    pub const ALL: [Criterion; 5] = [
        Criterion::AnnualYield,
        Criterion::WorstMonth,
        Criterion::CostPerLitre,
        Criterion::CapitalPerCapacity,
        Criterion::Complexity,
    ];

    /// The key used in `--weights` and `--scales` lists.
    pub fn key(self) -> &'static str {
        match self {
            Criterion::AnnualYield => "yield",
            Criterion::WorstMonth => "worst-month",
            Criterion::CostPerLitre => "cost",
            Criterion::CapitalPerCapacity => "capital",
            Criterion::Complexity => "complexity",
        }
    }

    /// Words a designer uses for it.
    pub fn label(self) -> &'static str {
        match self {
            Criterion::AnnualYield => "annual yield",
            Criterion::WorstMonth => "worst-month yield",
            Criterion::CostPerLitre => "cost per litre",
            Criterion::CapitalPerCapacity => "capital per L/day of worst-month capacity",
            Criterion::Complexity => "build complexity",
        }
    }

    /// Unit as printed; `¤` stands for the design's currency.
    pub fn unit(self) -> &'static str {
        match self {
            Criterion::AnnualYield => "L/m²/year",
            Criterion::WorstMonth => "L/m²/day",
            Criterion::CostPerLitre => "¤/L",
            Criterion::CapitalPerCapacity => "¤ per L/day",
            Criterion::Complexity => "points",
        }
    }

    /// Whether more or less is better.
    pub fn direction(self) -> Direction {
        match self {
            Criterion::AnnualYield | Criterion::WorstMonth => Direction::Higher,
            _ => Direction::Lower,
        }
    }

    /// Index into [`Criterion::ALL`].
    pub fn index(self) -> usize {
        self as usize
    }

    fn from_key(key: &str) -> Option<Criterion> {
        Criterion::ALL.into_iter().find(|c| c.key() == key)
    }
}

/// A variant's figures on every criterion.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CriterionValues {
    /// Annual distillate per m² of footprint [L m⁻² year⁻¹].
    pub annual_l_m2: f64,
    /// Worst month's mean daily distillate per m² of footprint [L m⁻² day⁻¹].
    pub worst_month_l_m2_day: f64,
    /// Cost per litre over the life [currency L⁻¹].
    pub cost_per_l: f64,
    /// Capital ÷ worst-month daily distillate of the whole still [currency (L day⁻¹)⁻¹].
    pub capital_per_l_day: f64,
    /// Build-complexity score [points].
    pub complexity_points: f64,
}

impl CriterionValues {
    /// The values in the order of [`Criterion::ALL`].
    pub fn as_array(&self) -> [f64; 5] {
        [
            self.annual_l_m2,
            self.worst_month_l_m2_day,
            self.cost_per_l,
            self.capital_per_l_day,
            self.complexity_points,
        ]
    }

    /// Values from an array in the order of [`Criterion::ALL`].
    pub fn from_array(a: [f64; 5]) -> Self {
        CriterionValues {
            annual_l_m2: a[0],
            worst_month_l_m2_day: a[1],
            cost_per_l: a[2],
            capital_per_l_day: a[3],
            complexity_points: a[4],
        }
    }

    /// The value of one criterion.
    pub fn get(&self, c: Criterion) -> f64 {
        self.as_array()[c.index()]
    }
}

/// Whether `a` dominates `b`: at least as good on every criterion and better on one.
pub fn dominates(a: &CriterionValues, b: &CriterionValues) -> bool {
    let mut strictly = false;
    for c in Criterion::ALL {
        let (x, y) = (a.get(c), b.get(c));
        let (better, worse) = match c.direction() {
            Direction::Higher => (x > y, x < y),
            Direction::Lower => (x < y, x > y),
        };
        if worse {
            return false;
        }
        strictly |= better;
    }
    strictly
}

/// A bad `--weights` or `--scales` list.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{0}")]
pub struct BadList(pub String);

/// Parse `key=value,key=value` into per-criterion numbers, starting from `base`.
fn parse_list(s: &str, base: [f64; 5], what: &str) -> Result<[f64; 5], BadList> {
    let mut out = base;
    let keys: Vec<&str> = Criterion::ALL.iter().map(|c| c.key()).collect();
    for part in s.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let Some((k, v)) = part.split_once('=') else {
            return Err(BadList(format!(
                "`{part}` is not key=value; keys: {}",
                keys.join(", ")
            )));
        };
        let k = k.trim();
        let Some(c) = Criterion::from_key(k) else {
            let hint = keys
                .iter()
                .map(|key| (strsim::levenshtein(k, key), key))
                .min()
                .filter(|(d, _)| *d <= 3)
                .map_or(String::new(), |(_, key)| {
                    format!(" (did you mean `{key}`?)")
                });
            return Err(BadList(format!(
                "unknown {what} `{k}`{hint}; keys: {}",
                keys.join(", ")
            )));
        };
        let x: f64 = v
            .trim()
            .parse()
            .map_err(|_| BadList(format!("{what} `{k}` = `{}` is not a number", v.trim())))?;
        out[c.index()] = x;
    }
    Ok(out)
}

/// How much each criterion counts. Non-negative and finite, with a positive total; only the
/// ratios matter (the score divides by the total).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Weights(pub [f64; 5]);

impl Default for Weights {
    /// yield 1, worst-month 2, cost 2, capital 1, complexity 1. Our choice (common practice,
    /// no source): the worst month decides how many stills a village must build and the cost
    /// per litre is what a funder pays, so they count double; annual yield, up-front capital
    /// and how hard the still is to build count once.
    fn default() -> Self {
        Weights([1.0, 2.0, 2.0, 1.0, 1.0])
    }
}

impl Weights {
    /// Weights from an array in the order of [`Criterion::ALL`], checked.
    pub fn new(w: [f64; 5]) -> Result<Self, BadList> {
        for c in Criterion::ALL {
            let x = w[c.index()];
            if !(x.is_finite() && x >= 0.0) {
                return Err(BadList(format!(
                    "weight `{}` = {x} must be a finite number ≥ 0",
                    c.key()
                )));
            }
        }
        if w.iter().sum::<f64>() <= 0.0 {
            return Err(BadList("the weights must not all be zero".into()));
        }
        Ok(Weights(w))
    }

    /// The weight of one criterion.
    pub fn get(&self, c: Criterion) -> f64 {
        self.0[c.index()]
    }

    /// This set with one weight changed (unchecked; [`rank`] checks it).
    pub fn with(mut self, c: Criterion, w: f64) -> Self {
        self.0[c.index()] = w;
        self
    }

    /// Each weight divided by their total.
    pub fn shares(&self) -> [f64; 5] {
        let total: f64 = self.0.iter().sum();
        self.0.map(|w| w / total)
    }
}

impl FromStr for Weights {
    type Err = BadList;

    /// `yield=1,cost=3`: the listed weights replace the defaults, the others keep theirs.
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Weights::new(parse_list(s, Weights::default().0, "weight")?)
    }
}

impl fmt::Display for Weights {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let parts: Vec<String> = Criterion::ALL
            .iter()
            .map(|c| format!("{}={}", c.key(), self.get(*c)))
            .collect();
        write!(f, "{}", parts.join(","))
    }
}

/// The fixed reference scale of each criterion, in its unit. A yield scores 1 at its
/// reference and 0 at nothing; a cost or complexity scores 1 at nothing and 0 at its
/// reference. Both maps are linear and go beyond 0…1 for values past the reference.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scales {
    /// References in the order of [`Criterion::ALL`], each > 0.
    pub reference: [f64; 5],
    /// Currency the two money references are in.
    pub currency: String,
}

/// Reference annual yield [L m⁻² year⁻¹]: 5 L m⁻² day⁻¹ for 365 days, the top of the
/// 2–5 L m⁻² day⁻¹ basin stills typically give (REFERENCES.md §8, from memory there).
pub const REFERENCE_ANNUAL_L_M2: f64 = 5.0 * 365.0;
/// Reference worst-month yield [L m⁻² day⁻¹]: the same top of the typical range.
pub const REFERENCE_WORST_MONTH_L_M2_DAY: f64 = 5.0;
/// Reference cost per litre [USD L⁻¹]. From memory, low confidence: published costs of
/// basin-still water run from about 0.01 to 0.1 USD per litre; the dear end is taken.
pub const REFERENCE_COST_PER_L_USD: f64 = 0.10;
/// Reference capital per L/day of worst-month capacity [USD (L day⁻¹)⁻¹]. From memory, low
/// confidence: a basin still costs about 100–200 USD per m² and gives about 2 L m⁻² day⁻¹ in
/// a poor month, 50–100 USD per L/day; twice the dear end is taken.
pub const REFERENCE_CAPITAL_PER_L_DAY_USD: f64 = 200.0;
/// Reference build-complexity score [points]. Our choice (common practice, no source): with
/// the default complexity weights a plain glass basin from one market scores about 100 and a
/// multi-stage stack about 150; 200 marks a hard build.
pub const REFERENCE_COMPLEXITY_POINTS: f64 = 200.0;

impl Default for Scales {
    fn default() -> Self {
        Scales {
            reference: [
                REFERENCE_ANNUAL_L_M2,
                REFERENCE_WORST_MONTH_L_M2_DAY,
                REFERENCE_COST_PER_L_USD,
                REFERENCE_CAPITAL_PER_L_DAY_USD,
                REFERENCE_COMPLEXITY_POINTS,
            ],
            currency: "USD".into(),
        }
    }
}

impl Scales {
    /// Default scales with the listed references replaced (`cost=40,capital=80000`) and the
    /// money references taken to be in `currency`.
    pub fn parse(s: &str, currency: &str) -> Result<Self, BadList> {
        let reference = parse_list(s, Scales::default().reference, "scale")?;
        for c in Criterion::ALL {
            let x = reference[c.index()];
            if !(x.is_finite() && x > 0.0) {
                return Err(BadList(format!(
                    "scale `{}` = {x} must be a finite number > 0",
                    c.key()
                )));
            }
        }
        Ok(Scales {
            reference,
            currency: currency.to_owned(),
        })
    }

    /// The scales a design ranks on: the defaults, with the two money references taken from
    /// its `[project.money_scales]` — given directly, or the USD defaults times `per_usd`.
    /// A design counting in USD needs no table.
    ///
    /// Errors: a design counting in another currency without `[project.money_scales]` (the
    /// message says what to give).
    pub fn for_project(p: &crate::design::Project) -> Result<Self, BadList> {
        let mut s = Scales::default();
        let Some(m) = &p.money_scales else {
            if p.currency == s.currency {
                return Ok(s);
            }
            return Err(BadList(format!(
                "the design counts in {c}, but the ranking's money references ({cost} USD/L, \
                 {cap} USD per L/day) are in USD; add [project.money_scales] with `per_usd` \
                 (the {c} per USD rate), `rate_date` and `source`, or with `cost_per_litre` \
                 and `capital_per_l_day` in {c}",
                c = p.currency,
                cost = REFERENCE_COST_PER_L_USD,
                cap = REFERENCE_CAPITAL_PER_L_DAY_USD,
            )));
        };
        let rate = m.per_usd.unwrap_or(1.0);
        let cost = m
            .cost_per_litre
            .or(m.per_usd.map(|_| REFERENCE_COST_PER_L_USD * rate));
        let capital = m
            .capital_per_l_day
            .or(m.per_usd.map(|_| REFERENCE_CAPITAL_PER_L_DAY_USD * rate));
        match (cost, capital) {
            (Some(cost), Some(capital)) => {
                s.reference[Criterion::CostPerLitre.index()] = cost;
                s.reference[Criterion::CapitalPerCapacity.index()] = capital;
                s.currency = p.currency.clone();
                Ok(s)
            }
            _ => Err(BadList(
                "[project.money_scales] needs `per_usd`, or both `cost_per_litre` and \
                 `capital_per_l_day`"
                    .into(),
            )),
        }
    }

    /// One sentence saying where these scales' two money references come from, for the
    /// report and `compare` (the built-in USD references, converted at the design's stated
    /// rate, or stated by the design).
    pub fn money_basis(&self, p: &crate::design::Project) -> String {
        let cost = figure(
            Criterion::CostPerLitre,
            self.reference[Criterion::CostPerLitre.index()],
            &self.currency,
        );
        let capital = figure(
            Criterion::CapitalPerCapacity,
            self.reference[Criterion::CapitalPerCapacity.index()],
            &self.currency,
        );
        let head = format!("The money references are {cost} and {capital}");
        let Some(m) = &p.money_scales else {
            return format!(
                "{head}: the built-in references in USD (from memory, low confidence; \
                 docs/compare.md)."
            );
        };
        let direct = match (m.cost_per_litre.is_some(), m.capital_per_l_day.is_some()) {
            (true, true) => "both as the design states them",
            (true, false) => "the cost per litre as the design states it",
            (false, true) => "the capital per L/day as the design states it",
            (false, false) => "",
        };
        match (m.per_usd, direct.is_empty()) {
            (Some(rate), true) => format!(
                "{head}: the built-in USD references converted at {rate} {} per USD (rate of \
                 {}; source: {}).",
                self.currency,
                m.rate_date.as_deref().unwrap_or("an unstated date"),
                m.source
            ),
            (Some(rate), false) => format!(
                "{head}: {direct}, the other converted from the built-in USD reference at \
                 {rate} {} per USD (rate of {}; source: {}).",
                self.currency,
                m.rate_date.as_deref().unwrap_or("an unstated date"),
                m.source
            ),
            (None, _) => format!("{head}: {direct} (source: {}).", m.source),
        }
    }

    /// These scales with the listed references replaced (`cost=40,capital=80000`).
    pub fn with_overrides(&self, s: &str) -> Result<Self, BadList> {
        let mut out = Scales::parse(s, &self.currency)?;
        let keys: Vec<&str> = s
            .split(',')
            .filter_map(|p| p.split_once('=').map(|(k, _)| k.trim()))
            .collect();
        for c in Criterion::ALL {
            if !keys.contains(&c.key()) {
                out.reference[c.index()] = self.reference[c.index()];
            }
        }
        Ok(out)
    }

    /// The normalised value of `x` on criterion `c` (1 is good, 0 poor; linear, unbounded).
    pub fn normalise(&self, c: Criterion, x: f64) -> f64 {
        let r = self.reference[c.index()];
        match c.direction() {
            Direction::Higher => x / r,
            Direction::Lower => 1.0 - x / r,
        }
    }
}

/// One variant as the ranking sees it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Candidate {
    /// Variant name (unique; it also breaks exact ties).
    pub name: String,
    /// Its figures.
    pub values: CriterionValues,
    /// Library items it needs that are not sold locally (empty when all are).
    pub not_local: Vec<String>,
}

/// One variant's place in the ranking.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Ranked {
    /// 1 is best.
    pub rank: usize,
    /// Variant name.
    pub name: String,
    /// Weighted mean of the normalised criteria [-].
    pub score: f64,
    /// Normalised value per criterion, order of [`Criterion::ALL`] [-].
    pub normalised: [f64; 5],
    /// Weight share × normalised value per criterion (they sum to the score, to round-off) [-].
    pub contribution: [f64; 5],
    /// The figures.
    pub values: CriterionValues,
    /// On the Pareto front: no other variant is at least as good on every criterion and
    /// better on one.
    pub pareto: bool,
    /// The variants that dominate this one.
    pub dominated_by: Vec<String>,
    /// Items not sold locally.
    pub not_local: Vec<String>,
    /// Why it stands where it does, in one sentence.
    pub explanation: String,
}

/// The names of the non-dominated candidates, in input order.
pub fn pareto_front(candidates: &[Candidate]) -> Vec<String> {
    candidates
        .iter()
        .filter(|a| !candidates.iter().any(|b| dominates(&b.values, &a.values)))
        .map(|a| a.name.clone())
        .collect()
}

/// Score and rank candidates: best first, exact ties broken by name.
///
/// Errors: bad weights or a non-finite value (the message names the variant and criterion).
pub fn rank(
    candidates: &[Candidate],
    weights: &Weights,
    scales: &Scales,
) -> Result<Vec<Ranked>, BadList> {
    let weights = Weights::new(weights.0)?;
    for cand in candidates {
        for c in Criterion::ALL {
            let x = cand.values.get(c);
            if !x.is_finite() {
                return Err(BadList(format!(
                    "variant `{}` has no finite {} ({x})",
                    cand.name,
                    c.label()
                )));
            }
        }
    }
    let shares = weights.shares();
    let mut ranked: Vec<Ranked> = candidates
        .iter()
        .map(|cand| {
            let normalised = Criterion::ALL.map(|c| scales.normalise(c, cand.values.get(c)));
            let contribution = Criterion::ALL.map(|c| shares[c.index()] * normalised[c.index()]);
            // Sum the weighted values, then divide once by the total weight, so the order of
            // two variants is the order of Σ wᵢuᵢ exactly.
            let total_w: f64 = weights.0.iter().sum();
            let score = Criterion::ALL
                .iter()
                .map(|c| weights.get(*c) * normalised[c.index()])
                .sum::<f64>()
                / total_w;
            let dominated_by: Vec<String> = candidates
                .iter()
                .filter(|o| dominates(&o.values, &cand.values))
                .map(|o| o.name.clone())
                .collect();
            Ranked {
                rank: 0,
                name: cand.name.clone(),
                score,
                normalised,
                contribution,
                values: cand.values,
                pareto: dominated_by.is_empty(),
                dominated_by,
                not_local: cand.not_local.clone(),
                explanation: String::new(),
            }
        })
        .collect();
    ranked.sort_by(|a, b| {
        b.score
            .total_cmp(&a.score)
            .then_with(|| a.name.cmp(&b.name))
    });
    for (i, r) in ranked.iter_mut().enumerate() {
        r.rank = i + 1;
    }
    let explanations: Vec<String> = ranked
        .iter()
        .map(|r| explain(r, &ranked, &weights, &scales.currency))
        .collect();
    for (r, e) in ranked.iter_mut().zip(explanations) {
        r.explanation = e;
    }
    Ok(ranked)
}

/// A figure with its unit, in the designer's words.
pub fn figure(c: Criterion, x: f64, currency: &str) -> String {
    let unit = c.unit().replace('¤', currency);
    match c {
        Criterion::AnnualYield => format!("{x:.0} {unit}"),
        Criterion::WorstMonth => format!("{x:.2} {unit}"),
        Criterion::CostPerLitre => format!("{x:.3} {unit}"),
        Criterion::CapitalPerCapacity => format!("{x:.0} {unit}"),
        Criterion::Complexity => format!("{x:.0} {unit}"),
    }
}

/// One sentence: the rank, the (weighted) strengths and weaknesses against the others, the
/// variants that beat it on everything, and the not-local flag.
fn explain(r: &Ranked, all: &[Ranked], weights: &Weights, currency: &str) -> String {
    let n = all.len();
    let mut s = format!("ranks {} of {n}", r.rank);
    if n < 2 {
        s.push_str(" (the only variant ranked)");
    } else {
        // Margin on each criterion against the mean of the others, weighted: what moves the
        // score. Strengths are the two largest positive margins, weaknesses the two most
        // negative ones.
        let shares = weights.shares();
        let mut margins: Vec<(Criterion, f64)> = Criterion::ALL
            .iter()
            .map(|&c| {
                let others: Vec<f64> = all
                    .iter()
                    .filter(|o| o.name != r.name)
                    .map(|o| o.normalised[c.index()])
                    .collect();
                let mean = others.iter().sum::<f64>() / others.len() as f64;
                (c, shares[c.index()] * (r.normalised[c.index()] - mean))
            })
            .collect();
        margins.sort_by(|a, b| b.1.total_cmp(&a.1));
        let words = |c: Criterion| -> String {
            let best = all.iter().all(|o| {
                let (x, y) = (r.values.get(c), o.values.get(c));
                match c.direction() {
                    Direction::Higher => x >= y,
                    Direction::Lower => x <= y,
                }
            });
            let worst = all.iter().all(|o| {
                let (x, y) = (r.values.get(c), o.values.get(c));
                match c.direction() {
                    Direction::Higher => x <= y,
                    Direction::Lower => x >= y,
                }
            });
            let tag = if best {
                " (best)"
            } else if worst {
                " (worst)"
            } else {
                ""
            };
            format!(
                "{} {}{tag}",
                c.label(),
                figure(c, r.values.get(c), currency)
            )
        };
        let wins: Vec<String> = margins
            .iter()
            .filter(|m| m.1 > 0.0)
            .take(2)
            .map(|m| words(m.0))
            .collect();
        let losses: Vec<String> = margins
            .iter()
            .rev()
            .filter(|m| m.1 < 0.0)
            .take(2)
            .map(|m| words(m.0))
            .collect();
        match (wins.is_empty(), losses.is_empty()) {
            (false, false) => s.push_str(&format!(
                ": it gains most on {} and loses most on {}",
                wins.join(" and "),
                losses.join(" and ")
            )),
            (false, true) => s.push_str(&format!(": it gains on {}", wins.join(" and "))),
            (true, false) => s.push_str(&format!(": it loses on {}", losses.join(" and "))),
            (true, true) => s.push_str(": it matches the others on every weighted criterion"),
        }
    }
    if !r.dominated_by.is_empty() {
        s.push_str(&format!(
            "; {} at least as good on everything",
            if r.dominated_by.len() == 1 {
                format!("{} is", r.dominated_by[0])
            } else {
                format!("{} are", r.dominated_by.join(", "))
            }
        ));
    }
    if !r.not_local.is_empty() {
        s.push_str(&format!(
            "; needs {} from outside the local market",
            r.not_local.join(", ")
        ));
    }
    s.push('.');
    s
}
