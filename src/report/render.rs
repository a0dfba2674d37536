//! Rendering: templates (minijinja) → Markdown; Markdown (pulldown-cmark, tables on) → HTML
//! body with the charts inlined; the HTML shell with the CSS inlined. Every renderer writes to
//! `impl Write`.
//!
//! User text is made safe twice: templates pass it through the `md` filter (backslash-escapes
//! Markdown punctuation, so `<script>` stays text), and the HTML step turns any raw HTML that
//! still reaches the Markdown into escaped text. The only raw HTML in the page is our own SVG.

use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};

use minijinja::{Environment, Value};
use pulldown_cmark::{CowStr, Event, Options, Parser, Tag, TagEnd};

use crate::design::{DesignErrors, DesignIssue};
use crate::error::Error;

/// The default templates, embedded: (name, text).
pub const DEFAULT_TEMPLATES: [(&str, &str); 17] = [
    ("report.md", include_str!("../../templates/report.md")),
    ("summary.md", include_str!("../../templates/summary.md")),
    ("need.md", include_str!("../../templates/need.md")),
    ("site.md", include_str!("../../templates/site.md")),
    ("variants.md", include_str!("../../templates/variants.md")),
    (
        "justification.md",
        include_str!("../../templates/justification.md"),
    ),
    (
        "life-cycle.md",
        include_str!("../../templates/life-cycle.md"),
    ),
    ("operation.md", include_str!("../../templates/operation.md")),
    (
        "environment.md",
        include_str!("../../templates/environment.md"),
    ),
    ("hooks.md", include_str!("../../templates/hooks.md")),
    (
        "reproducibility.md",
        include_str!("../../templates/reproducibility.md"),
    ),
    ("cautions.md", include_str!("../../templates/cautions.md")),
    (
        "references.md",
        include_str!("../../templates/references.md"),
    ),
    ("report.html", include_str!("../../templates/report.html")),
    ("report.css", include_str!("../../templates/report.css")),
    ("sizing.md", include_str!("../../templates/sizing.md")),
    (
        crate::workshop::WORKSHOP_TEMPLATE_NAME,
        crate::workshop::WORKSHOP_TEMPLATE,
    ),
];

/// A template set: the embedded defaults, each replaced by a file of the same name in the
/// override folder when there is one. Templates the defaults do not name (a new section a
/// user adds with `{% include %}`, or `workshop.md`) are read from the folder too.
#[derive(Debug)]
pub struct Templates {
    env: Environment<'static>,
    dir: Option<PathBuf>,
}

fn template_error(dir: Option<&Path>, e: &minijinja::Error) -> Error {
    let name = e.name().unwrap_or("template");
    let file = dir.map_or_else(|| PathBuf::from(name), |d| d.join(name));
    let mut message = e.to_string();
    let mut src = std::error::Error::source(e);
    while let Some(s) = src {
        message.push_str(&format!(": {s}"));
        src = s.source();
    }
    Error::Design(DesignErrors(vec![DesignIssue {
        file,
        line_col: e.line().map(|l| (l, 1)),
        path: "template".into(),
        message,
    }]))
}

/// Backslash-escape the characters that Markdown could read as syntax inside a line (emphasis,
/// code, links, raw HTML, table cells, entities), plus a leading `#`, `-`, `+` or `=` that
/// could start a block, so user text renders as itself. Line breaks become spaces.
pub fn escape_markdown(s: &str) -> String {
    let mut out = String::with_capacity(s.len() + 8);
    for (i, c) in s.chars().enumerate() {
        match c {
            '\\' | '`' | '*' | '_' | '[' | ']' | '|' | '<' | '>' | '&' | '~' => {
                out.push('\\');
                out.push(c);
            }
            '#' | '-' | '+' | '=' if i == 0 => {
                out.push('\\');
                out.push(c);
            }
            '\n' | '\r' => out.push(' '),
            c => out.push(c),
        }
    }
    out
}

/// A number in scientific notation with `digits` decimals (for tiny residuals).
fn sci(v: Value, digits: Option<usize>) -> String {
    let d = digits.unwrap_or(1);
    match f64::try_from(v) {
        Ok(x) if x.is_finite() => format!("{x:.d$e}"),
        _ => "–".into(),
    }
}

/// A number with a fixed count of decimals; non-numbers and non-finite values as "–".
fn num(v: Value, digits: Option<usize>) -> String {
    let d = digits.unwrap_or(2);
    match f64::try_from(v) {
        Ok(x) if x.is_finite() => format!("{x:.d$}"),
        _ => "–".into(),
    }
}

/// A fraction as a percentage.
fn pct(v: Value, digits: Option<usize>) -> String {
    let d = digits.unwrap_or(1);
    match f64::try_from(v) {
        Ok(x) if x.is_finite() => format!("{:.d$} %", x * 100.0),
        _ => "–".into(),
    }
}

impl Templates {
    /// The embedded defaults, overridden by files in `dir` when given.
    ///
    /// Errors: [`Error::Design`] naming the file when an override cannot be read or does not
    /// parse as a template.
    pub fn load(dir: Option<&Path>) -> Result<Self, Error> {
        let mut env = Environment::new();
        env.set_auto_escape_callback(|name| {
            if name.ends_with(".html") {
                minijinja::AutoEscape::Html
            } else {
                minijinja::AutoEscape::None
            }
        });
        env.set_undefined_behavior(minijinja::UndefinedBehavior::Strict);
        env.add_filter("md", |s: String| escape_markdown(&s));
        env.add_filter("num", num);
        env.add_filter("pct", pct);
        env.add_filter("sci", sci);
        // Keep each section's final newline so included sections stay apart.
        if let Ok(syntax) = minijinja::syntax::SyntaxConfig::builder()
            .keep_trailing_newline(true)
            .build()
        {
            env.set_syntax(syntax);
        }
        if let Some(d) = dir
            && !d.is_dir()
        {
            return Err(Error::Design(DesignErrors(vec![DesignIssue {
                file: d.to_path_buf(),
                line_col: None,
                path: "--templates".into(),
                message: "not a folder of templates".into(),
            }])));
        }
        for (name, text) in DEFAULT_TEMPLATES {
            let source = match dir.map(|d| d.join(name)).filter(|p| p.is_file()) {
                Some(p) => std::fs::read_to_string(&p).map_err(|e| {
                    Error::Design(DesignErrors(vec![DesignIssue {
                        file: p.clone(),
                        line_col: None,
                        path: "--templates".into(),
                        message: format!("cannot read the template: {e}"),
                    }]))
                })?,
                None => text.to_owned(),
            };
            env.add_template_owned(name.to_owned(), source)
                .map_err(|e| template_error(dir, &e))?;
        }
        if let Some(d) = dir {
            let d = d.to_path_buf();
            env.set_loader(move |name| {
                // Only plain file names inside the folder.
                if name.contains(['/', '\\']) || name.starts_with('.') {
                    return Ok(None);
                }
                match std::fs::read_to_string(d.join(name)) {
                    Ok(s) => Ok(Some(s)),
                    Err(e) if e.kind() == std::io::ErrorKind::NotFound => Ok(None),
                    Err(e) => Err(minijinja::Error::new(
                        minijinja::ErrorKind::InvalidOperation,
                        format!("cannot read template {name}: {e}"),
                    )),
                }
            });
        }
        Ok(Self {
            env,
            dir: dir.map(Path::to_path_buf),
        })
    }

    /// Render template `name` with `ctx` into `w`.
    ///
    /// Errors: [`Error::Design`] for a template error (naming the template and line);
    /// [`Error::Io`] when writing fails.
    pub fn render_to(
        &self,
        name: &str,
        ctx: &impl serde::Serialize,
        w: &mut impl Write,
    ) -> Result<(), Error> {
        let t = self
            .env
            .get_template(name)
            .map_err(|e| template_error(self.dir.as_deref(), &e))?;
        let text = t
            .render(minijinja::value::Serde(ctx))
            .map_err(|e| template_error(self.dir.as_deref(), &e))?;
        w.write_all(text.as_bytes()).map_err(|e| Error::Io {
            path: name.into(),
            source: e,
        })
    }

    /// The text of template `name` as loaded (used for the CSS).
    pub fn source(&self, name: &str) -> Result<String, Error> {
        let t = self
            .env
            .get_template(name)
            .map_err(|e| template_error(self.dir.as_deref(), &e))?;
        Ok(t.source().to_owned())
    }
}

/// Markdown → HTML body. Images whose link is a key of `inline` are replaced by that SVG in a
/// `<figure>` with the image's text as caption; any raw HTML in the Markdown is written as
/// escaped text.
pub fn markdown_to_html(
    md: &str,
    inline: &BTreeMap<String, String>,
    w: &mut impl Write,
) -> std::io::Result<()> {
    let parser = Parser::new_ext(md, Options::ENABLE_TABLES);
    let mut events: Vec<Event<'_>> = Vec::new();
    // While inside an inlined image: the caption text gathered so far.
    let mut caption: Option<String> = None;
    for ev in parser {
        match ev {
            Event::Start(Tag::Image { dest_url, .. }) if inline.contains_key(dest_url.as_ref()) => {
                let svg = inline.get(dest_url.as_ref()).cloned().unwrap_or_default();
                events.push(Event::Html(CowStr::from(format!(
                    "<figure class=\"chart\">{svg}"
                ))));
                caption = Some(String::new());
            }
            Event::End(TagEnd::Image) if caption.is_some() => {
                let text = caption.take().unwrap_or_default();
                events.push(Event::Html(CowStr::from(format!(
                    "<figcaption>{}</figcaption></figure>",
                    crate::output::escape_markup(&text)
                ))));
            }
            Event::Text(t) | Event::Code(t) if caption.is_some() => {
                if let Some(c) = caption.as_mut() {
                    c.push_str(&t);
                }
            }
            _ if caption.is_some() => {}
            Event::Html(h) | Event::InlineHtml(h) => events.push(Event::Text(h)),
            other => events.push(other),
        }
    }
    let mut s = String::new();
    pulldown_cmark::html::push_html(&mut s, events.into_iter());
    w.write_all(s.as_bytes())
}

/// The context of the HTML shell.
#[derive(Debug, serde::Serialize)]
pub struct HtmlShell<'a> {
    /// Page title (escaped by the template).
    pub title: &'a str,
    /// The stylesheet (inserted raw into `<style>`).
    pub css: &'a str,
    /// The HTML body (inserted raw).
    pub body: &'a str,
    /// Generation date.
    pub date: &'a str,
}
