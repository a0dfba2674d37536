//! A dimensioned workshop drawing of one variant, as hand-written SVG drawn in millimetres from
//! the variant's design fields: a side section (x front to back, z up) and a plan view with
//! the distillate trough's fall, plus an enlarged stack detail for a multi-effect still.
//!
//! The SVG is self-contained: one `<svg>` element with a `<title>`, an inline `<style>` using
//! the generic `sans-serif` family (no font files), `<line>`, `<path>`, `<rect>` and `<text>`
//! only, no scripts, every text escaped, and no blank lines (so it can sit inside a Markdown
//! HTML block). One SVG user unit is one millimetre of the still.

use std::fmt::Write as _;
use std::io::{self, Write};

use serde::Serialize;

use crate::design::{BasinKind, Layer, Library, Sink, Variant, VariantKind};
use crate::economics::complexity::TROUGH_SLOPE;

/// General tolerances that apply where the drawing states none (workshop figures, common
/// practice, no source; the length steps are close to ISO 2768 class c, from memory).
pub const GENERAL_TOLERANCE: &str = "General tolerances where none is stated: lengths ±2 mm up \
     to 1000 mm, ±3 mm up to 2000 mm, ±4 mm beyond; angles ±0.5° (workshop figures, common \
     practice, no source; the length steps are close to ISO 2768 class c, from memory).";

/// Depth of the fins under the last plate of an air-cooled multi-effect still, as drawn [mm]
/// (common practice, no source: the ≈ 50 mm assumed by the sink's default coefficient).
pub const FIN_DEPTH_MM: f64 = 50.0;

/// Plate thickness drawn when the library gives none [mm] (common practice, no source).
pub const DEFAULT_PLATE_MM: f64 = 1.0;

/// One marked dimension.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Dimension {
    /// What is measured ("cover tilt", "front wall").
    pub name: String,
    /// The value, in `unit`.
    pub value: f64,
    /// `mm` or `deg`.
    pub unit: &'static str,
    /// The label as printed on the drawing.
    pub label: String,
    /// Whether the still fails without it (cover angle, trough fall, basin level).
    pub critical: bool,
}

/// A finished drawing.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Drawing {
    /// The SVG element id (see [`drawing_id`]); every style rule is scoped to it.
    pub id: String,
    /// The drawing's title (also the SVG `<title>`).
    pub title: String,
    /// The whole SVG document.
    pub svg: String,
    /// Every dimension marked on it.
    pub dimensions: Vec<Dimension>,
    /// Fall of the distillate trough over its length [mm].
    pub trough_fall_mm: f64,
    /// The general-tolerance note printed on it.
    pub general_tolerance: String,
}

/// Escape text for SVG/XML content and attribute values; line breaks become spaces (a
/// drawing's labels are one line each).
pub fn escape_xml(s: &str) -> String {
    crate::output::escape_markup(&s.replace(['\n', '\r'], " "))
}

/// Where a view's origin sits in SVG coordinates (model z points up, SVG y down).
#[derive(Clone, Copy)]
struct View {
    ox: f64,
    oy: f64,
}

impl View {
    fn at(self, p: (f64, f64)) -> (f64, f64) {
        (self.ox + p.0, self.oy - p.1)
    }
}

#[derive(Clone, Copy, PartialEq)]
enum Anchor {
    Start,
    Middle,
    End,
}

/// The SVG being written, with its running bounds.
struct Sheet {
    body: String,
    fs: f64,
    min: (f64, f64),
    max: (f64, f64),
    dims: Vec<Dimension>,
}

impl Sheet {
    fn new(extent_mm: f64) -> Self {
        // Text about 1/45 of the drawing's size, never below 4 mm of still.
        let fs = (extent_mm / 45.0).max(4.0);
        Sheet {
            body: String::new(),
            fs,
            min: (f64::INFINITY, f64::INFINITY),
            max: (f64::NEG_INFINITY, f64::NEG_INFINITY),
            dims: Vec::new(),
        }
    }

    fn grow(&mut self, p: (f64, f64)) {
        self.min = (self.min.0.min(p.0), self.min.1.min(p.1));
        self.max = (self.max.0.max(p.0), self.max.1.max(p.1));
    }

    fn line(&mut self, v: View, class: &str, a: (f64, f64), b: (f64, f64)) {
        let (a, b) = (v.at(a), v.at(b));
        self.grow(a);
        self.grow(b);
        let _ = writeln!(
            self.body,
            r#"<line class="{class}" x1="{:.2}" y1="{:.2}" x2="{:.2}" y2="{:.2}"/>"#,
            a.0, a.1, b.0, b.1
        );
    }

    fn poly(&mut self, v: View, class: &str, pts: &[(f64, f64)], close: bool) {
        let mut d = String::new();
        for (i, p) in pts.iter().enumerate() {
            let q = v.at(*p);
            self.grow(q);
            let _ = write!(
                d,
                "{}{:.2},{:.2} ",
                if i == 0 { "M" } else { "L" },
                q.0,
                q.1
            );
        }
        if close {
            d.push('Z');
        }
        let _ = writeln!(self.body, r#"<path class="{class}" d="{}"/>"#, d.trim_end());
    }

    /// The "Side section" heading, at height `y_mm` under the section's origin.
    fn side_section_heading(&mut self, v: View, y_mm: f64) {
        self.text(v, (0.0, y_mm), Anchor::Start, "head", "Side section");
    }

    fn text(&mut self, v: View, p: (f64, f64), anchor: Anchor, class: &str, s: &str) {
        let q = v.at(p);
        let w = s.chars().count() as f64 * 0.55 * self.fs;
        let (x0, x1) = match anchor {
            Anchor::Start => (q.0, q.0 + w),
            Anchor::Middle => (q.0 - w / 2.0, q.0 + w / 2.0),
            Anchor::End => (q.0 - w, q.0),
        };
        self.grow((x0, q.1 - self.fs));
        self.grow((x1, q.1 + 0.3 * self.fs));
        let a = match anchor {
            Anchor::Start => "start",
            Anchor::Middle => "middle",
            Anchor::End => "end",
        };
        let _ = writeln!(
            self.body,
            r#"<text class="{class}" x="{:.2}" y="{:.2}" text-anchor="{a}">{}</text>"#,
            q.0,
            q.1,
            escape_xml(s)
        );
    }

    fn record(&mut self, name: &str, value: f64, unit: &'static str, label: &str, critical: bool) {
        self.dims.push(Dimension {
            name: name.to_owned(),
            value,
            unit,
            label: label.to_owned(),
            critical,
        });
    }

    /// A horizontal dimension from x1 to x2 at height z, label above.
    fn dim_h(&mut self, v: View, x1: f64, x2: f64, z: f64, name: &str, value_mm: f64) {
        let label = format!("{value_mm:.0}");
        let t = self.fs * 0.4;
        self.line(v, "dim", (x1, z), (x2, z));
        for x in [x1, x2] {
            self.line(v, "dim", (x - t, z - t), (x + t, z + t));
        }
        self.text(
            v,
            ((x1 + x2) / 2.0, z + self.fs * 0.3),
            Anchor::Middle,
            "dim",
            &label,
        );
        self.record(name, value_mm, "mm", &label, false);
    }

    /// A vertical dimension from z1 to z2 at x, label beside it.
    #[allow(clippy::too_many_arguments)]
    fn dim_v(
        &mut self,
        v: View,
        x: f64,
        z1: f64,
        z2: f64,
        left: bool,
        name: &str,
        label: String,
        value_mm: f64,
    ) {
        let t = self.fs * 0.4;
        self.line(v, "dim", (x, z1), (x, z2));
        for z in [z1, z2] {
            self.line(v, "dim", (x - t, z - t), (x + t, z + t));
        }
        let (dx, anchor) = if left {
            (-self.fs * 0.4, Anchor::End)
        } else {
            (self.fs * 0.4, Anchor::Start)
        };
        self.text(
            v,
            (x + dx, (z1 + z2) / 2.0 - self.fs * 0.35),
            anchor,
            "dim",
            &label,
        );
        self.record(name, value_mm, "mm", &label, false);
    }

    /// An angle arc at `c` from `a_deg` to `b_deg` (counter-clockwise in the model, degrees
    /// from +x), radius `r`, with a horizontal reference line and a label.
    #[allow(clippy::too_many_arguments)]
    fn angle(
        &mut self,
        v: View,
        c: (f64, f64),
        a_deg: f64,
        b_deg: f64,
        r: f64,
        name: &str,
        value_deg: f64,
    ) {
        let pa = (
            c.0 + r * a_deg.to_radians().cos(),
            c.1 + r * a_deg.to_radians().sin(),
        );
        let pb = (
            c.0 + r * b_deg.to_radians().cos(),
            c.1 + r * b_deg.to_radians().sin(),
        );
        // Reference: the horizontal the tilt is measured from.
        let reference = if a_deg.abs() < 90.0 {
            (c.0 + 1.2 * r, c.1)
        } else {
            (c.0 - 1.2 * r, c.1)
        };
        self.line(v, "ref", c, reference);
        let (qa, qb) = (v.at(pa), v.at(pb));
        self.grow(qa);
        self.grow(qb);
        let _ = writeln!(
            self.body,
            r#"<path class="dim" d="M{:.2},{:.2} A{r:.2},{r:.2} 0 0 0 {:.2},{:.2}"/>"#,
            qa.0, qa.1, qb.0, qb.1
        );
        let mid = ((a_deg + b_deg) / 2.0).to_radians();
        let lp = (c.0 + 1.25 * r * mid.cos(), c.1 + 1.25 * r * mid.sin());
        let label = format!("{name} {value_deg:.1}°");
        let anchor = if mid.cos() >= 0.0 {
            Anchor::Start
        } else {
            Anchor::End
        };
        self.text(v, lp, anchor, "crit", &label);
        self.record(name, value_deg, "deg", &label, true);
    }

    /// The SVG document. Every style rule is scoped to the element id `id`, so the drawing
    /// can sit inline in an HTML page beside other SVGs (charts) without restyling them.
    fn finish(self, title: &str, id: &str) -> String {
        let m = self.fs * 1.5;
        let (x0, y0) = (self.min.0 - m, self.min.1 - m);
        let (w, h) = (
            self.max.0 - self.min.0 + 2.0 * m,
            self.max.1 - self.min.1 + 2.0 * m,
        );
        let sw = self.fs / 9.0;
        let fs = self.fs;
        // About 800 px wide on screen, whatever the still's size.
        let px_w = 800.0;
        let px_h = px_w * h / w.max(1e-9);
        let mut s = String::new();
        let _ = writeln!(
            s,
            r#"<svg xmlns="http://www.w3.org/2000/svg" id="{id}" viewBox="{x0:.2} {y0:.2} {w:.2} {h:.2}" width="{px_w:.0}" height="{px_h:.0}" role="img">"#
        );
        let _ = writeln!(s, "<title>{}</title>", escape_xml(title));
        let rules = [
            format!("line,path{{stroke:#1b1b1b;stroke-width:{sw:.3};fill:none}}"),
            format!(".cover{{stroke:#1f5fa8;stroke-width:{:.3}}}", sw * 2.5),
            format!(
                ".brine{{stroke:#2a8ab8;stroke-dasharray:{:.2} {:.2}}}",
                fs * 0.6,
                fs * 0.4
            ),
            ".insulation{fill:#e8e2c8;stroke:#8a8060}".to_owned(),
            ".basin{fill:#9a9a9a}".to_owned(),
            format!(".trough{{stroke:#b0401a;stroke-width:{:.3}}}", sw * 3.0),
            format!(
                ".ref{{stroke:#888;stroke-dasharray:{:.2} {:.2}}}",
                fs * 0.3,
                fs * 0.3
            ),
            ".dim{stroke:#555}".to_owned(),
            format!("text{{font-family:sans-serif;font-size:{fs:.2}px;fill:#1b1b1b;stroke:none}}"),
            "text.crit{fill:#b0401a;font-weight:bold}".to_owned(),
            format!("text.head{{font-size:{:.2}px;font-weight:bold}}", fs * 1.2),
        ];
        s.push_str("<style>");
        for (i, r) in rules.iter().enumerate() {
            if i > 0 {
                s.push(' ');
            }
            // Scope every selector of the rule ("a,b{…}" → "#id a,#id b{…}").
            let (sel, body) = r.split_once('{').unwrap_or((r.as_str(), "}"));
            let scoped: Vec<String> = sel.split(',').map(|x| format!("#{id} {x}")).collect();
            s.push_str(&scoped.join(","));
            s.push('{');
            s.push_str(body);
        }
        s.push_str("</style>\n");
        s.push_str(&self.body);
        s.push_str("</svg>\n");
        s
    }
}

/// The SVG element id of a variant's drawing: `sb-drawing-` and the name in lower case with
/// every other character than a-z and 0-9 turned into `-`.
pub fn drawing_id(variant_name: &str) -> String {
    let slug: String = variant_name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    format!("sb-drawing-{slug}")
}

fn layers_mm(layers: &[Layer]) -> f64 {
    layers.iter().map(|l| l.thickness_mm.max(0.0)).sum()
}

/// Draw variant `v`. `lib` gives the plate thickness of a multi-effect still (a default is
/// drawn when it has none).
pub fn drawing(v: &Variant, lib: &Library) -> Drawing {
    let w = v.width_m * 1000.0;
    let l = v.length_m * 1000.0;
    let tilt = v.cover_tilt_deg();
    let title = format!(
        "Workshop drawing: {} ({}), millimetres",
        v.name,
        v.kind.name()
    );
    // The plan is drawn at most 1.5 section widths long (smaller scale for long stills).
    let plan_scale = (1.5 * w / l.max(1.0)).min(1.0);
    let extent = (w + l * plan_scale).max(600.0) / 1.6;
    let mut s = Sheet::new(extent);
    let fs = s.fs;
    let sec = View { ox: 0.0, oy: 0.0 };
    let troughs: u32 = match &v.kind {
        VariantKind::DoubleSlope(_) => 2,
        _ => 1,
    };
    match &v.kind {
        VariantKind::SingleSlope(k) => {
            let hf = k.front_wall_mm;
            let hb = k.back_wall_mm(v.width_m);
            let floor = k
                .basin_thickness_mm
                .unwrap_or_else(|| k.basin.default_thickness_mm());
            let ins = layers_mm(&k.base_insulation);
            basin_section(&mut s, sec, w, floor, ins, k.basin, k.brine_depth_mm);
            single_cover_walls(&mut s, sec, w, hf, hb, 0.0, tilt);
            s.dim_h(sec, 0.0, w, -(floor + ins) - 2.5 * fs, "width", w);
            s.side_section_heading(sec, -(floor + ins) - 5.0 * fs);
        }
        VariantKind::DoubleSlope(k) => {
            let hs = k.side_wall_mm;
            let hr = k.ridge_mm(v.width_m);
            let floor = k
                .basin_thickness_mm
                .unwrap_or_else(|| k.basin.default_thickness_mm());
            let ins = layers_mm(&k.base_insulation);
            basin_section(&mut s, sec, w, floor, ins, k.basin, k.brine_depth_mm);
            s.line(sec, "wall", (0.0, 0.0), (0.0, hs));
            s.line(sec, "wall", (w, 0.0), (w, hs));
            s.line(sec, "cover", (0.0, hs), (w / 2.0, hr));
            s.line(sec, "cover", (w, hs), (w / 2.0, hr));
            trough_mark(&mut s, sec, (0.0, hs), 1.0);
            trough_mark(&mut s, sec, (w, hs), -1.0);
            s.angle(sec, (0.0, hs), 0.0, tilt, w * 0.12, "cover tilt", tilt);
            s.angle(sec, (w, hs), 180.0 - tilt, 180.0, w * 0.12, "tilt", tilt);
            s.dim_v(
                sec,
                -2.0 * fs,
                0.0,
                hs,
                true,
                "side wall",
                format!("{hs:.0}"),
                hs,
            );
            s.dim_v(
                sec,
                w / 2.0,
                hs + 0.5 * fs,
                hr,
                false,
                "ridge",
                format!("ridge {hr:.0}"),
                hr,
            );
            s.dim_h(sec, 0.0, w, -(floor + ins) - 2.5 * fs, "width", w);
            s.side_section_heading(sec, -(floor + ins) - 5.0 * fs);
        }
        VariantKind::Wick(k) => {
            let (sin, cos) = tilt.to_radians().sin_cos();
            let rise = w * tilt.to_radians().tan();
            let g = k.gap_mm;
            let n = (-sin * g, cos * g);
            let ins = layers_mm(&k.backing_insulation);
            if ins > 0.0 {
                let m = (sin * ins, -cos * ins);
                s.poly(
                    sec,
                    "insulation",
                    &[(0.0, 0.0), (w, rise), (w + m.0, rise + m.1), (m.0, m.1)],
                    true,
                );
            }
            s.line(sec, "wick", (0.0, 0.0), (w, rise));
            s.line(sec, "cover", (n.0, n.1), (w + n.0, rise + n.1));
            s.line(sec, "wall", (w, 0.0), (w, rise));
            s.line(sec, "ref", (0.0, 0.0), (w, 0.0));
            trough_mark(&mut s, sec, (0.0, 0.0), 1.0);
            s.text(
                sec,
                (w, rise + n.1 + fs),
                Anchor::End,
                "note",
                "feed channel at the top",
            );
            s.text(
                sec,
                (w * 0.5, rise * 0.5 - 1.5 * fs),
                Anchor::Start,
                "note",
                "wick cloth on backing",
            );
            s.angle(sec, (n.0, n.1), 0.0, tilt, w * 0.25, "cover tilt", tilt);
            let mid = (w * 0.75, rise * 0.75);
            s.line(sec, "dim", mid, (mid.0 + n.0, mid.1 + n.1));
            let label = format!("gap {g:.0}");
            s.text(
                sec,
                (mid.0 + n.0 + 0.5 * fs, mid.1 + n.1 + 0.5 * fs),
                Anchor::Start,
                "dim",
                &label,
            );
            s.record("wick to cover gap", g, "mm", &label, false);
            s.dim_v(
                sec,
                w + 2.0 * fs,
                0.0,
                rise,
                false,
                "rear leg",
                format!("{rise:.0}"),
                rise,
            );
            s.dim_h(sec, 0.0, w, -ins - 2.5 * fs, "width in plan", w);
            s.side_section_heading(sec, -ins - 5.0 * fs);
        }
        VariantKind::Stepped(k) => {
            let n = k.trays.max(1);
            let t = k.tread_m(v.width_m) * 1000.0;
            let r = k.riser_mm;
            let d = k.tray_depth_mm;
            let hf = k.front_wall_mm;
            let hb = k.back_wall_mm(v.width_m);
            let ins = layers_mm(&k.base_insulation);
            if ins > 0.0 {
                s.poly(
                    sec,
                    "insulation",
                    &[(0.0, 0.0), (w, 0.0), (w, -ins), (0.0, -ins)],
                    true,
                );
            }
            let mut profile = vec![(0.0, d), (0.0, 0.0)];
            for i in 1..=n {
                let zf = f64::from(i - 1) * r;
                profile.push((f64::from(i) * t, zf));
                let top = if i < n { f64::from(i) * r } else { zf + d };
                profile.push((f64::from(i) * t, top));
            }
            s.poly(sec, "tray", &profile, false);
            for i in 1..=n {
                let z = f64::from(i - 1) * r + d;
                s.line(
                    sec,
                    "brine",
                    (f64::from(i - 1) * t, z),
                    (f64::from(i) * t, z),
                );
            }
            let last_floor = f64::from(n - 1) * r;
            single_cover_walls(&mut s, sec, w, hf, hb, last_floor, tilt);
            if n > 1 {
                s.dim_v(
                    sec,
                    t + 0.6 * fs,
                    0.0,
                    r,
                    false,
                    "riser",
                    format!("riser {r:.0}"),
                    r,
                );
            }
            let (clear, at) = k.min_clearance_mm(v.width_m);
            let label = format!(
                "{n} trays, tread {t:.0}, tray depth {d:.0}; least clearance under the cover \
                 {clear:.0} at tray {at}"
            );
            s.text(sec, (0.0, -ins - 5.0 * fs), Anchor::Start, "note", &label);
            s.record("tread", t, "mm", &format!("tread {t:.0}"), false);
            s.record("tray depth", d, "mm", &format!("tray depth {d:.0}"), false);
            s.record(
                "least clearance under the cover",
                clear,
                "mm",
                &format!("{clear:.0}"),
                false,
            );
            s.dim_h(sec, 0.0, w, -ins - 2.5 * fs, "width", w);
            s.side_section_heading(sec, -ins - 7.0 * fs);
        }
        VariantKind::MultiEffect(k) => {
            multi_effect(&mut s, sec, k, lib, w, tilt);
        }
    }

    // Plan view, to the right of the section: length across, width up, trough along the
    // front (low) edge falling toward the outlet end.
    let fall = TROUGH_SLOPE * l;
    let plan = View {
        ox: s.max.0 + 4.0 * fs,
        oy: sec.oy,
    };
    let pw = w * plan_scale;
    let pl = l * plan_scale;
    s.poly(
        plan,
        "wall",
        &[(0.0, 0.0), (pl, 0.0), (pl, pw), (0.0, pw)],
        true,
    );
    let fall_label = format!(
        "trough fall {fall:.0} over {l:.0} (1 in {:.0}) toward the outlet",
        1.0 / TROUGH_SLOPE
    );
    s.line(plan, "trough", (0.0, 0.5 * fs), (pl, 0.5 * fs));
    if troughs == 2 {
        s.line(plan, "trough", (0.0, pw - 0.5 * fs), (pl, pw - 0.5 * fs));
    }
    // Arrow toward the outlet (at x = length).
    s.poly(
        plan,
        "trough",
        &[
            (pl - 1.5 * fs, 1.5 * fs),
            (pl, 0.5 * fs),
            (pl - 1.5 * fs, -0.5 * fs),
        ],
        false,
    );
    s.text(
        plan,
        (pl / 2.0, 1.5 * fs),
        Anchor::Middle,
        "crit",
        &fall_label,
    );
    s.text(plan, (pl, -1.5 * fs), Anchor::End, "note", "outlet");
    s.record("trough fall", fall, "mm", &fall_label, true);
    s.dim_h(plan, 0.0, pl, -3.5 * fs, "length", l);
    let level = if matches!(v.kind, VariantKind::Stepped(_)) {
        "each tray level within 1 mm along its length"
    } else if matches!(
        v.kind,
        VariantKind::SingleSlope(_) | VariantKind::DoubleSlope(_)
    ) {
        "basin floor level within 2 mm over its length and width"
    } else {
        "frame square; cover plane true within 2 mm"
    };
    s.text(plan, (0.0, pw + 1.0 * fs), Anchor::Start, "crit", level);
    s.record(
        "level",
        if matches!(v.kind, VariantKind::Stepped(_)) {
            1.0
        } else {
            2.0
        },
        "mm",
        level,
        true,
    );
    let plan_head = if plan_scale < 1.0 {
        format!(
            "Plan (from above), drawn at {:.2} of the section's scale",
            plan_scale
        )
    } else {
        "Plan (from above)".to_owned()
    };
    s.text(
        plan,
        (0.0, pw + 2.5 * fs),
        Anchor::Start,
        "head",
        &plan_head,
    );
    // The general note under everything, split into two lines.
    let bottom = sec.oy - s.max.1;
    let (first, second) = GENERAL_TOLERANCE
        .split_once("; angles")
        .map_or((GENERAL_TOLERANCE.to_owned(), String::new()), |(a, b)| {
            (format!("{a};"), format!("angles{b}"))
        });
    s.text(sec, (0.0, bottom - 1.5 * fs), Anchor::Start, "note", &first);
    s.text(
        sec,
        (0.0, bottom - 2.7 * fs),
        Anchor::Start,
        "note",
        &second,
    );
    let top = s.max_z_model(sec);
    s.text(sec, (0.0, top + 1.5 * fs), Anchor::Start, "head", &title);
    let dimensions = s.dims.clone();
    let id = drawing_id(&v.name);
    let svg = s.finish(&title, &id);
    Drawing {
        id,
        title,
        svg,
        dimensions,
        trough_fall_mm: fall,
        general_tolerance: GENERAL_TOLERANCE.to_owned(),
    }
}

impl Sheet {
    /// The highest model z drawn so far in view `v`.
    fn max_z_model(&self, v: View) -> f64 {
        if self.min.1.is_finite() {
            v.oy - self.min.1
        } else {
            0.0
        }
    }
}

/// Floor, insulation, brine and the level mark of a basin, drawn in the section.
fn basin_section(
    s: &mut Sheet,
    v: View,
    w: f64,
    floor: f64,
    ins: f64,
    basin: BasinKind,
    brine: f64,
) {
    s.poly(
        v,
        "basin",
        &[(0.0, 0.0), (w, 0.0), (w, -floor), (0.0, -floor)],
        true,
    );
    if ins > 0.0 {
        s.poly(
            v,
            "insulation",
            &[
                (0.0, -floor),
                (w, -floor),
                (w, -floor - ins),
                (0.0, -floor - ins),
            ],
            true,
        );
    }
    s.line(v, "brine", (0.0, brine), (w, brine));
    let fs = s.fs;
    let label = format!("brine {brine:.0}");
    s.text(
        v,
        (w * 0.62, brine + 0.4 * fs),
        Anchor::Start,
        "dim",
        &label,
    );
    s.record("brine depth", brine, "mm", &label, false);
    // Level mark: a small triangle on the floor.
    let x = w * 0.08;
    s.poly(
        v,
        "dim",
        &[(x - 0.5 * fs, 0.8 * fs), (x + 0.5 * fs, 0.8 * fs), (x, 0.0)],
        true,
    );
    let what = match basin {
        BasinKind::MetalTray => "tray",
        BasinKind::Masonry => "masonry floor",
    };
    s.text(
        v,
        (x + 0.8 * fs, 0.9 * fs),
        Anchor::Start,
        "crit",
        &format!("{what} level ±2"),
    );
    s.record(
        "basin floor thickness",
        floor,
        "mm",
        &format!("{floor:.0}"),
        false,
    );
}

/// The walls and the one tilted cover of a single-cover still (basin or stepped) in section:
/// front wall `hf` high from the floor, back wall from `back_floor` up to `hb`, the cover
/// between their tops with its trough and tilt mark, and both wall heights dimensioned
/// [mm of still].
fn single_cover_walls(
    s: &mut Sheet,
    sec: View,
    w: f64,
    hf: f64,
    hb: f64,
    back_floor: f64,
    tilt: f64,
) {
    let fs = s.fs;
    s.line(sec, "wall", (0.0, 0.0), (0.0, hf));
    s.line(sec, "wall", (w, back_floor), (w, hb));
    s.line(sec, "cover", (0.0, hf), (w, hb));
    trough_mark(s, sec, (0.0, hf), 1.0);
    s.angle(sec, (0.0, hf), 0.0, tilt, w * 0.25, "cover tilt", tilt);
    s.dim_v(
        sec,
        -2.0 * fs,
        0.0,
        hf,
        true,
        "front wall",
        format!("{hf:.0}"),
        hf,
    );
    s.dim_v(
        sec,
        w + 2.0 * fs,
        0.0,
        hb,
        false,
        "back wall",
        format!("{hb:.0}"),
        hb,
    );
}

/// The trough under the low edge of a cover at `p`; `dir` is +1 when the cover rises to the
/// right.
fn trough_mark(s: &mut Sheet, v: View, p: (f64, f64), dir: f64) {
    let fs = s.fs;
    let x0 = p.0;
    let x1 = p.0 + dir * 1.5 * fs;
    s.poly(
        v,
        "trough",
        &[
            (x0, p.1 - 0.3 * fs),
            (x0, p.1 - 1.3 * fs),
            (x1, p.1 - 1.3 * fs),
            (x1, p.1 - 0.6 * fs),
        ],
        false,
    );
}

/// Section of a multi-effect still: glazing, absorber, the stage plates and the sink, all
/// tilted, plus an enlarged detail of the stack with its gaps.
fn multi_effect(
    s: &mut Sheet,
    sec: View,
    k: &crate::design::MultiEffect,
    lib: &Library,
    w: f64,
    tilt: f64,
) {
    let fs = s.fs;
    let (sin, cos) = tilt.to_radians().sin_cos();
    let span = w / cos.max(1e-6);
    let plate_t = lib
        .get(&k.plate)
        .and_then(|i| i.plate.as_ref())
        .map_or(DEFAULT_PLATE_MM, |p| p.thickness_mm);
    let n = k.stages.max(1);
    let pitch = k.gap_mm + plate_t;
    let stack = k.glazing_gap_mm + f64::from(n) * pitch + plate_t;
    let fins = if k.sink == Sink::AirFins {
        FIN_DEPTH_MM
    } else {
        0.0
    };
    // Lift the whole stack so its lowest corner stands on the ground line.
    let base = (stack + fins) * cos + 2.0 * fs;
    let at = |along: f64, below: f64| -> (f64, f64) {
        (along * cos + below * sin, base + along * sin - below * cos)
    };
    s.line(sec, "ref", (-2.0 * fs, 0.0), (w + 2.0 * fs, 0.0));
    s.line(sec, "cover", at(0.0, 0.0), at(span, 0.0));
    for i in 0..=n {
        let off = k.glazing_gap_mm + f64::from(i) * pitch;
        s.line(sec, "plate", at(0.0, off), at(span, off));
    }
    let last = k.glazing_gap_mm + f64::from(n) * pitch;
    if fins > 0.0 {
        let count = 12;
        for j in 0..=count {
            let a = span * f64::from(j) / f64::from(count);
            s.line(sec, "dim", at(a, last), at(a, last + fins));
        }
    }
    // Legs to the ground.
    let front = at(0.0, stack + fins);
    let back = at(span, stack + fins);
    s.line(sec, "wall", front, (front.0, 0.0));
    s.line(sec, "wall", back, (back.0, 0.0));
    trough_mark(s, sec, at(0.0, last), 1.0);
    // Measured at the high end, in the empty wedge above the glazing.
    let g1 = at(span, 0.0);
    s.angle(sec, g1, 180.0, 180.0 + tilt, w * 0.3, "glazing tilt", tilt);
    s.dim_h(sec, 0.0, w, -2.5 * fs, "width in plan", w);
    s.side_section_heading(sec, -5.0 * fs);

    // Detail of the stack, enlarged so the gaps can be read.
    let scale = (w * 0.5 / stack).floor().clamp(1.0, 50.0);
    let det = View {
        ox: sec.ox,
        oy: sec.oy + 9.0 * fs,
    };
    let len = w * 0.5;
    let y = |below: f64| -> f64 { -below * scale };
    s.text(
        det,
        (0.0, 1.5 * fs),
        Anchor::Start,
        "head",
        &format!("Stack detail, {scale:.0} : 1"),
    );
    s.line(det, "detail-glazing", (0.0, y(0.0)), (len, y(0.0)));
    s.text(
        det,
        (len + 0.5 * fs, y(0.0) - 0.3 * fs),
        Anchor::Start,
        "note",
        "glazing",
    );
    for i in 0..=n {
        let off = k.glazing_gap_mm + f64::from(i) * pitch;
        s.line(det, "plate", (0.0, y(off)), (len, y(off)));
        let name = if i == 0 {
            "absorber (plate 1)".to_owned()
        } else if i == n {
            format!("plate {}, last: sink below", i + 1)
        } else {
            format!("plate {}", i + 1)
        };
        s.text(
            det,
            (len + 0.5 * fs, y(off) - 0.3 * fs),
            Anchor::Start,
            "note",
            &name,
        );
    }
    let label = format!("glazing gap {:.0}", k.glazing_gap_mm);
    s.line(
        det,
        "dim",
        (len * 0.2, y(0.0)),
        (len * 0.2, y(k.glazing_gap_mm)),
    );
    s.text(
        det,
        (len * 0.2 + 0.6 * fs, y(k.glazing_gap_mm * 0.5) - 0.3 * fs),
        Anchor::Start,
        "dim",
        &label,
    );
    s.record("glazing gap", k.glazing_gap_mm, "mm", &label, false);
    let top = k.glazing_gap_mm + plate_t;
    let gap_label = format!("stage gap {:.1} ± 0.5 ({} stages)", k.gap_mm, n);
    s.line(
        det,
        "dim",
        (len * 0.05, y(top)),
        (len * 0.05, y(top + k.gap_mm)),
    );
    s.text(
        det,
        (-0.5 * fs, y(top + k.gap_mm * 0.5) - 0.3 * fs),
        Anchor::End,
        "crit",
        &gap_label,
    );
    s.record("stage gap", k.gap_mm, "mm", &gap_label, true);
    s.record(
        "plate thickness",
        plate_t,
        "mm",
        &format!("plate {plate_t:.1}"),
        false,
    );
}

/// Write the drawing's SVG to `out`.
pub fn write_svg(d: &Drawing, out: &mut impl Write) -> io::Result<()> {
    out.write_all(d.svg.as_bytes())
}
