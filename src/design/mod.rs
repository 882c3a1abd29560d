//! What an experiment records and how its trials are allocated.
//!
//! Every design is a coarsening of one count table (stimulus class × response category).
//! A yes/no design keeps two response categories; a rating design keeps K.

mod condition_trials;
pub mod goals;
pub mod habituation;
pub mod model;
pub mod quantities;
mod route;
mod split;

pub use condition_trials::{ConditionTrials, TrialCounts};
pub use route::Route;
pub use split::{Split, split_trials};

use serde::Serialize;

/// An ordered response scale with K categories (category 0 = lowest evidence).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RatingScale {
    /// Number of ordered categories K (2 ≤ K ≤ 12).
    pub categories: usize,
    /// 1-based index of the criterion that is the overt yes/no boundary: categories
    /// at or above it count as "present" responses.
    pub boundary: usize,
    /// The K−1 criteria in the midpoint convention (c_j = k_j − d′/2), strictly increasing.
    pub criteria: Vec<f64>,
    /// Hold σ = 1 in the fit (the equal-variance model).
    pub fix_sigma: bool,
}

/// What the observer's responses are recorded as.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Response {
    /// Present or absent only.
    YesNo,
    /// An ordered rating or graded response.
    Rating(RatingScale),
}

/// Which cells of the stimulus × response table are observed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RecordKind {
    /// Every trial's stimulus class and response: present and absent trial counts are fixed.
    Full,
    /// False alarms, misses and correct responses, summed over stimulus classes, among
    /// encounters whose class is drawn at the base rate.
    ErrorTotals,
    /// Only how often the animal responded, among encounters drawn at the base rate.
    ResponseTotals,
    /// A two-choice task: every trial offers both stimuli, the target on the left or on the
    /// right (fixed counts of each order), and the animal picks a side. The two orders form a
    /// yes/no-like table with "left" as the response (Macmillan & Creelman 2005, ch. 7).
    TwoChoice,
}

impl RecordKind {
    /// Names accepted in plans.
    pub const NAMES: [&'static str; 4] = ["full", "error-totals", "response-totals", "two-choice"];

    pub fn from_name(name: &str) -> Option<Self> {
        match name {
            "full" => Some(Self::Full),
            "error-totals" => Some(Self::ErrorTotals),
            "response-totals" => Some(Self::ResponseTotals),
            "two-choice" => Some(Self::TwoChoice),
            _ => None,
        }
    }

    /// Whether the record fixes the number of trials of each row (present/absent trials, or
    /// target-left/target-right trials of a two-choice task), so the presence share splits
    /// every trial count and both rows need at least one trial.
    pub fn fixes_rows(self) -> bool {
        matches!(self, Self::Full | Self::TwoChoice)
    }
}

pub use crate::vocab::BaseRate;

/// A parameter that linked conditions may share.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SharedParameter {
    DPrime,
    Criterion,
    Sigma,
    Spacing,
    BaseRate,
}

impl SharedParameter {
    pub const NAMES: [&'static str; 5] = ["d_prime", "criterion", "sigma", "spacing", "base_rate"];

    pub fn from_name(name: &str) -> Option<Self> {
        match name {
            "d_prime" => Some(Self::DPrime),
            "criterion" => Some(Self::Criterion),
            "sigma" => Some(Self::Sigma),
            "spacing" => Some(Self::Spacing),
            "base_rate" => Some(Self::BaseRate),
            _ => None,
        }
    }
}

/// One condition (treatment) of a design, with its true parameter values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Condition {
    pub name: String,
    /// Share of trials (or encounters) with the stimulus present, in (0, 1); in a two-choice
    /// task the share of trials with the target on the left.
    pub presence: f64,
    /// d′ of the stimuli (in a two-choice task the d′ of one stimulus against the other, as a
    /// yes/no task on them would measure it; the choice itself sees √2·d′).
    pub d_prime: f64,
    /// Criterion c at the yes/no boundary; in a two-choice task the side bias
    /// c = −[z(H) + z(F)]/2, positive = towards the right.
    pub criterion: f64,
}

impl Condition {
    /// The observer in this condition: the plan's, with the condition's d′ and criterion.
    pub fn observer(&self, base: &crate::model::Observer) -> crate::model::Observer {
        crate::model::Observer {
            d_prime: self.d_prime,
            criterion: self.criterion,
            ..*base
        }
    }
}

/// A candidate experiment: what it records, its conditions and the trial counts to scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    pub name: String,
    /// Presence rate of the first condition (the design's own for a single condition).
    pub presence: f64,
    /// Total trials (or encounters) per condition to scan, increasing.
    pub trials: Vec<u32>,
    pub response: Response,
    pub record: RecordKind,
    pub base_rate: BaseRate,
    /// At least one; a design without `[[design.condition]]` has one, named after it.
    pub conditions: Vec<Condition>,
    /// Parameters common to all conditions.
    pub shared: Vec<SharedParameter>,
}

impl Design {
    /// Short label of the record kind for tables.
    pub fn record_label(&self) -> String {
        let response = match &self.response {
            Response::YesNo => "yes/no".to_string(),
            Response::Rating(s) => format!("{}-step rating", s.categories),
        };
        let base = match self.base_rate {
            BaseRate::Known => "known base rate".to_string(),
            BaseRate::Census(m) => format!("base rate from a census of {m}"),
            BaseRate::Unknown => "unknown base rate".to_string(),
        };
        match self.record {
            RecordKind::Full => response,
            RecordKind::ErrorTotals => format!("error totals, {base}"),
            RecordKind::ResponseTotals => format!("response totals, {base}"),
            RecordKind::TwoChoice => "two-choice (left or right)".to_string(),
        }
    }

    /// Whether the closed-form or rating fast path applies: one condition, full record.
    pub fn is_single_table(&self) -> bool {
        self.conditions.len() == 1 && self.record == RecordKind::Full
    }

    /// Whether a parameter is shared across conditions.
    pub fn shares(&self, p: SharedParameter) -> bool {
        self.shared.contains(&p)
    }
}
