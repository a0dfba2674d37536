//! Text and SVG renderings of a [`CalibrationReport`]: a parity chart (modelled against
//! measured hourly distillate, with the 1:1 line) and a time-series overlay. The SVG is
//! written by hand (a few elements, no fonts needed).

use std::fmt::Write as _;
use std::io::{self, Write};

use super::fit::CalibrationReport;

fn esc(s: &str) -> String {
    crate::output::escape_markup(s)
}

const W: f64 = 640.0;
const H: f64 = 420.0;
const L: f64 = 60.0;
const R: f64 = 20.0;
const T: f64 = 40.0;
const B: f64 = 50.0;

fn frame(title: &str, x_label: &str, y_label: &str, x_max: f64, y_max: f64) -> String {
    let mut s = format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{H}\" \
         viewBox=\"0 0 {W} {H}\" font-family=\"sans-serif\" font-size=\"12\">\n\
         <rect width=\"{W}\" height=\"{H}\" fill=\"white\"/>\n\
         <text x=\"{}\" y=\"22\" text-anchor=\"middle\" font-size=\"14\">{}</text>\n",
        W / 2.0,
        esc(title)
    );
    let (x0, y0, x1, y1) = (L, H - B, W - R, T);
    let _ = writeln!(
        s,
        "<polyline fill=\"none\" stroke=\"black\" points=\"{x0},{y1} {x0},{y0} {x1},{y0}\"/>"
    );
    for i in 0..=4 {
        let f = f64::from(i) / 4.0;
        let xv = x0 + f * (x1 - x0);
        let yv = y0 - f * (y0 - y1);
        let _ = writeln!(
            s,
            "<text x=\"{xv:.1}\" y=\"{:.1}\" text-anchor=\"middle\">{}</text>\n\
             <text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\">{}</text>\n\
             <line x1=\"{x0}\" y1=\"{yv:.1}\" x2=\"{x1}\" y2=\"{yv:.1}\" stroke=\"#ddd\"/>",
            y0 + 16.0,
            tick(f * x_max),
            x0 - 6.0,
            yv + 4.0,
            tick(f * y_max)
        );
    }
    let _ = writeln!(
        s,
        "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"middle\">{}</text>\n\
         <text x=\"14\" y=\"{:.1}\" text-anchor=\"middle\" transform=\"rotate(-90 14 {:.1})\">{}</text>",
        (x0 + x1) / 2.0,
        H - 12.0,
        esc(x_label),
        (y0 + y1) / 2.0,
        (y0 + y1) / 2.0,
        esc(y_label)
    );
    s
}

fn tick(v: f64) -> String {
    if v >= 100.0 {
        format!("{v:.0}")
    } else if v >= 1.0 {
        format!("{v:.1}")
    } else {
        format!("{v:.2}")
    }
}

fn nice_max(v: f64) -> f64 {
    if !(v.is_finite() && v > 0.0) {
        return 1.0;
    }
    let e = 10f64.powf(v.log10().floor());
    for m in [1.0, 2.0, 2.5, 5.0, 10.0] {
        if m * e >= v {
            return m * e;
        }
    }
    10.0 * e
}

/// Parity chart: modelled against measured hourly distillate [L], with the 1:1 line.
pub fn parity_svg(report: &CalibrationReport) -> String {
    let pts: Vec<(f64, f64)> = report
        .overlay
        .iter()
        .filter_map(|p| p.measured_l.map(|m| (m, p.modelled_l)))
        .collect();
    let top = nice_max(pts.iter().map(|(a, b)| a.max(*b)).fold(0.0, f64::max));
    let mut s = frame(
        &format!(
            "{}: modelled against measured hourly distillate",
            report.variant
        ),
        "measured [L per hour]",
        "modelled [L per hour]",
        top,
        top,
    );
    let sx = |v: f64| L + v / top * (W - L - R);
    let sy = |v: f64| H - B - v / top * (H - B - T);
    let _ = writeln!(
        s,
        "<line x1=\"{:.1}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"#888\" \
         stroke-dasharray=\"4 3\"/>",
        sx(0.0),
        sy(0.0),
        sx(top),
        sy(top)
    );
    for (m, p) in pts {
        let _ = writeln!(
            s,
            "<circle cx=\"{:.1}\" cy=\"{:.1}\" r=\"2.5\" fill=\"#1f5fa0\" fill-opacity=\"0.6\"/>",
            sx(m),
            sy(p)
        );
    }
    s.push_str("</svg>\n");
    s
}

/// Time-series overlay of measured (points) and modelled (line) hourly distillate [L].
pub fn series_svg(report: &CalibrationReport) -> String {
    let n = report.overlay.len().max(1) as f64;
    let top = nice_max(
        report
            .overlay
            .iter()
            .map(|p| p.modelled_l.max(p.measured_l.unwrap_or(0.0)))
            .fold(0.0, f64::max),
    );
    let mut s = frame(
        &format!(
            "{}: hourly distillate, measured and modelled",
            report.variant
        ),
        "hours since the start of the record",
        "distillate [L per hour]",
        n,
        top,
    );
    let sx = |v: f64| L + v / n * (W - L - R);
    let sy = |v: f64| H - B - v / top * (H - B - T);
    let line: Vec<String> = report
        .overlay
        .iter()
        .map(|p| format!("{:.1},{:.1}", sx(p.hour + 0.5), sy(p.modelled_l)))
        .collect();
    let _ = writeln!(
        s,
        "<polyline fill=\"none\" stroke=\"#c0392b\" stroke-width=\"1.2\" points=\"{}\"/>",
        line.join(" ")
    );
    for p in &report.overlay {
        if let Some(m) = p.measured_l {
            let _ = writeln!(
                s,
                "<circle cx=\"{:.1}\" cy=\"{:.1}\" r=\"1.8\" fill=\"#1f5fa0\"/>",
                sx(p.hour + 0.5),
                sy(m)
            );
        }
    }
    let _ = writeln!(
        s,
        "<text x=\"{:.1}\" y=\"{:.1}\" fill=\"#1f5fa0\">● measured</text>\n\
         <text x=\"{:.1}\" y=\"{:.1}\" fill=\"#c0392b\">— modelled (calibrated)</text>",
        L + 10.0,
        T + 14.0,
        L + 100.0,
        T + 14.0
    );
    s.push_str("</svg>\n");
    s
}

/// The report as text.
pub fn write_text(report: &CalibrationReport, w: &mut dyn Write) -> io::Result<()> {
    writeln!(
        w,
        "Calibration of `{}` to {} ({} hours)",
        report.variant, report.measured_file, report.hours
    )?;
    writeln!(w, "\nMeasured data:")?;
    for l in report.data.lines() {
        writeln!(w, "  {l}")?;
    }
    writeln!(
        w,
        "\nFitted parameters (95 % intervals, Student t = {:.3} with {} degrees of freedom):",
        report.t_quantile, report.dof
    )?;
    for p in &report.parameters {
        writeln!(
            w,
            "  {:<28} {:>8.4}  [{:.4}, {:.4}]  (start {:.4}, bounds {:.3}…{:.3}){}",
            p.name,
            p.value,
            p.ci_low,
            p.ci_high,
            p.start,
            p.bounds.0,
            p.bounds.1,
            if p.at_bound { "  AT BOUND" } else { "" }
        )?;
    }
    if report.parameters.len() > 1 {
        writeln!(w, "\nCorrelation of the estimates:")?;
        for (p, row) in report.parameters.iter().zip(&report.correlation) {
            let cells: Vec<String> = row.iter().map(|c| format!("{c:>6.2}")).collect();
            writeln!(w, "  {:<28} {}", p.name, cells.join(" "))?;
        }
    }
    writeln!(
        w,
        "\nGoodness of fit (model − measured), before → after calibration:"
    )?;
    for (a, b) in report.statistics_before.iter().zip(&report.statistics) {
        writeln!(
            w,
            "  {:<18} {:<6} n = {:>4}  RMSE {:.4} → {:.4} {u}  bias {:+.4} → {:+.4} {u}  R² {:.3} → {:.3}",
            b.quantity.label(),
            b.basis,
            b.n,
            a.rmse,
            b.rmse,
            a.bias,
            b.bias,
            a.r2,
            b.r2,
            u = b.unit
        )?;
    }
    writeln!(
        w,
        "\nMinimiser: {} after {} model runs",
        report.termination, report.model_runs
    )?;
    if !report.warnings.is_empty() {
        writeln!(w, "\nWarnings:")?;
        for x in &report.warnings {
            writeln!(w, "  - {x}")?;
        }
    }
    Ok(())
}
