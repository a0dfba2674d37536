//! Stochastic daily weather for uncertainty work.
//!
//! Daily clearness index k_T = H/H₀ is drawn, month by month, from the distribution of
//! Bendt, Collares-Pereira & Rabl (1981), whose only parameter is the monthly mean K̄_T.
//! Day-to-day persistence comes from a first-order autoregressive Gaussian process mapped
//! through that distribution's cumulative distribution function, as in Graham, Hollands &
//! Unny (1988): z_d = φ·z_{d−1} + √(1 − φ²)·ε_d, k_T,d = F⁻¹_month(Φ(z_d)). Because the
//! mapping is monotonic the marginal distribution (and so the monthly mean) is exactly the
//! one of Bendt et al., whatever φ. Each day is then turned into hours as for an average day
//! (Collares-Pereira & Rabl for the global, Erbs et al.'s *daily* diffuse fraction spread by
//! Liu & Jordan's r_d), with the month's mean temperature profile and wind.
//!
//! Reproducible: each year is drawn from a ChaCha20 generator seeded with the caller's seed
//! and using the year index as the stream number, so year k is the same whether it is made
//! alone or in a run of a thousand, in any order or thread. The Gaussian process restarts
//! at each year (no persistence across 31 December → 1 January).

use super::monthly::{DayAir, J_PER_KWH, MonthlyMeans, push_synthetic_day};
use super::{ClimateError, SiteLocation, SunTable, WeatherSeries, WeatherSource, month_of_day};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha20Rng;
use rand_distr::StandardNormal;

/// Lowest daily clearness index of the Bendt et al. (1981) distribution (from memory).
pub const BENDT_K_MIN: f64 = 0.05;

/// Default lag-one autocorrelation φ of the Gaussian process behind the daily clearness
/// index. From memory: Graham, Hollands & Unny (1988) found φ of about 0.3 with little
/// dependence on site or season.
pub const DEFAULT_LAG1_GAUSSIAN: f64 = 0.3;

/// Settings of the stochastic generator.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StochasticSettings {
    /// Lag-one autocorrelation of the Gaussian process [-], within 0…0.95.
    pub lag1_gaussian: f64,
}

impl Default for StochasticSettings {
    fn default() -> Self {
        Self {
            lag1_gaussian: DEFAULT_LAG1_GAUSSIAN,
        }
    }
}

/// Upper limit of the daily clearness index for a month with mean K̄_T.
///
/// Bendt, Collares-Pereira & Rabl (1981), "The frequency distribution of daily insolation
/// values", Solar Energy 27:1–5 (as also used by Hollands & Huget 1983):
/// k_T,max = 0.6313 + 0.267·K̄_T − 11.9·(K̄_T − 0.75)⁸ (from memory).
///
/// * `kt_bar` — monthly mean clearness index [-]
pub fn bendt_k_max(kt_bar: f64) -> f64 {
    0.6313 + 0.267 * kt_bar - 11.9 * (kt_bar - 0.75).powi(8)
}

/// The distribution of daily clearness index of Bendt, Collares-Pereira & Rabl (1981).
///
/// Cumulative distribution F(k) = (e^{γ k_min} − e^{γ k})/(e^{γ k_min} − e^{γ k_max}) on
/// k_min…k_max, with γ chosen so that the mean equals K̄_T (Bendt et al. 1981, eqs. for F and
/// the mean; from memory). k_min = 0.05, k_max from [`bendt_k_max`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BendtDistribution {
    /// Lower limit [-].
    pub k_min: f64,
    /// Upper limit [-].
    pub k_max: f64,
    /// Shape parameter γ [-].
    pub gamma: f64,
}

impl BendtDistribution {
    /// The distribution whose mean is `kt_bar`. Fails when `kt_bar` is not strictly between
    /// k_min and k_max (roughly 0.05…0.82).
    pub fn from_mean(kt_bar: f64) -> Result<Self, ClimateError> {
        let k_min = BENDT_K_MIN;
        let k_max = bendt_k_max(kt_bar);
        if !(kt_bar.is_finite() && kt_bar > k_min + 1e-3 && kt_bar < k_max - 1e-3) {
            return Err(ClimateError::bad(
                "monthly clearness index",
                format!(
                    "{kt_bar:.3} is outside the range {k_min}…{k_max:.3} of the daily \
                     clearness distribution"
                ),
            ));
        }
        // mean(γ) increases monotonically from k_min (γ → −∞) to k_max (γ → +∞): bisect.
        let (mut lo, mut hi) = (-500.0_f64, 500.0_f64);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if Self::mean_for(k_min, k_max, mid) < kt_bar {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        Ok(Self {
            k_min,
            k_max,
            gamma: 0.5 * (lo + hi),
        })
    }

    fn mean_for(k_min: f64, k_max: f64, gamma: f64) -> f64 {
        let d = k_max - k_min;
        if gamma.abs() * d < 1e-6 {
            return 0.5 * (k_min + k_max);
        }
        // mean = k_max − 1/γ + d/(e^{γd} − 1); finite for both signs of γ within ±500.
        k_max - 1.0 / gamma + d / (gamma * d).exp_m1()
    }

    /// Mean of the distribution [-].
    pub fn mean(&self) -> f64 {
        Self::mean_for(self.k_min, self.k_max, self.gamma)
    }

    /// Cumulative probability of k [-].
    pub fn cdf(&self, k: f64) -> f64 {
        let d = self.k_max - self.k_min;
        let x = (k - self.k_min).clamp(0.0, d);
        if self.gamma.abs() * d < 1e-6 {
            return x / d;
        }
        // (1 − e^{γx})/(1 − e^{γd}), using expm1 for accuracy.
        ((self.gamma * x).exp_m1() / (self.gamma * d).exp_m1()).clamp(0.0, 1.0)
    }

    /// The k with cumulative probability p (0…1) [-].
    pub fn quantile(&self, p: f64) -> f64 {
        let p = p.clamp(0.0, 1.0);
        let d = self.k_max - self.k_min;
        let g = self.gamma;
        if g.abs() * d < 1e-6 {
            return self.k_min + p * d;
        }
        // Inverse of F: e^{γx} − 1 = p·(e^{γd} − 1).
        let k = self.k_min + (p * (g * d).exp_m1()).ln_1p() / g;
        k.clamp(self.k_min, self.k_max)
    }
}

/// Standard normal cumulative distribution Φ(z) [-].
///
/// Through the complementary error function of Press, Teukolsky, Vetterling & Flannery,
/// *Numerical Recipes* (2nd ed., 1992), §6.2 `erfcc` (Chebyshev fit, fractional error below
/// 1.2·10⁻⁷ everywhere).
pub fn standard_normal_cdf(z: f64) -> f64 {
    let x = -z / std::f64::consts::SQRT_2;
    let ax = x.abs();
    let t = 1.0 / (1.0 + 0.5 * ax);
    let poly = -ax * ax - 1.265_512_23
        + t * (1.000_023_68
            + t * (0.374_091_96
                + t * (0.096_784_18
                    + t * (-0.186_288_06
                        + t * (0.278_868_07
                            + t * (-1.135_203_98
                                + t * (1.488_515_87 + t * (-0.822_152_23 + t * 0.170_872_77))))))));
    let erfc_ax = t * poly.exp();
    let erfc_x = if x >= 0.0 { erfc_ax } else { 2.0 - erfc_ax };
    0.5 * erfc_x
}

/// Daily diffuse fraction H_d/H for one day.
///
/// Erbs, Klein & Duffie (1982), "Estimation of the diffuse radiation fraction for hourly,
/// daily and monthly-average global radiation", Solar Energy 28(4):293–302, daily
/// correlation (as given in Duffie & Beckman 2013, eq. 2.11.2; from memory):
/// * ω_s ≤ 81.4°: 1.0 − 0.2727 k + 2.4495 k² − 11.9514 k³ + 9.3879 k⁴ for k < 0.715, else 0.143;
/// * ω_s > 81.4°: 1.0 + 0.2832 k − 2.5557 k² + 0.8448 k³ for k < 0.722, else 0.175.
///
/// * `kt` — daily clearness index [-]
/// * `sunset_hour_angle_rad` — ω_s \[rad\]
///
/// Notes: the result is clamped to 0…1 (the polynomials stay inside for 0 ≤ k ≤ 1).
pub fn erbs_daily_diffuse_fraction(kt: f64, sunset_hour_angle_rad: f64) -> f64 {
    let k = kt.max(0.0);
    let f = if sunset_hour_angle_rad <= 81.4_f64.to_radians() {
        if k < 0.715 {
            1.0 - 0.2727 * k + 2.4495 * k.powi(2) - 11.9514 * k.powi(3) + 9.3879 * k.powi(4)
        } else {
            0.143
        }
    } else if k < 0.722 {
        1.0 + 0.2832 * k - 2.5557 * k.powi(2) + 0.8448 * k.powi(3)
    } else {
        0.175
    };
    f.clamp(0.0, 1.0)
}

/// A stochastic weather generator for one site, built once and asked for any number of years.
#[derive(Debug, Clone)]
pub struct StochasticModel {
    means: MonthlyMeans,
    table: SunTable,
    albedo: f64,
    dists: [BendtDistribution; 12],
    settings: StochasticSettings,
}

impl StochasticModel {
    /// Prepare the generator: validates the inputs and fits one distribution per month.
    pub fn new(
        means: &MonthlyMeans,
        site: &SiteLocation,
        settings: StochasticSettings,
    ) -> Result<Self, ClimateError> {
        let table = SunTable::new(site)?;
        means.validate(&table)?;
        if !(settings.lag1_gaussian.is_finite() && (0.0..=0.95).contains(&settings.lag1_gaussian)) {
            return Err(ClimateError::bad(
                "lag1_gaussian",
                format!("{} outside 0…0.95", settings.lag1_gaussian),
            ));
        }
        let mut dists = [BendtDistribution {
            k_min: BENDT_K_MIN,
            k_max: 0.8,
            gamma: 0.0,
        }; 12];
        for (m, d) in dists.iter_mut().enumerate() {
            let kt = means.clearness_index(&table, m as u32 + 1);
            *d = BendtDistribution::from_mean(kt).map_err(|e| match e {
                ClimateError::BadInput { message, .. } => {
                    ClimateError::bad(format!("site.climate.ghi_kwh_m2_day[{}]", m + 1), message)
                }
                other => other,
            })?;
        }
        Ok(Self {
            means: means.clone(),
            table,
            albedo: site.albedo,
            dists,
            settings,
        })
    }

    /// The distribution fitted for a month (1…12).
    pub fn distribution(&self, month: u32) -> &BendtDistribution {
        &self.dists[(month.clamp(1, 12) - 1) as usize]
    }

    /// The 365 daily clearness indices of year `year_index` for `seed`.
    pub fn daily_clearness(&self, seed: u64, year_index: u64) -> Vec<f64> {
        let mut rng = ChaCha20Rng::seed_from_u64(seed);
        rng.set_stream(year_index);
        let phi = self.settings.lag1_gaussian;
        let innovation = (1.0 - phi * phi).sqrt();
        let mut z: f64 = rng.sample(StandardNormal);
        (1..=365_u32)
            .map(|n| {
                let eps: f64 = rng.sample(StandardNormal);
                if n > 1 {
                    z = phi * z + innovation * eps;
                }
                let month = month_of_day(n);
                self.dists[(month - 1) as usize].quantile(standard_normal_cdf(z))
            })
            .collect()
    }

    /// One stochastic year (365 days × 24 solar hours).
    pub fn year(&self, seed: u64, year_index: u64) -> WeatherSeries {
        let kts = self.daily_clearness(seed, year_index);
        let mut hours = Vec::with_capacity(365 * 24);
        for (i, &kt) in kts.iter().enumerate() {
            let n = i as u32 + 1;
            let month = month_of_day(n);
            let m = (month - 1) as usize;
            let day = self.table.day(n);
            let h = kt * day.h0_j_m2;
            let hd = h * erbs_daily_diffuse_fraction(kt, day.sunset_hour_angle_rad);
            let next_m = (month_of_day(n % 365 + 1) - 1) as usize;
            let air = DayAir {
                t_min_c: self.means.t_min_c[m],
                t_max_c: self.means.t_max_c[m],
                t_min_next_c: self.means.t_min_c[next_m],
                t_dew_c: self.means.dew_point_c(m),
                wind_m_s: self.means.wind_m_s[m],
                wind_height_m: self.means.wind_height_m,
            };
            push_synthetic_day(day, month, h, hd, &air, &mut hours);
        }
        WeatherSeries {
            hours,
            poa_plane: None,
            source: WeatherSource::Stochastic { seed, year_index },
            albedo: self.albedo,
        }
    }

    /// Monthly mean daily global irradiation the model was built from [kWh m⁻² day⁻¹].
    pub fn target_ghi_kwh_m2_day(&self) -> [f64; 12] {
        self.means.ghi_kwh_m2_day
    }
}

/// One stochastic year for a site (builds a [`StochasticModel`] each call; keep the model
/// when making many years).
pub fn stochastic_year(
    means: &MonthlyMeans,
    site: &SiteLocation,
    settings: StochasticSettings,
    seed: u64,
    year_index: u64,
) -> Result<WeatherSeries, ClimateError> {
    Ok(StochasticModel::new(means, site, settings)?.year(seed, year_index))
}

/// Convert a daily irradiation [J m⁻²] to kWh m⁻².
pub fn j_to_kwh(j_m2: f64) -> f64 {
    j_m2 / J_PER_KWH
}
