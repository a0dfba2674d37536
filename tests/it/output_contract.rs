//! The output contract (docs/output.md, issue 17): every command × every format, on the demo
//! and on a second design (southern hemisphere, another currency, climate from a weather
//! file): `--format json` is exactly one JSON document (an object with `schema_version`),
//! `--format csv` exactly one rectangular table with one header (the csv crate, strict), and
//! every table a command names in `--table list` can be written, alone or all at once.

use std::path::{Path, PathBuf};
use std::process::Output;

use assert_cmd::Command;
use serde_json::Value;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn stillbench() -> Command {
    let mut c = Command::cargo_bin("stillbench").unwrap();
    c.current_dir(root()).env("NO_COLOR", "1");
    c
}

/// A synthetic hourly year for an invented site at 34.2° S, 65.3° W, UTC−3 (a clear-sky-like
/// shape scaled to 60 % of the extraterrestrial irradiance, with a seasonal temperature; all
/// invented test data, not a measurement). The sun is a simple declination/hour-angle model;
/// below 6° of elevation the file says 0 W/m², so no row can be sunlit at night whatever
/// the loader's more exact sun position says.
fn write_weather_year(path: &Path) {
    use std::fmt::Write;
    let (lat, lon, utc) = (-34.2_f64.to_radians(), -65.3_f64, -3.0_f64);
    let mut s = String::from("timestamp,ghi_w_m2,t_air_c,wind_m_s\n");
    for d in 0..365 {
        let date = chrono::NaiveDate::from_yo_opt(2026, 1).unwrap() + chrono::Duration::days(d);
        let n = (d + 1) as f64;
        let decl = (23.45_f64 * ((360.0 * (284.0 + n) / 365.0).to_radians()).sin()).to_radians();
        // Period-ending stamps: the row stamped hh:00 covers the hour before it (hour 24 is
        // 00:00 of the next day).
        for h in 1..=24 {
            let clock_mid = f64::from(h) - 0.5;
            let solar = clock_mid + (lon - 15.0 * utc) / 15.0;
            let omega = (15.0 * (solar - 12.0)).to_radians();
            let cosz = lat.sin() * decl.sin() + lat.cos() * decl.cos() * omega.cos();
            let ghi = if cosz > 0.1 { 0.6 * 1367.0 * cosz } else { 0.0 };
            let season = (2.0 * std::f64::consts::PI * (n - 15.0) / 365.0).cos(); // +1 in January
            let t = 15.0 + 8.0 * season + 6.0 * omega.cos().max(0.0);
            let (day, hour) = if h == 24 {
                (date + chrono::Duration::days(1), 0)
            } else {
                (date, h)
            };
            let _ = writeln!(
                s,
                "{}T{hour:02}:00:00-03:00,{ghi:.1},{t:.1},3.0",
                day.format("%Y-%m-%d")
            );
        }
    }
    std::fs::write(path, s).unwrap();
}

/// The second design: the southern demo's variants, counted in ARS (a copy of the demo
/// materials library with its currency changed, an invented exchange rate for the ranking's
/// money references and invented local labour rates), with the climate
/// from [`write_weather_year`].
fn weather_design(dir: &Path) -> PathBuf {
    let lib = std::fs::read_to_string(root().join("designs/materials/demo-market.toml"))
        .unwrap()
        .replace("currency = \"USD\"", "currency = \"ARS\"");
    std::fs::write(dir.join("market-ars.toml"), lib).unwrap();
    write_weather_year(&dir.join("year.csv"));
    let demo = std::fs::read_to_string(root().join("designs/demo-highland-south.toml")).unwrap();
    let start = demo.find("[site.climate]").unwrap();
    let end = demo.find("[[variant]]").unwrap();
    let text = format!(
        "{}[site.climate]\nsource = \"weather-file\"\npath = \"year.csv\"\nformat = \"csv\"\n\n\
         [site.climate.columns]\ntimestamp = \"timestamp\"\nghi_w_m2 = \"ghi_w_m2\"\n\
         t_air_c = \"t_air_c\"\nwind_m_s = \"wind_m_s\"\n\n{}",
        &demo[..start],
        &demo[end..]
    )
    .replace("materials/demo-market.toml", "market-ars.toml")
    .replace(
        "currency = \"USD\"",
        "currency = \"ARS\"\n\n[project.money_scales]\nper_usd = 1000\n\
         rate_date = \"2026-11-30\"\nsource = \"invented test rate\"",
    );
    // Local labour rates in ARS (invented), required for a design not counting in USD.
    let text = format!("{text}\n[costs]\nlabour_rate_per_h = 2500\noperator_rate_per_h = 1200\n");
    let path = dir.join("weather-south.toml");
    std::fs::write(&path, text).unwrap();
    path
}

/// A JSON value that refuses an object with the same key twice (serde_json's `Value` keeps
/// the last silently; a flattened struct can repeat a field).
struct NoDuplicates;

impl<'de> serde::de::DeserializeSeed<'de> for NoDuplicates {
    type Value = ();
    fn deserialize<D: serde::Deserializer<'de>>(self, d: D) -> Result<(), D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> serde::de::Visitor<'de> for NoDuplicates {
    type Value = ();
    fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        f.write_str("any JSON value")
    }
    fn visit_bool<E>(self, _: bool) -> Result<(), E> {
        Ok(())
    }
    fn visit_i64<E>(self, _: i64) -> Result<(), E> {
        Ok(())
    }
    fn visit_u64<E>(self, _: u64) -> Result<(), E> {
        Ok(())
    }
    fn visit_f64<E>(self, _: f64) -> Result<(), E> {
        Ok(())
    }
    fn visit_str<E>(self, _: &str) -> Result<(), E> {
        Ok(())
    }
    fn visit_unit<E>(self) -> Result<(), E> {
        Ok(())
    }
    fn visit_seq<A: serde::de::SeqAccess<'de>>(self, mut a: A) -> Result<(), A::Error> {
        while a.next_element_seed(NoDuplicates)?.is_some() {}
        Ok(())
    }
    fn visit_map<A: serde::de::MapAccess<'de>>(self, mut a: A) -> Result<(), A::Error> {
        let mut seen = std::collections::HashSet::new();
        while let Some(k) = a.next_key::<String>()? {
            if !seen.insert(k.clone()) {
                return Err(serde::de::Error::custom(format!("key `{k}` twice")));
            }
            a.next_value_seed(NoDuplicates)?;
        }
        Ok(())
    }
}

/// Exactly one JSON document, an object whose `schema_version` is a positive integer and
/// with no key twice in any object.
fn one_json(label: &str, stdout: &[u8]) -> Value {
    let v: Value = serde_json::from_slice(stdout).unwrap_or_else(|e| {
        panic!(
            "{label}: not one JSON document ({e}):\n{}",
            String::from_utf8_lossy(&stdout[..stdout.len().min(2000)])
        )
    });
    let mut de = serde_json::Deserializer::from_slice(stdout);
    serde::de::DeserializeSeed::deserialize(NoDuplicates, &mut de)
        .unwrap_or_else(|e| panic!("{label}: {e}"));
    assert!(
        v.get("schema_version").and_then(Value::as_u64) == Some(1),
        "{label}: no schema_version 1 at the top of the document"
    );
    v
}

/// Exactly one rectangular CSV table: a header, every record with the header's field count,
/// no blank line, and no record repeating the header.
fn one_csv(label: &str, stdout: &[u8]) -> (Vec<String>, Vec<Vec<String>>) {
    let text = String::from_utf8(stdout.to_vec()).unwrap();
    assert!(!text.trim().is_empty(), "{label}: empty CSV");
    let mut r = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(false)
        .from_reader(stdout);
    let header: Vec<String> = r
        .headers()
        .unwrap_or_else(|e| panic!("{label}: {e}"))
        .iter()
        .map(str::to_owned)
        .collect();
    assert!(header.iter().all(|h| !h.is_empty()), "{label}: {header:?}");
    let mut rows = Vec::new();
    for rec in r.records() {
        let rec = rec.unwrap_or_else(|e| panic!("{label}: not one rectangular table: {e}"));
        let row: Vec<String> = rec.iter().map(str::to_owned).collect();
        assert_ne!(row, header, "{label}: the header repeats");
        rows.push(row);
    }
    // The csv reader skips blank lines; a blank line outside quotes means a second table.
    let mut inside_quotes = false;
    for line in text.lines() {
        if !inside_quotes {
            assert!(!line.is_empty(), "{label}: a blank line splits the CSV");
        }
        if line.matches('"').count() % 2 == 1 {
            inside_quotes = !inside_quotes;
        }
    }
    (header, rows)
}

fn run(label: &str, args: &[String]) -> Output {
    let out = stillbench().args(args).output().unwrap();
    assert!(
        out.status.success(),
        "{label}: exit {:?}\n{}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

fn strings(a: &[&str]) -> Vec<String> {
    a.iter().map(|s| (*s).to_owned()).collect()
}

/// Run one command in every format it has: text (not empty), JSON (one document), and CSV
/// with each of its tables (from `--table list`) and `--table all --out DIR`.
fn every_format(label: &str, args: &[String], json: bool, csv: bool, tmp: &Path) {
    let text = run(&format!("{label} text"), args);
    assert!(!text.stdout.is_empty(), "{label}: no text output");
    // No Rust internals in what people read (issue 17 item 6): no paths, no debug values.
    let words = String::from_utf8_lossy(&text.stdout);
    for internal in ["::", "Some(", "None", "{ ", "Ok(", "Err("] {
        assert!(
            !words.contains(internal),
            "{label}: `{internal}` in the text output:\n{words}"
        );
    }
    if json {
        let mut a = args.to_vec();
        a.extend(strings(&["--format", "json"]));
        one_json(
            &format!("{label} json"),
            &run(&format!("{label} json"), &a).stdout,
        );
    }
    if csv {
        let mut a = args.to_vec();
        a.extend(strings(&["--format", "csv"]));
        one_csv(
            &format!("{label} csv"),
            &run(&format!("{label} csv"), &a).stdout,
        );
        let mut l = a.clone();
        l.extend(strings(&["--table", "list"]));
        let list = String::from_utf8(run(&format!("{label} --table list"), &l).stdout).unwrap();
        let names: Vec<String> = list
            .lines()
            .filter_map(|l| l.split_whitespace().next())
            .map(str::to_owned)
            .collect();
        assert!(!names.is_empty(), "{label}: --table list names nothing");
        for name in &names {
            let mut t = a.clone();
            t.extend(["--table".to_owned(), name.clone()]);
            let l = format!("{label} csv --table {name}");
            let out = stillbench().args(&t).output().unwrap();
            if out.status.code() == Some(2) {
                // A table that needs an option not given (compare's `uncertainty` without
                // --samples) is refused, naming --table, with nothing on standard output.
                let err = String::from_utf8_lossy(&out.stderr);
                assert!(
                    err.contains("--table") && out.stdout.is_empty(),
                    "{l}: {err}"
                );
                continue;
            }
            assert!(out.status.success(), "{l}: {out:?}");
            one_csv(&l, &out.stdout);
        }
        let dir = tmp.join(label.replace([' ', '/', '.'], "_"));
        let mut all = a.clone();
        all.extend(strings(&["--table", "all", "--out"]));
        all.push(dir.display().to_string());
        run(&format!("{label} --table all"), &all);
        for name in &names {
            let p = dir.join(format!("{name}.csv"));
            let bytes = std::fs::read(&p).unwrap_or_else(|e| panic!("{label}: {p:?}: {e}"));
            one_csv(&format!("{label} {p:?}"), &bytes);
        }
    }
}

#[test]
fn every_command_and_format_gives_one_document_or_one_table() {
    let tmp = tempfile::tempdir().unwrap();
    let weather = weather_design(tmp.path());
    let w = weather.display().to_string();
    let designs: [(&str, String, &str, Vec<String>); 2] = [
        (
            "demo",
            "designs/demo-coast.toml".into(),
            "glass-basin",
            vec![],
        ),
        (
            "weather",
            w,
            "north-basin",
            strings(&["--scales", "cost=100,capital=200000"]),
        ),
    ];
    for (tag, d, variant, scales) in &designs {
        // (name, arguments, JSON, CSV)
        let cases: Vec<(&str, Vec<String>, bool, bool)> = vec![
            ("check", strings(&["check", d]), true, false),
            ("climate", strings(&["climate", d]), true, true),
            ("simulate", strings(&["simulate", d]), true, true),
            (
                "simulate-hourly",
                strings(&["simulate", d, "--hourly"]),
                true,
                true,
            ),
            ("cost", strings(&["cost", d, "--substitutes"]), true, true),
            ("operate", strings(&["operate", d]), true, true),
            (
                "operate-sweep",
                strings(&["operate", d, "--depth-sweep", "10..30", "--step", "10"]),
                true,
                true,
            ),
            (
                "compare",
                [strings(&["compare", d]), scales.clone()].concat(),
                true,
                true,
            ),
            (
                "compare-samples",
                [strings(&["compare", d, "--samples", "20"]), scales.clone()].concat(),
                true,
                true,
            ),
            (
                "audit",
                strings(&[
                    "audit",
                    "--site",
                    d,
                    "--kind",
                    "single-slope",
                    "--area",
                    "1",
                    "--litres-per-day",
                    "3",
                ]),
                true,
                false,
            ),
            (
                "sweep",
                strings(&[
                    "sweep",
                    d,
                    "--variant",
                    variant,
                    "--param",
                    "cover_tilt_deg=20..40:10",
                ]),
                true,
                true,
            ),
            (
                "size",
                strings(&["size", d, "--demand", "50", "--years", "3"]),
                true,
                true,
            ),
            (
                "uncertainty",
                strings(&["uncertainty", d, "--samples", "20"]),
                true,
                true,
            ),
        ];
        for (name, args, json, csv) in cases {
            if *tag == "weather" && ["compare-samples", "size", "uncertainty"].contains(&name) {
                // Stochastic years come from monthly means: a weather-file site is refused
                // cleanly (exit 2, nothing on standard output), in every format.
                for f in ["text", "json", "csv"] {
                    let out = stillbench()
                        .args(&args)
                        .args(["--format", f])
                        .output()
                        .unwrap();
                    assert_eq!(out.status.code(), Some(2), "{tag} {name} {f}: {out:?}");
                    assert!(out.stdout.is_empty(), "{tag} {name} {f}");
                    let err = String::from_utf8_lossy(&out.stderr);
                    assert!(err.contains("weather file"), "{tag} {name} {f}: {err}");
                }
                continue;
            }
            every_format(&format!("{tag} {name}"), &args, json, csv, tmp.path());
        }
    }
}

#[test]
fn a_csv_table_that_does_not_exist_is_refused_with_the_names() {
    let out = stillbench()
        .args([
            "simulate",
            "designs/demo-coast.toml",
            "--format",
            "csv",
            "--table",
            "weekly",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("monthly") && err.contains("hourly"), "{err}");
    // --table without CSV, and `all` without a folder, are refused before any run.
    for extra in [
        &["--table", "monthly"][..],
        &["--format", "csv", "--table", "all"],
    ] {
        let out = stillbench()
            .args(["simulate", "designs/demo-coast.toml"])
            .args(extra)
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2), "{extra:?}");
        assert!(out.stdout.is_empty(), "{extra:?}");
    }
}

#[test]
fn hourly_simulation_csv_is_one_table_per_request_and_all_tables_go_to_a_folder() {
    let tmp = tempfile::tempdir().unwrap();
    let base = [
        "simulate",
        "designs/demo-coast.toml",
        "--variant",
        "glass-basin",
    ];
    // Asking for the hourly table is enough: it needs no --hourly.
    let hourly = run(
        "hourly",
        &strings(&[&base[..], &["--format", "csv", "--table", "hourly"]].concat()),
    );
    let (header, rows) = one_csv("hourly", &hourly.stdout);
    assert_eq!(header[0], "variant");
    assert!(header.contains(&"t_brine_c".to_owned()), "{header:?}");
    // 12 average days of 24 hours.
    assert_eq!(rows.len(), 12 * 24);
    let dir = tmp.path().join("out");
    let args = strings(
        &[
            &base[..],
            &["--hourly", "--format", "csv", "--table", "all", "--out"],
            &[dir.to_str().unwrap()],
        ]
        .concat(),
    );
    run("all", &args);
    let monthly = std::fs::read(dir.join("monthly.csv")).unwrap();
    assert_eq!(one_csv("monthly.csv", &monthly).1.len(), 12);
    let again = std::fs::read(dir.join("hourly.csv")).unwrap();
    assert_eq!(again, hourly.stdout);
    // A second run refuses to replace them without --force, and leaves them as they were.
    let refused = stillbench().args(&args).output().unwrap();
    assert_eq!(refused.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&refused.stderr).contains("--force"));
    assert_eq!(std::fs::read(dir.join("hourly.csv")).unwrap(), again);
    let mut forced = args.clone();
    forced.push("--force".into());
    run("forced", &forced);
}

#[test]
fn a_depth_study_of_several_variants_is_one_document_and_one_table() {
    let base = strings(&[
        "operate",
        "designs/demo-highland-south.toml",
        "--depth-sweep",
        "10..30",
        "--step",
        "10",
    ]);
    let json = run(
        "json",
        &[base.clone(), strings(&["--format", "json"])].concat(),
    );
    let v = one_json("json", &json.stdout);
    let variants = v["variants"].as_array().unwrap();
    assert!(variants.len() >= 2, "{v}");
    for s in variants {
        assert_eq!(s["points"].as_array().unwrap().len(), 3, "{s}");
    }
    let csv = run("csv", &[base, strings(&["--format", "csv"])].concat());
    let (_, rows) = one_csv("csv", &csv.stdout);
    assert_eq!(rows.len(), 3 * variants.len());
}

#[test]
fn check_json_lists_every_problem_with_its_place_and_exits_2() {
    let out = stillbench()
        .args([
            "check",
            "tests/data/bad/several-errors.toml",
            "--format",
            "json",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let v = one_json("check", &out.stdout);
    assert_eq!(v["valid"], false);
    let problems = v["problems"].as_array().unwrap();
    // tests/data/bad/several-errors.toml holds three out-of-range values.
    assert_eq!(problems.len(), 3, "{v}");
    assert_eq!(v["errors"], 3);
    for p in problems {
        assert_eq!(p["severity"], "error");
        assert!(
            p["line"].as_u64().is_some() && p["column"].as_u64().is_some(),
            "{p}"
        );
        assert!(!p["field"].as_str().unwrap().is_empty(), "{p}");
        assert!(p["message"].as_str().unwrap().contains("allowed"), "{p}");
    }
    assert_eq!(problems[0]["field"], "site.latitude_deg");
}

/// The number after `key` in `text` (the first one).
fn number_after(text: &str, key: &str) -> f64 {
    let at = text
        .find(key)
        .unwrap_or_else(|| panic!("no `{key}` in\n{text}"))
        + key.len();
    let tail: String = text[at..]
        .trim_start()
        .chars()
        .take_while(|c| c.is_ascii_digit() || *c == '.' || *c == '-')
        .collect();
    tail.parse()
        .unwrap_or_else(|_| panic!("no number after `{key}`: {tail}"))
}

#[test]
fn headline_figures_agree_across_text_json_and_csv() {
    // simulate: annual and worst-month yield of one variant on the southern demo.
    let base = strings(&[
        "simulate",
        "designs/demo-highland-south.toml",
        "--variant",
        "north-basin",
    ]);
    let text = String::from_utf8(run("text", &base).stdout).unwrap();
    let json = one_json(
        "json",
        &run(
            "json",
            &[base.clone(), strings(&["--format", "json"])].concat(),
        )
        .stdout,
    );
    let (header, rows) = one_csv(
        "csv",
        &run("csv", &[base, strings(&["--format", "csv"])].concat()).stdout,
    );
    let v = &json["variants"][0];
    let annual_l_m2 = v["annual_l_m2"].as_f64().unwrap();
    let worst = v["worst_month"]["l_m2_day"].as_f64().unwrap();
    // Text rounds the annual figure to a litre and the worst month to 0.01 L/m²/day.
    let text_annual = number_after(&text, "L (");
    assert!(
        (text_annual - annual_l_m2).abs() <= 0.5,
        "{text_annual} vs {annual_l_m2}"
    );
    let text_worst = number_after(&text, " at ");
    assert!(
        (text_worst - worst).abs() <= 0.005,
        "{text_worst} vs {worst}"
    );
    // CSV: the worst month is the smallest monthly yield (4 decimals), and the annual yield
    // the sum over months of the daily yield times the days in the month.
    let col = header.iter().position(|h| h == "l_m2_day").unwrap();
    let daily: Vec<f64> = rows.iter().map(|r| r[col].parse().unwrap()).collect();
    let csv_worst = daily.iter().copied().fold(f64::INFINITY, f64::min);
    assert!((csv_worst - worst).abs() <= 5e-5, "{csv_worst} vs {worst}");
    const DAYS: [f64; 12] = [
        31.0, 28.0, 31.0, 30.0, 31.0, 30.0, 31.0, 31.0, 30.0, 31.0, 30.0, 31.0,
    ];
    let csv_annual: f64 = daily.iter().zip(DAYS).map(|(d, n)| d * n).sum();
    assert!(
        (csv_annual - annual_l_m2).abs() <= 0.02,
        "{csv_annual} vs {annual_l_m2}"
    );

    // cost: the cost per litre and its currency.
    let base = strings(&[
        "cost",
        "designs/demo-coast.toml",
        "--variant",
        "glass-basin",
    ]);
    let text = String::from_utf8(run("text", &base).stdout).unwrap();
    let json = one_json(
        "json",
        &run(
            "json",
            &[base.clone(), strings(&["--format", "json"])].concat(),
        )
        .stdout,
    );
    let (header, rows) = one_csv(
        "csv",
        &run(
            "csv",
            &[base, strings(&["--format", "csv", "--table", "summary"])].concat(),
        )
        .stdout,
    );
    let c = &json["variants"][0]["cost"]["cost"];
    let per_l = c["cost_per_litre"].as_f64().unwrap();
    let at = |name: &str| &rows[0][header.iter().position(|h| h == name).unwrap()];
    assert!((at("cost_per_l").parse::<f64>().unwrap() - per_l).abs() < 1e-12);
    assert_eq!(at("currency"), c["currency"].as_str().unwrap());
    // Text: "levelised … L/year: 0.0123 USD/L" to 4 decimals.
    let text_per_l = number_after(&text, "L/year:");
    assert!(
        (text_per_l - per_l).abs() <= 5e-5,
        "{text_per_l} vs {per_l}"
    );
}

#[test]
fn completions_and_man_pages_come_from_the_same_definitions_as_help() {
    for shell in ["bash", "zsh", "fish", "powershell", "elvish"] {
        let out = run(shell, &strings(&["completions", shell]));
        let script = String::from_utf8(out.stdout).unwrap();
        // Every command and a command's own option are offered.
        for word in ["simulate", "uncertainty", "--depth-sweep", "--table"] {
            assert!(script.contains(word), "{shell}: no `{word}`");
        }
    }
    let page = String::from_utf8(run("man", &strings(&["man"])).stdout).unwrap();
    assert!(page.starts_with(".ie") || page.starts_with(".TH"), "{page}");
    assert!(page.contains(".TH stillbench 1"), "{page}");
    for command in ["check", "climate", "simulate", "report", "completions"] {
        assert!(page.contains(command), "no {command} in the man page");
    }
    let sim =
        String::from_utf8(run("man simulate", &strings(&["man", "simulate"])).stdout).unwrap();
    assert!(
        sim.contains(".TH stillbench\\-simulate 1") || sim.contains(".TH stillbench-simulate 1"),
        "{sim}"
    );
    assert!(
        sim.contains("\\-\\-table") && sim.contains("\\-\\-hourly"),
        "{sim}"
    );
    let bad = stillbench().args(["man", "simualte"]).output().unwrap();
    assert_eq!(bad.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&bad.stderr).contains("simulate"));
}
