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
}

/// `[observer]`: the hypothesised animal.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawObserver {
    pub d_prime: Spanned<f64>,
    pub criterion: Spanned<f64>,
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
    pub criterion: Option<Spanned<f64>>,
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
