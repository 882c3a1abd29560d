//! The smallest trial count per condition that meets every target, design by design.
//!
//! 1. Bracket: the expected information gives each target's asymptotic requirement (the
//!    normal-approximation power of the Wald test, z·SE for half-widths, the asymptotic
//!    correlation); the largest is the starting guess.
//! 2. Confirm: Monte Carlo at integer trial counts, stepping geometrically until one count
//!    fails and one passes, then bisecting to adjacent counts. Every evaluated count uses
//!    the same random-stream key (common random numbers), so the simulated power curve is
//!    monotone up to Monte Carlo error and the answer is reproducible for a seed.
//! 3. Report: the count, the target that binds, its Monte Carlo value with a Wilson
//!    interval, and a ± band in trials translating the Monte Carlo SE of the binding power
//!    through the local slope of the asymptotic power curve.
//!
//! The Monte Carlo decision uses the likelihood-ratio test (the default: its rejection rate
//! stays closer to α at small counts than the Wald test's; both are reported).

use crate::design::goals::{Hypothesis, TestKind};
use crate::design::{Design, split_trials};
use crate::engine::Contrast;
use crate::engine::{ScenarioSummary, Share};
use crate::evaluate::{RunError, RunOptions, run_scenario};
use crate::phase::{Event, Phase, Progress};
use crate::plan::{Plan, Scenario};
use crate::power::asymptotic::{self, AsymptoticPoint};
use crate::power::contrast;
use crate::vocab::Quantity;
use serde::Serialize;

/// Random-stream key base for search evaluations (distinct from `vigil run` scenario ids).
pub const SEARCH_STREAM_BASE: u64 = 1 << 40;

/// One target as the search sees it.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Target {
    Power { hypothesis: String, at_least: f64 },
    HalfWidth { quantity: Quantity, at_most: f64 },
    Correlation { at_most: f64 },
}

impl Target {
    pub fn describe(&self) -> String {
        match self {
            Target::Power {
                hypothesis,
                at_least,
            } => format!("power ≥ {at_least} for \"{hypothesis}\""),
            Target::HalfWidth { quantity, at_most } => {
                format!("half-width of {} ≤ {at_most}", quantity.label())
            }
            Target::Correlation { at_most } => format!("|r(d̂′, ĉ)| ≤ {at_most}"),
        }
    }
}

/// A target's Monte Carlo value at the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TargetValue {
    pub target: Target,
    pub value: f64,
    /// Wilson interval for power; ± Monte Carlo SE bounds for the others.
    pub low: f64,
    pub high: f64,
    pub met: bool,
}

/// What the search found for one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "outcome", rename_all = "kebab-case")]
pub enum SearchOutcome {
    Found {
        trials: u32,
        /// ± trials of Monte Carlo uncertainty around the answer.
        band: u32,
        binding: Target,
        values: Vec<TargetValue>,
        /// Where the expected information put the answer.
        asymptotic_trials: Option<u32>,
        evaluations: u32,
    },
    NotReached {
        max_trials: u32,
        reasons: Vec<String>,
    },
    /// The plan sets no target this design can be judged on.
    NoTargets,
}

/// One Monte Carlo evaluation of the search: a trial count and every target's value there.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SearchPoint {
    /// Trials per condition.
    pub trials: u32,
    pub values: Vec<TargetValue>,
    /// Whether every target is met at this count.
    pub met: bool,
}

/// The search result of one design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SearchResult {
    pub design: String,
    pub outcome: SearchOutcome,
    /// Every Monte Carlo evaluation, in the order the search made them (the answer's among
    /// them); empty when the design has no targets.
    pub evaluated: Vec<SearchPoint>,
}

/// Targets applying to a design, with the contrasts behind its power targets.
fn targets_for<'a>(
    plan: &'a Plan,
    design: &Design,
) -> (Vec<Target>, Vec<(Contrast, &'a Hypothesis)>) {
    let mut targets = Vec::new();
    let mut contrasts = Vec::new();
    if let Some(model) = asymptotic::analysis_model(plan, design, design.trials[0]) {
        for h in plan
            .hypotheses()
            .iter()
            .filter(|h| h.kind != TestKind::GroupDifference)
        {
            let Some(p) = h.power.or(plan.targets().power) else {
                continue;
            };
            if let Some(c) = contrast(plan, design, &model, h) {
                targets.push(Target::Power {
                    hypothesis: h.name.clone(),
                    at_least: p,
                });
                contrasts.push((c, h));
            }
        }
    }
    for &(quantity, at_most) in &plan.targets().half_width {
        targets.push(Target::HalfWidth { quantity, at_most });
    }
    if let Some(at_most) = plan.targets().max_correlation {
        targets.push(Target::Correlation { at_most });
    }
    (targets, contrasts)
}

/// Smallest count ≥ 2 whose present/absent split is valid in every condition.
fn smallest_valid(design: &Design) -> u32 {
    (2..)
        .find(|&n| {
            !design.record.fixes_rows()
                || design.conditions.iter().all(|c| {
                    let s = split_trials(n, c.presence);
                    s.present > 0 && s.absent > 0
                })
        })
        .unwrap_or(2)
}

fn asymptotic_meets(p: &AsymptoticPoint, targets: &[Target]) -> bool {
    let (mut power, mut width) = (p.power.iter(), p.half_width.iter());
    targets.iter().all(|t| match t {
        Target::Power { at_least, .. } => power.next().is_some_and(|x| x >= at_least),
        Target::HalfWidth { at_most, .. } => width.next().is_some_and(|x| x <= at_most),
        Target::Correlation { at_most } => p.correlation.is_some_and(|r| r <= *at_most),
    })
}

/// Monte Carlo values of every target at a count.
fn evaluate(
    plan: &Plan,
    d: usize,
    trials: u32,
    targets: &[Target],
    progress: &Progress<'_>,
) -> Result<Vec<TargetValue>, RunError> {
    let scenario = Scenario {
        id: SEARCH_STREAM_BASE + d as u64,
        design: d,
        trials,
        conditions: plan.designs()[d].condition_trials(trials),
    };
    let s = run_scenario(plan, &scenario, RunOptions::default(), progress)?;
    Ok(targets.iter().map(|t| value(&s, t)).collect())
}

fn value(s: &ScenarioSummary, t: &Target) -> TargetValue {
    let share = |sh: &Share, at_least: f64| TargetValue {
        target: t.clone(),
        value: sh.value,
        low: sh.low,
        high: sh.high,
        met: sh.value >= at_least,
    };
    match t {
        Target::Power {
            hypothesis,
            at_least,
        } => match s.tests.iter().find(|x| &x.hypothesis == hypothesis) {
            Some(x) => share(&x.likelihood_ratio, *at_least),
            None => share(
                &Share {
                    value: 0.0,
                    low: 0.0,
                    high: 0.0,
                },
                *at_least,
            ),
        },
        Target::HalfWidth { quantity, at_most } => {
            let worst = s
                .quantities
                .iter()
                .filter(|q| q.quantity == *quantity)
                .max_by(|a, b| a.mean_width.value.total_cmp(&b.mean_width.value));
            match worst {
                Some(q) => {
                    let (v, e) = (q.mean_width.value / 2.0, q.mean_width.mc_se / 2.0);
                    TargetValue {
                        target: t.clone(),
                        value: v,
                        low: v - e,
                        high: v + e,
                        met: v <= *at_most,
                    }
                }
                None => TargetValue {
                    target: t.clone(),
                    value: f64::NAN,
                    low: f64::NAN,
                    high: f64::NAN,
                    met: false,
                },
            }
        }
        Target::Correlation { at_most } => {
            let (r, e) = (s.correlation.value.abs(), s.correlation.mc_se);
            TargetValue {
                target: t.clone(),
                value: r,
                low: r - e,
                high: r + e,
                met: r <= *at_most,
            }
        }
    }
}

/// The smallest count meeting every target under the expected information: a geometric grid
/// from the smallest valid count to `max_trials`, refined by bisection (`None`: not reached).
fn asymptotic_smallest(
    plan: &Plan,
    design: &Design,
    targets: &[Target],
    contrasts: &[(Contrast, &Hypothesis)],
    half_widths: &[(Quantity, f64)],
) -> Option<u32> {
    let lo_valid = smallest_valid(design);
    let max = plan.study().max_trials.max(lo_valid);
    let meets = |n: u32| {
        asymptotic::at(plan, design, n, contrasts, half_widths)
            .is_some_and(|p| asymptotic_meets(&p, targets))
    };
    let mut last_fail = lo_valid.saturating_sub(1);
    let mut n = lo_valid;
    loop {
        if meets(n) {
            let (mut lo, mut hi) = (last_fail, n);
            while hi - lo > 1 {
                let mid = lo + (hi - lo) / 2;
                if meets(mid) { hi = mid } else { lo = mid }
            }
            return Some(hi);
        }
        if n >= max {
            return None;
        }
        last_fail = n;
        n = ((f64::from(n) * 1.25).ceil() as u32).min(max);
    }
}

/// The expected-information view of one design's search: the smallest count meeting every
/// target (`None`: not reached by `max_trials`) and the power of each power target there.
#[derive(Debug, Clone, PartialEq)]
pub struct AsymptoticAnswer {
    pub trials: Option<u32>,
    /// The hypotheses with a power target, in plan order, with their targets.
    pub hypotheses: Vec<(String, f64)>,
}

/// The asymptotic answer of design `d`; `None` when the plan sets no target it can be judged on.
pub fn asymptotic_answer(plan: &Plan, d: usize) -> Option<AsymptoticAnswer> {
    let design = &plan.designs()[d];
    let (targets, contrasts) = targets_for(plan, design);
    if targets.is_empty() {
        return None;
    }
    let half_widths = half_width_targets(&targets);
    Some(AsymptoticAnswer {
        trials: asymptotic_smallest(plan, design, &targets, &contrasts, &half_widths),
        hypotheses: power_targets(&targets),
    })
}

/// Normal-approximation power of each power target of design `d` at `trials` per condition
/// (empty when the information is singular there or no hypothesis has a target).
pub fn asymptotic_power(plan: &Plan, d: usize, trials: u32) -> Vec<f64> {
    let design = &plan.designs()[d];
    let (_, contrasts) = targets_for(plan, design);
    asymptotic::at(plan, design, trials, &contrasts, &[]).map_or(Vec::new(), |p| p.power)
}

fn half_width_targets(targets: &[Target]) -> Vec<(Quantity, f64)> {
    targets
        .iter()
        .filter_map(|t| match t {
            Target::HalfWidth { quantity, at_most } => Some((*quantity, *at_most)),
            _ => None,
        })
        .collect()
}

fn power_targets(targets: &[Target]) -> Vec<(String, f64)> {
    targets
        .iter()
        .filter_map(|t| match t {
            Target::Power {
                hypothesis,
                at_least,
            } => Some((hypothesis.clone(), *at_least)),
            _ => None,
        })
        .collect()
}

/// Searches one design.
pub fn search_design(
    plan: &Plan,
    d: usize,
    progress: &Progress<'_>,
) -> Result<SearchResult, RunError> {
    let design = &plan.designs()[d];
    let (targets, contrasts) = targets_for(plan, design);
    let result = |outcome, evaluated| SearchResult {
        design: design.name.clone(),
        outcome,
        evaluated,
    };
    if targets.is_empty() {
        return Ok(result(SearchOutcome::NoTargets, Vec::new()));
    }
    let half_widths = half_width_targets(&targets);
    let lo_valid = smallest_valid(design);
    let max = plan.study().max_trials.max(lo_valid);
    // 1. Bracket with the expected information on a geometric grid, refined by bisection.
    let asymptotic_trials = asymptotic_smallest(plan, design, &targets, &contrasts, &half_widths);
    // 2. Confirm with Monte Carlo: find a failing and a passing count, then bisect.
    let mut evaluated: Vec<SearchPoint> = Vec::new();
    let mut eval = |n: u32| -> Result<(bool, Vec<TargetValue>), RunError> {
        progress(Event::Start(Phase::SearchRound {
            design: design.name.clone(),
            round: evaluated.len() as u32 + 1,
            trials: n,
        }));
        progress(Event::Planned(plan.study().experiments));
        let v = evaluate(plan, d, n, &targets, progress)?;
        let met = v.iter().all(|x| x.met);
        evaluated.push(SearchPoint {
            trials: n,
            values: v.clone(),
            met,
        });
        Ok((met, v))
    };
    let start = asymptotic_trials.unwrap_or(max).clamp(lo_valid, max);
    let (mut pass, mut pass_values, mut fail) = (None, Vec::new(), None);
    let (ok, v) = eval(start)?;
    if ok {
        pass = Some(start);
        pass_values = v;
        let mut n = start;
        while n > lo_valid {
            let lower = ((f64::from(n) / 1.3).floor() as u32).max(lo_valid);
            let (ok, v) = eval(lower)?;
            if ok {
                pass = Some(lower);
                pass_values = v;
                n = lower;
            } else {
                fail = Some(lower);
                break;
            }
        }
    } else {
        fail = Some(start);
        let mut n = start;
        let mut last = v;
        while n < max {
            let upper = ((f64::from(n) * 1.3).ceil() as u32).min(max);
            let (ok, v) = eval(upper)?;
            if ok {
                pass = Some(upper);
                pass_values = v;
                break;
            }
            fail = Some(upper);
            last = v;
            n = upper;
        }
        if pass.is_none() {
            let reasons = not_reached(plan, design, &targets, &last, max);
            return Ok(result(
                SearchOutcome::NotReached {
                    max_trials: max,
                    reasons,
                },
                evaluated,
            ));
        }
    }
    let mut hi = pass.unwrap_or(lo_valid);
    if let Some(mut lo) = fail {
        while hi - lo > 1 {
            let mid = lo + (hi - lo) / 2;
            let (ok, v) = eval(mid)?;
            if ok {
                hi = mid;
                pass_values = v;
            } else {
                lo = mid;
            }
        }
    }
    let binding = binding_target(&targets, &pass_values);
    let band = band(
        plan,
        design,
        &contrasts,
        &half_widths,
        &targets,
        &binding,
        hi,
    );
    let evaluations = evaluated.len() as u32;
    Ok(result(
        SearchOutcome::Found {
            trials: hi,
            band,
            binding,
            values: pass_values,
            asymptotic_trials,
            evaluations,
        },
        evaluated,
    ))
}

/// The target closest to failing at the answer (smallest relative margin).
fn binding_target(targets: &[Target], values: &[TargetValue]) -> Target {
    let margin = |v: &TargetValue| match &v.target {
        Target::Power { at_least, .. } => (v.value - at_least) / at_least,
        Target::HalfWidth { at_most, .. } | Target::Correlation { at_most } => {
            (at_most - v.value) / at_most
        }
    };
    values
        .iter()
        .min_by(|a, b| margin(a).total_cmp(&margin(b)))
        .map_or_else(|| targets[0].clone(), |v| v.target.clone())
}

/// ± trials of Monte Carlo uncertainty: the binding power's MC SE over the slope of the
/// asymptotic power curve at the answer (0 when the binding target is not a power).
fn band(
    plan: &Plan,
    design: &Design,
    contrasts: &[(Contrast, &Hypothesis)],
    half_widths: &[(Quantity, f64)],
    targets: &[Target],
    binding: &Target,
    n: u32,
) -> u32 {
    let Target::Power { at_least, .. } = binding else {
        return 0;
    };
    let Some(i) = targets
        .iter()
        .filter(|t| matches!(t, Target::Power { .. }))
        .position(|t| t == binding)
    else {
        return 0;
    };
    let step = (n / 10).max(1);
    let (Some(a), Some(b)) = (
        asymptotic::at(plan, design, n, contrasts, half_widths),
        asymptotic::at(plan, design, n + step, contrasts, half_widths),
    ) else {
        return 0;
    };
    let slope = (b.power[i] - a.power[i]) / f64::from(step);
    let se = (at_least * (1.0 - at_least) / plan.study().experiments as f64).sqrt();
    if slope > 0.0 {
        (se / slope).ceil() as u32
    } else {
        0
    }
}

/// Why the targets are out of reach at the largest count.
fn not_reached(
    plan: &Plan,
    design: &Design,
    targets: &[Target],
    values: &[TargetValue],
    max: u32,
) -> Vec<String> {
    let identified = asymptotic::analysis_model(plan, design, max).is_some_and(|m| {
        let theta = m.hypothesised_theta();
        crate::cells::information::UnitInformation::new(&m, &theta)
            .and_then(|u| u.total(&m.block_sizes()))
            .ok()
            .and_then(|info| {
                crate::cells::information::precision(&m, &theta, &info)
                    .ok()
                    .flatten()
            })
            .is_some()
    });
    if !identified {
        return vec![format!(
            "not identified with this record: d′ and c cannot be told apart at any trial count ({} fails)",
            targets.first().map_or_else(String::new, Target::describe)
        )];
    }
    values
        .iter()
        .filter(|v| !v.met)
        .map(|v| {
            format!(
                "{} reaches only {:.3} at {max} trials",
                v.target.describe(),
                v.value
            )
        })
        .collect()
}

/// Searches every design of the plan.
pub fn search_plan(plan: &Plan, progress: &Progress<'_>) -> Result<Vec<SearchResult>, RunError> {
    (0..plan.designs().len())
        .map(|d| search_design(plan, d, progress))
        .collect()
}
