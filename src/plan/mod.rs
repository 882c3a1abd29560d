//! Plans: the TOML file a user writes, checked once and expanded into scenarios.
//!
//! Two stages, as in the settings layer of ripgrep: `raw` mirrors the file and only knows
//! types; `validate` turns it into a [`Plan`] whose values the rest of the program trusts
//! without checking again. Every rejection is a [`PlanError`] naming file, line and key.

mod error;
mod keys;
mod locate;
mod raw;
mod scenario;
mod text;
mod toml_error;
mod validate;

pub use error::PlanError;
pub use keys::{TABLE_KEYS, allowed};
pub use scenario::{Scenario, expand};

use crate::design::Design;
use crate::design::goals::{Animals, Budget, Hypothesis, Targets};
use crate::fit::correction::RateCorrection;
use crate::model::Observer;
use crate::model::ideal::Payoffs;
use serde::Serialize;
use std::path::{Path, PathBuf};

/// `[study]`: how many experiments to simulate and how to summarise them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Study {
    pub title: String,
    pub seed: u64,
    /// Simulated experiments (replicates) per scenario.
    pub experiments: u64,
    /// Confidence level of the Wald intervals, in (0, 1).
    pub confidence: f64,
    pub rate_correction: RateCorrection,
    /// Level of every hypothesis test, in (0, 1).
    pub alpha: f64,
    /// Largest trial count per condition the sample-size search may propose.
    pub max_trials: u32,
}

/// How the observer's criterion was given.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum CriterionRule {
    /// A number, the same in every condition unless a condition sets its own.
    Fixed { criterion: f64 },
    /// The ideal observer's for each condition's presence rate and these payoffs (Green &
    /// Swets 1966), times `fraction` (partial adjustment from c = 0).
    Optimal { payoffs: Payoffs, fraction: f64 },
}

/// A validated plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plan {
    /// The file the plan came from (for messages and the JSON record).
    pub source: PathBuf,
    pub study: Study,
    pub observer: Observer,
    pub criterion_rule: CriterionRule,
    pub designs: Vec<Design>,
    pub hypotheses: Vec<Hypothesis>,
    pub targets: Targets,
    pub animals: Option<Animals>,
    pub budget: Option<Budget>,
}

impl Plan {
    /// Reads, parses and validates a plan file.
    pub fn load(path: &Path) -> Result<Plan, PlanError> {
        let text = std::fs::read_to_string(path).map_err(|e| PlanError {
            file: path.to_path_buf(),
            line: None,
            key: "(file)".into(),
            problem: format!("cannot read the plan: {e}"),
            allowed: "a readable TOML file".into(),
        })?;
        Self::from_str(path, &text)
    }

    /// Parses and validates plan text; `path` is used only in messages.
    pub fn from_str(path: &Path, text: &str) -> Result<Plan, PlanError> {
        // Byte offsets in `prepared` are those of `text` without its byte-order mark.
        let prepared = text::prepare(text);
        let raw: raw::RawPlan = toml::from_str(&prepared)
            .map_err(|e| toml_error::translate(path, &prepared, text, &e))?;
        validate::validate(path, &prepared, raw)
    }

    /// Every (design, trial count) pair, in plan order.
    pub fn scenarios(&self) -> Vec<Scenario> {
        expand(self)
    }
}
