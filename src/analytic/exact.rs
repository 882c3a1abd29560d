//! Exact sampling distribution of yes/no estimates by enumeration (Miller 1996).
//!
//! Hits and false alarms are independent binomials, so every outcome (h, f) has
//! probability P(h)·P(f); summing the same tallies as the Monte Carlo path with these
//! probabilities as weights gives the same table with no Monte Carlo error.

use crate::engine::parallel::Kernel;
use crate::engine::scenario_kernel::{Estimator, ScenarioKernel};
use crate::engine::tally::EstimateTally;

/// Largest number of (h, f) outcomes enumerated; beyond it Monte Carlo is the tool.
pub const MAX_OUTCOMES: u64 = 4_000_000;

/// Whether a scenario is small enough to enumerate.
pub fn can_enumerate(n_present: u32, n_absent: u32) -> bool {
    (u64::from(n_present) + 1) * (u64::from(n_absent) + 1) <= MAX_OUTCOMES
}

/// The exact tally of a yes/no scenario: every outcome weighted by the probability the
/// scenario's sampler gives it. `None` unless the kernel is a single yes/no table on the
/// closed-form route without tests.
pub fn enumerate(kernel: &ScenarioKernel) -> Option<EstimateTally> {
    let Estimator::YesNo(estimator) = kernel.estimator() else {
        return None;
    };
    if kernel.has_tests() {
        return None;
    }
    let mut tally = kernel.tally();
    let ph = kernel.sampler().binomial_table(0)?.pmf();
    let pf = kernel.sampler().binomial_table(1)?.pmf();
    for (h, &wh) in ph.iter().enumerate() {
        if wh == 0.0 {
            continue;
        }
        for (f, &wf) in pf.iter().enumerate() {
            let w = wh * wf;
            if w > 0.0 {
                estimator.record(h as u32, f as u32, w, &mut tally);
            }
        }
    }
    Some(tally)
}
