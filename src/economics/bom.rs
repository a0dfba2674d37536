//! From needs to a priced bill of materials: unit conversion, nesting on stock, glazing bars
//! for oversized panes, availability and food safety.

use std::path::Path;

use serde::Serialize;

use super::cutlist::{self, BarPlan, Part, SheetPlan};
use super::takeoff::{Amount, Contact, Need, Takeoff};
use crate::design::{Costs, DesignIssue, Item, Library, Role, Unit};

/// One line of the bill of materials.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BomLine {
    /// The part.
    pub part: String,
    /// Library item id.
    pub item: String,
    /// Library item name.
    pub item_name: String,
    /// The design field that chose the item.
    pub field: String,
    /// Item role.
    pub role: Role,
    /// Geometry formula the quantity comes from.
    pub formula: String,
    /// The geometric quantity.
    pub amount: Amount,
    /// How it became a purchase quantity.
    pub conversion: String,
    /// Quantity bought for one unit built alone, in the item's unit (what its cut list
    /// shows).
    pub quantity: f64,
    /// Quantity bought for the whole installation ([`Bom::units`] units, their parts nested
    /// onto stock together so offcuts are shared), in the item's unit.
    pub installation_quantity: f64,
    /// The item's unit, as written in the library.
    pub unit: &'static str,
    /// Price per unit paid (with the import cost when not local) [currency].
    pub unit_price: f64,
    /// Line cost of one unit built alone: quantity × unit price [currency].
    pub cost: f64,
    /// One unit's share of the installation's line cost: installation quantity × unit
    /// price ÷ units [currency]. This is what the capital carries.
    pub unit_share_cost: f64,
    /// Sold locally.
    pub local: bool,
    /// Service life [years].
    pub lifetime_years: f64,
    /// What the part touches.
    pub contact: Contact,
}

/// A needed item that is not sold locally.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Unavailable {
    /// Item id.
    pub item: String,
    /// The part that needs it.
    pub part: String,
    /// Days to deliver, when the library says.
    pub lead_time_days: Option<f64>,
    /// Extra cost of importing it for this still [currency].
    pub import_extra: f64,
}

/// An item that would taint the water where it is used.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FoodSafetyFlag {
    /// Item id.
    pub item: String,
    /// The part.
    pub part: String,
    /// What it touches.
    pub contact: Contact,
    /// Why (the library's `taint` note, or "not marked food_grade").
    pub reason: String,
}

/// Nesting of one line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CutEntry {
    /// The part.
    pub part: String,
    /// Library item id.
    pub item: String,
    /// Sheets of one unit built alone, when nested on sheets.
    pub sheets: Option<SheetPlan>,
    /// Bars of one unit built alone, when nested on bars.
    pub bars: Option<BarPlan>,
    /// The same parts of every unit of the installation nested together.
    pub installation: InstallationNest,
}

/// Units nested together at most, in one batch ([`nest_installation_sheets`]): larger
/// installations are nested batch by batch (full batches plus the rest), which keeps the
/// first-fit search short. Offcuts are shared within a batch, not between batches, so the
/// stock bought is an upper bound within a fraction of a sheet per batch of the stock a
/// nesting of every unit at once would need. Our choice (common practice, no source).
pub const NEST_BATCH_UNITS: u64 = 100;

/// The stock one item's parts need when every unit of an installation is nested together.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InstallationNest {
    /// Units nested.
    pub units: u64,
    /// Stock pieces bought (sheets, lengths off a roll, or bars).
    pub pieces: usize,
    /// Parts' total: area [m²] for sheets, length [m] for bars.
    pub parts: f64,
    /// Stock bought: area [m²] for sheets, length [m] for bars.
    pub stock: f64,
    /// Offcut waste: stock − parts (m² or m).
    pub waste: f64,
    /// Stock one unit built alone buys, times the units (m² or m): what buying per unit
    /// would cost, for comparison.
    pub per_unit_stock: f64,
}

impl InstallationNest {
    /// Waste as a fraction of the stock bought [-].
    pub fn waste_fraction(&self) -> f64 {
        if self.stock > 0.0 {
            self.waste / self.stock
        } else {
            0.0
        }
    }
}

/// `parts` of `units` identical units, each labelled with its unit number when there are
/// several (`unit 2: cover pane`).
pub fn replicate_parts(parts: &[Part], units: u64) -> Vec<Part> {
    if units <= 1 {
        return parts.to_vec();
    }
    (1..=units)
        .flat_map(|u| {
            parts.iter().map(move |p| Part {
                label: format!("unit {u}: {}", p.label),
                a_m: p.a_m,
                b_m: p.b_m,
            })
        })
        .collect()
}

/// Batches of at most [`NEST_BATCH_UNITS`] units that make up `units`: (batch size, how
/// many such batches).
fn batches(units: u64) -> Vec<(u64, u64)> {
    let units = units.max(1);
    let full = units / NEST_BATCH_UNITS;
    let rest = units % NEST_BATCH_UNITS;
    let mut out = Vec::new();
    if full > 0 {
        out.push((NEST_BATCH_UNITS, full));
    }
    if rest > 0 {
        out.push((rest, 1));
    }
    out
}

/// Nest the sheet `parts` of `units` identical units together onto `stocks`, batch by batch
/// ([`NEST_BATCH_UNITS`]): (sheets bought, stock area [m²]).
pub fn nest_installation_sheets(
    parts: &[Part],
    stocks: &[crate::design::Stock],
    units: u64,
) -> Result<(usize, f64), cutlist::TooLarge> {
    let mut sheets = 0;
    let mut area = 0.0;
    for (size, count) in batches(units) {
        let plan = cutlist::nest_sheets_least_stock(&replicate_parts(parts, size), stocks)?;
        sheets += plan.sheets.len() * count as usize;
        area += plan.stock_m2 * count as f64;
    }
    Ok((sheets, area))
}

/// Nest the bar `pieces` of `units` identical units together onto `stocks`, batch by batch:
/// (bars bought, stock length [m]); `None` when `stocks` has no bar length.
pub fn nest_installation_bars(
    pieces: &[(String, f64)],
    stocks: &[crate::design::Stock],
    units: u64,
) -> Option<(usize, f64)> {
    let mut bars = 0;
    let mut length = 0.0;
    for (size, count) in batches(units) {
        let all: Vec<(String, f64)> = (1..=size)
            .flat_map(|u| {
                pieces.iter().map(move |(l, x)| {
                    let label = if size > 1 {
                        format!("unit {u}: {l}")
                    } else {
                        l.clone()
                    };
                    (label, *x)
                })
            })
            .collect();
        let plan = cutlist::nest_bars(&all, stocks)?;
        bars += plan.bars.len() * count as usize;
        length += plan.stock_m * count as f64;
    }
    Some((bars, length))
}

/// A pane split with glazing bars because no stock sheet holds it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GlazingSplit {
    /// The pane that was split.
    pub pane: String,
    /// How.
    pub split: cutlist::Split,
}

/// A priced bill of materials with its cut list, for one unit and for the installation it
/// belongs to.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Bom {
    /// Units in the installation whose parts are nested together (1: a unit alone).
    pub units: u64,
    /// The lines.
    pub lines: Vec<BomLine>,
    /// The cut list.
    pub cuts: Vec<CutEntry>,
    /// Glazing bars added.
    pub splits: Vec<GlazingSplit>,
    /// Cover area shaded by glazing bars [m²] (for the optics to use).
    pub shaded_m2: f64,
    /// Sealant bead length [m], joints of the splits included.
    pub seal_m: f64,
    /// Parts, joints included from the splits.
    pub parts: u32,
    /// Joints.
    pub joints: u32,
    /// Items not sold locally.
    pub unavailable: Vec<Unavailable>,
    /// Food-safety flags.
    pub food_safety: Vec<FoodSafetyFlag>,
}

impl Bom {
    /// Materials of one unit built alone [currency].
    pub fn materials_cost(&self) -> f64 {
        self.lines.iter().map(|l| l.cost).sum()
    }

    /// One unit's share of the installation's materials [currency]: what the capital
    /// carries. Equal to [`Bom::materials_cost`] for a single unit, and below it when the
    /// units' parts share stock.
    pub fn unit_share_materials_cost(&self) -> f64 {
        self.lines.iter().map(|l| l.unit_share_cost).sum()
    }

    /// Materials of the whole installation [currency].
    pub fn installation_materials_cost(&self) -> f64 {
        self.lines
            .iter()
            .map(|l| l.installation_quantity * l.unit_price)
            .sum()
    }
}

fn unit_name(u: Unit) -> &'static str {
    match u {
        Unit::SquareMetre => "m2",
        Unit::Metre => "m",
        Unit::Kilogram => "kg",
        Unit::Litre => "L",
        Unit::Piece => "piece",
    }
}

/// A quantity with the digits it needs (whole numbers without decimals).
fn fmt_quantity(q: f64) -> String {
    if (q - q.round()).abs() < 1e-9 {
        format!("{q:.0}")
    } else {
        format!("{q:.3}")
    }
}

fn issue(file: &Path, path: String, message: String) -> DesignIssue {
    DesignIssue {
        file: file.to_path_buf(),
        line_col: None,
        path,
        message,
    }
}

/// Where an item sits in its library, for messages (`item[4]`).
fn item_path(lib: &Library, id: &str) -> String {
    lib.items
        .iter()
        .position(|i| i.id == id)
        .map_or_else(String::new, |k| format!("item[{}]", k + 1))
}

/// Turn a geometric amount into a purchase quantity in the item's unit.
fn convert(
    item: &Item,
    amount: Amount,
    c: &Costs,
    nested_m2: Option<f64>,
    nested_sheets: Option<usize>,
    nested_m: Option<f64>,
) -> Result<(f64, String), String> {
    let waste = 1.0 + c.waste_allowance;
    let pct = c.waste_allowance * 100.0;
    let bead_m2 = c.sealant_bead_mm2 * 1e-6;
    let coats = f64::from(c.paint_coats);
    match (amount, item.unit) {
        (Amount::AreaM2(_), Unit::SquareMetre) if nested_m2.is_some() => Ok((
            nested_m2.unwrap_or(0.0),
            "stock area bought, from the cut list".into(),
        )),
        (Amount::AreaM2(a), Unit::SquareMetre) => {
            Ok((a * waste, format!("× (1 + {pct:.0} % waste allowance)")))
        }
        (Amount::AreaM2(_), Unit::Piece) if nested_sheets.is_some() => Ok((
            nested_sheets.unwrap_or(0) as f64,
            "whole stock sheets, from the cut list".into(),
        )),
        (Amount::LengthM(_), Unit::Metre) if nested_m.is_some() => Ok((
            nested_m.unwrap_or(0.0),
            "whole stock lengths, from the cut list".into(),
        )),
        (Amount::LengthM(x), Unit::Metre) => {
            Ok((x * waste, format!("× (1 + {pct:.0} % waste allowance)")))
        }
        (Amount::Count(n), Unit::Piece) => Ok((n, "as counted".into())),
        (Amount::BeadM(x), Unit::Metre) => Ok((x, "bead length".into())),
        (Amount::BeadM(x), Unit::Litre) => Ok((
            x * bead_m2 * 1000.0 * waste,
            format!("× {:.0} mm² bead, + {pct:.0} %", c.sealant_bead_mm2),
        )),
        (Amount::BeadM(x), Unit::Piece) => match item.content_l {
            Some(v) => Ok((
                (x * bead_m2 * 1000.0 * waste / v).ceil(),
                format!(
                    "× {:.0} mm² bead + {pct:.0} %, ÷ {v} L a piece, rounded up",
                    c.sealant_bead_mm2
                ),
            )),
            None => Err("is priced per piece but gives no `content_l` (litres a piece)".into()),
        },
        (Amount::PaintM2(a), Unit::Litre) => match item.coverage_m2_l {
            Some(cov) => Ok((
                a * coats / cov * waste,
                format!("× {} coats ÷ {cov} m²/L, + {pct:.0} %", c.paint_coats),
            )),
            None => Err("is priced per litre but gives no `coverage_m2_l`".into()),
        },
        (Amount::PaintM2(a), Unit::SquareMetre) => {
            Ok((a * waste, format!("× (1 + {pct:.0} % waste allowance)")))
        }
        (Amount::VolumeM3(v), Unit::SquareMetre) => {
            match item.stock.iter().find_map(|s| s.thickness_mm) {
                Some(t) => Ok((
                    v / (t / 1000.0) * waste,
                    format!("÷ {t} mm board, + {pct:.0} %"),
                )),
                None => Err(
                    "is priced per m² but its stock gives no `thickness_mm` to turn a volume into board area"
                        .into(),
                ),
            }
        }
        (Amount::VolumeM3(v), Unit::Kilogram) => match item.insulation {
            Some(p) => Ok((
                v * p.density_kg_m3 * waste,
                format!("× {} kg/m³, + {pct:.0} %", p.density_kg_m3),
            )),
            None => Err("is priced per kg but gives no density".into()),
        },
        (Amount::VolumeM3(v), Unit::Litre) => {
            Ok((v * 1000.0 * waste, format!("m³ → L, + {pct:.0} %")))
        }
        (a, u) => Err(format!(
            "is priced per {} but this part is measured in {}",
            unit_name(u),
            a.value_unit().1
        )),
    }
}

/// Price every need of a takeoff, for one unit built alone and for an installation of
/// `units` identical units (≥ 1; 0 counts as 1) whose sheet parts and bar pieces are nested
/// onto stock together ([`nest_installation_sheets`], [`nest_installation_bars`]), so that
/// offcuts are shared across units. Quantities that are not nested scale with the units
/// before they are rounded (sealant cartridges are shared too). Problems (an item missing
/// from the library, a unit that cannot hold the quantity) are returned together, each
/// naming the item, the field and the file.
pub fn price(
    takeoff: &Takeoff,
    lib: &Library,
    library_file: &Path,
    design_file: &Path,
    c: &Costs,
    units: u64,
) -> Result<Bom, Vec<DesignIssue>> {
    let units = units.max(1);
    let n = units as f64;
    let mut problems = Vec::new();
    let mut lines = Vec::new();
    let mut cuts = Vec::new();
    let mut splits = Vec::new();
    let mut extra_seal = 0.0;
    let mut extra_joints = 0;
    let mut extra_parts = 0;
    let mut bar_need: f64 = 0.0;
    let mut needs: Vec<Need> = takeoff.needs.clone();
    // Split panes and sheet parts no stock holds. Only items with sheet stock are nested.
    for need in &mut needs {
        let Some(item) = lib.get(&need.item) else {
            continue;
        };
        if need.sheets.is_empty() || !item.stock.iter().any(|s| s.width_m.is_some()) {
            continue;
        }
        let mut parts: Vec<Part> = Vec::new();
        for p in &need.sheets {
            if item.stock.iter().any(|s| cutlist::fits(p.a_m, p.b_m, s)) {
                parts.push(p.clone());
                continue;
            }
            let bar = c.glazing_bar_mm / 1000.0;
            let Some(sp) = cutlist::split_pane(p.a_m, p.b_m, &item.stock, bar) else {
                problems.push(issue(
                    library_file,
                    item_path(lib, &item.id),
                    format!(
                        "item \"{}\": the {} ({:.3} × {:.3} m) cannot be split to fit any stock size",
                        item.id, p.label, p.a_m, p.b_m
                    ),
                ));
                continue;
            };
            let count = sp.across_a * sp.across_b;
            for k in 1..=count {
                parts.push(Part {
                    label: format!("{} ({k}/{count})", p.label),
                    a_m: sp.pane_m.0,
                    b_m: sp.pane_m.1,
                });
            }
            // A bar is sealed along both edges; each bar adds a part and its joints.
            extra_seal += 2.0 * sp.bar_m;
            let bars = sp.across_a - 1 + sp.across_b - 1;
            extra_parts += count - 1 + bars;
            extra_joints += 2 * bars;
            if item.role == Role::Cover {
                bar_need += sp.bar_m;
                splits.push(GlazingSplit {
                    pane: p.label.clone(),
                    split: sp,
                });
            }
        }
        need.sheets = parts;
    }
    if extra_seal > 0.0
        && let Some(n) = needs.iter_mut().find(|n| n.part.starts_with("sealant"))
        && let Amount::BeadM(b) = n.amount
    {
        n.amount = Amount::BeadM(b + extra_seal);
        n.formula = format!("{} + 2 × length of every glazing bar or seam", n.formula);
    }
    if bar_need > 0.0 {
        needs.push(Need {
            part: "glazing bars".into(),
            item: c.items.glazing_bar.clone(),
            field: "costs.items.glazing_bar".into(),
            formula: "bars between split panes, from the cut list".into(),
            amount: Amount::LengthM(bar_need),
            contact: Contact::Vapour,
            sheets: Vec::new(),
            bars: vec![("glazing bar".into(), bar_need)],
            parts: 0,
            joints: 0,
        });
    }
    let mut seal_m = 0.0;
    let mut parts = extra_parts;
    let mut joints = extra_joints;
    let mut unavailable = Vec::new();
    let mut food = Vec::new();
    for need in &needs {
        parts += need.parts;
        joints += need.joints;
        if let Amount::BeadM(b) = need.amount {
            seal_m += b;
        }
        let Some(item) = lib.get(&need.item) else {
            problems.push(issue(
                design_file,
                need.field.clone(),
                format!(
                    "item \"{}\" (for the {}) is not in the materials library {}",
                    need.item,
                    need.part,
                    library_file.display()
                ),
            ));
            continue;
        };
        let mut sheet_plan = None;
        let mut sheet_all = None;
        if !need.sheets.is_empty() && item.stock.iter().any(|s| s.width_m.is_some()) {
            let nested =
                cutlist::nest_sheets_least_stock(&need.sheets, &item.stock).and_then(|p| {
                    let all = if units > 1 {
                        nest_installation_sheets(&need.sheets, &item.stock, units)?
                    } else {
                        (p.sheets.len(), p.stock_m2)
                    };
                    Ok((p, all))
                });
            match nested {
                Ok((p, all)) => {
                    sheet_plan = Some(p);
                    sheet_all = Some(all);
                }
                Err(e) => problems.push(issue(
                    library_file,
                    item_path(lib, &item.id),
                    format!(
                        "item \"{}\": the {} ({:.3} × {:.3} m) fits no stock size",
                        item.id, e.label, e.size_m.0, e.size_m.1
                    ),
                )),
            }
        }
        let bar_plan = if need.bars.is_empty() {
            None
        } else {
            cutlist::nest_bars(&need.bars, &item.stock)
        };
        let bar_all = match &bar_plan {
            Some(_) if units > 1 => nest_installation_bars(&need.bars, &item.stock, units),
            Some(b) => Some((b.bars.len(), b.stock_m)),
            None => None,
        };
        if let Some(b) = &bar_plan {
            joints += b.joins;
        }
        let conv = convert(
            item,
            need.amount,
            c,
            sheet_plan.as_ref().map(|p| p.stock_m2),
            sheet_plan.as_ref().map(|p| p.sheets.len()),
            bar_plan.as_ref().map(|p| p.stock_m),
        )
        .and_then(|one| {
            let all = convert(
                item,
                need.amount.scaled(n),
                c,
                sheet_all.map(|a| a.1),
                sheet_all.map(|a| a.0),
                bar_all.map(|a| a.1),
            )?;
            Ok((one, all.0))
        });
        let ((quantity, mut conversion), installation_quantity) = match conv {
            Ok(q) => q,
            Err(why) => {
                problems.push(issue(
                    library_file,
                    format!("{}.unit", item_path(lib, &item.id)),
                    format!(
                        "unit mismatch: item \"{}\" (for the {}, chosen by {}) {why}",
                        item.id, need.part, need.field
                    ),
                ));
                continue;
            }
        };
        let import = if item.local {
            0.0
        } else {
            item.import_cost.unwrap_or(0.0)
        };
        let unit_price = item.unit_price + import;
        if !item.local {
            unavailable.push(Unavailable {
                item: item.id.clone(),
                part: need.part.clone(),
                lead_time_days: item.lead_time_days,
                import_extra: import * quantity,
            });
        }
        if need.contact != Contact::Dry && !item.food_grade {
            food.push(FoodSafetyFlag {
                item: item.id.clone(),
                part: need.part.clone(),
                contact: need.contact,
                reason: item
                    .taint
                    .clone()
                    .unwrap_or_else(|| "not marked food_grade in the library".into()),
            });
        }
        if units > 1 {
            conversion = format!(
                "{conversion}; the installation's {units} units nested together buy {} {}",
                fmt_quantity(installation_quantity),
                unit_name(item.unit)
            );
        }
        let nest = match (&sheet_plan, sheet_all, &bar_plan, bar_all) {
            (Some(p), Some((pieces, stock)), _, _) => Some(InstallationNest {
                units,
                pieces,
                parts: p.parts_m2 * n,
                stock,
                waste: stock - p.parts_m2 * n,
                per_unit_stock: p.stock_m2 * n,
            }),
            (None, _, Some(b), Some((pieces, stock))) => Some(InstallationNest {
                units,
                pieces,
                parts: b.pieces_m * n,
                stock,
                waste: stock - b.pieces_m * n,
                per_unit_stock: b.stock_m * n,
            }),
            _ => None,
        };
        if let Some(installation) = nest {
            cuts.push(CutEntry {
                part: need.part.clone(),
                item: item.id.clone(),
                sheets: sheet_plan,
                bars: bar_plan,
                installation,
            });
        }
        lines.push(BomLine {
            part: need.part.clone(),
            item: item.id.clone(),
            item_name: item.name.clone(),
            field: need.field.clone(),
            role: item.role,
            formula: need.formula.clone(),
            amount: need.amount,
            conversion,
            quantity,
            installation_quantity,
            unit: unit_name(item.unit),
            unit_price,
            cost: quantity * unit_price,
            unit_share_cost: installation_quantity * unit_price / n,
            local: item.local,
            lifetime_years: item.lifetime_years,
            contact: need.contact,
        });
    }
    if !problems.is_empty() {
        return Err(problems);
    }
    let shaded_m2 = splits.iter().map(|s| s.split.shaded_m2).sum();
    Ok(Bom {
        units,
        lines,
        cuts,
        splits,
        shaded_m2,
        seal_m,
        parts,
        joints,
        unavailable,
        food_safety: food,
    })
}
