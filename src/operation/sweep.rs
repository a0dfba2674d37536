//! Depth study: the same variant and feed mode run at a series of set depths.

use serde::Serialize;

use crate::design::{LoadedDesign, Variant, VariantKind};
use crate::error::Error;
use crate::stills::{self, RunOptions, SiteWeather};

/// One set depth of a depth study.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DepthPoint {
    /// Set depth [mm].
    pub depth_mm: f64,
    /// Mean daily yield over the year [L m⁻² day⁻¹] (0 when refused).
    pub mean_l_m2_day: f64,
    /// Share of the year's distillate made with no sunlight entering [-].
    pub night_share: f64,
    /// Most hours per day below the wetting depth in any month [h].
    pub worst_dry_out_h: f64,
    /// The month of `worst_dry_out_h` (1…12).
    pub worst_dry_out_month: u32,
    /// Highest brine salinity in any month [g kg⁻¹].
    pub peak_salinity_g_kg: f64,
    /// Dry-out risk in words: `none`, `brief` (under 1 h a day) or `daily`.
    pub dry_out_risk: &'static str,
    /// Why this depth was not run (the operation cannot hold it), if so.
    pub refused: Option<String>,
}

/// `variant` with its set depth changed to `depth_mm` [mm], or `None` for a kind without a
/// basin.
pub fn with_depth(variant: &Variant, depth_mm: f64) -> Option<Variant> {
    let mut v = variant.clone();
    match &mut v.kind {
        VariantKind::SingleSlope(k) => k.brine_depth_mm = depth_mm,
        VariantKind::DoubleSlope(k) => k.brine_depth_mm = depth_mm,
        VariantKind::Stepped(k) => k.tray_depth_mm = depth_mm,
        VariantKind::Wick(_) | VariantKind::MultiEffect(_) => return None,
    }
    Some(v)
}

/// Run `variant` of `loaded` at every depth of `depths_mm` [mm] with its own operation table
/// (or the default). A depth the operation cannot hold (e.g. at or below the wetting depth)
/// is listed as refused rather than run.
pub fn depth_sweep(
    loaded: &LoadedDesign,
    variant: &Variant,
    weather: &SiteWeather,
    depths_mm: &[f64],
    opts: &RunOptions,
) -> Result<Vec<DepthPoint>, Error> {
    let op = variant.operation.clone().unwrap_or_default();
    let mut out = Vec::with_capacity(depths_mm.len());
    for &d in depths_mm {
        let Some(v) = with_depth(variant, d) else {
            return Err(Error::Model {
                variant: variant.name.clone(),
                at: String::new(),
                reason: format!(
                    "a {} still has no basin depth to study",
                    variant.kind.name()
                ),
            });
        };
        let area = v.width_m * v.length_m;
        let refusal: Vec<String> = op
            .check(d, area, weather.feed_salinity_g_kg)
            .into_iter()
            .filter(|i| i.error)
            .map(|i| format!("operation.{}: {}", i.field, i.message))
            .collect();
        if !refusal.is_empty() {
            out.push(DepthPoint {
                depth_mm: d,
                mean_l_m2_day: 0.0,
                night_share: 0.0,
                worst_dry_out_h: 0.0,
                worst_dry_out_month: 0,
                peak_salinity_g_kg: 0.0,
                dry_out_risk: "refused",
                refused: Some(refusal.join("; ")),
            });
            continue;
        }
        let r = stills::simulate_variant(loaded, &v, weather, opts)?;
        let days = crate::design::DAYS_IN_MONTH;
        let (mut night, mut total) = (0.0, 0.0);
        let (mut worst_h, mut worst_m, mut peak) = (0.0_f64, 1u32, 0.0_f64);
        for (m, n) in r.months.iter().zip(days) {
            night += m.night_share * m.l_day * f64::from(n);
            total += m.l_day * f64::from(n);
            if let Some(o) = &m.operation {
                if o.dry_out_h > worst_h {
                    worst_h = o.dry_out_h;
                    worst_m = m.month;
                }
                peak = peak.max(o.peak_salinity_g_kg);
            }
        }
        out.push(DepthPoint {
            depth_mm: d,
            mean_l_m2_day: r.mean_l_m2_day,
            night_share: if total > 0.0 { night / total } else { 0.0 },
            worst_dry_out_h: worst_h,
            worst_dry_out_month: worst_m,
            peak_salinity_g_kg: peak,
            dry_out_risk: if worst_h <= 0.0 {
                "none"
            } else if worst_h < 1.0 {
                "brief"
            } else {
                "daily"
            },
            refused: None,
        });
    }
    Ok(out)
}
