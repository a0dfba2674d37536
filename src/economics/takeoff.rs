//! Quantities from geometry: what each variant kind needs, part by part, with the formula each
//! quantity comes from. Symbols in the formulas: W width front to back, L length, θ cover
//! tilt, hf/hb front/back wall, hs side wall, hr ridge, d tray depth, n trays or stages, g gap,
//! t layer thickness. Every length here is in metres.
//!
//! The wall, frame and pipe allowances are trade rules of thumb (common practice, no source);
//! each is stated in the formula text so the fabricator sees it.

use serde::Serialize;

use super::cutlist::Part;
use crate::design::{BasinKind, Costs, Layer, Library, Sink, Variant, VariantKind};

/// Freeboard of a metal basin tray above the brine [m] (common practice, no source).
pub const TRAY_FREEBOARD_M: f64 = 0.05;
/// Wick cloth carried into the feed channel at the top [m] (common practice, no source).
pub const WICK_FEED_OVERLAP_M: f64 = 0.1;
/// Fin sheet to buy per m² of last plate for an air-cooled sink of straight fins [-]:
/// fins of height H [mm] at a pitch of clear spacing s [mm] plus thickness t [mm] are strips
/// H wide, one per pitch, so the sheet is H/(s + t) per m² of plate (0 for a plain plate).
///
/// This is one face of each strip, the area of sheet bought: the heat-transfer area that the
/// air sink's coefficient uses counts both faces and the tip, 2(H + t/2)/(s + t), about twice
/// as much (≈ 4.8 for the default 50 mm fins at 20 mm spacing, 1 mm thick; ≈ 9.2 at 10 mm).
pub fn fin_sheet_area_ratio(fin_height_mm: f64, fin_spacing_mm: f64, fin_thickness_mm: f64) -> f64 {
    let pitch_mm = fin_spacing_mm + fin_thickness_mm;
    if fin_height_mm > 0.0 && pitch_mm > 0.0 {
        fin_height_mm / pitch_mm
    } else {
        0.0
    }
}
/// Supply, distillate-outlet and drain pipe on top of the feed line [m] (common practice,
/// no source: 1 m supply, 1 m distillate outlet, 0.5 m drain).
pub const PIPE_ALLOWANCE_M: f64 = 2.5;

/// A geometric quantity, in the dimension it is measured in.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "dimension", content = "value")]
pub enum Amount {
    /// An area of sheet [m²].
    AreaM2(f64),
    /// A length of bar, pipe or trough [m].
    LengthM(f64),
    /// A volume of insulation [m³].
    VolumeM3(f64),
    /// Whole pieces.
    Count(f64),
    /// A sealant bead along joints [m].
    BeadM(f64),
    /// An area to paint, one coat [m²].
    PaintM2(f64),
}

impl Amount {
    /// The same kind of amount times `k` (the amount of `k` units).
    pub fn scaled(self, k: f64) -> Amount {
        match self {
            Amount::AreaM2(v) => Amount::AreaM2(v * k),
            Amount::LengthM(v) => Amount::LengthM(v * k),
            Amount::VolumeM3(v) => Amount::VolumeM3(v * k),
            Amount::Count(v) => Amount::Count(v * k),
            Amount::BeadM(v) => Amount::BeadM(v * k),
            Amount::PaintM2(v) => Amount::PaintM2(v * k),
        }
    }

    /// The value and its unit, for reports.
    pub fn value_unit(self) -> (f64, &'static str) {
        match self {
            Amount::AreaM2(v) => (v, "m2"),
            Amount::LengthM(v) => (v, "m"),
            Amount::VolumeM3(v) => (v, "m3"),
            Amount::Count(v) => (v, "piece"),
            Amount::BeadM(v) => (v, "m of bead"),
            Amount::PaintM2(v) => (v, "m2 painted"),
        }
    }
}

/// What a part touches in service (for the food-safety check).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Contact {
    /// Nothing that reaches the water.
    Dry,
    /// Hot brine, whose vapour becomes the distillate.
    Brine,
    /// Hot vapour.
    Vapour,
    /// The distillate itself.
    Distillate,
}

/// One need of a variant: a part, the library item it is made of and how much.
#[derive(Debug, Clone, PartialEq)]
pub struct Need {
    /// The part ("cover", "basin liner", …).
    pub part: String,
    /// Library item id.
    pub item: String,
    /// The design field that names the item (`variant[1].cover`, `costs.items.frame`).
    pub field: String,
    /// The geometry formula, as text.
    pub formula: String,
    /// The geometric quantity.
    pub amount: Amount,
    /// What the part touches.
    pub contact: Contact,
    /// Rectangles to cut from sheet stock (empty: not nested).
    pub sheets: Vec<Part>,
    /// Lengths to cut from bar stock (empty: not nested).
    pub bars: Vec<(String, f64)>,
    /// Visible parts this need makes.
    pub parts: u32,
    /// Joints it makes.
    pub joints: u32,
}

impl Need {
    fn new(
        part: &str,
        item: &str,
        field: &str,
        formula: &str,
        amount: Amount,
        contact: Contact,
    ) -> Self {
        Need {
            part: part.to_string(),
            item: item.to_string(),
            field: field.to_string(),
            formula: formula.to_string(),
            amount,
            contact,
            sheets: Vec::new(),
            bars: Vec::new(),
            parts: 1,
            joints: 0,
        }
    }
    fn sheet(mut self, label: &str, a: f64, b: f64, n: u32) -> Self {
        for k in 1..=n {
            let label = if n > 1 {
                format!("{label} {k}")
            } else {
                label.to_string()
            };
            self.sheets.push(Part {
                label,
                a_m: a,
                b_m: b,
            });
        }
        self
    }
    fn bar(mut self, label: &str, len: f64, n: u32) -> Self {
        for k in 1..=n {
            let label = if n > 1 {
                format!("{label} {k}")
            } else {
                label.to_string()
            };
            self.bars.push((label, len));
        }
        self
    }
    fn counts(mut self, parts: u32, joints: u32) -> Self {
        self.parts = parts;
        self.joints = joints;
        self
    }
}

/// A tolerance that decides whether the still works, with the value to build to.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Tolerance {
    /// What must be held ("level basin").
    pub name: String,
    /// The value, with its source.
    pub value: String,
}

/// Everything a variant needs, before prices.
#[derive(Debug, Clone, PartialEq)]
pub struct Takeoff {
    /// The needs, in build order.
    pub needs: Vec<Need>,
    /// Tolerances that matter for this kind.
    pub tolerances: Vec<Tolerance>,
}

fn mm(v: f64) -> f64 {
    v / 1000.0
}

fn insulation(
    out: &mut Vec<Need>,
    layers: &[Layer],
    field: &str,
    what: &str,
    area_m2: f64,
    area_formula: &str,
    parts: u32,
) {
    for (i, l) in layers.iter().enumerate() {
        let t = mm(l.thickness_mm);
        out.push(
            Need::new(
                &format!("{what} insulation, layer {}", i + 1),
                &l.material,
                &format!("{field}[{}].material", i + 1),
                &format!("{area_formula}·t, t = {:.0} mm", l.thickness_mm),
                Amount::VolumeM3(area_m2 * t),
                Contact::Dry,
            )
            .counts(parts, 0),
        );
    }
}

fn liner_need(
    field: &str,
    item: &str,
    lib: &Library,
    area: f64,
    formula: &str,
    blank: Option<(f64, f64, u32)>,
) -> Need {
    let is_paint = lib.get(item).is_some_and(|i| i.paint.is_some());
    if is_paint {
        Need::new(
            "basin absorber coating",
            item,
            field,
            formula,
            Amount::PaintM2(area),
            Contact::Brine,
        )
        .counts(0, 0)
    } else {
        let mut n = Need::new(
            "basin liner",
            item,
            field,
            formula,
            Amount::AreaM2(area),
            Contact::Brine,
        );
        if let Some((a, b, k)) = blank {
            n = n.sheet("liner blank", a, b, k).counts(k, 0);
        }
        n
    }
}

#[allow(clippy::too_many_arguments)]
fn plumbing(
    out: &mut Vec<Need>,
    c: &Costs,
    trough_m: f64,
    trough_formula: &str,
    troughs: u32,
    feed_m: f64,
    feed_formula: &str,
    fittings: u32,
    fittings_formula: &str,
) {
    let mut t = Need::new(
        "distillate trough",
        &c.items.trough,
        "costs.items.trough",
        trough_formula,
        Amount::LengthM(trough_m),
        Contact::Distillate,
    )
    .counts(troughs, troughs);
    for k in 1..=troughs {
        t = t.bar(&format!("trough {k}"), trough_m / f64::from(troughs), 1);
    }
    out.push(t);
    out.push(
        Need::new(
            "feed, outlet and drain pipe",
            &c.items.pipe,
            "costs.items.pipe",
            &format!("{feed_formula} + {PIPE_ALLOWANCE_M} m supply, outlet and drain"),
            Amount::LengthM(feed_m + PIPE_ALLOWANCE_M),
            Contact::Distillate,
        )
        .bar("feed line", feed_m, 1)
        .bar("supply, outlet and drain", PIPE_ALLOWANCE_M, 1)
        .counts(3, 3),
    );
    out.push(
        Need::new(
            "pipe fittings",
            &c.items.pipe_fitting,
            "costs.items.pipe_fitting",
            fittings_formula,
            Amount::Count(f64::from(fittings)),
            Contact::Distillate,
        )
        .counts(fittings, fittings),
    );
    out.push(
        Need::new(
            "collection bottle",
            &c.items.bottle,
            "costs.items.bottle",
            "1 per still",
            Amount::Count(1.0),
            Contact::Distillate,
        )
        .counts(1, 1),
    );
}

fn sealant(c: &Costs, seal_m: f64, formula: &str) -> Need {
    Need::new(
        "sealant along every joint",
        &c.items.sealant,
        "costs.items.sealant",
        formula,
        Amount::BeadM(seal_m),
        Contact::Vapour,
    )
    .counts(0, 0)
}

fn level_basin() -> Tolerance {
    Tolerance {
        name: "level basin".into(),
        value: "floor level within 2 mm over its length and width, so the shallowest brine still \
                covers it (common practice, no source)"
            .into(),
    }
}

/// The quantities of one variant. `index` is its 1-based position in the design (for field
/// paths); `lib` is consulted only to tell paint from liner and for plate thickness.
pub fn takeoff(v: &Variant, index: usize, lib: &Library, c: &Costs) -> Takeoff {
    let vf = format!("variant[{index}]");
    let w = v.width_m;
    let l = v.length_m;
    let cos = v.cover_tilt_deg().to_radians().cos();
    let tan = v.cover_tilt_deg().to_radians().tan();
    let mut out: Vec<Need> = Vec::new();
    let cover_field = format!("{vf}.cover");
    let mut tolerances = Vec::new();
    match &v.kind {
        VariantKind::SingleSlope(k) => {
            let s = w / cos;
            let hf = mm(k.front_wall_mm);
            let hb = mm(k.back_wall_mm(w));
            out.push(
                Need::new(
                    "cover",
                    &v.cover,
                    &cover_field,
                    "W·L/cos θ",
                    Amount::AreaM2(v.cover_area_m2()),
                    Contact::Distillate,
                )
                .sheet("cover pane", s, l, 1),
            );
            basin_walls(
                &mut out,
                c,
                k.basin,
                w,
                l,
                "(hf+hb)·(W+L) front, back and two sides",
                (hf + hb) * (w + l),
                &[
                    ("front wall", hf, l),
                    ("back wall", hb, l),
                    ("side wall", hb, w),
                    ("side wall", hb, w),
                ],
            );
            if k.basin == BasinKind::MetalTray {
                tray(&mut out, c, w, l, mm(k.brine_depth_mm));
            }
            out.push(liner_need(
                &format!("{vf}.liner"),
                &k.liner,
                lib,
                w * l + 2.0 * hf * (w + l),
                "W·L + 2·hf·(W+L) floor and walls up to the front-wall height",
                Some((w + 2.0 * hf, l + 2.0 * hf, 1)),
            ));
            frame(
                &mut out,
                c,
                k.basin,
                &[
                    ("cover-seat slope rail", s, 2),
                    ("cover-seat long rail", l, 2),
                ],
                &[
                    ("base rail across", w, 2),
                    ("base rail along", l, 2),
                    ("front post", hf, 2),
                    ("back post", hb, 2),
                ],
                "2·(W/cos θ + L) cover seat",
                "2·(W+L) base + 2·(hf+hb) corner posts",
            );
            insulation(
                &mut out,
                &k.base_insulation,
                &format!("{vf}.base_insulation"),
                "base",
                w * l,
                "W·L",
                1,
            );
            insulation(
                &mut out,
                &k.side_insulation,
                &format!("{vf}.side_insulation"),
                "wall",
                (hf + hb) * (w + l),
                "(hf+hb)·(W+L)",
                4,
            );
            out.push(sealant(
                c,
                2.0 * (s + l) + 2.0 * (hf + hb) + 2.0 * (w + l),
                "2·(W/cos θ + L) cover + 2·(hf+hb) corners + 2·(W+L) base",
            ));
            plumbing(
                &mut out,
                c,
                l,
                "L under the low edge",
                1,
                l,
                "L feed line",
                6,
                "2 valves (feed, drain), 2 elbows, 2 trough end caps",
            );
            tolerances.push(level_basin());
        }
        VariantKind::DoubleSlope(k) => {
            let s = (w / 2.0) / cos;
            let hs = mm(k.side_wall_mm);
            let hr = mm(k.ridge_mm(w));
            out.push(
                Need::new(
                    "cover",
                    &v.cover,
                    &cover_field,
                    "W·L/cos θ, two faces of (W/2)/cos θ × L",
                    Amount::AreaM2(v.cover_area_m2()),
                    Contact::Distillate,
                )
                .sheet("cover pane", s, l, 2)
                .counts(2, 1),
            );
            basin_walls(
                &mut out,
                c,
                k.basin,
                w,
                l,
                "2·hs·L + W·(hs+hr) two sides and two gables",
                2.0 * hs * l + w * (hs + hr),
                &[
                    ("side wall", hs, l),
                    ("side wall", hs, l),
                    ("gable", hr, w),
                    ("gable", hr, w),
                ],
            );
            if k.basin == BasinKind::MetalTray {
                tray(&mut out, c, w, l, mm(k.brine_depth_mm));
            }
            out.push(liner_need(
                &format!("{vf}.liner"),
                &k.liner,
                lib,
                w * l + 2.0 * hs * (w + l),
                "W·L + 2·hs·(W+L) floor and walls up to the eaves",
                Some((w + 2.0 * hs, l + 2.0 * hs, 1)),
            ));
            frame(
                &mut out,
                c,
                k.basin,
                &[("rafter", s, 4), ("eaves rail", l, 2), ("ridge", l, 1)],
                &[
                    ("base rail across", w, 2),
                    ("base rail along", l, 2),
                    ("post", hs, 4),
                ],
                "3·L eaves and ridge + 4·(W/2)/cos θ rafters",
                "2·(W+L) base + 4·hs posts",
            );
            insulation(
                &mut out,
                &k.base_insulation,
                &format!("{vf}.base_insulation"),
                "base",
                w * l,
                "W·L",
                1,
            );
            insulation(
                &mut out,
                &k.side_insulation,
                &format!("{vf}.side_insulation"),
                "wall",
                2.0 * hs * l + w * (hs + hr),
                "(2·hs·L + W·(hs+hr))",
                4,
            );
            out.push(sealant(
                c,
                3.0 * l + 4.0 * s + 2.0 * (w + l) + 4.0 * hs,
                "3·L eaves and ridge + 4·(W/2)/cos θ gable rakes + 2·(W+L) base + 4·hs corners",
            ));
            plumbing(
                &mut out,
                c,
                2.0 * l,
                "2·L, one trough under each eave",
                2,
                l,
                "L feed line",
                8,
                "2 valves (feed, drain), 1 tee, 1 elbow, 4 trough end caps",
            );
            tolerances.push(level_basin());
        }
        VariantKind::Wick(k) => {
            let s = w / cos;
            let g = mm(k.gap_mm);
            let h = w * tan;
            out.push(
                Need::new(
                    "cover",
                    &v.cover,
                    &cover_field,
                    "W·L/cos θ",
                    Amount::AreaM2(v.cover_area_m2()),
                    Contact::Distillate,
                )
                .sheet("cover pane", s, l, 1),
            );
            out.push(
                Need::new(
                    "wick backing plate",
                    &c.items.tray,
                    "costs.items.tray",
                    "(W/cos θ)·L backing under the wick",
                    Amount::AreaM2(s * l),
                    Contact::Dry,
                )
                .sheet("backing plate", s, l, 1),
            );
            out.push(
                Need::new("wick cloth", &k.cloth, &format!("{vf}.cloth"),
                    &format!("(W/cos θ + {WICK_FEED_OVERLAP_M} m)·L, the slope plus the end in the feed channel"),
                    Amount::AreaM2((s + WICK_FEED_OVERLAP_M) * l), Contact::Brine)
                    .sheet("wick", s + WICK_FEED_OVERLAP_M, l, 1),
            );
            out.push(
                Need::new(
                    "edge walls",
                    &c.items.wall_panel,
                    "costs.items.wall_panel",
                    "2·g·(W/cos θ + L) edge strips between backing and cover",
                    Amount::AreaM2(2.0 * g * (s + l)),
                    Contact::Dry,
                )
                .sheet("edge strip, slope", s, g, 2)
                .sheet("edge strip, long", l, g, 2)
                .counts(4, 4),
            );
            out.push(
                Need::new(
                    "frame and stand",
                    &c.items.frame,
                    "costs.items.frame",
                    "2·(W/cos θ + L) perimeter + 2·W·tan θ rear legs",
                    Amount::LengthM(2.0 * (s + l) + 2.0 * h),
                    Contact::Dry,
                )
                .bar("slope rail", s, 2)
                .bar("long rail", l, 2)
                .bar("rear leg", h, 2)
                .counts(6, 6),
            );
            insulation(
                &mut out,
                &k.backing_insulation,
                &format!("{vf}.backing_insulation"),
                "backing",
                s * l,
                "(W/cos θ)·L",
                1,
            );
            out.push(sealant(
                c,
                4.0 * (s + l) + 4.0 * g,
                "2·(W/cos θ + L) cover + 2·(W/cos θ + L) backing + 4·g corners",
            ));
            plumbing(
                &mut out,
                c,
                2.0 * l,
                "2·L, distillate trough and brine outlet",
                2,
                l,
                "L perforated feed pipe",
                6,
                "feed valve, 2 end caps, 2 elbows, drain",
            );
            tolerances.push(Tolerance {
                name: "uniform wick wetting".into(),
                value: "feed holes at equal spacing, flow along the wick within ±10 % and no dry \
                        patches at noon (common practice, no source)"
                    .into(),
            });
        }
        VariantKind::Stepped(k) => {
            let s = w / cos;
            let n = k.trays;
            let fnn = f64::from(n);
            let t = k.tread_m(w);
            let d = mm(k.tray_depth_mm);
            let hf = mm(k.front_wall_mm);
            let hb = mm(k.back_wall_mm(w));
            out.push(
                Need::new(
                    "cover",
                    &v.cover,
                    &cover_field,
                    "W·L/cos θ",
                    Amount::AreaM2(v.cover_area_m2()),
                    Contact::Distillate,
                )
                .sheet("cover pane", s, l, 1),
            );
            basin_walls(
                &mut out,
                c,
                BasinKind::MetalTray,
                w,
                l,
                "(hf+hb)·(W+L) front, back and two sides",
                (hf + hb) * (w + l),
                &[
                    ("front wall", hf, l),
                    ("back wall", hb, l),
                    ("side wall", hb, w),
                    ("side wall", hb, w),
                ],
            );
            out.push(
                Need::new(
                    "trays",
                    &c.items.tray,
                    "costs.items.tray",
                    "n·(W/n + 2·d)·(L + 2·d) tray blanks",
                    Amount::AreaM2(fnn * (t + 2.0 * d) * (l + 2.0 * d)),
                    Contact::Dry,
                )
                .sheet("tray", t + 2.0 * d, l + 2.0 * d, n)
                .counts(n, 4 * n),
            );
            let blank = Some((t + 2.0 * d, l + 2.0 * d, n));
            out.push(liner_need(
                &format!("{vf}.liner"),
                &k.liner,
                lib,
                w * l + 2.0 * d * (w + fnn * l),
                "W·L + 2·d·(W + n·L) tray floors and rims",
                blank,
            ));
            frame(
                &mut out,
                c,
                BasinKind::MetalTray,
                &[
                    ("cover-seat slope rail", s, 2),
                    ("cover-seat long rail", l, 2),
                ],
                &[
                    ("base rail across", w, 2),
                    ("base rail along", l, 2),
                    ("front post", hf, 2),
                    ("back post", hb, 2),
                    ("tray support", l, n),
                ],
                "2·(W/cos θ + L) cover seat",
                "2·(W+L) base + 2·(hf+hb) posts + n·L tray supports",
            );
            insulation(
                &mut out,
                &k.base_insulation,
                &format!("{vf}.base_insulation"),
                "base",
                w * l,
                "W·L",
                1,
            );
            insulation(
                &mut out,
                &k.side_insulation,
                &format!("{vf}.side_insulation"),
                "wall",
                (hf + hb) * (w + l),
                "(hf+hb)·(W+L)",
                4,
            );
            out.push(sealant(
                c,
                2.0 * (s + l) + 2.0 * (hf + hb) + 2.0 * (w + l) + (fnn - 1.0) * l,
                "2·(W/cos θ + L) cover + 2·(hf+hb) corners + 2·(W+L) base + (n−1)·L tray laps",
            ));
            plumbing(
                &mut out,
                c,
                l,
                "L under the low edge",
                1,
                l,
                "L feed line to the top tray",
                6,
                "2 valves (feed, overflow), 2 elbows, 2 trough end caps",
            );
            tolerances.push(Tolerance {
                name: "level trays".into(),
                value: "each tray level within 1 mm along its length, so its thin brine layer \
                        covers the whole floor (common practice, no source)"
                    .into(),
            });
        }
        VariantKind::MultiEffect(k) => {
            let s = w / cos;
            let n = k.stages;
            let fnn = f64::from(n);
            let g = mm(k.gap_mm);
            let plate_t = lib
                .get(&k.plate)
                .and_then(|i| i.plate)
                .map_or(0.001, |p| mm(p.thickness_mm));
            let glazing_gap_m = mm(k.glazing_gap_mm);
            let depth = fnn * g + (fnn + 1.0) * plate_t + glazing_gap_m;
            out.push(
                Need::new(
                    "glazing",
                    &v.cover,
                    &cover_field,
                    "W·L/cos θ",
                    Amount::AreaM2(v.cover_area_m2()),
                    Contact::Dry,
                )
                .sheet("glazing pane", s, l, 1),
            );
            out.push(
                Need::new(
                    "stage plates",
                    &k.plate,
                    &format!("{vf}.plate"),
                    "(n+1)·(W/cos θ)·L absorber plate and one condensing plate per stage",
                    Amount::AreaM2((fnn + 1.0) * s * l),
                    Contact::Distillate,
                )
                .sheet("plate", s, l, n + 1)
                .counts(n + 1, 0),
            );
            let absorber = liner_need(
                &format!("{vf}.absorber"),
                &k.absorber,
                lib,
                s * l,
                "(W/cos θ)·L sun side of the first plate",
                None,
            );
            out.push(Need {
                part: "absorber coating".into(),
                contact: Contact::Dry,
                ..absorber
            });
            out.push(
                Need::new(
                    "stage wicks",
                    &k.wick_cloth,
                    &format!("{vf}.wick_cloth"),
                    "n·(W/cos θ)·L one wick per stage",
                    Amount::AreaM2(fnn * s * l),
                    Contact::Brine,
                )
                .sheet("stage wick", s, l, n)
                .counts(n, 0),
            );
            out.push(
                Need::new(
                    "stage spacers",
                    &c.items.spacer,
                    "costs.items.spacer",
                    "2·n·(W/cos θ + L) a spacer frame in every gap",
                    Amount::LengthM(2.0 * fnn * (s + l)),
                    Contact::Vapour,
                )
                .bar("spacer, slope", s, 2 * n)
                .bar("spacer, long", l, 2 * n)
                .counts(4 * n, 4 * n),
            );
            out.push(
                Need::new(
                    "casing",
                    &c.items.wall_panel,
                    "costs.items.wall_panel",
                    &format!(
                        "2·D·(W/cos θ + L), D = n·g + (n+1)·plate + {:.0} mm glazing gap",
                        k.glazing_gap_mm
                    ),
                    Amount::AreaM2(2.0 * depth * (s + l)),
                    Contact::Dry,
                )
                .sheet("casing side, slope", s, depth, 2)
                .sheet("casing side, long", l, depth, 2)
                .counts(4, 4),
            );
            insulation(
                &mut out,
                &k.side_insulation,
                &format!("{vf}.side_insulation"),
                "edge",
                2.0 * depth * (s + l),
                "2·D·(W/cos θ + L)",
                4,
            );
            let fin_ratio =
                fin_sheet_area_ratio(k.fin_height_mm, k.fin_spacing_mm, k.fin_thickness_mm);
            if k.sink == Sink::AirFins && fin_ratio > 0.0 {
                out.push(
                    Need::new(
                        "sink fins",
                        &c.items.fin,
                        "costs.items.fin",
                        &format!(
                            "H/(s + t)·(W/cos θ)·L = {fin_ratio:.2} m² of sheet per m² of \
                             plate ({:.0} mm fins at {:.0} mm spacing, {:.1} mm thick, running \
                             up the slope)",
                            k.fin_height_mm, k.fin_spacing_mm, k.fin_thickness_mm
                        ),
                        Amount::AreaM2(fin_ratio * s * l),
                        Contact::Dry,
                    )
                    .counts(1, 1),
                );
            }
            out.push(
                Need::new(
                    "frame and stand",
                    &c.items.frame,
                    "costs.items.frame",
                    "2·(W/cos θ + L) perimeter + 2·W·tan θ rear legs",
                    Amount::LengthM(2.0 * (s + l) + 2.0 * w * tan),
                    Contact::Dry,
                )
                .bar("slope rail", s, 2)
                .bar("long rail", l, 2)
                .bar("rear leg", w * tan, 2)
                .counts(6, 6),
            );
            out.push(sealant(
                c,
                2.0 * (s + l) * (1.0 + 2.0 * fnn),
                "2·(W/cos θ + L)·(1 + 2·n) glazing + both faces of every spacer frame",
            ));
            plumbing(
                &mut out,
                c,
                fnn * l,
                "n·L one condensate channel per stage",
                n,
                0.5 * fnn,
                "0.5 m feed line per stage",
                2 * n + 2,
                "a feed and an outlet fitting per stage, supply valve, drain",
            );
            tolerances.push(Tolerance {
                name: "uniform stage gaps".into(),
                value: format!("every gap {:.1} mm ± 0.5 mm over the whole plate; a plate that bows \
                               to touch its wick short-circuits the stage (common practice, no source)", k.gap_mm),
            });
            tolerances.push(Tolerance {
                name: "uniform wick wetting".into(),
                value: "feed within ±10 % across each stage's wick (common practice, no source)"
                    .into(),
            });
        }
    }
    Takeoff {
        needs: out,
        tolerances,
    }
}

#[allow(clippy::too_many_arguments)]
fn basin_walls(
    out: &mut Vec<Need>,
    c: &Costs,
    basin: BasinKind,
    w: f64,
    l: f64,
    formula: &str,
    wall_m2: f64,
    panels: &[(&str, f64, f64)],
) {
    match basin {
        BasinKind::MetalTray => {
            let mut n = Need::new(
                "walls",
                &c.items.wall_panel,
                "costs.items.wall_panel",
                formula,
                Amount::AreaM2(wall_m2),
                Contact::Dry,
            )
            .counts(panels.len() as u32, panels.len() as u32);
            for (label, a, b) in panels {
                n = n.sheet(label, *a, *b, 1);
            }
            out.push(n);
        }
        BasinKind::Masonry => out.push(
            Need::new(
                "masonry floor and walls",
                &c.items.masonry,
                "costs.items.masonry",
                &format!("W·L + {formula}"),
                Amount::AreaM2(w * l + wall_m2),
                Contact::Dry,
            )
            .counts(5, 4),
        ),
    }
}

fn tray(out: &mut Vec<Need>, c: &Costs, w: f64, l: f64, brine_m: f64) {
    let d = brine_m + TRAY_FREEBOARD_M;
    out.push(
        Need::new(
            "basin tray",
            &c.items.tray,
            "costs.items.tray",
            &format!(
                "(W+2·D)·(L+2·D) tray blank, D = brine depth + {:.0} mm freeboard",
                TRAY_FREEBOARD_M * 1000.0
            ),
            Amount::AreaM2((w + 2.0 * d) * (l + 2.0 * d)),
            Contact::Dry,
        )
        .sheet("tray blank", w + 2.0 * d, l + 2.0 * d, 1)
        .counts(1, 4),
    );
}

#[allow(clippy::too_many_arguments)]
fn frame(
    out: &mut Vec<Need>,
    c: &Costs,
    basin: BasinKind,
    top: &[(&str, f64, u32)],
    lower: &[(&str, f64, u32)],
    top_formula: &str,
    lower_formula: &str,
) {
    let members: Vec<&(&str, f64, u32)> = match basin {
        BasinKind::MetalTray => top.iter().chain(lower.iter()).collect(),
        BasinKind::Masonry => top.iter().collect(),
    };
    let formula = match basin {
        BasinKind::MetalTray => format!("{top_formula} + {lower_formula}"),
        BasinKind::Masonry => format!("{top_formula} (the masonry carries the rest)"),
    };
    let total: f64 = members.iter().map(|(_, len, k)| len * f64::from(*k)).sum();
    let count: u32 = members.iter().map(|(_, _, k)| k).sum();
    let mut n = Need::new(
        "frame",
        &c.items.frame,
        "costs.items.frame",
        &formula,
        Amount::LengthM(total),
        Contact::Dry,
    )
    .counts(count, count);
    for (label, len, k) in members {
        n = n.bar(label, *len, *k);
    }
    out.push(n);
}

#[cfg(test)]
mod tests {
    use super::fin_sheet_area_ratio;

    #[test]
    fn fin_sheet_is_one_face_per_pitch() {
        // Hand geometry (common practice, no source): 50 mm strips at 10 + 1 mm pitch are
        // 50/11 = 4.545 m² of sheet per m² of plate; tolerance is round-off only.
        assert!((fin_sheet_area_ratio(50.0, 10.0, 1.0) - 50.0 / 11.0).abs() < 1e-12);
        // Both faces and the tip, 2·(50 + 0.5)/11 = 9.18, the heat-transfer area of the same
        // fins (the ≈ 9.2 quoted for the defaults), is a little over twice the sheet.
        let wetted = 2.0 * (50.0 + 0.5) / 11.0;
        assert!((wetted / fin_sheet_area_ratio(50.0, 10.0, 1.0) - 2.02).abs() < 1e-9);
        // A plain plate buys no fin sheet.
        assert!(fin_sheet_area_ratio(0.0, 10.0, 1.0).abs() < 1e-15);
    }
}
