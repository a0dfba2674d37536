//! Parametric sweeps: the tilt that favours the worst month at a site away from the equator,
//! yield against brine depth, a grid of the size asked for, a swept value reaching the model,
//! and the command-line contract (bad specs exit 2 naming `--param`).
//!
//! Runs are kept short: coarse steps on the 34° S demo's single-slope basin.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use stillbench::compare::sweep::{self, ParamSpec, SweepError, SweepPoint, SweepResult, Target};
use stillbench::stills::{self, RunOptions};

fn highland() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs/demo-highland-south.toml")
}

fn run(variant: &str, params: &[&str], target: Target) -> Result<SweepResult, SweepError> {
    let file = highland();
    let text = std::fs::read_to_string(&file).unwrap();
    let specs: Vec<ParamSpec> = params.iter().map(|p| p.parse().unwrap()).collect();
    sweep::sweep(
        &text,
        &file,
        file.parent().unwrap(),
        variant,
        &specs,
        target,
        &RunOptions::default(),
    )
}

fn best_value(res: &SweepResult, axis: usize) -> f64 {
    res.points[res.best.unwrap()].values[axis]
}

#[test]
fn worst_month_tilt_is_steeper_than_annual_tilt_at_34_south() {
    // Duffie & Beckman, Solar Engineering of Thermal Processes, ch. 2 (from memory): a fixed
    // collector tilted for the year sits near the latitude or below it, one favouring winter
    // near latitude + 10–15°. A still loses more through its taller walls as it steepens, so
    // both optima sit lower than for a flat collector; the order must hold. The site is the
    // invented 34.2° S demo; steps of 10° are coarse enough to run fast and fine enough to
    // separate the optima (the comparison is strict, so equal optima fail).
    let tilts = ["cover_tilt_deg=10..70:10"];
    let year = run("north-basin", &tilts, Target::Annual).unwrap();
    let winter = run("north-basin", &tilts, Target::WorstMonth).unwrap();
    assert_eq!(year.points.len(), 7);
    assert!(year.points.iter().all(|p| p.failed.is_none()));
    let (t_year, t_winter) = (best_value(&year, 0), best_value(&winter, 0));
    assert!(
        t_winter > t_year,
        "worst-month tilt {t_winter}° should be steeper than annual tilt {t_year}°"
    );
    // The worst month at 34° S is a winter month (May–August), common practice, no source.
    let w = &winter.points[winter.best.unwrap()];
    assert!((5..=8).contains(&w.worst_month.unwrap()), "{w:?}");
    // The worst-month optimum lies inside the range, so no "widen the range" note for it.
    assert!(winter.edges.is_empty(), "{:?}", winter.edges);
}

#[test]
fn yield_falls_with_brine_depth() {
    // A deeper basin stores more of the day's heat, so the brine runs cooler and the still
    // makes less water (well-known for basin stills, e.g. Tiwari's textbook, from memory).
    // Every step down must be a real fall, not noise: at least 1 % per 20 mm step.
    let res = run("north-basin", &["brine_depth_mm=10..70:20"], Target::Annual).unwrap();
    let annual: Vec<f64> = res.points.iter().map(|p| p.annual_l_m2.unwrap()).collect();
    assert_eq!(annual.len(), 4);
    for w in annual.windows(2) {
        assert!(w[1] < w[0] * 0.99, "annual yield by depth: {annual:?}");
    }
    // Best at the shallow end of the range, which the result must say.
    assert_eq!(res.best, Some(0));
    assert_eq!(res.edges.len(), 1);
    assert_eq!(res.edges[0].end, "lower");
}

#[test]
fn a_swept_value_reaches_the_model() {
    // The design's own tilt is 30°: the sweep's 30° point must equal a plain simulation of
    // the file (same code path after loading; 1e-9 relative allows only rounding).
    let res = run("north-basin", &["cover_tilt_deg=20..40:10"], Target::Annual).unwrap();
    let loaded = stillbench::design::load_design(&highland()).unwrap();
    let weather = stills::site_weather(&loaded).unwrap();
    let plain = stills::simulate_variant(
        &loaded,
        &loaded.design.variants[0],
        &weather,
        &RunOptions::default(),
    )
    .unwrap();
    let at30 = &res.points[1];
    assert!((at30.values[0] - 30.0).abs() < 1e-12);
    let y = at30.annual_l_m2.unwrap();
    assert!((y - plain.annual_l_m2).abs() <= 1e-9 * plain.annual_l_m2);
    // … and the other points differ from it (the value is really written).
    assert!((res.points[0].annual_l_m2.unwrap() - y).abs() > 1.0);
}

#[test]
fn two_parameters_give_the_grid_asked_for() {
    let res = run(
        "north-basin",
        &[
            "cover_tilt_deg=20..40:10",
            "base_insulation[1].thickness_mm=40..80:40",
        ],
        Target::WorstMonth,
    )
    .unwrap();
    assert_eq!(res.axes.len(), 2);
    assert_eq!(res.points.len(), 3 * 2);
    // First axis slowest.
    let pairs: Vec<(f64, f64)> = res
        .points
        .iter()
        .map(|p| (p.values[0], p.values[1]))
        .collect();
    let want = [
        (20., 40.),
        (20., 80.),
        (30., 40.),
        (30., 80.),
        (40., 40.),
        (40., 80.),
    ];
    for (got, w) in pairs.iter().zip(want) {
        assert!(
            (got.0 - w.0).abs() < 1e-12 && (got.1 - w.1).abs() < 1e-12,
            "{pairs:?}"
        );
    }
    // The best pair is the largest worst-month figure of the grid.
    let top = res
        .points
        .iter()
        .filter_map(|p| p.worst_month_l_m2_day)
        .fold(f64::NEG_INFINITY, f64::max);
    let best = res.points[res.best.unwrap()].worst_month_l_m2_day.unwrap();
    assert!((best - top).abs() < 1e-12);
    // More insulation under the basin never lowers the yield (common practice, no source).
    for pair in res.points.chunks(2) {
        assert!(pair[1].worst_month_l_m2_day >= pair[0].worst_month_l_m2_day);
    }
}

#[test]
fn best_point_skips_points_that_were_not_simulated() {
    let p = |y: Option<f64>| SweepPoint {
        values: vec![0.0],
        annual_l_m2: y,
        worst_month_l_m2_day: y.map(|v| v / 365.0),
        worst_month: y.map(|_| 6),
        failed: y.is_none().then(|| "no convergence".to_owned()),
    };
    let pts = [p(Some(500.0)), p(None), p(Some(700.0)), p(Some(700.0))];
    // Ties keep the first.
    assert_eq!(sweep::best_point(&pts, Target::Annual), Some(2));
    assert_eq!(sweep::best_point(&[p(None)], Target::Annual), None);
}

#[test]
fn misspelt_or_non_numeric_fields_are_refused() {
    let e = run("north-basin", &["cover_tilt=10..50:20"], Target::Annual).unwrap_err();
    let SweepError::Spec(b) = e else {
        panic!("{e}")
    };
    assert!(b.message.contains("did you mean `cover_tilt_deg`"), "{b}");
    let e = run("north-basin", &["cover=1..2:1"], Target::Annual).unwrap_err();
    assert!(e.to_string().contains("not a number"), "{e}");
    let e = run(
        "north-basin",
        &["cover_tilt_deg=10..60:10", "brine_depth_mm=1..100:1"],
        Target::Annual,
    )
    .unwrap_err();
    assert!(matches!(e, SweepError::Spec(_)), "{e}");
}

fn stillbench() -> Command {
    Command::cargo_bin("stillbench").unwrap()
}

#[test]
fn bad_specs_exit_2_naming_param() {
    let file = highland();
    for spec in [
        "cover_tilt_deg",               // no range
        "cover_tilt_deg=60..10",        // FROM above TO
        "cover_tilt_deg=10..60:0",      // zero step
        "cover_tilt_deg=0.1..89.9:0.1", // over 200 points
        "cover_tilt=10..60:10",         // misspelt
        "liner=1..2:1",                 // not a number
    ] {
        let out = stillbench()
            .args(["sweep", file.to_str().unwrap(), "--variant", "north-basin"])
            .args(["--param", spec])
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{spec}: {err}");
        assert!(err.contains("--param"), "{spec}: {err}");
    }
}

#[test]
fn out_of_range_point_exits_2_naming_the_field_before_simulating() {
    // 90° is outside the allowed tilt (0, 90): the error names the field and the point.
    let out = stillbench()
        .args([
            "sweep",
            highland().to_str().unwrap(),
            "--variant",
            "north-basin",
        ])
        .args(["--param", "cover_tilt_deg=30..90:30"])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("variant[1].cover_tilt_deg"), "{err}");
    assert!(err.contains("cover_tilt_deg=90"), "{err}");
    assert!(out.stdout.is_empty(), "nothing printed before validation");
    // An unknown variant is bad input too, with a suggestion.
    let out = stillbench()
        .args([
            "sweep",
            highland().to_str().unwrap(),
            "--variant",
            "north-basn",
        ])
        .args(["--param", "cover_tilt_deg=30..40:10"])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("did you mean `north-basin`"), "{err}");
}

#[test]
fn sweep_command_prints_table_grid_and_csv() {
    let file = highland();
    let out = stillbench()
        .args(["sweep", file.to_str().unwrap(), "--variant", "north-basin"])
        .args(["--param", "cover_tilt_deg=20..40:20"])
        .args(["--param", "brine_depth_mm=10..30:20"])
        .args(["--target", "worst-month"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("best for worst-month yield"), "{text}");
    assert!(
        text.contains("by cover_tilt_deg (rows) and brine_depth_mm"),
        "{text}"
    );
    let out = stillbench()
        .args(["sweep", file.to_str().unwrap(), "--variant", "north-basin"])
        .args(["--param", "brine_depth_mm=10..50:20", "--format", "csv"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let csv = String::from_utf8_lossy(&out.stdout);
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(lines.len(), 1 + 3, "{csv}");
    assert!(lines[0].starts_with("brine_depth_mm,annual_l_m2,"));
    // The shallow end is best for the year, and the text says to widen the range.
    assert_eq!(lines.iter().filter(|l| l.contains(",true,")).count(), 1);
    let out = stillbench()
        .args(["sweep", file.to_str().unwrap(), "--variant", "north-basin"])
        .args(["--param", "brine_depth_mm=10..50:20"])
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("widen the range"), "{text}");
}
