//! Plans: the TOML file a user writes, checked once and expanded into scenarios.
//!
//! Two stages, as in the settings layer of ripgrep: `raw` mirrors the file and only knows
//! types; `validate` turns it into a [`Plan`] whose values the rest of the program trusts
//! without checking again. Every rejection is a [`PlanError`] naming file, line and key.

pub mod assumptions;
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
use crate::model::Observer;
use crate::model::ideal::Payoffs;
use crate::vocab::RateCorrection;
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
    /// Where the hypothesised values come from, in the user's words (for the justification).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub values_source: Option<String>,
    /// `[study.precision]`: run each scenario until its Monte Carlo error is this small,
    /// `experiments` being the fewest it runs; `None` runs exactly `experiments`.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub precision: Option<Precision>,
}

/// `[study.precision]`: a scenario's experiments are added a chunk at a time, in chunk
/// order, until every figure named here is as precise as asked (or the ceiling is reached).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Precision {
    /// Largest Monte Carlo SE allowed on any power or rejection rate.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub power_se: Option<f64>,
    /// Largest Monte Carlo SE allowed on any mean estimate, as a fraction of its SD.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mean_se_per_sd: Option<f64>,
    /// The most experiments a scenario may run.
    pub max_experiments: u64,
}

/// Default ceiling of a precision run, per scenario.
pub const DEFAULT_MAX_EXPERIMENTS: u64 = 100_000;

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

/// A validated plan. Its fields are private: the rest of the program reads them through
/// accessors and trusts them without re-checking; an override (such as `--experiments`)
/// goes through a constructor that validates again and returns a new plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plan {
    /// The file the plan came from (for messages and the JSON record).
    source: PathBuf,
    study: Study,
    observer: Observer,
    criterion_rule: CriterionRule,
    designs: Vec<Design>,
    hypotheses: Vec<Hypothesis>,
    targets: Targets,
    animals: Option<Animals>,
    budget: Option<Budget>,
    /// `[sensitivity]` and `[assurance]`, when given.
    #[serde(skip_serializing_if = "Option::is_none")]
    sensitivity: Option<assumptions::Sensitivity>,
    #[serde(skip_serializing_if = "Option::is_none")]
    assurance: Option<assumptions::AssuranceSpec>,
    /// The plan's text (variants for sensitivity and assurance are written from it).
    #[serde(skip)]
    text: String,
}

/// Largest number of simulated experiments per scenario a plan or `--experiments` may ask
/// for (10⁸: about an hour per scenario on the slowest route at one core).
pub const MAX_EXPERIMENTS: u64 = 100_000_000;

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

    /// The file the plan came from.
    pub fn source(&self) -> &Path {
        &self.source
    }
    /// `[study]`.
    pub fn study(&self) -> &Study {
        &self.study
    }
    /// The hypothesised observer (`[observer]`).
    pub fn observer(&self) -> &Observer {
        &self.observer
    }
    /// How the observer's criterion was given.
    pub fn criterion_rule(&self) -> &CriterionRule {
        &self.criterion_rule
    }
    /// The candidate designs, in plan order.
    pub fn designs(&self) -> &[Design] {
        &self.designs
    }
    /// The `[[hypothesis]]` tables, in plan order.
    pub fn hypotheses(&self) -> &[Hypothesis] {
        &self.hypotheses
    }
    /// `[targets]`.
    pub fn targets(&self) -> &Targets {
        &self.targets
    }
    /// `[animals]`, when the plan has groups of animals.
    pub fn animals(&self) -> &Option<Animals> {
        &self.animals
    }
    /// `[budget]`, when given.
    pub fn budget(&self) -> &Option<Budget> {
        &self.budget
    }

    /// `[sensitivity]`, when given.
    pub fn sensitivity(&self) -> Option<&assumptions::Sensitivity> {
        self.sensitivity.as_ref()
    }
    /// `[assurance]`, when given.
    pub fn assurance(&self) -> Option<&assumptions::AssuranceSpec> {
        self.assurance.as_ref()
    }

    /// The plan with the assumptions `values` replaced and without `[sensitivity]` and
    /// `[assurance]`, validated from the start (so everything derived from a value follows
    /// it). The experiments, precision and every other setting stay as they are.
    pub fn with_values(
        &self,
        values: &[(&assumptions::AssumptionKey, f64)],
    ) -> Result<Plan, PlanError> {
        let problem = |problem: String| PlanError {
            file: self.source.clone(),
            line: None,
            key: "(variant)".into(),
            problem,
            allowed: String::new(),
        };
        let mut table: toml::Table =
            toml::from_str(&self.text).map_err(|e| problem(e.to_string()))?;
        table.remove("sensitivity");
        table.remove("assurance");
        for (key, v) in values {
            key.set_in(&mut table, *v).map_err(problem)?;
        }
        let text = toml::to_string(&table).map_err(|e| problem(e.to_string()))?;
        let mut plan = Self::from_str(&self.source, &text)?;
        // A `--experiments` override or other in-memory change carries over.
        plan.study = Study {
            precision: self.study.precision,
            experiments: self.study.experiments,
            ..plan.study
        };
        Ok(plan)
    }

    /// The same plan with exactly `experiments` simulated experiments per scenario (the
    /// `--experiments` override, for quick looks: it sets any precision stop aside), checked
    /// like the plan's own value.
    pub fn with_experiments(&self, experiments: u64) -> Result<Plan, PlanError> {
        if !(1..=MAX_EXPERIMENTS).contains(&experiments) {
            return Err(PlanError {
                file: self.source.clone(),
                line: None,
                key: "--experiments".into(),
                problem: format!("{experiments} experiments is outside the allowed range"),
                allowed: format!("a whole number from 1 to {MAX_EXPERIMENTS}"),
            });
        }
        let mut plan = self.clone();
        plan.study.experiments = experiments;
        plan.study.precision = None;
        Ok(plan)
    }

    /// The same plan with design `design` run at the trial counts `trials` only (for
    /// studies of one design at chosen counts); `None` when the index or counts are invalid.
    pub fn with_design_trials(&self, design: usize, trials: Vec<u32>) -> Option<Plan> {
        if design >= self.designs.len() || trials.is_empty() || trials.contains(&0) {
            return None;
        }
        let mut plan = self.clone();
        plan.designs[design].trials = trials;
        Some(plan)
    }

    /// Every (design, trial count) pair, in plan order.
    pub fn scenarios(&self) -> Vec<Scenario> {
        expand(self)
    }
}
