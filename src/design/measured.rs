//! `[variant.calibration.measured]`: the columns of a pilot still's measured CSV file and
//! their units. The file itself is named on the command line (`stillbench calibrate
//! --measured FILE`) and read by [`crate::calibrate::measured`].

use serde::{Deserialize, Serialize};

use super::schema::Period;

/// How the distillate column counts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum DistillateCounting {
    /// Each row holds what was collected over its own interval (default).
    #[default]
    Interval,
    /// Each row holds a running total (a counter or a weighed bottle); it may be reset.
    Cumulative,
}

/// Unit of the distillate column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum DistillateUnit {
    /// Millilitres (default).
    #[default]
    #[serde(rename = "mL")]
    Millilitre,
    /// Litres.
    #[serde(rename = "L")]
    Litre,
    /// Kilograms (1 kg of distillate = 1 L).
    #[serde(rename = "kg")]
    Kilogram,
    /// Litres per m² of the still's footprint.
    #[serde(rename = "L/m2")]
    LitrePerM2,
}

impl DistillateUnit {
    /// Kilograms for one unit of the column, for a still of footprint `footprint_m2` \[m²\]
    /// (1 L of distillate taken as 1 kg: common practice, no source; the 0.3–1 % density
    /// difference at 20–45 °C is below a collection bottle's reading error).
    pub fn kg_per_unit(self, footprint_m2: f64) -> f64 {
        match self {
            DistillateUnit::Millilitre => 1e-3,
            DistillateUnit::Litre | DistillateUnit::Kilogram => 1.0,
            DistillateUnit::LitrePerM2 => footprint_m2,
        }
    }
}

fn default_timestamp() -> String {
    "timestamp".into()
}
fn default_poa() -> String {
    "poa_w_m2".into()
}
fn default_t_air() -> String {
    "t_air_c".into()
}
fn default_distillate() -> String {
    "distillate".into()
}
fn default_wind_height() -> f64 {
    2.0
}
fn default_max_gap() -> f64 {
    3.0
}

/// `[variant.calibration.measured]`: column names (matched ignoring case and surrounding
/// spaces) and units of a pilot still's measured file. Every field has a default, so an
/// empty table (or none) reads a file with the default names.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MeasuredColumns {
    /// Timestamp column (ISO 8601, as in weather files); default `timestamp`.
    #[serde(default = "default_timestamp")]
    pub timestamp: String,
    /// UTC offset of stamps that carry none [h], [-12, 14]; default the site's time zone.
    #[serde(default)]
    pub utc_offset_h: Option<f64>,
    /// What a row's stamp marks within its interval; default `ending`.
    #[serde(default)]
    pub period: Period,
    /// Plane-of-array irradiance measured in the plane of the still's cover [W/m²]; default
    /// `poa_w_m2`.
    #[serde(default = "default_poa")]
    pub poa_w_m2: String,
    /// Global horizontal irradiance [W/m²], if logged (it only splits the measured plane
    /// irradiance into beam and diffuse parts).
    #[serde(default)]
    pub ghi_w_m2: Option<String>,
    /// Air temperature [°C]; default `t_air_c`.
    #[serde(default = "default_t_air")]
    pub t_air_c: String,
    /// Wind speed [m/s], if logged.
    #[serde(default)]
    pub wind_m_s: Option<String>,
    /// Height of the anemometer [m], (0.5, 100]; default 2 (a pilot's mast).
    #[serde(default = "default_wind_height")]
    pub wind_height_m: f64,
    /// Relative humidity [%], if logged.
    #[serde(default)]
    pub rh_percent: Option<String>,
    /// Distillate column; default `distillate`.
    #[serde(default = "default_distillate")]
    pub distillate: String,
    /// Its unit: `mL` (default), `L`, `kg` or `L/m2` (per m² of footprint).
    #[serde(default)]
    pub distillate_unit: DistillateUnit,
    /// `interval` (default) or `cumulative`.
    #[serde(default)]
    pub distillate_counting: DistillateCounting,
    /// Brine (or wick, or first-stage) temperature [°C], if logged.
    #[serde(default)]
    pub brine_c: Option<String>,
    /// Cover temperature [°C], if logged.
    #[serde(default)]
    pub cover_c: Option<String>,
    /// Liner (absorber) temperature [°C], if logged.
    #[serde(default)]
    pub liner_c: Option<String>,
    /// Longest gap over which the *weather* is interpolated to keep the model running [h],
    /// (0, 48]; default 3. Distillate is never interpolated.
    #[serde(default = "default_max_gap")]
    pub max_gap_h: f64,
}

impl Default for MeasuredColumns {
    fn default() -> Self {
        MeasuredColumns {
            timestamp: default_timestamp(),
            utc_offset_h: None,
            period: Period::default(),
            poa_w_m2: default_poa(),
            ghi_w_m2: None,
            t_air_c: default_t_air(),
            wind_m_s: None,
            wind_height_m: default_wind_height(),
            rh_percent: None,
            distillate: default_distillate(),
            distillate_unit: DistillateUnit::default(),
            distillate_counting: DistillateCounting::default(),
            brine_c: None,
            cover_c: None,
            liner_c: None,
            max_gap_h: default_max_gap(),
        }
    }
}

impl MeasuredColumns {
    /// Every out-of-range value as (field, message).
    pub fn problems(&self) -> Vec<(String, String)> {
        let mut out = Vec::new();
        if !(self.wind_height_m > 0.5 && self.wind_height_m <= 100.0) {
            out.push((
                "wind_height_m".to_owned(),
                format!(
                    "wind_height_m = {} is outside (0.5, 100]",
                    self.wind_height_m
                ),
            ));
        }
        if !(self.max_gap_h > 0.0 && self.max_gap_h <= 48.0) {
            out.push((
                "max_gap_h".to_owned(),
                format!("max_gap_h = {} is outside (0, 48]", self.max_gap_h),
            ));
        }
        if let Some(o) = self.utc_offset_h
            && !(-12.0..=14.0).contains(&o)
        {
            out.push((
                "utc_offset_h".to_owned(),
                format!("utc_offset_h = {o} is outside [-12, 14]"),
            ));
        }
        let names = [
            ("timestamp", Some(&self.timestamp)),
            ("poa_w_m2", Some(&self.poa_w_m2)),
            ("t_air_c", Some(&self.t_air_c)),
            ("distillate", Some(&self.distillate)),
        ];
        for (f, n) in names {
            if n.is_some_and(|s| s.trim().is_empty()) {
                out.push((f.to_owned(), format!("{f} names no column (empty)")));
            }
        }
        out
    }
}
