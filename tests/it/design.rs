//! The design file and `stillbench check`: runnable examples, the malformed-input corpus,
//! the error format, and a property test that no input makes the parser panic.
//!
//! These tests check behaviour, not physics: the expected strings come from the file format
//! documented in `docs/design-file.md`. Geometry values are computed from the stated formulas
//! (trigonometry), not from any outside source.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use proptest::prelude::*;
use stillbench::design::{
    self, Climate, DEMO_DESIGN, Humidity, VariantKind, load_demo, load_design, parse_design_str,
    spans::{did_you_mean, line_col},
};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn toml_files(dir: &Path) -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        .collect();
    files.sort();
    files
}

#[test]
fn every_example_design_checks_with_exit_code_0() {
    let designs = toml_files(&root().join("designs"));
    assert!(designs.len() >= 2, "expected the demo designs in designs/");
    for path in designs {
        let out = Command::cargo_bin("stillbench")
            .unwrap()
            .arg("check")
            .arg(&path)
            .output()
            .unwrap();
        let stdout = String::from_utf8_lossy(&out.stdout);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(0), "{}: {stderr}", path.display());
        assert!(stdout.contains("Variants:"), "{}: {stdout}", path.display());
        assert!(
            stdout.contains("Materials:"),
            "{}: {stdout}",
            path.display()
        );
    }
}

#[test]
fn check_without_a_file_checks_the_built_in_demo() {
    let out = Command::cargo_bin("stillbench")
        .unwrap()
        .arg("check")
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("demo-coast.toml"), "{stdout}");
    for kind in design::KIND_NAMES {
        assert!(stdout.contains(kind), "summary lacks {kind}: {stdout}");
    }
}

/// The `# expect:` lines at the top of a corpus file.
fn expectations(bytes: &[u8]) -> Vec<String> {
    String::from_utf8_lossy(bytes)
        .lines()
        .map_while(|l| l.strip_prefix("# expect:"))
        .map(|e| e.trim().to_string())
        .collect()
}

#[test]
fn every_malformed_design_gives_exit_code_2_and_names_the_problem() {
    let bad = toml_files(&root().join("tests/data/bad"));
    assert!(bad.len() >= 25, "corpus has only {} files", bad.len());
    for path in bad {
        let bytes = std::fs::read(&path).unwrap();
        let expect = expectations(&bytes);
        assert!(
            !expect.is_empty(),
            "{}: no `# expect:` line",
            path.display()
        );
        let out = Command::cargo_bin("stillbench")
            .unwrap()
            .env("RUST_BACKTRACE", "1")
            .current_dir(path.parent().unwrap())
            .arg("check")
            .arg(path.file_name().unwrap())
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(
            out.status.code(),
            Some(2),
            "{}: exit code {:?}, stderr: {stderr}",
            path.display(),
            out.status.code()
        );
        for e in &expect {
            assert!(
                stderr.contains(e.as_str()),
                "{}: message lacks `{e}`:\n{stderr}",
                path.display()
            );
        }
        assert!(!stderr.contains("panicked"), "{}: {stderr}", path.display());
        assert!(
            !stderr.to_lowercase().contains("backtrace"),
            "{}: {stderr}",
            path.display()
        );
    }
}

#[test]
fn a_missing_design_file_is_bad_input_and_named() {
    let out = Command::cargo_bin("stillbench")
        .unwrap()
        .args(["check", "no/such/design.toml"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("no/such/design.toml"));
}

#[test]
fn a_zero_byte_file_is_reported_as_empty() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("empty.toml");
    std::fs::write(&path, b"").unwrap();
    let err = load_design(&path).unwrap_err();
    assert_eq!(err.0.len(), 1);
    assert!(err.0[0].message.contains("empty"), "{err}");
    assert_eq!(err.0[0].file, path);
}

#[test]
fn span_to_line_and_column() {
    // Lines and columns are 1-based; columns count characters, not bytes (docs/design-file.md).
    let text = "[site]\nname = \"Ñandú\"\nlatitude_deg = 95\n";
    let at = text.find("95").unwrap();
    assert_eq!(line_col(text, at), (3, 16));
    let quote = text.rfind('"').unwrap();
    assert_eq!(line_col(text, quote), (2, 14));
    assert_eq!(line_col(text, 0), (1, 1));
    assert_eq!(line_col("", 5), (1, 1));
}

#[test]
fn did_you_mean_hints() {
    let fields = [
        "cover_tilt_deg",
        "cover_azimuth_deg",
        "brine_depth_mm",
        "liner",
    ];
    assert_eq!(did_you_mean("cover_tilt", fields), Some("cover_tilt_deg"));
    assert_eq!(
        did_you_mean("cover_tlit_deg", fields),
        Some("cover_tilt_deg")
    );
    assert_eq!(did_you_mean("liners", fields), Some("liner"));
    assert_eq!(did_you_mean("colour", fields), None);
    assert_eq!(
        did_you_mean("cover_tilt_deg", fields),
        None,
        "an exact match needs no hint"
    );
}

/// A small valid design; `{tilt}` and `{extra}` are filled in by the tests.
fn small_design(tilt: &str, extra: &str) -> String {
    format!(
        r#"materials = "materials/demo-market.toml"
[project]
title = "Small test (invented)"
[site]
name = "Test site (invented)"
latitude_deg = 14.2
longitude_deg = -23.6
utc_offset_h = -1
[site.climate]
source = "monthly"
ghi_kwh_m2_day = [5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5]
t_max_c = [30, 30, 30, 30, 30, 30, 30, 30, 30, 30, 30, 30]
t_min_c = [20, 20, 20, 20, 20, 20, 20, 20, 20, 20, 20, 20]
wind_m_s = [4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4, 4]
[[variant]]
name = "basin"
kind = "single-slope"
width_m = 1.0
length_m = 2.0
cover_azimuth_deg = 180
cover = "window-glass-4mm"
cover_tilt_deg = {tilt}
liner = "black-epdm"
{extra}
"#
    )
}

fn designs_dir() -> PathBuf {
    root().join("designs")
}

#[test]
fn the_error_format_names_file_line_column_path_value_and_range() {
    let text = small_design("95", "");
    let err = parse_design_str(&text, Path::new("my-still.toml"), &designs_dir()).unwrap_err();
    assert_eq!(err.0.len(), 1, "{err}");
    // Line 22 holds `cover_tilt_deg = 95`; the value starts in column 18.
    assert_eq!(
        err.to_string(),
        "my-still.toml:22:18: variant[1].cover_tilt_deg: 95 is out of range; allowed (0, 90) deg"
    );
}

#[test]
fn every_problem_is_reported_at_once() {
    let text = small_design(
        "0",
        "brine_depth_mm = 400\nvapour_leakage = 0.5\nwidht_m = 3",
    )
    .replace("latitude_deg = 14.2", "latitude_deg = -91");
    let err = parse_design_str(&text, Path::new("x.toml"), &designs_dir()).unwrap_err();
    let all = err.to_string();
    for path in [
        "variant[1].widht_m",
        "site.latitude_deg",
        "variant[1].cover_tilt_deg",
        "variant[1].brine_depth_mm",
        "variant[1].vapour_leakage",
    ] {
        assert!(all.contains(path), "missing {path} in:\n{all}");
    }
    assert!(all.contains("did you mean `width_m`?"), "{all}");
}

#[test]
fn a_shallow_cover_is_a_warning_not_an_error() {
    let loaded =
        parse_design_str(&small_design("5", ""), Path::new("x.toml"), &designs_dir()).unwrap();
    assert_eq!(loaded.warnings.len(), 1, "{:?}", loaded.warnings);
    assert_eq!(loaded.warnings[0].path, "variant[1].cover_tilt_deg");
}

#[test]
fn check_prints_warnings_in_its_summary() {
    let dir = tempfile::tempdir().unwrap();
    let mat = dir.path().join("materials");
    std::fs::create_dir(&mat).unwrap();
    std::fs::write(mat.join("demo-market.toml"), design::DEMO_LIBRARY).unwrap();
    let path = dir.path().join("shallow.toml");
    std::fs::write(&path, small_design("5", "")).unwrap();
    let out = Command::cargo_bin("stillbench")
        .unwrap()
        .arg("check")
        .arg(&path)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("warning:"), "{stdout}");
    assert!(stdout.contains("variant[1].cover_tilt_deg"), "{stdout}");
}

#[test]
fn defaults_are_applied() {
    let loaded =
        parse_design_str(&small_design("15", ""), Path::new("x.toml"), &designs_dir()).unwrap();
    let d = &loaded.design;
    assert_eq!(d.project.currency, "USD");
    assert!((d.site.feed_salinity_g_kg - 35.0).abs() < 1e-12);
    assert!((d.site.albedo - 0.2).abs() < 1e-12);
    let Climate::Monthly(m) = &d.site.climate else {
        panic!("monthly climate expected")
    };
    assert!(m.humidity_defaulted);
    assert_eq!(m.humidity, Humidity::RelativePercent([60.0; 12]));
    let VariantKind::SingleSlope(s) = &d.variants[0].kind else {
        panic!("single-slope expected")
    };
    assert!((s.front_wall_mm - 100.0).abs() < 1e-12);
    assert!((s.brine_depth_mm - 20.0).abs() < 1e-12);
    assert!((s.collection_efficiency - 0.85).abs() < 1e-12);
    assert!((s.vapour_leakage - 0.05).abs() < 1e-12);
}

#[test]
fn the_demo_has_one_variant_of_each_kind_and_derived_geometry() {
    let demo = load_demo().unwrap();
    let kinds: Vec<&str> = demo.design.variants.iter().map(|v| v.kind.name()).collect();
    assert_eq!(kinds, design::KIND_NAMES.to_vec());
    assert!(demo.warnings.is_empty(), "{:?}", demo.warnings);
    let basin = &demo.design.variants[0];
    let VariantKind::SingleSlope(s) = &basin.kind else {
        panic!("single-slope expected")
    };
    // Computed from the stated formula: back = 100 mm + 1000 mm · tan 15° = 367.95 mm.
    assert!((s.back_wall_mm(basin.width_m) - 367.949_192).abs() < 1e-3);
    // Cover area = footprint / cos 15° = 2 m² / 0.965926 = 2.070552 m².
    assert!((basin.cover_area_m2() - 2.070_552).abs() < 1e-5);
    // The embedded text is the file in designs/.
    let on_disk = std::fs::read_to_string(designs_dir().join("demo-coast.toml")).unwrap();
    assert_eq!(on_disk, DEMO_DESIGN);
}

#[test]
fn stepped_geometry_that_does_not_fit_is_rejected() {
    // tan 10° · 200 mm tread = 35.3 mm of cover rise per tray against a 120 mm riser: by the
    // fourth tray the steps pierce the cover.
    let text = small_design("15", "").replace(
        "kind = \"single-slope\"",
        "kind = \"stepped\"\ntrays = 5\nriser_mm = 120\nfront_wall_mm = 50",
    );
    let text = text.replace("cover_tilt_deg = 15", "cover_tilt_deg = 10");
    let text = text.replace("liner = \"black-epdm\"", "liner = \"black-paint\"");
    let err = parse_design_str(&text, Path::new("x.toml"), &designs_dir()).unwrap_err();
    assert!(err.to_string().contains("variant[1].riser_mm"), "{err}");
    // The same trays with a small riser fit.
    let ok = text.replace("riser_mm = 120", "riser_mm = 20");
    parse_design_str(&ok, Path::new("x.toml"), &designs_dir()).unwrap();
}

/// Tokens that tend to break TOML or our schema in interesting ways.
const TOKENS: [&str; 16] = [
    "nan",
    "inf",
    "-inf",
    "=",
    "\"",
    "[",
    "]",
    "[[variant]]\n",
    "\n",
    "{",
    "}",
    ",",
    "1e999",
    "é²",
    "kind = \"wick\"\n",
    "# c\n",
];

fn mutate(text: &str, ops: &[(u8, usize, usize)]) -> String {
    let mut bytes = text.as_bytes().to_vec();
    for &(op, pos, arg) in ops {
        let pos = if bytes.is_empty() {
            0
        } else {
            pos % (bytes.len() + 1)
        };
        match op % 4 {
            0 => {
                let end = (pos + arg % 40).min(bytes.len());
                bytes.drain(pos..end);
            }
            1 => {
                let tok = TOKENS[arg % TOKENS.len()].as_bytes();
                bytes.splice(pos..pos, tok.iter().copied());
            }
            2 => {
                if pos < bytes.len() {
                    bytes[pos] = (arg % 256) as u8;
                }
            }
            _ => bytes.truncate(pos),
        }
    }
    String::from_utf8_lossy(&bytes).into_owned()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    /// No mutation of a valid design makes the parser panic; every error it reports points
    /// inside the text it was given.
    #[test]
    fn parsing_mutated_designs_never_panics(
        ops in prop::collection::vec((any::<u8>(), any::<usize>(), any::<usize>()), 1..8)
    ) {
        let text = mutate(DEMO_DESIGN, &ops);
        let lines = text.lines().count().max(1) + 1;
        match parse_design_str(&text, Path::new("fuzz.toml"), &designs_dir()) {
            Ok(loaded) => prop_assert_eq!(loaded.design.variants.is_empty(), false),
            Err(errors) => {
                prop_assert!(!errors.0.is_empty());
                for issue in &errors.0 {
                    if issue.file == Path::new("fuzz.toml")
                        && let Some((line, col)) = issue.line_col
                    {
                        prop_assert!(line >= 1 && line <= lines && col >= 1, "{}", issue);
                    }
                }
            }
        }
    }

    /// Mutated materials libraries are rejected or accepted, never a panic.
    #[test]
    fn parsing_mutated_libraries_never_panics(
        ops in prop::collection::vec((any::<u8>(), any::<usize>(), any::<usize>()), 1..8)
    ) {
        let text = mutate(design::DEMO_LIBRARY, &ops);
        if let Err(errors) = design::parse_library(text.as_bytes(), Path::new("lib.toml")) {
            prop_assert!(!errors.0.is_empty());
        }
    }

    /// Arbitrary text, not derived from a design, is also handled without a panic.
    #[test]
    fn parsing_garbage_never_panics(text in "\\PC{0,400}") {
        let result = parse_design_str(&text, Path::new("junk.toml"), &designs_dir());
        if let Err(errors) = result {
            prop_assert!(!errors.0.is_empty());
        }
    }
}
