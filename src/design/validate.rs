//! The validation pass: every range, every cross-field rule and every material reference,
//! all reported at once.

use std::collections::HashMap;
use std::path::Path;

use super::library::{Item, Library, PROPERTY_TABLES, Role};
use super::parse::Files;
use super::reader::Reader;
use super::schema::*;
use super::spans::{self, hint};

/// One end of an allowed interval.
#[derive(Clone, Copy)]
pub(super) enum B {
    /// The end is allowed.
    In(f64),
    /// The end itself is not allowed.
    Ex(f64),
}

impl B {
    fn below(self, v: f64) -> bool {
        match self {
            B::In(lo) => v >= lo,
            B::Ex(lo) => v > lo,
        }
    }
    fn above(self, v: f64) -> bool {
        match self {
            B::In(hi) => v <= hi,
            B::Ex(hi) => v < hi,
        }
    }
}

/// `[lo, hi)` style text for an interval with a unit.
fn interval(lo: B, hi: B, unit: &str) -> String {
    let (l, lv) = match lo {
        B::In(v) => ('[', v),
        B::Ex(v) => ('(', v),
    };
    let (h, hv) = match hi {
        B::In(v) => (']', v),
        B::Ex(v) => (')', v),
    };
    if unit.is_empty() {
        format!("{l}{lv}, {hv}{h}")
    } else {
        format!("{l}{lv}, {hv}{h} {unit}")
    }
}

/// Check `v` lies in the interval; record an error at `path` if not. NaN and infinities fail.
pub(super) fn range(r: &mut Reader<'_>, path: &str, v: f64, lo: B, hi: B, unit: &str) -> bool {
    if !v.is_finite() {
        r.error(
            path,
            format!(
                "`{v}` is not a finite number; allowed {}",
                interval(lo, hi, unit)
            ),
        );
        return false;
    }
    if lo.below(v) && hi.above(v) {
        return true;
    }
    r.error(
        path,
        format!(
            "{} is out of range; allowed {}",
            shown(v),
            interval(lo, hi, unit)
        ),
    );
    false
}

/// A number as the user would write it: plain, or in exponent form when it is very small or
/// very large (`1e-320`, not three hundred zeros).
pub(super) fn shown(v: f64) -> String {
    if v != 0.0 && !(1e-4..1e9).contains(&v.abs()) {
        format!("{v:e}")
    } else {
        format!("{v}")
    }
}

fn opt_range(r: &mut Reader<'_>, path: &str, v: Option<f64>, lo: B, hi: B, unit: &str) {
    if let Some(v) = v {
        range(r, path, v, lo, hi, unit);
    }
}

pub(super) fn text_len(r: &mut Reader<'_>, path: &str, s: &str, max: usize) {
    let n = s.trim().chars().count();
    if n == 0 || n > max {
        r.error(
            path,
            format!("{n} characters given (after trimming); allowed 1 to {max}"),
        );
    }
}

fn currency(r: &mut Reader<'_>, path: &str, c: &str) -> bool {
    let ok = c.len() == 3 && c.bytes().all(|b| b.is_ascii_uppercase());
    if !ok {
        r.error(
            path,
            format!(
                "\"{c}\" is not a currency code; allowed: three upper-case letters such as \"USD\""
            ),
        );
    }
    ok
}

/// A `YYYY-MM-DD` date with a month 1–12 and a day 1–31.
fn is_iso_date(s: &str) -> bool {
    let b = s.as_bytes();
    if b.len() != 10 || b[4] != b'-' || b[7] != b'-' {
        return false;
    }
    let num = |r: std::ops::Range<usize>| s.get(r).and_then(|t| t.parse::<u32>().ok());
    matches!(
        (num(0..4), num(5..7), num(8..10)),
        (Some(y), Some(m), Some(d)) if y >= 1900 && (1..=12).contains(&m) && (1..=31).contains(&d)
    )
}

/// `[project]`. `costs_money_given` says whether `[costs]` sets `labour_rate_per_h` and
/// `operator_rate_per_h` (their defaults are invented USD rates).
pub(crate) fn project(
    r: &mut Reader<'_>,
    p: &Project,
    library: Option<&Library>,
    costs_money_given: [bool; 2],
) {
    text_len(r, "project.title", &p.title, 200);
    let currency_ok = currency(r, "project.currency", &p.currency);
    if let Some(lib) = library
        && currency_ok
        && lib.library.currency != p.currency
    {
        r.error(
            "project.currency",
            format!(
                "\"{}\" does not match the materials library, whose prices are in {}; allowed: \
                 the library's currency (set `currency = \"{}\"` here, or use a library priced \
                 in {}), since every cost is counted in the library's prices",
                p.currency, lib.library.currency, lib.library.currency, p.currency
            ),
        );
    }
    if currency_ok && p.currency != "USD" {
        for (given, field) in costs_money_given
            .iter()
            .zip(["labour_rate_per_h", "operator_rate_per_h"])
        {
            if !given {
                r.error(
                    &format!("costs.{field}"),
                    format!(
                        "required when the project counts in {}: its default is an invented \
                         rate in USD; give the local rate in {} per hour",
                        p.currency, p.currency
                    ),
                );
            }
        }
    }
    if currency_ok && p.currency != "USD" && p.money_scales.is_none() {
        r.error(
            "project.money_scales",
            format!(
                "required when the project counts in {c}: the ranking's money references are \
                 stated in USD; give `per_usd` (the {c} per USD rate) with `rate_date` and \
                 `source`, or `cost_per_litre` and `capital_per_l_day` in {c} with `source`",
                c = p.currency
            ),
        );
    }
    if let Some(m) = &p.money_scales {
        text_len(r, "project.money_scales.source", &m.source, 200);
        opt_range(
            r,
            "project.money_scales.per_usd",
            m.per_usd,
            B::Ex(0.0),
            B::In(1e7),
            &format!("{} per USD", p.currency),
        );
        opt_range(
            r,
            "project.money_scales.cost_per_litre",
            m.cost_per_litre,
            B::Ex(0.0),
            B::In(1e7),
            &format!("{}/L", p.currency),
        );
        opt_range(
            r,
            "project.money_scales.capital_per_l_day",
            m.capital_per_l_day,
            B::Ex(0.0),
            B::In(1e10),
            &format!("{} per L/day", p.currency),
        );
        match (&m.per_usd, &m.rate_date) {
            (Some(_), None) => r.error(
                "project.money_scales.rate_date",
                "required with `per_usd`: the date the rate was quoted, as \"YYYY-MM-DD\""
                    .to_string(),
            ),
            (None, Some(_)) => r.error(
                "project.money_scales.rate_date",
                "only meaningful together with `per_usd`".to_string(),
            ),
            (Some(_), Some(d)) if !is_iso_date(d) => r.error(
                "project.money_scales.rate_date",
                format!("\"{d}\" is not a date; allowed \"YYYY-MM-DD\", e.g. \"2026-11-30\""),
            ),
            _ => {}
        }
        if m.per_usd.is_none() && (m.cost_per_litre.is_none() || m.capital_per_l_day.is_none()) {
            r.error(
                "project.money_scales",
                "give `per_usd` (with `rate_date`), or both `cost_per_litre` and \
                 `capital_per_l_day`"
                    .to_string(),
            );
        }
        if let Some(x) = m.per_usd
            && p.currency == "USD"
            && (x - 1.0).abs() > 1e-12
        {
            r.error(
                "project.money_scales.per_usd",
                format!("{x} given, but the project counts in USD; allowed 1 (or leave it out)"),
            );
        }
    }
    if let Some(d) = &p.demand {
        match (d.people, d.litres_per_day) {
            (Some(_), Some(_)) => r.error(
                "project.demand.litres_per_day",
                "give either `people` or `litres_per_day`, not both".to_string(),
            ),
            (None, None) => r.error(
                "project.demand",
                "give one of `people` (with optional `litres_per_person_day`) or `litres_per_day`"
                    .to_string(),
            ),
            _ => {}
        }
        if d.people.is_none() && d.litres_per_person_day.is_some() {
            r.error(
                "project.demand.litres_per_person_day",
                "only meaningful together with `people`".to_string(),
            );
        }
        for (which, message) in demand_problems(d.people, d.litres_per_person_day, d.litres_per_day)
        {
            r.error(&format!("project.demand.{which}"), message);
        }
    }
}

/// `[site]` without its climate.
pub(crate) fn site(r: &mut Reader<'_>, s: &Site) {
    text_len(r, "site.name", &s.name, 200);
    if let Climate::Monthly(m) = &s.climate
        && s.latitude_deg.is_finite()
        && (-90.0..=90.0).contains(&s.latitude_deg)
    {
        monthly_sunlight_below_extraterrestrial(r, s.latitude_deg, &m.ghi_kwh_m2_day);
    }
    range(
        r,
        "site.latitude_deg",
        s.latitude_deg,
        B::In(-90.0),
        B::In(90.0),
        "deg",
    );
    range(
        r,
        "site.longitude_deg",
        s.longitude_deg,
        B::In(-180.0),
        B::In(180.0),
        "deg",
    );
    range(
        r,
        "site.elevation_m",
        s.elevation_m,
        B::In(-500.0),
        B::In(6000.0),
        "m",
    );
    range(
        r,
        "site.utc_offset_h",
        s.utc_offset_h,
        B::In(-12.0),
        B::In(14.0),
        "h",
    );
    range(
        r,
        "site.feed_salinity_g_kg",
        s.feed_salinity_g_kg,
        B::In(0.0),
        B::In(120.0),
        "g/kg",
    );
    range(r, "site.albedo", s.albedo, B::In(0.0), B::In(1.0), "");
    for (i, h) in s.horizon.iter().enumerate() {
        let p = spans::index("site.horizon", i);
        range(
            r,
            &format!("{p}.azimuth_deg"),
            h.azimuth_deg,
            B::In(0.0),
            B::Ex(360.0),
            "deg",
        );
        range(
            r,
            &format!("{p}.elevation_deg"),
            h.elevation_deg,
            B::In(0.0),
            B::Ex(90.0),
            "deg",
        );
    }
}

/// Monthly sunlight on the ground cannot exceed `KT_BAR_MAX` of the extraterrestrial
/// irradiation at the site's latitude (a monthly clearness index above 0.85 is not seen on
/// Earth; common practice, no source), nor be given for a month of polar night.
fn monthly_sunlight_below_extraterrestrial(r: &mut Reader<'_>, latitude_deg: f64, ghi: &[f64; 12]) {
    use crate::climate::monthly::{KT_BAR_MAX, monthly_extraterrestrial_kwh_m2_day};
    let h0 = monthly_extraterrestrial_kwh_m2_day(latitude_deg);
    for m in 0..12 {
        let path = spans::index("site.climate.ghi_kwh_m2_day", m);
        let g = ghi[m];
        if g > 0.0 && h0[m] <= 0.0 {
            r.error(
                &path,
                format!(
                    "{g} kWh/m2/day given for a month of polar night at latitude \
                     {latitude_deg}°; allowed 0 (check the latitude's sign)"
                ),
            );
        } else if g > KT_BAR_MAX * h0[m] {
            r.error(
                &path,
                format!(
                    "{g} kWh/m2/day is more than {KT_BAR_MAX} of the {:.2} kWh/m2/day that reaches \
                     the top of the atmosphere at latitude {latitude_deg}° in month {}; allowed \
                     [0, {:.2}] (check the units, the month order and the latitude's sign)",
                    h0[m],
                    m + 1,
                    KT_BAR_MAX * h0[m]
                ),
            );
        }
    }
}

/// Twelve values at `path`, each in range; `None` (with issues recorded) otherwise.
fn twelve(
    r: &mut Reader<'_>,
    path: &str,
    v: &[f64],
    lo: B,
    hi: B,
    unit: &str,
) -> Option<[f64; 12]> {
    let mut ok = true;
    if v.len() > 12 {
        r.error(
            &spans::index(path, 12),
            format!(
                "{} values given; exactly 12 monthly values (January to December) allowed",
                v.len()
            ),
        );
        ok = false;
    } else if v.len() < 12 {
        r.error(
            path,
            format!(
                "{} values given; exactly 12 monthly values (January to December) allowed",
                v.len()
            ),
        );
        ok = false;
    }
    for (i, x) in v.iter().enumerate().take(12) {
        ok &= range(r, &spans::index(path, i), *x, lo, hi, unit);
    }
    if !ok {
        return None;
    }
    let mut out = [0.0; 12];
    out.copy_from_slice(&v[..12]);
    Some(out)
}

/// `[site.climate]` with `source = "monthly"`.
pub(crate) fn monthly(r: &mut Reader<'_>, m: MonthlyFields) -> Option<MonthlyClimate> {
    let p = "site.climate";
    let ghi = twelve(
        r,
        &format!("{p}.ghi_kwh_m2_day"),
        &m.ghi_kwh_m2_day,
        B::In(0.0),
        B::In(12.0),
        "kWh/m2/day",
    );
    let tmax = twelve(
        r,
        &format!("{p}.t_max_c"),
        &m.t_max_c,
        B::In(-50.0),
        B::In(60.0),
        "degC",
    );
    let tmin = twelve(
        r,
        &format!("{p}.t_min_c"),
        &m.t_min_c,
        B::In(-60.0),
        B::In(50.0),
        "degC",
    );
    let wind = twelve(
        r,
        &format!("{p}.wind_m_s"),
        &m.wind_m_s,
        B::In(0.0),
        B::In(40.0),
        "m/s",
    );
    range(
        r,
        &format!("{p}.wind_height_m"),
        m.wind_height_m,
        B::Ex(0.5),
        B::In(100.0),
        "m",
    );
    if let (Some(hi), Some(lo)) = (&tmax, &tmin) {
        for i in 0..12 {
            if lo[i] > hi[i] {
                r.error(
                    &spans::index(&format!("{p}.t_min_c"), i),
                    format!(
                        "t_min_c {} is above t_max_c {} for month {}; the minimum must not exceed the maximum",
                        lo[i],
                        hi[i],
                        i + 1
                    ),
                );
            }
        }
    }
    let humidity = match (&m.rh_percent, &m.dew_point_c) {
        (Some(_), Some(_)) => {
            r.error(
                &format!("{p}.dew_point_c"),
                "give either `rh_percent` or `dew_point_c`, not both".to_string(),
            );
            None
        }
        (Some(rh), None) => twelve(
            r,
            &format!("{p}.rh_percent"),
            rh,
            B::Ex(0.0),
            B::In(100.0),
            "%",
        )
        .map(Humidity::RelativePercent),
        (None, Some(dp)) => {
            let d = twelve(
                r,
                &format!("{p}.dew_point_c"),
                dp,
                B::In(-60.0),
                B::In(50.0),
                "degC",
            );
            if let (Some(d), Some(hi)) = (&d, &tmax) {
                for i in 0..12 {
                    if d[i] > hi[i] {
                        r.error(
                            &spans::index(&format!("{p}.dew_point_c"), i),
                            format!(
                                "dew point {} degC is above the daily maximum {} degC for month {}",
                                d[i],
                                hi[i],
                                i + 1
                            ),
                        );
                    }
                }
            }
            d.map(Humidity::DewPointC)
        }
        (None, None) => Some(Humidity::RelativePercent([DEFAULT_RH_PERCENT; 12])),
    };
    let rain = match &m.rain_mm {
        Some(v) => Some(twelve(
            r,
            &format!("{p}.rain_mm"),
            v,
            B::In(0.0),
            B::In(3000.0),
            "mm",
        )?),
        None => None,
    };
    Some(MonthlyClimate {
        ghi_kwh_m2_day: ghi?,
        t_max_c: tmax?,
        t_min_c: tmin?,
        wind_m_s: wind?,
        wind_height_m: m.wind_height_m,
        humidity_defaulted: m.rh_percent.is_none() && m.dew_point_c.is_none(),
        humidity: humidity?,
        rain_mm: rain,
    })
}

/// `[site.climate]` with `source = "weather-file"`.
pub(crate) fn weather_file(
    r: &mut Reader<'_>,
    w: &WeatherFile,
    base_dir: &Path,
    files: &dyn Files,
) {
    let p = "site.climate";
    if w.path.as_os_str().is_empty() {
        r.error(&format!("{p}.path"), "the path is empty".to_string());
    } else {
        let full = base_dir.join(&w.path);
        if !files.is_file(&full) {
            r.error(
                &format!("{p}.path"),
                format!(
                    "weather file {} does not exist or is not a file",
                    full.display()
                ),
            );
        }
    }
    match (w.format, &w.columns) {
        (WeatherFormat::Csv, None) => r.error(
            &format!("{p}.columns"),
            "required for format = \"csv\": [site.climate.columns] with at least timestamp, \
             ghi_w_m2 and t_air_c"
                .to_string(),
        ),
        (WeatherFormat::Epw, Some(_)) => r.warn(
            &format!("{p}.columns"),
            "ignored for format = \"epw\" (the format fixes its columns)".to_string(),
        ),
        (WeatherFormat::Csv, Some(c)) => {
            let q = format!("{p}.columns");
            match (&c.poa_w_m2, c.poa_tilt_deg, c.poa_azimuth_deg) {
                (Some(_), Some(tilt), Some(az)) => {
                    range(
                        r,
                        &format!("{q}.poa_tilt_deg"),
                        tilt,
                        B::In(0.0),
                        B::In(90.0),
                        "deg",
                    );
                    range(
                        r,
                        &format!("{q}.poa_azimuth_deg"),
                        az,
                        B::In(0.0),
                        B::Ex(360.0),
                        "deg",
                    );
                }
                (Some(_), _, _) => r.error(
                    &format!("{q}.poa_w_m2"),
                    "a measured plane-of-array column needs the plane it was measured in: \
                     poa_tilt_deg [0, 90] and poa_azimuth_deg [0, 360)"
                        .to_string(),
                ),
                (None, Some(_), _) | (None, _, Some(_)) => r.error(
                    &format!("{q}.poa_tilt_deg"),
                    "poa_tilt_deg and poa_azimuth_deg describe the poa_w_m2 column; give that \
                     column too or remove them"
                        .to_string(),
                ),
                (None, None, None) => {}
            }
        }
        _ => {}
    }
    range(
        r,
        &format!("{p}.wind_height_m"),
        w.wind_height_m,
        B::Ex(0.5),
        B::In(100.0),
        "m",
    );
    range(
        r,
        &format!("{p}.max_gap_h"),
        w.max_gap_h,
        B::Ex(0.0),
        B::In(48.0),
        "h",
    );
}

/// Check a material reference: it must exist and have one of `roles`.
fn material(
    r: &mut Reader<'_>,
    path: &str,
    id: &str,
    roles: &[Role],
    lib: Option<&Library>,
) -> Option<()> {
    let lib = lib?;
    let wanted = roles
        .iter()
        .map(|x| format!("`{}`", x.name()))
        .collect::<Vec<_>>()
        .join(" or ");
    match lib.get(id) {
        Some(item) if roles.contains(&item.role) => Some(()),
        Some(item) => {
            r.error(
                path,
                format!(
                    "material \"{id}\" has role `{}`; this field needs role {wanted}",
                    item.role.name()
                ),
            );
            None
        }
        None => {
            let fitting: Vec<&str> = lib
                .items
                .iter()
                .filter(|i| roles.contains(&i.role))
                .map(|i| i.id.as_str())
                .collect();
            let h = hint(id, fitting.iter().copied());
            let list = if h.is_empty() && !fitting.is_empty() {
                format!("; items of role {wanted}: {}", fitting.join(", "))
            } else {
                String::new()
            };
            r.error(
                path,
                format!("unknown material \"{id}\" (not in the materials library){h}{list}"),
            );
            None
        }
    }
}

/// Warn when an item touching the water or the distillate is not food grade.
fn food_grade(r: &mut Reader<'_>, path: &str, id: &str, lib: Option<&Library>) {
    if let Some(item) = lib.and_then(|l| l.get(id))
        && !item.food_grade
    {
        r.warn(
            path,
            format!(
                "material \"{id}\" is not marked food_grade but touches the water or the distillate"
            ),
        );
    }
}

fn layers(r: &mut Reader<'_>, path: &str, ls: &[Layer], lib: Option<&Library>) {
    for (i, l) in ls.iter().enumerate() {
        let p = spans::index(path, i);
        material(
            r,
            &format!("{p}.material"),
            &l.material,
            &[Role::Insulation],
            lib,
        );
        range(
            r,
            &format!("{p}.thickness_mm"),
            l.thickness_mm,
            B::Ex(0.0),
            B::In(500.0),
            "mm",
        );
    }
}

fn tilt(r: &mut Reader<'_>, path: &str, v: f64) {
    if range(r, path, v, B::Ex(0.0), B::Ex(90.0), "deg") && v < 10.0 {
        r.warn(
            path,
            format!(
                "{v} deg is below 10 deg; condensate may drip back instead of running to the \
                 trough (common practice, no source)"
            ),
        );
    }
}

fn losses(r: &mut Reader<'_>, p: &str, collection: f64, leakage: Option<f64>) {
    range(
        r,
        &format!("{p}.collection_efficiency"),
        collection,
        B::Ex(0.0),
        B::In(1.0),
        "",
    );
    if let Some(l) = leakage {
        range(
            r,
            &format!("{p}.vapour_leakage"),
            l,
            B::In(0.0),
            B::Ex(0.5),
            "",
        );
    }
}

fn basin(r: &mut Reader<'_>, p: &str, thickness: Option<f64>) {
    opt_range(
        r,
        &format!("{p}.basin_thickness_mm"),
        thickness,
        B::Ex(0.0),
        B::In(300.0),
        "mm",
    );
}

/// Every `[[variant]]`.
pub(crate) fn variants(r: &mut Reader<'_>, vs: &[Variant], lib: Option<&Library>) {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, v) in vs.iter().enumerate() {
        let p = spans::index("variant", i);
        let name_ok = !v.name.is_empty()
            && v.name.chars().count() <= 60
            && v.name
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || matches!(c, ' ' | '_' | '.' | '-'));
        if !name_ok {
            r.error(
                &format!("{p}.name"),
                format!(
                    "\"{}\" is not a valid name; allowed 1 to 60 characters of A-Z a-z 0-9 space _ . -",
                    v.name
                ),
            );
        }
        if let Some(first) = seen.get(v.name.as_str()) {
            r.error(
                &format!("{p}.name"),
                format!(
                    "duplicate variant name \"{}\" (already used by variant[{}]); names must be unique",
                    v.name,
                    first + 1
                ),
            );
        } else {
            seen.insert(&v.name, i);
        }
        range(
            r,
            &format!("{p}.width_m"),
            v.width_m,
            B::Ex(0.2),
            B::In(10.0),
            "m",
        );
        range(
            r,
            &format!("{p}.length_m"),
            v.length_m,
            B::Ex(0.2),
            B::In(50.0),
            "m",
        );
        range(
            r,
            &format!("{p}.cover_azimuth_deg"),
            v.cover_azimuth_deg,
            B::In(0.0),
            B::Ex(360.0),
            "deg",
        );
        material(r, &format!("{p}.cover"), &v.cover, &[Role::Cover], lib);
        let absorber = [Role::Liner, Role::Paint];
        match &v.kind {
            VariantKind::SingleSlope(k) => {
                tilt(r, &format!("{p}.cover_tilt_deg"), k.cover_tilt_deg);
                range(
                    r,
                    &format!("{p}.front_wall_mm"),
                    k.front_wall_mm,
                    B::In(20.0),
                    B::In(1000.0),
                    "mm",
                );
                range(
                    r,
                    &format!("{p}.brine_depth_mm"),
                    k.brine_depth_mm,
                    B::In(MIN_BRINE_DEPTH_MM),
                    B::In(300.0),
                    "mm",
                );
                if material(r, &format!("{p}.liner"), &k.liner, &absorber, lib).is_some() {
                    food_grade(r, &format!("{p}.liner"), &k.liner, lib);
                }
                basin(r, &p, k.basin_thickness_mm);
                layers(r, &format!("{p}.base_insulation"), &k.base_insulation, lib);
                layers(r, &format!("{p}.side_insulation"), &k.side_insulation, lib);
                losses(r, &p, k.collection_efficiency, Some(k.vapour_leakage));
                range(
                    r,
                    &format!("{p}.soiling_transmittance"),
                    k.soiling_transmittance,
                    B::Ex(0.0),
                    B::In(1.0),
                    "",
                );
            }
            VariantKind::DoubleSlope(k) => {
                tilt(r, &format!("{p}.cover_tilt_deg"), k.cover_tilt_deg);
                range(
                    r,
                    &format!("{p}.side_wall_mm"),
                    k.side_wall_mm,
                    B::In(20.0),
                    B::In(1000.0),
                    "mm",
                );
                range(
                    r,
                    &format!("{p}.brine_depth_mm"),
                    k.brine_depth_mm,
                    B::In(MIN_BRINE_DEPTH_MM),
                    B::In(300.0),
                    "mm",
                );
                if material(r, &format!("{p}.liner"), &k.liner, &absorber, lib).is_some() {
                    food_grade(r, &format!("{p}.liner"), &k.liner, lib);
                }
                basin(r, &p, k.basin_thickness_mm);
                layers(r, &format!("{p}.base_insulation"), &k.base_insulation, lib);
                layers(r, &format!("{p}.side_insulation"), &k.side_insulation, lib);
                losses(r, &p, k.collection_efficiency, Some(k.vapour_leakage));
            }
            VariantKind::Wick(k) => {
                tilt(r, &format!("{p}.cover_tilt_deg"), k.cover_tilt_deg);
                range(
                    r,
                    &format!("{p}.gap_mm"),
                    k.gap_mm,
                    B::In(5.0),
                    B::In(200.0),
                    "mm",
                );
                if material(r, &format!("{p}.cloth"), &k.cloth, &[Role::Wick], lib).is_some() {
                    food_grade(r, &format!("{p}.cloth"), &k.cloth, lib);
                }
                range(
                    r,
                    &format!("{p}.feed_l_h_m2"),
                    k.feed_l_h_m2,
                    B::In(0.0),
                    B::In(20.0),
                    "L/h/m2",
                );
                opt_range(
                    r,
                    &format!("{p}.feed_temperature_c"),
                    k.feed_temperature_c,
                    B::In(-5.0),
                    B::In(80.0),
                    "degC",
                );
                layers(
                    r,
                    &format!("{p}.backing_insulation"),
                    &k.backing_insulation,
                    lib,
                );
                losses(r, &p, k.collection_efficiency, Some(k.vapour_leakage));
            }
            VariantKind::Stepped(k) => {
                let mut ok = true;
                tilt(r, &format!("{p}.cover_tilt_deg"), k.cover_tilt_deg);
                ok &= k.cover_tilt_deg.is_finite()
                    && k.cover_tilt_deg > 0.0
                    && k.cover_tilt_deg < 90.0;
                if !(1..=40).contains(&k.trays) {
                    r.error(
                        &format!("{p}.trays"),
                        format!("{} is out of range; allowed [1, 40]", k.trays),
                    );
                    ok = false;
                }
                ok &= range(
                    r,
                    &format!("{p}.tray_depth_mm"),
                    k.tray_depth_mm,
                    B::In(MIN_BRINE_DEPTH_MM),
                    B::In(100.0),
                    "mm",
                );
                ok &= range(
                    r,
                    &format!("{p}.riser_mm"),
                    k.riser_mm,
                    B::In(10.0),
                    B::In(500.0),
                    "mm",
                );
                ok &= range(
                    r,
                    &format!("{p}.front_wall_mm"),
                    k.front_wall_mm,
                    B::In(20.0),
                    B::In(1000.0),
                    "mm",
                );
                ok &= v.width_m.is_finite() && v.width_m > 0.0;
                if ok {
                    let (clear, tray) = k.min_clearance_mm(v.width_m);
                    if clear < STEPPED_MIN_CLEARANCE_MM {
                        r.error(
                            &format!("{p}.riser_mm"),
                            format!(
                                "the trays do not fit under the cover: at the back of tray {tray} \
                                 the cover clears the step by {clear:.0} mm, at least \
                                 {STEPPED_MIN_CLEARANCE_MM} mm needed; lower riser_mm or \
                                 tray_depth_mm, or raise cover_tilt_deg or front_wall_mm"
                            ),
                        );
                    }
                }
                if material(r, &format!("{p}.liner"), &k.liner, &absorber, lib).is_some() {
                    food_grade(r, &format!("{p}.liner"), &k.liner, lib);
                }
                layers(r, &format!("{p}.base_insulation"), &k.base_insulation, lib);
                layers(r, &format!("{p}.side_insulation"), &k.side_insulation, lib);
                losses(r, &p, k.collection_efficiency, Some(k.vapour_leakage));
            }
            VariantKind::MultiEffect(k) => {
                range(
                    r,
                    &format!("{p}.glazing_tilt_deg"),
                    k.glazing_tilt_deg,
                    B::In(0.0),
                    B::Ex(90.0),
                    "deg",
                );
                if !(1..=20).contains(&k.stages) {
                    r.error(
                        &format!("{p}.stages"),
                        format!("{} is out of range; allowed [1, 20]", k.stages),
                    );
                }
                range(
                    r,
                    &format!("{p}.gap_mm"),
                    k.gap_mm,
                    B::In(1.0),
                    B::In(50.0),
                    "mm",
                );
                material(r, &format!("{p}.plate"), &k.plate, &[Role::Plate], lib);
                material(r, &format!("{p}.absorber"), &k.absorber, &absorber, lib);
                if material(
                    r,
                    &format!("{p}.wick_cloth"),
                    &k.wick_cloth,
                    &[Role::Wick],
                    lib,
                )
                .is_some()
                {
                    food_grade(r, &format!("{p}.wick_cloth"), &k.wick_cloth, lib);
                }
                opt_range(
                    r,
                    &format!("{p}.sink_coefficient_w_m2_k"),
                    k.sink_coefficient_w_m2_k,
                    B::Ex(0.0),
                    B::In(5000.0),
                    "W/m2/K",
                );
                range(
                    r,
                    &format!("{p}.glazing_gap_mm"),
                    k.glazing_gap_mm,
                    B::In(5.0),
                    B::In(100.0),
                    "mm",
                );
                range(
                    r,
                    &format!("{p}.fin_height_mm"),
                    k.fin_height_mm,
                    B::In(0.0),
                    B::In(200.0),
                    "mm",
                );
                range(
                    r,
                    &format!("{p}.fin_spacing_mm"),
                    k.fin_spacing_mm,
                    B::In(3.0),
                    B::In(100.0),
                    "mm",
                );
                range(
                    r,
                    &format!("{p}.fin_thickness_mm"),
                    k.fin_thickness_mm,
                    B::In(0.3),
                    B::In(10.0),
                    "mm",
                );
                opt_range(
                    r,
                    &format!("{p}.sink_emissivity"),
                    k.sink_emissivity,
                    B::In(0.02),
                    B::In(1.0),
                    "-",
                );
                range(
                    r,
                    &format!("{p}.sink_convection_factor"),
                    k.sink_convection_factor,
                    B::In(0.2),
                    B::In(5.0),
                    "-",
                );
                range(
                    r,
                    &format!("{p}.feed_l_h_m2"),
                    k.feed_l_h_m2,
                    B::In(0.0),
                    B::In(20.0),
                    "L/h/m2",
                );
                layers(r, &format!("{p}.side_insulation"), &k.side_insulation, lib);
                losses(r, &p, k.collection_efficiency, None);
            }
        }
    }
}

fn kebab(id: &str) -> bool {
    !id.is_empty()
        && id.split('-').all(|part| {
            !part.is_empty()
                && part
                    .bytes()
                    .all(|b| b.is_ascii_lowercase() || b.is_ascii_digit())
        })
}

fn unit_interval(r: &mut Reader<'_>, path: String, v: f64) {
    range(r, &path, v, B::In(0.0), B::In(1.0), "");
}

/// The materials library.
pub(crate) fn library(r: &mut Reader<'_>, lib: &Library) {
    text_len(r, "library.name", &lib.library.name, 200);
    let _ = currency(r, "library.currency", &lib.library.currency);
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, it) in lib.items.iter().enumerate() {
        let p = spans::index("item", i);
        if !kebab(&it.id) {
            r.error(
                &format!("{p}.id"),
                format!("\"{}\" is not a kebab-case id; allowed: lower-case letters and digits in words joined by `-`", it.id),
            );
        }
        if let Some(first) = seen.get(it.id.as_str()) {
            r.error(
                &format!("{p}.id"),
                format!(
                    "duplicate id \"{}\" (already used by item[{}])",
                    it.id,
                    first + 1
                ),
            );
        } else {
            seen.insert(&it.id, i);
        }
        text_len(r, &format!("{p}.name"), &it.name, 200);
        range(
            r,
            &format!("{p}.unit_price"),
            it.unit_price,
            B::In(0.0),
            B::In(1e7),
            "",
        );
        range(
            r,
            &format!("{p}.lifetime_years"),
            it.lifetime_years,
            B::Ex(0.0),
            B::In(100.0),
            "years",
        );
        opt_range(
            r,
            &format!("{p}.lead_time_days"),
            it.lead_time_days,
            B::In(0.0),
            B::In(1000.0),
            "days",
        );
        opt_range(
            r,
            &format!("{p}.import_cost"),
            it.import_cost,
            B::In(0.0),
            B::In(1e7),
            "",
        );
        for (j, s) in it.stock.iter().enumerate() {
            let sp = spans::index(&format!("{p}.stock"), j);
            opt_range(
                r,
                &format!("{sp}.width_m"),
                s.width_m,
                B::Ex(0.0),
                B::In(100.0),
                "m",
            );
            range(
                r,
                &format!("{sp}.length_m"),
                s.length_m,
                B::Ex(0.0),
                B::In(1000.0),
                "m",
            );
            opt_range(
                r,
                &format!("{sp}.thickness_mm"),
                s.thickness_mm,
                B::Ex(0.0),
                B::In(500.0),
                "mm",
            );
        }
        opt_range(
            r,
            &format!("{p}.content_l"),
            it.content_l,
            B::Ex(0.0),
            B::In(1000.0),
            "L",
        );
        opt_range(
            r,
            &format!("{p}.coverage_m2_l"),
            it.coverage_m2_l,
            B::Ex(0.0),
            B::In(1000.0),
            "m2/L",
        );
        item_properties(r, &p, it);
    }
}

fn item_properties(r: &mut Reader<'_>, p: &str, it: &Item) {
    for (table, role) in PROPERTY_TABLES {
        let has = it.has_table(table);
        if has && role != it.role {
            r.error_at_key(
                &format!("{p}.{table}"),
                format!(
                    "[item.{table}] properties given for an item of role `{}`; use [item.{}] or change the role",
                    it.role.name(),
                    it.role.name()
                ),
            );
        }
        if !has && role == it.role {
            r.error(
                p,
                format!("items of role `{table}` need an [item.{table}] table of properties"),
            );
        }
    }
    if let Some(c) = &it.cover {
        let q = format!("{p}.cover");
        range(
            r,
            &format!("{q}.refractive_index"),
            c.refractive_index,
            B::In(1.0),
            B::In(3.0),
            "",
        );
        range(
            r,
            &format!("{q}.extinction_per_m"),
            c.extinction_per_m,
            B::In(0.0),
            B::In(1e4),
            "1/m",
        );
        range(
            r,
            &format!("{q}.thickness_mm"),
            c.thickness_mm,
            B::Ex(0.0),
            B::In(50.0),
            "mm",
        );
        unit_interval(r, format!("{q}.emissivity"), c.emissivity);
        range(
            r,
            &format!("{q}.conductivity_w_m_k"),
            c.conductivity_w_m_k,
            B::Ex(0.0),
            B::In(500.0),
            "W/m/K",
        );
    }
    for (name, s) in [("liner", &it.liner), ("paint", &it.paint)] {
        if let Some(s) = s {
            let q = format!("{p}.{name}");
            unit_interval(r, format!("{q}.absorptance"), s.absorptance);
            unit_interval(r, format!("{q}.emissivity"), s.emissivity);
            opt_range(
                r,
                &format!("{q}.thickness_mm"),
                s.thickness_mm,
                B::Ex(0.0),
                B::In(50.0),
                "mm",
            );
            opt_range(
                r,
                &format!("{q}.conductivity_w_m_k"),
                s.conductivity_w_m_k,
                B::Ex(0.0),
                B::In(500.0),
                "W/m/K",
            );
        }
    }
    if let Some(s) = &it.insulation {
        let q = format!("{p}.insulation");
        range(
            r,
            &format!("{q}.conductivity_w_m_k"),
            s.conductivity_w_m_k,
            B::Ex(0.0),
            B::In(5.0),
            "W/m/K",
        );
        range(
            r,
            &format!("{q}.density_kg_m3"),
            s.density_kg_m3,
            B::Ex(0.0),
            B::In(5000.0),
            "kg/m3",
        );
    }
    if let Some(w) = &it.wick {
        let q = format!("{p}.wick");
        unit_interval(r, format!("{q}.absorptance"), w.absorptance);
        unit_interval(r, format!("{q}.emissivity"), w.emissivity);
        range(
            r,
            &format!("{q}.thickness_mm"),
            w.thickness_mm,
            B::Ex(0.0),
            B::In(20.0),
            "mm",
        );
        range(
            r,
            &format!("{q}.water_holding_kg_m2"),
            w.water_holding_kg_m2,
            B::Ex(0.0),
            B::In(20.0),
            "kg/m2",
        );
    }
    if let Some(pl) = &it.plate {
        let q = format!("{p}.plate");
        range(
            r,
            &format!("{q}.conductivity_w_m_k"),
            pl.conductivity_w_m_k,
            B::Ex(0.0),
            B::In(500.0),
            "W/m/K",
        );
        range(
            r,
            &format!("{q}.thickness_mm"),
            pl.thickness_mm,
            B::Ex(0.0),
            B::In(20.0),
            "mm",
        );
        unit_interval(r, format!("{q}.emissivity"), pl.emissivity);
    }
}

/// Set depth [mm] and free brine surface [m²] of a basin kind, `None` for kinds fed by a
/// continuous flow (wick, multi-effect).
pub fn basin_of(v: &Variant) -> Option<(f64, f64)> {
    let plan = v.width_m * v.length_m;
    match &v.kind {
        VariantKind::SingleSlope(k) => Some((k.brine_depth_mm, plan)),
        VariantKind::DoubleSlope(k) => Some((k.brine_depth_mm, plan)),
        VariantKind::Stepped(k) => Some((k.tray_depth_mm, plan)),
        VariantKind::Wick(_) | VariantKind::MultiEffect(_) => None,
    }
}

/// The `[variant.calibration]` tables: factor ranges and the measured-file mapping.
pub(crate) fn calibrations(r: &mut Reader<'_>, vs: &[Variant]) {
    for (i, v) in vs.iter().enumerate() {
        let Some(c) = &v.calibration else { continue };
        let p = format!("{}.calibration", spans::index("variant", i));
        for (field, message) in c.problems() {
            r.error(&format!("{p}.{field}"), message);
        }
    }
}

/// The `[variant.operation]` tables: ranges, set depth above the wetting depth, controller
/// stability.
pub(crate) fn operations(r: &mut Reader<'_>, vs: &[Variant], feed_salinity_g_kg: f64) {
    for (i, v) in vs.iter().enumerate() {
        let Some(op) = &v.operation else { continue };
        let p = format!("{}.operation", spans::index("variant", i));
        let Some((depth_mm, area_m2)) = basin_of(v) else {
            r.warn(
                &p,
                format!(
                    "a {} still sets its own feed; the operation table is ignored",
                    v.kind.name()
                ),
            );
            continue;
        };
        for issue in op.check(depth_mm, area_m2, feed_salinity_g_kg) {
            let path = format!("{p}.{}", issue.field);
            if issue.error {
                r.error(&path, issue.message);
            } else {
                r.warn(&path, issue.message);
            }
        }
    }
}
