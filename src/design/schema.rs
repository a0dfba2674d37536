//! The typed design: what a design file says once it has been parsed and validated.
//!
//! Every quantity carries its unit in its name. Ranges and defaults are listed in
//! `docs/design-file.md`; the validation pass (`validate.rs`) enforces them. A value held in
//! one of these types has passed that validation when it comes from [`super::load_design`].

use std::path::PathBuf;

use serde::{Deserialize, Serialize};

/// Drinking water per person and day [L]: the upper end of the survival need (drinking and
/// food) of 2.5–3 L in the Sphere Handbook (2018), water-supply standard 2.1 (from memory).
pub const DRINKING_L_PER_PERSON_DAY: f64 = 3.0;

/// Drinking plus basic cooking per person and day [L]: 3 L drinking plus the lower end of
/// the 3–6 L basic cooking need in the Sphere Handbook (2018), water-supply standard 2.1
/// (from memory).
pub const DRINKING_AND_COOKING_L_PER_PERSON_DAY: f64 = 6.0;

/// Default water per person and day when a demand gives people but no litres [L]: drinking
/// only ([`DRINKING_L_PER_PERSON_DAY`]) — what a still is first asked to cover.
pub const DEFAULT_LITRES_PER_PERSON_DAY: f64 = DRINKING_L_PER_PERSON_DAY;

/// Relative humidity assumed when a monthly climate gives neither `rh_percent` nor
/// `dew_point_c` [%]. Common practice, no source: a mid-range value for warm sites.
pub const DEFAULT_RH_PERCENT: f64 = 60.0;

/// A whole design file.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    /// `[project]`.
    pub project: Project,
    /// The materials library path as written (relative to the design file).
    pub materials: PathBuf,
    /// `[site]`, including its climate.
    pub site: Site,
    /// `[[variant]]` in file order.
    pub variants: Vec<Variant>,
    /// `[costs]` (optional; every field has a default).
    pub costs: super::costs::Costs,
    /// `[[alternative]]` in file order (optional; may be empty).
    pub alternatives: Vec<super::alternatives::Alternative>,
    /// `[[risk]]` in file order (optional; the defaults apply whatever is given, see
    /// [`super::merged_risks`]).
    pub risks: Vec<super::risks::RiskEntry>,
}

/// `[project]`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Project {
    /// Title shown on reports, 1–200 characters.
    pub title: String,
    /// Currency code, three upper-case letters (ISO 4217 style); default `USD`.
    #[serde(default = "default_currency")]
    pub currency: String,
    /// Water demand to size for, if any.
    #[serde(default)]
    pub demand: Option<Demand>,
    /// `[project.money_scales]`: the money reference scales of the ranking in the project
    /// currency (needed when the currency is not USD).
    #[serde(default)]
    pub money_scales: Option<MoneyScales>,
}

/// `[project.money_scales]`: how the ranking's two money references (cost per litre, capital
/// per L/day of worst-month capacity) are stated in the project currency. Either an exchange
/// rate with its date and source, which converts the built-in USD references, or the two
/// references themselves; a reference given directly wins over the converted one.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MoneyScales {
    /// Units of the project currency per US dollar, (0, 1e7].
    #[serde(default)]
    pub per_usd: Option<f64>,
    /// Date the rate was quoted, `YYYY-MM-DD`; required with `per_usd`.
    #[serde(default)]
    pub rate_date: Option<String>,
    /// Reference cost per litre [currency L⁻¹], (0, 1e7].
    #[serde(default)]
    pub cost_per_litre: Option<f64>,
    /// Reference capital per L/day of worst-month capacity [currency (L day⁻¹)⁻¹], (0, 1e10].
    #[serde(default)]
    pub capital_per_l_day: Option<f64>,
    /// Where the rate or the references come from, 1–200 characters.
    pub source: String,
}

fn default_currency() -> String {
    "USD".to_string()
}

/// `[project.demand]`: exactly one of `people` or `litres_per_day`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Demand {
    /// Number of people served, 1–1,000,000.
    #[serde(default)]
    pub people: Option<u32>,
    /// Litres per person per day, (0, 100]; default [`DEFAULT_LITRES_PER_PERSON_DAY`].
    #[serde(default)]
    pub litres_per_person_day: Option<f64>,
    /// Total litres per day, (0, 1e7].
    #[serde(default)]
    pub litres_per_day: Option<f64>,
}

/// Least brine depth of a basin or a tray [mm]. Shallower, the brine no longer lies on a liner
/// as one layer (it beads and dries in patches) and a model step of minutes would empty it
/// (common practice, no source).
pub const MIN_BRINE_DEPTH_MM: f64 = 2.0;

/// Most people a design (or `--people`) may serve.
pub const DEMAND_MAX_PEOPLE: u32 = 1_000_000;
/// Most litres per person and day (`litres_per_person_day`, `--litres-per-person`), above
/// every household use a still could serve (common practice, no source).
pub const DEMAND_MAX_L_PER_PERSON_DAY: f64 = 100.0;
/// Largest daily demand (`litres_per_day`, `--demand`) [L/day]: 10,000 m³/day, far beyond
/// any solar-still installation (common practice, no source).
pub const DEMAND_MAX_L_PER_DAY: f64 = 1e7;

/// Why a demand is outside the limits the design file and the command-line options share:
/// `(which, message)` with `which` one of `people`, `litres_per_person_day`,
/// `litres_per_day` (the caller names the field or the option).
pub fn demand_problems(
    people: Option<u32>,
    litres_per_person_day: Option<f64>,
    litres_per_day: Option<f64>,
) -> Vec<(&'static str, String)> {
    let mut out = Vec::new();
    if let Some(n) = people
        && !(1..=DEMAND_MAX_PEOPLE).contains(&n)
    {
        out.push((
            "people",
            format!("{n} is out of range; allowed [1, {DEMAND_MAX_PEOPLE}] people"),
        ));
    }
    let mut positive = |which, x: Option<f64>, max: f64, unit: &str| {
        if let Some(x) = x
            && !(x.is_finite() && x > 0.0 && x <= max)
        {
            out.push((
                which,
                format!("{x} is out of range; allowed (0, {max}] {unit}"),
            ));
        }
    };
    positive(
        "litres_per_person_day",
        litres_per_person_day,
        DEMAND_MAX_L_PER_PERSON_DAY,
        "L/person/day",
    );
    positive(
        "litres_per_day",
        litres_per_day,
        DEMAND_MAX_L_PER_DAY,
        "L/day",
    );
    out
}

impl Demand {
    /// The daily demand [L/day].
    pub fn total_litres_per_day(&self) -> f64 {
        match (self.litres_per_day, self.people) {
            (Some(l), _) => l,
            (None, Some(p)) => {
                f64::from(p)
                    * self
                        .litres_per_person_day
                        .unwrap_or(DEFAULT_LITRES_PER_PERSON_DAY)
            }
            (None, None) => 0.0,
        }
    }
}

/// `[site]`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Site {
    /// A name for the site.
    pub name: String,
    /// Latitude [deg], north positive, [-90, 90].
    pub latitude_deg: f64,
    /// Longitude [deg], east positive, [-180, 180].
    pub longitude_deg: f64,
    /// Elevation above sea level [m], [-500, 6000]; default 0.
    pub elevation_m: f64,
    /// The site's standard-time offset from UTC [h], [-12, 14].
    pub utc_offset_h: f64,
    /// Salinity of the feed water [g/kg], [0, 120]; default 35 (seawater).
    pub feed_salinity_g_kg: f64,
    /// Ground reflectance [-], [0, 1]; default 0.2.
    pub albedo: f64,
    /// Obstruction profile (may be empty).
    pub horizon: Vec<HorizonPoint>,
    /// `[site.climate]`.
    pub climate: Climate,
}

/// The `[site]` fields other than `climate`, as serde reads them.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct SiteFields {
    pub name: String,
    pub latitude_deg: f64,
    pub longitude_deg: f64,
    #[serde(default)]
    pub elevation_m: f64,
    pub utc_offset_h: f64,
    #[serde(default = "default_salinity")]
    pub feed_salinity_g_kg: f64,
    #[serde(default = "default_albedo")]
    pub albedo: f64,
    #[serde(default)]
    pub horizon: Vec<HorizonPoint>,
}

fn default_salinity() -> f64 {
    35.0
}
fn default_albedo() -> f64 {
    0.2
}

/// One point of the horizon profile.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct HorizonPoint {
    /// Compass direction, clockwise from north [deg], [0, 360).
    pub azimuth_deg: f64,
    /// Elevation of the obstruction above the horizontal [deg], [0, 90).
    pub elevation_deg: f64,
}

/// `[site.climate]`, chosen by its `source` field.
// One climate per design, read once per run: boxing the larger variant would buy nothing.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum Climate {
    /// `source = "monthly"`.
    Monthly(MonthlyClimate),
    /// `source = "weather-file"`.
    WeatherFile(WeatherFile),
}

/// Humidity of a monthly climate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum Humidity {
    /// Monthly mean relative humidity [%] (given, or [`DEFAULT_RH_PERCENT`] every month).
    RelativePercent([f64; 12]),
    /// Monthly mean dew point [°C].
    DewPointC([f64; 12]),
}

/// Twelve monthly means, January first.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MonthlyClimate {
    /// Daily global horizontal irradiation [kWh m⁻² day⁻¹].
    pub ghi_kwh_m2_day: [f64; 12],
    /// Mean daily maximum air temperature [°C].
    pub t_max_c: [f64; 12],
    /// Mean daily minimum air temperature [°C].
    pub t_min_c: [f64; 12],
    /// Mean wind speed [m/s] at `wind_height_m`.
    pub wind_m_s: [f64; 12],
    /// Height of the wind measurement [m]; default 10.
    pub wind_height_m: f64,
    /// Humidity.
    pub humidity: Humidity,
    /// `true` when the file gave no humidity and the default was used.
    pub humidity_defaulted: bool,
    /// Monthly rainfall totals [mm], if given.
    pub rain_mm: Option<[f64; 12]>,
}

/// Days in each month of a non-leap year, January first.
pub const DAYS_IN_MONTH: [u32; 12] = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

impl MonthlyClimate {
    /// Annual mean daily global horizontal irradiation, weighted by days per month
    /// [kWh m⁻² day⁻¹].
    pub fn annual_mean_ghi_kwh_m2_day(&self) -> f64 {
        let total: f64 = self
            .ghi_kwh_m2_day
            .iter()
            .zip(DAYS_IN_MONTH)
            .map(|(h, d)| h * f64::from(d))
            .sum();
        total / 365.0
    }
}

/// Monthly climate as serde reads it (arrays of any length; validation checks for 12).
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct MonthlyFields {
    pub ghi_kwh_m2_day: Vec<f64>,
    pub t_max_c: Vec<f64>,
    pub t_min_c: Vec<f64>,
    pub wind_m_s: Vec<f64>,
    #[serde(default = "default_wind_height")]
    pub wind_height_m: f64,
    #[serde(default)]
    pub rh_percent: Option<Vec<f64>>,
    #[serde(default)]
    pub dew_point_c: Option<Vec<f64>>,
    #[serde(default)]
    pub rain_mm: Option<Vec<f64>>,
}

fn default_wind_height() -> f64 {
    10.0
}

/// An hourly (or sub-hourly) weather file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WeatherFile {
    /// Path as written, relative to the design file.
    pub path: PathBuf,
    /// File format.
    pub format: WeatherFormat,
    /// What a row's timestamp marks within its interval; default `ending`.
    #[serde(default)]
    pub period: Period,
    /// Column names (CSV only; ignored for EPW).
    #[serde(default)]
    pub columns: Option<Columns>,
    /// What to do with missing rows; default `stop`.
    #[serde(default)]
    pub gap_fill: GapFill,
    /// Longest gap `linear` may fill [h], (0, 48]; default 3.
    #[serde(default = "default_max_gap")]
    pub max_gap_h: f64,
    /// Height of the wind measurement above ground [m], (0.5, 100]; default 10 (CSV; EPW
    /// files are 10 m by convention).
    #[serde(default = "default_wind_height")]
    pub wind_height_m: f64,
}

fn default_max_gap() -> f64 {
    3.0
}

/// Weather file formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum WeatherFormat {
    /// Comma-separated values with a header row naming the columns.
    Csv,
    /// EnergyPlus weather format (an open, documented format).
    Epw,
}

/// Which instant a row's timestamp marks.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Period {
    /// The end of the averaging interval (default).
    #[default]
    Ending,
    /// The start of the interval.
    Beginning,
    /// The middle of the interval.
    Centred,
}

/// How gaps in a weather file are handled.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum GapFill {
    /// A gap is an error (default).
    #[default]
    Stop,
    /// Gaps up to `max_gap_h` are filled by linear interpolation.
    Linear,
}

/// `[site.climate.columns]`: the CSV header names of each quantity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Columns {
    /// Timestamp column (required for CSV).
    pub timestamp: String,
    /// Global horizontal irradiance [W/m²] (required for CSV).
    pub ghi_w_m2: String,
    /// Diffuse horizontal irradiance [W/m²].
    #[serde(default)]
    pub dhi_w_m2: Option<String>,
    /// Direct normal irradiance [W/m²].
    #[serde(default)]
    pub dni_w_m2: Option<String>,
    /// Air temperature [°C] (required for CSV).
    pub t_air_c: String,
    /// Wind speed [m/s]; without it the climate module's documented default is used.
    #[serde(default)]
    pub wind_m_s: Option<String>,
    /// Relative humidity [%].
    #[serde(default)]
    pub rh_percent: Option<String>,
    /// Dew point [°C] (used instead of relative humidity when both are given).
    #[serde(default)]
    pub dew_point_c: Option<String>,
    /// Measured plane-of-array irradiance [W/m²].
    #[serde(default)]
    pub poa_w_m2: Option<String>,
    /// Tilt of the plane the `poa_w_m2` pyranometer was mounted in [deg], [0, 90]; required
    /// with `poa_w_m2`.
    #[serde(default)]
    pub poa_tilt_deg: Option<f64>,
    /// Azimuth of that plane, clockwise from north [deg], [0, 360); required with `poa_w_m2`.
    #[serde(default)]
    pub poa_azimuth_deg: Option<f64>,
}

/// One still variant: what every kind has, plus its kind-specific record.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Variant {
    /// Unique name, 1–60 characters of `[A-Za-z0-9 _.-]`.
    pub name: String,
    /// Front-to-back size in plan [m], (0.2, 10].
    pub width_m: f64,
    /// Size along the ridge or cover edge [m], (0.2, 50].
    pub length_m: f64,
    /// Compass direction the (main) cover faces, clockwise from north [deg], [0, 360).
    pub cover_azimuth_deg: f64,
    /// Cover (glazing) material id, role `cover`.
    pub cover: String,
    /// Kind-specific data.
    pub kind: VariantKind,
    /// `[variant.operation]`: feed and flush of a basin still (defaults when absent).
    pub operation: Option<super::operation::Operation>,
    /// `[variant.calibration]`: factors fitted to a pilot still (neutral when absent).
    pub calibration: Option<super::calibration::Calibration>,
}

/// The fields every variant has, as serde reads them.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct VariantFields {
    pub name: String,
    pub width_m: f64,
    pub length_m: f64,
    pub cover_azimuth_deg: f64,
    pub cover: String,
    #[serde(default)]
    pub operation: Option<super::operation::Operation>,
    #[serde(default)]
    pub calibration: Option<super::calibration::Calibration>,
}

/// The names of [`VariantFields`], plus `kind`.
pub(crate) const VARIANT_COMMON_FIELDS: [&str; 8] = [
    "name",
    "kind",
    "width_m",
    "length_m",
    "cover_azimuth_deg",
    "cover",
    "operation",
    "calibration",
];

/// Kind-specific data of a variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub enum VariantKind {
    /// `kind = "single-slope"`.
    SingleSlope(SingleSlope),
    /// `kind = "double-slope"`.
    DoubleSlope(DoubleSlope),
    /// `kind = "wick"`.
    Wick(Wick),
    /// `kind = "stepped"`.
    Stepped(Stepped),
    /// `kind = "multi-effect"`.
    MultiEffect(MultiEffect),
}

/// The `kind` names, in the order of [`VariantKind`].
pub const KIND_NAMES: [&str; 5] = [
    "single-slope",
    "double-slope",
    "wick",
    "stepped",
    "multi-effect",
];

impl VariantKind {
    /// The `kind` name as written in a design file.
    pub fn name(&self) -> &'static str {
        match self {
            VariantKind::SingleSlope(_) => KIND_NAMES[0],
            VariantKind::DoubleSlope(_) => KIND_NAMES[1],
            VariantKind::Wick(_) => KIND_NAMES[2],
            VariantKind::Stepped(_) => KIND_NAMES[3],
            VariantKind::MultiEffect(_) => KIND_NAMES[4],
        }
    }
}

/// What the basin is built of.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum BasinKind {
    /// A formed metal tray (default); default thickness 1 mm.
    #[default]
    MetalTray,
    /// Brick, block or concrete; default thickness 100 mm.
    Masonry,
}

impl BasinKind {
    /// Default basin wall thickness [mm]: 1 mm sheet for a metal tray, 100 mm for masonry.
    /// Common practice, no source.
    pub fn default_thickness_mm(self) -> f64 {
        match self {
            BasinKind::MetalTray => 1.0,
            BasinKind::Masonry => 100.0,
        }
    }
}

/// Correlation for heat and mass transfer from brine to cover inside a basin.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum InternalCorrelation {
    /// Dunkle (1961) (default).
    #[default]
    Dunkle,
    /// Kumar & Tiwari (1996), Nu = C (Gr Pr)^n fitted to passive stills.
    KumarTiwari,
    /// Hollands, Unny, Raithby & Konicek (1976) for an inclined enclosure between parallel
    /// plates, with the mean brine-to-cover gap as the plate spacing.
    InclinedEnclosure,
}

/// One insulation layer.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Layer {
    /// Material id, role `insulation`.
    pub material: String,
    /// Thickness [mm], (0, 500].
    pub thickness_mm: f64,
}

fn default_wall_mm() -> f64 {
    100.0
}
fn default_brine_mm() -> f64 {
    20.0
}
fn default_collection() -> f64 {
    0.85
}
fn default_leakage() -> f64 {
    0.05
}

/// A single-slope basin still.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SingleSlope {
    /// Cover tilt from horizontal [deg], (0, 90); a warning below 10.
    pub cover_tilt_deg: f64,
    /// Height of the low (front) wall above the basin floor [mm], [20, 1000]; default 100.
    #[serde(default = "default_wall_mm")]
    pub front_wall_mm: f64,
    /// Brine depth [mm], (0, 300]; default 20.
    #[serde(default = "default_brine_mm")]
    pub brine_depth_mm: f64,
    /// Basin liner or absorbing paint, role `liner` or `paint`.
    pub liner: String,
    /// Basin construction; default `metal-tray`.
    #[serde(default)]
    pub basin: BasinKind,
    /// Basin floor thickness [mm], (0, 300]; default from [`BasinKind::default_thickness_mm`].
    #[serde(default)]
    pub basin_thickness_mm: Option<f64>,
    /// Insulation under the basin, outermost last.
    #[serde(default)]
    pub base_insulation: Vec<Layer>,
    /// Insulation on the walls.
    #[serde(default)]
    pub side_insulation: Vec<Layer>,
    /// Fraction of condensate reaching the trough [-], (0, 1]; default 0.85.
    #[serde(default = "default_collection")]
    pub collection_efficiency: f64,
    /// Fraction of vapour lost through gaps [-], [0, 0.5); default 0.05.
    #[serde(default = "default_leakage")]
    pub vapour_leakage: f64,
    /// Internal transfer correlation; default `dunkle`.
    #[serde(default)]
    pub internal_correlation: InternalCorrelation,
    /// Share of sunlight a dusty cover still passes [-], (0, 1]; default 0.95
    /// ([`DEFAULT_SOILING_TRANSMITTANCE`]).
    #[serde(default = "default_soiling")]
    pub soiling_transmittance: f64,
    /// Which optional loss paths the model includes; default all of them.
    #[serde(default)]
    pub losses: LossSwitches,
}

/// Share of sunlight a cover passes with its usual dust [-]: 0.95 for a cover wiped every
/// few days. Common practice, no source.
pub const DEFAULT_SOILING_TRANSMITTANCE: f64 = 0.95;

fn default_soiling() -> f64 {
    DEFAULT_SOILING_TRANSMITTANCE
}

fn yes() -> bool {
    true
}

/// `losses = { … }` under a single-slope variant: switches for every optional loss path.
///
/// All default to `true` (the path is modelled). `ideal = true` turns every one of them off,
/// whatever the others say, giving the ideal three-node still (cover, brine, liner; fixed
/// normal-incidence cover transmittance; full collection) used to compare with the textbook
/// figure.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LossSwitches {
    /// Turn every optional loss path off.
    #[serde(default)]
    pub ideal: bool,
    /// Cover reflection rising with the incidence angle (off: the normal-incidence value
    /// for beam and diffuse alike).
    #[serde(default = "yes")]
    pub angle_reflection: bool,
    /// Dust on the cover (`soiling_transmittance`).
    #[serde(default = "yes")]
    pub soiling: bool,
    /// Condensate film or drops on the cover's underside.
    #[serde(default = "yes")]
    pub condensate_film: bool,
    /// Walls shading the brine and absorbing light at low sun.
    #[serde(default = "yes")]
    pub wall_shading: bool,
    /// Heat lost through the side and back walls.
    #[serde(default = "yes")]
    pub side_losses: bool,
    /// Condensate dripping back into the basin (`collection_efficiency`).
    #[serde(default = "yes")]
    pub drip_back: bool,
    /// Vapour leaking through gaps (`vapour_leakage`).
    #[serde(default = "yes")]
    pub leakage: bool,
}

impl Default for LossSwitches {
    fn default() -> Self {
        LossSwitches {
            ideal: false,
            angle_reflection: true,
            soiling: true,
            condensate_film: true,
            wall_shading: true,
            side_losses: true,
            drip_back: true,
            leakage: true,
        }
    }
}

impl LossSwitches {
    /// Every optional loss path off.
    pub fn ideal() -> Self {
        LossSwitches {
            ideal: true,
            angle_reflection: false,
            soiling: false,
            condensate_film: false,
            wall_shading: false,
            side_losses: false,
            drip_back: false,
            leakage: false,
        }
    }

    /// The switches in force: all off when `ideal` is set, otherwise as given.
    pub fn effective(&self) -> Self {
        if self.ideal { Self::ideal() } else { *self }
    }
}

impl SingleSlope {
    /// Height of the high (back) wall [mm]: front + width · tan(tilt).
    pub fn back_wall_mm(&self, width_m: f64) -> f64 {
        self.front_wall_mm + width_m * 1000.0 * self.cover_tilt_deg.to_radians().tan()
    }
}

/// A double-slope basin still: two faces at the same tilt, facing opposite ways.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DoubleSlope {
    /// Tilt of both faces [deg], (0, 90); a warning below 10.
    pub cover_tilt_deg: f64,
    /// Height of the side walls under the eaves [mm], [20, 1000]; default 100.
    #[serde(default = "default_wall_mm")]
    pub side_wall_mm: f64,
    /// Brine depth [mm], (0, 300]; default 20.
    #[serde(default = "default_brine_mm")]
    pub brine_depth_mm: f64,
    /// Basin liner or absorbing paint, role `liner` or `paint`.
    pub liner: String,
    /// Basin construction; default `metal-tray`.
    #[serde(default)]
    pub basin: BasinKind,
    /// Basin floor thickness [mm], (0, 300].
    #[serde(default)]
    pub basin_thickness_mm: Option<f64>,
    /// Insulation under the basin.
    #[serde(default)]
    pub base_insulation: Vec<Layer>,
    /// Insulation on the walls.
    #[serde(default)]
    pub side_insulation: Vec<Layer>,
    /// Fraction of condensate reaching the troughs [-], (0, 1]; default 0.85.
    #[serde(default = "default_collection")]
    pub collection_efficiency: f64,
    /// Fraction of vapour lost through gaps [-], [0, 0.5); default 0.05.
    #[serde(default = "default_leakage")]
    pub vapour_leakage: f64,
    /// Internal transfer correlation; default `dunkle`.
    #[serde(default)]
    pub internal_correlation: InternalCorrelation,
}

impl DoubleSlope {
    /// Ridge height above the basin floor [mm]: side wall + (width/2) · tan(tilt).
    pub fn ridge_mm(&self, width_m: f64) -> f64 {
        self.side_wall_mm + width_m * 500.0 * self.cover_tilt_deg.to_radians().tan()
    }
}

fn default_wick_gap() -> f64 {
    30.0
}
fn default_wick_feed() -> f64 {
    1.0
}

/// A tilted wick still.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Wick {
    /// Tilt of the cover and the wick backing [deg], (0, 90).
    pub cover_tilt_deg: f64,
    /// Gap between wick and cover [mm], [5, 200]; default 30.
    #[serde(default = "default_wick_gap")]
    pub gap_mm: f64,
    /// Wick cloth material id, role `wick`.
    pub cloth: String,
    /// Feed flow per m² of wick [L h⁻¹ m⁻²], [0, 20]; default 1.0.
    #[serde(default = "default_wick_feed")]
    pub feed_l_h_m2: f64,
    /// Feed temperature [°C], [-5, 80]; default: the air temperature.
    #[serde(default)]
    pub feed_temperature_c: Option<f64>,
    /// Insulation behind the wick backing.
    #[serde(default)]
    pub backing_insulation: Vec<Layer>,
    /// Fraction of condensate reaching the trough [-], (0, 1]; default 0.85.
    #[serde(default = "default_collection")]
    pub collection_efficiency: f64,
    /// Fraction of vapour lost through gaps [-], [0, 0.5); default 0.05.
    #[serde(default = "default_leakage")]
    pub vapour_leakage: f64,
}

fn default_tray_depth() -> f64 {
    10.0
}

/// Smallest allowed gap between the top of any step and the cover [mm].
/// Common practice, no source: vapour must be able to move and condensate must not touch
/// the trays.
pub const STEPPED_MIN_CLEARANCE_MM: f64 = 10.0;

/// A stepped (tray) still.
///
/// Geometry: `trays` trays share the plan width equally, each `width_m / trays` deep
/// front-to-back. Tray *i* (1 = front) has its floor `(i − 1) · riser_mm` above the first
/// tray's floor; the step between tray *i* and *i + 1* reaches `i · riser_mm`, the last
/// tray's back rim `(trays − 1) · riser_mm + tray_depth_mm`. The cover rises from
/// `front_wall_mm` at the front at `cover_tilt_deg`; at every step corner it must clear the
/// step by at least [`STEPPED_MIN_CLEARANCE_MM`].
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Stepped {
    /// Cover tilt [deg], (0, 90).
    pub cover_tilt_deg: f64,
    /// Number of trays, [1, 40].
    pub trays: u32,
    /// Tray depth (brine depth when full) [mm], (0, 100]; default 10.
    #[serde(default = "default_tray_depth")]
    pub tray_depth_mm: f64,
    /// Rise from one tray floor to the next [mm], [10, 500].
    pub riser_mm: f64,
    /// Height of the cover above the first tray's floor at the front [mm], [20, 1000];
    /// default 100.
    #[serde(default = "default_wall_mm")]
    pub front_wall_mm: f64,
    /// Tray liner or absorbing paint, role `liner` or `paint`.
    pub liner: String,
    /// Insulation under the trays.
    #[serde(default)]
    pub base_insulation: Vec<Layer>,
    /// Insulation on the walls.
    #[serde(default)]
    pub side_insulation: Vec<Layer>,
    /// Fraction of condensate reaching the trough [-], (0, 1]; default 0.85.
    #[serde(default = "default_collection")]
    pub collection_efficiency: f64,
    /// Fraction of vapour lost through gaps [-], [0, 0.5); default 0.05.
    #[serde(default = "default_leakage")]
    pub vapour_leakage: f64,
    /// Internal transfer correlation; default `inclined-enclosure` (the gap over the steps is
    /// small and nearly uniform).
    #[serde(default = "default_stepped_correlation")]
    pub internal_correlation: InternalCorrelation,
    /// The risers carry wick cloth kept wet by the cascade, so they evaporate with the trays;
    /// default true.
    #[serde(default = "yes")]
    pub wetted_risers: bool,
}

fn default_stepped_correlation() -> InternalCorrelation {
    InternalCorrelation::InclinedEnclosure
}

impl Stepped {
    /// Front-to-back depth of one tray [m].
    pub fn tread_m(&self, width_m: f64) -> f64 {
        width_m / f64::from(self.trays.max(1))
    }

    /// Height of the back wall [mm]: front + width · tan(tilt).
    pub fn back_wall_mm(&self, width_m: f64) -> f64 {
        self.front_wall_mm + width_m * 1000.0 * self.cover_tilt_deg.to_radians().tan()
    }

    /// The smallest clearance between a step corner and the cover [mm], and the 1-based tray
    /// where it occurs.
    pub fn min_clearance_mm(&self, width_m: f64) -> (f64, u32) {
        let tan = self.cover_tilt_deg.to_radians().tan();
        let tread_mm = self.tread_m(width_m) * 1000.0;
        let mut worst = (f64::INFINITY, 1);
        for i in 1..=self.trays {
            let x_mm = f64::from(i) * tread_mm;
            let top_mm = if i < self.trays {
                f64::from(i) * self.riser_mm
            } else {
                f64::from(i - 1) * self.riser_mm + self.tray_depth_mm
            };
            let clearance = self.front_wall_mm + x_mm * tan - top_mm;
            if clearance < worst.0 {
                worst = (clearance, i);
            }
        }
        worst
    }
}

/// What takes the heat from the last stage of a multi-effect still.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Sink {
    /// Finned (or plain) plate in still air; without a set coefficient the model computes it
    /// from the fin fields (`fin_height_mm`, `fin_spacing_mm`, `fin_thickness_mm`,
    /// `sink_emissivity`), hour by hour.
    AirFins,
    /// Plate in contact with a water body; default coefficient 200 W m⁻² K⁻¹.
    WaterBody,
}

impl Sink {
    /// The name as written in a design file.
    pub fn name(self) -> &'static str {
        match self {
            Sink::AirFins => "air-fins",
            Sink::WaterBody => "water-body",
        }
    }

    /// Nominal heat-transfer coefficient from the last plate to the sink, per m² of plate
    /// [W m⁻² K⁻¹]. The water body's is the model's default. An air sink without a set
    /// coefficient is never run at this figure: the model computes it from the fins and the
    /// stack's tilt (`crate::stills::multi_effect::AirSink::coefficient`: ≈ 3 level, fins or
    /// not; ≈ 11–17 for the default fins tilted 15–30°, the plate 10 K above 30 °C air).
    ///
    /// *Air fins, 25*: a nominal figure for well-finned plates that vent freely (fins
    /// ≈ 50 mm deep at ≈ 10 mm pitch on a vertical base, Bar-Cohen & Rohsenow's channel
    /// relation, Incropera et al., 6th ed., eq. 9.45, from memory: Nu_S ≈ 1.31 at the optimum
    /// spacing, h ≈ 3.5 per m² of fin, ≈ 10 m² of fin per m² of plate). Under a stack the
    /// channels are as long as the slope and the buoyancy along them is g·sin β, so the
    /// computed figure is usually well below this one.
    ///
    /// *Water body, 200*: the plate faces down into still water, the poorer orientation:
    /// Incropera eq. 9.32 with water at 300 K, a 0.25 m square plate (L = A/P = 0.0625 m) and
    /// 2–5 K above the water gives Nu ≈ 15–19, h ≈ 150–190 (from memory); waves and currents
    /// only raise it.
    pub fn default_coefficient_w_m2_k(self) -> f64 {
        match self {
            Sink::AirFins => 25.0,
            Sink::WaterBody => 200.0,
        }
    }
}

fn default_me_gap() -> f64 {
    4.0
}
fn default_me_feed() -> f64 {
    0.5
}
fn default_me_glazing_gap() -> f64 {
    20.0
}
fn default_fin_height() -> f64 {
    50.0
}
fn default_fin_spacing() -> f64 {
    20.0
}
fn default_fin_thickness() -> f64 {
    1.0
}
fn default_sink_convection_factor() -> f64 {
    1.0
}

/// A multi-effect diffusion still: glazing over an absorber, then a stack of stages.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MultiEffect {
    /// Tilt of the glazing and stack [deg], [0, 90); the slope runs across `width_m`, and an
    /// air sink's heated air leaves up it.
    pub glazing_tilt_deg: f64,
    /// Number of stages, [1, 20].
    pub stages: u32,
    /// Air gap between a stage's wick and its condensing plate [mm], [1, 50]; default 4.
    #[serde(default = "default_me_gap")]
    pub gap_mm: f64,
    /// Stage plate material id, role `plate`.
    pub plate: String,
    /// Absorbing coating on the first plate, role `liner` or `paint`.
    pub absorber: String,
    /// Stage wick material id, role `wick`.
    pub wick_cloth: String,
    /// Heat sink behind the last stage.
    pub sink: Sink,
    /// Sink coefficient [W m⁻² K⁻¹], (0, 5000]; default per [`Sink::default_coefficient_w_m2_k`].
    #[serde(default)]
    pub sink_coefficient_w_m2_k: Option<f64>,
    /// Air gap between the absorber and the glazing \[mm\], [5, 100]; default 20.
    #[serde(default = "default_me_glazing_gap")]
    pub glazing_gap_mm: f64,
    /// Air sink: height of the straight fins under the last plate, running up the slope
    /// \[mm\], [0, 200]; 0 is a plain plate; default 50.
    #[serde(default = "default_fin_height")]
    pub fin_height_mm: f64,
    /// Air sink: clear spacing between neighbouring fins \[mm\], [3, 100]; default 20 (near the
    /// best for channels half a metre to a metre up a slope of 15–30°).
    #[serde(default = "default_fin_spacing")]
    pub fin_spacing_mm: f64,
    /// Air sink: fin thickness \[mm\], [0.3, 10]; default 1. Fins are of the plate's metal.
    #[serde(default = "default_fin_thickness")]
    pub fin_thickness_mm: f64,
    /// Air sink: long-wave emissivity of the sink surface [-], [0.02, 1]; default the plate
    /// material's.
    #[serde(default)]
    pub sink_emissivity: Option<f64>,
    /// Air sink: multiplies the free convection the model computes from the fins [-],
    /// [0.2, 5]; default 1. For a pilot's finding, or the uncertainty analysis's
    /// `air-sink-convection` parameter; a computed air sink only.
    #[serde(default = "default_sink_convection_factor")]
    pub sink_convection_factor: f64,
    /// Feed per stage and m² of wick [L h⁻¹ m⁻²], [0, 20]; default 0.5.
    #[serde(default = "default_me_feed")]
    pub feed_l_h_m2: f64,
    /// Insulation around the edges of the stack.
    #[serde(default)]
    pub side_insulation: Vec<Layer>,
    /// Fraction of condensate collected [-], (0, 1]; default 0.85.
    #[serde(default = "default_collection")]
    pub collection_efficiency: f64,
}

impl MultiEffect {
    /// The sink coefficient set in the design, or the sink kind's nominal one
    /// [W m⁻² K⁻¹] (an air sink without a set coefficient is computed from its fins).
    pub fn sink_coefficient(&self) -> f64 {
        self.sink_coefficient_w_m2_k
            .unwrap_or_else(|| self.sink.default_coefficient_w_m2_k())
    }
}

impl Variant {
    /// Footprint: area in plan [m²] (the denominator of L/m²/day).
    pub fn footprint_m2(&self) -> f64 {
        self.width_m * self.length_m
    }

    /// Tilt of the (main) cover [deg].
    pub fn cover_tilt_deg(&self) -> f64 {
        match &self.kind {
            VariantKind::SingleSlope(k) => k.cover_tilt_deg,
            VariantKind::DoubleSlope(k) => k.cover_tilt_deg,
            VariantKind::Wick(k) => k.cover_tilt_deg,
            VariantKind::Stepped(k) => k.cover_tilt_deg,
            VariantKind::MultiEffect(k) => k.glazing_tilt_deg,
        }
    }

    /// Cover (aperture) area, all faces together [m²]: the footprint divided by the cosine of
    /// the tilt (a double slope's two faces each span half the width).
    pub fn cover_area_m2(&self) -> f64 {
        self.footprint_m2() / self.cover_tilt_deg().to_radians().cos()
    }
}
