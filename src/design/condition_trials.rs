//! Every condition of a design at one trial count, as it is simulated: its present and
//! absent trials and its true values. Reports read them from here, so a multi-condition
//! design shows each condition's split and criterion, not the first condition's.

use super::{Design, RecordKind, split_trials};
use serde::Serialize;

/// Whether a condition's present and absent trials are fixed by the design.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum TrialCounts {
    /// A full record: the experimenter fixes how many trials hold the stimulus.
    Fixed,
    /// Error or response totals: each encounter holds the stimulus with probability
    /// `presence`, so present and absent are the expected split (rounded as a fixed one).
    Expected,
}

/// One condition of a scenario.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConditionTrials {
    pub name: String,
    /// Share of trials (or encounters) with the stimulus present.
    pub presence: f64,
    /// True sensitivity and criterion (c at the yes/no boundary) in this condition.
    pub d_prime: f64,
    pub criterion: f64,
    /// Present and absent trials (fixed or expected, see `counts`); they sum to the
    /// scenario's trials.
    pub present: u32,
    pub absent: u32,
    pub counts: TrialCounts,
}

impl Design {
    /// Every condition at `trials` trials (or encounters) per condition, in plan order.
    pub fn condition_trials(&self, trials: u32) -> Vec<ConditionTrials> {
        let counts = match self.record {
            RecordKind::Full | RecordKind::TwoChoice => TrialCounts::Fixed,
            RecordKind::ErrorTotals | RecordKind::ResponseTotals => TrialCounts::Expected,
        };
        self.conditions
            .iter()
            .map(|c| {
                let split = split_trials(trials, c.presence);
                ConditionTrials {
                    name: c.name.clone(),
                    presence: c.presence,
                    d_prime: c.d_prime,
                    criterion: c.criterion,
                    present: split.present,
                    absent: split.absent,
                    counts,
                }
            })
            .collect()
    }
}
