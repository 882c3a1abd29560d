//! Monte Carlo behind the fast views: the simulated power of a chosen design under one set
//! of assumed values (a sensitivity corner), and the assurance simulated with one study per
//! drawn set of values (the nested check of the expected-information assurance).

use super::answer::Chosen;
use crate::engine::parallel::run_chunk;
use crate::engine::{ScenarioSummary, Share};
use crate::evaluate::{RunOptions, run_scenario};
use crate::groups::GroupSummary;
use crate::groups::grid::{point_kernel, run_point, stream_key, summarise_point};
use crate::groups::setups;
use crate::groups::summary::share;
use crate::phase::Progress;
use crate::plan::{Plan, Scenario};
use rayon::prelude::*;

/// Random-stream key base of one-animal corners (apart from the run's and the search's).
pub const CORNER_STREAM_BASE: u64 = 1 << 41;
/// Random-stream key base of the nested assurance check of one-animal designs.
pub const NESTED_STREAM_BASE: u64 = 1 << 42;
/// Marks a group design's nested-check streams (below the design bits of `stream_key`).
const NESTED_GROUP_BIT: u64 = 1 << 47;

fn quiet(_: crate::phase::Event) {}

/// The scenario of design `d` at `trials`, on stream `id`.
fn scenario(plan: &Plan, d: usize, trials: u32, id: u64) -> Scenario {
    Scenario {
        id,
        design: d,
        trials,
        conditions: plan.designs()[d].condition_trials(trials),
    }
}

/// A test with no row in a summary: nothing rejected.
const MISSING: Share = Share {
    value: 0.0,
    low: 0.0,
    high: 0.0,
};

/// Two-stage rejection shares of the named group tests.
fn group_shares(summary: &GroupSummary, tests: &[String]) -> Vec<Share> {
    tests
        .iter()
        .map(|t| {
            summary
                .tests
                .iter()
                .find(|x| &x.name == t)
                .map_or(MISSING, |x| x.two_stage)
        })
        .collect()
}

/// Likelihood-ratio rejection shares of the named hypotheses.
fn scenario_shares(summary: &ScenarioSummary, tests: &[String]) -> Vec<Share> {
    tests
        .iter()
        .map(|t| {
            summary
                .tests
                .iter()
                .find(|x| &x.hypothesis == t)
                .map_or(MISSING, |x| x.likelihood_ratio)
        })
        .collect()
}

/// Simulated power of each named test of design `d` at `chosen`, with the plan's
/// experiments: two-stage for groups, likelihood-ratio for one animal.
pub fn simulated_power(
    plan: &Plan,
    d: usize,
    chosen: Chosen,
    tests: &[String],
    progress: &Progress<'_>,
) -> Result<Vec<Share>, String> {
    match chosen.animals {
        Some(animals) => {
            let all = setups(plan).map_err(|e| e.to_string())?;
            let summary = run_point(
                &all[d],
                animals,
                chosen.trials,
                plan.study().experiments,
                plan.study().seed,
                progress,
            )
            .map_err(|e| e.to_string())?;
            Ok(group_shares(&summary, tests))
        }
        None => {
            let s = scenario(plan, d, chosen.trials, CORNER_STREAM_BASE + d as u64);
            let summary = run_scenario(plan, &s, RunOptions::default(), progress)
                .map_err(|e| e.to_string())?;
            Ok(scenario_shares(&summary, tests))
        }
    }
}

/// Assurance by simulation: one study per drawn plan (`variants[i]` from draw i, on its own
/// stream), each test's rejection share with its Wilson interval. A draw whose plan or study
/// fails counts as no rejection.
pub fn nested_assurance(
    variants: &[Option<Plan>],
    d: usize,
    chosen: Chosen,
    tests: &[String],
) -> Vec<Share> {
    let rejections: Vec<Vec<bool>> = variants
        .par_iter()
        .enumerate()
        .map(|(i, v)| {
            v.as_ref()
                .and_then(|p| one_study(p, d, chosen, tests, i as u64))
                .unwrap_or_else(|| vec![false; tests.len()])
        })
        .collect();
    let n = rejections.len() as u64;
    (0..tests.len())
        .map(|t| share(rejections.iter().filter(|r| r[t]).count() as u64, n))
        .collect()
}

/// Whether one simulated study of `plan` rejects each named test.
fn one_study(plan: &Plan, d: usize, chosen: Chosen, tests: &[String], i: u64) -> Option<Vec<bool>> {
    let shares = match chosen.animals {
        Some(animals) => {
            let all = setups(plan).ok()?;
            let setup = &all[d];
            let kernel = point_kernel(setup, animals, chosen.trials).ok()?;
            let key = stream_key(d) | NESTED_GROUP_BIT | i;
            let tally = run_chunk(&*kernel, plan.study().seed, key, 1, 0);
            group_shares(&summarise_point(setup, &tally), tests)
        }
        None => {
            let one = plan.with_experiments(1).ok()?;
            let id = NESTED_STREAM_BASE + ((d as u64) << 24) + i;
            let s = scenario(&one, d, chosen.trials, id);
            let summary = run_scenario(&one, &s, RunOptions::default(), &quiet).ok()?;
            scenario_shares(&summary, tests)
        }
    };
    // One study: each share is 0 or 1.
    Some(shares.iter().map(|s| s.value > 0.5).collect())
}
