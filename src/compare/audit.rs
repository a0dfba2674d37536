//! The claim audit: what efficiency a claimed yield implies on a site, and whether that is
//! impossible, implausible or plausible.
//!
//! * *Impossible*: above the single-effect ceiling — sunlight entering through the cover ÷
//!   latent heat (DESIGN.md, "Definitions") — or, for a multi-effect still, above that ceiling
//!   times the gain output ratio our model reaches for the stated stage count.
//! * *Implausible*: above [`IMPLAUSIBLE_FRACTION`] of that ceiling.
//! * *Plausible*: otherwise.

use serde::Serialize;

use crate::climate::{Plane, SkyModel};
use crate::design::{KIND_NAMES, LoadedDesign, Variant, VariantKind};
use crate::error::Error;
use crate::physics::{optics, water};
use crate::stills::{self, KindDetails, RunOptions, SiteWeather};

/// Latent heat used for the ceilings [J kg⁻¹]: pure water at 100 °C by Sharqawy et al.
/// (2010) ([`water::latent_heat_j_kg`]), ≈ 2.257 MJ kg⁻¹. The smallest latent heat of any
/// still open to the air (its brine cannot pass boiling), so the most generous ceiling: a
/// claim above it is impossible whatever the brine temperature.
pub fn ceiling_latent_heat_j_kg() -> f64 {
    water::latent_heat_j_kg(373.15)
}

/// Share of the ceiling above which a claim is implausible [-]. REFERENCES.md §8: well-built
/// basins reach 25–45 % daily efficiency, so a claim far above ≈ 60 % of the ceiling is
/// implausible. Applied to every kind: wick and stepped stills are single-effect stills under a
/// cover too (our model gives them 40–47 % on the demo coast), and a multi-effect still's first
/// stage is such an evaporator whose heat is then reused up to the gain output ratio (our model
/// gives the demo four-stage still 55 % of its multi-effect ceiling).
pub const IMPLAUSIBLE_FRACTION: f64 = 0.60;

/// Smallest tilt of the default cover [deg]: condensate must run off (REFERENCES.md §8, at
/// least 10–15°, from memory there).
pub const DEFAULT_COVER_MIN_TILT_DEG: f64 = 10.0;
/// Default cover: clear window glass, refractive index 1.526 (REFERENCES.md §3, Duffie &
/// Beckman ch. 5, from memory there).
pub const DEFAULT_COVER_REFRACTIVE_INDEX: f64 = 1.526;
/// Default cover extinction coefficient [m⁻¹]: greenish window glass, ≈ 32 (REFERENCES.md
/// §3, from memory there).
pub const DEFAULT_COVER_EXTINCTION_PER_M: f64 = 32.0;
/// Default cover thickness \[m\]: 4 mm window glass (common practice, no source).
pub const DEFAULT_COVER_THICKNESS_M: f64 = 0.004;

/// Days in each month of a non-leap year, for the mean day of the year.
const MONTH_DAYS: [f64; 12] = [
    31.0, 28.0, 31.0, 30.0, 31.0, 30.0, 31.0, 31.0, 30.0, 31.0, 30.0, 31.0,
];
const MONTH_NAMES: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

/// A claimed yield to audit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Claim {
    /// Kind name as in design files (`single-slope`, …).
    pub kind: String,
    /// Footprint the claim is for \[m²\].
    pub area_m2: f64,
    /// Claimed distillate [L day⁻¹].
    pub litres_per_day: f64,
    /// Month 1…12 the claim is for; `None` for the mean day of the year.
    pub month: Option<u32>,
    /// Stage count of a multi-effect still; `None` takes the design's first multi-effect
    /// variant's.
    pub stages: Option<u32>,
}

/// Which part of a [`Claim`] is wrong.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ClaimField {
    /// `kind`.
    Kind,
    /// `area_m2`.
    Area,
    /// `litres_per_day`.
    LitresPerDay,
    /// `month`.
    Month,
    /// `stages`.
    Stages,
}

/// Why an audit could not be made.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum AuditError {
    /// A claim value is wrong.
    #[error("{message}")]
    BadClaim {
        /// Which value.
        field: ClaimField,
        /// What is wrong and what is allowed.
        message: String,
    },
    /// The site's weather or the representative variant's simulation failed.
    #[error(transparent)]
    Run(#[from] Error),
}

fn bad(field: ClaimField, message: String) -> AuditError {
    AuditError::BadClaim { field, message }
}

/// The verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Verdict {
    /// Within what well-built stills of the kind reach.
    Plausible,
    /// Above [`IMPLAUSIBLE_FRACTION`] of the ceiling.
    Implausible,
    /// Above the ceiling.
    Impossible,
}

impl Verdict {
    /// The word.
    pub fn word(self) -> &'static str {
        match self {
            Verdict::Plausible => "plausible",
            Verdict::Implausible => "implausible",
            Verdict::Impossible => "impossible",
        }
    }
}

/// Where the sunlight entering through the cover comes from.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "basis", rename_all = "kebab-case")]
pub enum CoverBasis {
    /// Simulated with this variant of the design (its cover, tilt and walls).
    Variant {
        /// Variant name.
        name: String,
    },
    /// The default cover: 4 mm window glass facing the equator.
    DefaultGlass {
        /// Tilt \[deg\].
        tilt_deg: f64,
        /// Azimuth, clockwise from north \[deg\].
        azimuth_deg: f64,
    },
}

/// Sunlight figures of one mean day.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DaySun {
    /// Global horizontal irradiation [kWh m⁻² day⁻¹].
    pub ghi_kwh_m2_day: f64,
    /// Sunlight entering through the cover per m² of footprint [kWh m⁻² day⁻¹].
    pub entering_kwh_m2_day: f64,
}

/// The audit of one claim.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Audit {
    /// The claim.
    pub claim: Claim,
    /// What the claim means per m² of footprint [L m⁻² day⁻¹].
    pub claimed_l_m2_day: f64,
    /// The day it is judged on (`Apr mean day`, `mean day of the year`).
    pub period: String,
    /// Sunlight on that day.
    pub sun: DaySun,
    /// Where the entering sunlight comes from.
    pub basis: CoverBasis,
    /// Latent heat used [J kg⁻¹].
    pub latent_heat_j_kg: f64,
    /// Single-effect ceiling [L m⁻² day⁻¹].
    pub single_effect_ceiling_l_m2_day: f64,
    /// Gain output ratio multiplying the ceiling (multi-effect only) [-].
    pub gain_output_ratio: Option<f64>,
    /// Stage count (multi-effect only).
    pub stages: Option<u32>,
    /// The ceiling the claim is held against [L m⁻² day⁻¹].
    pub ceiling_l_m2_day: f64,
    /// Claimed distillate × latent heat ÷ sunlight entering [-].
    pub implied_efficiency: f64,
    /// Claim ÷ ceiling [-].
    pub fraction_of_ceiling: f64,
    /// Threshold share of the ceiling for *implausible* [-].
    pub implausible_fraction: f64,
    /// The verdict.
    pub verdict: Verdict,
    /// The reasoning, a line per step.
    pub reasoning: Vec<String>,
}

/// Classify a claim against a ceiling: impossible above it, implausible above
/// `implausible_fraction` of it, plausible otherwise.
pub fn classify(
    claimed_l_m2_day: f64,
    ceiling_l_m2_day: f64,
    implausible_fraction: f64,
) -> Verdict {
    if claimed_l_m2_day > ceiling_l_m2_day {
        Verdict::Impossible
    } else if claimed_l_m2_day > implausible_fraction * ceiling_l_m2_day {
        Verdict::Implausible
    } else {
        Verdict::Plausible
    }
}

fn check_claim(c: &Claim) -> Result<(), AuditError> {
    if !KIND_NAMES.contains(&c.kind.as_str()) {
        return Err(bad(
            ClaimField::Kind,
            format!(
                "unknown kind `{}`; kinds: {}",
                c.kind,
                KIND_NAMES.join(", ")
            ),
        ));
    }
    if !(c.area_m2.is_finite() && c.area_m2 > 0.0 && c.area_m2 <= 1e6) {
        return Err(bad(
            ClaimField::Area,
            format!("area {} m² must be in (0, 1e6]", c.area_m2),
        ));
    }
    if !(c.litres_per_day.is_finite() && c.litres_per_day >= 0.0 && c.litres_per_day <= 1e9) {
        return Err(bad(
            ClaimField::LitresPerDay,
            format!("{} L/day must be in [0, 1e9]", c.litres_per_day),
        ));
    }
    if let Some(m) = c.month.filter(|m| !(1..=12).contains(m)) {
        return Err(bad(ClaimField::Month, format!("month {m} must be 1…12")));
    }
    if let Some(s) = c.stages.filter(|s| !(1..=50).contains(s)) {
        return Err(bad(ClaimField::Stages, format!("{s} stages must be 1…50")));
    }
    if c.stages.is_some() && c.kind != "multi-effect" {
        return Err(bad(
            ClaimField::Stages,
            format!(
                "a stage count applies to multi-effect stills, not {}",
                c.kind
            ),
        ));
    }
    Ok(())
}

/// Sunlight entering a default glass cover at latitude tilt (at least
/// [`DEFAULT_COVER_MIN_TILT_DEG`]) facing the equator, per m² of the footprint under it, for
/// each month's mean day; and that month's global horizontal irradiation.
///
/// Beam through [`optics::cover_optics`] at its incidence angle, sky diffuse and ground light
/// at Brandemuehl & Beckman's equivalent angles ([`optics::diffuse_equivalent_incidence_rad`]),
/// Hay–Davies transposition; per m² of footprint = per m² of cover ÷ cos(tilt), as for a
/// single-slope cover over its basin.
pub fn default_cover_sun(weather: &SiteWeather, latitude_deg: f64) -> ([DaySun; 12], CoverBasis) {
    let tilt_deg = latitude_deg.abs().max(DEFAULT_COVER_MIN_TILT_DEG);
    let azimuth_deg = if latitude_deg >= 0.0 { 180.0 } else { 0.0 };
    let plane = Plane::from_degrees(tilt_deg, azimuth_deg);
    let tau = |theta_rad: f64| {
        optics::cover_optics(
            theta_rad,
            DEFAULT_COVER_REFRACTIVE_INDEX,
            DEFAULT_COVER_EXTINCTION_PER_M,
            DEFAULT_COVER_THICKNESS_M,
        )
        .transmittance
    };
    let (theta_sky, theta_ground) = optics::diffuse_equivalent_incidence_rad(plane.tilt_rad);
    let (tau_sky, tau_ground) = (tau(theta_sky), tau(theta_ground));
    let poa = weather.series.plane_series(plane, SkyModel::HayDavies);
    let mut ghi_j = [0.0; 12];
    let mut in_j = [0.0; 12];
    let mut days: [Vec<u32>; 12] = Default::default();
    for (h, p) in weather.series.hours.iter().zip(&poa) {
        let m = (h.month.clamp(1, 12) - 1) as usize;
        let s = h.period_h * 3600.0;
        ghi_j[m] += h.ghi_w_m2.max(0.0) * s;
        let beam = if p.cos_incidence > 0.0 {
            p.beam_w_m2 * tau(p.cos_incidence.clamp(0.0, 1.0).acos())
        } else {
            0.0
        };
        in_j[m] += (beam + p.sky_diffuse_w_m2 * tau_sky + p.ground_w_m2 * tau_ground) * s;
        if !days[m].contains(&h.day_of_year) {
            days[m].push(h.day_of_year);
        }
    }
    let per_footprint = 1.0 / plane.tilt_rad.cos();
    let sun = std::array::from_fn(|m| {
        let n = days[m].len().max(1) as f64;
        DaySun {
            ghi_kwh_m2_day: ghi_j[m] / n / 3.6e6,
            entering_kwh_m2_day: in_j[m] / n / 3.6e6 * per_footprint,
        }
    });
    (
        sun,
        CoverBasis::DefaultGlass {
            tilt_deg,
            azimuth_deg,
        },
    )
}

/// The representative variant of a kind: the design's first of that kind, with the stage
/// count replaced for a multi-effect still.
fn representative(loaded: &LoadedDesign, kind: &str, stages: Option<u32>) -> Option<Variant> {
    let mut v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == kind)
        .cloned()?;
    if let (VariantKind::MultiEffect(me), Some(n)) = (&mut v.kind, stages) {
        me.stages = n;
    }
    Some(v)
}

/// Audit a claimed yield on the design's site.
///
/// The sunlight entering comes from the design's first variant of the claimed kind, simulated
/// on the site (for a multi-effect still with the stage count set to the claim's), or — when
/// the design has none — from [`default_cover_sun`]. A multi-effect still's ceiling is
/// multiplied by the annual gain output ratio the simulation gives (at least 1), or by the
/// stage count when the design has no multi-effect variant (an ideal stack reuses each
/// kilogram's latent heat at most once per stage).
pub fn audit(
    loaded: &LoadedDesign,
    weather: &SiteWeather,
    claim: &Claim,
    opts: &RunOptions,
) -> Result<Audit, AuditError> {
    check_claim(claim)?;
    let multi = claim.kind == "multi-effect";
    let rep = representative(loaded, &claim.kind, claim.stages);
    let mut stages = claim.stages;
    if multi && stages.is_none() {
        stages = rep.as_ref().and_then(|v| match &v.kind {
            VariantKind::MultiEffect(me) => Some(me.stages),
            _ => None,
        });
        if stages.is_none() {
            return Err(bad(
                ClaimField::Stages,
                "the design has no multi-effect variant to take a stage count from; give the \
                 stage count"
                    .into(),
            ));
        }
    }
    let (sun, basis, gor) = match &rep {
        Some(v) => {
            let r = stills::simulate_variant(loaded, v, weather, opts)?;
            let mut sun = [DaySun {
                ghi_kwh_m2_day: 0.0,
                entering_kwh_m2_day: 0.0,
            }; 12];
            for m in &r.months {
                if let Some(s) = sun.get_mut((m.month.clamp(1, 12) - 1) as usize) {
                    *s = DaySun {
                        ghi_kwh_m2_day: m.insolation_kwh_m2_day,
                        entering_kwh_m2_day: m.cover_insolation_kwh_m2_day,
                    };
                }
            }
            let gor = match &r.details {
                KindDetails::MultiEffect {
                    gain_output_ratio, ..
                } => Some(gain_output_ratio.max(1.0)),
                _ => None,
            };
            (
                sun,
                CoverBasis::Variant {
                    name: v.name.clone(),
                },
                gor,
            )
        }
        None => {
            let (sun, basis) = default_cover_sun(weather, loaded.design.site.latitude_deg);
            (sun, basis, stages.map(f64::from))
        }
    };
    let hfg = ceiling_latent_heat_j_kg();
    let ceiling_of = |s: &DaySun| s.entering_kwh_m2_day * 3.6e6 / hfg;
    let (period, day) = match claim.month {
        Some(m) => {
            let i = (m.clamp(1, 12) - 1) as usize;
            (format!("{} mean day", MONTH_NAMES[i]), sun[i])
        }
        None => {
            let w = |f: &dyn Fn(&DaySun) -> f64| {
                sun.iter()
                    .zip(MONTH_DAYS)
                    .map(|(s, d)| f(s) * d)
                    .sum::<f64>()
                    / 365.0
            };
            (
                "mean day of the year".to_owned(),
                DaySun {
                    ghi_kwh_m2_day: w(&|s| s.ghi_kwh_m2_day),
                    entering_kwh_m2_day: w(&|s| s.entering_kwh_m2_day),
                },
            )
        }
    };
    let single = ceiling_of(&day);
    let ceiling = single * gor.unwrap_or(1.0);
    let claimed = claim.litres_per_day / claim.area_m2;
    let entering_j = day.entering_kwh_m2_day * 3.6e6;
    let implied = if entering_j > 0.0 {
        claimed * hfg / entering_j
    } else if claimed > 0.0 {
        f64::INFINITY
    } else {
        0.0
    };
    let fraction = if ceiling > 0.0 {
        claimed / ceiling
    } else if claimed > 0.0 {
        f64::INFINITY
    } else {
        0.0
    };
    let verdict = classify(claimed, ceiling, IMPLAUSIBLE_FRACTION);

    let mut reasoning = Vec::new();
    reasoning.push(format!(
        "Claim: {} L/day from {} m² of {} still is {claimed:.2} L/m²/day, judged on the site's {period}.",
        claim.litres_per_day, claim.area_m2, claim.kind
    ));
    let basis_words = match &basis {
        CoverBasis::Variant { name } => format!(
            "simulated with the design's `{name}` variant (its cover, tilt, walls and soiling)"
        ),
        CoverBasis::DefaultGlass {
            tilt_deg,
            azimuth_deg,
        } => format!(
            "the design has no {} variant, so a default 4 mm window-glass cover (n = 1.526, \
             K = 32 m⁻¹) at {tilt_deg:.1}° tilt facing azimuth {azimuth_deg:.0}°, per m² of the \
             footprint under it",
            claim.kind
        ),
    };
    reasoning.push(format!(
        "Sunlight: {:.2} kWh/m²/day on the ground (global horizontal); {:.2} kWh/m²/day of \
         footprint enters through the cover — {basis_words}.",
        day.ghi_kwh_m2_day, day.entering_kwh_m2_day
    ));
    reasoning.push(format!(
        "Single-effect ceiling: {:.2} kWh × 3.6 MJ/kWh ÷ {:.4} MJ/kg (latent heat at 100 °C, \
         the smallest for a still open to the air, so the most generous) = {single:.2} L/m²/day: \
         no single-effect still can evaporate more than the sunlight that enters it.",
        day.entering_kwh_m2_day,
        hfg / 1e6
    ));
    if let (Some(g), Some(n)) = (gor, stages) {
        let from = match &basis {
            CoverBasis::Variant { name } => {
                format!(
                    "the annual gain output ratio our model gives `{name}` with {n} stages on this site"
                )
            }
            CoverBasis::DefaultGlass { .. } => format!(
                "the stage count: an ideal {n}-stage stack reuses each kilogram's latent heat at most once per stage"
            ),
        };
        reasoning.push(format!(
            "Multi-effect ceiling: {single:.2} × {g:.2} ({from}) = {ceiling:.2} L/m²/day."
        ));
    }
    reasoning.push(format!(
        "Implied efficiency: {claimed:.2} L/m²/day × latent heat ÷ entering sunlight = {:.0} %, \
         {:.0} % of the {}ceiling.",
        implied * 100.0,
        fraction * 100.0,
        if multi { "multi-effect " } else { "" }
    ));
    reasoning.push(match verdict {
        Verdict::Impossible => format!(
            "Impossible: the claim exceeds the ceiling by {:.0} %.",
            (fraction - 1.0) * 100.0
        ),
        Verdict::Implausible => format!(
            "Implausible: above {:.0} % of the ceiling ({:.2} L/m²/day). Well-built basin stills \
             reach 25–45 % daily efficiency, so claims far above 60 % of the ceiling are \
             implausible (REFERENCES.md §8){}; ask for measured daily records with the sunlight.",
            IMPLAUSIBLE_FRACTION * 100.0,
            IMPLAUSIBLE_FRACTION * ceiling,
            if multi {
                " — here applied to the first stage, whose heat the stack then reuses"
            } else {
                ""
            }
        ),
        Verdict::Plausible => format!(
            "Plausible: at or below {:.0} % of the ceiling ({:.2} L/m²/day), within what \
             well-built stills reach (REFERENCES.md §8: 25–45 % for basins).",
            IMPLAUSIBLE_FRACTION * 100.0,
            IMPLAUSIBLE_FRACTION * ceiling
        ),
    });
    let sunniest = sun
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.entering_kwh_m2_day.total_cmp(&b.1.entering_kwh_m2_day));
    if claim.month.is_none()
        && let Some((i, best)) = sunniest
    {
        let best_ceiling = ceiling_of(best) * gor.unwrap_or(1.0);
        if best_ceiling > 0.0 {
            reasoning.push(format!(
                "Even in the sunniest month ({}) it would be {:.0} % of that month's ceiling ({:.2} L/m²/day).",
                MONTH_NAMES[i],
                claimed / best_ceiling * 100.0,
                best_ceiling
            ));
        }
    }
    Ok(Audit {
        claim: claim.clone(),
        claimed_l_m2_day: claimed,
        period,
        sun: day,
        basis,
        latent_heat_j_kg: hfg,
        single_effect_ceiling_l_m2_day: single,
        gain_output_ratio: gor,
        stages,
        ceiling_l_m2_day: ceiling,
        implied_efficiency: implied,
        fraction_of_ceiling: fraction,
        implausible_fraction: IMPLAUSIBLE_FRACTION,
        verdict,
        reasoning,
    })
}
