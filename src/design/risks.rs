//! `[[risk]]`: how a still fails in service, how likely and how bad that is, and what keeps it
//! from happening. A set of defaults ([`default_risks`]) always applies; a design entry with
//! the `id` of a default changes only the fields it gives, and an entry with a new `id` adds a
//! risk (and must then give every field).

use std::collections::HashMap;

use serde::{Deserialize, Serialize};

use super::reader::Reader;
use super::spans::{self, hint};
use super::validate::text_len;

/// A three-step rating of likelihood or impact.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Level {
    /// Seldom / a nuisance.
    Low,
    /// Now and then / costs some water.
    Medium,
    /// Often / stops the still or endangers health.
    High,
}

impl Level {
    /// The word as written in a design file.
    pub fn name(self) -> &'static str {
        match self {
            Level::Low => "low",
            Level::Medium => "medium",
            Level::High => "high",
        }
    }
}

/// One `[[risk]]` entry as written: `id` and whichever fields it sets.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RiskEntry {
    /// Kebab-case id, 1–40 characters of `a-z 0-9 -`; a default's id overrides that default.
    pub id: String,
    /// What goes wrong, 1–200 characters.
    #[serde(default)]
    pub failure_mode: Option<String>,
    /// How likely over the still's life.
    #[serde(default)]
    pub likelihood: Option<Level>,
    /// How bad when it happens.
    #[serde(default)]
    pub impact: Option<Level>,
    /// What prevents it or limits the harm, 1–500 characters.
    #[serde(default)]
    pub mitigation: Option<String>,
}

/// Where a risk row comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RiskOrigin {
    /// A built-in default, unchanged.
    Default,
    /// A built-in default changed by the design.
    DesignOverride,
    /// Added by the design.
    Design,
}

/// A complete risk: every field set.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Risk {
    /// Kebab-case id.
    pub id: String,
    /// What goes wrong.
    pub failure_mode: String,
    /// How likely over the still's life.
    pub likelihood: Level,
    /// How bad when it happens.
    pub impact: Level,
    /// What prevents it or limits the harm.
    pub mitigation: String,
    /// Where the figures come from.
    pub source: String,
    /// Default, overridden default, or the design's own.
    pub origin: RiskOrigin,
}

/// The source note of every default.
pub const DEFAULT_RISK_SOURCE: &str = "common practice, no source";

fn default_risk(id: &str, mode: &str, l: Level, i: Level, mitigation: &str) -> Risk {
    Risk {
        id: id.to_owned(),
        failure_mode: mode.to_owned(),
        likelihood: l,
        impact: i,
        mitigation: mitigation.to_owned(),
        source: DEFAULT_RISK_SOURCE.to_owned(),
        origin: RiskOrigin::Default,
    }
}

/// The ids of the defaults, in table order.
pub const DEFAULT_RISK_IDS: [&str; 5] = [
    "broken-cover",
    "seal-failure",
    "scale",
    "cloudy-season",
    "misuse",
];

/// The risks every still carries, with ratings that are common practice, no source.
pub fn default_risks() -> Vec<Risk> {
    use Level::*;
    vec![
        default_risk(
            DEFAULT_RISK_IDS[0],
            "Cover cracked or broken (stones, hail, a dropped tool, a child climbing on it); \
             vapour escapes and dirt falls into the basin",
            Medium,
            High,
            "Keep a spare pane or film on site with sealant; fence or mark the still; train the \
             operator to replace a pane in a day",
        ),
        default_risk(
            DEFAULT_RISK_IDS[1],
            "Seals at the cover or trough perish in sun and heat; vapour leaks out and the yield \
             falls slowly",
            High,
            Medium,
            "Inspect every seal monthly; reseal with the same drinking-water-grade sealant; \
             compare daily litres with the expected range",
        ),
        default_risk(
            DEFAULT_RISK_IDS[2],
            "Salt and scale build up on the basin floor; the liner darkens less light, the brine \
             may dry out and crust",
            High,
            Medium,
            "Flush the basin as the operation plan says; never let it run dry; scrape and rinse \
             at every cleaning",
        ),
        default_risk(
            DEFAULT_RISK_IDS[3],
            "A cloudy or rainy season gives far less water than the yearly mean",
            Medium,
            High,
            "Size for the worst month; store water from good months in clean lidded containers; \
             keep a second source (see the alternatives) for the cloudy weeks",
        ),
        default_risk(
            DEFAULT_RISK_IDS[4],
            "Misuse: the outlet left open to dust and animals, distillate stored in dirty or \
             metal containers, fuel-contaminated water fed in, the cover used as a shelf",
            Medium,
            High,
            "Train users and the operator; keep the outlet closed and the containers lidded; \
             post the rules at the still; test the distillate as the commissioning says",
        ),
    ]
}

/// The risks of a design: every default (changed where the design overrides it, in default
/// order), then the design's own in file order.
///
/// Entries are assumed validated; a new entry with a missing field (which validation rejects)
/// is skipped rather than guessed.
pub fn merged_risks(entries: &[RiskEntry]) -> Vec<Risk> {
    let mut out = default_risks();
    for e in entries {
        if let Some(r) = out
            .iter_mut()
            .find(|r| r.id == e.id && r.origin != RiskOrigin::Design)
        {
            if let Some(m) = &e.failure_mode {
                r.failure_mode.clone_from(m);
            }
            if let Some(l) = e.likelihood {
                r.likelihood = l;
            }
            if let Some(i) = e.impact {
                r.impact = i;
            }
            if let Some(m) = &e.mitigation {
                r.mitigation.clone_from(m);
            }
            r.source = "design file".to_owned();
            r.origin = RiskOrigin::DesignOverride;
        } else if let (Some(mode), Some(l), Some(i), Some(m)) =
            (&e.failure_mode, e.likelihood, e.impact, &e.mitigation)
        {
            out.push(Risk {
                id: e.id.clone(),
                failure_mode: mode.clone(),
                likelihood: l,
                impact: i,
                mitigation: m.clone(),
                source: "design file".to_owned(),
                origin: RiskOrigin::Design,
            });
        }
    }
    out
}

/// Check every risk entry: ids, unique ids, text lengths, and that a new risk is complete.
pub(super) fn validate(r: &mut Reader<'_>, entries: &[RiskEntry]) {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, e) in entries.iter().enumerate() {
        let p = spans::index("risk", i);
        let id_ok = !e.id.is_empty()
            && e.id.chars().count() <= 40
            && e.id
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-');
        if !id_ok {
            r.error(
                &format!("{p}.id"),
                format!(
                    "\"{}\" is not a valid id; allowed 1 to 40 characters of a-z 0-9 -",
                    e.id
                ),
            );
        }
        if let Some(first) = seen.get(e.id.as_str()) {
            r.error(
                &format!("{p}.id"),
                format!(
                    "duplicate risk id \"{}\" (already used by risk[{}]); ids must be unique",
                    e.id,
                    first + 1
                ),
            );
        } else {
            seen.insert(&e.id, i);
        }
        if let Some(m) = &e.failure_mode {
            text_len(r, &format!("{p}.failure_mode"), m, 200);
        }
        if let Some(m) = &e.mitigation {
            text_len(r, &format!("{p}.mitigation"), m, 500);
        }
        let is_default = DEFAULT_RISK_IDS.contains(&e.id.as_str());
        if id_ok && !is_default {
            let missing: Vec<&str> = [
                ("failure_mode", e.failure_mode.is_none()),
                ("likelihood", e.likelihood.is_none()),
                ("impact", e.impact.is_none()),
                ("mitigation", e.mitigation.is_none()),
            ]
            .iter()
            .filter(|(_, m)| *m)
            .map(|(n, _)| *n)
            .collect();
            if !missing.is_empty() {
                let h = hint(&e.id, DEFAULT_RISK_IDS);
                r.error(
                    &format!("{p}.id"),
                    format!(
                        "\"{}\" is not a default risk ({}), so this new risk needs {}{h}",
                        e.id,
                        DEFAULT_RISK_IDS.join(", "),
                        missing
                            .iter()
                            .map(|m| format!("`{m}`"))
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                );
            }
        }
    }
}
