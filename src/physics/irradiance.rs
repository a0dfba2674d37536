//! Splitting global irradiance into beam and diffuse, spreading daily irradiation over the
//! hours of the day, and transposing horizontal irradiance onto a tilted plane.
//!
//! Angle conventions are those of [`crate::physics::sun`]: azimuths clockwise from north,
//! tilt from the horizontal, hour angle negative in the morning.
//!
//! Main reference: J. A. Duffie & W. A. Beckman, *Solar Engineering of Thermal Processes*,
//! 4th ed., Wiley (2013), chapter 2 — cited below as "D&B".

use std::f64::consts::PI;

use crate::physics::sun::{SunPosition, cos_incidence};

/// Floor on cos θz used when a horizontal beam is converted to a normal or tilted one
/// (cos 89° ≈ 0.01745) [-].
///
/// Near sunrise and sunset the ratio R_b = cos θ / cos θz grows without bound while the
/// measured horizontal beam is small and uncertain; capping it this way is the same choice
/// as pvlib 0.16.1 (`irradiance.haydavies`, its issue 432), so our fixtures agree row by row.
pub const MIN_COS_ZENITH: f64 = 0.01745;

/// Hourly diffuse fraction I_d/I from the hourly clearness index k_T [-].
///
/// D. G. Erbs, S. A. Klein & J. A. Duffie (1982), "Estimation of the diffuse radiation
/// fraction for hourly, daily and monthly-average global radiation", *Solar Energy* 28(4),
/// 293–302, eq. 1; D&B eq. 2.10.1:
/// * k_T ≤ 0.22: 1.0 − 0.09 k_T
/// * 0.22 < k_T ≤ 0.80: 0.9511 − 0.1604 k_T + 4.388 k_T² − 16.638 k_T³ + 12.336 k_T⁴
/// * k_T > 0.80: 0.165
///
/// * `kt` — hourly clearness index I/I_0 [-]
///
/// Returns I_d/I [-] in [0.165, 1].
///
/// *Notes*: a negative k_T is treated as 0 (all diffuse); the paper gives no values there.
/// NaN input returns 1 (all diffuse), the conservative side for beam-dependent gains.
pub fn erbs_diffuse_fraction(kt: f64) -> f64 {
    if kt.is_nan() {
        return 1.0;
    }
    let k = kt.max(0.0);
    if k <= 0.22 {
        1.0 - 0.09 * k
    } else if k <= 0.80 {
        0.9511 - 0.1604 * k + 4.388 * k.powi(2) - 16.638 * k.powi(3) + 12.336 * k.powi(4)
    } else {
        0.165
    }
}

/// Monthly-average daily diffuse fraction H̄_d/H̄ from the monthly clearness index K̄_T [-].
///
/// Erbs, Klein & Duffie (1982), monthly-average correlation; D&B eq. 2.12.1:
/// * ω_s ≤ 81.4°: 1.391 − 3.560 K̄_T + 4.189 K̄_T² − 2.137 K̄_T³
/// * ω_s > 81.4°: 1.311 − 3.022 K̄_T + 3.427 K̄_T² − 1.821 K̄_T³
///
/// * `kt_bar` — monthly-mean daily clearness index H̄/H̄_0 [-], valid 0.3 … 0.8
/// * `sunset_hour_angle_rad` — ω_s of the month's mean day [rad]
///
/// Returns H̄_d/H̄ [-] in [0, 1].
///
/// *Notes*: outside the paper's range K̄_T is clamped to at most 0.8 (above it the cubic
/// turns back down towards zero diffuse); below 0.3 the cubic is extrapolated (it rises
/// monotonically) and the result clamped to [0, 1]. NaN input returns 1.
pub fn erbs_monthly_diffuse_fraction(kt_bar: f64, sunset_hour_angle_rad: f64) -> f64 {
    if kt_bar.is_nan() {
        return 1.0;
    }
    let k = kt_bar.clamp(0.0, 0.8);
    let f = if sunset_hour_angle_rad <= 81.4_f64.to_radians() {
        1.391 - 3.560 * k + 4.189 * k.powi(2) - 2.137 * k.powi(3)
    } else {
        1.311 - 3.022 * k + 3.427 * k.powi(2) - 1.821 * k.powi(3)
    };
    f.clamp(0.0, 1.0)
}

/// Denominator sin ω_s − ω_s cos ω_s shared by eqs. 2.13.2 and 2.13.4 [-].
fn daylength_shape(sunset_hour_angle_rad: f64) -> f64 {
    sunset_hour_angle_rad.sin() - sunset_hour_angle_rad * sunset_hour_angle_rad.cos()
}

/// Liu & Jordan's ratio r_d of hourly to daily diffuse (equally, extraterrestrial)
/// irradiation, for a one-hour interval centred on the hour angle ω [-].
///
/// B. Y. H. Liu & R. C. Jordan (1960), "The interrelationship and characteristic
/// distribution of direct, diffuse and total solar radiation", *Solar Energy* 4(3), 1–19;
/// D&B eq. 2.13.4:
/// r_d = (π/24) (cos ω − cos ω_s) / (sin ω_s − (π ω_s/180) cos ω_s)  (ω_s in degrees there).
///
/// * `hour_angle_rad` — ω at the middle of the hour [rad]
/// * `sunset_hour_angle_rad` — ω_s [rad], 0 … π
///
/// Returns r_d [-], the fraction of the day's total falling in that hour; 0 when |ω| ≥ ω_s
/// (sun down) or in polar night.
///
/// *Notes*: outside sunrise … sunset the formula would go negative; 0 is returned instead.
pub fn liu_jordan_rd(hour_angle_rad: f64, sunset_hour_angle_rad: f64) -> f64 {
    let den = daylength_shape(sunset_hour_angle_rad);
    if den.is_nan() || den <= 1e-12 {
        return 0.0;
    }
    let num = hour_angle_rad.cos() - sunset_hour_angle_rad.cos();
    if num.is_nan() || num <= 0.0 || hour_angle_rad.abs() >= sunset_hour_angle_rad {
        return 0.0;
    }
    PI / 24.0 * num / den
}

/// Coefficients (a, b) of Collares-Pereira & Rabl's hourly ratio [-].
///
/// Collares-Pereira & Rabl (1979); D&B eqs. 2.13.2b–c:
/// a = 0.409 + 0.5016 sin(ω_s − 60°), b = 0.6609 − 0.4767 sin(ω_s − 60°).
///
/// * `sunset_hour_angle_rad` — ω_s [rad]
///
/// Returns (a, b) [-].
///
/// *Notes*: none.
pub fn collares_pereira_rabl_coefficients(sunset_hour_angle_rad: f64) -> (f64, f64) {
    let s = (sunset_hour_angle_rad - 60.0_f64.to_radians()).sin();
    (0.409 + 0.5016 * s, 0.6609 - 0.4767 * s)
}

/// Collares-Pereira & Rabl's ratio r_t of hourly to daily global irradiation for a one-hour
/// interval centred on the hour angle ω [-].
///
/// M. Collares-Pereira & A. Rabl (1979), "The average distribution of solar radiation —
/// correlations between diffuse and hemispherical and between daily and hourly insolation
/// values", *Solar Energy* 22(2), 155–164; D&B eq. 2.13.2:
/// r_t = (π/24)(a + b cos ω)(cos ω − cos ω_s)/(sin ω_s − (π ω_s/180) cos ω_s), with a and b
/// from [`collares_pereira_rabl_coefficients`].
///
/// * `hour_angle_rad` — ω at the middle of the hour [rad]
/// * `sunset_hour_angle_rad` — ω_s [rad], 0 … π
///
/// Returns r_t [-], 0 when the sun is down.
///
/// *Notes*: the correlation is not normalised — its sum over the hours of a day differs from
/// 1 by about a percent; callers that need the daily total exactly should renormalise.
pub fn collares_pereira_rabl_rt(hour_angle_rad: f64, sunset_hour_angle_rad: f64) -> f64 {
    let (a, b) = collares_pereira_rabl_coefficients(sunset_hour_angle_rad);
    (liu_jordan_rd(hour_angle_rad, sunset_hour_angle_rad) * (a + b * hour_angle_rad.cos())).max(0.0)
}

/// Irradiance on a tilted plane, split by origin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlaneIrradiance {
    /// Beam (direct) irradiance on the plane [W m⁻²], ≥ 0.
    pub beam_w_m2: f64,
    /// Diffuse irradiance from the sky dome on the plane [W m⁻²], ≥ 0 (for Hay–Davies this
    /// includes the circumsolar part).
    pub sky_diffuse_w_m2: f64,
    /// Irradiance reflected from the ground onto the plane [W m⁻²], ≥ 0.
    pub ground_w_m2: f64,
    /// Cosine of the beam's angle of incidence on the plane [-], negative when the sun is
    /// behind it (the beam is then 0). Kept so cover optics can use the incidence angle.
    pub cos_incidence: f64,
}

impl PlaneIrradiance {
    /// All night: every component 0.
    const NIGHT: PlaneIrradiance = PlaneIrradiance {
        beam_w_m2: 0.0,
        sky_diffuse_w_m2: 0.0,
        ground_w_m2: 0.0,
        cos_incidence: 0.0,
    };

    /// Total (global) irradiance on the plane [W m⁻²].
    pub fn total_w_m2(&self) -> f64 {
        self.beam_w_m2 + self.sky_diffuse_w_m2 + self.ground_w_m2
    }

    /// Diffuse part, sky plus ground [W m⁻²].
    pub fn diffuse_w_m2(&self) -> f64 {
        self.sky_diffuse_w_m2 + self.ground_w_m2
    }
}

/// Inputs after cleaning: non-negative irradiances with DHI ≤ GHI, albedo in [0, 1].
struct Cleaned {
    ghi_w_m2: f64,
    dhi_w_m2: f64,
    albedo: f64,
}

/// Clamps user data into the physical range; `None` when there is nothing to transpose.
fn clean(ghi_w_m2: f64, dhi_w_m2: f64, albedo: f64) -> Option<Cleaned> {
    let ghi = if ghi_w_m2.is_finite() {
        ghi_w_m2.max(0.0)
    } else {
        0.0
    };
    if ghi <= 0.0 {
        return None;
    }
    let dhi = if dhi_w_m2.is_finite() {
        dhi_w_m2.clamp(0.0, ghi)
    } else {
        ghi
    };
    let albedo = if albedo.is_finite() {
        albedo.clamp(0.0, 1.0)
    } else {
        0.0
    };
    Some(Cleaned {
        ghi_w_m2: ghi,
        dhi_w_m2: dhi,
        albedo,
    })
}

/// Direct normal irradiance derived from horizontal global and diffuse [W m⁻²].
///
/// Closure relation GHI = DNI cos θz + DHI (D&B §2.9), solved for DNI with cos θz floored at
/// [`MIN_COS_ZENITH`]: DNI = (GHI − DHI)/max(cos θz, 0.01745).
///
/// * `ghi_w_m2`, `dhi_w_m2` — global and diffuse horizontal irradiance [W m⁻²]
/// * `sun` — sun position
///
/// Returns DNI [W m⁻²] ≥ 0; 0 when the sun is at or below the horizon (cos θz ≤ 0).
///
/// *Notes*: negative inputs are treated as 0 and DHI is limited to GHI.
pub fn direct_normal_w_m2(ghi_w_m2: f64, dhi_w_m2: f64, sun: SunPosition) -> f64 {
    let Some(c) = clean(ghi_w_m2, dhi_w_m2, 0.0) else {
        return 0.0;
    };
    let cos_z = sun.cos_zenith();
    if cos_z.is_nan() || cos_z <= 0.0 {
        return 0.0;
    }
    (c.ghi_w_m2 - c.dhi_w_m2) / cos_z.max(MIN_COS_ZENITH)
}

/// Parts shared by both sky models: cos θ, beam on the plane, ground-reflected part, and the
/// geometric beam ratio R_b = max(cos θ, 0)/max(cos θz, floor).
struct Geometry {
    cos_incidence: f64,
    beam_w_m2: f64,
    ground_w_m2: f64,
    rb: f64,
    dni_w_m2: f64,
    cos_tilt: f64,
}

fn geometry(
    c: &Cleaned,
    sun: SunPosition,
    tilt_rad: f64,
    surface_azimuth_rad: f64,
) -> Option<Geometry> {
    if !(tilt_rad.is_finite() && surface_azimuth_rad.is_finite() && sun.zenith_rad.is_finite()) {
        return None;
    }
    let cos_theta = cos_incidence(sun, tilt_rad, surface_azimuth_rad);
    let cos_z = sun.cos_zenith();
    let sun_up = cos_z > 0.0;
    let dni_w_m2 = if sun_up {
        (c.ghi_w_m2 - c.dhi_w_m2) / cos_z.max(MIN_COS_ZENITH)
    } else {
        0.0
    };
    let rb = if sun_up {
        cos_theta.max(0.0) / cos_z.max(MIN_COS_ZENITH)
    } else {
        0.0
    };
    let cos_tilt = tilt_rad.cos();
    Some(Geometry {
        cos_incidence: cos_theta,
        beam_w_m2: (dni_w_m2 * cos_theta).max(0.0),
        ground_w_m2: (c.ghi_w_m2 * c.albedo * (1.0 - cos_tilt) / 2.0).max(0.0),
        rb,
        dni_w_m2,
        cos_tilt,
    })
}

/// Irradiance on a tilted plane with the isotropic-sky model.
///
/// B. Y. H. Liu & R. C. Jordan (1963), "A rational procedure for predicting the long-term
/// average performance of flat-plate solar-energy collectors", *Solar Energy* 7(2), 53–74
/// (isotropic diffuse sky); D&B eq. 2.15.1:
/// I_T = I_b R_b + I_d (1 + cos β)/2 + I ρ_g (1 − cos β)/2, with I_b R_b = DNI·max(cos θ, 0)
/// and DNI from [`direct_normal_w_m2`].
///
/// * `ghi_w_m2` — global horizontal irradiance I [W m⁻²]
/// * `dhi_w_m2` — diffuse horizontal irradiance I_d [W m⁻²]
/// * `sun` — sun position
/// * `tilt_rad` — β [rad]
/// * `surface_azimuth_rad` — γ [rad], clockwise from north
/// * `albedo` — ground reflectance ρ_g [-], 0 … 1
///
/// Returns the components (all ≥ 0). At night (GHI ≤ 0) everything is 0.
///
/// *Notes*: (1) cos θz is floored at [`MIN_COS_ZENITH`] in R_b (as pvlib 0.16.1), so for the
/// last degree above the horizon the beam is slightly under-counted instead of exploding.
/// (2) With the sun at or below the horizon the beam is 0 while any reported GHI/DHI still
/// gives sky and ground diffuse (pvlib would keep a beam there). (3) Negative or non-finite
/// irradiances are treated as 0, DHI is limited to GHI, albedo clamped to [0, 1]; a
/// non-finite angle gives all zeros.
pub fn isotropic(
    ghi_w_m2: f64,
    dhi_w_m2: f64,
    sun: SunPosition,
    tilt_rad: f64,
    surface_azimuth_rad: f64,
    albedo: f64,
) -> PlaneIrradiance {
    let Some(c) = clean(ghi_w_m2, dhi_w_m2, albedo) else {
        return PlaneIrradiance::NIGHT;
    };
    let Some(g) = geometry(&c, sun, tilt_rad, surface_azimuth_rad) else {
        return PlaneIrradiance::NIGHT;
    };
    PlaneIrradiance {
        beam_w_m2: g.beam_w_m2,
        sky_diffuse_w_m2: (c.dhi_w_m2 * (1.0 + g.cos_tilt) / 2.0).max(0.0),
        ground_w_m2: g.ground_w_m2,
        cos_incidence: g.cos_incidence,
    }
}

/// Irradiance on a tilted plane with the Hay–Davies anisotropic-sky model (isotropic sky plus
/// a circumsolar part treated as beam).
///
/// J. E. Hay & J. A. Davies (1980), "Calculation of the solar radiation incident on an
/// inclined surface", Proc. First Canadian Solar Radiation Data Workshop, p. 59;
/// D&B eq. 2.16.4 (the HDKR model of D&B §2.16 without Reindl's horizon-brightening term):
/// I_T = (I_b + I_d A_i) R_b + I_d (1 − A_i)(1 + cos β)/2 + I ρ_g (1 − cos β)/2,
/// with the anisotropy index A_i = I_b/I_o = DNI/G_on (D&B §2.16; the horizontal ratio equals
/// the normal one).
///
/// * `ghi_w_m2`, `dhi_w_m2` — global and diffuse horizontal irradiance [W m⁻²]
/// * `dni_extra_w_m2` — extraterrestrial normal irradiance G_on [W m⁻²]
///   (e.g. [`crate::physics::sun::extraterrestrial_normal_w_m2`])
/// * `sun`, `tilt_rad`, `surface_azimuth_rad`, `albedo` — as in [`isotropic`]
///
/// Returns the components; `sky_diffuse_w_m2` holds isotropic plus circumsolar diffuse, and
/// `beam_w_m2` only the beam proper, as pvlib reports them.
///
/// *Notes*: as [`isotropic`], plus: DNI is derived from GHI − DHI and cos θz with the floor
/// [`MIN_COS_ZENITH`] (pvlib's `haydavies` takes DNI as an input; our fixtures feed it this
/// same DNI). A_i is clamped to [0, 1] (pvlib does not clamp; the two agree whenever
/// DNI ≤ G_on, which holds for any physical data), and a non-positive or non-finite G_on
/// gives A_i = 0 (isotropic sky).
pub fn hay_davies(
    ghi_w_m2: f64,
    dhi_w_m2: f64,
    dni_extra_w_m2: f64,
    sun: SunPosition,
    tilt_rad: f64,
    surface_azimuth_rad: f64,
    albedo: f64,
) -> PlaneIrradiance {
    let Some(c) = clean(ghi_w_m2, dhi_w_m2, albedo) else {
        return PlaneIrradiance::NIGHT;
    };
    let Some(g) = geometry(&c, sun, tilt_rad, surface_azimuth_rad) else {
        return PlaneIrradiance::NIGHT;
    };
    let ai = if dni_extra_w_m2.is_finite() && dni_extra_w_m2 > 0.0 {
        (g.dni_w_m2 / dni_extra_w_m2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let isotropic_part = (c.dhi_w_m2 * (1.0 - ai) * (1.0 + g.cos_tilt) / 2.0).max(0.0);
    let circumsolar_part = (c.dhi_w_m2 * ai * g.rb).max(0.0);
    PlaneIrradiance {
        beam_w_m2: g.beam_w_m2,
        sky_diffuse_w_m2: isotropic_part + circumsolar_part,
        ground_w_m2: g.ground_w_m2,
        cos_incidence: g.cos_incidence,
    }
}
