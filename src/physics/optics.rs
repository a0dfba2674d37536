//! Optics of covers and water: reflection, refraction and absorption of sunlight by a glazing
//! slab, equivalent incidence angles for diffuse light, depth-dependent absorption of sunlight
//! in brine, and the effective emissivity of two parallel grey surfaces.
//!
//! Main source: Duffie, J.A. & Beckman, W.A. (2013), *Solar Engineering of Thermal
//! Processes*, 4th ed., Wiley, chapter 5 ("D&B" below).

/// Refractive index of window glass used by D&B (2013) §5.1 [-].
pub const GLASS_REFRACTIVE_INDEX: f64 = 1.526;

/// Refractive index of water for sunlight [-] (D&B 2013, Table 5.1.1, from memory).
pub const WATER_REFRACTIVE_INDEX: f64 = 1.333;

/// Refraction angle by Snell's law \[rad\].
///
/// Snell's law as used in D&B (2013) §5.1 (equation number not checked): n₁ sin θ₁ = n₂ sin θ₂.
///
/// * `theta1_rad` — incidence angle θ₁ \[rad\], 0…π/2
/// * `n1`, `n2` — refractive indices of the incident and the transmitting medium [-]
///
/// Returns θ₂ \[rad\]. *Notes*: beyond the critical angle (total internal reflection, only
/// when n₁ > n₂) the sine is clamped to 1 and π/2 is returned.
pub fn refraction_angle_rad(theta1_rad: f64, n1: f64, n2: f64) -> f64 {
    let s = (n1 / n2 * theta1_rad.sin()).clamp(-1.0, 1.0);
    s.asin()
}

/// Fresnel reflectances of unpolarised light's two components at a smooth interface.
///
/// D&B (2013) eqs. 5.1.1–5.1.3: r⊥ = sin²(θ₂ − θ₁)/sin²(θ₂ + θ₁),
/// r∥ = tan²(θ₂ − θ₁)/tan²(θ₂ + θ₁) (the unpolarised r is their mean); at normal incidence
/// both equal ((n − 1)/(n + 1))² (eq. 5.1.4).
///
/// * `theta1_rad` — incidence angle \[rad\], 0…π/2
/// * `n_ratio` — n₂/n₁, refractive index of the transmitting medium over the incident one [-]
///
/// Returns (r⊥, r∥) [-].
///
/// *Notes*: evaluated in the equivalent cosine form, r⊥ = ((n₁cosθ₁ − n₂cosθ₂)/(n₁cosθ₁ +
/// n₂cosθ₂))², r∥ = ((n₁cosθ₂ − n₂cosθ₁)/(n₁cosθ₂ + n₂cosθ₁))², which is the same function
/// but has no 0/0 at normal incidence. Grazing incidence gives 1 for both.
pub fn fresnel_reflectance(theta1_rad: f64, n_ratio: f64) -> (f64, f64) {
    let theta1 = theta1_rad.abs().min(std::f64::consts::FRAC_PI_2);
    let theta2 = refraction_angle_rad(theta1, 1.0, n_ratio);
    let (c1, c2) = (theta1.cos(), theta2.cos());
    let perp_den = c1 + n_ratio * c2;
    let par_den = c2 + n_ratio * c1;
    let r_perp = if perp_den > 0.0 {
        ((c1 - n_ratio * c2) / perp_den).powi(2)
    } else {
        1.0
    };
    let r_par = if par_den > 0.0 {
        ((c2 - n_ratio * c1) / par_den).powi(2)
    } else {
        1.0
    };
    (r_perp.min(1.0), r_par.min(1.0))
}

/// Solar transmittance, absorptance and reflectance of a cover [-]; they sum to 1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CoverOptics {
    /// Transmittance τ [-].
    pub transmittance: f64,
    /// Absorptance α [-].
    pub absorptance: f64,
    /// Reflectance ρ [-].
    pub reflectance: f64,
}

/// Optics of one slab (one glass or plastic cover) in air, with reflection at both faces,
/// multiple internal reflections and Bouguer absorption, for each polarisation.
///
/// D&B (2013) eqs. 5.3.1–5.3.3 (with 5.2.2 for τₐ): for each polarisation with reflectance r,
/// τ = τₐ(1 − r)²/(1 − (rτₐ)²), ρ = r(1 + τₐτ), α = (1 − τₐ)(1 − r)/(1 − rτₐ),
/// τₐ = exp(−K L / cos θ₂); the cover's values are the means of the two polarisations.
///
/// * `theta_rad` — incidence angle \[rad\], 0…π/2
/// * `refractive_index` — n of the slab [-] (1.526 glass)
/// * `extinction_per_m` — extinction coefficient K [m⁻¹] (≈4 low-iron to ≈32 greenish glass)
/// * `thickness_m` — slab thickness L \[m\]
///
/// *Notes*: ρ is written as r(1 + τₐτ), algebraically equal to D&B's
/// r + (1 − r)²τₐ²r/(1 − (rτₐ)²), so τ + α + ρ = 1 holds to round-off.
pub fn cover_optics(
    theta_rad: f64,
    refractive_index: f64,
    extinction_per_m: f64,
    thickness_m: f64,
) -> CoverOptics {
    let theta = theta_rad.abs().min(std::f64::consts::FRAC_PI_2);
    let n = if refractive_index.is_finite() && refractive_index >= 1.0 {
        refractive_index
    } else {
        GLASS_REFRACTIVE_INDEX
    };
    let theta2 = refraction_angle_rad(theta, 1.0, n);
    let kl = (extinction_per_m.max(0.0) * thickness_m.max(0.0)).min(1e3);
    let tau_a = (-kl / theta2.cos()).exp();
    let (r_perp, r_par) = fresnel_reflectance(theta, n);
    let one = |r: f64| -> (f64, f64, f64) {
        if r >= 1.0 {
            return (0.0, 0.0, 1.0);
        }
        let tau = tau_a * (1.0 - r).powi(2) / (1.0 - (r * tau_a).powi(2));
        let alpha = (1.0 - tau_a) * (1.0 - r) / (1.0 - r * tau_a);
        let rho = r * (1.0 + tau_a * tau);
        (tau, alpha, rho)
    };
    let (t1, a1, r1) = one(r_perp);
    let (t2, a2, r2) = one(r_par);
    CoverOptics {
        transmittance: 0.5 * (t1 + t2),
        absorptance: 0.5 * (a1 + a2),
        reflectance: 0.5 * (r1 + r2),
    }
}

/// Equivalent beam incidence angles for isotropic sky diffuse and ground-reflected light on a
/// tilted surface \[rad\].
///
/// Brandemuehl, M.J. & Beckman, W.A. (1980), "Transmission of diffuse radiation through CPC
/// and flat plate collector glazings", Solar Energy 24, 511–513; D&B (2013) eq. 5.4.2 (β in
/// degrees): θ_e,sky = 59.7 − 0.1388β + 0.001497β², θ_e,ground = 90 − 0.5788β + 0.002693β².
///
/// * `tilt_rad` — surface tilt β from horizontal \[rad\], 0…π/2
///
/// Returns (θ_e,sky, θ_e,ground) \[rad\]. *Notes*: tilt is clamped to 0…90°, the fit's range.
pub fn diffuse_equivalent_incidence_rad(tilt_rad: f64) -> (f64, f64) {
    let b = if tilt_rad.is_finite() {
        tilt_rad.to_degrees().clamp(0.0, 90.0)
    } else {
        0.0
    };
    let sky_deg = 59.7 - 0.1388 * b + 0.001497 * b * b;
    let ground_deg = 90.0 - 0.5788 * b + 0.002693 * b * b;
    (sky_deg.to_radians(), ground_deg.to_radians())
}

/// Effective emissivity of two infinite parallel grey surfaces [-].
///
/// Radiation between infinite parallel grey plates, D&B (2013) ch. 3 (from memory):
/// ε_eff = (1/ε₁ + 1/ε₂ − 1)⁻¹.
///
/// * `eps1`, `eps2` — hemispherical emissivities of the two surfaces [-], 0…1
///
/// Returns ε_eff [-]; 0 if either emissivity is not positive.
pub fn effective_emissivity_parallel(eps1: f64, eps2: f64) -> f64 {
    if !(eps1 > 0.0 && eps2 > 0.0) {
        return 0.0;
    }
    1.0 / (1.0 / eps1.min(1.0) + 1.0 / eps2.min(1.0) - 1.0)
}

/// Reflectance of a calm water surface for unpolarised sunlight [-].
///
/// Fresnel (D&B 2013 eqs. 5.1.1–5.1.3) with n = 1.333, averaging the two polarisations.
///
/// * `theta_rad` — incidence angle on the water \[rad\] (light arriving from the air in the
///   still, i.e. after refraction through the cover the angle is unchanged for a parallel
///   cover and water surface only)
pub fn water_surface_reflectance(theta_rad: f64) -> f64 {
    let (a, b) = fresnel_reflectance(theta_rad, WATER_REFRACTIVE_INDEX);
    0.5 * (a + b)
}

/// Rabl & Nielsen's weights μⱼ of four spectral bands [-] (sum 0.776).
pub const RABL_NIELSEN_WEIGHTS: [f64; 4] = [0.237, 0.193, 0.167, 0.179];
/// Rabl & Nielsen's extinction coefficients ηⱼ of those bands [m⁻¹].
pub const RABL_NIELSEN_EXTINCTION_PER_M: [f64; 4] = [0.032, 0.45, 3.0, 35.0];

/// Fraction of the sunlight entering the water that is still travelling at a depth [-].
///
/// Rabl, A. & Nielsen, C.E. (1975), "Solar ponds for space heating", Solar Energy 17, 1–12
/// (from memory): τ(x) = Σⱼ μⱼ exp(−ηⱼ x), μ = {0.237, 0.193, 0.167, 0.179},
/// η = {0.032, 0.45, 3.0, 35.0} m⁻¹. The missing 0.224 (λ ≳ 1.2 µm) is absorbed in the top
/// millimetre, so τ(0⁺) = 0.776.
///
/// * `depth_m` — path length below the surface x \[m\] (negative counts as 0)
///
/// *Notes*: vertical path; for slanted rays pass the path length x/cos θ_refracted. Clear
/// water: dissolved matter and turbidity make real brine absorb faster.
pub fn rabl_nielsen_transmitted_fraction(depth_m: f64) -> f64 {
    let x = depth_m.max(0.0);
    RABL_NIELSEN_WEIGHTS
        .iter()
        .zip(RABL_NIELSEN_EXTINCTION_PER_M)
        .map(|(mu, eta)| mu * (-eta * x).exp())
        .sum()
}

/// Fraction of the sunlight entering the brine that the brine itself absorbs [-].
///
/// 1 − τ(d) from [`rabl_nielsen_transmitted_fraction`] (Rabl & Nielsen 1975): the surface
/// band (0.224) plus what the four bands lose over the depth d. The remainder τ(d) reaches
/// the basin liner.
///
/// * `depth_m` — brine depth d \[m\]
pub fn brine_absorbed_fraction(depth_m: f64) -> f64 {
    1.0 - rabl_nielsen_transmitted_fraction(depth_m)
}
