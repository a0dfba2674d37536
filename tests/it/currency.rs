//! Any currency, end to end: a design and its materials library converted from USD to another
//! currency at a stated rate rank, size and cost exactly as the USD original, with every money
//! figure the USD figure times the rate; and the slips between a design's currency and its
//! library's are errors.
//!
//! The rate is a test value (any positive number must work), not a market quote.

use assert_cmd::Command;
use serde_json::Value;
use std::path::{Path, PathBuf};
use toml_edit::{DocumentMut, Item, value};

/// Meticais per US dollar for the conversion. A test value, not a market quote.
const RATE: f64 = 63.9;

fn stillbench() -> Command {
    Command::cargo_bin("stillbench").unwrap()
}

/// Multiply the number at `key` of `t` by `f`, if it is there.
fn scale(t: &mut toml_edit::Table, key: &str, f: f64) {
    if let Some(x) = t
        .get(key)
        .and_then(|i| i.as_float().or(i.as_integer().map(|n| n as f64)))
    {
        t[key] = value(x * f);
    }
}

/// The demo library with every price (`unit_price`, `import_cost`) times `RATE`, in MZN.
fn converted_library() -> String {
    let text = std::fs::read_to_string("designs/materials/demo-market.toml").unwrap();
    let mut doc: DocumentMut = text.parse().unwrap();
    doc["library"]["currency"] = value("MZN");
    let items = doc["item"].as_array_of_tables_mut().unwrap();
    for it in items.iter_mut() {
        scale(it, "unit_price", RATE);
        scale(it, "import_cost", RATE);
    }
    doc.to_string()
}

/// A demo design counting in MZN over the converted library: the labour rates (their USD
/// defaults unless the design gives them) and every alternative's price times `RATE`, and
/// the exchange rate stated in `[project.money_scales]`.
fn converted_design(design: &str, library: &Path) -> String {
    let text = std::fs::read_to_string(design).unwrap();
    let mut doc: DocumentMut = text.parse().unwrap();
    doc["materials"] = value(library.to_str().unwrap());
    doc["project"]["currency"] = value("MZN");
    let mut m = toml_edit::Table::new();
    m["per_usd"] = value(RATE);
    m["rate_date"] = value("2026-11-30");
    m["source"] = value("test rate, not a market quote");
    doc["project"]["money_scales"] = Item::Table(m);
    let defaults = stillbench::design::Costs::default();
    if doc.get("costs").is_none() {
        doc["costs"] = Item::Table(toml_edit::Table::new());
    }
    let costs = doc["costs"].as_table_mut().unwrap();
    for (key, default) in [
        ("labour_rate_per_h", defaults.labour_rate_per_h),
        ("operator_rate_per_h", defaults.operator_rate_per_h),
    ] {
        if costs.get(key).is_none() {
            costs[key] = value(default);
        }
        scale(costs, key, RATE);
    }
    if let Some(alts) = doc
        .get_mut("alternative")
        .and_then(|a| a.as_array_of_tables_mut())
    {
        for a in alts.iter_mut() {
            scale(a, "cost_per_litre", RATE);
        }
    }
    doc.to_string()
}

/// The USD original and its MZN twin, written into a temporary folder.
fn twins(design: &str) -> (tempfile::TempDir, PathBuf, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let lib = dir.path().join("market-mzn.toml");
    std::fs::write(&lib, converted_library()).unwrap();
    let mzn = dir.path().join("design-mzn.toml");
    std::fs::write(&mzn, converted_design(design, &lib)).unwrap();
    (dir, PathBuf::from(design), mzn)
}

/// The last key on a JSON path that names a money figure (`scales` by its index).
fn is_money(path: &[String]) -> bool {
    const MONEY: [&str; 27] = [
        "capital",
        "unit_capital",
        "cost",
        "unit_price",
        "import_extra",
        "annualised",
        "capital_per_m2",
        "cost_per_litre",
        "cost_per_l",
        "capital_per_l_day",
        "cost_per_person_year",
        "labour_cost",
        "materials",
        "operator_cost_per_year",
        "cost_each",
        "present_worth",
        "replacements_present_worth",
        "running_per_year",
        "salvage",
        "upkeep_per_year",
        "cost_per_l_p10",
        "cost_per_l_p90",
        "unit_operator_cost_per_year",
        "unit_share_cost",
        "single_unit_materials",
        "single_unit_capital",
        "installation_capital",
    ];
    let Some(last) = path.iter().rev().find(|k| !k.starts_with('[')) else {
        return false;
    };
    if last == "scales" {
        // Criterion order: yield, worst-month, cost, capital, complexity.
        return matches!(path.last().map(String::as_str), Some("[2]") | Some("[3]"));
    }
    MONEY.contains(&last.as_str())
}

/// Walk two JSON documents side by side: the same shape, the same names, every money number
/// times `RATE` and every other number unchanged (relative 1e-9).
fn same_but_money(usd: &Value, mzn: &Value, path: &mut Vec<String>, bad: &mut Vec<String>) {
    match (usd, mzn) {
        // A report table: each cell is named by its column; a row whose `unit` cell is in USD
        // holds a money figure.
        (Value::Object(a), Value::Object(b))
            if a.contains_key("columns") && a.contains_key("rows") =>
        {
            let cols: Vec<String> = a["columns"]
                .as_array()
                .unwrap()
                .iter()
                .map(|c| c.as_str().unwrap().to_owned())
                .collect();
            let unit = cols.iter().position(|c| c == "unit");
            let (ra, rb) = (a["rows"].as_array().unwrap(), b["rows"].as_array().unwrap());
            if ra.len() != rb.len() || a["columns"] != b["columns"] {
                bad.push(format!("{}: tables differ in shape", path.join(".")));
                return;
            }
            for (i, (x, y)) in ra.iter().zip(rb).enumerate() {
                let (x, y) = (x.as_array().unwrap(), y.as_array().unwrap());
                let money_row =
                    unit.is_some_and(|u| x[u].as_str().is_some_and(|s| s.contains("USD")));
                for (j, col) in cols.iter().enumerate() {
                    path.push(format!("row {i}"));
                    path.push(if money_row {
                        "cost".to_owned()
                    } else {
                        col.clone()
                    });
                    if col == "unit" {
                        let want = x[j].as_str().unwrap().replace("USD", "MZN");
                        if y[j].as_str() != Some(&want) {
                            bad.push(format!("{}: unit {:?} vs {:?}", path.join("."), x[j], y[j]));
                        }
                    } else {
                        same_but_money(&x[j], &y[j], path, bad);
                    }
                    path.pop();
                    path.pop();
                }
            }
        }
        (Value::Object(a), Value::Object(b)) => {
            let ka: Vec<&String> = a.keys().collect();
            let kb: Vec<&String> = b.keys().collect();
            if ka != kb {
                bad.push(format!("{}: keys {ka:?} vs {kb:?}", path.join(".")));
                return;
            }
            for (k, v) in a {
                path.push(k.clone());
                same_but_money(v, &b[k], path, bad);
                path.pop();
            }
        }
        (Value::Array(a), Value::Array(b)) => {
            if a.len() != b.len() {
                bad.push(format!(
                    "{}: {} vs {} items",
                    path.join("."),
                    a.len(),
                    b.len()
                ));
                return;
            }
            for (i, (x, y)) in a.iter().zip(b).enumerate() {
                path.push(format!("[{i}]"));
                same_but_money(x, y, path, bad);
                path.pop();
            }
        }
        (Value::Number(a), Value::Number(b)) => {
            let (a, b) = (a.as_f64().unwrap(), b.as_f64().unwrap());
            let want = if is_money(path) { a * RATE } else { a };
            if (b - want).abs() > 1e-9 * want.abs().max(1e-6) {
                bad.push(format!(
                    "{}: USD {a} → MZN {b}, want {want}",
                    path.join(".")
                ));
            }
        }
        (Value::String(a), Value::String(b)) => {
            let key = path.last().map(String::as_str).unwrap_or("");
            if matches!(key, "name" | "variant" | "kind" | "worst_month") && a != b {
                bad.push(format!("{}: {a:?} vs {b:?}", path.join(".")));
            }
        }
        (a, b) if a == b => {}
        (a, b) => bad.push(format!("{}: {a} vs {b}", path.join("."))),
    }
}

fn json_of(args: &[&str]) -> Value {
    let out = stillbench().args(args).output().unwrap();
    assert!(out.status.success(), "{args:?}: {out:?}");
    serde_json::from_slice(&out.stdout).unwrap()
}

fn check_twins(design: &str) {
    let (_dir, usd, mzn) = twins(design);
    let (usd, mzn) = (usd.to_str().unwrap(), mzn.to_str().unwrap());
    for cmd in [
        vec!["compare", "--format", "json"],
        vec!["size", "--format", "json"],
        vec!["cost", "--format", "json"],
    ] {
        let a = json_of(&[&[cmd[0], usd], &cmd[1..]].concat());
        let b = json_of(&[&[cmd[0], mzn], &cmd[1..]].concat());
        let mut bad = Vec::new();
        same_but_money(&a, &b, &mut Vec::new(), &mut bad);
        assert!(bad.is_empty(), "{design} {}:\n{}", cmd[0], bad.join("\n"));
    }
    let cur = |v: &Value| v["currency"].as_str().map(str::to_owned);
    assert_eq!(
        cur(&json_of(&["compare", mzn, "--format", "json"])).as_deref(),
        Some("MZN")
    );
}

#[test]
fn a_design_converted_to_meticais_ranks_sizes_and_costs_as_in_dollars() {
    check_twins("designs/demo-coast.toml");
}

#[test]
fn a_southern_design_converted_to_meticais_ranks_sizes_and_costs_as_in_dollars() {
    check_twins("designs/demo-highland-south.toml");
}

#[test]
fn the_report_of_a_meticais_design_writes_and_states_its_rate() {
    let (dir, usd, mzn) = twins("designs/demo-highland-south.toml");
    let mut tables = Vec::new();
    for (design, name) in [(&usd, "usd"), (&mzn, "mzn")] {
        let out = dir.path().join(name);
        let run = stillbench()
            .env("SOURCE_DATE_EPOCH", "1790000000")
            .args([
                "report",
                design.to_str().unwrap(),
                "--out",
                out.to_str().unwrap(),
            ])
            .args(["--samples", "40", "--years", "3"])
            .output()
            .unwrap();
        assert!(run.status.success(), "{name}: {run:?}");
        tables.push(out);
    }
    let md = std::fs::read_to_string(tables[1].join("report.md")).unwrap();
    assert!(md.contains("MZN/L"), "money in meticais");
    assert!(!md.contains("USD/L"), "no figure left in dollars");
    assert!(
        md.contains("converted at 63.9 MZN per USD (rate of 2026-11-30; source: test rate"),
        "the report states the rate, its date and its source"
    );
    // Every table the report exports: same figures, money times the rate.
    let mut n = 0;
    for e in std::fs::read_dir(tables[0].join("tables")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().and_then(|x| x.to_str()) != Some("json") {
            continue;
        }
        let read = |p: &Path| -> Value {
            serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
        };
        let twin = tables[1].join("tables").join(p.file_name().unwrap());
        let mut bad = Vec::new();
        same_but_money(&read(&p), &read(&twin), &mut Vec::new(), &mut bad);
        assert!(bad.is_empty(), "{}:\n{}", p.display(), bad.join("\n"));
        n += 1;
    }
    assert!(n >= 3, "the report exports its tables ({n} found)");
}

/// The design file with `edit` applied to its TOML, written beside a copy of the demo library.
fn edited(
    edit: impl FnOnce(&mut DocumentMut),
    library: Option<String>,
) -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let lib = dir.path().join("market.toml");
    std::fs::write(
        &lib,
        library.unwrap_or_else(|| {
            std::fs::read_to_string("designs/materials/demo-market.toml").unwrap()
        }),
    )
    .unwrap();
    let text = std::fs::read_to_string("designs/demo-highland-south.toml").unwrap();
    let mut doc: DocumentMut = text.parse().unwrap();
    doc["materials"] = value(lib.to_str().unwrap());
    edit(&mut doc);
    let p = dir.path().join("design.toml");
    std::fs::write(&p, doc.to_string()).unwrap();
    (dir, p)
}

fn check_fails(design: &Path, field: &str) {
    for cmd in ["check", "compare", "report"] {
        let out = stillbench()
            .args([cmd, design.to_str().unwrap()])
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{cmd}: {err}");
        assert!(err.contains(field), "{cmd} names {field}: {err}");
        assert!(err.contains("design.toml"), "{cmd} names the file: {err}");
    }
}

#[test]
fn a_dollar_design_over_a_meticais_library_is_an_error() {
    let (_d, p) = edited(|_| {}, Some(converted_library()));
    check_fails(&p, "project.currency");
}

#[test]
fn a_meticais_design_without_its_money_references_or_local_rates_is_an_error() {
    let (_d, p) = edited(
        |d| d["project"]["currency"] = value("MZN"),
        Some(converted_library()),
    );
    check_fails(&p, "project.money_scales");
    check_fails(&p, "costs.labour_rate_per_h");
    check_fails(&p, "costs.operator_rate_per_h");
}

#[test]
fn money_scales_are_checked() {
    type Change = fn(&mut toml_edit::Table);
    let cases: [(&str, Change); 4] = [
        ("project.money_scales.rate_date", |m| {
            m.remove("rate_date");
        }),
        ("project.money_scales.rate_date", |m| {
            m["rate_date"] = value("30/11/2026");
        }),
        ("project.money_scales.per_usd", |m| {
            m["per_usd"] = value(-3.0);
        }),
        ("project.money_scales", |m| {
            m.remove("per_usd");
            m.remove("rate_date");
            m["cost_per_litre"] = value(6.0);
        }),
    ];
    for (field, change) in cases {
        let lib = converted_library();
        let (_d, p) = edited(
            |d| {
                let text = converted_design("designs/demo-highland-south.toml", Path::new("x"));
                let mut c: DocumentMut = text.parse().unwrap();
                c["materials"] = d["materials"].clone();
                change(c["project"]["money_scales"].as_table_mut().unwrap());
                *d = c;
            },
            Some(lib),
        );
        let out = stillbench()
            .args(["check", p.to_str().unwrap()])
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{field}: {err}");
        assert!(err.contains(field), "{field}: {err}");
    }
}

#[test]
fn money_references_given_directly_rank_in_the_design_currency() {
    let (_d, p) = edited(
        |d| {
            let text = converted_design("designs/demo-highland-south.toml", Path::new("x"));
            let mut c: DocumentMut = text.parse().unwrap();
            c["materials"] = d["materials"].clone();
            let m = c["project"]["money_scales"].as_table_mut().unwrap();
            m.remove("per_usd");
            m.remove("rate_date");
            m["cost_per_litre"] = value(0.10 * RATE);
            m["capital_per_l_day"] = value(200.0 * RATE);
            m["source"] = value("the built-in references at the test rate, stated directly");
            *d = c;
        },
        Some(converted_library()),
    );
    let v = json_of(&["compare", p.to_str().unwrap(), "--format", "json"]);
    let s = v["scales"].as_array().unwrap();
    assert!((s[2].as_f64().unwrap() - 6.39).abs() < 1e-9, "{s:?}");
    assert!((s[3].as_f64().unwrap() - 12780.0).abs() < 1e-6, "{s:?}");
    let basis = v["money_basis"].as_str().unwrap();
    assert!(basis.contains("both as the design states them"), "{basis}");
    // --scales still overrides, and says so.
    let v = json_of(&[
        "compare",
        p.to_str().unwrap(),
        "--scales",
        "cost=10",
        "--format",
        "json",
    ]);
    assert_eq!(v["scales"][2].as_f64(), Some(10.0));
    assert!(
        v["money_basis"]
            .as_str()
            .unwrap()
            .contains("`--scales` replaces")
    );
}
