//! The fabricator's sheet for one variant: drawing, bill of materials and cut list (taken
//! from the variant's costing, not recomputed), build steps with hold points, tools and
//! skills, the parts that must never be substituted, a per-unit quality checklist and the
//! commissioning plan.

use std::io::{self, Write};

use serde::Serialize;

use super::drawing::{self, Drawing};
use crate::compare::Evaluation;
use crate::design::{DesignErrors, DesignIssue, LoadedDesign, VariantKind};
use crate::economics::bom::{BomLine, FoodSafetyFlag};
use crate::economics::complexity::{
    self, BuildStep, Commissioning, DISCARD_DAYS, LEAK_TEST_HOLD_H, LEAK_TEST_MAX_DROP_MM,
    TROUGH_SLOPE,
};
use crate::economics::takeoff::{Contact, Tolerance};
use crate::error::Error;

/// Blank rows of the quality checklist printed for the workshop (one per unit built).
pub const CHECKLIST_ROWS: u32 = 10;

/// Highest distillate conductivity accepted at commissioning [µS cm⁻¹] (common practice, no
/// source: a sound still gives a few to a few tens of µS/cm, from memory; far more means
/// brine reaches the trough).
pub const CONDUCTIVITY_MAX_US_CM: f64 = 50.0;

/// Margin added to the hottest modelled mean-day brine temperature when stating what a
/// water-path part must withstand [K] (common practice, no source: hot days run above the
/// month's mean day).
pub const TEMPERATURE_MARGIN_K: f64 = 10.0;

/// Temperature rating used when the model gives no brine temperature [°C] (common practice,
/// no source).
pub const FALLBACK_RATING_C: f64 = 80.0;

/// Angle tolerance of the cover tilt at inspection [deg] (the general tolerance of
/// [`drawing::GENERAL_TOLERANCE`]).
pub const TILT_TOLERANCE_DEG: f64 = 0.5;

/// One line of the cut list, flattened from the nesting plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CutRow {
    /// Part.
    pub part: String,
    /// Library item id.
    pub item: String,
    /// The stock piece it is cut from ("sheet 1, 1220 × 2440 mm", "bar 2, 3000 mm").
    pub stock: String,
    /// Piece label.
    pub piece: String,
    /// Piece size ("950 × 2040 mm", "1800 mm").
    pub size: String,
}

/// A part that must never be substituted by anything not rated for drinking water.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NeverSubstitute {
    /// Part.
    pub part: String,
    /// Library item id.
    pub item: String,
    /// Library item name.
    pub item_name: String,
    /// What it touches (`brine`, `vapour`, `distillate`).
    pub touches: Contact,
    /// The rule, in words.
    pub rule: String,
    /// Why the chosen item itself fails the rule, when it does.
    pub flagged: Option<String>,
}

/// One column of the per-unit quality checklist.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ChecklistColumn {
    /// Heading.
    pub heading: String,
    /// What passes (empty: fill in).
    pub target: String,
}

/// The per-unit quality checklist (blank rows to fill in on paper).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QualityChecklist {
    /// Columns, left to right.
    pub columns: Vec<ChecklistColumn>,
    /// Blank rows to print.
    pub blank_rows: u32,
}

/// Commissioning: what to do and what to expect when a unit is first filled.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CommissioningPlan {
    /// Days of distillate discarded.
    pub discard_days: u32,
    /// The clear-day test from the costing.
    pub test: Commissioning,
    /// Highest distillate conductivity accepted [µS cm⁻¹].
    pub conductivity_max_us_cm: f64,
    /// The steps, in order.
    pub steps: Vec<String>,
}

/// The fabricator's sheet of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WorkshopSheet {
    /// Variant name.
    pub variant: String,
    /// Kind name as in design files.
    pub kind: String,
    /// Currency of every money figure.
    pub currency: String,
    /// Footprint [m²].
    pub footprint_m2: f64,
    /// Cover area [m²].
    pub cover_area_m2: f64,
    /// The dimensioned drawing.
    pub drawing: Drawing,
    /// Bill of materials (the costing's lines).
    pub bom: Vec<BomLine>,
    /// Materials cost [currency].
    pub materials_cost: f64,
    /// Cut list.
    pub cut_list: Vec<CutRow>,
    /// Build steps with hold points.
    pub steps: Vec<BuildStep>,
    /// Sum of every hold [h].
    pub total_hold_h: f64,
    /// Workshop labour [h].
    pub labour_h: f64,
    /// Tools.
    pub tools: Vec<String>,
    /// Skills.
    pub skills: Vec<String>,
    /// Tolerances that decide whether the still works.
    pub tolerances: Vec<Tolerance>,
    /// General tolerance note.
    pub general_tolerance: String,
    /// Temperature every water-path part must be rated for [°C].
    pub rating_c: f64,
    /// How `rating_c` was found.
    pub rating_basis: String,
    /// Parts never to be substituted.
    pub never_substitute: Vec<NeverSubstitute>,
    /// Rules for everything in the water path.
    pub water_path_rules: Vec<String>,
    /// The costing's food-safety flags (items that must be replaced before building).
    pub food_safety_flags: Vec<FoodSafetyFlag>,
    /// Per-unit quality checklist.
    pub checklist: QualityChecklist,
    /// Commissioning.
    pub commissioning: CommissioningPlan,
}

/// Metals that must stay out of the water path, by a word in the item's id or name.
const BARRED_METALS: [(&str, &str); 5] = [
    (
        "galvan",
        "galvanised: zinc (and the lead and cadmium it may carry) dissolves into soft, hot water",
    ),
    ("zinc", "zinc dissolves into soft, hot water"),
    ("lead", "lead: a poison, whatever the amount"),
    ("solder", "solder may contain lead"),
    (
        "copper",
        "copper dissolves into soft, slightly acidic distillate",
    ),
];

fn barred(item: &str, name: &str) -> Option<&'static str> {
    let hay = format!("{} {}", item.to_lowercase(), name.to_lowercase());
    BARRED_METALS
        .iter()
        .find(|(w, _)| hay.contains(w))
        .map(|(_, why)| *why)
}

fn mm(v_m: f64) -> f64 {
    v_m * 1000.0
}

/// Flatten the costing's nesting plan into cut-list rows.
fn cut_rows(cuts: &[crate::economics::bom::CutEntry]) -> Vec<CutRow> {
    let mut rows = Vec::new();
    for c in cuts {
        if let Some(plan) = &c.sheets {
            for (k, sh) in plan.sheets.iter().enumerate() {
                let stock = if sh.roll {
                    format!(
                        "roll {}, {:.0} mm wide, {:.0} mm used",
                        k + 1,
                        mm(sh.width_m),
                        mm(sh.length_m)
                    )
                } else {
                    format!(
                        "sheet {}, {:.0} × {:.0} mm",
                        k + 1,
                        mm(sh.width_m),
                        mm(sh.length_m)
                    )
                };
                for p in &sh.placements {
                    rows.push(CutRow {
                        part: c.part.clone(),
                        item: c.item.clone(),
                        stock: stock.clone(),
                        piece: p.label.clone(),
                        size: format!("{:.0} × {:.0} mm", mm(p.across_m), mm(p.along_m)),
                    });
                }
            }
        }
        if let Some(plan) = &c.bars {
            for (k, bar) in plan.bars.iter().enumerate() {
                let stock = format!("bar {}, {:.0} mm", k + 1, mm(bar.length_m));
                for (label, len) in &bar.cuts {
                    rows.push(CutRow {
                        part: c.part.clone(),
                        item: c.item.clone(),
                        stock: stock.clone(),
                        piece: label.clone(),
                        size: format!("{:.0} mm", mm(*len)),
                    });
                }
            }
        }
    }
    rows
}

fn contact_rule(c: Contact, rating_c: f64) -> String {
    match c {
        Contact::Distillate => format!(
            "touches the distillate: only an item rated for drinking water at {rating_c:.0} °C; \
             no galvanised steel, copper, brass, lead solder or containers of unknown past use"
        ),
        Contact::Vapour => format!(
            "touches the vapour that becomes distillate: rated for drinking water at \
             {rating_c:.0} °C and fully cured; nothing that gives off acid, solvent or \
             plasticiser"
        ),
        Contact::Brine => format!(
            "sits in the hot brine under the vapour: rated for drinking water at \
             {rating_c:.0} °C; no tar, bitumen, lead-based paint or galvanised metal"
        ),
        Contact::Dry => "dry part".to_owned(),
    }
}

fn design_error(loaded: &LoadedDesign, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: "variant".into(),
        message,
    }]))
}

/// Build the workshop sheet of variant `variant_index` (0-based) from its evaluation (the
/// simulation and costing of that same variant).
///
/// Errors: [`Error::Design`] when the index is out of range or `eval` belongs to another
/// variant.
pub fn workshop_sheet(
    loaded: &LoadedDesign,
    variant_index: usize,
    eval: &Evaluation,
) -> Result<WorkshopSheet, Error> {
    let d = &loaded.design;
    let Some(v) = d.variants.get(variant_index) else {
        return Err(design_error(
            loaded,
            format!(
                "no variant number {} (the design has {})",
                variant_index + 1,
                d.variants.len()
            ),
        ));
    };
    if eval.name != v.name {
        return Err(design_error(
            loaded,
            format!(
                "the evaluation given is of variant \"{}\", not of variant[{}] \"{}\"",
                eval.name,
                variant_index + 1,
                v.name
            ),
        ));
    }
    let cost = &eval.cost;
    let bom = &cost.bom;
    let drawing = drawing::drawing(v, &loaded.library);
    let steps = complexity::build_plan(v, bom, &cost.commissioning, &d.costs);
    let total_hold_h = steps
        .iter()
        .flat_map(|s| s.holds.iter())
        .map(|h| h.wait_h)
        .sum();

    let hottest = eval
        .result
        .months
        .iter()
        .map(|m| m.max_brine_c)
        .filter(|t| t.is_finite())
        .fold(f64::NEG_INFINITY, f64::max);
    let (rating_c, rating_basis) = if hottest.is_finite() {
        let r = ((hottest + TEMPERATURE_MARGIN_K) / 5.0).ceil() * 5.0;
        (
            r,
            format!(
                "hottest modelled mean-day brine {hottest:.0} °C + {TEMPERATURE_MARGIN_K:.0} K \
                 for hot days, rounded up to 5 °C (common practice, no source)"
            ),
        )
    } else {
        (
            FALLBACK_RATING_C,
            "no brine temperature modelled; a fixed rating (common practice, no source)".into(),
        )
    };

    let mut never_substitute = Vec::new();
    for l in bom.lines.iter().filter(|l| l.contact != Contact::Dry) {
        let flag = bom
            .food_safety
            .iter()
            .find(|f| f.item == l.item && f.part == l.part)
            .map(|f| f.reason.clone());
        let metal = barred(&l.item, &l.item_name).map(str::to_owned);
        never_substitute.push(NeverSubstitute {
            part: l.part.clone(),
            item: l.item.clone(),
            item_name: l.item_name.clone(),
            touches: l.contact,
            rule: contact_rule(l.contact, rating_c),
            flagged: match (flag, metal) {
                (Some(a), Some(b)) => Some(format!("{a}; {b}")),
                (a, b) => a.or(b),
            },
        });
    }
    let water_path_rules = vec![
        format!(
            "Everything that touches the brine, the vapour or the distillate must be rated for \
             drinking water at {rating_c:.0} °C ({rating_basis})."
        ),
        "No galvanised parts, copper, brass or lead solder anywhere in the water path, from \
         the cover's underside to the collection container."
            .to_owned(),
        "Sealant in the vapour space: a neutral-cure grade rated for drinking water, never an \
         acetic (vinegar-smelling) one."
            .to_owned(),
        "Substitute nothing listed below without a new drinking-water rating for the \
         replacement."
            .to_owned(),
    ];

    let tilt = v.cover_tilt_deg();
    let fall_mm = TROUGH_SLOPE * v.length_m * 1000.0;
    let level = match &v.kind {
        VariantKind::Stepped(_) => "trays level (±1 mm each)",
        VariantKind::SingleSlope(_) | VariantKind::DoubleSlope(_) => "basin floor level (±2 mm)",
        VariantKind::Wick(_) | VariantKind::MultiEffect(_) => "frame square (±2 mm)",
    };
    let col = |h: &str, t: String| ChecklistColumn {
        heading: h.to_owned(),
        target: t,
    };
    let checklist = QualityChecklist {
        columns: vec![
            col("unit number", String::new()),
            col("date", String::new()),
            col("materials (supplier, batch)", String::new()),
            col(
                "leak test",
                format!("drop ≤ {LEAK_TEST_MAX_DROP_MM:.0} mm in {LEAK_TEST_HOLD_H:.0} h"),
            ),
            col("levelling", level.to_owned()),
            col(
                "trough slope",
                format!("fall ≥ {fall_mm:.0} mm over {:.0} mm", v.length_m * 1000.0),
            ),
            col(
                "cover tilt",
                format!("{tilt:.1}° ± {TILT_TOLERANCE_DEG:.1}°"),
            ),
            col("checked by", String::new()),
        ],
        blank_rows: CHECKLIST_ROWS,
    };

    let test = cost.commissioning.clone();
    let commissioning = CommissioningPlan {
        discard_days: DISCARD_DAYS,
        conductivity_max_us_cm: CONDUCTIVITY_MAX_US_CM,
        steps: vec![
            format!(
                "Fill to the working level and run the still; discard all distillate of the \
                 first {DISCARD_DAYS} days (sealant and paint residues)."
            ),
            format!("Clear-day yield test. {}", test.text),
            format!(
                "Measure the conductivity of the feed and of the distillate: the distillate \
                 must read at most {CONDUCTIVITY_MAX_US_CM:.0} µS/cm (common practice, no \
                 source). A reading that climbs toward the feed's means brine reaches the \
                 trough: splashing, an overfilled basin or a leaking trough."
            ),
            "Record the unit's litres per day against the expected range for the first month; \
             remineralise and have the distillate tested before drinking, as the cautions say."
                .to_owned(),
        ],
        test,
    };

    Ok(WorkshopSheet {
        variant: v.name.clone(),
        kind: v.kind.name().to_owned(),
        currency: cost.cost.currency.clone(),
        footprint_m2: v.footprint_m2(),
        cover_area_m2: v.cover_area_m2(),
        general_tolerance: drawing.general_tolerance.clone(),
        drawing,
        bom: bom.lines.clone(),
        materials_cost: bom.materials_cost(),
        cut_list: cut_rows(&bom.cuts),
        steps,
        total_hold_h,
        labour_h: cost.complexity.labour_h,
        tools: cost.complexity.tools.clone(),
        skills: cost.complexity.skills.clone(),
        tolerances: cost.complexity.tolerances.clone(),
        rating_c,
        rating_basis,
        never_substitute,
        water_path_rules,
        food_safety_flags: bom.food_safety.clone(),
        checklist,
        commissioning,
    })
}

/// Write the sheet as one JSON document (the context the report template receives under
/// `workshop`, with `schema_version` first; docs/output.md).
pub fn write_json(sheet: &WorkshopSheet, out: &mut impl Write) -> io::Result<()> {
    crate::output::write_document(out, sheet)
}
