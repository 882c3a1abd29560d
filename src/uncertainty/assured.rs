//! `[assurance]` of a plan: the expected power over the uncertain assumptions at the plan's
//! answer, and (with a `target`) the cheapest design whose assurance reaches it.
//!
//! # Nested draws
//!
//! Values are drawn once per imagined study (all uncertain assumptions together, each from
//! its own truncated normal, independently). For each drawn set the power of every design
//! comes from the expected information (normal approximation), so the outer level is the
//! only Monte Carlo one: the SE of an assurance is sd(power)/√draws ≤ 0.5/√draws (2,500
//! draws for ±0.01). The approximation is then checked by simulating one study per drawn set
//! (the first `experiments` sets): the share that rejects estimates the assurance without
//! the approximation, with a binomial SE ≤ 0.5/√studies. One study per value is the
//! efficient split: more studies per value only shrink the inner variance, which is at most
//! A(1 − A)/studies in total.

use super::answer::{Chosen, Criterion, View, views};
use super::confirm::nested_assurance;
use crate::assurance::{Assurance, Prior, draw_values, summarise};
use crate::engine::Share;
use crate::groups::approximation::{group_se_df, power_beyond, t_critical};
use crate::groups::effort_search::{Candidate, MAX_ANIMALS};
use crate::phase::{Event, Phase, Progress};
use crate::plan::assumptions::{AssuranceSpec, Uncertain};
use crate::plan::{Plan, PlanError};
use crate::search::asymptotic_power;
use rayon::prelude::*;
use serde::Serialize;

/// Stream of the drawn values (apart from every simulation stream: it feeds no kernel).
const VALUES_KEY: u64 = 0xA55E_55ED_0000_0001;
/// Most candidate trial counts the assurance search evaluates per design.
const MAX_COUNTS: usize = 80;

/// One test's assurance at one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TestAssurance {
    pub name: String,
    pub target: Option<f64>,
    pub assurance: Assurance,
}

/// A design with its assurance, approximate and simulated.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AssuredPoint {
    pub chosen: Chosen,
    pub cost: Option<f64>,
    pub tests: Vec<TestAssurance>,
    /// Per test, the share of simulated studies (one per drawn set of values) that reject.
    pub simulated: Vec<Share>,
    pub studies: u64,
}

impl AssuredPoint {
    /// The weakest test's approximate assurance.
    pub fn weakest(&self) -> f64 {
        self.tests
            .iter()
            .map(|t| t.assurance.value)
            .fold(f64::INFINITY, f64::min)
    }
}

/// The assurance of one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignAssurance {
    pub design: String,
    pub criterion: Criterion,
    /// At the answer the plan's own values give (the power search's answer).
    pub at_plan_answer: Option<AssuredPoint>,
    /// The cheapest design whose every test reaches the assurance target.
    pub assured: Option<AssuredPoint>,
    /// Why there is no assured design although a target is set.
    pub note: Option<String>,
}

/// The assurance of a plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AssuranceReport {
    pub draws: usize,
    pub target: Option<f64>,
    pub uncertain: Vec<Uncertain>,
    /// Drawn sets the plan format refused (left out of every assurance).
    pub failed_draws: usize,
    /// The plan's `[budget]` total, which an assured design may exceed (the report says so).
    pub budget_total: Option<f64>,
    pub designs: Vec<DesignAssurance>,
}

/// The prior of one uncertain assumption.
pub fn prior(u: &Uncertain) -> Prior {
    Prior::truncated_normal(u.plan_value, u.sd, u.low, u.high)
        .expect("validated with the plan: finite SD, range holding the value")
}

/// The plan variant of every drawn set of values (`None`: refused).
pub fn variants(plan: &Plan, spec: &AssuranceSpec) -> Vec<Option<Plan>> {
    let priors: Vec<Prior> = spec.uncertain.iter().map(prior).collect();
    let values = draw_values(&priors, spec.draws, plan.study().seed ^ VALUES_KEY);
    values
        .par_iter()
        .map(|v| {
            let set: Vec<_> = spec
                .uncertain
                .iter()
                .map(|u| &u.key)
                .zip(v.iter().copied())
                .collect();
            plan.with_values(&set).ok()
        })
        .collect()
}

/// Runs the assurance of every design the plan plans for.
pub fn assurance(
    plan: &Plan,
    spec: &AssuranceSpec,
    progress: &Progress<'_>,
) -> Result<AssuranceReport, PlanError> {
    let variants = variants(plan, spec);
    let failed_draws = variants.iter().filter(|v| v.is_none()).count();
    let variant_views = drawn_views(&variants);
    let studies = studies(plan, &variants);
    let mut designs = Vec::new();
    for (d, view) in views(plan).iter().enumerate() {
        let Some(view) = view else { continue };
        progress(Event::Start(Phase::Assumptions {
            design: plan.designs()[d].name.clone(),
        }));
        let per_draw = of_design(&variant_views, d);
        let point = |chosen: Chosen| point_at(view, &per_draw, &variants[..studies], d, chosen);
        let at_plan_answer = view.answer().map(|a| point(a.chosen));
        let (assured, note) = match spec.target {
            None => (None, None),
            Some(target) => match search(plan, d, view, &per_draw, target) {
                Some(chosen) => (Some(point(chosen)), None),
                None => (
                    None,
                    Some(format!(
                        "no design up to {} reaches an assurance of {target}",
                        match view {
                            View::Group { .. } => format!("{MAX_ANIMALS} animals"),
                            View::Single { .. } =>
                                format!("{} trials per condition", plan.study().max_trials),
                        }
                    )),
                ),
            },
        };
        designs.push(DesignAssurance {
            design: plan.designs()[d].name.clone(),
            criterion: view.criterion(),
            at_plan_answer,
            assured,
            note,
        });
    }
    Ok(AssuranceReport {
        draws: spec.draws,
        target: spec.target,
        uncertain: spec.uncertain.clone(),
        failed_draws,
        budget_total: plan.budget().and_then(|b| b.total),
        designs,
    })
}

/// The assurance of design `d` at `chosen`: per test, over the drawn views, and simulated
/// with one study per plan in `simulate`.
fn point_at(
    view: &View,
    per_draw: &[Option<&View>],
    simulate: &[Option<Plan>],
    d: usize,
    chosen: Chosen,
) -> AssuredPoint {
    let tests = view.tests();
    let names: Vec<String> = tests.iter().map(|(n, _)| n.clone()).collect();
    let point_power = view.power_at(chosen);
    let powers: Vec<Vec<f64>> = per_draw
        .par_iter()
        .map(|v| v.map_or(Vec::new(), |v| v.power_at(chosen)))
        .collect();
    let tests = tests
        .into_iter()
        .enumerate()
        .filter_map(|(t, (name, target))| {
            let a = summarise(
                point_power.get(t).copied().unwrap_or(f64::NAN),
                powers.iter().map(|p| p.get(t).copied()),
            )?;
            Some(TestAssurance {
                name,
                target,
                assurance: a,
            })
        })
        .collect();
    AssuredPoint {
        chosen,
        cost: view.cost(chosen.animals.unwrap_or(0), chosen.trials),
        tests,
        simulated: nested_assurance(simulate, d, chosen, &names),
        studies: simulate.len() as u64,
    }
}

/// The assurance of design `d` of `plan` at `chosen` under `spec` (`None` when the plan
/// plans nothing for the design).
pub fn assurance_at(
    plan: &Plan,
    spec: &AssuranceSpec,
    d: usize,
    chosen: Chosen,
) -> Option<AssuredPoint> {
    let variants = variants(plan, spec);
    let all = drawn_views(&variants);
    let base = views(plan);
    let view = base.get(d)?.as_ref()?;
    let studies = studies(plan, &variants);
    Some(point_at(
        view,
        &of_design(&all, d),
        &variants[..studies],
        d,
        chosen,
    ))
}

/// The views of every drawn plan (`None` for a refused draw).
fn drawn_views(variants: &[Option<Plan>]) -> Vec<Option<Vec<Option<View<'_>>>>> {
    variants.par_iter().map(|v| v.as_ref().map(views)).collect()
}

/// Design `d`'s view in each drawn plan.
fn of_design<'a, 'p>(
    all: &'a [Option<Vec<Option<View<'p>>>>],
    d: usize,
) -> Vec<Option<&'a View<'p>>> {
    all.iter()
        .map(|vs| vs.as_ref().and_then(|vs| vs[d].as_ref()))
        .collect()
}

/// Drawn sets that also get one simulated study each: the first `experiments`.
fn studies(plan: &Plan, variants: &[Option<Plan>]) -> usize {
    (plan.study().experiments as usize).min(variants.len())
}

/// The cheapest design (fewest animals when nothing costs) whose every test's assurance
/// reaches `target`.
fn search(
    plan: &Plan,
    d: usize,
    view: &View,
    per_draw: &[Option<&View>],
    target: f64,
) -> Option<Chosen> {
    match view {
        View::Single { .. } => {
            let tests = view.tests().len();
            let meets = |n: u32| {
                let powers: Vec<Vec<f64>> = per_draw
                    .par_iter()
                    .map(|v| v.map_or(Vec::new(), |v| asymptotic_power(v.plan(), d, n)))
                    .collect();
                (0..tests).all(|t| {
                    summarise(0.0, powers.iter().map(|p| p.get(t).copied()))
                        .is_some_and(|a| a.value >= target)
                })
            };
            let max = plan.study().max_trials;
            if !meets(max) {
                return None;
            }
            let (mut lo, mut hi) = (1u32, max);
            while hi - lo > 1 {
                let mid = lo + (hi - lo) / 2;
                if meets(mid) { hi = mid } else { lo = mid }
            }
            Some(Chosen {
                animals: None,
                trials: hi,
            })
        }
        View::Group { .. } => group_search(view, per_draw, target),
    }
}

/// Groups: at every candidate trial count the fewest animals whose mean power over the
/// draws reaches `target` for every test (bisection: each draw's power rises with animals),
/// then the cheapest of those (the fewest animals when nothing costs).
fn group_search(view: &View, per_draw: &[Option<&View>], target: f64) -> Option<Chosen> {
    let View::Group { setup, goals, .. } = view else {
        return None;
    };
    let mut counts: Vec<u32> = view.candidates().iter().map(|c| c.trials).collect();
    if counts.len() > MAX_COUNTS {
        let step = counts.len().div_ceil(MAX_COUNTS);
        let last = *counts.last()?;
        counts = counts.into_iter().step_by(step).collect();
        if counts.last() != Some(&last) {
            counts.push(last);
        }
    }
    // Per draw, its candidates at the counts (a draw without one counts as power 0).
    let table: Vec<Vec<Option<Candidate>>> = per_draw
        .par_iter()
        .map(|v| {
            let mine = v.map_or(Vec::new(), |v| v.candidates());
            counts
                .iter()
                .map(|n| mine.iter().find(|c| c.trials == *n).cloned())
                .collect()
        })
        .collect();
    let alpha = setup.plan.study().alpha;
    let draws = per_draw.len() as f64;
    let meets = |j: usize, animals: u32| {
        goals.tests.iter().enumerate().all(|(t, &i)| {
            let test = &setup.tests[i];
            let Some((_, df)) = group_se_df(test, animals, 1.0) else {
                return false;
            };
            let crit = t_critical(test.sided, alpha, df);
            let total: f64 = table
                .iter()
                .filter_map(|row| row[j].as_ref())
                .map(|c| {
                    let (delta, v) = c.tests[t];
                    group_se_df(test, animals, v).map_or(0.0, |(se, _)| {
                        if se > 0.0 {
                            power_beyond(delta / se, crit, test.sided)
                        } else {
                            0.0
                        }
                    })
                })
                .sum();
            total / draws >= target
        })
    };
    let min_animals = view.min_animals();
    let fewest: Vec<(u32, u32)> = (0..counts.len())
        .into_par_iter()
        .filter_map(|j| {
            if !meets(j, MAX_ANIMALS) {
                return None;
            }
            if meets(j, min_animals) {
                return Some((counts[j], min_animals));
            }
            let (mut lo, mut hi) = (min_animals, MAX_ANIMALS);
            while hi - lo > 1 {
                let mid = lo + (hi - lo) / 2;
                if meets(j, mid) { hi = mid } else { lo = mid }
            }
            Some((counts[j], hi))
        })
        .collect();
    let cost = |&(n, a): &(u32, u32)| view.cost(a, n);
    let best = fewest.iter().min_by(|x, y| match (cost(x), cost(y)) {
        (Some(cx), Some(cy)) => cx.total_cmp(&cy).then(x.1.cmp(&y.1)),
        _ => x.1.cmp(&y.1).then(x.0.cmp(&y.0)),
    })?;
    Some(Chosen {
        animals: Some(best.1),
        trials: best.0,
    })
}
