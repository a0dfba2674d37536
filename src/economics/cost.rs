//! The cost summary of a variant and the substitute runs.

use serde::Serialize;

use super::bom::{self, Bom};
use super::complexity::{self, Commissioning, Complexity};
use super::finance;
use super::takeoff;
use crate::design::{
    CoverProps, DesignErrors, DesignIssue, LoadedDesign, Role, Variant, VariantKind,
};
use crate::physics::optics;

/// Thermal conductivity below which a cover counts as plastic [W m⁻¹ K⁻¹]: polymers are
/// 0.1–0.5, glass about 1.4 (Incropera et al., Tables A.3 [M]).
pub const PLASTIC_COVER_MAX_CONDUCTIVITY_W_M_K: f64 = 0.5;

/// What the simulation says a variant gives.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct YieldEstimate {
    /// Distillate in the first year [L year⁻¹].
    pub annual_litres: f64,
    /// Distillate expected on a clear commissioning day [L], low and high.
    pub clear_day_litres: Option<(f64, f64)>,
    /// One unit's distillate on a mean day of its worst month [L day⁻¹], which sizes the
    /// installation the operator's round is shared over.
    pub worst_month_l_day: Option<f64>,
}

/// Half-width of the commissioning range around the model's figure, as a fraction (±15 %):
/// the spread between a model and one measured day of a new still. Common practice, no
/// source; to be replaced by the model-form uncertainty from validation.
pub const COMMISSIONING_BAND: f64 = 0.15;

impl YieldEstimate {
    /// The yield figures the cost needs, from a simulation result.
    ///
    /// The commissioning day: the model's litres per kWh m⁻² of plane-of-array irradiation in
    /// the month whose mean cover irradiation is nearest to `cover_kwh_m2_day`, times that
    /// irradiation, ± [`COMMISSIONING_BAND`]. A linear scaling over a small step in
    /// irradiation; the daily efficiency of a basin changes slowly with irradiation.
    pub fn from_simulation(r: &crate::stills::VariantResult, cover_kwh_m2_day: f64) -> Self {
        let nearest = r
            .months
            .iter()
            .filter(|m| m.poa_kwh_m2_day > 0.0)
            .min_by(|a, b| {
                (a.poa_kwh_m2_day - cover_kwh_m2_day)
                    .abs()
                    .total_cmp(&(b.poa_kwh_m2_day - cover_kwh_m2_day).abs())
            });
        let clear_day_litres = nearest.map(|m| {
            let litres = m.l_day / m.poa_kwh_m2_day * cover_kwh_m2_day;
            (
                litres * (1.0 - COMMISSIONING_BAND),
                litres * (1.0 + COMMISSIONING_BAND),
            )
        });
        YieldEstimate {
            annual_litres: r.annual_l,
            clear_day_litres,
            worst_month_l_day: Some(r.worst_month.l_m2_day * r.footprint_m2),
        }
    }
}

/// One replaced part over the life.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Replacement {
    /// The part.
    pub part: String,
    /// Library item id.
    pub item: String,
    /// Its life [years].
    pub lifetime_years: f64,
    /// Times replaced within the still's life.
    pub count: u32,
    /// Cost of one replacement (materials; the unit's share of the installation's) [currency].
    pub cost_each: f64,
    /// Present worth of all of them [currency].
    pub present_worth: f64,
}

/// The money side of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CostSummary {
    /// Currency of every figure.
    pub currency: String,
    /// Units of the installation whose parts are nested onto stock together (the
    /// operator's units, [`super::operator::OperatorTime::units`]).
    pub units: u64,
    /// One unit's share of the installation's materials, every unit's sheet parts and bar
    /// pieces nested together ([`Bom::unit_share_materials_cost`]) [currency].
    pub materials: f64,
    /// Materials of one unit built alone, its stock bought for it only [currency].
    pub single_unit_materials: f64,
    /// Workshop labour [h].
    pub labour_h: f64,
    /// Workshop labour cost [currency].
    pub labour_cost: f64,
    /// Capital of one unit: its share of the materials + labour [currency]. Cost per litre,
    /// upkeep, salvage and replacements are worked from it.
    pub capital: f64,
    /// Capital of one unit built alone: its own stock + labour [currency].
    pub single_unit_capital: f64,
    /// Capital of the whole installation: units × [`CostSummary::capital`] [currency].
    pub installation_capital: f64,
    /// Capital per m² of footprint [currency m⁻²].
    pub capital_per_m2: f64,
    /// Replacements of short-lived parts.
    pub replacements: Vec<Replacement>,
    /// Their present worth [currency].
    pub replacements_present_worth: f64,
    /// The operator's time for the installation this unit belongs to.
    pub operator: super::operator::OperatorTime,
    /// This unit's share of the operator's time [h year⁻¹].
    pub operator_h_per_year: f64,
    /// This unit's share of the operator's pay [currency year⁻¹].
    pub operator_cost_per_year: f64,
    /// Yearly upkeep of the unit: spares and small repairs, a fraction of capital; no
    /// operator time [currency year⁻¹].
    pub upkeep_per_year: f64,
    /// Yearly running cost: upkeep plus operator pay [currency year⁻¹].
    pub running_per_year: f64,
    /// Salvage at the end of the life [currency].
    pub salvage: f64,
    /// Life [years].
    pub life_years: f64,
    /// Discount rate [-].
    pub discount_rate: f64,
    /// Capital recovery factor [year⁻¹].
    pub crf: f64,
    /// Sinking-fund factor [year⁻¹].
    pub sff: f64,
    /// Annualised cost: (capital + replacements)·CRF + running − salvage·SFF [currency year⁻¹].
    pub annualised: f64,
    /// Yield loss per year used [year⁻¹] (plastic-cover loss included).
    pub yield_loss_per_year: f64,
    /// Shortest part life in the bill [years].
    pub shortest_life_years: f64,
    /// First-year distillate [L year⁻¹], when modelled.
    pub first_year_litres: Option<f64>,
    /// Levelised yearly distillate over the life [L year⁻¹], when modelled.
    pub levelised_litres: Option<f64>,
    /// Cost per litre over the life, when modelled [currency L⁻¹].
    pub cost_per_litre: Option<f64>,
    /// Cost of one person's water for a year, when modelled [currency person⁻¹ year⁻¹].
    pub cost_per_person_year: Option<f64>,
    /// Why the per-litre figures are missing, when they are.
    pub yield_note: Option<String>,
}

/// Everything `stillbench cost` shows for one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantCost {
    /// Variant name.
    pub variant: String,
    /// Kind name.
    pub kind: &'static str,
    /// Footprint [m²].
    pub footprint_m2: f64,
    /// Cover area [m²].
    pub cover_area_m2: f64,
    /// Bill of materials and cut list.
    pub bom: Bom,
    /// Build complexity.
    pub complexity: Complexity,
    /// Build steps in order.
    pub steps: Vec<String>,
    /// Commissioning test.
    pub commissioning: Commissioning,
    /// Cost summary.
    pub cost: CostSummary,
    /// True when every item is sold locally.
    pub all_local: bool,
}

/// Whether a cover is plastic (see [`PLASTIC_COVER_MAX_CONDUCTIVITY_W_M_K`]).
pub fn is_plastic_cover(c: &CoverProps) -> bool {
    c.conductivity_w_m_k < PLASTIC_COVER_MAX_CONDUCTIVITY_W_M_K
}

/// Cost variant number `index` (0-based) of a loaded design. `yield_` is the simulation's
/// estimate; without it no per-litre figure is given.
pub fn cost_variant(
    loaded: &LoadedDesign,
    index: usize,
    yield_: Option<&YieldEstimate>,
) -> Result<VariantCost, DesignErrors> {
    let Some(v) = loaded.design.variants.get(index) else {
        return Err(DesignErrors(vec![DesignIssue {
            file: loaded.source.clone(),
            line_col: None,
            path: "variant".into(),
            message: format!(
                "no variant number {} (the design has {})",
                index + 1,
                loaded.design.variants.len()
            ),
        }]));
    };
    cost_of(loaded, v, index, yield_)
}

/// Cost variant number `index` (0-based) as one of an installation of `units` units (the
/// units' parts nested onto stock together; the operator's round shared over them), whatever
/// the design's demand. `basis` says where the units come from.
pub fn cost_variant_for_units(
    loaded: &LoadedDesign,
    index: usize,
    yield_: Option<&YieldEstimate>,
    units: u64,
    basis: String,
) -> Result<VariantCost, DesignErrors> {
    let Some(v) = loaded.design.variants.get(index) else {
        return cost_variant(loaded, index, yield_);
    };
    cost_of_units(loaded, v, index, yield_, units, basis)
}

/// Cost one variant (possibly a modified copy of design variant `index`) as one unit of the
/// installation the design's demand needs ([`super::operator::installation_units`]).
pub fn cost_of(
    loaded: &LoadedDesign,
    v: &Variant,
    index: usize,
    yield_: Option<&YieldEstimate>,
) -> Result<VariantCost, DesignErrors> {
    let (units, basis) =
        super::operator::installation_units(loaded, yield_.and_then(|y| y.worst_month_l_day));
    cost_of_units(loaded, v, index, yield_, units, basis)
}

/// Cost one variant as one unit of an installation of `units` units.
pub fn cost_of_units(
    loaded: &LoadedDesign,
    v: &Variant,
    index: usize,
    yield_: Option<&YieldEstimate>,
    units: u64,
    basis: String,
) -> Result<VariantCost, DesignErrors> {
    let units = units.max(1);
    let c = &loaded.design.costs;
    let lib = &loaded.library;
    let t = takeoff::takeoff(v, index + 1, lib, c);
    let bom = bom::price(&t, lib, &loaded.library_path, &loaded.source, c, units)
        .map_err(DesignErrors)?;
    let cx = complexity::complexity(&bom, &t.tolerances, lib, c);
    let commissioning = complexity::commissioning(v, c, yield_.and_then(|y| y.clear_day_litres));
    let steps = complexity::build_steps(v, &bom, &commissioning);

    let materials = bom.unit_share_materials_cost();
    let single_unit_materials = bom.materials_cost();
    let labour_h = cx.labour_h;
    let labour_cost = labour_h * c.labour_rate_per_h;
    let capital = materials + labour_cost;
    let single_unit_capital = single_unit_materials + labour_cost;
    let i = c.discount_rate;
    let n = c.life_years;
    let crf = finance::capital_recovery_factor(i, n);
    let sff = finance::sinking_fund_factor(i, n);
    let mut replacements = Vec::new();
    for l in &bom.lines {
        let (count, pw) = finance::replacements(l.unit_share_cost, l.lifetime_years, n, i);
        if count > 0 {
            replacements.push(Replacement {
                part: l.part.clone(),
                item: l.item.clone(),
                lifetime_years: l.lifetime_years,
                count,
                cost_each: l.unit_share_cost,
                present_worth: pw,
            });
        }
    }
    let replacements_pw: f64 = replacements.iter().map(|r| r.present_worth).sum();
    let operator = super::operator::operator_time(v, c, units, basis);
    let operator_h_per_year = operator.unit_share_h_per_year;
    let operator_cost_per_year = operator_h_per_year * c.operator_rate_per_h;
    let upkeep_per_year = c.upkeep_fraction_per_year * capital;
    let running_per_year = upkeep_per_year + operator_cost_per_year;
    let salvage = c.salvage_fraction * capital;
    let annualised = finance::annualised_cost(
        capital + replacements_pw,
        crf,
        running_per_year,
        salvage,
        sff,
    );
    let plastic = lib
        .get(&v.cover)
        .and_then(|it| it.cover.as_ref())
        .is_some_and(is_plastic_cover);
    let loss = (c.yield_loss_per_year
        + if plastic {
            c.plastic_cover_loss_per_year
        } else {
            0.0
        })
    .min(0.99);
    let shortest_life_years = bom
        .lines
        .iter()
        .map(|l| l.lifetime_years)
        .fold(f64::INFINITY, f64::min);
    let litres_per_person_day = loaded
        .design
        .project
        .demand
        .as_ref()
        .and_then(|d| d.litres_per_person_day)
        .unwrap_or(crate::design::DEFAULT_LITRES_PER_PERSON_DAY);
    let (first, levelised, per_litre, per_person, note) = match yield_ {
        Some(y) => {
            let lev = finance::levelised_yield(y.annual_litres, loss, i, n);
            let cpl = finance::cost_per_litre(annualised, lev);
            (
                Some(y.annual_litres),
                Some(lev),
                cpl,
                cpl.map(|p| p * litres_per_person_day * 365.0),
                None,
            )
        }
        None => (
            None,
            None,
            None,
            None,
            Some(format!("yield not modelled yet for kind {}", v.kind.name())),
        ),
    };
    let all_local = bom.unavailable.is_empty();
    Ok(VariantCost {
        variant: v.name.clone(),
        kind: v.kind.name(),
        footprint_m2: v.footprint_m2(),
        cover_area_m2: v.cover_area_m2(),
        complexity: cx,
        steps,
        commissioning,
        cost: CostSummary {
            currency: lib.library.currency.clone(),
            units,
            materials,
            single_unit_materials,
            labour_h,
            labour_cost,
            capital,
            single_unit_capital,
            installation_capital: capital * units as f64,
            capital_per_m2: capital / v.footprint_m2(),
            replacements,
            replacements_present_worth: replacements_pw,
            operator,
            operator_h_per_year,
            operator_cost_per_year,
            upkeep_per_year,
            running_per_year,
            salvage,
            life_years: n,
            discount_rate: i,
            crf,
            sff,
            annualised,
            yield_loss_per_year: loss,
            shortest_life_years,
            first_year_litres: first,
            levelised_litres: levelised,
            cost_per_litre: per_litre,
            cost_per_person_year: per_person,
            yield_note: note,
        },
        bom,
        all_local,
    })
}

/// One substitute tried in place of a design material.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SubstituteRun {
    /// Role substituted.
    pub role: &'static str,
    /// The item it replaces.
    pub replaces: String,
    /// The substitute.
    pub item: String,
    /// Capital cost change [currency].
    pub capital_change: f64,
    /// Annualised cost change [currency year⁻¹].
    pub annualised_change: f64,
    /// Life of the substitute [years].
    pub lifetime_years: f64,
    /// Life of the item it replaces [years].
    pub replaced_lifetime_years: f64,
    /// Change of the cover's normal-incidence transmittance [-] (covers only; Duffie &
    /// Beckman eqs. 5.3.1–5.3.3 through [`optics::cover_optics`]).
    pub cover_transmittance_change: Option<f64>,
    /// Change of first-year yield [L year⁻¹], when modelled.
    pub yield_change_litres: Option<f64>,
    /// Change of cost per litre, when modelled.
    pub cost_per_litre_change: Option<f64>,
    /// New food-safety flags it brings.
    pub food_safety: Vec<String>,
    /// Why no yield change is given, when it is not.
    pub note: Option<String>,
    /// The full cost of the variant with the substitute.
    #[serde(skip)]
    pub result: Box<VariantCost>,
}

fn normal_tau(c: &CoverProps) -> f64 {
    optics::cover_optics(
        0.0,
        c.refractive_index,
        c.extinction_per_m,
        c.thickness_mm / 1000.0,
    )
    .transmittance
}

/// The roles a variant can swap, with the item it uses now and a function to set another.
fn swaps(v: &Variant) -> Vec<(Role, &'static str, String)> {
    let mut out = vec![(Role::Cover, "cover", v.cover.clone())];
    match &v.kind {
        VariantKind::SingleSlope(k) => {
            out.push((Role::Liner, "liner", k.liner.clone()));
            if let Some(l) = k.base_insulation.first().or(k.side_insulation.first()) {
                out.push((Role::Insulation, "insulation", l.material.clone()));
            }
        }
        VariantKind::DoubleSlope(k) => {
            out.push((Role::Liner, "liner", k.liner.clone()));
            if let Some(l) = k.base_insulation.first().or(k.side_insulation.first()) {
                out.push((Role::Insulation, "insulation", l.material.clone()));
            }
        }
        VariantKind::Stepped(k) => {
            out.push((Role::Liner, "liner", k.liner.clone()));
            if let Some(l) = k.base_insulation.first().or(k.side_insulation.first()) {
                out.push((Role::Insulation, "insulation", l.material.clone()));
            }
        }
        VariantKind::Wick(k) => {
            out.push((Role::Wick, "wick", k.cloth.clone()));
            if let Some(l) = k.backing_insulation.first() {
                out.push((Role::Insulation, "insulation", l.material.clone()));
            }
        }
        VariantKind::MultiEffect(k) => {
            out.push((Role::Liner, "liner", k.absorber.clone()));
            out.push((Role::Wick, "wick", k.wick_cloth.clone()));
            out.push((Role::Plate, "plate", k.plate.clone()));
            if let Some(l) = k.side_insulation.first() {
                out.push((Role::Insulation, "insulation", l.material.clone()));
            }
        }
    }
    out
}

/// A copy of `v` with every use of `old` in `role` replaced by `new`.
pub fn substitute(v: &Variant, role: Role, old: &str, new: &str) -> Variant {
    let mut out = v.clone();
    let swap = |s: &mut String| {
        if s == old {
            *s = new.to_string();
        }
    };
    let layers = |ls: &mut Vec<crate::design::Layer>| {
        for l in ls.iter_mut() {
            if l.material == old {
                l.material = new.to_string();
            }
        }
    };
    match (role, &mut out.kind) {
        (Role::Cover, _) => swap(&mut out.cover),
        (Role::Liner | Role::Paint, VariantKind::SingleSlope(k)) => swap(&mut k.liner),
        (Role::Liner | Role::Paint, VariantKind::DoubleSlope(k)) => swap(&mut k.liner),
        (Role::Liner | Role::Paint, VariantKind::Stepped(k)) => swap(&mut k.liner),
        (Role::Liner | Role::Paint, VariantKind::MultiEffect(k)) => swap(&mut k.absorber),
        (Role::Wick, VariantKind::Wick(k)) => swap(&mut k.cloth),
        (Role::Wick, VariantKind::MultiEffect(k)) => swap(&mut k.wick_cloth),
        (Role::Plate, VariantKind::MultiEffect(k)) => swap(&mut k.plate),
        (Role::Insulation, VariantKind::SingleSlope(k)) => {
            layers(&mut k.base_insulation);
            layers(&mut k.side_insulation);
        }
        (Role::Insulation, VariantKind::DoubleSlope(k)) => {
            layers(&mut k.base_insulation);
            layers(&mut k.side_insulation);
        }
        (Role::Insulation, VariantKind::Stepped(k)) => {
            layers(&mut k.base_insulation);
            layers(&mut k.side_insulation);
        }
        (Role::Insulation, VariantKind::Wick(k)) => layers(&mut k.backing_insulation),
        (Role::Insulation, VariantKind::MultiEffect(k)) => layers(&mut k.side_insulation),
        _ => {}
    }
    out
}

/// Re-cost variant `index` with each locally sold substitute listed in
/// `[costs.substitutes]` for the roles it uses. `yield_of` runs the physics on a variant
/// (return `None` where the model is not there yet). Substitutes that are not sold locally,
/// or whose role does not fit the field, are skipped.
pub fn substitutes(
    loaded: &LoadedDesign,
    index: usize,
    yield_of: &dyn Fn(&Variant) -> Option<YieldEstimate>,
) -> Result<(VariantCost, Vec<SubstituteRun>), DesignErrors> {
    let base_variant = loaded.design.variants.get(index).ok_or_else(|| {
        DesignErrors(vec![DesignIssue {
            file: loaded.source.clone(),
            line_col: None,
            path: "variant".into(),
            message: format!("no variant number {}", index + 1),
        }])
    })?;
    let lib = &loaded.library;
    check_substitute_ids(loaded)?;
    let base_yield = yield_of(base_variant);
    let base = cost_of(loaded, base_variant, index, base_yield.as_ref())?;
    let subs = &loaded.design.costs.substitutes;
    let mut runs = Vec::new();
    for (role, name, current) in swaps(base_variant) {
        let list = match role {
            Role::Cover => &subs.cover,
            Role::Liner => &subs.liner,
            Role::Insulation => &subs.insulation,
            Role::Wick => &subs.wick,
            Role::Plate => &subs.plate,
            _ => continue,
        };
        for id in list {
            let Some(item) = lib.get(id) else { continue };
            let role_ok = item.role == role
                || (role == Role::Liner && matches!(item.role, Role::Paint | Role::Liner));
            if !item.local || !role_ok || *id == current {
                continue;
            }
            let v = substitute(base_variant, item.role, &current, id);
            let y = yield_of(&v);
            let r = cost_of(loaded, &v, index, y.as_ref())?;
            let old_item = lib.get(&current);
            let tau = match (old_item.and_then(|i| i.cover.as_ref()), item.cover.as_ref()) {
                (Some(a), Some(b)) if role == Role::Cover => Some(normal_tau(b) - normal_tau(a)),
                _ => None,
            };
            let (dy, dc, note) = match (&base_yield, &y) {
                (Some(a), Some(b)) => (
                    Some(b.annual_litres - a.annual_litres),
                    match (r.cost.cost_per_litre, base.cost.cost_per_litre) {
                        (Some(x), Some(z)) => Some(x - z),
                        _ => None,
                    },
                    None,
                ),
                _ => (
                    None,
                    None,
                    Some(format!(
                        "yield not modelled yet for kind {}",
                        base_variant.kind.name()
                    )),
                ),
            };
            let new_flags: Vec<String> = r
                .bom
                .food_safety
                .iter()
                .filter(|f| !base.bom.food_safety.iter().any(|g| g.item == f.item))
                .map(|f| format!("{} ({}): {}", f.item, f.part, f.reason))
                .collect();
            runs.push(SubstituteRun {
                role: name,
                replaces: current.clone(),
                item: id.clone(),
                capital_change: r.cost.capital - base.cost.capital,
                annualised_change: r.cost.annualised - base.cost.annualised,
                lifetime_years: item.lifetime_years,
                replaced_lifetime_years: old_item.map_or(0.0, |i| i.lifetime_years),
                cover_transmittance_change: tau,
                yield_change_litres: dy,
                cost_per_litre_change: dc,
                food_safety: new_flags,
                note,
                result: Box::new(r),
            });
        }
    }
    Ok((base, runs))
}

/// Every id in `[costs.substitutes]` must be in the library.
fn check_substitute_ids(loaded: &LoadedDesign) -> Result<(), DesignErrors> {
    let s = &loaded.design.costs.substitutes;
    let mut issues = Vec::new();
    for (name, list) in [
        ("cover", &s.cover),
        ("liner", &s.liner),
        ("insulation", &s.insulation),
        ("wick", &s.wick),
        ("plate", &s.plate),
    ] {
        for (k, id) in list.iter().enumerate() {
            if loaded.library.get(id).is_none() {
                issues.push(DesignIssue {
                    file: loaded.source.clone(),
                    line_col: None,
                    path: format!("costs.substitutes.{name}[{}]", k + 1),
                    message: format!(
                        "item \"{id}\" is not in the materials library {}",
                        loaded.library_path.display()
                    ),
                });
            }
        }
    }
    if issues.is_empty() {
        Ok(())
    } else {
        Err(DesignErrors(issues))
    }
}
