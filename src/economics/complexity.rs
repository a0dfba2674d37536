//! Build complexity (a score made of visible parts), labour hours and the fabricator's build
//! steps.

use std::collections::BTreeSet;

use serde::Serialize;

use super::bom::Bom;
use super::takeoff::Tolerance;
use crate::design::{Costs, Library, Variant, VariantKind};

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

/// The build steps for the fabricator, in order.
pub fn build_steps(v: &Variant, bom: &Bom, commissioning: &Commissioning) -> Vec<String> {
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
    let mut steps: Vec<String> = vec![
        "Set out the site: a firm, shade-free base, the cover facing the design azimuth.".into(),
    ];
    match &v.kind {
        VariantKind::SingleSlope(_) | VariantKind::DoubleSlope(_) => {
            steps.push("Build the frame or masonry walls to the cut list.".into());
            steps.push(
                "Level the basin floor to within 2 mm over its length and width (common \
                 practice, no source)."
                    .into(),
            );
            steps.push("Fit insulation under and around the basin, kept dry.".into());
            steps.push("Fit the tray and liner (or paint the floor), lapping up the walls.".into());
            steps.push(leak.clone());
            steps.push(slope.clone());
        }
        VariantKind::Stepped(_) => {
            steps.push("Build the frame and fit the base insulation.".into());
            steps.push("Form the trays, paint them and set each one level within 1 mm.".into());
            steps.push(leak.clone());
            steps.push(slope.clone());
        }
        VariantKind::Wick(_) => {
            steps.push("Build the stand and backing at the design tilt.".into());
            steps.push("Fit the backing insulation and the backing plate.".into());
            steps.push(
                "Lay the wick cloth with its top end in the feed channel; run the feed and check \
                 the whole cloth wets evenly."
                    .into(),
            );
            steps.push(leak.clone());
            steps.push(slope.clone());
        }
        VariantKind::MultiEffect(_) => {
            steps.push("Paint the sun side of the first plate.".into());
            steps.push(
                "Stack plate, wick and spacer frame stage by stage, checking every gap with a \
                 feeler gauge."
                    .into(),
            );
            steps.push("Fit the casing, edge insulation and the sink.".into());
            steps.push(leak.clone());
            steps.push(slope.clone());
        }
    }
    if !bom.splits.is_empty() {
        steps.push("Fit the glazing bars and bed the split panes on them.".into());
    }
    steps.push("Bed the cover in sealant along every joint; let it cure fully.".into());
    steps.push("Connect the feed, drain and distillate pipes and the collection bottle.".into());
    steps.push(format!(
        "Flush: discard the first two days of distillate (sealant and paint residues). Commissioning test: {}",
        commissioning.text
    ));
    steps
}
