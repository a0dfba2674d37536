//! Assembling the [`ReportContext`] from a design: the same evaluation and ranking as
//! `compare`, a mean-year sizing with `size`'s rules, and the recommended basin's day.

use std::collections::BTreeMap;

use sha2::{Digest, Sha256};

use super::context::*;
use super::stages::{self, SheetChoice};
use crate::cautions;
use crate::compare::size::{SizeOptions, UnitYear, size_from_years};
use crate::compare::uncertainty::{Progress, UncertaintyOptions};
use crate::compare::{self, DesignEvaluation, Evaluation, Scales, Weights};
use crate::design::{
    Climate, DAYS_IN_MONTH, DRINKING_AND_COOKING_L_PER_PERSON_DAY, DRINKING_L_PER_PERSON_DAY,
    DesignErrors, DesignIssue, LoadedDesign,
};
use crate::error::Error;
use crate::network::MAX_BALANCE_RESIDUAL_FRACTION;
use crate::stills::{self, RunOptions, SiteWeather};

/// Total basic water need per person and day for drinking, cooking and hygiene [L]: the
/// Sphere Handbook (2018), water-supply standard 2.1, key indicator (from memory).
pub const BASIC_TOTAL_L_PER_PERSON_DAY: f64 = 15.0;

/// Short month names, January first.
pub const MONTHS: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

/// Where the demand comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DemandChoice {
    /// The design's `[project.demand]`, or 3 L/person/day for nobody when it has none.
    FromDesign,
    /// People × litres per person and day.
    People {
        /// People served (≥ 1).
        people: u32,
        /// Litres per person and day (> 0).
        l_per_person_day: f64,
    },
    /// A total demand [L day⁻¹] (> 0).
    Total(f64),
}

/// What a report is built with.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportOptions {
    /// Seed recorded for (and passed to) the stochastic stages.
    pub seed: u64,
    /// Demand to size for.
    pub demand: DemandChoice,
    /// Date of generation, `YYYY-MM-DD`.
    pub date: String,
    /// The command line that regenerates the report (recorded, not run).
    pub command: String,
    /// Monte Carlo samples for the yield ranges and the tornado (0: no Monte Carlo).
    pub samples: u32,
    /// Stochastic weather years for sizing the recommended variant at
    /// [`ReportOptions::confidence`] (0: the mean-year sizing only).
    pub sizing_years: u32,
    /// Fraction of weather years in which the sized array must meet the demand [-].
    pub confidence: f64,
    /// Which variants get a fabricator sheet.
    pub sheets: SheetChoice,
}

impl ReportOptions {
    /// Options with no stochastic stage (no Monte Carlo, mean-year sizing only), the
    /// recommended variant's sheet, and no validation folder.
    pub fn quick(seed: u64, demand: DemandChoice, date: String, command: String) -> Self {
        Self {
            seed,
            demand,
            date,
            command,
            samples: 0,
            sizing_years: 0,
            confidence: crate::compare::size::DEFAULT_CONFIDENCE,
            sheets: SheetChoice::Recommended,
        }
    }
}

/// The date for a report: `SOURCE_DATE_EPOCH` (seconds since 1970, UTC) when set and valid,
/// otherwise today (UTC), as `YYYY-MM-DD`.
pub fn report_date(source_date_epoch: Option<&str>) -> String {
    let secs = source_date_epoch.and_then(|s| s.trim().parse::<i64>().ok());
    let when = secs
        .and_then(|s| chrono::DateTime::from_timestamp(s, 0))
        .unwrap_or_else(chrono::Utc::now);
    when.format("%Y-%m-%d").to_string()
}

/// SHA-256 of bytes, lower-case hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    digest.iter().map(|b| format!("{b:02x}")).collect()
}

fn option_error(loaded: &LoadedDesign, option: &str, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: option.into(),
        message,
    }]))
}

/// Demand [L day⁻¹], people and litres per person, and a sentence saying where it came from,
/// for `report` and `size` alike. The options obey the design file's own limits
/// ([`crate::design::demand_problems`]).
///
/// Errors: an option outside those limits, or no demand at all (bad input, naming the option).
pub fn resolve_demand(
    loaded: &LoadedDesign,
    choice: DemandChoice,
) -> Result<(f64, Option<u32>, Option<f64>, String), Error> {
    let option = |which: &str| match which {
        "people" => "--people",
        "litres_per_person_day" => "--litres-per-person",
        _ => "--demand",
    };
    let refuse = |problems: Vec<(&'static str, String)>| match problems.into_iter().next() {
        Some((which, message)) => Err(option_error(loaded, option(which), message)),
        None => Ok(()),
    };
    match choice {
        DemandChoice::Total(d) => {
            refuse(crate::design::demand_problems(None, None, Some(d)))?;
            Ok((d, None, None, format!("{d} L/day given with --demand")))
        }
        DemandChoice::People {
            people,
            l_per_person_day,
        } => {
            refuse(crate::design::demand_problems(
                Some(people),
                Some(l_per_person_day),
                None,
            ))?;
            let total = f64::from(people) * l_per_person_day;
            Ok((
                total,
                Some(people),
                Some(l_per_person_day),
                format!("{people} people × {l_per_person_day} L/person/day given with --people"),
            ))
        }
        DemandChoice::FromDesign => match &loaded.design.project.demand {
            Some(d) => {
                let per = d.people.map(|_| {
                    d.litres_per_person_day
                        .unwrap_or(crate::design::DEFAULT_LITRES_PER_PERSON_DAY)
                });
                Ok((
                    d.total_litres_per_day(),
                    d.people,
                    per,
                    "the design's [project.demand]".into(),
                ))
            }
            None => Err(option_error(
                loaded,
                "project.demand",
                "the design gives no demand; add [project.demand] or pass --people N or \
                 --demand L_PER_DAY"
                    .into(),
            )),
        },
    }
}

/// Size one evaluated variant on the mean year: every day of a month makes that month's
/// average-day output, and `size`'s rules (units for the worst month, rows spaced against noon
/// shading) apply to that one year.
fn mean_year_sizing(
    loaded: &LoadedDesign,
    index: usize,
    e: &Evaluation,
    demand_l_day: f64,
    seed: u64,
) -> Result<Result<SizingRow, String>, Error> {
    let mut daily = Vec::with_capacity(365);
    for (m, days) in e.result.months.iter().zip(DAYS_IN_MONTH) {
        daily.extend(std::iter::repeat_n(m.l_day, days as usize));
    }
    let years = [UnitYear::from_daily(0, daily)];
    let opts = SizeOptions {
        demand_l_day,
        confidence: 0.5,
        years: 1,
        seed,
    };
    Ok(
        size_from_years(loaded, index, &years, &opts)?.map(|s| SizingRow {
            name: s.name,
            units: s.units,
            footprint_m2: s.footprint_m2,
            land_m2: s.land_m2,
            capital: s.capital,
            array_worst_month_l_day: s.array_worst_month_l_day,
            operator_h_per_day: s.operator_h_per_day,
        }),
    )
}

fn mean(xs: impl Iterator<Item = f64>) -> f64 {
    let (s, n) = xs.fold((0.0, 0usize), |(s, n), x| (s + x, n + 1));
    if n == 0 { 0.0 } else { s / n as f64 }
}

/// Build the whole context: evaluate and rank every variant exactly as `compare` does (default
/// weights and scales), size for the demand, and gather the sections.
///
/// `design_bytes` and `library_bytes` are hashed for the reproducibility section.
///
/// Errors: those of [`compare::evaluate_design`]; [`Error::Design`] for a bad demand option or
/// a design without demand and no option; [`Error::Model`] when the recommended variant
/// cannot be sized.
pub fn build_context(
    loaded: &LoadedDesign,
    design_bytes: &[u8],
    library_bytes: &[u8],
    opts: &ReportOptions,
) -> Result<ReportContext, Error> {
    build_context_with(loaded, design_bytes, library_bytes, opts, None)
}

/// [`build_context`] with a progress callback for the Monte Carlo (its fitting runs, then its
/// samples), as `stillbench uncertainty` reports it.
///
/// Besides the errors of [`build_context`]: those of [`compare::run_uncertainty`] (with the
/// same options as `stillbench uncertainty --samples N --seed S`), of the stochastic sizing
/// and of the workshop sheets.
pub fn build_context_with(
    loaded: &LoadedDesign,
    design_bytes: &[u8],
    library_bytes: &[u8],
    opts: &ReportOptions,
    progress: Option<Progress<'_>>,
) -> Result<ReportContext, Error> {
    let (demand_l_day, people, per_person, demand_from) = resolve_demand(loaded, opts.demand)?;
    // The operator's round is shared over the installation sized for this demand, so the
    // evaluation (cost per litre) sees the demand given on the command line too.
    let with_demand;
    let loaded = if matches!(opts.demand, DemandChoice::FromDesign) {
        loaded
    } else {
        let mut l = loaded.clone();
        l.design.project.demand = Some(crate::design::Demand {
            people,
            litres_per_person_day: per_person,
            litres_per_day: people.is_none().then_some(demand_l_day),
        });
        with_demand = l;
        &with_demand
    };
    let weather: SiteWeather = stills::site_weather(loaded)?;
    let ev: DesignEvaluation = compare::evaluate_design(loaded, &weather, &RunOptions::default())?;
    let currency = ev.currency.clone();
    let scales = Scales::for_project(&loaded.design.project)
        .map_err(|e| option_error(loaded, "project.money_scales", e.to_string()))?;
    let ranking = compare::rank(&ev.candidates(), &Weights::default(), &scales).map_err(|e| {
        Error::Model {
            variant: String::new(),
            at: String::new(),
            reason: format!("ranking: {e}"),
        }
    })?;
    let pareto_front: Vec<String> = ranking
        .iter()
        .filter(|r| r.pareto)
        .map(|r| r.name.clone())
        .collect();
    // Evaluations in ranking order, with their index in the design.
    let mut ordered: Vec<(usize, &Evaluation)> = Vec::new();
    for r in &ranking {
        if let Some(e) = ev.evaluated.iter().find(|e| e.name == r.name) {
            let idx = loaded
                .design
                .variants
                .iter()
                .position(|v| v.name == e.name)
                .unwrap_or(0);
            ordered.push((idx, e));
        }
    }
    let Some(&(_, top)) = ordered.first() else {
        return Err(Error::Model {
            variant: String::new(),
            at: String::new(),
            reason: "no variant could be ranked".into(),
        });
    };
    let Some(first) = ranking.first() else {
        return Err(Error::Model {
            variant: String::new(),
            at: String::new(),
            reason: "no variant could be ranked".into(),
        });
    };

    let mut sizing = Vec::new();
    let mut not_ranked: Vec<NotRanked> = ev
        .skipped
        .iter()
        .map(|s| NotRanked {
            name: s.name.clone(),
            reason: s.reason.clone(),
        })
        .collect();
    for &(idx, e) in &ordered {
        match mean_year_sizing(loaded, idx, e, demand_l_day, opts.seed)? {
            Ok(row) => sizing.push(row),
            Err(reason) => not_ranked.push(NotRanked {
                name: e.name.clone(),
                reason: format!("not sized: {reason}"),
            }),
        }
    }
    let Some(top_size) = sizing.iter().find(|s| s.name == top.name).cloned() else {
        return Err(Error::Model {
            variant: top.name.clone(),
            at: String::new(),
            reason: "the recommended variant could not be sized for the demand".into(),
        });
    };
    // Cost of one person's water for a year: the design's per-person figure when it has
    // people, otherwise the litres per person given, otherwise drinking only.
    let l_pp = per_person.unwrap_or(DRINKING_L_PER_PERSON_DAY);
    let cost_per_person_year = first.values.cost_per_l * l_pp * 365.0;

    let summary = SummarySection {
        recommended: first.name.clone(),
        kind: top.kind.clone(),
        why: first.explanation.clone(),
        score: first.score,
        annual_l_m2: first.values.annual_l_m2,
        worst_month_l_m2_day: first.values.worst_month_l_m2_day,
        worst_month: top.worst_month,
        worst_month_name: month_name(top.worst_month),
        cost_per_l: first.values.cost_per_l,
        capital_per_l_day: first.values.capital_per_l_day,
        complexity_points: first.values.complexity_points,
        sizing: top_size,
        cost_per_person_year,
        not_ranked,
        confident: None,
    };

    let need = NeedSection {
        demand_l_day,
        demand_from,
        people,
        l_per_person_day: per_person,
        minimums: vec![
            NeedRow {
                water_use: "drinking only (survival)".into(),
                l_per_person_day: DRINKING_L_PER_PERSON_DAY,
                source: "Sphere Handbook (2018), water-supply standard 2.1, 2.5–3 L \
                         (from memory)"
                    .into(),
            },
            NeedRow {
                water_use: "drinking and basic cooking".into(),
                l_per_person_day: DRINKING_AND_COOKING_L_PER_PERSON_DAY,
                source: "Sphere Handbook (2018), water-supply standard 2.1, cooking 3–6 L \
                         (from memory)"
                    .into(),
            },
            NeedRow {
                water_use: "all basic domestic needs (drinking, cooking, personal and domestic \
                       hygiene)"
                    .into(),
                l_per_person_day: BASIC_TOTAL_L_PER_PERSON_DAY,
                source: "Sphere Handbook (2018), water-supply standard 2.1 key indicator \
                         (from memory)"
                    .into(),
            },
        ],
    };

    let site = site_section(loaded, top);
    let monthly: Vec<VariantMonths> = ordered
        .iter()
        .map(|(_, e)| VariantMonths {
            name: e.name.clone(),
            kind: e.kind.clone(),
            footprint_m2: e.result.footprint_m2,
            aperture_m2: e.result.aperture_m2,
            evaporating_m2: e.result.evaporating_m2,
            l_m2_day: e.result.months.iter().map(|m| m.l_m2_day).collect(),
        })
        .collect();
    let justification = JustificationSection {
        variants: ordered
            .iter()
            .map(|(_, e)| {
                let r = &e.result;
                let ceiling = mean(r.months.iter().map(|m| m.ceiling_l_m2_day));
                BalanceRow {
                    name: e.name.clone(),
                    kind: e.kind.clone(),
                    energy_residual: r.energy_residual,
                    mean_l_m2_day: r.mean_l_m2_day,
                    ceiling_l_m2_day: ceiling,
                    share_of_ceiling: if ceiling > 0.0 {
                        r.mean_l_m2_day / ceiling
                    } else {
                        0.0
                    },
                    mean_efficiency: mean(r.months.iter().map(|m| m.efficiency)),
                }
            })
            .collect(),
        residual_bound: MAX_BALANCE_RESIDUAL_FRACTION,
        assumptions: assumptions(loaded),
        kind_findings: ordered
            .iter()
            .filter_map(|(_, e)| {
                let lines = kind_findings(&e.result.details);
                (!lines.is_empty()).then(|| KindFindings {
                    name: e.name.clone(),
                    kind: e.kind.clone(),
                    lines,
                })
            })
            .collect(),
    };
    let life_cycle = LifeCycleSection {
        variants: ordered
            .iter()
            .map(|(_, e)| {
                let c = &e.cost.cost;
                LifeCycleRow {
                    name: e.name.clone(),
                    capital: c.capital,
                    replacements_present_worth: c.replacements_present_worth,
                    operator_h_per_year: c.operator_h_per_year,
                    operator_cost_per_year: c.operator_cost_per_year,
                    upkeep_per_year: c.upkeep_per_year,
                    installation_units: c.operator.units,
                    installation_operator_h_per_day: c.operator.installation_h_per_day,
                    annualised: c.annualised,
                    life_years: c.life_years,
                    discount_rate: c.discount_rate,
                    cost_per_l: e.values.cost_per_l,
                    cost_per_person_year: Some(e.values.cost_per_l * l_pp * 365.0),
                    replacements: c
                        .replacements
                        .iter()
                        .map(|r| {
                            format!(
                                "{} ({}) every {} years, {} time(s)",
                                r.part, r.item, r.lifetime_years, r.count
                            )
                        })
                        .collect(),
                }
            })
            .collect(),
    };
    let operation = operation_section(loaded, &ordered, &weather)?;
    let environment = EnvironmentSection {
        variants: ordered
            .iter()
            .filter_map(|(_, e)| {
                let units = sizing.iter().find(|s| s.name == e.name)?.units;
                if e.result.months.len() != 12 {
                    return None;
                }
                // Every kind books what it is fed and what drains, flushes or runs off
                // (basins by their operation, flow-through wicks and stages by their feed).
                let year = |f: &dyn Fn(&crate::stills::MonthResult) -> f64| -> f64 {
                    e.result
                        .months
                        .iter()
                        .zip(DAYS_IN_MONTH)
                        .map(|(m, d)| f(m) * f64::from(d))
                        .sum()
                };
                let u = units as f64;
                Some(EnvironmentRow {
                    name: e.name.clone(),
                    units,
                    brine_l_day: u * year(&|m| m.drained_l_day) / 365.0,
                    // Salt that enters with the feed leaves with the brine (or as crust that is
                    // cleaned out) once the still runs periodically.
                    salt_kg_year: u * year(&|m| m.fed_salt_kg_day),
                })
            })
            .collect(),
    };
    let reproducibility = ReproducibilitySection {
        version: crate::VERSION.to_owned(),
        design_file: loaded.source.display().to_string(),
        design_sha256: sha256_hex(design_bytes),
        library_file: loaded.library_path.display().to_string(),
        library_sha256: sha256_hex(library_bytes),
        seed: opts.seed,
        date: opts.date.clone(),
        command: opts.command.clone(),
    };
    let cautions = CautionsSection {
        short: cautions::CAUTIONS.iter().map(|s| (*s).to_owned()).collect(),
        long: cautions::REPORT_CAUTIONS
            .iter()
            .map(|(h, t)| CautionItem {
                heading: (*h).to_owned(),
                text: (*t).to_owned(),
            })
            .collect(),
        calcium_min_mg_l: cautions::REMINERALISED_CALCIUM_MIN_MG_L,
        magnesium_min_mg_l: cautions::REMINERALISED_MAGNESIUM_MIN_MG_L,
    };
    // Sheets first: a wrong --sheet name is refused before the stochastic stages run.
    let workshops = stages::workshop_sheets(loaded, &ordered, &opts.sheets)?;
    let mut summary = summary;
    if opts.sizing_years > 0 {
        let top_idx = ordered.first().map_or(0, |(i, _)| *i);
        match stages::confident_sizing(
            loaded,
            top_idx,
            demand_l_day,
            opts.confidence,
            opts.sizing_years,
            opts.seed,
        )? {
            Ok(c) => summary.confident = Some(c),
            Err(reason) => summary.not_ranked.push(NotRanked {
                name: top.name.clone(),
                reason: format!("not sized over weather years: {reason}"),
            }),
        }
    }
    let (uncertainty, sensitivity) = if opts.samples > 0 {
        let uo = UncertaintyOptions {
            samples: opts.samples,
            seed: opts.seed,
            ..UncertaintyOptions::default()
        };
        let rep = compare::run_uncertainty(loaded, &uo, progress)?;
        let order: Vec<String> = ranking.iter().map(|r| r.name.clone()).collect();
        let (u, s) = stages::uncertainty_sections(&rep, &order, &first.name);
        (Some(u), s)
    } else {
        (None, None)
    };
    let alternatives = stages::alternatives_section(loaded, top);
    let risks = Some(stages::risks_section(loaded));
    let validation = Some(stages::validation_section(loaded));
    Ok(ReportContext {
        meta: MetaSection {
            title: loaded.design.project.title.clone(),
            date: opts.date.clone(),
            version: crate::VERSION.to_owned(),
            currency: currency.clone(),
        },
        summary,
        need,
        site,
        variants: VariantsSection {
            ranking,
            pareto_front,
            monthly,
            sizing,
            money_basis: scales.money_basis(&loaded.design.project),
        },
        justification,
        life_cycle,
        operation,
        environment,
        reproducibility,
        cautions,
        references: super::references::REFERENCES
            .iter()
            .map(|(k, t)| Reference {
                key: (*k).to_owned(),
                text: (*t).to_owned(),
            })
            .collect(),
        charts: BTreeMap::new(),
        uncertainty,
        sensitivity,
        validation,
        alternatives,
        risks,
        workshops,
    })
}

fn month_name(m: u32) -> String {
    MONTHS
        .get((m as usize).wrapping_sub(1))
        .map_or_else(|| format!("month {m}"), |s| (*s).to_owned())
}

fn site_section(loaded: &LoadedDesign, top: &Evaluation) -> SiteSection {
    let s = &loaded.design.site;
    let (source, months) = match &s.climate {
        Climate::Monthly(m) => (
            "monthly means given in the design".to_owned(),
            (0..12)
                .map(|i| ClimateMonth {
                    month: i as u32 + 1,
                    name: MONTHS[i].to_owned(),
                    ghi_kwh_m2_day: m.ghi_kwh_m2_day[i],
                    t_max_c: Some(m.t_max_c[i]),
                    t_min_c: Some(m.t_min_c[i]),
                    rain_mm: m.rain_mm.map(|r| r[i]),
                })
                .collect(),
        ),
        Climate::WeatherFile(_) => (
            "an hourly weather file (monthly irradiation as simulated)".to_owned(),
            top.result
                .months
                .iter()
                .map(|m| ClimateMonth {
                    month: m.month,
                    name: month_name(m.month),
                    ghi_kwh_m2_day: m.insolation_kwh_m2_day,
                    t_max_c: None,
                    t_min_c: None,
                    rain_mm: None,
                })
                .collect(),
        ),
    };
    SiteSection {
        name: s.name.clone(),
        latitude_deg: s.latitude_deg,
        longitude_deg: s.longitude_deg,
        elevation_m: s.elevation_m,
        feed_salinity_g_kg: s.feed_salinity_g_kg,
        source,
        months,
    }
}

/// The kind-specific figures of a year in sentences: stages, heat reuse and the sink of a
/// multi-effect still; dry cloth and run-off of a wick still. Nothing for the basin kinds,
/// whose story the common tables tell.
fn kind_findings(details: &stills::KindDetails) -> Vec<String> {
    let list = |v: &[f64], digits: usize| {
        v.iter()
            .map(|x| format!("{x:.digits$}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    match details {
        stills::KindDetails::MultiEffect {
            stages,
            gap_mm,
            stage_max_c,
            stage_l_m2_day,
            stage_dry_hour_fraction,
            solar_to_vapour_efficiency,
            gain_output_ratio,
            sink_note,
            ..
        } => {
            let mut lines = vec![
                format!(
                    "{stages} stages with {gap_mm:.0} mm gaps: gain output ratio \
                     {gain_output_ratio:.2} (distillate × latent heat ÷ heat delivered to the \
                     first stage, which cannot exceed the number of stages) and \
                     solar-to-vapour efficiency {:.0} %{}.",
                    100.0 * solar_to_vapour_efficiency,
                    if *solar_to_vapour_efficiency > 1.0 {
                        " (above 100 % because each stage reuses the heat of the one above)"
                    } else {
                        ""
                    }
                ),
                format!(
                    "Per stage, first to last: distillate {} L/m²/day; peak wick temperature \
                     {} °C.",
                    list(stage_l_m2_day, 2),
                    list(stage_max_c, 1)
                ),
            ];
            let worst_dry = stage_dry_hour_fraction.iter().copied().fold(0.0, f64::max);
            if worst_dry > 0.0 {
                lines.push(format!(
                    "The feed held a stage's evaporation in up to {:.0} % of the hours: its \
                     wick was partly dry then, where salt can build up in the cloth.",
                    100.0 * worst_dry
                ));
            }
            lines.push(sink_note.clone());
            lines
        }
        stills::KindDetails::Wick {
            dry_hour_fraction,
            run_off_l_day,
            ..
        } => vec![format!(
            "The cloth was dry at some moment in {:.0} % of the hours; {run_off_l_day:.1} L of \
             warm brine a day runs off the wick, carrying its heat away.",
            100.0 * dry_hour_fraction
        )],
        _ => Vec::new(),
    }
}

fn assumptions(loaded: &LoadedDesign) -> Vec<String> {
    let c = &loaded.design.costs;
    vec![
        "Each month is represented by its average day (Klein's recommended day), repeated \
         until the still's daily cycle repeats; yields are per m² of footprint."
            .into(),
        "Hourly sunlight from the monthly mean by Collares-Pereira & Rabl, split into beam and \
         diffuse by Erbs, transposed onto each cover by Hay–Davies."
            .into(),
        "Saturation pressure of water by IAPWS-IF97; brine vapour pressure lowered by \
         salinity (Nayar et al.); latent heat per kilogram of vapour."
            .into(),
        "Inside a basin: Dunkle's heat and mass transfer (Kumar–Tiwari where a variant asks \
         for it); evaporation computed from the vapour-pressure difference."
            .into(),
        "Cover reflection and absorption by Fresnel and Bouguer against incidence angle; dust, \
         drops falling back and leaking vapour as each variant's documented losses."
            .into(),
        format!(
            "Money: discount rate, life and upkeep from the design's [costs]; commissioning \
             check on a day of {} kWh/m².",
            c.commissioning_kwh_m2_day
        ),
        "The first sizing uses the mean year (every day of a month makes that month's \
         average-day output); where stated, the recommended variant is also sized over \
         stochastic weather years at a confidence, as `stillbench size` does."
            .into(),
    ]
}

fn operation_section(
    loaded: &LoadedDesign,
    ordered: &[(usize, &Evaluation)],
    weather: &SiteWeather,
) -> Result<OperationSection, Error> {
    let mut variants = Vec::new();
    for (_, e) in ordered {
        let wm = e.worst_month as usize;
        if let Some(o) = e
            .result
            .months
            .get(wm.wrapping_sub(1))
            .and_then(|m| m.operation.as_ref())
        {
            variants.push(OperationRow {
                name: e.name.clone(),
                feed: o.feed.to_owned(),
                flush: o.flush.to_owned(),
                set_depth_mm: o.set_depth_mm,
                feed_l_day: o.feed_l,
                flush_l_day: o.flush_l,
                peak_salinity_g_kg: o.peak_salinity_g_kg,
                dry_out_h: o.dry_out_h,
                warnings: o.warnings.clone(),
            });
        }
    }
    // The best-ranked basin still's worst-month day, hour by hour.
    let Some((idx, e)) = ordered.iter().find(|(_, e)| {
        e.result
            .months
            .first()
            .is_some_and(|m| m.operation.is_some())
    }) else {
        return Ok(OperationSection {
            variants,
            profile_variant: None,
            profile: Vec::new(),
        });
    };
    let Some(v) = loaded.design.variants.get(*idx) else {
        return Ok(OperationSection {
            variants,
            profile_variant: None,
            profile: Vec::new(),
        });
    };
    let run = RunOptions {
        hourly: true,
        ..RunOptions::default()
    };
    let r = stills::simulate_variant(loaded, v, weather, &run)?;
    let profile = r
        .hourly
        .unwrap_or_default()
        .into_iter()
        .filter(|h| h.month == e.worst_month)
        .map(|h| ProfileHour {
            solar_hour_h: h.solar_hour_h,
            depth_mm: h.depth_mm,
            salinity_g_kg: h.salinity_g_kg,
            distillate_l: h.distillate_l,
        })
        .collect();
    Ok(OperationSection {
        variants,
        profile_variant: Some(e.name.clone()),
        profile,
    })
}

#[cfg(test)]
mod tests {
    use super::kind_findings;
    use crate::stills::KindDetails;

    #[test]
    fn kind_findings_name_dry_stages_and_heat_reuse_only_when_they_happen() {
        // Figures invented for the wording only (no physics is checked here).
        let me = |dry: f64, eff: f64| KindDetails::MultiEffect {
            stages: 2,
            gap_mm: 4.0,
            sink: "air-fins".into(),
            sink_coefficient_w_m2_k: 12.0,
            edge_ua_per_node_w_k: 0.1,
            stage_max_c: vec![70.0, 60.0],
            stage_l_m2_day: vec![3.0, 2.5],
            stage_dry_hour_fraction: vec![dry, 0.0],
            solar_to_vapour_efficiency: eff,
            gain_output_ratio: 1.6,
            first_stage_heat_kwh_m2_day: 3.0,
            glazing_gap_mm: 20.0,
            sink_heat_kwh_m2_day: 1.5,
            sink_rise_day_mean_k: 5.0,
            absorber_max_c: 75.0,
            last_plate_max_c: 50.0,
            sink_note: "the sink note".into(),
        };
        let dry = kind_findings(&me(0.12, 1.1));
        assert_eq!(dry.len(), 4, "{dry:?}");
        assert!(dry[0].contains("gain output ratio 1.60") && dry[0].contains("above 100 %"));
        assert!(dry[1].contains("3.00, 2.50 L/m²/day") && dry[1].contains("70.0, 60.0 °C"));
        assert!(dry[2].contains("up to 12 % of the hours"), "{}", dry[2]);
        assert_eq!(dry[3], "the sink note");
        let wet = kind_findings(&me(0.0, 0.6));
        assert_eq!(wet.len(), 3, "{wet:?}");
        assert!(!wet[0].contains("above 100 %"));
    }
}
