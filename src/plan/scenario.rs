//! Expansion of a plan into scenarios: one per design × trial count, numbers resolved.

use super::Plan;
use crate::design::ConditionTrials;
use serde::Serialize;

/// One simulated experiment setting: a design at one trial count.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scenario {
    /// Position in plan order; part of every replicate's random-stream key.
    pub id: u64,
    /// Index of the design in the plan.
    pub design: usize,
    /// Total trials per condition.
    pub trials: u32,
    /// Every condition's present and absent trials and true values, in plan order.
    pub conditions: Vec<ConditionTrials>,
}

/// All scenarios of a plan, designs in plan order, trial counts increasing.
pub fn expand(plan: &Plan) -> Vec<Scenario> {
    let mut out = Vec::new();
    for (d, design) in plan.designs.iter().enumerate() {
        for &trials in &design.trials {
            out.push(Scenario {
                id: out.len() as u64,
                design: d,
                trials,
                conditions: design.condition_trials(trials),
            });
        }
    }
    out
}
