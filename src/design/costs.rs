//! `[costs]`: the economic and build parameters of a design, all optional with stated
//! defaults (documented in `docs/design-file.md`, section "`[costs]`").
//!
//! The defaults are trade rules of thumb, marked "common practice, no source" where no
//! citation has been checked. Every rate can be changed in the design file.

use serde::{Deserialize, Serialize};

use super::reader::Reader;

/// `[costs]`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct Costs {
    /// Economic life of the still [years], [1, 50]; default 10 (REFERENCES.md §9: glass and
    /// metal basins 10–20+ years [M]; the lower end is taken).
    pub life_years: f64,
    /// Real discount rate [-], [0, 1]; default 0.10 (common practice, no source: a typical
    /// rate for small rural water projects).
    pub discount_rate: f64,
    /// Workshop labour rate [currency h⁻¹], [0, 1e5]; default 2.0 (invented demo rate).
    pub labour_rate_per_h: f64,
    /// Operator labour rate [currency h⁻¹], [0, 1e5]; default 1.0 (invented demo rate).
    pub operator_rate_per_h: f64,
    /// Yearly upkeep (spares, small repairs) as a fraction of the capital cost [year⁻¹],
    /// [0, 1]; default 0.02 (common practice, no source).
    pub upkeep_fraction_per_year: f64,
    /// Salvage value at the end of the life as a fraction of the capital cost [-], [0, 1];
    /// default 0.10 (common practice, no source: scrap glass and metal).
    pub salvage_fraction: f64,
    /// Fractional loss of yield each year from growing leaks, yellowing plastics and fading
    /// paint [year⁻¹], [0, 0.5]; default 0.01 (common practice, no source).
    pub yield_loss_per_year: f64,
    /// Extra yearly yield loss for a plastic cover (yellowing, scratching) [year⁻¹], [0, 0.5];
    /// default 0.03 (common practice, no source).
    pub plastic_cover_loss_per_year: f64,
    /// Cross-section of a sealant bead [mm²], (0, 1000]; default 36 (a 6 mm × 6 mm bead,
    /// common practice, no source).
    pub sealant_bead_mm2: f64,
    /// Coats of paint, [1, 10]; default 2 (common practice, no source).
    pub paint_coats: u32,
    /// Width of a glazing bar where a pane is split [mm], [5, 200]; default 25 (common
    /// practice, no source).
    pub glazing_bar_mm: f64,
    /// Allowance for waste on items that are not nested in the cut list [-], [0, 1];
    /// default 0.05 (common practice, no source).
    pub waste_allowance: f64,
    /// Clear-day irradiation on the cover for the commissioning test [kWh m⁻² day⁻¹],
    /// (0, 12]; default 6.0 (common practice, no source: a clear day in the tropics).
    pub commissioning_kwh_m2_day: f64,
    /// Library items used for the parts a design does not name.
    pub items: PartItems,
    /// Weights of the build-complexity score.
    pub weights: ComplexityWeights,
    /// Labour hours per visible part of the build.
    pub labour: LabourRates,
    /// The operator's upkeep tasks: a daily round of the installation plus per-unit and
    /// per-m² tasks.
    pub operator: OperatorTasks,
    /// Acceptable substitutes per role, tried by `stillbench cost --substitutes`.
    pub substitutes: Substitutes,
}

impl Default for Costs {
    fn default() -> Self {
        Costs {
            life_years: 10.0,
            discount_rate: 0.10,
            labour_rate_per_h: 2.0,
            operator_rate_per_h: 1.0,
            upkeep_fraction_per_year: 0.02,
            salvage_fraction: 0.10,
            yield_loss_per_year: 0.01,
            plastic_cover_loss_per_year: 0.03,
            sealant_bead_mm2: 36.0,
            paint_coats: 2,
            glazing_bar_mm: 25.0,
            waste_allowance: 0.05,
            commissioning_kwh_m2_day: 6.0,
            items: PartItems::default(),
            weights: ComplexityWeights::default(),
            labour: LabourRates::default(),
            operator: OperatorTasks::default(),
            substitutes: Substitutes::default(),
        }
    }
}

/// `[costs.items]`: which library item makes each part the variant record does not name.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct PartItems {
    /// Frame and wall studs (role `structure`, priced per m); default `timber-batten`.
    pub frame: String,
    /// Wall panels of a metal-tray still (role `structure`, per m²); default `plywood-12mm`.
    pub wall_panel: String,
    /// Metal basin tray and stepped trays (role `structure`, per m²); default
    /// `galvanised-sheet`.
    pub tray: String,
    /// Masonry basin walls and floor (role `structure`); default `concrete-block-wall`.
    pub masonry: String,
    /// Sealant for every joint (role `sealant`); default `silicone-sealant`.
    pub sealant: String,
    /// Distillate trough (role `fitting`, per m); default `pvc-gutter`.
    pub trough: String,
    /// Feed, drain and distillate pipe (role `fitting`, per m); default `pvc-pipe-20mm`.
    pub pipe: String,
    /// Pipe fittings (role `fitting`, per piece); default `pvc-fitting-20mm`.
    pub pipe_fitting: String,
    /// Collection bottle (role `container`, per piece); default `hdpe-jerrycan`.
    pub bottle: String,
    /// Glazing bar where a pane is split (role `structure`, per m); default
    /// `aluminium-glazing-bar`.
    pub glazing_bar: String,
    /// Stage spacers of a multi-effect still (role `structure`, per m); default
    /// `aluminium-angle`.
    pub spacer: String,
    /// Fins of an air-cooled multi-effect sink (role `structure`, per m²); default
    /// `aluminium-sheet`.
    pub fin: String,
}

impl Default for PartItems {
    fn default() -> Self {
        PartItems {
            frame: "timber-batten".into(),
            wall_panel: "plywood-12mm".into(),
            tray: "galvanised-sheet".into(),
            masonry: "concrete-block-wall".into(),
            sealant: "silicone-sealant".into(),
            trough: "pvc-gutter".into(),
            pipe: "pvc-pipe-20mm".into(),
            pipe_fitting: "pvc-fitting-20mm".into(),
            bottle: "hdpe-jerrycan".into(),
            glazing_bar: "aluminium-glazing-bar".into(),
            spacer: "aluminium-angle".into(),
            fin: "aluminium-sheet".into(),
        }
    }
}

/// `[costs.weights]`: points per unit of each visible part of the build-complexity score.
/// Common practice, no source: chosen so that a plain single-slope still scores about 30
/// and a four-stage still about twice that.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct ComplexityWeights {
    /// Per distinct part; default 1.
    pub part: f64,
    /// Per joint; default 0.5.
    pub joint: f64,
    /// Per metre of seal; default 0.5.
    pub seal_per_m: f64,
    /// Per distinct tool; default 1.
    pub tool: f64,
    /// Per distinct skill; default 3.
    pub skill: f64,
    /// Per tolerance that matters; default 4.
    pub tolerance: f64,
}

impl Default for ComplexityWeights {
    fn default() -> Self {
        ComplexityWeights {
            part: 1.0,
            joint: 0.5,
            seal_per_m: 0.5,
            tool: 1.0,
            skill: 3.0,
            tolerance: 4.0,
        }
    }
}

/// `[costs.labour]`: workshop hours per visible part. Common practice, no source.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct LabourRates {
    /// Setting out and finishing, per still [h]; default 2.
    pub base_h: f64,
    /// Per part cut or formed [h]; default 0.25.
    pub per_part_h: f64,
    /// Per joint made [h]; default 0.2.
    pub per_joint_h: f64,
    /// Per metre of sealant run [h m⁻¹]; default 0.1.
    pub per_seal_m_h: f64,
    /// Leak test and commissioning [h]; default 1.
    pub test_h: f64,
}

impl Default for LabourRates {
    fn default() -> Self {
        LabourRates {
            base_h: 2.0,
            per_part_h: 0.25,
            per_joint_h: 0.2,
            per_seal_m_h: 0.1,
            test_h: 1.0,
        }
    }
}

/// `[costs.operator]`: the operator's time to keep an installation running, as a daily round
/// of the whole installation plus tasks per unit and per m² of cover. Every default is common
/// practice, no source (no published time study of solar-still upkeep was found); set them
/// from the site's own practice.
///
/// Which per-unit tasks a unit needs follows from its kind and `[variant.operation]`: a
/// basin fed by hand (`feed = "batch"`) is filled at each refill hour and flushed by hand;
/// a basin on a float valve, drip or controller, and the self-feeding kinds (wick and
/// multi-effect, fed continuously from a header line), only have their feed checked.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct OperatorTasks {
    /// The daily round of the installation: walking it, looking over every unit, refilling
    /// the feed tank, keeping the log [min day⁻¹], [0, 600]; default 20.
    pub round_min_per_day: f64,
    /// Filling one hand-fed basin once [min], [0, 60]; default 2 (carrying and pouring a
    /// bucket or opening a tap to the mark).
    pub fill_min: f64,
    /// Flushing one basin by hand once [min], [0, 60]; default 3 (opening the drain, letting
    /// the brine go, closing it).
    pub flush_min: f64,
    /// Days between flushes of a basin drained when its salinity reaches the limit
    /// (`flush = "salinity-limit"`) [days], [1, 365]; default 7.
    pub salinity_flush_interval_days: f64,
    /// Checking the feed of a unit fed by a valve, a drip or a feed line (clearing a blocked
    /// dripper, watching the run-off) [min day⁻¹], [0, 60]; default 0.5.
    pub feed_check_min_per_day: f64,
    /// Emptying or swapping one unit's distillate bottle [min day⁻¹], [0, 60]; default 1.
    pub bottle_min_per_day: f64,
    /// Cleaning a cover once, per m² of cover [min m⁻²], [0, 60]; default 1.
    pub cover_clean_min_per_m2: f64,
    /// Days between cover cleanings [days], [1, 365]; default 7.
    pub cover_clean_interval_days: f64,
}

impl Default for OperatorTasks {
    fn default() -> Self {
        OperatorTasks {
            round_min_per_day: 20.0,
            fill_min: 2.0,
            flush_min: 3.0,
            salinity_flush_interval_days: 7.0,
            feed_check_min_per_day: 0.5,
            bottle_min_per_day: 1.0,
            cover_clean_min_per_m2: 1.0,
            cover_clean_interval_days: 7.0,
        }
    }
}

/// `[costs.substitutes]`: acceptable substitutes per role, as library ids. Empty by default.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct Substitutes {
    /// For the cover.
    pub cover: Vec<String>,
    /// For the basin liner or absorber (role `liner` or `paint`).
    pub liner: Vec<String>,
    /// For insulation layers.
    pub insulation: Vec<String>,
    /// For wick cloth.
    pub wick: Vec<String>,
    /// For stage plates.
    pub plate: Vec<String>,
}

/// A range check that records an issue at `path` when `v` is outside `[lo, hi]` (or when
/// `lo_open`, outside `(lo, hi]`).
fn check(r: &mut Reader<'_>, path: &str, v: f64, lo: f64, hi: f64, lo_open: bool, unit: &str) {
    let low_ok = if lo_open { v > lo } else { v >= lo };
    if !(v.is_finite() && low_ok && v <= hi) {
        let open = if lo_open { "(" } else { "[" };
        r.error(
            path,
            format!("{v} is out of range; allowed: {open}{lo}, {hi}] {unit}")
                .trim_end()
                .to_string(),
        );
    }
}

/// Check every range of `[costs]`.
pub(crate) fn validate(r: &mut Reader<'_>, c: &Costs) {
    check(
        r,
        "costs.life_years",
        c.life_years,
        1.0,
        50.0,
        false,
        "years",
    );
    check(
        r,
        "costs.discount_rate",
        c.discount_rate,
        0.0,
        1.0,
        false,
        "",
    );
    for (name, v) in [
        ("labour_rate_per_h", c.labour_rate_per_h),
        ("operator_rate_per_h", c.operator_rate_per_h),
    ] {
        check(r, &format!("costs.{name}"), v, 0.0, 1e5, false, "per h");
    }
    let o = &c.operator;
    for (name, v, lo, hi, unit) in [
        (
            "round_min_per_day",
            o.round_min_per_day,
            0.0,
            600.0,
            "min/day",
        ),
        ("fill_min", o.fill_min, 0.0, 60.0, "min"),
        ("flush_min", o.flush_min, 0.0, 60.0, "min"),
        (
            "salinity_flush_interval_days",
            o.salinity_flush_interval_days,
            1.0,
            365.0,
            "days",
        ),
        (
            "feed_check_min_per_day",
            o.feed_check_min_per_day,
            0.0,
            60.0,
            "min/day",
        ),
        (
            "bottle_min_per_day",
            o.bottle_min_per_day,
            0.0,
            60.0,
            "min/day",
        ),
        (
            "cover_clean_min_per_m2",
            o.cover_clean_min_per_m2,
            0.0,
            60.0,
            "min/m2",
        ),
        (
            "cover_clean_interval_days",
            o.cover_clean_interval_days,
            1.0,
            365.0,
            "days",
        ),
    ] {
        check(r, &format!("costs.operator.{name}"), v, lo, hi, false, unit);
    }
    for (name, v, hi) in [
        ("upkeep_fraction_per_year", c.upkeep_fraction_per_year, 1.0),
        ("salvage_fraction", c.salvage_fraction, 1.0),
        ("yield_loss_per_year", c.yield_loss_per_year, 0.5),
        (
            "plastic_cover_loss_per_year",
            c.plastic_cover_loss_per_year,
            0.5,
        ),
        ("waste_allowance", c.waste_allowance, 1.0),
    ] {
        check(r, &format!("costs.{name}"), v, 0.0, hi, false, "");
    }
    check(
        r,
        "costs.sealant_bead_mm2",
        c.sealant_bead_mm2,
        0.0,
        1000.0,
        true,
        "mm2",
    );
    if !(1..=10).contains(&c.paint_coats) {
        r.error(
            "costs.paint_coats",
            format!("{} is out of range; allowed: 1–10 coats", c.paint_coats),
        );
    }
    check(
        r,
        "costs.glazing_bar_mm",
        c.glazing_bar_mm,
        5.0,
        200.0,
        false,
        "mm",
    );
    check(
        r,
        "costs.commissioning_kwh_m2_day",
        c.commissioning_kwh_m2_day,
        0.0,
        12.0,
        true,
        "kWh/m2/day",
    );
    let w = &c.weights;
    for (name, v) in [
        ("part", w.part),
        ("joint", w.joint),
        ("seal_per_m", w.seal_per_m),
        ("tool", w.tool),
        ("skill", w.skill),
        ("tolerance", w.tolerance),
    ] {
        check(
            r,
            &format!("costs.weights.{name}"),
            v,
            0.0,
            1000.0,
            false,
            "",
        );
    }
    let l = &c.labour;
    for (name, v) in [
        ("base_h", l.base_h),
        ("per_part_h", l.per_part_h),
        ("per_joint_h", l.per_joint_h),
        ("per_seal_m_h", l.per_seal_m_h),
        ("test_h", l.test_h),
    ] {
        check(
            r,
            &format!("costs.labour.{name}"),
            v,
            0.0,
            1000.0,
            false,
            "h",
        );
    }
}
