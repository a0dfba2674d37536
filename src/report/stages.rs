//! The stages that fill the report's optional sections from the modules that produce them:
//! the Monte Carlo ([`crate::compare::run_uncertainty`]) for the yield ranges and the
//! tornado, the stochastic sizing of the recommended variant ([`crate::compare::size`]), the
//! fabricator sheets with the alternatives and risk tables ([`crate::workshop`]), and the
//! published-device validation ([`crate::calibrate::validation`]).

use super::charts::Chart;
use super::context::*;
use crate::calibrate::validation::{MODEL_FORM_RELATIVE_SD, modelled_figure, published_devices};
use crate::compare::size::{SizeOptions, size_from_years, unit_years, weather_model};
use crate::compare::{Evaluation, UncertaintyReport};
use crate::design::LoadedDesign;
use crate::error::Error;
use crate::stills::{self, RunOptions};
use crate::workshop::{self, WorkshopSheet};

/// Which variants get a fabricator sheet.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum SheetChoice {
    /// The recommended variant only.
    #[default]
    Recommended,
    /// These variants (by name), in the order given.
    Named(Vec<String>),
    /// Every ranked variant, in ranking order.
    All,
}

/// Where the model-form SD used comes from, in words.
pub fn model_form_source(sd: f64) -> String {
    // Tolerance: the two constants are written with three decimals.
    if (sd - MODEL_FORM_RELATIVE_SD).abs() < 1e-9 {
        format!(
            "the scatter of the default model against published devices (root-mean-square of \
             ln(model ÷ published), {:.1} %; see \"Against measured stills\")",
            MODEL_FORM_RELATIVE_SD * 100.0
        )
    } else {
        format!(
            "the Monte Carlo's stated default ({:.1} %); the comparison with published devices \
             gives {:.1} % (see \"Against measured stills\")",
            sd * 100.0,
            MODEL_FORM_RELATIVE_SD * 100.0
        )
    }
}

/// The uncertainty section (variants in `order`, the ranking order; others after in design
/// order) and the recommended variant's tornado, from a Monte Carlo run.
pub fn uncertainty_sections(
    rep: &UncertaintyReport,
    order: &[String],
    recommended: &str,
) -> (UncertaintySection, Option<SensitivitySection>) {
    let mut variants: Vec<&crate::compare::VariantUncertainty> = order
        .iter()
        .filter_map(|n| rep.variants.iter().find(|v| &v.name == n))
        .collect();
    for v in &rep.variants {
        if !order.contains(&v.name) {
            variants.push(v);
        }
    }
    let rows = variants
        .iter()
        .map(|v| UncertaintyRow {
            name: v.name.clone(),
            annual_l_m2: [v.annual_l_m2.p10, v.annual_l_m2.p50, v.annual_l_m2.p90],
            worst_month_l_m2_day: [
                v.worst_month_l_m2_day.p10,
                v.worst_month_l_m2_day.p50,
                v.worst_month_l_m2_day.p90,
            ],
        })
        .collect();
    let source = model_form_source(rep.model_form_sd);
    let note = format!(
        "Each sample is one {} weather year and one draw of every uncertain parameter, times a \
         model-form factor on yield (lognormal, median 1, relative SD {:.1} %, from {source}).",
        if rep.stochastic_weather {
            "stochastic"
        } else {
            "average-day"
        },
        rep.model_form_sd * 100.0
    );
    let section = UncertaintySection {
        samples: rep.samples,
        seed: rep.seed,
        variants: rows,
        model_form_note: note,
        model_form_sd: rep.model_form_sd,
        model_form_source: source,
    };
    let tornado = rep
        .sensitivity
        .variants
        .iter()
        .find(|v| v.name == recommended)
        .map(|v| SensitivitySection {
            variant: v.name.clone(),
            output: "annual yield [L/m²/year]".into(),
            base: v.nominal_annual_l_m2,
            bars: v
                .bars
                .iter()
                .map(|b| TornadoBar {
                    parameter: format!(
                        "{} ({:.3} → {:.3})",
                        b.parameter, b.low_value, b.high_value
                    ),
                    low: b.low_annual_l_m2,
                    high: b.high_annual_l_m2,
                })
                .collect(),
        });
    (section, tornado)
}

/// Size variant `index` over `years` stochastic weather years of `seed` at `confidence`
/// (`stillbench size`'s rules). `Ok(Err(reason))` when it cannot be sized.
///
/// Errors: [`Error::Design`] naming the option (`--confidence`, `--years`) when out of range;
/// those of the simulation and of [`size_from_years`].
pub fn confident_sizing(
    loaded: &LoadedDesign,
    index: usize,
    demand_l_day: f64,
    confidence: f64,
    years: u32,
    seed: u64,
) -> Result<Result<ConfidentSizing, String>, Error> {
    let opts = SizeOptions {
        demand_l_day,
        confidence,
        years,
        seed,
    };
    if let Err((option, message)) = opts.validate() {
        return Err(crate::compare::uncertainty::option_error(
            loaded, &option, message,
        ));
    }
    let model = weather_model(loaded)?;
    let base = stills::site_weather(loaded)?;
    let ys = unit_years(
        loaded,
        index,
        &model,
        &base,
        seed,
        years,
        &RunOptions::default(),
    )?;
    Ok(
        size_from_years(loaded, index, &ys, &opts)?.map(|s| ConfidentSizing {
            name: s.name,
            confidence,
            years,
            seed,
            units: s.units,
            footprint_m2: s.footprint_m2,
            land_m2: s.land_m2,
            storage_l: s.storage_l,
            longest_low_run_days: s.longest_low_run_days,
            capital: s.capital,
            met_fraction: s.met_fraction,
            array_worst_month_l_day: s.array_worst_month_l_day,
            operator_h_per_day: s.operator_h_per_day,
        }),
    )
}

/// The fabricator sheets of the chosen variants. `ordered` holds (index in the design,
/// evaluation) in ranking order, the recommended first.
///
/// Errors: [`Error::Design`] naming `--sheet` when a named variant is not among the ranked
/// ones; those of [`workshop::workshop_sheet`].
pub fn workshop_sheets(
    loaded: &LoadedDesign,
    ordered: &[(usize, &Evaluation)],
    choice: &SheetChoice,
) -> Result<Vec<WorkshopSheet>, Error> {
    let picked: Vec<(usize, &Evaluation)> = match choice {
        SheetChoice::Recommended => ordered.iter().take(1).copied().collect(),
        SheetChoice::All => ordered.to_vec(),
        SheetChoice::Named(names) => {
            let mut out = Vec::new();
            for n in names {
                let Some(&found) = ordered.iter().find(|(_, e)| &e.name == n) else {
                    let known: Vec<&str> = ordered.iter().map(|(_, e)| e.name.as_str()).collect();
                    return Err(crate::compare::uncertainty::option_error(
                        loaded,
                        "--sheet",
                        format!(
                            "no ranked variant named \"{n}\" (ranked: {}, or `all`)",
                            known.join(", ")
                        ),
                    ));
                };
                if !out.iter().any(|(i, _)| *i == found.0) {
                    out.push(found);
                }
            }
            out
        }
    };
    picked
        .into_iter()
        .map(|(i, e)| workshop::workshop_sheet(loaded, i, e))
        .collect()
}

/// Each sheet's drawing as a chart (named by its SVG id), so the HTML inlines it.
pub fn drawing_charts(sheets: &[WorkshopSheet]) -> Vec<Chart> {
    sheets
        .iter()
        .map(|s| Chart {
            name: s.drawing.id.clone(),
            title: s.drawing.title.clone(),
            svg: s.drawing.svg.clone(),
        })
        .collect()
}

/// The alternatives table beside the recommended still, or `None` when the design has no
/// `[[alternative]]`.
pub fn alternatives_section(
    loaded: &LoadedDesign,
    top: &Evaluation,
) -> Option<AlternativesSection> {
    if loaded.design.alternatives.is_empty() {
        return None;
    }
    let t = workshop::alternatives_table(&loaded.design, top);
    Some(AlternativesSection {
        still_cost_per_l: t.still_cost_per_litre,
        rows: t
            .rows
            .into_iter()
            .map(|r| AlternativeRow {
                name: r.name,
                cost_per_l: r.cost_per_litre,
                relative_to_still: r.relative_to_still,
                removes: r.removes.join("; "),
                does_not_remove: r.does_not_remove.join("; "),
            })
            .collect(),
    })
}

/// The risk table: the defaults (as the design overrides them) and the design's own.
pub fn risks_section(loaded: &LoadedDesign) -> RisksSection {
    RisksSection {
        rows: workshop::risk_table(&loaded.design)
            .rows
            .into_iter()
            .map(|r| RiskRow {
                failure: r.failure_mode,
                likelihood: r.likelihood.name().to_owned(),
                impact: r.impact.name().to_owned(),
                mitigation: r.mitigation,
            })
            .collect(),
    }
}

/// The default model on each published device (their reconstructed designs are built into
/// the binary); a device whose run fails is listed with its published figure and no
/// prediction. Also lists the variants of `loaded` that carry `[variant.calibration]`.
///
/// Errors: none for a failing device run (the row shows no prediction); the comparison is
/// informative, the constant it sizes is checked by the test suite.
pub fn validation_section(loaded: &LoadedDesign) -> ValidationSection {
    let rows = published_devices()
        .iter()
        .map(|d| {
            let predicted = modelled_figure(d).ok();
            ValidationRow {
                device: d.name.to_owned(),
                source: d.source.to_owned(),
                conditions: format!("{}; not stated and assumed: {}", d.conditions, d.unsaid),
                published: d.published,
                unit: d.basis.unit().to_owned(),
                predicted,
                error: predicted.map(|m| m / d.published - 1.0),
            }
        })
        .collect();
    let calibrated = loaded
        .design
        .variants
        .iter()
        .filter_map(|v| {
            let c = v.calibration.as_ref()?;
            let factors = c.factors();
            if factors.is_neutral() && c.fitted_from.is_none() {
                return None;
            }
            Some(CalibratedVariant {
                name: v.name.clone(),
                factors,
                fitted_from: c.fitted_from.clone(),
                fitted_on: c.fitted_on.clone(),
                note: c.note.clone(),
            })
        })
        .collect();
    ValidationSection {
        rows,
        model_form_sd: MODEL_FORM_RELATIVE_SD,
        note: format!(
            "The root-mean-square of ln(predicted ÷ published) over these devices is the \
             model-form spread, {:.1} %: a lognormal factor on yield with that relative SD \
             stands for what the model itself gets wrong. With few devices this is a size, \
             not yet a measured spread.",
            MODEL_FORM_RELATIVE_SD * 100.0
        ),
        calibrated,
    }
}
