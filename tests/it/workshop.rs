//! The workshop sheet, its drawing, the alternatives and risk tables, and the two new optional
//! design tables (`[[alternative]]`, `[[risk]]`).
//!
//! Sources of the check values: the geometry rules stated in the design schema (back wall =
//! front + W·tan θ, ridge = side wall + W/2·tan θ, tread = W/trays), the trough fall of
//! 1 in 100 (`economics::complexity::TROUGH_SLOPE`, common practice, no source) and the
//! hold-point rules in `economics::complexity` (all common practice, no source). Hand
//! arithmetic is shown beside each number.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use stillbench::compare::{self, Evaluation};
use stillbench::design::{self, Level, LoadedDesign, RiskOrigin};
use stillbench::economics::complexity;
use stillbench::stills::{self, RunOptions};
use stillbench::workshop::{self, drawing};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The demo design with every variant evaluated once (about a second), shared by the tests.
fn demo() -> &'static (LoadedDesign, Vec<Evaluation>) {
    static DEMO: OnceLock<(LoadedDesign, Vec<Evaluation>)> = OnceLock::new();
    DEMO.get_or_init(|| {
        let loaded = design::load_demo().unwrap();
        let weather = stills::site_weather(&loaded).unwrap();
        let evals = (0..loaded.design.variants.len())
            .map(|i| {
                compare::evaluate_variant(&loaded, i, &weather, &RunOptions::default()).unwrap()
            })
            .collect();
        (loaded, evals)
    })
}

fn highland() -> LoadedDesign {
    design::load_design(&root().join("designs/demo-highland-south.toml")).unwrap()
}

/// Every `<line class="cover">` of an SVG, as its tilt from the horizontal [deg].
fn cover_tilts_deg(svg: &str) -> Vec<f64> {
    let doc = roxmltree::Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| n.has_tag_name("line") && n.attribute("class") == Some("cover"))
        .map(|n| {
            let f = |a: &str| n.attribute(a).unwrap().parse::<f64>().unwrap();
            let dx = (f("x2") - f("x1")).abs();
            let dy = (f("y2") - f("y1")).abs();
            dy.atan2(dx).to_degrees()
        })
        .collect()
}

/// Every text of an SVG, joined by newlines.
fn texts(svg: &str) -> String {
    let doc = roxmltree::Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text())
        .collect::<Vec<_>>()
        .join("\n")
}

#[test]
fn every_kind_draws_a_well_formed_svg_at_the_design_tilt() {
    let (demo, _) = demo();
    let high = highland();
    let mut kinds_seen = std::collections::BTreeSet::new();
    for loaded in [demo, &high] {
        for v in &loaded.design.variants {
            let d = drawing::drawing(v, &loaded.library);
            // Well formed: roxmltree parses it, the root is <svg> with a viewBox and a title.
            let doc = roxmltree::Document::parse(&d.svg)
                .unwrap_or_else(|e| panic!("{}: {e}\n{}", v.name, d.svg));
            let svg = doc.root_element();
            assert!(svg.has_tag_name("svg"));
            assert!(svg.attribute("viewBox").is_some());
            let title = svg
                .children()
                .find(|n| n.has_tag_name("title"))
                .and_then(|n| n.text())
                .unwrap();
            assert!(title.contains(&v.name), "{title}");
            assert!(!d.svg.contains("<script"), "{}", v.name);
            // Styles are scoped to the drawing's id, so an HTML page's other SVGs (charts)
            // keep their own look.
            assert_eq!(svg.attribute("id"), Some(d.id.as_str()));
            let style = svg
                .children()
                .find(|n| n.has_tag_name("style"))
                .and_then(|n| n.text())
                .unwrap();
            for rule in style.split('}').map(str::trim).filter(|r| !r.is_empty()) {
                let selectors = rule.split('{').next().unwrap();
                for sel in selectors.split(',') {
                    assert!(
                        sel.trim().starts_with(&format!("#{} ", d.id)),
                        "{}: unscoped selector {sel:?}",
                        v.name
                    );
                }
            }
            assert!(!d.svg.contains("@font-face") && !d.svg.contains("url("));
            // No blank line: the SVG must sit inside one Markdown HTML block.
            assert!(!d.svg.contains("\n\n"), "{}", v.name);
            // The drawn cover equals the design's tilt within 0.1° (coordinates are written to
            // 0.01 mm, a few thousandths of a degree over a 500 mm cover).
            let tilts = cover_tilts_deg(&d.svg);
            let expected = if v.kind.name() == "double-slope" {
                2
            } else {
                1
            };
            assert_eq!(tilts.len(), expected, "{}", v.name);
            for t in tilts {
                assert!(
                    (t - v.cover_tilt_deg()).abs() < 0.1,
                    "{}: drawn {t}°, design {}°",
                    v.name,
                    v.cover_tilt_deg()
                );
            }
            // The labels carry the tilt, and the critical dimensions are all marked.
            let text = texts(&d.svg);
            assert!(
                text.contains(&format!("{:.1}°", v.cover_tilt_deg())),
                "{}: {text}",
                v.name
            );
            assert!(text.contains("trough fall"), "{}", v.name);
            assert!(text.contains("General tolerances"), "{}", v.name);
            let crit: Vec<&str> = d
                .dimensions
                .iter()
                .filter(|x| x.critical)
                .map(|x| x.name.as_str())
                .collect();
            assert!(crit.contains(&"trough fall"), "{crit:?}");
            assert!(crit.contains(&"level"), "{crit:?}");
            assert!(
                crit.iter().any(|c| c.ends_with("tilt")),
                "{}: {crit:?}",
                v.name
            );
            kinds_seen.insert(v.kind.name());
        }
    }
    assert_eq!(kinds_seen.len(), design::KIND_NAMES.len());
}

#[test]
fn drawing_labels_carry_the_design_numbers() {
    let (loaded, _) = demo();
    let by_name = |n: &str| {
        let v = loaded.design.variants.iter().find(|v| v.name == n).unwrap();
        texts(&drawing::drawing(v, &loaded.library).svg)
    };
    // glass-basin: W 1000, L 2000, front 100, tilt 15°, brine 20 mm.
    let t = by_name("glass-basin");
    for want in [
        "cover tilt 15.0°",
        "brine 20",
        "\n100\n",  // front wall
        "\n368\n",  // back wall: 100 + 1000·tan 15° = 100 + 267.9 = 367.9
        "\n1000\n", // width
        "\n2000\n", // length, plan
        // 1 in 100 over 2000 mm = 20 mm.
        "trough fall 20 over 2000 (1 in 100) toward the outlet",
        "tray level ±2",
    ] {
        assert!(t.contains(want), "glass-basin lacks {want:?}:\n{t}");
    }
    // twin-roof: W 1400, side wall 150, tilt 20°: ridge 150 + 700·tan 20° = 150 + 254.8 = 404.8.
    let t = by_name("twin-roof");
    assert!(t.contains("ridge 405"), "{t}");
    assert!(t.contains("masonry floor level ±2"), "{t}");
    assert!(t.contains("trough fall 30 over 3000"), "{t}");
    // jute-wick: gap 40 mm; rear leg 900·tan 20° = 327.6.
    let t = by_name("jute-wick");
    assert!(t.contains("gap 40"), "{t}");
    assert!(t.contains("\n328\n"), "{t}");
    // tray-steps: 8 trays over 1000 mm → tread 125; riser 30; depth 10.
    let t = by_name("tray-steps");
    assert!(t.contains("8 trays, tread 125, tray depth 10"), "{t}");
    assert!(t.contains("riser 30"), "{t}");
    // four-stage: 4 stages at 4 mm, glazing tilt 15°.
    let t = by_name("four-stage");
    assert!(t.contains("stage gap 4.0 ± 0.5 (4 stages)"), "{t}");
    assert!(t.contains("glazing tilt 15.0°"), "{t}");
    assert!(t.contains("glazing gap 20"), "{t}");
}

#[test]
fn drawing_text_is_escaped() {
    let (loaded, _) = demo();
    let mut v = loaded.design.variants[0].clone();
    // Not a valid design name (validation forbids it); the drawing must cope anyway.
    v.name = "a<b>&\"c\"".into();
    let d = drawing::drawing(&v, &loaded.library);
    assert_eq!(d.id, "sb-drawing-a-b---c-");
    assert!(d.svg.contains("a&lt;b&gt;&amp;&quot;c&quot;"), "{}", d.svg);
    roxmltree::Document::parse(&d.svg).unwrap();
    let mut out = Vec::new();
    drawing::write_svg(&d, &mut out).unwrap();
    assert_eq!(out, d.svg.as_bytes());
}

#[test]
fn sheet_reuses_the_costing_and_adds_hold_points() {
    let (loaded, evals) = demo();
    let e = &evals[0];
    let s = workshop::workshop_sheet(loaded, 0, e).unwrap();
    assert_eq!(s.variant, "glass-basin");
    // Bill of materials: the costing's lines, not a second take-off.
    assert_eq!(s.bom, e.cost.bom.lines);
    assert!((s.materials_cost - e.cost.bom.materials_cost()).abs() < 1e-9);
    // Cut list: one row per nested piece of the costing's plan.
    let pieces: usize = e
        .cost
        .bom
        .cuts
        .iter()
        .map(|c| {
            c.sheets.as_ref().map_or(0, |p| {
                p.sheets.iter().map(|s| s.placements.len()).sum::<usize>()
            }) + c
                .bars
                .as_ref()
                .map_or(0, |p| p.bars.iter().map(|b| b.cuts.len()).sum::<usize>())
        })
        .sum();
    assert!(pieces > 0);
    assert_eq!(s.cut_list.len(), pieces);
    // Steps: the same texts as the costing's, with holds attached.
    let texts: Vec<&str> = s.steps.iter().map(|x| x.text.as_str()).collect();
    let cost_texts: Vec<&str> = e.cost.steps.iter().map(String::as_str).collect();
    assert_eq!(texts, cost_texts);
    let holds: Vec<(String, f64)> = s
        .steps
        .iter()
        .flat_map(|x| x.holds.iter().map(|h| (h.what.clone(), h.wait_h)))
        .collect();
    // Sealant: a 36 mm² bead is 6 mm deep; at 2 mm a day → 3 days = 72 h (common practice,
    // no source). Leak test 24 h; first 2 days of distillate discarded = 48 h.
    assert!(
        holds.contains(&("sealant cured through".into(), 72.0)),
        "{holds:?}"
    );
    assert!(
        holds.contains(&("leak test holds".into(), 24.0)),
        "{holds:?}"
    );
    assert!(
        holds.contains(&("first 2 days of distillate discarded".into(), 48.0)),
        "{holds:?}"
    );
    // An EPDM liner, a metal tray: no paint or masonry hold.
    assert!(
        !holds
            .iter()
            .any(|(w, _)| w.starts_with("paint") || w.starts_with("mortar"))
    );
    assert!((s.total_hold_h - (72.0 + 24.0 + 48.0)).abs() < 1e-9);
    // Tools and skills from the library's fields (the costing's list).
    assert_eq!(s.tools, e.cost.complexity.tools);
    assert!(s.tools.iter().any(|t| t == "spirit level"));
    // Commissioning reuses the costing's clear-day test and its expected range.
    assert_eq!(s.commissioning.test, e.cost.commissioning);
    assert!(s.commissioning.test.expected_litres.is_some());
    assert!(s.commissioning.steps[1].contains(&e.cost.commissioning.text));
    assert_eq!(s.commissioning.discard_days, 2);
    // Checklist: the fields asked for, targets from the design.
    let heads: Vec<&str> = s
        .checklist
        .columns
        .iter()
        .map(|c| c.heading.as_str())
        .collect();
    for h in [
        "unit number",
        "date",
        "materials (supplier, batch)",
        "leak test",
        "levelling",
        "trough slope",
    ] {
        assert!(heads.contains(&h), "{heads:?}");
    }
    let slope = &s.checklist.columns[5];
    assert_eq!(slope.target, "fall ≥ 20 mm over 2000 mm");
}

#[test]
fn masonry_and_paint_add_their_cure_and_dry_holds() {
    let (loaded, evals) = demo();
    // twin-roof: masonry basin, black paint, 2 coats (the [costs] default).
    let s = workshop::workshop_sheet(loaded, 1, &evals[1]).unwrap();
    let holds: Vec<(String, f64)> = s
        .steps
        .iter()
        .flat_map(|x| x.holds.iter().map(|h| (h.what.clone(), h.wait_h)))
        .collect();
    // Masonry: 7 days moist curing = 168 h (common practice, no source).
    assert!(
        holds.contains(&("mortar and concrete cure, kept damp".into(), 168.0)),
        "{holds:?}"
    );
    // Paint: 24 h between 2 coats + 72 h after the last = 96 h (common practice, no source).
    assert!(
        holds.contains(&("paint dry: 2 coat(s)".into(), 96.0)),
        "{holds:?}"
    );
}

#[test]
fn sealant_hold_follows_the_bead_size() {
    let (loaded, evals) = demo();
    let v = &loaded.design.variants[0];
    let e = &evals[0];
    let mut c = loaded.design.costs.clone();
    // A 10 × 10 mm bead: 10 mm at 2 mm a day = 5 days = 120 h.
    c.sealant_bead_mm2 = 100.0;
    let plan = complexity::build_plan(v, &e.cost.bom, &e.cost.commissioning, &c);
    let seal = plan
        .iter()
        .flat_map(|s| s.holds.iter())
        .find(|h| h.what == "sealant cured through")
        .unwrap();
    assert!((seal.wait_h - 120.0).abs() < 1e-9);
    // The plain step list is the plan's texts.
    let texts: Vec<String> = plan.iter().map(|s| s.text.clone()).collect();
    assert_eq!(
        texts,
        complexity::build_steps(v, &e.cost.bom, &e.cost.commissioning)
    );
    assert_eq!(plan.last().map(|s| s.number), Some(plan.len()));
}

#[test]
fn water_path_parts_are_never_substituted_and_unsafe_ones_are_flagged() {
    let (loaded, evals) = demo();
    let s = workshop::workshop_sheet(loaded, 0, &evals[0]).unwrap();
    let parts: Vec<&str> = s.never_substitute.iter().map(|n| n.part.as_str()).collect();
    assert!(parts.contains(&"distillate trough"), "{parts:?}");
    assert!(parts.contains(&"collection bottle"), "{parts:?}");
    // The galvanised tray sits under the liner (dry): not in the water path.
    assert!(!parts.contains(&"basin tray"), "{parts:?}");
    assert!(s.never_substitute.iter().all(|n| n.flagged.is_none()));
    assert!(s.water_path_rules.iter().any(|r| r.contains("galvanised")));
    assert!(s.water_path_rules.iter().any(|r| r.contains("lead solder")));
    // Rated above the hottest modelled brine.
    let hottest = evals[0]
        .result
        .months
        .iter()
        .map(|m| m.max_brine_c)
        .fold(f64::NEG_INFINITY, f64::max);
    assert!(s.rating_c >= hottest + 10.0 && s.rating_c < hottest + 15.0);

    // The same still under a polyethylene film cover: flagged from the library's taint note.
    let text = design::DEMO_DESIGN.replacen(
        "cover = \"window-glass-4mm\"",
        "cover = \"polyethylene-film\"",
        1,
    );
    let film =
        design::parse_design_str(&text, Path::new("film.toml"), &root().join("designs")).unwrap();
    let weather = stills::site_weather(&film).unwrap();
    let e = compare::evaluate_variant(&film, 0, &weather, &RunOptions::default()).unwrap();
    let s = workshop::workshop_sheet(&film, 0, &e).unwrap();
    let flagged: Vec<&str> = s
        .never_substitute
        .iter()
        .filter_map(|n| n.flagged.as_deref())
        .collect();
    assert!(
        flagged.iter().any(|f| f.contains("plasticisers")),
        "{flagged:?}"
    );
    assert!(!s.food_safety_flags.is_empty());
}

#[test]
fn sheet_refuses_a_mismatched_evaluation() {
    let (loaded, evals) = demo();
    let err = workshop::workshop_sheet(loaded, 0, &evals[1]).unwrap_err();
    assert_eq!(err.exit_code(), stillbench::ExitCode::BadInput);
    assert!(err.to_string().contains("twin-roof"), "{err}");
    let err = workshop::workshop_sheet(loaded, 9, &evals[0]).unwrap_err();
    assert!(err.to_string().contains("no variant number 10"), "{err}");
}

#[test]
fn workshop_template_renders_the_sheet() {
    let (loaded, evals) = demo();
    let s = workshop::workshop_sheet(loaded, 0, &evals[0]).unwrap();
    let mut out = Vec::new();
    workshop::write_sheet_markdown(&s, &mut out).unwrap();
    let md = String::from_utf8(out).unwrap();
    assert!(
        md.starts_with("## Workshop sheet: glass-basin (single-slope)\n"),
        "{md}"
    );
    // The drawing as raw SVG inside one HTML block (no blank line before </div>).
    assert!(
        md.contains("<div class=\"workshop-drawing\">\n<svg xmlns=\"http://www.w3.org/2000/svg\""),
        "{md}"
    );
    assert!(md.contains("</svg>\n</div>\n\n"), "{md}");
    // Tables start right under their header with no blank line in between.
    assert!(
        md.contains(
            "| part | item | quantity | unit | unit price (USD) | cost (USD) | sold locally | touches |\n|---|---|---:|---|---:|---:|---|---|\n| "
        ),
        "{md}"
    );
    assert!(md.contains("| distillate trough | "), "{md}");
    assert!(
        md.contains("    - **Hold 72 h: sealant cured through.** a 6 mm bead at 2 mm a day"),
        "{md}"
    );
    assert!(md.contains(
        "| unit number | date | materials (supplier, batch) | leak test | levelling | trough slope | cover tilt | checked by |\n|---|---|---|---|---|---|---|---|\n|  |  |  | drop ≤ 1 mm in 24 h | basin floor level (±2 mm) | fall ≥ 20 mm over 2000 mm | 15.0° ± 0.5° |  |\n"
    ), "{md}");
    // Ten blank rows of eight cells to fill in on paper.
    assert_eq!(md.matches("\n| | | | | | | | |").count(), 10, "{md}");
    assert!(md.contains("- trough fall: trough fall 20 over 2000 (1 in 100) toward the outlet\n"));
    assert!(md.contains("\n1. Fill to the working level and run the still; discard all distillate of the first 2 days"));
}

#[test]
fn every_demo_variant_renders_and_an_include_gives_the_same_text() {
    let (loaded, evals) = demo();
    for (i, e) in evals.iter().enumerate() {
        let s = workshop::workshop_sheet(loaded, i, e).unwrap();
        let mut out = Vec::new();
        workshop::write_sheet_markdown(&s, &mut out).unwrap();
        let md = String::from_utf8(out).unwrap();
        for l in &s.bom {
            assert!(
                md.contains(&format!("| {} | ", l.part)),
                "{}: {}",
                s.variant,
                l.part
            );
        }
        assert!(!md.contains("\n\n\n"), "{}: {md}", s.variant);
        // The report includes the template from its master under the key `workshop`.
        let mut env = minijinja::Environment::new();
        env.add_template(
            workshop::WORKSHOP_TEMPLATE_NAME,
            workshop::WORKSHOP_TEMPLATE,
        )
        .unwrap();
        env.add_template("master.md", "# Report\n\n{% include \"workshop.md\" %}")
            .unwrap();
        let via_include = env
            .get_template("master.md")
            .unwrap()
            .render(minijinja::context! {
                workshop => minijinja::Value::from(minijinja::value::Serde(&s))
            })
            .unwrap();
        assert!(
            via_include.strip_prefix("# Report\n\n") == Some(md.as_str()),
            "{}: the included sheet differs from the direct rendering",
            s.variant
        );
    }
}

#[test]
fn demo_tables_parse_and_merge_with_the_defaults() {
    let (loaded, evals) = demo();
    let d = &loaded.design;
    let names: Vec<&str> = d.alternatives.iter().map(|a| a.name.as_str()).collect();
    assert_eq!(
        names,
        [
            "boiling on a wood fire",
            "trucked water",
            "ceramic filter",
            "rain catchment"
        ]
    );
    let risks = workshop::risk_table(d);
    let ids: Vec<&str> = risks.rows.iter().map(|r| r.id.as_str()).collect();
    assert_eq!(
        ids,
        [
            "broken-cover",
            "seal-failure",
            "scale",
            "cloudy-season",
            "misuse",
            "sand-on-cover"
        ]
    );
    let scale = &risks.rows[2];
    // Overridden: likelihood and impact from the design, failure mode kept from the default.
    assert_eq!(scale.origin, RiskOrigin::DesignOverride);
    assert_eq!((scale.likelihood, scale.impact), (Level::High, Level::High));
    assert!(scale.failure_mode.starts_with("Salt and scale"));
    assert!(scale.mitigation.starts_with("Flush at twice"));
    assert_eq!(risks.rows[5].origin, RiskOrigin::Design);
    for r in risks
        .rows
        .iter()
        .filter(|r| r.origin == RiskOrigin::Default)
    {
        assert_eq!(r.source, "common practice, no source");
    }
    let mut out = Vec::new();
    workshop::write_risks_markdown(&risks, &mut out).unwrap();
    let md = String::from_utf8(out).unwrap();
    assert!(md.starts_with(
        "| failure mode | likelihood | impact | mitigation | source |\n|---|---|---|---|---|\n| Cover cracked"
    ));
    assert!(md.contains(
        "| high | high | Flush at twice the distillate every evening; scrape the basin monthly | design file |"
    ));

    // Alternatives beside the first still.
    let e = &evals[0];
    let t = workshop::alternatives_table(d, e);
    assert_eq!(t.rows.len(), 5);
    assert!(t.rows[0].is_still);
    assert!((t.rows[0].cost_per_litre - e.values.cost_per_l).abs() < 1e-12);
    assert!((t.rows[0].relative_to_still.unwrap() - 1.0).abs() < 1e-12);
    // Trucked water: 0.05 per litre (invented demo price) ÷ the still's cost per litre.
    let trucked = &t.rows[2];
    assert!((trucked.relative_to_still.unwrap() - 0.05 / e.values.cost_per_l).abs() < 1e-12);
    let mut out = Vec::new();
    workshop::write_alternatives_markdown(&t, &mut out).unwrap();
    let md = String::from_utf8(out).unwrap();
    assert!(md.starts_with(
        "| option | cost per litre (USD) | × the still | removes | does not remove | notes |\n|---|---:|---:|---|---|---|\n| **solar still: glass-basin** | "
    ));
    assert!(md.contains("| trucked water | 0.0500 | "), "{md}");
    // The highland design adds its own risk to the five defaults.
    let high = highland();
    let ids: Vec<String> = workshop::risk_table(&high.design)
        .rows
        .into_iter()
        .map(|r| r.id)
        .collect();
    assert_eq!(ids.len(), 6);
    assert_eq!(ids[5], "frost");
}

#[test]
fn table_cells_cannot_open_html() {
    assert_eq!(
        workshop::tables::md_cell("a|b <script>\nx"),
        "a\\|b &lt;script> x"
    );
}

#[test]
fn bad_alternative_and_risk_tables_are_named() {
    let dir = root().join("tests/data/bad");
    for f in [
        "alternative-negative-cost.toml",
        "alternative-unknown-field.toml",
        "alternative-duplicate-name.toml",
        "alternative-not-array.toml",
        "risk-new-incomplete.toml",
        "risk-bad-level.toml",
    ] {
        let path = dir.join(f);
        let text = std::fs::read_to_string(&path).unwrap();
        let err = design::load_design(&path).unwrap_err().to_string();
        assert!(err.contains(f), "{f}: {err}");
        for want in text.lines().map_while(|l| l.strip_prefix("# expect:")) {
            assert!(err.contains(want.trim()), "{f}: lacks {want:?}:\n{err}");
        }
    }
}

mod drawing_properties {
    use super::*;
    use proptest::prelude::*;
    use stillbench::design::VariantKind;

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]

        /// Any geometry (not only the demo's) gives well-formed SVG whose covers sit at the
        /// design tilt within 0.1° and whose numbers are finite.
        #[test]
        fn any_geometry_draws_at_its_tilt(
            which in 0usize..5,
            tilt in 1.0f64..80.0,
            width_m in 0.3f64..10.0,
            length_m in 0.3f64..50.0,
            wall_mm in 20.0f64..1000.0,
            count in 1u32..20,
            gap_mm in 1.0f64..50.0,
        ) {
            let (loaded, _) = demo();
            let mut v = loaded.design.variants[which].clone();
            v.width_m = width_m;
            v.length_m = length_m;
            match &mut v.kind {
                VariantKind::SingleSlope(k) => {
                    k.cover_tilt_deg = tilt;
                    k.front_wall_mm = wall_mm;
                }
                VariantKind::DoubleSlope(k) => {
                    k.cover_tilt_deg = tilt;
                    k.side_wall_mm = wall_mm;
                }
                VariantKind::Wick(k) => {
                    k.cover_tilt_deg = tilt;
                    k.gap_mm = gap_mm * 4.0;
                }
                VariantKind::Stepped(k) => {
                    k.cover_tilt_deg = tilt;
                    k.trays = count;
                    k.front_wall_mm = wall_mm;
                }
                VariantKind::MultiEffect(k) => {
                    k.glazing_tilt_deg = tilt;
                    k.stages = count;
                    k.gap_mm = gap_mm;
                }
            }
            let d = drawing::drawing(&v, &loaded.library);
            prop_assert!(roxmltree::Document::parse(&d.svg).is_ok());
            prop_assert!(!d.svg.contains("NaN") && !d.svg.contains("inf"));
            let tilts = cover_tilts_deg(&d.svg);
            prop_assert!(!tilts.is_empty());
            for t in tilts {
                prop_assert!((t - tilt).abs() < 0.1, "drawn {} for {}", t, tilt);
            }
            // 1 in 100 of the length (common practice, no source).
            prop_assert!((d.trough_fall_mm - 10.0 * length_m).abs() < 1e-9);
        }
    }
}
