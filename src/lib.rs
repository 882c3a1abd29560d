//! vigil: plan signal-detection experiments before fieldwork.
//!
//! A plan (TOML) names a hypothesised observer and candidate designs. vigil simulates each
//! design many times, fits every simulated dataset by maximum likelihood and reports how
//! precisely sensitivity (d′) and bias (c) are estimated and how strongly they trade off.
//!
//! Data flow, one direction: [`plan`] → scenarios → [`evaluate`] (the [`engine`]'s
//! simulate → fit → tally, or [`analytic`] exact enumeration and expected information) →
//! typed results → [`search`] / [`groups`] → [`figures`] (SVG) and [`report`] (every
//! sentence, the report page) → [`commands`].
//!
//! # The library in three calls
//!
//! Load and validate a plan, run it, read typed results; fit one dataset; ask the expected
//! information of a design without simulating:
//!
//! ```
//! use std::path::Path;
//!
//! let text = r#"
//! [study]
//! title = "an invented playback plan"
//! seed = 7
//! experiments = 200
//!
//! [observer]
//! d_prime = 1.5
//! criterion = 0.3
//!
//! [[design]]
//! name = "yes/no"
//! presence = 0.5
//! trials = [40]
//! "#;
//! let plan = vigil::load_plan_text(Path::new("invented.toml"), text)?;
//! let results = vigil::run(&plan)?;
//! let d = results[0].quantity(vigil::vocab::Quantity::DPrime).unwrap();
//! assert!((d.mean.value - 1.5).abs() < 0.2);
//!
//! // One dataset: 15 hits of 20, 4 false alarms of 20, log-linear correction.
//! let fit = vigil::fit_yes_no_counts(15, 20, 4, 20, vigil::vocab::RateCorrection::LogLinear)
//!     .unwrap();
//! assert!(fit.measures.d_prime > 1.0);
//!
//! // Expected information at 40 trials: asymptotic SEs and the identifiability verdict.
//! let info = vigil::expected_information(&plan, 0, 40)?;
//! assert_eq!(info.verdict, vigil::Verdict::Identified);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

// The layers below are public so that the integration tests and benchmarks can check each
// computation against its outside reference; they are hidden from the documentation and carry
// no stability promise. The supported API is the functions and re-exports of this file.
#[doc(hidden)]
pub mod analytic;
#[doc(hidden)]
pub mod assurance;
#[doc(hidden)]
pub mod cells;
#[doc(hidden)]
pub mod commands;
#[doc(hidden)]
pub mod design;
#[doc(hidden)]
pub mod engine;
#[doc(hidden)]
pub mod evaluate;
#[doc(hidden)]
pub mod figures;
#[doc(hidden)]
pub mod fit;
#[doc(hidden)]
pub mod groups;
#[doc(hidden)]
pub mod infer;
#[doc(hidden)]
pub mod model;
#[doc(hidden)]
pub mod output;
#[doc(hidden)]
pub mod phase;
#[doc(hidden)]
pub mod pilot;
#[doc(hidden)]
pub mod plan;
#[doc(hidden)]
pub mod power;
#[doc(hidden)]
pub mod progress;
#[doc(hidden)]
pub mod report;
#[doc(hidden)]
pub mod search;
#[doc(hidden)]
pub mod shard;
pub mod simulate;
#[doc(hidden)]
pub mod spacing;
#[doc(hidden)]
pub mod uncertainty;
pub mod vocab;
pub mod workload;

pub use analytic::information::{InformationError, ScenarioInformation};
pub use cells::verdict::Verdict;
pub use engine::ScenarioSummary;
pub use evaluate::RunError;
pub use fit::YesNoFit;
pub use plan::{Plan, PlanError};

/// Reads and validates a plan file (see `docs/plan-format.md`).
pub fn load_plan(path: &std::path::Path) -> Result<Plan, PlanError> {
    Plan::load(path)
}

/// Validates plan text; `path` is used only in error messages.
pub fn load_plan_text(path: &std::path::Path, text: &str) -> Result<Plan, PlanError> {
    Plan::from_str(path, text)
}

/// Simulates every scenario of `plan` (Monte Carlo, the plan's seed and experiments) and
/// returns one typed summary per design × trial count, in plan order.
pub fn run(plan: &Plan) -> Result<Vec<ScenarioSummary>, RunError> {
    evaluate::run_plan(plan, evaluate::RunOptions::default(), &|_| {})
}

/// The maximum-likelihood yes/no fit of one dataset (closed form, Gourevitch & Galanter
/// SEs of the corrected table); `None` when the counts are impossible or the rule leaves
/// the dataset without a fit.
pub fn fit_yes_no_counts(
    hits: u32,
    n_present: u32,
    false_alarms: u32,
    n_absent: u32,
    correction: vocab::RateCorrection,
) -> Option<YesNoFit> {
    fit::fit_yes_no(hits, n_present, false_alarms, n_absent, correction)
}

/// The expected information of design `design` (its index in the plan) at `trials` per
/// condition: asymptotic SEs, r(d̂′, ĉ) and the identifiability verdict, without simulating.
pub fn expected_information(
    plan: &Plan,
    design: usize,
    trials: u32,
) -> Result<ScenarioInformation, InformationError> {
    let d = plan
        .designs()
        .get(design)
        .ok_or(InformationError::NoSuchDesign { index: design })?;
    analytic::information::DesignInformation::new(plan, d)?.at(trials, false)
}
