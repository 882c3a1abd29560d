//! What an experiment records and how its trials are allocated.
//!
//! Every design is a coarsening of one count table (stimulus class × response category).
//! A yes/no design keeps two response categories; a rating design keeps K.

mod split;

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

/// A candidate experiment: its response record, presence rate and trial counts to scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    pub name: String,
    /// Share of trials on which the stimulus is present, in (0, 1).
    pub presence: f64,
    /// Total trials per condition to scan, increasing.
    pub trials: Vec<u32>,
    pub response: Response,
}

impl Design {
    /// Short label of the record kind for tables.
    pub fn record_label(&self) -> String {
        match &self.response {
            Response::YesNo => "yes/no".to_string(),
            Response::Rating(s) => format!("{}-step rating", s.categories),
        }
    }
}
