//! `stillbench check` rejects what a run would reject: over the bad-design corpus, the bad
//! weather-file corpus and mutations of a demo design's climate, whenever `simulate` exits 2,
//! `check` exits 2 naming the same file and field.
//!
//! The designs and weather files are the synthetic test data of `tests/data` (see the READMEs
//! there) and the invented demo designs.

use assert_cmd::Command;
use std::path::{Path, PathBuf};
use toml_edit::{DocumentMut, value};

fn stillbench() -> Command {
    Command::cargo_bin("stillbench").unwrap()
}

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Exit code and standard error of one command on one design.
fn run(cmd: &str, design: &Path) -> (Option<i32>, String) {
    let out = stillbench()
        .args([cmd, design.to_str().unwrap()])
        .output()
        .unwrap();
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// The `FILE[:LINE:COL]` and the field path of the first error line of `stderr`
/// (`error: FILE:LINE:COL: field.path: message`); the field is empty for a weather-file row.
fn first_error(stderr: &str) -> Option<(String, String)> {
    let line = stderr.lines().find_map(|l| l.strip_prefix("error: "))?;
    let mut parts = line.splitn(3, ": ");
    let file = parts.next()?.to_owned();
    let field = parts.next().unwrap_or("").to_owned();
    // A field path has no spaces; a message does.
    let field = if field.contains(' ') {
        String::new()
    } else {
        field
    };
    Some((file, field))
}

/// `simulate` exits 2 ⇒ `check` exits 2 and names the same file (and field, when there is one).
fn check_rejects_what_simulate_rejects(design: &Path) -> bool {
    let (sim, sim_err) = run("simulate", design);
    if sim != Some(2) {
        return false;
    }
    let (chk, chk_err) = run("check", design);
    assert_eq!(
        chk,
        Some(2),
        "{}: simulate exits 2 but check {chk:?}\nsimulate: {sim_err}\ncheck: {chk_err}",
        design.display()
    );
    let (file, field) = first_error(&sim_err).unwrap_or_else(|| panic!("{sim_err}"));
    let file_name = file.split(':').next().unwrap_or("");
    assert!(
        chk_err.contains(file_name),
        "{}: check does not name {file_name}\n{chk_err}",
        design.display()
    );
    assert!(
        chk_err.contains(&format!("{field}:")),
        "{}: check does not name `{field}`\n{chk_err}",
        design.display()
    );
    true
}

#[test]
fn check_rejects_every_bad_design_that_simulate_rejects() {
    let mut n = 0;
    for e in std::fs::read_dir(root().join("tests/data/bad")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().and_then(|x| x.to_str()) == Some("toml") {
            n += usize::from(check_rejects_what_simulate_rejects(&p));
        }
    }
    assert!(
        n >= 30,
        "the corpus exercises the property ({n} designs rejected)"
    );
}

/// The weather-file test design pointed at `weather` (absolute paths), as `format`.
fn weather_design(dir: &Path, weather: &Path, format: &str) -> PathBuf {
    let src = root().join("tests/data/designs/weather-csv.toml");
    let mut doc: DocumentMut = std::fs::read_to_string(&src).unwrap().parse().unwrap();
    doc["materials"] = value(
        root()
            .join("designs/materials/demo-market.toml")
            .to_str()
            .unwrap(),
    );
    doc["site"]["climate"]["path"] = value(weather.to_str().unwrap());
    doc["site"]["climate"]["format"] = value(format);
    if format == "epw" {
        doc["site"]["climate"]
            .as_table_mut()
            .unwrap()
            .remove("columns");
    }
    let stem = weather.file_stem().unwrap().to_string_lossy();
    let p = dir.join(format!("{stem}-{format}.toml"));
    std::fs::write(&p, doc.to_string()).unwrap();
    p
}

#[test]
fn check_reads_weather_files_as_a_run_does() {
    let dir = tempfile::tempdir().unwrap();
    let weather = root().join("tests/data/weather");
    let mut n = 0;
    for e in std::fs::read_dir(&weather).unwrap() {
        let p = e.unwrap().path();
        let format = match p.extension().and_then(|x| x.to_str()) {
            Some("csv") => "csv",
            Some("epw") => "epw",
            _ => continue,
        };
        let d = weather_design(dir.path(), &p, format);
        n += usize::from(check_rejects_what_simulate_rejects(&d));
    }
    // Slips: an EPW reader on a CSV file; a file covering one day of the year.
    let d = weather_design(dir.path(), &weather.join("good_day.csv"), "epw");
    assert!(check_rejects_what_simulate_rejects(&d), "epw on a csv");
    let d = weather_design(dir.path(), &weather.join("good_day.csv"), "csv");
    assert!(check_rejects_what_simulate_rejects(&d), "a part year");
    let (_, err) = run("check", &d);
    assert!(err.contains("no record in month"), "{err}");
    assert!(n >= 15, "every bad weather file is rejected ({n})");
}

/// The southern demo with one monthly climate field changed.
fn monthly_mutant(dir: &Path, field: &str, month: usize, x: f64) -> PathBuf {
    let src = root().join("designs/demo-highland-south.toml");
    let mut doc: DocumentMut = std::fs::read_to_string(&src).unwrap().parse().unwrap();
    doc["materials"] = value(
        root()
            .join("designs/materials/demo-market.toml")
            .to_str()
            .unwrap(),
    );
    let arr = doc["site"]["climate"][field].as_array_mut().unwrap();
    arr.replace(month, x);
    let p = dir.join(format!("{field}-{month}-{x}.toml"));
    std::fs::write(&p, doc.to_string()).unwrap();
    p
}

#[test]
fn check_rejects_monthly_sunlight_above_what_reaches_the_top_of_the_atmosphere() {
    let dir = tempfile::tempdir().unwrap();
    // 34.2° S in June (winter): about 4.4 kWh/m²/day reach the top of the atmosphere on
    // Klein's day (Duffie & Beckman eq. 1.10.3; 0.85 of it is 3.7). 6.5 is within the
    // field's [0, 12] but not possible there.
    let p = monthly_mutant(dir.path(), "ghi_kwh_m2_day", 5, 6.5);
    assert!(check_rejects_what_simulate_rejects(&p));
    let (_, err) = run("check", &p);
    assert!(
        err.contains("site.climate.ghi_kwh_m2_day[6]:"),
        "the user's field name, 1-based: {err}"
    );
    assert!(err.contains(":26:"), "the line of the field: {err}");
    // Every climate mutation that stops a run stops check too.
    for (field, month, x) in [
        ("ghi_kwh_m2_day", 0, 12.0),
        ("ghi_kwh_m2_day", 11, -1.0),
        ("t_max_c", 6, -5.0),
        ("t_min_c", 2, 45.0),
        ("wind_m_s", 3, 60.0),
        ("dew_point_c", 0, 35.0),
    ] {
        let p = monthly_mutant(dir.path(), field, month, x);
        assert!(
            check_rejects_what_simulate_rejects(&p),
            "{field}[{}] = {x} stops simulate",
            month + 1
        );
    }
}

/// The southern demo with `edit` applied, written beside nothing else (absolute library path).
fn edited_demo(dir: &Path, name: &str, edit: impl FnOnce(&mut DocumentMut)) -> PathBuf {
    let src = root().join("designs/demo-highland-south.toml");
    let mut doc: DocumentMut = std::fs::read_to_string(&src).unwrap().parse().unwrap();
    doc["materials"] = value(
        root()
            .join("designs/materials/demo-market.toml")
            .to_str()
            .unwrap(),
    );
    edit(&mut doc);
    let p = dir.join(format!("{name}.toml"));
    std::fs::write(&p, doc.to_string()).unwrap();
    p
}

#[test]
fn size_and_report_options_obey_the_design_files_own_demand_limits() {
    let dir = tempfile::tempdir().unwrap();
    let demo = root().join("designs/demo-highland-south.toml");
    // (option, value, the design-file field with the same limit)
    let cases = [
        ("--demand", "1e9", "litres_per_day", "1e9"),
        ("--demand", "0", "litres_per_day", "0"),
        ("--people", "2000000", "people", "2000000"),
    ];
    for (option, x, field, fx) in cases {
        for cmd in ["size", "report"] {
            let out = stillbench()
                .args([cmd, demo.to_str().unwrap(), option, x])
                .args(["--out", dir.path().join("r").to_str().unwrap()])
                .output()
                .unwrap();
            let err = String::from_utf8_lossy(&out.stderr);
            assert_eq!(out.status.code(), Some(2), "{cmd} {option} {x}: {err}");
            assert!(
                err.contains(&format!("{option}:")) && err.contains("allowed"),
                "{err}"
            );
        }
        let p = edited_demo(dir.path(), field, |d| {
            let mut t = toml_edit::Table::new();
            t[field] = toml_edit::Item::Value(fx.parse::<toml_edit::Value>().unwrap());
            d["project"]["demand"] = toml_edit::Item::Table(t);
        });
        let (code, err) = run("check", &p);
        assert_eq!(code, Some(2), "{field} = {fx}: {err}");
        assert!(err.contains(&format!("project.demand.{field}:")), "{err}");
    }
    let out = stillbench()
        .args(["size", demo.to_str().unwrap(), "--people", "20"])
        .args(["--litres-per-person", "500"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--litres-per-person:"));
}

#[test]
fn a_vanishing_brine_depth_is_refused_with_its_physical_floor() {
    // The fuzz finding: 1e-320 mm was inside "(0, 300]" and the run then exited 3.
    let dir = tempfile::tempdir().unwrap();
    let p = edited_demo(dir.path(), "thin", |d| {
        let v = d["variant"].as_array_of_tables_mut().unwrap();
        for t in v.iter_mut() {
            if t.contains_key("brine_depth_mm") {
                t["brine_depth_mm"] = value(1e-320);
            }
            if t.get("kind").and_then(|k| k.as_str()) == Some("stepped") {
                t["tray_depth_mm"] = value(1e-320);
            }
        }
    });
    let (code, err) = run("check", &p);
    assert_eq!(code, Some(2), "{err}");
    assert!(
        err.contains(".brine_depth_mm:") && err.contains("allowed [2, 300] mm"),
        "{err}"
    );
    assert!(
        err.contains(".tray_depth_mm:") && err.contains("allowed [2, 100] mm"),
        "{err}"
    );
    let (code, err) = run("simulate", &p);
    assert_eq!(code, Some(2), "{err}");
}
