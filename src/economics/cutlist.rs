//! Cut list: nesting rectangular parts onto stock sheets and lengths onto stock bars.
//!
//! Sheets use *first-fit decreasing shelf packing* (a guillotine method: every cut runs
//! straight across a sheet or a shelf, as a glass cutter or a saw works). A shelf is a strip
//! across the sheet as high as its first part; it is cut into stacks side by side, and a
//! stack holds parts one above the other up to the shelf's height (three guillotine stages:
//! shelf, stack, part). Parts are taken longest side first; each is put on top of the first
//! stack where it fits (either way round), else in a new stack of the first shelf with width
//! left, else on a new shelf of the first sheet with room, else on a new sheet of the smallest
//! stock size that holds it ([`nest_sheets_least_stock`] also tries each sheet size alone and
//! keeps the plan that buys the least area). Bars use *first-fit decreasing* on one dimension. No part is ever placed
//! on a stock piece smaller than itself: a part that fits no stock is an error, and the caller
//! splits it first ([`split_pane`]).

use serde::Serialize;

use crate::design::Stock;

/// Name of the sheet method, for reports.
pub const SHEET_METHOD: &str = "first-fit decreasing shelf (guillotine) packing with stacks in \
     each shelf, rotation allowed, on mixed sizes or one size, whichever buys less area";
/// Name of the bar method, for reports.
pub const BAR_METHOD: &str = "first-fit decreasing on length";

/// Tolerance on fits [m]: a part may be this much larger than the space and still fit
/// (rounding in the geometry, far below a saw kerf).
const FIT_TOL_M: f64 = 1e-9;

/// A rectangular part to cut.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Part {
    /// What it is ("cover pane 1").
    pub label: String,
    /// One side [m].
    pub a_m: f64,
    /// The other side [m].
    pub b_m: f64,
}

/// Where a part sits on a sheet.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Placement {
    /// The part.
    pub label: String,
    /// Offset across the sheet width [m].
    pub x_m: f64,
    /// Offset along the sheet length [m].
    pub y_m: f64,
    /// Size across the width [m].
    pub across_m: f64,
    /// Size along the length [m].
    pub along_m: f64,
}

/// One stock sheet (or a length of roll) and what is cut from it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SheetUse {
    /// Stock width [m].
    pub width_m: f64,
    /// Stock length bought [m] (for a roll, the length used).
    pub length_m: f64,
    /// Whether this is a length off a roll.
    pub roll: bool,
    /// The parts on it.
    pub placements: Vec<Placement>,
}

impl SheetUse {
    /// Area bought [m²].
    pub fn area_m2(&self) -> f64 {
        self.width_m * self.length_m
    }
}

/// The nesting of one item's parts.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SheetPlan {
    /// Sheets used, in opening order.
    pub sheets: Vec<SheetUse>,
    /// Area of the parts [m²].
    pub parts_m2: f64,
    /// Area bought [m²].
    pub stock_m2: f64,
    /// Offcut waste: bought minus parts [m²].
    pub waste_m2: f64,
}

impl SheetPlan {
    /// Waste as a fraction of the area bought [-].
    pub fn waste_fraction(&self) -> f64 {
        if self.stock_m2 > 0.0 {
            self.waste_m2 / self.stock_m2
        } else {
            0.0
        }
    }
}

/// A part that fits no stock size.
#[derive(Debug, Clone, PartialEq)]
pub struct TooLarge {
    /// The part.
    pub label: String,
    /// Its sides [m].
    pub size_m: (f64, f64),
}

struct Shelf {
    y_m: f64,
    height_m: f64,
    used_m: f64,
    stacks: Vec<Stack>,
}

/// A column of a shelf: parts one above the other, no wider than its first part.
struct Stack {
    x_m: f64,
    width_m: f64,
    used_m: f64,
}

struct OpenSheet {
    width_m: f64,
    length_m: f64,
    roll: bool,
    shelves: Vec<Shelf>,
    placements: Vec<Placement>,
}

impl OpenSheet {
    fn top_m(&self) -> f64 {
        self.shelves.last().map_or(0.0, |s| s.y_m + s.height_m)
    }

    /// Try to place a part of sides (a, b), either way round. Returns true when placed.
    fn place(&mut self, label: &str, a: f64, b: f64) -> bool {
        // On top of a stack of an open shelf.
        for s in &mut self.shelves {
            for k in &mut s.stacks {
                for (across, along) in [(a, b), (b, a)] {
                    if across <= k.width_m + FIT_TOL_M && k.used_m + along <= s.height_m + FIT_TOL_M
                    {
                        self.placements.push(Placement {
                            label: label.to_string(),
                            x_m: k.x_m,
                            y_m: s.y_m + k.used_m,
                            across_m: across,
                            along_m: along,
                        });
                        k.used_m += along;
                        return true;
                    }
                }
            }
        }
        // A new stack in the width left on an open shelf.
        for (across, along) in [(a, b), (b, a)] {
            for s in &mut self.shelves {
                if along <= s.height_m + FIT_TOL_M && s.used_m + across <= self.width_m + FIT_TOL_M
                {
                    self.placements.push(Placement {
                        label: label.to_string(),
                        x_m: s.used_m,
                        y_m: s.y_m,
                        across_m: across,
                        along_m: along,
                    });
                    s.stacks.push(Stack {
                        x_m: s.used_m,
                        width_m: across,
                        used_m: along,
                    });
                    s.used_m += across;
                    return true;
                }
            }
        }
        // New shelf: the orientation with the lower shelf height that fits the width.
        let top = self.top_m();
        let mut options = [(a, b), (b, a)];
        options.sort_by(|x, y| x.1.total_cmp(&y.1));
        for (across, along) in options {
            if across <= self.width_m + FIT_TOL_M && top + along <= self.length_m + FIT_TOL_M {
                self.shelves.push(Shelf {
                    y_m: top,
                    height_m: along,
                    used_m: across,
                    stacks: vec![Stack {
                        x_m: 0.0,
                        width_m: across,
                        used_m: along,
                    }],
                });
                self.placements.push(Placement {
                    label: label.to_string(),
                    x_m: 0.0,
                    y_m: top,
                    across_m: across,
                    along_m: along,
                });
                return true;
            }
        }
        false
    }
}

/// Whether a part of sides (a, b) fits a stock sheet, either way round.
pub fn fits(a_m: f64, b_m: f64, stock: &Stock) -> bool {
    let Some(w) = stock.width_m else {
        return false;
    };
    let l = stock.length_m;
    (a_m <= w + FIT_TOL_M && b_m <= l + FIT_TOL_M) || (b_m <= w + FIT_TOL_M && a_m <= l + FIT_TOL_M)
}

/// Nest rectangular `parts` onto the sheet sizes in `stocks` (bars among them are ignored).
///
/// Errors with the first part that fits no sheet size.
pub fn nest_sheets(parts: &[Part], stocks: &[Stock]) -> Result<SheetPlan, TooLarge> {
    let mut order: Vec<&Part> = parts.iter().collect();
    order.sort_by(|x, y| {
        let kx = x.a_m.max(x.b_m);
        let ky = y.a_m.max(y.b_m);
        ky.total_cmp(&kx)
    });
    let mut sheets: Vec<OpenSheet> = Vec::new();
    for p in order {
        if sheets.iter_mut().any(|s| s.place(&p.label, p.a_m, p.b_m)) {
            continue;
        }
        let best = stocks
            .iter()
            .filter(|s| fits(p.a_m, p.b_m, s))
            .min_by(|x, y| {
                let ax = x.width_m.unwrap_or(0.0) * x.length_m;
                let ay = y.width_m.unwrap_or(0.0) * y.length_m;
                ax.total_cmp(&ay)
            });
        let Some(stock) = best else {
            return Err(TooLarge {
                label: p.label.clone(),
                size_m: (p.a_m, p.b_m),
            });
        };
        let mut sheet = OpenSheet {
            width_m: stock.width_m.unwrap_or(0.0),
            length_m: stock.length_m,
            roll: stock.roll,
            shelves: Vec::new(),
            placements: Vec::new(),
        };
        if !sheet.place(&p.label, p.a_m, p.b_m) {
            // `fits` said yes, so this cannot happen; report it rather than loop.
            return Err(TooLarge {
                label: p.label.clone(),
                size_m: (p.a_m, p.b_m),
            });
        }
        sheets.push(sheet);
    }
    let used: Vec<SheetUse> = sheets
        .into_iter()
        .map(|s| {
            // A roll is cut off at the end of its last shelf.
            let length_m = if s.roll { s.top_m() } else { s.length_m };
            SheetUse {
                width_m: s.width_m,
                length_m,
                roll: s.roll,
                placements: s.placements,
            }
        })
        .collect();
    let parts_m2: f64 = parts.iter().map(|p| p.a_m * p.b_m).sum();
    let stock_m2: f64 = used.iter().map(SheetUse::area_m2).sum();
    Ok(SheetPlan {
        sheets: used,
        parts_m2,
        stock_m2,
        waste_m2: stock_m2 - parts_m2,
    })
}

/// Nest `parts` as [`nest_sheets`] does, and also onto each sheet size alone; keep the plan
/// that buys the least stock area (the first of equals, so the mixed-size plan wins ties).
///
/// The mixed-size rule opens each new sheet of the smallest size that holds the part, which
/// is right for a few parts but can buy small sheets where a larger one holds several parts
/// for less area (three 0.52 × 1.0 m panes on one 1.2 × 1.8 m sheet rather than one each on
/// 0.9 × 1.2 m sheets). Errors as [`nest_sheets`] with every size offered.
pub fn nest_sheets_least_stock(parts: &[Part], stocks: &[Stock]) -> Result<SheetPlan, TooLarge> {
    let mut best = nest_sheets(parts, stocks)?;
    let sheet_sizes: Vec<&Stock> = stocks.iter().filter(|s| s.width_m.is_some()).collect();
    if sheet_sizes.len() > 1 {
        for s in sheet_sizes {
            if let Ok(p) = nest_sheets(parts, std::slice::from_ref(s))
                && p.stock_m2 < best.stock_m2 - FIT_TOL_M
            {
                best = p;
            }
        }
    }
    Ok(best)
}

/// One stock bar and the lengths cut from it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BarUse {
    /// Stock length [m].
    pub length_m: f64,
    /// Pieces cut (label, length [m]).
    pub cuts: Vec<(String, f64)>,
}

/// The nesting of one item's lengths.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BarPlan {
    /// Bars used.
    pub bars: Vec<BarUse>,
    /// Length of the pieces [m].
    pub pieces_m: f64,
    /// Length bought [m].
    pub stock_m: f64,
    /// Offcut waste [m].
    pub waste_m: f64,
    /// Pieces longer than the longest bar, which are made of several bars joined end to end
    /// (each join is a joint in the build).
    pub joins: u32,
}

/// Nest `pieces` (label, length [m]) onto the bar lengths in `stocks` (sheets are ignored).
///
/// A piece longer than the longest bar is cut into equal pieces that each fit it, joined end
/// to end; the joins are counted. Returns `None` when `stocks` has no bar length.
pub fn nest_bars(pieces: &[(String, f64)], stocks: &[Stock]) -> Option<BarPlan> {
    let mut lengths: Vec<f64> = stocks
        .iter()
        .filter(|s| s.width_m.is_none())
        .map(|s| s.length_m)
        .collect();
    lengths.sort_by(f64::total_cmp);
    let longest = *lengths.last()?;
    let mut joins = 0;
    let mut all: Vec<(String, f64)> = Vec::new();
    for (label, len) in pieces {
        if *len > longest + FIT_TOL_M {
            let n = (len / longest).ceil();
            joins += n as u32 - 1;
            for k in 0..n as u32 {
                all.push((format!("{label} ({}/{})", k + 1, n), len / n));
            }
        } else {
            all.push((label.clone(), *len));
        }
    }
    all.sort_by(|x, y| y.1.total_cmp(&x.1));
    let mut bars: Vec<BarUse> = Vec::new();
    for (label, len) in all {
        let used = |b: &BarUse| b.cuts.iter().map(|c| c.1).sum::<f64>();
        if let Some(b) = bars
            .iter_mut()
            .find(|b| used(b) + len <= b.length_m + FIT_TOL_M)
        {
            b.cuts.push((label, len));
            continue;
        }
        let stock = lengths
            .iter()
            .copied()
            .find(|l| len <= l + FIT_TOL_M)
            .unwrap_or(longest);
        bars.push(BarUse {
            length_m: stock,
            cuts: vec![(label, len)],
        });
    }
    let pieces_m: f64 = pieces.iter().map(|p| p.1).sum();
    let stock_m: f64 = bars.iter().map(|b| b.length_m).sum();
    Some(BarPlan {
        bars,
        pieces_m,
        stock_m,
        waste_m: stock_m - pieces_m,
        joins,
    })
}

/// How an oversized pane is split with glazing bars.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Split {
    /// Panes across the first side (`a`).
    pub across_a: u32,
    /// Panes across the second side (`b`).
    pub across_b: u32,
    /// Each pane [m] (sides along `a` and `b`).
    pub pane_m: (f64, f64),
    /// Glazing bars' total length [m].
    pub bar_m: f64,
    /// Area the bars shade [m²]: bar length × bar width.
    pub shaded_m2: f64,
}

/// Split a pane of sides `a_m` × `b_m` into the fewest equal panes that fit a stock sheet,
/// with glazing bars `bar_m` wide between them. Bars are preferred across `b` (they then run
/// along `a`, down the slope, so condensate and rain drain along them).
///
/// Returns `None` when no split up to 20 × 20 fits any sheet.
pub fn split_pane(a_m: f64, b_m: f64, stocks: &[Stock], bar_m: f64) -> Option<Split> {
    let mut best: Option<Split> = None;
    for total in 1..=400u32 {
        for na in 1..=total.min(20) {
            if total % na != 0 {
                continue;
            }
            let nb = total / na;
            if nb > 20 {
                continue;
            }
            let fa = f64::from(na);
            let fb = f64::from(nb);
            let pa = (a_m - (fa - 1.0) * bar_m) / fa;
            let pb = (b_m - (fb - 1.0) * bar_m) / fb;
            if pa <= 0.0 || pb <= 0.0 {
                continue;
            }
            if stocks.iter().any(|s| fits(pa, pb, s)) {
                let bars = (fa - 1.0) * b_m + (fb - 1.0) * a_m;
                let cand = Split {
                    across_a: na,
                    across_b: nb,
                    pane_m: (pa, pb),
                    bar_m: bars,
                    shaded_m2: bars * bar_m,
                };
                // Among equal counts, the first found has the fewest splits across `a`.
                if best.is_none() {
                    best = Some(cand);
                }
            }
        }
        if best.is_some() {
            return best;
        }
    }
    None
}
