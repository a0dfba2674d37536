//! Horizon profile: obstruction elevation by azimuth, blocking the beam.

use crate::physics::sun::SunPosition;
use std::f64::consts::{FRAC_PI_2, TAU};

/// A horizon profile: the elevation of obstructions (hills, buildings, trees) seen from the
/// still, as a function of azimuth.
///
/// Between the given points the elevation is interpolated linearly in azimuth, wrapping round
/// through north (the last point connects to the first across 360°). A single point gives a
/// constant elevation all round; an empty profile is a free horizon. The beam is blocked when
/// the sun's elevation is at or below the profile's elevation at the sun's azimuth.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Horizon {
    /// (azimuth \[rad\] clockwise from north in 0…2π, elevation \[rad\]), sorted by azimuth.
    points_rad: Vec<(f64, f64)>,
}

impl Horizon {
    /// Build from (azimuth \[deg\], elevation \[deg\]) pairs in any order. Azimuths are wrapped
    /// into 0…360°; non-finite points are ignored (the site validation reports them).
    pub fn from_degrees(points_deg: &[(f64, f64)]) -> Self {
        let mut points_rad: Vec<(f64, f64)> = points_deg
            .iter()
            .filter(|(a, e)| a.is_finite() && e.is_finite())
            .map(|&(a, e)| {
                (
                    a.to_radians().rem_euclid(TAU),
                    e.to_radians().clamp(0.0, FRAC_PI_2),
                )
            })
            .collect();
        points_rad.sort_by(|a, b| a.0.total_cmp(&b.0));
        Self { points_rad }
    }

    /// True when the profile has no points.
    pub fn is_free(&self) -> bool {
        self.points_rad.is_empty()
    }

    /// Obstruction elevation \[rad\] at an azimuth \[rad\] (clockwise from north).
    pub fn elevation_rad_at(&self, azimuth_rad: f64) -> f64 {
        let pts = &self.points_rad;
        match pts.len() {
            0 => 0.0,
            1 => pts[0].1,
            n => {
                let az = azimuth_rad.rem_euclid(TAU);
                // Find the first point at or beyond az; interpolate from its predecessor,
                // wrapping round through 0/2π.
                let idx = pts.iter().position(|p| p.0 >= az).unwrap_or(n);
                let (a0, e0) = if idx == 0 {
                    (pts[n - 1].0 - TAU, pts[n - 1].1)
                } else {
                    pts[idx - 1]
                };
                let (a1, e1) = if idx == n {
                    (pts[0].0 + TAU, pts[0].1)
                } else {
                    pts[idx]
                };
                let span = a1 - a0;
                if span <= 1e-12 {
                    e1
                } else {
                    e0 + (e1 - e0) * (az - a0) / span
                }
            }
        }
    }

    /// True when the sun is behind the profile (or below the geometric horizon).
    pub fn blocks(&self, sun: SunPosition) -> bool {
        let elevation_rad = FRAC_PI_2 - sun.zenith_rad;
        elevation_rad <= 0.0 || elevation_rad <= self.elevation_rad_at(sun.azimuth_rad)
    }
}
