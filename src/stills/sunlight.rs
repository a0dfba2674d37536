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
        let through = self.through_cover(poa);
        if through.incident_w <= 0.0 {
            return SunlightSplit::default();
        }
        let (beam_share, diffuse_share) = if self.switches.walls {
            (
                beam_brine_share(&self.geom, sun, self.cover_azimuth_rad),
                diffuse_brine_share(&self.geom),
            )
        } else {
            (1.0, 1.0)
        };
        let on_brine_beam = through.entering_beam_w * beam_share;
        let on_brine_diffuse = through.entering_diffuse_w * diffuse_share;
        let on_walls = through.entering_w() - on_brine_beam - on_brine_diffuse;
        let walls_w = on_walls * self.liner_absorptance;
        let (brine_w, liner_w) = self.into_brine(on_brine_beam, on_brine_diffuse, sun);
        let lost = through.incident_w - through.cover_w - brine_w - liner_w - walls_w;
        SunlightSplit {
            incident_w: through.incident_w,
            entering_w: through.entering_w(),
            cover_w: through.cover_w,
            brine_w,
            liner_w,
            walls_w,
            lost_w: lost,
        }
    }

    /// The first half of [`StillOptics::split`]: what the cover reflects, absorbs and lets
    /// in (beam and diffuse separately), after dust and condensate [W].
    pub fn through_cover(&self, poa: &PlaneIrradiance) -> ThroughCover {
        let a = self.cover_area_m2;
        let beam = poa.beam_w_m2.max(0.0) * a;
        let sky = poa.sky_diffuse_w_m2.max(0.0) * a;
        let ground = poa.ground_w_m2.max(0.0) * a;
        let incident = beam + sky + ground;
        if incident <= 0.0 {
            return ThroughCover::default();
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
        if !self.condensate_drops {
            // A film absorbs what it stops.
            cover_w += after_dust * (1.0 - wet);
        }
        ThroughCover {
            incident_w: incident,
            cover_w,
            entering_beam_w: through_beam * dust * wet,
            entering_diffuse_w: through_diffuse * dust * wet,
        }
    }

    /// Share of light that reaches the cover's inside from below and is absorbed there
    /// (light crossing a double slope's enclosure to the far face) [-]: the cover's
    /// absorptance at Brandemuehl & Beckman's sky-diffuse equivalent angle for its tilt.
    ///
    /// Notes: a stated simplification (no source) — the light arrives from a spread of
    /// directions, so one diffuse-equivalent angle is used for beam and diffuse alike; what
    /// the cover does not absorb is taken to leave the still (its inward reflection, a few
    /// per cent, is neglected).
    pub fn far_cover_absorptance(&self) -> f64 {
        let (th_sky, _) = diffuse_equivalent_incidence_rad(self.geom.tilt_rad);
        self.cover(th_sky).1
    }

    /// The second half of [`StillOptics::split`]: beam and diffuse light reaching the water
    /// surface [W] into what the brine and the floor under it absorb [W] (Fresnel reflection
    /// at the water, then Rabl & Nielsen's depth split along the refracted path; the floor
    /// absorbs its share of what reaches it, the remainder leaves).
    pub fn into_brine(&self, beam_w: f64, diffuse_w: f64, sun: SunPosition) -> (f64, f64) {
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
        for (power, theta) in [(beam_w, zen_water), (diffuse_w, zen_diffuse)] {
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
        (brine_w, liner_w)
    }
}

/// Sunlight on one cover, split by [`StillOptics::through_cover`] [W].
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct ThroughCover {
    /// Incident on the cover.
    pub incident_w: f64,
    /// Absorbed by the cover (and its condensate film).
    pub cover_w: f64,
    /// Beam entering the enclosure.
    pub entering_beam_w: f64,
    /// Diffuse (sky and ground) entering the enclosure.
    pub entering_diffuse_w: f64,
}

impl ThroughCover {
    /// Everything entering the enclosure [W].
    pub fn entering_w(&self) -> f64 {
        self.entering_beam_w + self.entering_diffuse_w
    }
}

/// Where light entering an enclosure goes, as shares of it [-] (they sum to 1).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct InsideShares {
    /// Reaching the water surface (a tray's free surface for a stepped still).
    pub water: f64,
    /// Reaching the risers between trays (stepped still; 0 otherwise).
    pub risers: f64,
    /// Reaching the far face from inside (double slope; 0 otherwise).
    pub far_cover: f64,
    /// Caught by side, front, back and end walls.
    pub walls: f64,
}

/// Cross-section of a double-slope (gable) enclosure above the brine: two faces of equal
/// tilt meeting at a ridge over the middle of the width.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GableSection {
    /// Eave-to-eave size of the basin W \[m\].
    pub width_m: f64,
    /// Length along the ridge L \[m\].
    pub length_m: f64,
    /// Tilt of both faces β \[rad\].
    pub tilt_rad: f64,
    /// Side wall above the brine under each eave h_s \[m\] (≥ 0).
    pub eave_above_brine_m: f64,
}

impl GableSection {
    /// Mean height of the cover above the brine h_s + (W/4)·tan β \[m\].
    pub fn mean_gap_m(&self) -> f64 {
        self.eave_above_brine_m + 0.25 * self.width_m * self.tilt_rad.tan()
    }

    /// Inner wall area above the brine: two side walls and two gable ends \[m²\].
    pub fn wall_area_m2(&self) -> f64 {
        let hs = self.eave_above_brine_m.max(0.0);
        let w = self.width_m;
        2.0 * hs * self.length_m + 2.0 * (hs * w + 0.25 * w * w * self.tilt_rad.tan())
    }
}

/// Share of an end-wall (gable) interception, h̄·|s_l|/(s_z·L), as in [`beam_brine_share`].
fn end_wall_share(mean_gap_m: f64, s_l: f64, s_z: f64, length_m: f64) -> f64 {
    if length_m > 0.0 {
        (mean_gap_m * s_l.abs() / (s_z * length_m)).clamp(0.0, 1.0)
    } else {
        1.0
    }
}

/// Number of entry points the double-slope beam trace averages over.
const GABLE_TRACE_POINTS: usize = 64;

/// Where the beam entering through one face of a double slope goes [-].
///
/// Derivation (2-D ray geometry in the cross-section, our own, as for
/// [`beam_brine_share`]): x runs from this face's eave (x = 0) over the ridge (W/2) to the
/// far eave (x = W); the cover is h_s + x·tan β above the brine on this side and
/// h_s + (W − x)·tan β on the far side. A ray entering at x₀ (height H₀) descends with
/// k = s_f/s_z horizontal per vertical. For k ≥ 0 it lands at x′ = x₀ + k·H₀; if
/// k·tan β > 1 (sun lower than the far face is steep) it meets the far face at
/// x_B = (H₀ + x₀/k − h_s − W tan β)/(1/k − tan β) and leaves through it when x_B ≤ W;
/// otherwise it reaches the brine when x′ ≤ W and the far side wall when x′ > W. For k < 0
/// it reaches the brine when x′ ≥ 0 and the near side wall otherwise. The entry points are
/// spread evenly over the face (midpoint rule, [`GABLE_TRACE_POINTS`] points); the gable ends
/// take h̄·|s_l|/(s_z·L) of the rest, as in [`beam_brine_share`].
///
/// * `g` — the section; `sun` — sun position; `face_azimuth_rad` — direction this face
///   faces \[rad\], clockwise from north
///
/// Returns the shares (all 0 when no beam enters this face).
pub fn gable_beam_shares(
    g: &GableSection,
    sun: SunPosition,
    face_azimuth_rad: f64,
) -> InsideShares {
    let s_z = sun.zenith_rad.cos();
    let w = g.width_m;
    if s_z <= 1e-6 || w <= 0.0 {
        return InsideShares::default();
    }
    let d_az = sun.azimuth_rad - face_azimuth_rad;
    let s_f = sun.zenith_rad.sin() * d_az.cos();
    let s_l = sun.zenith_rad.sin() * d_az.sin();
    let k = s_f / s_z;
    let t = g.tilt_rad.tan();
    if 1.0 + k * t <= 1e-9 {
        return InsideShares::default();
    }
    let hs = g.eave_above_brine_m.max(0.0);
    let (mut water, mut far) = (0.0, 0.0);
    let n = GABLE_TRACE_POINTS;
    for i in 0..n {
        let x0 = (i as f64 + 0.5) / n as f64 * 0.5 * w;
        let h0 = hs + x0 * t;
        let x_land = x0 + k * h0;
        if k > 0.0 {
            let slope = 1.0 / k - t;
            if slope < 0.0 {
                let x_b = (h0 + x0 / k - hs - w * t) / slope;
                if x_b <= w {
                    far += 1.0;
                    continue;
                }
            }
            if x_land <= w {
                water += 1.0;
            }
        } else if x_land >= 0.0 {
            water += 1.0;
        }
    }
    let keep = 1.0 - end_wall_share(g.mean_gap_m(), s_l, s_z, g.length_m);
    let water = water / n as f64 * keep;
    let far_cover = far / n as f64 * keep;
    InsideShares {
        water,
        risers: 0.0,
        far_cover,
        walls: (1.0 - water - far_cover).max(0.0),
    }
}

/// Where diffuse light entering through one face of a double slope goes [-].
///
/// Hottel's crossed strings (Modest, *Radiative Heat Transfer*, 3rd ed., §4.5; from memory)
/// in the 2-D section, face width a = W/(2 cos β): to the far face, two strips of width a
/// meeting at the ridge with their far edges W apart, F = (2a − W)/(2a) = 1 − cos β; to the
/// brine, F = (√(W² + h_s²) − h_s)/(2a) (the two strings from the ridge cancel); the side
/// walls take the rest.
///
/// Notes: as in [`diffuse_brine_share`], the entering light is taken as isotropic and the
/// gable ends are ignored (2-D).
pub fn gable_diffuse_shares(g: &GableSection) -> InsideShares {
    let w = g.width_m;
    if w <= 0.0 {
        return InsideShares::default();
    }
    let hs = g.eave_above_brine_m.max(0.0);
    let a = 0.5 * w / g.tilt_rad.cos();
    let far_cover = (1.0 - g.tilt_rad.cos()).clamp(0.0, 1.0);
    let water = (((w * w + hs * hs).sqrt() - hs) / (2.0 * a)).clamp(0.0, 1.0 - far_cover);
    InsideShares {
        water,
        risers: 0.0,
        far_cover,
        walls: (1.0 - water - far_cover).max(0.0),
    }
}

/// Cross-section of a stepped (tray) still above the brine: `trays` trays of equal tread
/// W/N, each `riser_m` above the one in front, under one cover at tilt β.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StairSection {
    /// Front-to-back size W \[m\].
    pub width_m: f64,
    /// Length along the trays L \[m\].
    pub length_m: f64,
    /// Cover tilt β \[rad\].
    pub tilt_rad: f64,
    /// Cover above the first tray's brine at the front h_f \[m\] (≥ 0).
    pub front_above_brine_m: f64,
    /// Number of trays N (≥ 1).
    pub trays: u32,
    /// Rise from one tray to the next r \[m\].
    pub riser_m: f64,
}

impl StairSection {
    /// Tangent of the mean slope of the brine surfaces, tan α = (N − 1)·r/W, capped at the
    /// cover's tan β (validation keeps the steps under the cover).
    pub fn floor_slope(&self) -> f64 {
        if self.width_m <= 0.0 {
            return 0.0;
        }
        let n = f64::from(self.trays.max(1));
        ((n - 1.0) * self.riser_m / self.width_m).clamp(0.0, self.tilt_rad.tan().max(0.0))
    }

    /// Cover above the last tray's brine at the back h_b = h_f + W·(tan β − tan α) \[m\].
    pub fn back_above_brine_m(&self) -> f64 {
        self.front_above_brine_m + self.width_m * (self.tilt_rad.tan() - self.floor_slope())
    }

    /// Mean gap between the brine surfaces and the cover (h_f + h_b)/2 \[m\].
    pub fn mean_gap_m(&self) -> f64 {
        0.5 * (self.front_above_brine_m + self.back_above_brine_m())
    }

    /// Inner wall area above the brine: front, back and the two end walls \[m²\].
    pub fn wall_area_m2(&self) -> f64 {
        let hf = self.front_above_brine_m.max(0.0);
        let hb = self.back_above_brine_m().max(0.0);
        (hf + hb) * self.length_m + (hf + hb) * self.width_m
    }

    /// Exposed riser area facing the cover, (N − 1)·r·L \[m²\].
    pub fn riser_area_m2(&self) -> f64 {
        f64::from(self.trays.max(1) - 1) * self.riser_m * self.length_m
    }
}

/// Where the beam entering a stepped still's cover goes [-].
///
/// Derivation (2-D, our own, extending [`beam_brine_share`]): replace the flat brine by the
/// mean line of the steps, y = x·tan α. A ray entering at x (cover height h_f + x tan β)
/// with k = s_f/s_z lands on that line at x′ = [x(1 + k tan β) + k h_f]/(1 + k tan α); for
/// k > 0 the rays landing before the back wall enter at x ≤ [W(1 + k tan α) − k h_f]/
/// (1 + k tan β) (α = 0 gives the flat-basin bound); for k < 0 the bound at the front wall
/// is unchanged. On the steps themselves, one step of tread t and riser r_e = t tan α
/// intercepts beam in proportion to its projection s_z t + s_f r_e, so the risers (facing
/// the sun when k > 0) take k tan α/(1 + k tan α) of it and nothing when k ≤ 0, and the
/// treads are not shaded. End walls as in [`beam_brine_share`].
///
/// * `g` — the section; `sun` — sun position; `cover_azimuth_rad` — direction the cover
///   faces \[rad\]
///
/// Notes: the N − 1 real risers are spread evenly over the N treads (r_e = (N − 1) r / N),
/// so one tray gives exactly [`beam_brine_share`].
pub fn stair_beam_shares(
    g: &StairSection,
    sun: SunPosition,
    cover_azimuth_rad: f64,
) -> InsideShares {
    let s_z = sun.zenith_rad.cos();
    let w = g.width_m;
    if s_z <= 1e-6 || w <= 0.0 {
        return InsideShares::default();
    }
    let d_az = sun.azimuth_rad - cover_azimuth_rad;
    let s_f = sun.zenith_rad.sin() * d_az.cos();
    let s_l = sun.zenith_rad.sin() * d_az.sin();
    let k = s_f / s_z;
    let tb = g.tilt_rad.tan();
    let ta = g.floor_slope();
    let slope = 1.0 + k * tb;
    if slope <= 1e-9 {
        return InsideShares::default();
    }
    let hf = g.front_above_brine_m.max(0.0);
    let landing = if k >= 0.0 {
        ((w * (1.0 + k * ta) - hf * k) / slope).clamp(0.0, w)
    } else {
        (w - (-hf * k / slope)).clamp(0.0, w)
    };
    let keep = 1.0 - end_wall_share(g.mean_gap_m(), s_l, s_z, g.length_m);
    let on_steps = landing / w * keep;
    let riser_part = if k > 0.0 {
        k * ta / (1.0 + k * ta)
    } else {
        0.0
    };
    InsideShares {
        water: on_steps * (1.0 - riser_part),
        risers: on_steps * riser_part,
        far_cover: 0.0,
        walls: (1.0 - on_steps).max(0.0),
    }
}

/// Where diffuse light entering a stepped still's cover goes [-].
///
/// Hottel's crossed strings (Modest, §4.5; from memory) twice: from the cover to the mean
/// step line, F = [√(W² + (h_f − W tan α)²) + √(W² + (h_f + W tan β)²) − h_f − h_b]/(2c)
/// with c = W/cos β (α = 0 gives [`diffuse_brine_share`]); then within one step, from the
/// step line (hypotenuse c_s = √(t² + r_e²)) to the riser, (c_s + r_e − t)/(2c_s), the
/// tread taking the rest.
///
/// Notes: isotropic entering light and no end walls, as in [`diffuse_brine_share`].
pub fn stair_diffuse_shares(g: &StairSection) -> InsideShares {
    let w = g.width_m;
    if w <= 0.0 {
        return InsideShares::default();
    }
    let tb = g.tilt_rad.tan();
    let ta = g.floor_slope();
    let hf = g.front_above_brine_m.max(0.0);
    let hb = g.back_above_brine_m().max(0.0);
    let c = w / g.tilt_rad.cos();
    let d1 = (w * w + (hf - w * ta).powi(2)).sqrt();
    let d2 = (w * w + (hf + w * tb).powi(2)).sqrt();
    let on_steps = (((d1 + d2) - (hf + hb)) / (2.0 * c)).clamp(0.0, 1.0);
    let t = w / f64::from(g.trays.max(1));
    let r_e = t * ta;
    let c_s = (t * t + r_e * r_e).sqrt();
    let riser_part = if c_s > 0.0 {
        ((c_s + r_e - t) / (2.0 * c_s)).clamp(0.0, 1.0)
    } else {
        0.0
    };
    InsideShares {
        water: on_steps * (1.0 - riser_part),
        risers: on_steps * riser_part,
        far_cover: 0.0,
        walls: 1.0 - on_steps,
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

    fn gable() -> GableSection {
        GableSection {
            width_m: 1.4,
            length_m: 3.0,
            tilt_rad: 20f64.to_radians(),
            eave_above_brine_m: 0.12,
        }
    }

    #[test]
    fn gable_diffuse_shares_follow_the_crossed_strings() {
        // Hand calculation from the doc-comment formulas: a = 0.7/cos 20° = 0.74494;
        // far face 1 − cos 20° = 0.06031; brine (√(1.96 + 0.0144) − 0.12)/(2a) = 0.86259.
        let s = gable_diffuse_shares(&gable());
        assert!((s.far_cover - 0.06031).abs() < 1e-4, "{s:?}");
        assert!((s.water - 0.86259).abs() < 1e-4, "{s:?}");
        assert!((s.water + s.far_cover + s.walls - 1.0).abs() < 1e-12);
    }

    #[test]
    fn gable_beam_from_overhead_lands_on_the_brine_and_low_sun_crosses_to_the_far_face() {
        // Geometry: a vertical ray lands straight below its entry point (exact).
        let east = std::f64::consts::FRAC_PI_2;
        let overhead = SunPosition {
            zenith_rad: 0.0,
            azimuth_rad: east,
        };
        let s = gable_beam_shares(&gable(), overhead, east);
        assert!((s.water - 1.0).abs() < 1e-12);
        // Sun due east at 80° zenith (k = 5.67, k·tan 20° = 2.06 > 1): rays entering the
        // east face near the ridge meet the west face before the brine (doc-comment rule).
        let low = SunPosition {
            zenith_rad: 80f64.to_radians(),
            azimuth_rad: east,
        };
        let s = gable_beam_shares(&gable(), low, east);
        assert!(s.far_cover > 0.3, "{s:?}");
        assert!((s.water + s.far_cover + s.walls - 1.0).abs() < 1e-12);
    }

    #[test]
    fn one_tray_gives_the_flat_basin_shares() {
        // With one tray the stair rules reduce to the flat-basin ones (tan α = 0).
        let sun = SunPosition {
            zenith_rad: 50f64.to_radians(),
            azimuth_rad: 3.5,
        };
        let g = geom();
        let stair = StairSection {
            width_m: g.width_m,
            length_m: g.length_m,
            tilt_rad: g.tilt_rad,
            front_above_brine_m: g.front_above_brine_m,
            trays: 1,
            riser_m: 0.03,
        };
        let b = stair_beam_shares(&stair, sun, std::f64::consts::PI);
        let flat = beam_brine_share(&g, sun, std::f64::consts::PI);
        assert!((b.water - flat).abs() < 1e-12 && b.risers.abs() < 1e-15);
        let d = stair_diffuse_shares(&stair);
        assert!((d.water - diffuse_brine_share(&g)).abs() < 1e-12);
    }

    #[test]
    fn risers_take_k_tan_alpha_over_one_plus_k_tan_alpha_of_the_beam_on_the_steps() {
        // 4 trays on 1 m, 40 mm risers: tan α = 3·0.04/1 = 0.12; sun due south at 45°
        // (k = 1): risers take 0.12/1.12 = 0.10714 of the beam landing on the steps.
        let stair = StairSection {
            width_m: 1.0,
            length_m: 2.0,
            tilt_rad: 20f64.to_radians(),
            front_above_brine_m: 0.07,
            trays: 4,
            riser_m: 0.04,
        };
        let sun = SunPosition {
            zenith_rad: 45f64.to_radians(),
            azimuth_rad: std::f64::consts::PI,
        };
        let s = stair_beam_shares(&stair, sun, std::f64::consts::PI);
        let on_steps = s.water + s.risers;
        assert!((s.risers / on_steps - 0.10714).abs() < 1e-4, "{s:?}");
    }
}
