//! The operator's upkeep time: a daily round of the installation plus per-unit and per-m²
//! tasks (`[costs.operator]`), and the cost per litre it gives at the installation's scale.
//!
//! The task defaults are common practice, no source; the check values below are worked by
//! hand from those defaults and the geometry (a cover of footprint ÷ cos tilt).

use std::path::Path;

use stillbench::design::{self, LoadedDesign};
use stillbench::economics::{self, operator};

/// A design with one variant and `extra` tables (demand, costs), using the demo library.
fn design_with(extra: &str, variant: &str) -> Result<LoadedDesign, design::DesignErrors> {
    let text = format!(
        r#"materials = "materials/demo-market.toml"
[project]
title = "Test (invented)"
[site]
name = "Nowhere (invented)"
latitude_deg = -25
longitude_deg = 30
utc_offset_h = 2
[site.climate]
source = "monthly"
ghi_kwh_m2_day = [6,6,6,6,5,5,5,5,6,6,6,6]
t_max_c = [30,30,30,28,26,24,24,26,28,30,30,30]
t_min_c = [20,20,20,18,15,12,12,15,18,20,20,20]
wind_m_s = [3,3,3,3,3,3,3,3,3,3,3,3]
{extra}
{variant}
"#
    );
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("designs");
    design::parse_design_str(&text, &dir.join("test.toml"), &dir)
}

fn basin(operation: &str) -> String {
    format!(
        r#"[[variant]]
name = "ss"
kind = "single-slope"
width_m = 1.0
length_m = 2.0
cover_azimuth_deg = 0
cover = "window-glass-4mm"
cover_tilt_deg = 20
front_wall_mm = 100
liner = "black-epdm"
base_insulation = [ {{ material = "polystyrene-foam", thickness_mm = 50 }} ]
side_insulation = [ {{ material = "polystyrene-foam", thickness_mm = 25 }} ]
{operation}
"#
    )
}

const WICK: &str = r#"[[variant]]
name = "wk"
kind = "wick"
width_m = 0.9
length_m = 2.0
cover_azimuth_deg = 0
cover = "polycarbonate-4mm"
cover_tilt_deg = 20
gap_mm = 40
cloth = "jute-cloth"
feed_l_h_m2 = 0.8
backing_insulation = [ { material = "polystyrene-foam", thickness_mm = 40 } ]
"#;

/// Cover area of a 1 m × 2 m basin tilted 20° [m²]: 2 ÷ cos 20° (geometry).
fn basin_cover_m2() -> f64 {
    2.0 / 20f64.to_radians().cos()
}

fn task<'a>(t: &'a economics::OperatorTime, starts: &str) -> Option<&'a economics::UnitTask> {
    t.unit_tasks.iter().find(|x| x.task.starts_with(starts))
}

#[test]
fn a_hand_fed_basin_installation_by_hand() {
    let d = design_with("", &basin("")).unwrap();
    let v = &d.design.variants[0];
    let t = operator::operator_time(v, &d.design.costs, 10, String::new());
    // Defaults (common practice, no source): fill 2 min × 1 refill, hand flush 3 min (ratio
    // flush at the refill), bottle 1 min, cover 1 min/m² every 7 days; round 20 min.
    let unit = 2.0 + 3.0 + 1.0 + basin_cover_m2() / 7.0; // 6.30405 min/day
    assert!((t.unit_min_per_day - unit).abs() < 1e-9);
    // 10 units: (20 + 10 × 6.30405) ÷ 60 = 1.38401 h/day (hand arithmetic; round-off only).
    assert!((t.installation_h_per_day - (20.0 + 10.0 * unit) / 60.0).abs() < 1e-9);
    assert!((t.installation_h_per_day - 1.38401).abs() < 1e-5);
    // One unit's share: (20/10 + 6.30405) × 365 ÷ 60 = 50.516 h/year.
    assert!((t.unit_share_h_per_year - 50.516).abs() < 1e-3);
    assert!(!t.self_feeding);
    // The share falls with the installation and tends to the unit's own tasks.
    let one = operator::operator_time(v, &d.design.costs, 1, String::new());
    let many = operator::operator_time(v, &d.design.costs, 1000, String::new());
    assert!(one.unit_share_h_per_year > t.unit_share_h_per_year);
    assert!(t.unit_share_h_per_year > many.unit_share_h_per_year);
    assert!((many.unit_share_h_per_year - unit * 365.0 / 60.0).abs() < 0.2);
}

#[test]
fn a_valve_fed_or_self_feeding_unit_is_not_filled_by_hand() {
    let c = design::Costs::default();
    // Float valve with the default ratio flush: a bleed, so no hand flush; a feed check.
    let d = design_with("", &basin("[variant.operation]\nfeed = \"float-valve\"\n")).unwrap();
    let t = operator::operator_time(&d.design.variants[0], &c, 1, String::new());
    assert!(t.self_feeding);
    assert!(task(&t, "fill").is_none() && task(&t, "flush").is_none());
    assert!((task(&t, "check").unwrap().min_per_day - 0.5).abs() < 1e-12);
    // Salinity-limit drain by hand every 7 days: 3 min ÷ 7 = 0.42857 min/day.
    let d = design_with(
        "",
        &basin(
            "[variant.operation]\nfeed = \"drip\"\ndrip_l_h = 0.5\nflush = \"salinity-limit\"\n\
             flush_limit_g_kg = 120\n",
        ),
    )
    .unwrap();
    let t = operator::operator_time(&d.design.variants[0], &c, 1, String::new());
    assert!((task(&t, "flush").unwrap().min_per_day - 3.0 / 7.0).abs() < 1e-12);
    // Two hand refills a day: two fills.
    let d = design_with("", &basin("[variant.operation]\nrefill_hours = [7, 13]\n")).unwrap();
    let t = operator::operator_time(&d.design.variants[0], &c, 1, String::new());
    assert!((task(&t, "fill").unwrap().min_per_day - 4.0).abs() < 1e-12);
    // A wick is fed from a feed line: check, bottle, cover (0.9 × 2 ÷ cos 20° m²).
    let d = design_with("", WICK).unwrap();
    let t = operator::operator_time(&d.design.variants[0], &c, 1, String::new());
    assert!(t.self_feeding);
    assert!(task(&t, "fill").is_none() && task(&t, "flush").is_none());
    let cover = 1.8 / 20f64.to_radians().cos();
    assert!((t.unit_min_per_day - (0.5 + 1.0 + cover / 7.0)).abs() < 1e-9);
}

#[test]
fn the_cost_per_litre_falls_with_the_installation_by_the_shared_round() {
    let y = economics::YieldEstimate {
        annual_litres: 1500.0,
        clear_day_litres: None,
        worst_month_l_day: Some(5.0),
    };
    let alone = design_with("", &basin("")).unwrap();
    let big = design_with("[project.demand]\nlitres_per_day = 1000\n", &basin("")).unwrap();
    let a = economics::cost_variant(&alone, 0, Some(&y)).unwrap();
    let b = economics::cost_variant(&big, 0, Some(&y)).unwrap();
    assert_eq!(a.cost.operator.units, 1);
    // ⌈1000 ÷ 5⌉ = 200 units.
    assert_eq!(b.cost.operator.units, 200);
    // The operator's pay falls by the round's share: (20 − 20/200) min/day × 365 ÷ 60 h ×
    // 1.0/h (the default operator rate) = 121.058 per year, by hand.
    let saved = a.cost.operator_cost_per_year - b.cost.operator_cost_per_year;
    assert!((saved - 121.058).abs() < 1e-3, "{saved}");
    // The capital falls too (200 units' parts nested together share offcuts); the
    // annualised cost is still P·CRF + running − S·SFF (REFERENCES.md §9) of its own figures.
    assert!(b.cost.capital <= a.cost.capital + 1e-9);
    let c = &b.cost;
    let annualised =
        (c.capital + c.replacements_present_worth) * c.crf + c.running_per_year - c.salvage * c.sff;
    assert!((c.annualised - annualised).abs() < 1e-9);
    assert!(a.cost.annualised - b.cost.annualised >= saved - 1e-9);
    assert!(b.cost.cost_per_litre.unwrap() < a.cost.cost_per_litre.unwrap());
    // Upkeep holds spares only; the running cost adds the operator's pay.
    assert!(
        (b.cost.running_per_year - b.cost.upkeep_per_year - b.cost.operator_cost_per_year).abs()
            < 1e-9
    );
    assert!((b.cost.upkeep_per_year - 0.02 * b.cost.capital).abs() < 1e-9);
}

#[test]
fn operator_task_times_are_range_checked_and_the_old_flat_field_is_refused() {
    let e = design_with("[costs.operator]\nfill_min = 100\n", &basin("")).unwrap_err();
    let s = e.to_string();
    assert!(
        s.contains("costs.operator.fill_min") && s.contains("allowed"),
        "{s}"
    );
    let e = design_with("[costs]\noperator_min_per_day = 10\n", &basin("")).unwrap_err();
    assert!(e.to_string().contains("operator_min_per_day"), "{e}");
    let d = design_with("[costs.operator]\nround_min_per_day = 0\n", &basin("")).unwrap();
    let t = operator::operator_time(&d.design.variants[0], &d.design.costs, 5, String::new());
    assert!((t.installation_h_per_day - 5.0 * t.unit_min_per_day / 60.0).abs() < 1e-12);
}

#[test]
fn size_and_report_show_the_installation_operator_hours() {
    let d = stillbench::design::load_demo().unwrap();
    let opts = stillbench::compare::size::SizeOptions {
        demand_l_day: 300.0,
        confidence: 0.9,
        years: 3,
        seed: 4,
    };
    let rep = stillbench::compare::size::size_design_by(
        &d,
        &opts,
        &stillbench::stills::RunOptions::default(),
        stillbench::compare::size::SizeMethod::Response,
    )
    .unwrap();
    for s in &rep.sized {
        let v = d.design.variants.iter().find(|v| v.name == s.name).unwrap();
        let t = operator::operator_time(v, &d.design.costs, s.units, String::new());
        assert!((s.operator_h_per_day - t.installation_h_per_day).abs() < 1e-12);
        assert!(s.operator_h_per_day > 20.0 / 60.0);
    }
}
