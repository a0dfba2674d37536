//! From TOML text to typed values: read `kind` and `source` from the spanned tables first,
//! then deserialize each part from its own sub-table so serde keeps spans and
//! `deny_unknown_fields` works.

use std::path::{Path, PathBuf};

use toml::Spanned;
use toml::de::{DeTable, DeValue};

use super::library::Library;
use super::reader::{Reader, decode, parse_toml};
use super::schema::*;
use super::spans::{self, hint};
use super::validate;
use super::{DesignErrors, DesignIssue, LoadedDesign};

/// Where referenced files come from: the disk, or the embedded demo.
pub(crate) trait Files {
    /// Read a whole file.
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>>;
    /// Whether a regular file exists at `path`.
    fn is_file(&self, path: &Path) -> bool;
}

/// The real file system.
pub(crate) struct Disk;

impl Files for Disk {
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>> {
        std::fs::read(path)
    }
    fn is_file(&self, path: &Path) -> bool {
        path.is_file()
    }
}

/// The top-level keys of a design file.
const ROOT_FIELDS: [&str; 7] = [
    "project",
    "materials",
    "site",
    "variant",
    "costs",
    "alternative",
    "risk",
];

/// The type of a value with its article, for messages ("an integer", "a table").
fn a_type(v: &DeValue<'_>) -> String {
    let t = v.type_str();
    if t.starts_with(['a', 'e', 'i', 'o', 'u']) {
        format!("an {t}")
    } else {
        format!("a {t}")
    }
}

/// A whole-file issue.
fn file_issue(file: &Path, message: String) -> DesignIssue {
    DesignIssue {
        file: file.to_path_buf(),
        line_col: None,
        path: String::new(),
        message,
    }
}

/// Parse and validate a design's text.
pub(crate) fn parse_design(
    text: &str,
    origin: &Path,
    base_dir: &Path,
    files: &dyn Files,
) -> Result<LoadedDesign, DesignErrors> {
    let doc = parse_toml(origin, text).map_err(DesignErrors)?;
    let root = doc.get_ref();
    if root.is_empty() {
        return Err(DesignErrors(vec![file_issue(
            origin,
            "the design file is empty; it needs [project], materials, [site] and at least one \
             [[variant]] (see docs/design-file.md)"
                .to_string(),
        )]));
    }
    let mut r = Reader::new(origin, text, root);

    for (k, _) in root.iter() {
        let key = k.get_ref();
        if !ROOT_FIELDS.contains(&key.as_ref()) {
            let h = hint(key, ROOT_FIELDS);
            r.error_at_key(key, format!("unknown top-level field `{key}`{h}"));
        }
    }

    let project: Option<Project> = match root.get("project") {
        Some(v) => r.read(v, "project", &[]),
        None => {
            r.error("project", "missing required table [project]".to_string());
            None
        }
    };

    let (materials_path, library) = read_materials(&mut r, root, base_dir, files);
    let site = read_site(&mut r, root, base_dir, files);
    let variants = read_variants(&mut r, root);
    let costs: Option<super::costs::Costs> = match root.get("costs") {
        Some(v) => r.read(v, "costs", &[]),
        None => Some(super::costs::Costs::default()),
    };
    if let Some(c) = &costs {
        super::costs::validate(&mut r, c);
    }
    let alternatives: Option<Vec<super::alternatives::Alternative>> =
        super::alternatives::read_table_array(&mut r, root, "alternative");
    if let Some(a) = &alternatives {
        super::alternatives::validate(&mut r, a);
    }
    let risks: Option<Vec<super::risks::RiskEntry>> =
        super::alternatives::read_table_array(&mut r, root, "risk");
    if let Some(k) = &risks {
        super::risks::validate(&mut r, k);
    }

    if let Some(p) = &project {
        let given = |field: &str| {
            root.get("costs")
                .and_then(|c| c.get_ref().as_table())
                .is_some_and(|t| t.get(field).is_some())
        };
        validate::project(
            &mut r,
            p,
            library.as_ref().map(|(l, _)| l),
            [given("labour_rate_per_h"), given("operator_rate_per_h")],
        );
    }
    if let Some(v) = &variants {
        validate::variants(&mut r, v, library.as_ref().map(|(l, _)| l));
        let feed_g_kg = site.as_ref().map_or(35.0, |s| s.feed_salinity_g_kg);
        validate::operations(&mut r, v, feed_g_kg);
        validate::calibrations(&mut r, v);
    }

    let mut issues = r.issues;
    let mut warnings = r.warnings;
    let (library, library_path) = match library {
        Some((l, p)) => (Some(l), p),
        None => (None, PathBuf::new()),
    };
    match (
        (project, materials_path, site, variants, library, costs),
        (alternatives, risks),
    ) {
        (
            (
                Some(project),
                Some(materials),
                Some(site),
                Some(variants),
                Some(library),
                Some(costs),
            ),
            (Some(alternatives), Some(risks)),
        ) if issues.is_empty() => Ok(LoadedDesign {
            design: Design {
                project,
                materials,
                site,
                variants,
                costs,
                alternatives,
                risks,
            },
            library,
            source: origin.to_path_buf(),
            library_path,
            warnings,
        }),
        _ => {
            if issues.is_empty() {
                // Every branch that yields `None` records an issue first; keep a guard so an
                // empty error list can never be returned.
                issues.push(file_issue(
                    origin,
                    "the design could not be read".to_string(),
                ));
            }
            issues.append(&mut warnings);
            Err(DesignErrors(issues))
        }
    }
}

/// `materials = "…"`: read and validate the library it names.
fn read_materials(
    r: &mut Reader<'_>,
    root: &DeTable<'_>,
    base_dir: &Path,
    files: &dyn Files,
) -> (Option<PathBuf>, Option<(Library, PathBuf)>) {
    let Some(v) = root.get("materials") else {
        r.error(
            "materials",
            "missing required field `materials` (path of the materials library, relative to \
             the design file)"
                .to_string(),
        );
        return (None, None);
    };
    let Some(rel) = v.get_ref().as_str() else {
        r.error(
            "materials",
            format!(
                "expected a string (a file path), got {}",
                a_type(v.get_ref())
            ),
        );
        return (None, None);
    };
    if rel.trim().is_empty() {
        r.error("materials", "the path is empty".to_string());
        return (None, None);
    }
    let rel = PathBuf::from(rel);
    let full = base_dir.join(&rel);
    let bytes = match files.read(&full) {
        Ok(b) => b,
        Err(e) => {
            r.error(
                "materials",
                format!("cannot read the materials library {}: {e}", full.display()),
            );
            return (Some(rel), None);
        }
    };
    match load_library(&full, &bytes) {
        Ok(lib) => (Some(rel), Some((lib, full))),
        Err(mut issues) => {
            r.error(
                "materials",
                format!(
                    "the materials library {} is invalid (see below)",
                    full.display()
                ),
            );
            r.issues.append(&mut issues);
            (Some(rel), None)
        }
    }
}

/// Parse and validate a materials library from its bytes. Issues name `file`.
pub(crate) fn load_library(file: &Path, bytes: &[u8]) -> Result<Library, Vec<DesignIssue>> {
    let text = decode(file, bytes).map_err(|e| vec![e])?;
    let doc = parse_toml(file, &text)?;
    if doc.get_ref().is_empty() {
        return Err(vec![file_issue(
            file,
            "the materials library is empty; it needs [library] and [[item]] entries".to_string(),
        )]);
    }
    let mut r = Reader::new(file, &text, doc.get_ref());
    let root = Spanned::new(doc.span(), DeValue::Table(doc.get_ref().clone()));
    let lib: Option<Library> = r.read(&root, "", &[]);
    if let Some(lib) = &lib {
        validate::library(&mut r, lib);
    }
    match lib {
        Some(lib) if r.issues.is_empty() => Ok(lib),
        _ => {
            if r.issues.is_empty() {
                r.issues.push(file_issue(
                    file,
                    "the library could not be read".to_string(),
                ));
            }
            Err(r.issues)
        }
    }
}

/// A sub-table at `path`, or an issue saying it is not a table.
fn as_table<'a, 'i>(
    r: &mut Reader<'_>,
    v: &'a Spanned<DeValue<'i>>,
    path: &str,
) -> Option<&'a DeTable<'i>> {
    match v.get_ref() {
        DeValue::Table(t) => Some(t),
        other => {
            r.error(path, format!("expected a table, got {}", a_type(other)));
            None
        }
    }
}

/// Remove and return the tag field `key` from `table`, as an index into `allowed`.
fn take_tag(
    r: &mut Reader<'_>,
    table: &mut DeTable<'_>,
    path: &str,
    key: &str,
    allowed: &[&str],
) -> Option<usize> {
    let field = spans::join(path, key);
    let choices = allowed
        .iter()
        .map(|a| format!("\"{a}\""))
        .collect::<Vec<_>>()
        .join(", ");
    let Some(v) = table.remove(key) else {
        r.error(
            &field,
            format!("missing required field `{key}`; allowed: {choices}"),
        );
        return None;
    };
    let Some(s) = v.get_ref().as_str() else {
        r.error(
            &field,
            format!(
                "expected a string, got {}; allowed: {choices}",
                a_type(v.get_ref())
            ),
        );
        return None;
    };
    match allowed.iter().position(|a| *a == s) {
        Some(i) => Some(i),
        None => {
            let h = hint(s, allowed.iter().copied());
            r.error(
                &field,
                format!("unknown {key} \"{s}\"; allowed: {choices}{h}"),
            );
            None
        }
    }
}

/// `[site]` and `[site.climate]`.
fn read_site(
    r: &mut Reader<'_>,
    root: &DeTable<'_>,
    base_dir: &Path,
    files: &dyn Files,
) -> Option<Site> {
    let Some(v) = root.get("site") else {
        r.error("site", "missing required table [site]".to_string());
        return None;
    };
    let mut table = as_table(r, v, "site")?.clone();
    let climate_v = table.remove("climate");
    let fields: Option<SiteFields> = r.read(
        &Spanned::new(v.span(), DeValue::Table(table)),
        "site",
        &["climate"],
    );
    let climate = match climate_v {
        Some(cv) => read_climate(r, &cv, base_dir, files),
        None => {
            r.error(
                "site.climate",
                "missing required table [site.climate]".to_string(),
            );
            None
        }
    };
    let f = fields?;
    let climate = climate?;
    let site = Site {
        name: f.name,
        latitude_deg: f.latitude_deg,
        longitude_deg: f.longitude_deg,
        elevation_m: f.elevation_m,
        utc_offset_h: f.utc_offset_h,
        feed_salinity_g_kg: f.feed_salinity_g_kg,
        albedo: f.albedo,
        horizon: f.horizon,
        climate,
    };
    validate::site(r, &site);
    Some(site)
}

const CLIMATE_SOURCES: [&str; 2] = ["monthly", "weather-file"];

fn read_climate(
    r: &mut Reader<'_>,
    v: &Spanned<DeValue<'_>>,
    base_dir: &Path,
    files: &dyn Files,
) -> Option<Climate> {
    let path = "site.climate";
    let mut table = as_table(r, v, path)?.clone();
    let source = take_tag(r, &mut table, path, "source", &CLIMATE_SOURCES)?;
    let value = Spanned::new(v.span(), DeValue::Table(table));
    if source == 0 {
        let m: MonthlyFields = r.read(&value, path, &["source"])?;
        validate::monthly(r, m).map(Climate::Monthly)
    } else {
        let mut w: WeatherFile = r.read(&value, path, &["source"])?;
        validate::weather_file(r, &w, base_dir, files);
        // From here on the path is usable from any working directory.
        w.path = base_dir.join(&w.path);
        Some(Climate::WeatherFile(w))
    }
}

/// `[[variant]]`.
fn read_variants(r: &mut Reader<'_>, root: &DeTable<'_>) -> Option<Vec<Variant>> {
    let Some(v) = root.get("variant") else {
        r.error(
            "variant",
            "no [[variant]] given; a design needs at least one".to_string(),
        );
        return None;
    };
    let DeValue::Array(items) = v.get_ref() else {
        r.error(
            "variant",
            format!(
                "expected an array of tables ([[variant]]), got {}",
                a_type(v.get_ref())
            ),
        );
        return None;
    };
    if items.is_empty() {
        r.error(
            "variant",
            "the variant list is empty; a design needs at least one".to_string(),
        );
        return None;
    }
    let mut out = Vec::with_capacity(items.len());
    let mut all_ok = true;
    for (i, item) in items.iter().enumerate() {
        match read_variant(r, item, &spans::index("variant", i)) {
            Some(v) => out.push(v),
            None => all_ok = false,
        }
    }
    all_ok.then_some(out)
}

fn read_variant(r: &mut Reader<'_>, v: &Spanned<DeValue<'_>>, path: &str) -> Option<Variant> {
    let table = as_table(r, v, path)?;
    let mut common = DeTable::new();
    let mut specific = DeTable::new();
    for (k, val) in table.iter() {
        if super::schema::VARIANT_COMMON_FIELDS.contains(&k.get_ref().as_ref()) {
            common.insert(k.clone(), val.clone());
        } else {
            specific.insert(k.clone(), val.clone());
        }
    }
    let kind = take_tag(r, &mut common, path, "kind", &KIND_NAMES);
    let fields: Option<VariantFields> =
        r.read(&Spanned::new(v.span(), DeValue::Table(common)), path, &[]);
    let specific = Spanned::new(v.span(), DeValue::Table(specific));
    let extra = &VARIANT_COMMON_FIELDS;
    let kind = match kind? {
        0 => VariantKind::SingleSlope(r.read(&specific, path, extra)?),
        1 => VariantKind::DoubleSlope(r.read(&specific, path, extra)?),
        2 => VariantKind::Wick(r.read(&specific, path, extra)?),
        3 => VariantKind::Stepped(r.read(&specific, path, extra)?),
        _ => VariantKind::MultiEffect(r.read(&specific, path, extra)?),
    };
    let f = fields?;
    Some(Variant {
        name: f.name,
        width_m: f.width_m,
        length_m: f.length_m,
        cover_azimuth_deg: f.cover_azimuth_deg,
        cover: f.cover,
        operation: f.operation,
        calibration: f.calibration,
        kind,
    })
}
