//! How much work a run asks for, estimated before it starts, and the documented limit.
//!
//! The work is counted in datasets (one simulated table, fitted once): every scenario's
//! experiments, and with `[animals]` every animal of every simulated group study (the
//! grid, and the effort split's rows at the most animals a row can hold). Datasets cost
//! very different amounts on different routes — a closed-form yes/no fit takes well under
//! a microsecond, a general Newton fit of a table that never converges hundreds of times
//! more — so a run of more than [`UNTIMED_DATASETS`] is timed first: a pilot of
//! [`PILOT_EXPERIMENTS`] experiments of every scenario gives each design's seconds per
//! dataset on this machine, and the estimate is Σ datasets × that cost.
//!
//! A run estimated above [`LIMIT_SECONDS`] is refused unless the user confirms it
//! (`vigil run --allow-long-run`); one above [`NOTE_SECONDS`] is announced. The pilot's
//! results are discarded, so outputs do not depend on it.

use crate::evaluate::{self, RunOptions};
use crate::plan::Plan;
use std::time::Instant;

/// Runs of at most this many datasets start without a pilot (a few minutes at the very
/// worst, a second or two usually).
pub const UNTIMED_DATASETS: u64 = 100_000;
/// Experiments per scenario of the timing pilot.
pub const PILOT_EXPERIMENTS: u64 = 256;
/// Experiments of the group-study pilot.
pub const GROUP_PILOT_EXPERIMENTS: u64 = 2;
/// Estimated run time above which `vigil run` refuses without `--allow-long-run` (20 minutes).
pub const LIMIT_SECONDS: f64 = 1200.0;
/// Estimated run time above which `vigil run` says how long it will take (2 minutes).
pub const NOTE_SECONDS: f64 = 120.0;

/// The work a run asks for.
#[derive(Debug, Clone, PartialEq)]
pub struct Workload {
    /// Datasets the run simulates and fits (an upper estimate for the effort split).
    pub datasets: u64,
    /// The experiments per scenario the plan (or `--experiments`) asks for; a precision
    /// run's ceiling.
    pub experiments: u64,
    /// Estimated seconds on this machine, when the run was large enough to be timed.
    pub seconds: Option<f64>,
}

impl Workload {
    /// Whether the run needs the user's confirmation.
    pub fn over_limit(&self) -> bool {
        self.seconds.is_some_and(|s| s > LIMIT_SECONDS)
    }

    /// Whether the run is long enough to announce.
    pub fn worth_noting(&self) -> bool {
        self.seconds.is_some_and(|s| s > NOTE_SECONDS)
    }
}

/// Datasets of the scenarios (per design) and of the group studies (in all).
fn datasets(plan: &Plan, options: RunOptions) -> (Vec<u64>, u64) {
    let mut by_design = vec![0u64; plan.designs().len()];
    let mut groups = 0u64;
    if !options.exact {
        let most = evaluate::most_experiments(plan);
        for s in plan.scenarios() {
            // A precision run is counted at its ceiling: the most it can do.
            by_design[s.design] = by_design[s.design].saturating_add(most);
        }
        if plan.animals().is_some() {
            groups = crate::groups::animal_datasets_by_design(plan)
                .into_iter()
                .fold(0u64, u64::saturating_add);
        }
    }
    (by_design, groups)
}

/// Estimates the work of `plan`, timing pilots when it is large: each scenario's kernel,
/// and the group studies run whole at [`GROUP_PILOT_EXPERIMENTS`] experiments (their
/// effort split decides its rows from the results, so only running it tells its cost).
pub fn estimate(plan: &Plan, options: RunOptions) -> Workload {
    let (by_design, groups) = datasets(plan, options);
    let scenario_datasets = by_design.iter().fold(0u64, |a, &b| a.saturating_add(b));
    let datasets = scenario_datasets.saturating_add(groups);
    let experiments = evaluate::most_experiments(plan);
    if datasets <= UNTIMED_DATASETS {
        return Workload {
            datasets,
            experiments,
            seconds: None,
        };
    }
    let mut seconds = 0.0;
    if scenario_datasets > UNTIMED_DATASETS {
        let mut cost = vec![(0.0f64, 0u64); plan.designs().len()];
        for s in plan.scenarios() {
            if let Some(c) = pilot_cost(plan, &s, options) {
                cost[s.design].0 += c;
                cost[s.design].1 += 1;
            }
        }
        seconds += by_design
            .iter()
            .zip(&cost)
            .map(|(&n, &(t, k))| if k == 0 { 0.0 } else { n as f64 * t / k as f64 })
            .sum::<f64>();
    }
    if groups > UNTIMED_DATASETS
        && let Ok(pilot) =
            plan.with_experiments(GROUP_PILOT_EXPERIMENTS.min(plan.study().experiments))
    {
        let start = Instant::now();
        let _ = crate::groups::run_groups(&pilot, &|_| {});
        let per_experiment = start.elapsed().as_secs_f64() / pilot.study().experiments as f64;
        // Group studies run the plan's `experiments`, precision stop or not.
        seconds += per_experiment * plan.study().experiments as f64;
    }
    Workload {
        datasets,
        experiments,
        seconds: Some(seconds),
    }
}

/// Seconds per dataset of one scenario on this machine: the marginal cost between a pilot of
/// [`PILOT_EXPERIMENTS`] and one of 9 × as many (so the kernel's set-up is not counted per
/// dataset), or the small pilot alone when it already took long (a slow route).
fn pilot_cost(plan: &Plan, s: &crate::plan::Scenario, options: RunOptions) -> Option<f64> {
    let time = |k: u64| -> Option<f64> {
        let pilot = plan.with_experiments(k).ok()?;
        let start = Instant::now();
        // Errors surface in the real run; the pilot only times.
        let _ = evaluate::simulate_scenario(&pilot, s, options, &|_| {});
        Some(start.elapsed().as_secs_f64())
    };
    let small = time(PILOT_EXPERIMENTS)?;
    if small > 0.25 {
        return Some(small / PILOT_EXPERIMENTS as f64);
    }
    let large = time(9 * PILOT_EXPERIMENTS)?;
    Some((large - small).max(0.0) / (8 * PILOT_EXPERIMENTS) as f64)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_runs_are_not_timed() {
        let text = "[study]\ntitle = \"t\"\nseed = 1\nexperiments = 100\n[observer]\nd_prime = 1\n\
                    criterion = 0\n[[design]]\nname = \"d\"\npresence = 0.5\ntrials = [20, 40]\n";
        let plan = crate::plan::Plan::from_str(std::path::Path::new("t.toml"), text).unwrap();
        let w = estimate(&plan, RunOptions::default());
        assert_eq!(w.datasets, 200);
        assert_eq!(w.seconds, None);
        assert!(!w.over_limit());
    }
}
