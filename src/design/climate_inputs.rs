//! Resolving a validated design's `[site]` and variants into the climate module's inputs.
//!
//! The climate module does not know the design file; this is the one place where the
//! design's fields are turned into [`SiteLocation`], [`ClimateSource`] and cover [`Plane`]s.

use crate::climate::file::{
    Column, ColumnMap, FileFormat, GapFill as FileGapFill, PeriodConvention, PoaColumn,
    WeatherFileSpec,
};
use crate::climate::monthly::{Humidity as ClimateHumidity, MonthlyMeans};
use crate::climate::{ClimateSource, Plane, SiteLocation};

use super::schema::{
    Climate, GapFill, Humidity, Period, Site, Variant, VariantKind, WeatherFormat,
};

/// Wind-measurement height of EPW files [m]: the standard 10 m mast of synoptic stations
/// (WMO Guide to Instruments and Methods of Observation, WMO-No. 8 — from memory).
pub const EPW_WIND_HEIGHT_M: f64 = 10.0;

impl Site {
    /// The site's location, albedo and horizon as the climate module takes them.
    pub fn location(&self) -> SiteLocation {
        SiteLocation {
            latitude_deg: self.latitude_deg,
            longitude_deg: self.longitude_deg,
            elevation_m: self.elevation_m,
            utc_offset_h: self.utc_offset_h,
            albedo: self.albedo,
            horizon: self
                .horizon
                .iter()
                .map(|p| (p.azimuth_deg, p.elevation_deg))
                .collect(),
        }
    }

    /// The site's climate source (monthly means or a weather file) for the climate module.
    pub fn climate_source(&self) -> ClimateSource {
        match &self.climate {
            Climate::Monthly(m) => ClimateSource::Monthly(Box::new(MonthlyMeans {
                ghi_kwh_m2_day: m.ghi_kwh_m2_day,
                t_max_c: m.t_max_c,
                t_min_c: m.t_min_c,
                wind_m_s: m.wind_m_s,
                wind_height_m: m.wind_height_m,
                humidity: match m.humidity {
                    Humidity::RelativePercent(rh) => ClimateHumidity::RelativePercent(rh),
                    Humidity::DewPointC(dp) => ClimateHumidity::DewPointC(dp),
                },
                rain_mm: m.rain_mm,
            })),
            Climate::WeatherFile(f) => {
                let mut columns = ColumnMap::default();
                if let Some(c) = &f.columns {
                    columns.timestamp = c.timestamp.clone();
                    columns.ghi = Column::named(&c.ghi_w_m2);
                    columns.dhi = c.dhi_w_m2.as_deref().map(Column::named);
                    columns.dni = c.dni_w_m2.as_deref().map(Column::named);
                    columns.t_air = Column::named(&c.t_air_c);
                    columns.wind = c.wind_m_s.as_deref().map(Column::named);
                    columns.relative_humidity = c.rh_percent.as_deref().map(Column::named);
                    columns.dew_point = c.dew_point_c.as_deref().map(Column::named);
                    columns.poa = match (&c.poa_w_m2, c.poa_tilt_deg, c.poa_azimuth_deg) {
                        (Some(name), Some(tilt), Some(az)) => Some(PoaColumn {
                            column: Column::named(name),
                            plane: Plane::from_degrees(tilt, az),
                        }),
                        _ => None,
                    };
                }
                ClimateSource::File(Box::new(WeatherFileSpec {
                    path: f.path.clone(),
                    format: match f.format {
                        WeatherFormat::Csv => FileFormat::Csv,
                        WeatherFormat::Epw => FileFormat::Epw,
                    },
                    period: match f.period {
                        Period::Ending => PeriodConvention::Ending,
                        Period::Beginning => PeriodConvention::Beginning,
                        Period::Centred => PeriodConvention::Centred,
                    },
                    columns,
                    gap_fill: match f.gap_fill {
                        GapFill::Stop => FileGapFill::Stop,
                        GapFill::Linear => FileGapFill::Linear {
                            max_gap_h: f.max_gap_h,
                        },
                    },
                    wind_height_m: match f.format {
                        WeatherFormat::Csv => f.wind_height_m,
                        WeatherFormat::Epw => EPW_WIND_HEIGHT_M,
                    },
                }))
            }
        }
    }
}

impl Variant {
    /// Every plane that admits sunlight into this variant, with a label for tables: one cover
    /// for most kinds, the two opposite faces of a double slope.
    pub fn cover_planes(&self) -> Vec<(String, Plane)> {
        let tilt = self.cover_tilt_deg();
        let az = self.cover_azimuth_deg;
        match &self.kind {
            VariantKind::DoubleSlope(_) => {
                let back = (az + 180.0) % 360.0;
                vec![
                    (
                        format!("{} {}", self.name, compass_point(az)),
                        Plane::from_degrees(tilt, az),
                    ),
                    (
                        format!("{} {}", self.name, compass_point(back)),
                        Plane::from_degrees(tilt, back),
                    ),
                ]
            }
            _ => vec![(self.name.clone(), Plane::from_degrees(tilt, az))],
        }
    }
}

/// The nearest of the eight compass points to an azimuth clockwise from north [°].
pub fn compass_point(azimuth_deg: f64) -> &'static str {
    const POINTS: [&str; 8] = ["N", "NE", "E", "SE", "S", "SW", "W", "NW"];
    let i = ((azimuth_deg.rem_euclid(360.0) + 22.5) / 45.0).floor() as usize % 8;
    POINTS[i]
}

#[cfg(test)]
mod tests {
    use super::compass_point;

    #[test]
    fn compass_points_wrap() {
        assert_eq!(compass_point(0.0), "N");
        assert_eq!(compass_point(359.0), "N");
        assert_eq!(compass_point(90.0), "E");
        assert_eq!(compass_point(180.0), "S");
        assert_eq!(compass_point(-90.0), "W");
        assert_eq!(compass_point(200.0), "S");
        assert_eq!(compass_point(225.0), "SW");
    }
}
