//! The report's charts, drawn with plotters' SVG backend (text as SVG `<text>`, no font
//! files). Each chart is a standalone SVG string with a `<title>` and an ARIA label, so it can
//! be written beside `report.md` and inlined in `report.html`.

use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

use super::context::{ReportContext, SensitivitySection};

/// One drawn chart.
#[derive(Debug, Clone, PartialEq)]
pub struct Chart {
    /// Short name (`climate`, `monthly_yield`, `pareto`, `day_profile`, `tornado`).
    pub name: String,
    /// Title, also the SVG `<title>` and ARIA label.
    pub title: String,
    /// The SVG document.
    pub svg: String,
}

/// The report's own colours (chosen for contrast in print and for colour-blind readers:
/// blue, orange, bluish green, vermilion, reddish purple, sky blue, yellow, grey).
pub const PALETTE: [RGBColor; 8] = [
    RGBColor(0, 90, 160),
    RGBColor(220, 120, 0),
    RGBColor(0, 140, 110),
    RGBColor(200, 60, 20),
    RGBColor(160, 80, 140),
    RGBColor(80, 170, 220),
    RGBColor(190, 160, 0),
    RGBColor(110, 110, 110),
];

const SIZE: (u32, u32) = (760, 380);
const FONT: &str = "sans-serif";

fn err<E: std::fmt::Display>(e: E) -> String {
    e.to_string()
}

fn colour(i: usize) -> RGBColor {
    PALETTE[i % PALETTE.len()]
}

/// A chart area with linear axes on the SVG backend (every chart here).
type Plot<'a, 'b> = ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// A line with a dot at each point, named in the legend by a short stroke.
fn marked_line(
    c: &mut Plot,
    pts: Vec<(f64, f64)>,
    col: RGBColor,
    label: String,
) -> Result<(), String> {
    c.draw_series(LineSeries::new(pts.clone(), col.stroke_width(2)))
        .map_err(err)?
        .label(label)
        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], col.stroke_width(2)));
    c.draw_series(pts.iter().map(|&p| Circle::new(p, 3, col.filled())))
        .map_err(err)?;
    Ok(())
}

/// One panel of the climate chart: months 1–12 across, `y` up, labelled `y_desc`.
fn month_panel<'a, 'b>(
    area: &'a DrawingArea<SVGBackend<'b>, plotters::coord::Shift>,
    y: std::ops::Range<f64>,
    y_desc: &str,
) -> Result<Plot<'a, 'b>, String> {
    let mut c = ChartBuilder::on(area)
        .margin(8)
        .x_label_area_size(32)
        .y_label_area_size(60)
        .build_cartesian_2d(0.5f64..12.5f64, y)
        .map_err(err)?;
    c.configure_mesh()
        .x_labels(12)
        .x_label_formatter(&month_label)
        .x_desc("month")
        .y_desc(y_desc)
        .light_line_style(WHITE)
        .draw()
        .map_err(err)?;
    Ok(c)
}

/// The legend box every chart uses, at `position`.
fn legend<'a, 'b: 'a>(c: &mut Plot<'a, 'b>, position: SeriesLabelPosition) -> Result<(), String> {
    c.configure_series_labels()
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK.mix(0.4))
        .position(position)
        .draw()
        .map_err(err)
}

/// Largest finite value of `xs` (at least `floor`), padded by 10 %.
fn top(xs: impl Iterator<Item = f64>, floor: f64) -> f64 {
    let m = xs.filter(|x| x.is_finite()).fold(floor, f64::max);
    m * 1.1
}

/// Give a plotters SVG a `<title>`, an ARIA label and the `chart` class.
pub fn label_svg(svg: &str, name: &str, title: &str) -> String {
    let t = crate::output::escape_markup(title);
    let id = format!("chart-{name}-title");
    let Some(open_end) = svg.find('>') else {
        return svg.to_owned();
    };
    let head = svg[..open_end].replacen(
        "<svg ",
        &format!(
            "<svg role=\"img\" aria-labelledby=\"{id}\" class=\"chart\" data-chart=\"{name}\" "
        ),
        1,
    );
    format!(
        "{head}><title id=\"{id}\">{t}</title>{}",
        &svg[open_end + 1..]
    )
}

fn month_label(x: &f64) -> String {
    let m = x.round() as i64;
    super::build::MONTHS
        .get((m - 1).clamp(0, 11) as usize)
        .map_or_else(String::new, |s| (*s).to_owned())
}

fn finish(name: &str, title: &str, svg: String) -> Chart {
    Chart {
        name: name.into(),
        title: title.into(),
        svg: label_svg(&svg, name, title),
    }
}

/// Monthly irradiation, air temperature and (when given) rainfall at the site.
pub fn climate_chart(ctx: &ReportContext) -> Result<Chart, String> {
    let title = format!("Sunlight and temperature by month — {}", ctx.site.name);
    let months = &ctx.site.months;
    let has_t = months
        .iter()
        .all(|m| m.t_max_c.is_some() && m.t_min_c.is_some());
    let has_rain = months.iter().all(|m| m.rain_mm.is_some());
    let panels = 1 + usize::from(has_t) + usize::from(has_rain);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 200 + 180 * panels as u32))
            .into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let root = root.titled(&title, (FONT, 20)).map_err(err)?;
        let areas = root.split_evenly((panels, 1));
        let mut it = areas.iter();
        if let Some(area) = it.next() {
            let ymax = top(months.iter().map(|m| m.ghi_kwh_m2_day), 1.0);
            let mut c = month_panel(area, 0f64..ymax, "irradiation [kWh/m²/day]")?;
            let pts: Vec<(f64, f64)> = months
                .iter()
                .map(|m| (f64::from(m.month), m.ghi_kwh_m2_day))
                .collect();
            c.draw_series(pts.iter().map(|&(x, y)| {
                Rectangle::new(
                    [(x - 0.35, 0.0), (x + 0.35, y)],
                    colour(6).mix(0.8).filled(),
                )
            }))
            .map_err(err)?;
        }
        if has_t && let Some(area) = it.next() {
            let tmax = top(months.iter().filter_map(|m| m.t_max_c), 1.0);
            let tmin = months
                .iter()
                .filter_map(|m| m.t_min_c)
                .fold(f64::INFINITY, f64::min)
                .min(0.0);
            let mut c = month_panel(area, tmin..tmax, "air temperature [°C]")?;
            for (i, (label, pick)) in [
                (
                    "mean daily maximum",
                    (|m: &super::context::ClimateMonth| m.t_max_c) as fn(&_) -> _,
                ),
                ("mean daily minimum", |m: &super::context::ClimateMonth| {
                    m.t_min_c
                }),
            ]
            .into_iter()
            .enumerate()
            {
                let col = colour(if i == 0 { 3 } else { 0 });
                let pts: Vec<(f64, f64)> = months
                    .iter()
                    .filter_map(|m| pick(m).map(|t| (f64::from(m.month), t)))
                    .collect();
                marked_line(&mut c, pts, col, label.to_owned())?;
            }
            legend(&mut c, SeriesLabelPosition::LowerRight)?;
        }
        if has_rain && let Some(area) = it.next() {
            let ymax = top(months.iter().filter_map(|m| m.rain_mm), 1.0);
            let mut c = month_panel(area, 0f64..ymax, "rainfall [mm/month]")?;
            c.draw_series(months.iter().filter_map(|m| {
                let x = f64::from(m.month);
                m.rain_mm
                    .map(|r| Rectangle::new([(x - 0.35, 0.0), (x + 0.35, r)], colour(5).filled()))
            }))
            .map_err(err)?;
        }
        root.present().map_err(err)?;
    }
    Ok(finish("climate", &title, svg))
}

/// Mean daily distillate per m² of footprint by month, one line per ranked variant.
pub fn monthly_yield_chart(ctx: &ReportContext) -> Result<Chart, String> {
    let title = "Distillate by month, every variant compared".to_owned();
    let v = &ctx.variants.monthly;
    let ymax = top(v.iter().flat_map(|m| m.l_m2_day.iter().copied()), 0.5);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let mut c = ChartBuilder::on(&root)
            .caption(&title, (FONT, 20))
            .margin(10)
            .x_label_area_size(40)
            .y_label_area_size(60)
            .build_cartesian_2d(0.5f64..12.5f64, 0f64..ymax)
            .map_err(err)?;
        c.configure_mesh()
            .x_labels(12)
            .x_label_formatter(&month_label)
            .x_desc("month")
            .y_desc("distillate [L/m²/day] per m² of footprint")
            .light_line_style(WHITE)
            .draw()
            .map_err(err)?;
        for (i, m) in v.iter().enumerate() {
            let col = colour(i);
            let pts: Vec<(f64, f64)> = m
                .l_m2_day
                .iter()
                .enumerate()
                .map(|(k, y)| (k as f64 + 1.0, *y))
                .collect();
            marked_line(&mut c, pts, col, format!("{} ({})", m.name, m.kind))?;
        }
        legend(&mut c, SeriesLabelPosition::UpperRight)?;
        root.present().map_err(err)?;
    }
    Ok(finish("monthly_yield", &title, svg))
}

/// Annual yield against cost per litre; variants on the Pareto front filled and joined.
pub fn pareto_chart(ctx: &ReportContext) -> Result<Chart, String> {
    let title =
        "Yield against cost per litre (filled: no variant beats it on every count)".to_owned();
    let r = &ctx.variants.ranking;
    let xmax = top(r.iter().map(|x| x.values.cost_per_l), 0.01);
    // Head room for the legend.
    let ymax = top(r.iter().map(|x| x.values.annual_l_m2), 10.0) * 1.3;
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let mut c = ChartBuilder::on(&root)
            .caption(&title, (FONT, 18))
            .margin(10)
            .x_label_area_size(40)
            .y_label_area_size(70)
            .build_cartesian_2d(0f64..xmax, 0f64..ymax)
            .map_err(err)?;
        c.configure_mesh()
            .x_desc(format!(
                "cost per litre over the life [{}/L]",
                ctx.meta.currency
            ))
            .y_desc("annual distillate [L/m²/year]")
            .light_line_style(WHITE)
            .draw()
            .map_err(err)?;
        // One series per variant, named in a legend (labels beside close points collide).
        // The front is over all five criteria, so its members are not joined by a line.
        for (i, x) in r.iter().enumerate() {
            let p = (x.values.cost_per_l, x.values.annual_l_m2);
            let col = colour(i);
            let filled = x.pareto;
            let style = if filled {
                col.filled()
            } else {
                col.stroke_width(2)
            };
            c.draw_series(std::iter::once(Circle::new(p, 6, style)))
                .map_err(err)?
                .label(format!(
                    "{} (rank {}{})",
                    x.name,
                    x.rank,
                    if filled { ", on the front" } else { "" }
                ))
                .legend(move |(lx, ly)| {
                    let s = if filled {
                        col.filled()
                    } else {
                        col.stroke_width(2)
                    };
                    Circle::new((lx + 6, ly), 5, s)
                });
        }
        legend(&mut c, SeriesLabelPosition::UpperLeft)?;
        root.present().map_err(err)?;
    }
    Ok(finish("pareto", &title, svg))
}

/// Picks one figure of an hour of the day profile.
type HourPick = fn(&super::context::ProfileHour) -> f64;

/// Brine depth and salinity over the worst month's day of the charted basin still.
pub fn day_profile_chart(ctx: &ReportContext) -> Result<Option<Chart>, String> {
    let Some(name) = &ctx.operation.profile_variant else {
        return Ok(None);
    };
    let p = &ctx.operation.profile;
    if p.is_empty() {
        return Ok(None);
    }
    let title = format!("Brine depth and salinity over a day of the worst month — {name}");
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (SIZE.0, 520)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let root = root.titled(&title, (FONT, 18)).map_err(err)?;
        let areas = root.split_evenly((2, 1));
        let series: [(&str, HourPick, usize); 2] = [
            ("brine depth [mm]", |h| h.depth_mm, 0),
            ("salinity [g/kg]", |h| h.salinity_g_kg, 3),
        ];
        for (area, (label, pick, ci)) in areas.iter().zip(series) {
            let ymax = top(p.iter().map(pick), 1.0);
            let mut c = ChartBuilder::on(area)
                .margin(8)
                .x_label_area_size(32)
                .y_label_area_size(60)
                .build_cartesian_2d(0f64..24f64, 0f64..ymax)
                .map_err(err)?;
            c.configure_mesh()
                .x_labels(13)
                .x_desc("solar time [h]")
                .y_desc(label)
                .light_line_style(WHITE)
                .draw()
                .map_err(err)?;
            let col = colour(ci);
            c.draw_series(LineSeries::new(
                p.iter().map(|h| (h.solar_hour_h, pick(h))),
                col.stroke_width(2),
            ))
            .map_err(err)?;
        }
        root.present().map_err(err)?;
    }
    Ok(Some(finish("day_profile", &title, svg)))
}

/// Tornado of the sensitivity hook: each parameter's low and high output around the base.
pub fn tornado_chart(s: &SensitivitySection) -> Result<Chart, String> {
    let title = format!("What moves the {} of {} most", s.output, s.variant);
    let n = s.bars.len().max(1);
    let lo = s
        .bars
        .iter()
        .flat_map(|b| [b.low, b.high])
        .chain(std::iter::once(s.base))
        .filter(|x| x.is_finite())
        .fold(f64::INFINITY, f64::min);
    let hi = s
        .bars
        .iter()
        .flat_map(|b| [b.low, b.high])
        .chain(std::iter::once(s.base))
        .filter(|x| x.is_finite())
        .fold(f64::NEG_INFINITY, f64::max);
    let (lo, hi) = if lo.is_finite() && hi.is_finite() && hi > lo {
        let pad = (hi - lo) * 0.1;
        (lo - pad, hi + pad)
    } else {
        (s.base - 1.0, s.base + 1.0)
    };
    let names: Vec<String> = s.bars.iter().map(|b| b.parameter.clone()).collect();
    let mut svg = String::new();
    {
        let root =
            SVGBackend::with_string(&mut svg, (SIZE.0, 120 + 40 * n as u32)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let mut c = ChartBuilder::on(&root)
            .caption(&title, (FONT, 18))
            .margin(10)
            .x_label_area_size(40)
            .y_label_area_size(200)
            .build_cartesian_2d(lo..hi, -0.5f64..(n as f64 - 0.5))
            .map_err(err)?;
        let label = |y: &f64| {
            let i = y.round();
            if (y - i).abs() > 1e-6 || i < 0.0 {
                return String::new();
            }
            // Largest swing at the top.
            names
                .get(n.saturating_sub(1).saturating_sub(i as usize))
                .cloned()
                .unwrap_or_default()
        };
        c.configure_mesh()
            .y_labels(n)
            .y_label_formatter(&label)
            .x_desc(s.output.clone())
            .light_line_style(WHITE)
            .draw()
            .map_err(err)?;
        for (k, b) in s.bars.iter().enumerate() {
            let y = (n - 1 - k) as f64;
            c.draw_series([
                Rectangle::new(
                    [(s.base.min(b.low), y - 0.35), (s.base.max(b.low), y + 0.35)],
                    colour(0).filled(),
                ),
                Rectangle::new(
                    [
                        (s.base.min(b.high), y - 0.35),
                        (s.base.max(b.high), y + 0.35),
                    ],
                    colour(1).filled(),
                ),
            ])
            .map_err(err)?;
        }
        c.draw_series(LineSeries::new(
            [(s.base, -0.5), (s.base, n as f64 - 0.5)],
            BLACK.stroke_width(1),
        ))
        .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(finish("tornado", &title, svg))
}

/// Draw every chart the context has data for.
pub fn draw_all(ctx: &ReportContext) -> Result<Vec<Chart>, String> {
    let mut out = vec![
        climate_chart(ctx)?,
        monthly_yield_chart(ctx)?,
        pareto_chart(ctx)?,
    ];
    if let Some(c) = day_profile_chart(ctx)? {
        out.push(c);
    }
    if let Some(s) = &ctx.sensitivity {
        out.push(tornado_chart(s)?);
    }
    Ok(out)
}
