//! The report's data: one `Serialize` struct per section, assembled by [`build_context`].
//!
//! Templates (`templates/*.md`) read these structs by field name, so a user can change
//! wording, order or language without Rust. Sections whose data comes from stages that are
//! not part of every run are `Option`s and render only when present: [`UncertaintySection`],
//! [`SensitivitySection`], [`ValidationSection`], [`AlternativesSection`], [`RisksSection`],
//! [`SummarySection::confident`]; the fabricator sheets are [`ReportContext::workshops`].
//! [`build_context`] fills them through [`super::stages`] as the options ask.

use serde::Serialize;

use crate::compare::Ranked;
use crate::design::CalibrationFactors;
use crate::workshop::WorkshopSheet;

/// Everything a report template can read.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReportContext {
    /// Title, date and tool version.
    pub meta: MetaSection,
    /// The recommendation and the headline figures.
    pub summary: SummarySection,
    /// Water need per person and what a still covers.
    pub need: NeedSection,
    /// Site and monthly climate.
    pub site: SiteSection,
    /// The ranking and the per-variant monthly yields.
    pub variants: VariantsSection,
    /// Model, assumptions, energy balance and the single-effect ceiling.
    pub justification: JustificationSection,
    /// Capital, running costs, replacements, cost per litre and per person.
    pub life_cycle: LifeCycleSection,
    /// Feed, flushing, depth and salinity over a day, monitoring.
    pub operation: OperationSection,
    /// Brine discharged and salt load.
    pub environment: EnvironmentSection,
    /// What a reviewer needs to regenerate every figure.
    pub reproducibility: ReproducibilitySection,
    /// Safety cautions (long form).
    pub cautions: CautionsSection,
    /// Every cited source, in citation-key order.
    pub references: Vec<Reference>,
    /// Charts by name (`climate`, `monthly_yield`, `pareto`, `day_profile`, `tornado`):
    /// the file a template links (`charts/<name>.svg`) and its title.
    pub charts: std::collections::BTreeMap<String, ChartRef>,
    /// Hook: Monte Carlo yield ranges (P10/P50/P90) per variant, when computed.
    pub uncertainty: Option<UncertaintySection>,
    /// Hook: one-at-a-time sensitivity of the recommended variant (tornado), when computed.
    pub sensitivity: Option<SensitivitySection>,
    /// Hook: comparison with published devices or a calibrated pilot still, when available.
    pub validation: Option<ValidationSection>,
    /// Hook: other ways of getting drinking water (`[[alternative]]`), when the design has them.
    pub alternatives: Option<AlternativesSection>,
    /// Hook: failure modes with likelihood, impact and mitigation (`[[risk]]`), when given.
    pub risks: Option<RisksSection>,
    /// The fabricator sheets (the recommended variant's by default, others on request), each
    /// rendered by the `workshop.md` template under the name `workshop`; each drawing is also
    /// in [`ReportContext::charts`] under its SVG id, so the HTML inlines it.
    pub workshops: Vec<WorkshopSheet>,
}

/// Title, date and version.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MetaSection {
    /// The design's title (user text).
    pub title: String,
    /// Date of generation, `YYYY-MM-DD` (UTC; `SOURCE_DATE_EPOCH` fixes it).
    pub date: String,
    /// stillbench version.
    pub version: String,
    /// Currency of every money figure.
    pub currency: String,
}

/// The recommendation and the headline figures; numbers equal `compare --format json`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SummarySection {
    /// Recommended variant (rank 1).
    pub recommended: String,
    /// Its kind.
    pub kind: String,
    /// Why it ranks first (the ranking's sentence).
    pub why: String,
    /// Ranking score [-].
    pub score: f64,
    /// Annual distillate per m² of footprint [L m⁻² year⁻¹].
    pub annual_l_m2: f64,
    /// Mean daily distillate in the worst month per m² [L m⁻² day⁻¹].
    pub worst_month_l_m2_day: f64,
    /// The worst month, 1…12.
    pub worst_month: u32,
    /// Its name.
    pub worst_month_name: String,
    /// Cost per litre over the life [currency L⁻¹].
    pub cost_per_l: f64,
    /// Capital per L/day of worst-month capacity [currency (L day⁻¹)⁻¹].
    pub capital_per_l_day: f64,
    /// Build complexity [points].
    pub complexity_points: f64,
    /// Sizing of the recommended variant for the demand.
    pub sizing: SizingRow,
    /// Cost of one person's water for a year [currency person⁻¹ year⁻¹].
    pub cost_per_person_year: f64,
    /// Variants that could not be ranked, with why.
    pub not_ranked: Vec<NotRanked>,
    /// The recommended variant sized over stochastic weather years at a confidence, when run.
    pub confident: Option<ConfidentSizing>,
}

/// The recommended variant sized over stochastic weather years at a confidence (the rules of
/// `stillbench size`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConfidentSizing {
    /// Variant name.
    pub name: String,
    /// Fraction of weather years in which the demand must be met [-].
    pub confidence: f64,
    /// Stochastic weather years simulated.
    pub years: u32,
    /// Seed of the weather generator.
    pub seed: u64,
    /// Whole units.
    pub units: u64,
    /// Footprint of all units [m²].
    pub footprint_m2: f64,
    /// Land with row spacing against noon shading in the worst month [m²].
    pub land_m2: f64,
    /// Storage that rides through runs of low-output days at the confidence \[L\].
    pub storage_l: f64,
    /// Longest run of low-output days at the confidence [days].
    pub longest_low_run_days: u32,
    /// Capital of all units [currency].
    pub capital: f64,
    /// Fraction of the simulated years the array meets [-].
    pub met_fraction: f64,
    /// Worst-month output of the array in the year that set the size [L day⁻¹].
    pub array_worst_month_l_day: f64,
    /// Operator time to run the array [h day⁻¹].
    pub operator_h_per_day: f64,
}

/// A variant left out, and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NotRanked {
    /// Variant name.
    pub name: String,
    /// Reason.
    pub reason: String,
}

/// The number of units of one variant that meets the demand in the mean year's worst month.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SizingRow {
    /// Variant name.
    pub name: String,
    /// Units.
    pub units: u64,
    /// Footprint of all units [m²].
    pub footprint_m2: f64,
    /// Land with row spacing against noon shading [m²].
    pub land_m2: f64,
    /// Capital of all units [currency].
    pub capital: f64,
    /// Worst-month output of the array [L day⁻¹].
    pub array_worst_month_l_day: f64,
    /// Operator time to run the array [h day⁻¹].
    pub operator_h_per_day: f64,
}

/// Demand and published per-person figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NeedSection {
    /// Demand [L day⁻¹].
    pub demand_l_day: f64,
    /// Where the demand came from (design, `--people`, `--demand`).
    pub demand_from: String,
    /// People served, when known.
    pub people: Option<u32>,
    /// Demand per person [L person⁻¹ day⁻¹], when people are known.
    pub l_per_person_day: Option<f64>,
    /// Published minimums for comparison.
    pub minimums: Vec<NeedRow>,
}

/// One published per-person figure.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NeedRow {
    /// What it covers.
    pub water_use: String,
    /// Litres per person and day [L person⁻¹ day⁻¹].
    pub l_per_person_day: f64,
    /// Source (with "from memory" where recalled).
    pub source: String,
}

/// Site and its monthly climate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SiteSection {
    /// Site name (user text).
    pub name: String,
    /// Latitude [deg], north positive.
    pub latitude_deg: f64,
    /// Longitude [deg], east positive.
    pub longitude_deg: f64,
    /// Elevation \[m\].
    pub elevation_m: f64,
    /// Feed salinity [g kg⁻¹].
    pub feed_salinity_g_kg: f64,
    /// Where the climate comes from (monthly means or a weather file).
    pub source: String,
    /// January to December.
    pub months: Vec<ClimateMonth>,
}

/// One month of climate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ClimateMonth {
    /// Month 1…12.
    pub month: u32,
    /// Short month name.
    pub name: String,
    /// Global horizontal irradiation [kWh m⁻² day⁻¹].
    pub ghi_kwh_m2_day: f64,
    /// Mean daily maximum air temperature [°C], when given.
    pub t_max_c: Option<f64>,
    /// Mean daily minimum air temperature [°C], when given.
    pub t_min_c: Option<f64>,
    /// Rainfall [mm month⁻¹], when given.
    pub rain_mm: Option<f64>,
}

/// The ranking and the monthly yields of every ranked variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantsSection {
    /// Best first, as `compare` ranks them.
    pub ranking: Vec<Ranked>,
    /// Names on the Pareto front.
    pub pareto_front: Vec<String>,
    /// Monthly yield per variant, in ranking order.
    pub monthly: Vec<VariantMonths>,
    /// Sizing of every ranked variant for the demand, in ranking order.
    pub sizing: Vec<SizingRow>,
    /// Where the ranking's money references come from (`Scales::money_basis`).
    pub money_basis: String,
}

/// One variant's monthly yield.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantMonths {
    /// Variant name.
    pub name: String,
    /// Kind.
    pub kind: String,
    /// Footprint [m²].
    pub footprint_m2: f64,
    /// Cover (aperture) area [m²].
    pub aperture_m2: f64,
    /// Evaporating area [m²].
    pub evaporating_m2: f64,
    /// January to December [L m⁻² day⁻¹].
    pub l_m2_day: Vec<f64>,
}

/// What a reviewer needs to believe the yield.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct JustificationSection {
    /// Energy balance and ceiling per ranked variant.
    pub variants: Vec<BalanceRow>,
    /// Largest |residual| allowed [-].
    pub residual_bound: f64,
    /// Assumptions and defaults, one sentence each.
    pub assumptions: Vec<String>,
    /// What the model of each wick and multi-effect variant found inside the still (stage
    /// temperatures, gain output ratio, dry cloth, what the sink does), in ranking order.
    pub kind_findings: Vec<KindFindings>,
}

/// Inside one variant: the kind-specific figures of its year, in sentences.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KindFindings {
    /// Variant name.
    pub name: String,
    /// Kind.
    pub kind: String,
    /// One sentence or short paragraph each.
    pub lines: Vec<String>,
}

/// Energy balance and single-effect ceiling of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BalanceRow {
    /// Variant name.
    pub name: String,
    /// Kind.
    pub kind: String,
    /// Largest |energy residual| over the months, as a fraction of absorbed sunlight [-].
    pub energy_residual: f64,
    /// Mean daily yield over the year [L m⁻² day⁻¹].
    pub mean_l_m2_day: f64,
    /// Mean single-effect ceiling over the year [L m⁻² day⁻¹].
    pub ceiling_l_m2_day: f64,
    /// Yield ÷ ceiling [-] (above 1 only for a multi-effect still).
    pub share_of_ceiling: f64,
    /// Mean daily efficiency over the year [-].
    pub mean_efficiency: f64,
}

/// Costs over the life, per variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LifeCycleSection {
    /// In ranking order.
    pub variants: Vec<LifeCycleRow>,
}

/// One variant's life-cycle cost.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LifeCycleRow {
    /// Variant name.
    pub name: String,
    /// Capital of one unit [currency].
    pub capital: f64,
    /// Present worth of replacements [currency].
    pub replacements_present_worth: f64,
    /// One unit's share of the installation's operator time [h year⁻¹].
    pub operator_h_per_year: f64,
    /// One unit's share of the operator's pay [currency year⁻¹].
    pub operator_cost_per_year: f64,
    /// Upkeep per year: spares and small repairs, no operator time [currency year⁻¹].
    pub upkeep_per_year: f64,
    /// Units of the installation the operator's round is shared over.
    pub installation_units: u64,
    /// Operator time of that installation [h day⁻¹].
    pub installation_operator_h_per_day: f64,
    /// Annualised cost [currency year⁻¹].
    pub annualised: f64,
    /// Life [years].
    pub life_years: f64,
    /// Discount rate [-].
    pub discount_rate: f64,
    /// Cost per litre over the life [currency L⁻¹].
    pub cost_per_l: f64,
    /// Cost per person per year [currency person⁻¹ year⁻¹], when known.
    pub cost_per_person_year: Option<f64>,
    /// Parts replaced during the life.
    pub replacements: Vec<String>,
}

/// Operation of each basin variant in its worst month, and the recommended variant's day.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OperationSection {
    /// Per ranked variant with a basin.
    pub variants: Vec<OperationRow>,
    /// The variant whose day is charted (the best-ranked basin still), when any.
    pub profile_variant: Option<String>,
    /// Its hours over the worst month's day.
    pub profile: Vec<ProfileHour>,
}

/// One variant's operation in its worst month.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OperationRow {
    /// Variant name.
    pub name: String,
    /// Feed mode.
    pub feed: String,
    /// Flush mode.
    pub flush: String,
    /// Set depth \[mm\].
    pub set_depth_mm: f64,
    /// Feed per day \[L\].
    pub feed_l_day: f64,
    /// Brine flushed per day \[L\].
    pub flush_l_day: f64,
    /// Peak salinity [g kg⁻¹].
    pub peak_salinity_g_kg: f64,
    /// Hours below the wetting depth \[h\].
    pub dry_out_h: f64,
    /// Scaling warnings.
    pub warnings: Vec<String>,
}

/// One hour of the charted day.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProfileHour {
    /// Solar time \[h\].
    pub solar_hour_h: f64,
    /// Brine depth \[mm\].
    pub depth_mm: f64,
    /// Salinity [g kg⁻¹].
    pub salinity_g_kg: f64,
    /// Distillate over the hour \[L\].
    pub distillate_l: f64,
}

/// Brine and salt leaving each variant (every kind books its feed and run-off).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EnvironmentSection {
    /// Per ranked variant with a basin, for the sized array.
    pub variants: Vec<EnvironmentRow>,
}

/// One variant's discharge.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EnvironmentRow {
    /// Variant name.
    pub name: String,
    /// Units in the sized array.
    pub units: u64,
    /// Brine discharged by the array, mean over the year \[L day⁻¹\].
    pub brine_l_day: f64,
    /// Salt returned by the array per year [kg year⁻¹].
    pub salt_kg_year: f64,
}

/// What a reviewer needs to regenerate every figure.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReproducibilitySection {
    /// stillbench version.
    pub version: String,
    /// Design file (or "built-in demo").
    pub design_file: String,
    /// SHA-256 of the design file's bytes (hex).
    pub design_sha256: String,
    /// Materials library file.
    pub library_file: String,
    /// SHA-256 of the materials library's bytes (hex).
    pub library_sha256: String,
    /// Random seed given.
    pub seed: u64,
    /// Date of generation.
    pub date: String,
    /// The command that regenerates the report.
    pub command: String,
}

/// Safety cautions.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CautionsSection {
    /// The short cautions every result carries.
    pub short: Vec<String>,
    /// The report's long-form cautions, each with a heading.
    pub long: Vec<CautionItem>,
    /// Calcium to aim for after remineralisation [mg L⁻¹].
    pub calcium_min_mg_l: f64,
    /// Magnesium to aim for after remineralisation [mg L⁻¹].
    pub magnesium_min_mg_l: f64,
}

/// One caution with a heading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CautionItem {
    /// Heading.
    pub heading: String,
    /// Text.
    pub text: String,
}

/// One cited source.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reference {
    /// Citation key used in the text, e.g. `Dunkle 1961`.
    pub key: String,
    /// Full citation.
    pub text: String,
}

/// A chart the templates can link.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ChartRef {
    /// Path relative to the report folder (`charts/<name>.svg`).
    pub file: String,
    /// Title.
    pub title: String,
}

/// Hook for the Monte Carlo stage: yield ranges per variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintySection {
    /// Samples drawn.
    pub samples: u32,
    /// Seed.
    pub seed: u64,
    /// One row per variant, ranking order.
    pub variants: Vec<UncertaintyRow>,
    /// What the model-form term is and how large it was taken.
    pub model_form_note: String,
    /// Relative SD of the model-form factor used [-].
    pub model_form_sd: f64,
    /// Where that SD comes from.
    pub model_form_source: String,
}

/// P10/P50/P90 of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyRow {
    /// Variant name.
    pub name: String,
    /// Annual yield P10/P50/P90 [L m⁻² year⁻¹].
    pub annual_l_m2: [f64; 3],
    /// Worst-month yield P10/P50/P90 [L m⁻² day⁻¹].
    pub worst_month_l_m2_day: [f64; 3],
}

/// Hook for the sensitivity stage: tornado bars of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SensitivitySection {
    /// Variant analysed.
    pub variant: String,
    /// Output the bars move, with unit (e.g. "annual yield [L/m²/year]").
    pub output: String,
    /// Output at the base values.
    pub base: f64,
    /// Bars, largest swing first.
    pub bars: Vec<TornadoBar>,
}

/// One parameter's swing.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TornadoBar {
    /// Parameter name with unit.
    pub parameter: String,
    /// Output with the parameter at its low value.
    pub low: f64,
    /// Output with the parameter at its high value.
    pub high: f64,
}

/// Validation: the default model against published devices, how that sizes the model-form
/// term, and the variants calibrated to a pilot still.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ValidationSection {
    /// Rows.
    pub rows: Vec<ValidationRow>,
    /// Model-form relative SD the comparisons give [-] (the calibration module's constant).
    pub model_form_sd: f64,
    /// How the comparisons size the model-form term, in words.
    pub note: String,
    /// Variants whose design carries `[variant.calibration]`.
    pub calibrated: Vec<CalibratedVariant>,
}

/// One device or pilot still compared.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ValidationRow {
    /// Device or pilot.
    pub device: String,
    /// Source of the measurement.
    pub source: String,
    /// The conditions reconstructed from the source, and what it leaves unsaid.
    pub conditions: String,
    /// The published figure, in `unit`.
    pub published: f64,
    /// Unit of `published` and `predicted` (a daily yield, or an hourly lab rate).
    pub unit: String,
    /// Predicted by the default model, in `unit`; `None` when the reconstructed design could
    /// not be run.
    pub predicted: Option<f64>,
    /// predicted ÷ measured − 1 [-], when predicted.
    pub error: Option<f64>,
}

/// A variant whose model carries factors fitted to a pilot still.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalibratedVariant {
    /// Variant name.
    pub name: String,
    /// The factors in force.
    pub factors: CalibrationFactors,
    /// What they were fitted from (user text), when stated.
    pub fitted_from: Option<String>,
    /// When they were fitted (user text), when stated.
    pub fitted_on: Option<String>,
    /// Notes (user text), when stated.
    pub note: Option<String>,
}

/// Hook for `[[alternative]]` entries.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlternativesSection {
    /// The recommended still's cost per litre over its life [currency L⁻¹].
    pub still_cost_per_l: f64,
    /// Rows, the recommended still first.
    pub rows: Vec<AlternativeRow>,
}

/// One way of getting drinking water.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlternativeRow {
    /// Name (user text).
    pub name: String,
    /// Cost per litre [currency L⁻¹].
    pub cost_per_l: f64,
    /// Cost per litre relative to the recommended still's (1 = the same), when that is not 0.
    pub relative_to_still: Option<f64>,
    /// What it removes.
    pub removes: String,
    /// What it does not remove.
    pub does_not_remove: String,
}

/// Hook for `[[risk]]` entries.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RisksSection {
    /// Rows.
    pub rows: Vec<RiskRow>,
}

/// One failure mode.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RiskRow {
    /// Failure mode.
    pub failure: String,
    /// Likelihood (words).
    pub likelihood: String,
    /// Impact (words).
    pub impact: String,
    /// Mitigation.
    pub mitigation: String,
}
