//! End-to-end tests of commands that glue the library together (`climate`), and of the atomic
//! file writer every export uses.

use assert_cmd::Command;
use std::fs;

fn stillbench() -> Command {
    Command::cargo_bin("stillbench").unwrap()
}

#[test]
fn climate_prints_twelve_months_for_every_demo_design() {
    for design in [
        "designs/demo-coast.toml",
        "designs/demo-highland-south.toml",
    ] {
        let out = stillbench().args(["climate", design]).output().unwrap();
        assert!(out.status.success(), "{design}: {out:?}");
        let text = String::from_utf8(out.stdout).unwrap();
        for month in [
            "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
        ] {
            assert!(text.contains(month), "{design}: no {month} row in\n{text}");
        }
    }
}

#[test]
fn climate_csv_export_has_every_hour_and_refuses_to_clobber() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("hourly.csv");
    let run = |force: bool| {
        let mut cmd = stillbench();
        cmd.args([
            "climate",
            "designs/demo-coast.toml",
            "--format",
            "csv",
            "--out",
        ])
        .arg(&out);
        if force {
            cmd.arg("--force");
        }
        cmd.output().unwrap()
    };
    assert!(run(false).status.success());
    let first = fs::read_to_string(&out).unwrap();
    // 12 average days × 24 hours, plus the header.
    assert_eq!(first.lines().count(), 12 * 24 + 1);
    fs::write(&out, "earlier export").unwrap();
    let refused = run(false);
    assert_eq!(refused.status.code(), Some(2), "{refused:?}");
    assert!(String::from_utf8_lossy(&refused.stderr).contains("--force"));
    assert_eq!(fs::read_to_string(&out).unwrap(), "earlier export");
    assert!(run(true).status.success());
    assert_eq!(fs::read_to_string(&out).unwrap(), first);
}

#[test]
fn a_failed_atomic_write_leaves_the_earlier_file_and_no_temporary() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("table.csv");
    fs::write(&path, "earlier").unwrap();
    let result = stillbench::output::write_atomic(&path, true, |w| {
        w.write_all(b"half a tab")?;
        Err(std::io::Error::other("simulated failure midway"))
    });
    assert!(result.is_err());
    assert_eq!(fs::read_to_string(&path).unwrap(), "earlier");
    let left: Vec<_> = fs::read_dir(dir.path()).unwrap().collect();
    assert_eq!(left.len(), 1, "temporary file left behind: {left:?}");
}

#[test]
fn climate_reads_csv_and_epw_weather_files_named_in_a_design() {
    // Synthetic one-/two-day files (tests/data/weather/README.md) for an invented site; the
    // CSV holds one day in March, the EPW two. Run from another directory to prove that the
    // weather-file path is resolved against the design file, not the working directory.
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    for design in ["weather-csv.toml", "weather-epw.toml"] {
        let path = root.join("tests/data/designs").join(design);
        let out = stillbench()
            .current_dir(std::env::temp_dir())
            .arg("climate")
            .arg(&path)
            .output()
            .unwrap();
        assert!(out.status.success(), "{design}: {out:?}");
        let text = String::from_utf8(out.stdout).unwrap();
        assert!(text.contains("Mar"), "{design}: {text}");
    }
}

#[test]
fn a_bad_weather_file_fails_with_its_line_number() {
    // tests/data/weather/README.md: bad_night.csv has GHI 300 W/m² at 02:00 on line 3.
    let out = stillbench()
        .args(["climate", "tests/data/designs/weather-bad-night.toml"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2), "{out:?}");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad_night.csv:3"), "{err}");
    assert!(!err.contains("panicked"), "{err}");
}

#[test]
fn text_results_carry_the_safety_cautions() {
    // The tool estimates quantity, never safety: every text result ends with the cautions
    // (drinking water, glass and hot surfaces, structures) and defers to local authorities.
    for cmd in [
        vec!["simulate", "--variant", "glass-basin"],
        vec!["cost", "--variant", "glass-basin"],
        vec!["operate", "--variant", "glass-basin"],
        vec!["compare"],
    ] {
        let out = stillbench().args(&cmd).output().unwrap();
        assert!(out.status.success(), "{cmd:?}: {out:?}");
        let text = String::from_utf8(out.stdout).unwrap();
        for needle in ["Cautions:", "health authority", "remineralise", "building"] {
            assert!(text.contains(needle), "{cmd:?} lacks {needle}");
        }
    }
}
