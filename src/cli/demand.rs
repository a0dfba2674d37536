//! The demand options `size` and `report` share: `--demand L_PER_DAY`, or `--people N` with
//! `--litres-per-person L`; without them the design's `[project.demand]`.

use stillbench::design::DRINKING_L_PER_PERSON_DAY;
use stillbench::report::DemandChoice;

/// `--demand`, or `--people` with `--litres-per-person`.
#[derive(Debug, clap::Args)]
pub struct DemandArgs {
    /// Daily demand [L/day]. Without it or --people, the design's `[project.demand]`.
    #[arg(
        long,
        value_name = "L_PER_DAY",
        allow_negative_numbers = true,
        conflicts_with = "people"
    )]
    pub demand: Option<f64>,
    /// People served; the demand is people × --litres-per-person.
    #[arg(long, value_name = "N")]
    pub people: Option<u32>,
    /// Litres per person and day with --people; default 3 (drinking only).
    #[arg(
        long,
        value_name = "L",
        allow_negative_numbers = true,
        requires = "people"
    )]
    pub litres_per_person: Option<f64>,
}

impl DemandArgs {
    /// What was asked for (checked where it is used).
    pub fn choice(&self) -> DemandChoice {
        match (self.people, self.demand) {
            (Some(people), _) => DemandChoice::People {
                people,
                l_per_person_day: self.litres_per_person.unwrap_or(DRINKING_L_PER_PERSON_DAY),
            },
            (None, Some(d)) => DemandChoice::Total(d),
            (None, None) => DemandChoice::FromDesign,
        }
    }

    /// The options as given, for a command line that reproduces the run (leading space).
    pub fn command_args(&self) -> String {
        let mut out = String::new();
        if let Some(p) = self.people {
            out.push_str(&format!(" --people {p}"));
            if let Some(l) = self.litres_per_person {
                out.push_str(&format!(" --litres-per-person {l}"));
            }
        }
        if let Some(d) = self.demand {
            out.push_str(&format!(" --demand {d}"));
        }
        out
    }
}
