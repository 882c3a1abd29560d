//! Honest uncertainty about the assumed values: how the answer moves with each assumption
//! (`[sensitivity]`) and the expected power over their uncertainty (`[assurance]`).
//!
//! Both rest on fast expected-information views of every design ([`answer`]) and confirm
//! them by Monte Carlo ([`confirm`]).

pub mod answer;
pub mod assured;
pub mod confirm;
pub mod sweep;

pub use answer::{Answer, Chosen, Criterion};
pub use assured::AssuranceReport;
pub use sweep::SensitivityReport;

use crate::phase::Progress;
use crate::plan::{Plan, PlanError};
use serde::Serialize;

/// What the two sections found (each `None` when the plan lacks it).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyReport {
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sensitivity: Option<SensitivityReport>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub assurance: Option<AssuranceReport>,
}

/// Runs the plan's `[sensitivity]` and `[assurance]`; `None` when it has neither.
pub fn run(plan: &Plan, progress: &Progress<'_>) -> Result<Option<UncertaintyReport>, PlanError> {
    if plan.sensitivity().is_none() && plan.assurance().is_none() {
        return Ok(None);
    }
    let sensitivity = plan
        .sensitivity()
        .map(|s| sweep::sensitivity(plan, &s.sweeps, progress))
        .transpose()?;
    let assurance = plan
        .assurance()
        .map(|a| assured::assurance(plan, a, progress))
        .transpose()?;
    Ok(Some(UncertaintyReport {
        sensitivity,
        assurance,
    }))
}
