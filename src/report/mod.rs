//! The report a designer hands on: Markdown, a self-contained HTML page with inline SVG charts
//! and print CSS, and every table as CSV and JSON.
//!
//! Flow: [`build::build_context`] gathers one `Serialize` struct per section
//! ([`context::ReportContext`]) from the same evaluation and ranking as `compare` →
//! [`charts::draw_all`] draws the charts → [`render::Templates`] renders `report.md`
//! (which `{% include %}`s a template per section) → [`render::markdown_to_html`] makes the
//! HTML body with the charts inlined → the `report.html` shell adds the CSS. [`write_report`]
//! builds all files in a temporary folder beside the target and renames it into place.
//!
//! The sections that come from other stages (Monte Carlo uncertainty and sensitivity, sizing
//! over weather years, validation, alternatives, risks, the workshop sheets) are filled by
//! [`stages`] inside [`build::build_context`] as [`ReportOptions`] asks; a caller may still
//! replace any of them before [`write_report`].

pub mod build;
pub mod charts;
pub mod context;
pub mod references;
pub mod render;
pub mod stages;
pub mod tables;

use std::collections::BTreeMap;
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

pub use build::{
    DemandChoice, ReportOptions, build_context, build_context_with, report_date, resolve_demand,
    sha256_hex,
};
pub use charts::Chart;
pub use context::ReportContext;
pub use render::Templates;
pub use stages::SheetChoice;

use crate::design::{DEMO_DESIGN, DEMO_LIBRARY, LoadedDesign};
use crate::error::Error;

/// The bytes of the design file and of its materials library, for the reproducibility hashes.
/// `demo` means the built-in demo (its embedded text is hashed, nothing is read).
///
/// Errors: [`Error::Io`] when a file cannot be read.
pub fn input_bytes(loaded: &LoadedDesign, demo: bool) -> Result<(Vec<u8>, Vec<u8>), Error> {
    if demo {
        return Ok((
            DEMO_DESIGN.as_bytes().to_vec(),
            DEMO_LIBRARY.as_bytes().to_vec(),
        ));
    }
    let read = |p: &Path| {
        fs::read(p).map_err(|source| Error::Io {
            path: p.display().to_string(),
            source,
        })
    };
    Ok((read(&loaded.source)?, read(&loaded.library_path)?))
}

/// Draw the charts and record each one in `ctx.charts`.
///
/// Errors: [`Error::Model`] when a chart cannot be drawn (a plotting failure).
pub fn attach_charts(ctx: &mut ReportContext) -> Result<Vec<Chart>, Error> {
    let mut charts = charts::draw_all(ctx).map_err(|reason| Error::Model {
        variant: String::new(),
        at: String::new(),
        reason: format!("drawing the report's charts: {reason}"),
    })?;
    charts.extend(stages::drawing_charts(&ctx.workshops));
    ctx.charts = charts
        .iter()
        .map(|c| {
            (
                c.name.clone(),
                context::ChartRef {
                    file: chart_file(&c.name),
                    title: c.title.clone(),
                },
            )
        })
        .collect();
    Ok(charts)
}

/// Where a chart is written, relative to the report folder.
pub fn chart_file(name: &str) -> String {
    format!("charts/{name}.svg")
}

/// Render the Markdown report.
///
/// Errors: see [`Templates::render_to`].
pub fn render_markdown(
    ctx: &ReportContext,
    templates: &Templates,
    w: &mut impl Write,
) -> Result<(), Error> {
    templates.render_to("report.md", ctx, w)
}

/// Render the self-contained HTML page from the Markdown, inlining the charts and the CSS.
///
/// Errors: see [`Templates::render_to`].
pub fn render_html(
    ctx: &ReportContext,
    markdown: &str,
    charts: &[Chart],
    templates: &Templates,
    w: &mut impl Write,
) -> Result<(), Error> {
    let inline: BTreeMap<String, String> = charts
        .iter()
        .map(|c| (chart_file(&c.name), c.svg.clone()))
        .collect();
    let mut body = Vec::new();
    render::markdown_to_html(markdown, &inline, &mut body).map_err(|source| Error::Io {
        path: "report.html".into(),
        source,
    })?;
    let body = String::from_utf8_lossy(&body);
    let css = templates.source("report.css")?;
    let shell = render::HtmlShell {
        title: &ctx.meta.title,
        css: &css,
        body: &body,
        date: &ctx.meta.date,
    };
    templates.render_to("report.html", &shell, w)
}

/// The default report folder: `reports/<design file stem>/` (or `reports/report/`).
pub fn default_dir(loaded: &LoadedDesign) -> PathBuf {
    let stem = loaded
        .source
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .filter(|s| !s.is_empty())
        .unwrap_or_else(|| "report".into());
    Path::new("reports").join(stem)
}

fn io_at(path: &Path) -> impl Fn(std::io::Error) -> Error + '_ {
    move |source| Error::Io {
        path: path.display().to_string(),
        source,
    }
}

/// Write the report into `out`: `report.md`, `report.html`, `charts/*.svg`, and
/// `tables/*.csv` + `tables/*.json`. Returns the files written, relative to `out`.
///
/// Everything is built in a hidden temporary folder beside `out` and renamed into place only
/// when complete. An existing `out` is refused ([`Error::Refused`], exit 2) unless `force`;
/// with `force` it is replaced only after the new report is complete. A failure at any point
/// removes the temporary folder and leaves any earlier report as it was.
pub fn write_report(
    ctx: &ReportContext,
    charts: &[Chart],
    templates: &Templates,
    out: &Path,
    force: bool,
) -> Result<Vec<PathBuf>, Error> {
    if out.exists() && !force {
        return Err(Error::Refused {
            path: out.display().to_string(),
            reason: "a report is already there; pass --force to replace it".into(),
        });
    }
    let name = out
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "report".into());
    let parent = match out.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    fs::create_dir_all(&parent).map_err(io_at(&parent))?;
    let pid = std::process::id();
    let tmp = parent.join(format!(".{name}.tmp-{pid}"));
    if tmp.exists() {
        fs::remove_dir_all(&tmp).map_err(io_at(&tmp))?;
    }
    fs::create_dir(&tmp).map_err(io_at(&tmp))?;
    let built = fill(ctx, charts, templates, &tmp);
    let files = match built {
        Ok(f) => f,
        Err(e) => {
            let _ = fs::remove_dir_all(&tmp);
            return Err(e);
        }
    };
    // Swap into place: the old report (if any) moves aside first and is removed only after
    // the new one is in place.
    let old = parent.join(format!(".{name}.old-{pid}"));
    let had_old = out.exists();
    if had_old && let Err(e) = fs::rename(out, &old) {
        let _ = fs::remove_dir_all(&tmp);
        return Err(io_at(out)(e));
    }
    if let Err(e) = fs::rename(&tmp, out) {
        if had_old {
            let _ = fs::rename(&old, out);
        }
        let _ = fs::remove_dir_all(&tmp);
        return Err(io_at(out)(e));
    }
    if had_old {
        let _ = fs::remove_dir_all(&old);
    }
    Ok(files)
}

/// Write every file into `dir`; charts and tables first, then the rendered pages.
fn fill(
    ctx: &ReportContext,
    charts: &[Chart],
    templates: &Templates,
    dir: &Path,
) -> Result<Vec<PathBuf>, Error> {
    let mut files = Vec::new();
    let write = |rel: &Path, bytes: &[u8]| -> Result<(), Error> {
        let p = dir.join(rel);
        if let Some(parent) = p.parent() {
            fs::create_dir_all(parent).map_err(io_at(parent))?;
        }
        fs::write(&p, bytes).map_err(io_at(&p))
    };
    for c in charts {
        let rel = PathBuf::from(chart_file(&c.name));
        write(&rel, c.svg.as_bytes())?;
        files.push(rel);
    }
    for t in tables::tables(ctx) {
        let mut csv = Vec::new();
        t.write_csv(&mut csv).map_err(io_at(Path::new(&t.name)))?;
        let rel = PathBuf::from(format!("tables/{}.csv", t.name));
        write(&rel, &csv)?;
        files.push(rel);
        let mut json = Vec::new();
        t.write_json(&mut json).map_err(io_at(Path::new(&t.name)))?;
        let rel = PathBuf::from(format!("tables/{}.json", t.name));
        write(&rel, &json)?;
        files.push(rel);
    }
    let mut md = Vec::new();
    render_markdown(ctx, templates, &mut md)?;
    write(Path::new("report.md"), &md)?;
    files.push("report.md".into());
    let md = String::from_utf8_lossy(&md).into_owned();
    let mut html = Vec::new();
    render_html(ctx, &md, charts, templates, &mut html)?;
    write(Path::new("report.html"), &html)?;
    files.push("report.html".into());
    Ok(files)
}
