//! Build complexity (a score made of visible parts), labour hours and the fabricator's build
//! steps.

use std::collections::BTreeSet;

use serde::Serialize;

use super::bom::Bom;
use super::takeoff::Tolerance;
use crate::design::{BasinKind, Costs, Library, Role, Variant, VariantKind};

/// Slope of a distillate trough toward its outlet [-] (common practice, no source: 1 in 100
/// drains condensate without pooling and is easy to set with a spirit level).
pub const TROUGH_SLOPE: f64 = 0.01;
/// Water drop of the leak test over its hold time [mm] (common practice, no source).
pub const LEAK_TEST_MAX_DROP_MM: f64 = 1.0;
/// Hold time of the leak test [h] (common practice, no source).
pub const LEAK_TEST_HOLD_H: f64 = 24.0;

/// One term of the score.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScoreTerm {
    /// What is counted.
    pub what: String,
    /// How many.
    pub count: f64,
    /// Points per unit (`[costs.weights]`).
    pub weight: f64,
    /// count × weight.
    pub points: f64,
}

/// The build complexity of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Complexity {
    /// The terms.
    pub terms: Vec<ScoreTerm>,
    /// Their sum.
    pub score: f64,
    /// Tools needed.
    pub tools: Vec<String>,
    /// Skills needed.
    pub skills: Vec<String>,
    /// Tolerances that matter.
    pub tolerances: Vec<Tolerance>,
    /// Workshop labour [h].
    pub labour_h: f64,
}

/// Score a priced bill of materials.
pub fn complexity(bom: &Bom, tolerances: &[Tolerance], lib: &Library, c: &Costs) -> Complexity {
    let mut tools: BTreeSet<String> = BTreeSet::new();
    let mut skills: BTreeSet<String> = BTreeSet::new();
    for l in &bom.lines {
        if let Some(it) = lib.get(&l.item) {
            tools.extend(it.tools.iter().cloned());
            skills.extend(it.skills.iter().cloned());
        }
    }
    // Setting out and the leak test need these whatever the materials.
    tools.insert("spirit level".into());
    tools.insert("tape measure".into());
    let w = &c.weights;
    let distinct = bom.lines.len() as f64;
    let terms = vec![
        term("distinct parts (bill-of-materials lines)", distinct, w.part),
        term("pieces made and fitted", f64::from(bom.parts), w.part),
        term("joints", f64::from(bom.joints), w.joint),
        term("seal length [m]", bom.seal_m, w.seal_per_m),
        term("tools", tools.len() as f64, w.tool),
        term("skills", skills.len() as f64, w.skill),
        term(
            "tolerances that matter",
            tolerances.len() as f64,
            w.tolerance,
        ),
    ];
    let score = terms.iter().map(|t| t.points).sum();
    let lr = &c.labour;
    let labour_h = lr.base_h
        + lr.per_part_h * f64::from(bom.parts)
        + lr.per_joint_h * f64::from(bom.joints)
        + lr.per_seal_m_h * bom.seal_m
        + lr.test_h;
    Complexity {
        terms,
        score,
        tools: tools.into_iter().collect(),
        skills: skills.into_iter().collect(),
        tolerances: tolerances.to_vec(),
        labour_h,
    }
}

fn term(what: &str, count: f64, weight: f64) -> ScoreTerm {
    ScoreTerm {
        what: what.into(),
        count,
        weight,
        points: count * weight,
    }
}

/// The commissioning test: what a finished still should give on a clear day.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Commissioning {
    /// Irradiation on the cover the test is stated for [kWh m⁻² day⁻¹].
    pub irradiation_kwh_m2_day: f64,
    /// Expected distillate that day [L], low and high, when the model gives it.
    pub expected_litres: Option<(f64, f64)>,
    /// The test, in words.
    pub text: String,
}

/// Build the commissioning test for a variant; `expected` comes from the simulation.
pub fn commissioning(v: &Variant, c: &Costs, expected: Option<(f64, f64)>) -> Commissioning {
    let h = c.commissioning_kwh_m2_day;
    let text = match expected {
        Some((lo, hi)) => format!(
            "On a clear day with about {h:.1} kWh/m² on the cover, fill to the working level at \
             dawn and collect for 24 h: expect {lo:.1}–{hi:.1} L. Less than {lo:.1} L means a \
             leak, a dry patch or a shaded cover."
        ),
        None => format!(
            "On a clear day with about {h:.1} kWh/m² on the cover, fill to the working level at \
             dawn and collect for 24 h. Expected range: yield not modelled yet for kind {}.",
            v.kind.name()
        ),
    };
    Commissioning {
        irradiation_kwh_m2_day: h,
        expected_litres: expected,
        text,
    }
}

/// Sealant cure rate inward from the bead's surface [mm per 24 h] (common practice, no
/// source: the figure usually printed on one-part silicone cartridges is 2–3 mm a day at room
/// temperature, from memory; the lower end is used).
pub const SEALANT_CURE_MM_PER_DAY: f64 = 2.0;
/// Moist curing of mortar or concrete before the basin is loaded or filled [h] (common
/// practice, no source: seven days of moist curing for ordinary Portland cement is the usual
/// site rule, from memory).
pub const MASONRY_CURE_H: f64 = 7.0 * 24.0;
/// Drying time between two coats of paint [h] (common practice, no source).
pub const PAINT_RECOAT_H: f64 = 24.0;
/// Drying time after the last coat before water touches the paint [h] (common practice, no
/// source: solvents must leave the film before it is wetted and heated).
pub const PAINT_LAST_COAT_H: f64 = 72.0;
/// Days of distillate thrown away after commissioning (sealant and paint residues) [day]
/// (common practice, no source).
pub const DISCARD_DAYS: u32 = 2;

/// A hold point: work stops here until a wait has passed or a check has been signed off.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HoldPoint {
    /// What is waited for.
    pub what: String,
    /// The wait [h].
    pub wait_h: f64,
    /// Why, and where the figure comes from.
    pub why: String,
}

/// One build step with the hold points that end it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BuildStep {
    /// 1-based step number.
    pub number: usize,
    /// What to do.
    pub text: String,
    /// Waits before the next step may start (empty: none).
    pub holds: Vec<HoldPoint>,
}

/// What a step does, so hold points can attach to it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum StepTag {
    Plain,
    Walls,
    Paint,
    LinerOrPaint,
    LeakTest,
    Seal,
    Flush,
}

/// The build steps for the fabricator, in order (the texts of [`build_plan`]).
pub fn build_steps(v: &Variant, bom: &Bom, commissioning: &Commissioning) -> Vec<String> {
    tagged_steps(v, bom, commissioning)
        .into_iter()
        .map(|(_, t)| t)
        .collect()
}

/// The build steps with their hold points: sealant cure (from the bead size and
/// [`SEALANT_CURE_MM_PER_DAY`]), masonry cure ([`MASONRY_CURE_H`], masonry basins), paint
/// drying ([`PAINT_RECOAT_H`] between coats, [`PAINT_LAST_COAT_H`] after the last, when the
/// bill of materials has a paint line), the leak test ([`LEAK_TEST_HOLD_H`]) and the
/// distillate discarded at start-up ([`DISCARD_DAYS`]).
pub fn build_plan(
    v: &Variant,
    bom: &Bom,
    commissioning: &Commissioning,
    c: &Costs,
) -> Vec<BuildStep> {
    let painted = bom.lines.iter().any(|l| l.role == Role::Paint);
    let masonry = matches!(
        &v.kind,
        VariantKind::SingleSlope(k) if k.basin == BasinKind::Masonry
    ) || matches!(
        &v.kind,
        VariantKind::DoubleSlope(k) if k.basin == BasinKind::Masonry
    );
    // A square bead cures from its exposed face inward: the bead's side is the depth.
    let bead_mm = c.sealant_bead_mm2.max(0.0).sqrt();
    let seal_days = (bead_mm / SEALANT_CURE_MM_PER_DAY).ceil().max(1.0);
    let coats = f64::from(c.paint_coats.max(1));
    let paint_h = PAINT_RECOAT_H * (coats - 1.0) + PAINT_LAST_COAT_H;
    tagged_steps(v, bom, commissioning)
        .into_iter()
        .enumerate()
        .map(|(i, (tag, text))| {
            let mut holds = Vec::new();
            match tag {
                StepTag::Walls if masonry => holds.push(HoldPoint {
                    what: "mortar and concrete cure, kept damp".into(),
                    wait_h: MASONRY_CURE_H,
                    why: "keep the masonry damp and shaded; do not load or fill it before \
                          (common practice, no source)"
                        .into(),
                }),
                StepTag::Paint | StepTag::LinerOrPaint if painted => holds.push(HoldPoint {
                    what: format!("paint dry: {} coat(s)", c.paint_coats.max(1)),
                    wait_h: paint_h,
                    why: format!(
                        "{PAINT_RECOAT_H:.0} h between coats and {PAINT_LAST_COAT_H:.0} h after \
                         the last before water touches it (common practice, no source)"
                    ),
                }),
                StepTag::LeakTest => holds.push(HoldPoint {
                    what: "leak test holds".into(),
                    wait_h: LEAK_TEST_HOLD_H,
                    why: format!(
                        "level drop at most {LEAK_TEST_MAX_DROP_MM:.0} mm; sign the unit's \
                         checklist before going on (common practice, no source)"
                    ),
                }),
                StepTag::Seal => holds.push(HoldPoint {
                    what: "sealant cured through".into(),
                    wait_h: seal_days * 24.0,
                    why: format!(
                        "a {bead_mm:.0} mm bead at {SEALANT_CURE_MM_PER_DAY:.0} mm a day \
                         (common practice, no source); do not fill, heat or load the cover \
                         before"
                    ),
                }),
                StepTag::Flush => holds.push(HoldPoint {
                    what: format!("first {DISCARD_DAYS} days of distillate discarded"),
                    wait_h: f64::from(DISCARD_DAYS) * 24.0,
                    why: "sealant and paint residues wash out (common practice, no source)".into(),
                }),
                _ => {}
            }
            BuildStep {
                number: i + 1,
                text,
                holds,
            }
        })
        .collect()
}

fn tagged_steps(v: &Variant, bom: &Bom, commissioning: &Commissioning) -> Vec<(StepTag, String)> {
    let slope = format!(
        "Fix the distillate trough{} with a fall of 1 in {:.0} ({:.0} mm per metre) toward the \
         outlet (common practice, no source); check with a spirit level.",
        if matches!(
            v.kind,
            VariantKind::DoubleSlope(_) | VariantKind::MultiEffect(_)
        ) {
            "s"
        } else {
            ""
        },
        1.0 / TROUGH_SLOPE,
        TROUGH_SLOPE * 1000.0
    );
    let leak = format!(
        "Leak test: fill to the working level, mark it and leave {LEAK_TEST_HOLD_H:.0} h covered \
         from the sun; the level may drop at most {LEAK_TEST_MAX_DROP_MM:.0} mm (common \
         practice, no source). Reseal and repeat until it holds."
    );
    use StepTag::*;
    let mut steps: Vec<(StepTag, String)> = vec![(
        Plain,
        "Set out the site: a firm, shade-free base, the cover facing the design azimuth.".into(),
    )];
    match &v.kind {
        VariantKind::SingleSlope(_) | VariantKind::DoubleSlope(_) => {
            steps.push((
                Walls,
                "Build the frame or masonry walls to the cut list.".into(),
            ));
            steps.push((
                Plain,
                "Level the basin floor to within 2 mm over its length and width (common \
                 practice, no source)."
                    .into(),
            ));
            steps.push((
                Plain,
                "Fit insulation under and around the basin, kept dry.".into(),
            ));
            steps.push((
                LinerOrPaint,
                "Fit the tray and liner (or paint the floor), lapping up the walls.".into(),
            ));
            steps.push((LeakTest, leak.clone()));
            steps.push((Plain, slope.clone()));
        }
        VariantKind::Stepped(_) => {
            steps.push((Plain, "Build the frame and fit the base insulation.".into()));
            steps.push((
                LinerOrPaint,
                "Form the trays, paint them and set each one level within 1 mm.".into(),
            ));
            steps.push((LeakTest, leak.clone()));
            steps.push((Plain, slope.clone()));
        }
        VariantKind::Wick(_) => {
            steps.push((
                Plain,
                "Build the stand and backing at the design tilt.".into(),
            ));
            steps.push((
                Plain,
                "Fit the backing insulation and the backing plate.".into(),
            ));
            steps.push((
                Plain,
                "Lay the wick cloth with its top end in the feed channel; run the feed and check \
                 the whole cloth wets evenly."
                    .into(),
            ));
            steps.push((LeakTest, leak.clone()));
            steps.push((Plain, slope.clone()));
        }
        VariantKind::MultiEffect(_) => {
            steps.push((Paint, "Paint the sun side of the first plate.".into()));
            steps.push((
                Plain,
                "Stack plate, wick and spacer frame stage by stage, checking every gap with a \
                 feeler gauge."
                    .into(),
            ));
            steps.push((
                Plain,
                "Fit the casing, edge insulation and the sink.".into(),
            ));
            steps.push((LeakTest, leak.clone()));
            steps.push((Plain, slope.clone()));
        }
    }
    if !bom.splits.is_empty() {
        steps.push((
            Plain,
            "Fit the glazing bars and bed the split panes on them.".into(),
        ));
    }
    steps.push((
        Seal,
        "Bed the cover in sealant along every joint; let it cure fully.".into(),
    ));
    steps.push((
        Plain,
        "Connect the feed, drain and distillate pipes and the collection bottle.".into(),
    ));
    steps.push((Flush, format!(
        "Flush: discard the first two days of distillate (sealant and paint residues). Commissioning test: {}",
        commissioning.text
    )));
    steps
}
