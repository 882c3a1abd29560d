//! `[sensitivity]`: how the answer moves when one assumption moves, the others held at the
//! plan's values. Every listed value is swept under the expected information (fast); the
//! lowest and highest value of each assumption (the corners) are confirmed by Monte Carlo at
//! the answer the approximation gives there.

use super::answer::{Answer, Chosen, Criterion, views};
use super::confirm::simulated_power;
use crate::engine::Share;
use crate::phase::{Event, Phase, Progress};
use crate::plan::assumptions::Sweep;
use crate::plan::{Plan, PlanError};
use serde::Serialize;

/// One value of one assumption.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SweepPoint {
    pub value: f64,
    /// The answer with this value (`None`: the targets are out of reach).
    pub answer: Option<Answer>,
    /// Approximate power of each driving test at the plan's own answer, with this value.
    pub power_at_plan_answer: Vec<f64>,
}

/// A corner confirmed by simulation: the approximate answer there and its simulated power.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Corner {
    pub value: f64,
    pub chosen: Chosen,
    /// Per driving test (two-stage for groups, likelihood-ratio for one animal).
    pub power: Vec<Share>,
    pub experiments: u64,
    /// Whether every simulated power reaches its target (`None` without targets).
    pub meets_targets: Option<bool>,
}

/// One assumption swept for one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AssumptionSweep {
    pub key: String,
    pub label: String,
    pub plan_value: f64,
    pub points: Vec<SweepPoint>,
    pub corners: Vec<Corner>,
    /// Largest minus smallest headline (cost, animals or trials) over the values, as a share
    /// of the plan's own; infinite when some value puts the targets out of reach.
    pub spread: f64,
}

/// The sensitivity of one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignSensitivity {
    pub design: String,
    pub criterion: Criterion,
    /// Driving tests with their power targets.
    pub tests: Vec<(String, Option<f64>)>,
    /// The answer at the plan's values.
    pub plan_answer: Option<Answer>,
    pub sweeps: Vec<AssumptionSweep>,
    /// Index into `sweeps` of the assumption the answer depends on most.
    pub most_influential: Option<usize>,
}

/// The sensitivity of every design the plan plans for.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SensitivityReport {
    pub designs: Vec<DesignSensitivity>,
}

/// Runs the sweep and its corners.
pub fn sensitivity(
    plan: &Plan,
    sweeps: &[Sweep],
    progress: &Progress<'_>,
) -> Result<SensitivityReport, PlanError> {
    // Variant plans, one per swept value (validated when the plan was read).
    let variants: Vec<Vec<Plan>> = sweeps
        .iter()
        .map(|s| {
            s.values
                .iter()
                .map(|&v| plan.with_values(&[(&s.key, v)]))
                .collect::<Result<Vec<_>, _>>()
        })
        .collect::<Result<_, _>>()?;
    let base_views = views(plan);
    let variant_views: Vec<Vec<_>> = variants
        .iter()
        .map(|vs| vs.iter().map(views).collect())
        .collect();
    let mut designs = Vec::new();
    for (d, view) in base_views.iter().enumerate() {
        let Some(view) = view else { continue };
        let design = plan.designs()[d].name.clone();
        progress(Event::Start(Phase::Assumptions {
            design: design.clone(),
        }));
        let tests = view.tests();
        let names: Vec<String> = tests.iter().map(|(n, _)| n.clone()).collect();
        let plan_answer = view.answer();
        let mut out = Vec::new();
        for (s, sweep) in sweeps.iter().enumerate() {
            let points: Vec<SweepPoint> = sweep
                .values
                .iter()
                .enumerate()
                .map(|(k, &value)| {
                    let v = variant_views[s][k][d].as_ref();
                    SweepPoint {
                        value,
                        answer: v.and_then(|v| v.answer()),
                        power_at_plan_answer: match (v, &plan_answer) {
                            (Some(v), Some(a)) => v.power_at(a.chosen),
                            _ => Vec::new(),
                        },
                    }
                })
                .collect();
            let mut corners = Vec::new();
            for k in [0, sweep.values.len() - 1] {
                let Some(answer) = &points[k].answer else {
                    continue;
                };
                let variant = &variants[s][k];
                progress(Event::Planned(variant.study().experiments));
                let power = simulated_power(variant, d, answer.chosen, &names, progress)
                    .map_err(|e| corner_error(plan, sweep, points[k].value, e))?;
                let meets_targets = tests.iter().any(|(_, t)| t.is_some()).then(|| {
                    power
                        .iter()
                        .zip(&tests)
                        .all(|(p, (_, t))| t.is_none_or(|t| p.value >= t))
                });
                corners.push(Corner {
                    value: points[k].value,
                    chosen: answer.chosen,
                    power,
                    experiments: variant.study().experiments,
                    meets_targets,
                });
            }
            out.push(AssumptionSweep {
                key: sweep.key.dotted(),
                label: sweep.key.label(),
                plan_value: sweep.plan_value,
                spread: spread(&points, plan_answer.as_ref()),
                points,
                corners,
            });
        }
        let most_influential = most_influential(&out);
        designs.push(DesignSensitivity {
            design,
            criterion: view.criterion(),
            tests,
            plan_answer,
            sweeps: out,
            most_influential,
        });
    }
    Ok(SensitivityReport { designs })
}

fn corner_error(plan: &Plan, sweep: &Sweep, value: f64, problem: String) -> PlanError {
    PlanError {
        file: plan.source().to_path_buf(),
        line: None,
        key: format!("sensitivity.{}", sweep.key.dotted()),
        problem: format!(
            "the simulation at {} = {value} failed: {problem}",
            sweep.key.dotted()
        ),
        allowed: String::new(),
    }
}

/// (largest − smallest headline) / the plan's headline; infinite when a value has no answer.
fn spread(points: &[SweepPoint], plan: Option<&Answer>) -> f64 {
    let Some(plan) = plan else { return 0.0 };
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for p in points {
        match &p.answer {
            Some(a) => {
                lo = lo.min(a.headline());
                hi = hi.max(a.headline());
            }
            None => return f64::INFINITY,
        }
    }
    (hi - lo) / plan.headline().max(f64::MIN_POSITIVE)
}

/// The sweep with the largest spread; ties broken by the spread of the power at the plan's
/// answer. `None` when nothing moves.
fn most_influential(sweeps: &[AssumptionSweep]) -> Option<usize> {
    let power_spread = |s: &AssumptionSweep| {
        let w: Vec<f64> = s
            .points
            .iter()
            .filter_map(|p| p.power_at_plan_answer.iter().copied().reduce(f64::min))
            .collect();
        w.iter().copied().fold(f64::NEG_INFINITY, f64::max)
            - w.iter().copied().fold(f64::INFINITY, f64::min)
    };
    let best = (0..sweeps.len()).max_by(|&i, &k| {
        sweeps[i]
            .spread
            .total_cmp(&sweeps[k].spread)
            .then(power_spread(&sweeps[i]).total_cmp(&power_spread(&sweeps[k])))
            .then(k.cmp(&i))
    })?;
    (sweeps[best].spread > 0.0 || power_spread(&sweeps[best]) > 0.0).then_some(best)
}
