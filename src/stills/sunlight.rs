//! Where the sunlight on a basin still's cover goes, hour by hour: reflected by the cover,
//! absorbed in it, lost to dust and condensate, caught by the inner walls, reflected by the
//! water surface, absorbed in the brine or on the liner, or reflected back out.
//!
//! Everything here is computed once per weather record (never inside a Newton iteration)
//! and is a pure function of the geometry, the materials and the sun.

use crate::physics::irradiance::PlaneIrradiance;
use crate::physics::optics::{
    WATER_REFRACTIVE_INDEX, brine_absorbed_fraction, cover_optics,
    diffuse_equivalent_incidence_rad, refraction_angle_rad, water_surface_reflectance,
};
use crate::physics::sun::SunPosition;

/// Cross-section of a single-slope enclosure, the part above the brine surface.
///
/// The basin floor is `width_m` deep (front to back) and `length_m` long. The cover rises
/// from the top of the front wall to the top of the back wall at `tilt_rad`, so the back wall
/// is `width · tan(tilt)` taller than the front wall. Heights are measured from the brine
/// surface, i.e. the wall heights less the brine depth.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Enclosure {
    /// Front-to-back size of the basin W \[m\].
    pub width_m: f64,
    /// Length along the cover's lower edge L \[m\].
    pub length_m: f64,
    /// Cover tilt β \[rad\].
    pub tilt_rad: f64,
    /// Front wall above the brine h_f \[m\] (≥ 0).
    pub front_above_brine_m: f64,
}

impl Enclosure {
    /// Back wall above the brine h_b = h_f + W·tan β \[m\].
    pub fn back_above_brine_m(&self) -> f64 {
        self.front_above_brine_m + self.width_m * self.tilt_rad.tan()
    }

    /// Mean height of the cover above the brine \[m\] (the mean vapour path).
    pub fn mean_gap_m(&self) -> f64 {
        0.5 * (self.front_above_brine_m + self.back_above_brine_m())
    }

    /// Area of the inner walls above the brine: front, back and the two trapezoidal end
    /// walls \[m²\].
    pub fn wall_area_m2(&self) -> f64 {
        let hf = self.front_above_brine_m;
        let hb = self.back_above_brine_m();
        (hf + hb) * self.length_m + (hf + hb) * self.width_m
    }
}

/// Share of the beam entering through the cover that reaches the brine surface rather than
/// an inner wall [-].
///
/// Derivation (2-D ray geometry in the still's cross-section, our own): take x from the front
/// wall (x = 0) to the back wall (x = W); the cover is at height h(x) = h_f + x·tan β above
/// the brine. With the sun's direction split into a component toward the front
/// s_f = sin θz·cos(γs − γc), along the length s_l = sin θz·sin(γs − γc) and vertical
/// s_z = cos θz, a ray entering at x lands at x′ = x + h(x)·k with k = s_f/s_z. For k > 0
/// (sun in front) rays with x′ > W hit the back wall; the rays reaching the brine are those
/// entering at x ≤ (W − h_f k)/(1 + k tan β). For k < 0 (sun behind the vertical, e.g. a
/// high summer sun at low latitude) rays with x′ < 0 hit the front wall: x ≥ −h_f k/(1 + k
/// tan β). The beam crosses the cover uniformly in x, so the share is the length of the
/// landing range over W. The end walls take a further share h̄·|s_l|/(s_z·L) with h̄ the mean
/// cover height (the two directions treated as independent, a simplification).
///
/// * `geom` — the enclosure; `sun` — sun position; `cover_azimuth_rad` — direction the cover
///   faces γc \[rad\], clockwise from north
///
/// Returns the share in 0…1 (0 when the sun is down). Notes: 1 + k·tan β > 0 exactly when the
/// sun is in front of the cover plane (cos θ > 0 in the cross-section); otherwise no beam
/// enters and 0 is returned.
pub fn beam_brine_share(geom: &Enclosure, sun: SunPosition, cover_azimuth_rad: f64) -> f64 {
    let s_z = sun.zenith_rad.cos();
    if s_z <= 1e-6 || geom.width_m <= 0.0 {
        return 0.0;
    }
    let d_az = sun.azimuth_rad - cover_azimuth_rad;
    let s_f = sun.zenith_rad.sin() * d_az.cos();
    let s_l = sun.zenith_rad.sin() * d_az.sin();
    let k = s_f / s_z;
    let t = geom.tilt_rad.tan();
    let slope = 1.0 + k * t;
    if slope <= 1e-9 {
        return 0.0;
    }
    let w = geom.width_m;
    let hf = geom.front_above_brine_m.max(0.0);
    let landing = if k >= 0.0 {
        ((w - hf * k) / slope).clamp(0.0, w)
    } else {
        (w - (-hf * k / slope)).clamp(0.0, w)
    };
    let across = landing / w;
    let end = if geom.length_m > 0.0 {
        (geom.mean_gap_m() * s_l.abs() / (s_z * geom.length_m)).clamp(0.0, 1.0)
    } else {
        1.0
    };
    across * (1.0 - end)
}

/// Share of diffuse light entering through the cover that reaches the brine surface [-].
///
/// Hottel's crossed-strings rule for two-dimensional enclosures (Modest, *Radiative Heat
/// Transfer*, 3rd ed., §4.5; from memory): F_cover→brine = [(d₁ + d₂) − (h_f + h_b)]/(2c),
/// with diagonals d₁ = √(W² + h_f²), d₂ = √(W² + h_b²) and cover width c = W/cos β.
///
/// * `geom` — the enclosure
///
/// Notes: the light entering through the cover is taken as diffuse (isotropic) inside; the
/// end walls are ignored here (2-D), which over-states the share by at most h̄/L.
pub fn diffuse_brine_share(geom: &Enclosure) -> f64 {
    let w = geom.width_m;
    if w <= 0.0 {
        return 0.0;
    }
    let hf = geom.front_above_brine_m.max(0.0);
    let hb = geom.back_above_brine_m().max(0.0);
    let c = w / geom.tilt_rad.cos();
    let d1 = (w * w + hf * hf).sqrt();
    let d2 = (w * w + hb * hb).sqrt();
    (((d1 + d2) - (hf + hb)) / (2.0 * c)).clamp(0.0, 1.0)
}

/// Transmittance lost to condensate on a cover's underside [-] (share still passed).
///
/// Common practice, no source: a continuous film (wettable glass) passes about 0.97 of the
/// light, what it stops being absorbed in the water film (counted with the cover); drops
/// (most plastics) pass about 0.85, what they stop being scattered back out.
pub fn condensate_transmittance(drops: bool) -> f64 {
    if drops { 0.85 } else { 0.97 }
}

/// Share of the condensate that still reaches the trough when it forms drops rather than a
/// film [-]: drops on a non-wetting (most plastic) cover grow until they fall back into the
/// basin instead of running down to the trough, on top of the design's collection efficiency.
/// Common practice, no source (0.85); a wetting film runs off and loses nothing extra (1.0).
pub fn condensate_collection_factor(drops: bool) -> f64 {
    if drops { 0.85 } else { 1.0 }
}

/// Which optional optical loss paths apply.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OpticsSwitches {
    /// Angle-dependent cover and water reflection (off: normal-incidence values).
    pub angle_reflection: bool,
    /// Dust on the cover.
    pub soiling: bool,
    /// Condensate on the cover.
    pub condensate: bool,
    /// Walls intercepting light.
    pub walls: bool,
}

/// Everything fixed about a still's optics, precomputed once.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StillOptics {
    /// Enclosure geometry.
    pub geom: Enclosure,
    /// Direction the cover faces γc \[rad\].
    pub cover_azimuth_rad: f64,
    /// Cover area \[m²\].
    pub cover_area_m2: f64,
    /// Cover refractive index [-], extinction [m⁻¹] and thickness \[m\].
    pub cover_n: f64,
    /// Cover extinction coefficient K [m⁻¹].
    pub cover_k_per_m: f64,
    /// Cover thickness \[m\].
    pub cover_thickness_m: f64,
    /// Dust transmittance [-].
    pub soiling_transmittance: f64,
    /// Condensate forms drops (true) or a film (false).
    pub condensate_drops: bool,
    /// Liner solar absorptance [-] (also used for the inner walls).
    pub liner_absorptance: f64,
    /// Brine depth \[m\].
    pub depth_m: f64,
    /// Switches.
    pub switches: OpticsSwitches,
}

/// Where one record's sunlight on the cover goes [W], totals for the whole still.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct SunlightSplit {
    /// Incident on the cover (plane of array × cover area).
    pub incident_w: f64,
    /// Entering the enclosure through the cover (after dust and condensate).
    pub entering_w: f64,
    /// Absorbed by the cover (and its condensate film).
    pub cover_w: f64,
    /// Absorbed by the brine.
    pub brine_w: f64,
    /// Absorbed by the liner.
    pub liner_w: f64,
    /// Absorbed by the inner walls.
    pub walls_w: f64,
    /// Lost: reflected by cover, dust and drops, water surface, walls and liner.
    pub lost_w: f64,
}

impl StillOptics {
    fn cover(&self, theta_rad: f64) -> (f64, f64) {
        let theta = if self.switches.angle_reflection {
            theta_rad
        } else {
            0.0
        };
        let o = cover_optics(
            theta,
            self.cover_n,
            self.cover_k_per_m,
            self.cover_thickness_m,
        );
        (o.transmittance, o.absorptance)
    }

    /// Split one record's plane-of-array irradiance (per m² of cover) into what each part of
    /// the still absorbs.
    ///
    /// Cover: Fresnel + Bouguer ([`cover_optics`]) at the beam's incidence angle and at
    /// Brandemuehl & Beckman's equivalent angles for sky and ground diffuse
    /// ([`diffuse_equivalent_incidence_rad`]); then dust and condensate factors. Inside:
    /// beam and diffuse shares reaching the brine ([`beam_brine_share`],
    /// [`diffuse_brine_share`]); the walls absorb the rest with the liner's absorptance.
    /// At the water: Fresnel reflection at the sun's zenith angle (beam; the cover is a flat
    /// slab so the ray keeps its direction) or at 59.7° (diffuse, Brandemuehl–Beckman for a
    /// horizontal surface); Rabl & Nielsen's depth split ([`brine_absorbed_fraction`]) along
    /// the refracted path; the liner absorbs its share of what reaches it and the remainder is
    /// taken to leave through the cover (a simplification: part of it would be absorbed on
    /// the way).
    pub fn split(&self, poa: &PlaneIrradiance, sun: SunPosition) -> SunlightSplit {
        let a = self.cover_area_m2;
        let beam = poa.beam_w_m2.max(0.0) * a;
        let sky = poa.sky_diffuse_w_m2.max(0.0) * a;
        let ground = poa.ground_w_m2.max(0.0) * a;
        let incident = beam + sky + ground;
        if incident <= 0.0 {
            return SunlightSplit::default();
        }
        let theta_beam = poa.cos_incidence.clamp(-1.0, 1.0).acos();
        let (th_sky, th_ground) = diffuse_equivalent_incidence_rad(self.geom.tilt_rad);
        let (tb, ab) = self.cover(theta_beam);
        let (ts, as_) = self.cover(th_sky);
        let (tg, ag) = self.cover(th_ground);
        let dust = if self.switches.soiling {
            self.soiling_transmittance
        } else {
            1.0
        };
        let wet = if self.switches.condensate {
            condensate_transmittance(self.condensate_drops)
        } else {
            1.0
        };
        let through_beam = beam * tb;
        let through_diffuse = sky * ts + ground * tg;
        let mut cover_w = beam * ab + sky * as_ + ground * ag;
        let after_dust = (through_beam + through_diffuse) * dust;
        let entering_beam = through_beam * dust * wet;
        let entering_diffuse = through_diffuse * dust * wet;
        if !self.condensate_drops {
            // A film absorbs what it stops.
            cover_w += after_dust * (1.0 - wet);
        }
        let entering = entering_beam + entering_diffuse;

        let (beam_share, diffuse_share) = if self.switches.walls {
            (
                beam_brine_share(&self.geom, sun, self.cover_azimuth_rad),
                diffuse_brine_share(&self.geom),
            )
        } else {
            (1.0, 1.0)
        };
        let on_brine_beam = entering_beam * beam_share;
        let on_brine_diffuse = entering_diffuse * diffuse_share;
        let on_walls = entering - on_brine_beam - on_brine_diffuse;
        let walls_w = on_walls * self.liner_absorptance;

        let (zen_water, zen_diffuse) = if self.switches.angle_reflection {
            (
                sun.zenith_rad.clamp(0.0, 89.0_f64.to_radians()),
                diffuse_equivalent_incidence_rad(0.0).0,
            )
        } else {
            (0.0, 0.0)
        };
        let mut brine_w = 0.0;
        let mut liner_w = 0.0;
        for (power, theta) in [(on_brine_beam, zen_water), (on_brine_diffuse, zen_diffuse)] {
            if power <= 0.0 {
                continue;
            }
            let into = power * (1.0 - water_surface_reflectance(theta));
            let refracted = refraction_angle_rad(theta, 1.0, WATER_REFRACTIVE_INDEX);
            let path_m = self.depth_m / refracted.cos().max(0.1);
            let f = brine_absorbed_fraction(path_m);
            brine_w += into * f;
            liner_w += into * (1.0 - f) * self.liner_absorptance;
        }
        let lost = incident - cover_w - brine_w - liner_w - walls_w;
        SunlightSplit {
            incident_w: incident,
            entering_w: entering,
            cover_w,
            brine_w,
            liner_w,
            walls_w,
            lost_w: lost,
        }
    }
}

/// Diffuse reflectance of one glass cover seen from the absorber below, ρ_d [-]: Duffie &
/// Beckman (2013) §5.5 give ≈ 0.16 for one cover (from memory).
pub const COVER_DIFFUSE_REFLECTANCE: f64 = 0.16;

/// Transmittance–absorptance product of a cover over a flat absorber, with the light the
/// absorber reflects back up and the cover returns to it [-].
///
/// Duffie & Beckman (2013) eq. 5.5.1 (from memory): (τα) = τα / (1 − (1 − α)ρ_d).
///
/// * `tau` — cover transmittance τ [-]; `alpha` — absorber absorptance α [-]
/// * `rho_d` — diffuse reflectance of the cover from below ρ_d [-]
///
/// Returns (τα) [-] in 0…1.
pub fn transmittance_absorptance_product(tau: f64, alpha: f64, rho_d: f64) -> f64 {
    let t = tau.clamp(0.0, 1.0);
    let a = alpha.clamp(0.0, 1.0);
    let r = rho_d.clamp(0.0, 0.99);
    (t * a / (1.0 - (1.0 - a) * r)).clamp(0.0, 1.0)
}

/// A flat absorber (a wick cloth or a multi-effect still's absorber plate) parallel to its
/// cover, precomputed once.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FlatOptics {
    /// Tilt of cover and absorber β \[rad\].
    pub tilt_rad: f64,
    /// Cover area \[m²\] (the absorber has the same area).
    pub cover_area_m2: f64,
    /// Cover refractive index [-].
    pub cover_n: f64,
    /// Cover extinction coefficient K [m⁻¹].
    pub cover_k_per_m: f64,
    /// Cover thickness \[m\].
    pub cover_thickness_m: f64,
    /// Condensate under the cover: `Some(true)` drops, `Some(false)` a film, `None` a dry
    /// cover (glazing over a dry air space).
    pub condensate: Option<bool>,
    /// Solar absorptance of the absorber or wet cloth [-].
    pub absorptance: f64,
}

impl FlatOptics {
    /// Split one record's plane-of-array irradiance (per m² of cover) between the cover and
    /// the absorber; the absorber's share is returned in [`SunlightSplit::liner_w`].
    ///
    /// Cover: Fresnel + Bouguer ([`cover_optics`]) at the beam incidence angle and at
    /// Brandemuehl & Beckman's equivalent angles for sky and ground diffuse
    /// ([`diffuse_equivalent_incidence_rad`]); condensate as in [`condensate_transmittance`].
    /// Absorber: [`transmittance_absorptance_product`] with [`COVER_DIFFUSE_REFLECTANCE`].
    /// Nothing is shaded: the absorber fills the cover and the gap is small.
    pub fn split(&self, poa: &PlaneIrradiance) -> SunlightSplit {
        let a = self.cover_area_m2;
        let beam = poa.beam_w_m2.max(0.0) * a;
        let sky = poa.sky_diffuse_w_m2.max(0.0) * a;
        let ground = poa.ground_w_m2.max(0.0) * a;
        let incident = beam + sky + ground;
        if incident <= 0.0 {
            return SunlightSplit::default();
        }
        let theta_beam = poa.cos_incidence.clamp(-1.0, 1.0).acos();
        let (th_sky, th_ground) = diffuse_equivalent_incidence_rad(self.tilt_rad);
        let optics =
            |th: f64| cover_optics(th, self.cover_n, self.cover_k_per_m, self.cover_thickness_m);
        let (ob, os, og) = (optics(theta_beam), optics(th_sky), optics(th_ground));
        let through = beam * ob.transmittance + sky * os.transmittance + ground * og.transmittance;
        let mut cover_w = beam * ob.absorptance + sky * os.absorptance + ground * og.absorptance;
        let wet = self.condensate.map_or(1.0, condensate_transmittance);
        if self.condensate == Some(false) {
            cover_w += through * (1.0 - wet);
        }
        let entering = through * wet;
        let tau_alpha =
            transmittance_absorptance_product(1.0, self.absorptance, COVER_DIFFUSE_REFLECTANCE);
        let absorbed = entering * tau_alpha;
        SunlightSplit {
            incident_w: incident,
            entering_w: entering,
            cover_w,
            brine_w: 0.0,
            liner_w: absorbed,
            walls_w: 0.0,
            lost_w: incident - cover_w - absorbed,
        }
    }
}

#[cfg(test)]
mod tests {

    #[test]
    fn tau_alpha_product_of_one_cover() {
        // Duffie & Beckman (2013) eq. 5.5.1 (from memory): τ = 0.84, α = 0.90, ρ_d = 0.16
        // → (τα) = 0.756/(1 − 0.1·0.16) = 0.7683 (hand calculation; 1e-4 for rounding).
        let ta = transmittance_absorptance_product(0.84, 0.90, 0.16);
        assert!((ta - 0.7683).abs() < 1e-4, "{ta}");
        // A black absorber (α = 1) returns nothing: (τα) = τ exactly.
        assert!((transmittance_absorptance_product(0.84, 1.0, 0.16) - 0.84).abs() < 1e-12);
    }

    use super::*;

    fn geom() -> Enclosure {
        Enclosure {
            width_m: 1.0,
            length_m: 2.0,
            tilt_rad: 15f64.to_radians(),
            front_above_brine_m: 0.08,
        }
    }

    #[test]
    fn overhead_sun_lands_entirely_on_the_brine() {
        // Geometry: a vertical ray lands straight below where it entered (exact).
        let sun = SunPosition {
            zenith_rad: 0.0,
            azimuth_rad: std::f64::consts::PI,
        };
        let s = beam_brine_share(&geom(), sun, std::f64::consts::PI);
        assert!((s - 1.0).abs() < 1e-12);
    }

    #[test]
    fn low_sun_in_front_is_caught_by_the_back_wall() {
        // Sun due south at 60° zenith, cover facing south: k = tan 60° = 1.732,
        // landing = (1 − 0.08·1.732)/(1 + 1.732·tan 15°) = 0.8614/1.4641 = 0.5883 (hand
        // calculation from the formula in the doc comment; 1e-3 for rounding).
        let sun = SunPosition {
            zenith_rad: 60f64.to_radians(),
            azimuth_rad: std::f64::consts::PI,
        };
        let s = beam_brine_share(&geom(), sun, std::f64::consts::PI);
        assert!((s - 0.5883).abs() < 1e-3, "{s}");
    }

    #[test]
    fn crossed_strings_for_a_flat_box() {
        // Crossed strings for a rectangle W × h (tilt 0): F = (2√(W²+h²) − 2h)/(2W);
        // W = 1, h = 0.08 → 0.92319 (hand calculation).
        let g = Enclosure {
            tilt_rad: 0.0,
            ..geom()
        };
        assert!((diffuse_brine_share(&g) - 0.92319).abs() < 1e-4);
    }
}
