//! The plan file exactly as written: a serde mirror of the TOML that only knows types.
//!
//! Values that validation must point at later are wrapped in `Spanned` so an error can
//! name the line. Nothing here checks ranges; `validate` does that once.

use serde::Deserialize;
use toml::Spanned;

/// Top level of a plan file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPlan {
    pub study: RawStudy,
    pub observer: RawObserver,
    #[serde(rename = "design")]
    pub designs: Spanned<Vec<RawDesign>>,
    #[serde(rename = "hypothesis")]
    pub hypotheses: Option<Vec<RawHypothesis>>,
    pub targets: Option<RawTargets>,
    pub animals: Option<RawAnimals>,
    pub budget: Option<RawBudget>,
    /// `[sensitivity]`: assumption key → values to try (checked in `validate::uncertainty`).
    pub sensitivity: Option<Spanned<toml::Table>>,
    pub assurance: Option<Spanned<RawAssurance>>,
}

/// `[assurance]`: distributions of uncertain assumptions and what to do with them.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawAssurance {
    pub draws: Option<Spanned<i64>>,
    pub target: Option<Spanned<f64>>,
    /// Assumption key → `{ sd, low, high }`.
    pub uncertain: Option<Spanned<toml::Table>>,
}

/// `[study]`: what is simulated and how results are summarised.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawStudy {
    pub title: String,
    pub seed: Spanned<i64>,
    pub experiments: Option<Spanned<i64>>,
    pub confidence: Option<Spanned<f64>>,
    pub rate_correction: Option<Spanned<String>>,
    pub alpha: Option<Spanned<f64>>,
    pub max_trials: Option<Spanned<i64>>,
    pub values_source: Option<Spanned<String>>,
    pub precision: Option<Spanned<RawPrecision>>,
}

/// `[study.precision]`: simulate until the Monte Carlo error is small enough.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPrecision {
    pub power_se: Option<Spanned<f64>>,
    pub mean_se_per_sd: Option<Spanned<f64>>,
    pub max_experiments: Option<Spanned<i64>>,
}

/// `[observer]`: the hypothesised animal.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawObserver {
    pub d_prime: Spanned<f64>,
    pub criterion: Spanned<RawCriterion>,
    pub criterion_fraction: Option<Spanned<f64>>,
    pub payoffs: Option<Spanned<RawPayoffs>>,
    pub sigma: Option<Spanned<f64>>,
    pub lapse_rate: Option<Spanned<f64>>,
    pub lapse_yes: Option<Spanned<f64>>,
}

/// One `[[design]]`: a candidate experiment and the trial counts to scan.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawDesign {
    pub name: Spanned<String>,
    pub presence: Option<Spanned<f64>>,
    pub trials: Spanned<Vec<Spanned<i64>>>,
    pub scale: Option<Spanned<RawScale>>,
    pub record: Option<Spanned<String>>,
    pub base_rate: Option<Spanned<String>>,
    pub census: Option<Spanned<i64>>,
    pub shared: Option<Spanned<Vec<Spanned<String>>>>,
    #[serde(rename = "condition")]
    pub conditions: Option<Spanned<Vec<RawCondition>>>,
}

/// One `[[design.condition]]`: a treatment within a design (e.g. a presence rate or a payoff
/// regime); parameters not listed in the design's `shared` are estimated per condition.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawCondition {
    pub name: Spanned<String>,
    pub presence: Option<Spanned<f64>>,
    pub d_prime: Option<Spanned<f64>>,
    pub criterion: Option<Spanned<RawCriterion>>,
}

/// `scale = { … }` on a design: an ordered response scale with more than two steps.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawScale {
    pub categories: Spanned<i64>,
    pub boundary: Spanned<i64>,
    pub criteria: Option<Spanned<Vec<f64>>>,
    pub absent_shares: Option<Spanned<Vec<f64>>>,
    pub fix_sigma: Option<bool>,
}

/// A criterion given as a number or as the word "optimal" (the ideal observer's).
#[derive(Debug, Clone, Deserialize)]
#[serde(untagged)]
pub enum RawCriterion {
    Value(f64),
    Word(String),
}

/// `[observer.payoffs]`: what each outcome is worth to the animal (Green & Swets 1966).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawPayoffs {
    pub value_hit: f64,
    pub cost_miss: f64,
    pub value_correct_rejection: f64,
    pub cost_false_alarm: f64,
}

/// One `[[hypothesis]]`: a test to run on every simulated dataset.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawHypothesis {
    pub name: Spanned<String>,
    pub kind: Spanned<String>,
    pub conditions: Option<Spanned<Vec<String>>>,
    pub sided: Option<Spanned<String>>,
    pub power: Option<Spanned<f64>>,
    /// For a group difference: the second population's mean criterion minus the first's.
    pub shift: Option<Spanned<f64>>,
}

/// `[targets]`: what the smallest experiment must achieve.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawTargets {
    pub power: Option<Spanned<f64>>,
    pub half_width: Option<Spanned<std::collections::BTreeMap<String, Spanned<f64>>>>,
    pub max_correlation: Option<Spanned<f64>>,
}

/// `[animals]`: a group of animals whose parameters vary around the observer's.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawAnimals {
    pub counts: Spanned<Vec<Spanned<i64>>>,
    pub sd_d_prime: Option<Spanned<f64>>,
    pub sd_criterion: Option<Spanned<f64>>,
    pub correlation: Option<Spanned<f64>>,
    pub sd_criterion_shift: Option<Spanned<f64>>,
    pub correlation_criterion_shift: Option<Spanned<f64>>,
    pub sd_d_prime_change: Option<Spanned<f64>>,
    pub correlation_d_prime_change: Option<Spanned<f64>>,
    pub sd_ln_sigma: Option<Spanned<f64>>,
    pub sd_lapse_rate: Option<Spanned<f64>>,
    pub trial_cap: Option<Spanned<i64>>,
    pub random_effects: Option<Spanned<bool>>,
    pub quadrature_nodes: Option<Spanned<i64>>,
    pub habituation: Option<Spanned<RawHabituation>>,
}

/// `[animals.habituation]`: how an animal changes over its presentations.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawHabituation {
    pub criterion_drift: Option<Spanned<f64>>,
    pub half_life: Option<Spanned<f64>>,
    pub block: Option<Spanned<i64>>,
    pub order: Option<Spanned<String>>,
    pub analysis: Option<Spanned<String>>,
}

/// `[budget]`: what animals and trials cost.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawBudget {
    pub cost_per_animal: Spanned<f64>,
    pub cost_per_trial: Spanned<f64>,
    pub total: Option<Spanned<f64>>,
}
