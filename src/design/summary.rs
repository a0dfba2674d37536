//! A short plain-text summary of a loaded design, as `stillbench check` prints it.

use std::io::{self, Write};

use super::LoadedDesign;
use super::schema::{
    Climate, Humidity, MonthlyClimate, Period, Sink, Variant, VariantKind, WeatherFormat,
};

const MONTHS: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

fn min_max(v: &[f64; 12]) -> (f64, usize, f64, usize) {
    let mut lo = (f64::INFINITY, 0);
    let mut hi = (f64::NEG_INFINITY, 0);
    for (i, x) in v.iter().enumerate() {
        if *x < lo.0 {
            lo = (*x, i);
        }
        if *x > hi.0 {
            hi = (*x, i);
        }
    }
    (lo.0, lo.1, hi.0, hi.1)
}

fn hemisphere(v: f64, pos: char, neg: char) -> String {
    format!("{:.3}° {}", v.abs(), if v >= 0.0 { pos } else { neg })
}

fn monthly(w: &mut dyn Write, m: &MonthlyClimate) -> io::Result<()> {
    let (glo, gi, ghi, gj) = min_max(&m.ghi_kwh_m2_day);
    writeln!(
        w,
        "Climate:   monthly means; global horizontal irradiation {:.2} kWh/m²/day annual mean \
         ({glo:.2} in {}, {ghi:.2} in {})",
        m.annual_mean_ghi_kwh_m2_day(),
        MONTHS[gi],
        MONTHS[gj]
    )?;
    let (tlo, _, _, _) = min_max(&m.t_min_c);
    let (_, _, thi, _) = min_max(&m.t_max_c);
    let (wlo, _, whi, _) = min_max(&m.wind_m_s);
    write!(
        w,
        "           air {tlo:.1} to {thi:.1} °C; wind {wlo:.1}–{whi:.1} m/s at {} m; ",
        m.wind_height_m
    )?;
    match (&m.humidity, m.humidity_defaulted) {
        (Humidity::RelativePercent(_), true) => {
            writeln!(
                w,
                "humidity not given (default {} %)",
                super::DEFAULT_RH_PERCENT
            )
        }
        (Humidity::RelativePercent(rh), false) => {
            let (lo, _, hi, _) = min_max(rh);
            writeln!(w, "relative humidity {lo:.0}–{hi:.0} %")
        }
        (Humidity::DewPointC(dp), _) => {
            let (lo, _, hi, _) = min_max(dp);
            writeln!(w, "dew point {lo:.1} to {hi:.1} °C")
        }
    }
}

fn variant(w: &mut dyn Write, i: usize, v: &Variant) -> io::Result<()> {
    variant_kind(w, i, v)?;
    if let Some(c) = &v.calibration {
        calibration(w, c)?;
    }
    Ok(())
}

/// The calibration factors a variant runs with and where they came from.
fn calibration(w: &mut dyn Write, c: &super::Calibration) -> io::Result<()> {
    let mut f = Vec::new();
    for (name, x) in [
        ("distillate_factor", c.distillate_factor),
        ("cover_transmittance_factor", c.cover_transmittance_factor),
        ("cover_emissivity", c.cover_emissivity),
        ("base_loss_factor", c.base_loss_factor),
    ] {
        if let Some(x) = x {
            f.push(format!("{name} {x}"));
        }
    }
    if f.is_empty() {
        f.push("none (neutral)".into());
    }
    let from = match (&c.fitted_from, &c.fitted_on) {
        (Some(a), Some(b)) => format!("fitted from {a} on {b}"),
        (Some(a), None) => format!("fitted from {a}"),
        (None, Some(b)) => format!("fitted on {b}"),
        (None, None) => "no source given (fitted_from, fitted_on)".into(),
    };
    let note = c
        .note
        .as_deref()
        .map_or_else(String::new, |n| format!("; note: {n}"));
    writeln!(w, "     calibration: {}; {from}{note}", f.join(", "))
}

fn variant_kind(w: &mut dyn Write, i: usize, v: &Variant) -> io::Result<()> {
    writeln!(
        w,
        "  {}. {} — {}: footprint {:.2} m² ({} × {} m), cover {:.2} m² at {}° facing {}°, cover \"{}\"",
        i + 1,
        v.name,
        v.kind.name(),
        v.footprint_m2(),
        v.width_m,
        v.length_m,
        v.cover_area_m2(),
        v.cover_tilt_deg(),
        v.cover_azimuth_deg,
        v.cover
    )?;
    match &v.kind {
        VariantKind::SingleSlope(k) => writeln!(
            w,
            "     front wall {} mm, back wall {:.0} mm (derived); brine {} mm; liner \"{}\"; \
             {} base insulation layer(s); collection {}, leakage {}",
            k.front_wall_mm,
            k.back_wall_mm(v.width_m),
            k.brine_depth_mm,
            k.liner,
            k.base_insulation.len(),
            k.collection_efficiency,
            k.vapour_leakage
        ),
        VariantKind::DoubleSlope(k) => writeln!(
            w,
            "     side walls {} mm, ridge {:.0} mm (derived); faces at {}° and {}°; brine {} mm; \
             liner \"{}\"",
            k.side_wall_mm,
            k.ridge_mm(v.width_m),
            v.cover_azimuth_deg,
            (v.cover_azimuth_deg + 180.0) % 360.0,
            k.brine_depth_mm,
            k.liner
        ),
        VariantKind::Wick(k) => writeln!(
            w,
            "     wick \"{}\" {:.2} m² (sloped); gap {} mm; feed {} L/h/m²{}",
            k.cloth,
            v.cover_area_m2(),
            k.gap_mm,
            k.feed_l_h_m2,
            match k.feed_temperature_c {
                Some(t) => format!(" at {t} °C"),
                None => " at air temperature".to_string(),
            }
        ),
        VariantKind::Stepped(k) => {
            let (clear, _) = k.min_clearance_mm(v.width_m);
            writeln!(
                w,
                "     {} trays {:.0} mm deep (front to back) × {} mm brine, riser {} mm; front \
                 wall {} mm, back wall {:.0} mm; least clearance under cover {:.0} mm; liner \"{}\"",
                k.trays,
                k.tread_m(v.width_m) * 1000.0,
                k.tray_depth_mm,
                k.riser_mm,
                k.front_wall_mm,
                k.back_wall_mm(v.width_m),
                clear,
                k.liner
            )
        }
        VariantKind::MultiEffect(k) => {
            // An air sink without a set coefficient is modelled from its fins (free
            // convection and radiation, following the plate hour by hour), so its geometry is
            // what the design fixes; any other sink runs at its coefficient.
            let factor = if (k.sink_convection_factor - 1.0).abs() > 1e-12 {
                format!(", convection × {}", k.sink_convection_factor)
            } else {
                String::new()
            };
            let sink = match (k.sink, k.sink_coefficient_w_m2_k) {
                (Sink::AirFins, None) if k.fin_height_mm > 0.0 => format!(
                    "{} with fins {} mm high at {} mm spacing, {} mm thick (coefficient from \
                     free convection and radiation, hour by hour{factor})",
                    k.sink.name(),
                    k.fin_height_mm,
                    k.fin_spacing_mm,
                    k.fin_thickness_mm
                ),
                (Sink::AirFins, None) => format!(
                    "{}, a plain plate without fins (coefficient from free convection and \
                     radiation, hour by hour{factor})",
                    k.sink.name()
                ),
                _ => format!("{} at {} W/m²K", k.sink.name(), k.sink_coefficient()),
            };
            writeln!(
                w,
                "     {} stages, gap {} mm; plate \"{}\", wick \"{}\", absorber \"{}\"; sink {}; \
                 feed {} L/h/m² per stage",
                k.stages, k.gap_mm, k.plate, k.wick_cloth, k.absorber, sink, k.feed_l_h_m2
            )
        }
    }
}

/// Write the summary of `loaded` to `w`.
pub fn write_summary(w: &mut dyn Write, loaded: &LoadedDesign) -> io::Result<()> {
    let d = &loaded.design;
    writeln!(w, "Design:    {}", loaded.source.display())?;
    write!(
        w,
        "Project:   {} (currency {})",
        d.project.title, d.project.currency
    )?;
    match &d.project.demand {
        Some(dem) => writeln!(w, "; demand {:.0} L/day", dem.total_litres_per_day())?,
        None => writeln!(w)?,
    }
    let s = &d.site;
    writeln!(
        w,
        "Site:      {}, {}, {}, {} m, UTC{:+}; feed {} g/kg; albedo {}; {} horizon point(s)",
        s.name,
        hemisphere(s.latitude_deg, 'N', 'S'),
        hemisphere(s.longitude_deg, 'E', 'W'),
        s.elevation_m,
        s.utc_offset_h,
        s.feed_salinity_g_kg,
        s.albedo,
        s.horizon.len()
    )?;
    match &s.climate {
        Climate::Monthly(m) => monthly(w, m)?,
        Climate::WeatherFile(f) => writeln!(
            w,
            "Climate:   weather file {} ({}, timestamps mark the {} of each interval)",
            f.path.display(),
            match f.format {
                WeatherFormat::Csv => "CSV",
                WeatherFormat::Epw => "EPW",
            },
            match f.period {
                Period::Ending => "end",
                Period::Beginning => "start",
                Period::Centred => "middle",
            }
        )?,
    }
    let lib = &loaded.library;
    writeln!(
        w,
        "Materials: {} ({}): {} items, {} local; prices in {}",
        lib.library.name,
        loaded.library_path.display(),
        lib.items.len(),
        lib.local_count(),
        lib.library.currency
    )?;
    writeln!(w, "Variants:  {}", d.variants.len())?;
    for (i, v) in d.variants.iter().enumerate() {
        variant(w, i, v)?;
    }
    if loaded.warnings.is_empty() {
        writeln!(w, "No warnings.")?;
    } else {
        writeln!(w, "Warnings:  {}", loaded.warnings.len())?;
        for warning in &loaded.warnings {
            writeln!(w, "  warning: {warning}")?;
        }
    }
    Ok(())
}
