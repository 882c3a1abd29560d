//! What `run` needs of a design beyond each key's own range, checked here so that a plan
//! `check` accepts is a plan `run` starts: linked conditions agree on what they share, the
//! criteria of a rating scale stay distinct once placed at each condition, and the design
//! builds into the observation model the simulation and the fits use.

use super::{Ctx, shown, shown_pair};
use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::observation_model::ObservationModel;
use crate::design::model::{condition_specs, truth_specs};
use crate::design::{Design, Response, SharedParameter};
use crate::fit::rating::RatingParams;
use crate::model::Observer;
use crate::plan::PlanError;
use crate::plan::raw::RawDesign;

/// Every check of this file, in the order a plan author would fix them.
pub(super) fn runnable(
    ctx: &Ctx,
    raw: &RawDesign,
    design: &Design,
    observer: &Observer,
) -> Result<(), PlanError> {
    shared_values_agree(ctx, raw, design)?;
    rating_criteria_stay_distinct(ctx, raw, design)?;
    builds_into_the_model(ctx, raw, design, observer)
}

/// Shared d′, criterion and base rate: one value for every condition.
fn shared_values_agree(ctx: &Ctx, raw: &RawDesign, design: &Design) -> Result<(), PlanError> {
    let Some(list) = &raw.conditions else {
        return Ok(());
    };
    let (raw_conditions, conditions) = (list.get_ref(), &design.conditions);
    if conditions.len() < 2 {
        return Ok(());
    }
    let first = &conditions[0];
    let differing = |value: fn(&crate::design::Condition) -> f64| {
        conditions
            .iter()
            .position(|c| value(c) != value(first))
            .map(|j| (j, &conditions[j]))
    };
    let shared_item = |name: &str| {
        raw.shared
            .as_ref()
            .and_then(|l| l.get_ref().iter().find(|i| i.get_ref() == name))
    };
    let by_default = if raw.shared.is_none() {
        " (sharing d′ is the default when a design has conditions)"
    } else {
        ""
    };
    if design.shares(SharedParameter::DPrime)
        && let Some((j, other)) = differing(|c| c.d_prime)
    {
        // Point at the condition that sets its own d′.
        let own = |k: usize| raw_conditions[k].d_prime.as_ref();
        let (setter, rest) = match (own(j), own(0)) {
            (None, Some(_)) => (first, other),
            _ => (other, first),
        };
        let without: Vec<String> = design
            .shared
            .iter()
            .filter(|p| **p != SharedParameter::DPrime)
            .map(|p| format!("\"{}\"", shared_name(*p)))
            .collect();
        let (a, b) = shown_pair(setter.d_prime, rest.d_prime);
        let problem = format!(
            "condition \"{}\" sets d_prime = {a}, but design \"{}\" shares d′ across its conditions{by_default}, and condition \"{}\" has d′ = {b}",
            setter.name, design.name, rest.name
        );
        let allowed = format!(
            "one d′ for all conditions of a design that shares it: drop d_prime from the condition (the observer's d′ applies) or give every condition the same value; to estimate d′ per condition, list in `shared` only what the conditions do share, e.g. shared = [{}]",
            without.join(", ")
        );
        return Err(match own(j).or(own(0)) {
            Some(v) => ctx.at_allowing(v, problem, allowed),
            None => ctx.at_allowing(&raw_conditions[j].name, problem, allowed),
        });
    }
    if design.shares(SharedParameter::Criterion)
        && let Some((j, other)) = differing(|c| c.criterion)
    {
        let own = |k: usize| raw_conditions[k].criterion.as_ref();
        let (a, b) = shown_pair(first.criterion, other.criterion);
        let mut problem = format!(
            "design \"{}\" shares the criterion across its conditions, but condition \"{}\" has c = {a} and condition \"{}\" has c = {b}",
            design.name, first.name, other.name
        );
        let allowed = "one criterion for all conditions of a design that shares it: give the conditions the same criterion, or remove \"criterion\" from `shared` to estimate it per condition".to_string();
        return Err(match (own(j).or(own(0)), shared_item("criterion")) {
            (Some(v), _) => ctx.at_allowing(v, problem, allowed),
            (None, item) => {
                problem.push_str(
                    " (criterion = \"optimal\" gives each presence rate its own ideal criterion)",
                );
                match item {
                    Some(item) => ctx.at_allowing(item, problem, allowed),
                    None => ctx.at_allowing(&raw_conditions[j].name, problem, allowed),
                }
            }
        });
    }
    if design.shares(SharedParameter::BaseRate)
        && let Some((j, other)) = differing(|c| c.presence)
    {
        let (a, b) = shown_pair(first.presence, other.presence);
        let problem = format!(
            "design \"{}\" shares the base rate across its conditions, but condition \"{}\" has presence {a} and condition \"{}\" has presence {b}",
            design.name, first.name, other.name
        );
        let allowed = "one presence rate for all conditions of a design that shares the base rate: give the conditions the same presence, or remove \"base_rate\" from `shared` to estimate it per condition".to_string();
        return Err(match shared_item("base_rate") {
            Some(item) => ctx.at_allowing(item, problem, allowed),
            None => ctx.at_allowing(&raw_conditions[j].name, problem, allowed),
        });
    }
    Ok(())
}

fn shared_name(p: SharedParameter) -> &'static str {
    match p {
        SharedParameter::DPrime => "d_prime",
        SharedParameter::Criterion => "criterion",
        SharedParameter::Sigma => "sigma",
        SharedParameter::Spacing => "spacing",
        SharedParameter::BaseRate => "base_rate",
    }
}

/// The criteria of a rating scale, as the model places them at each condition, stay
/// strictly increasing: absent shares that differ by less than double precision resolves
/// (a share of 1e-17), or a d′ or criterion so large that adding it erases the spacing
/// (d′ = 1e17), leave two criteria equal and no model to fit.
fn rating_criteria_stay_distinct(
    ctx: &Ctx,
    raw: &RawDesign,
    design: &Design,
) -> Result<(), PlanError> {
    let (Response::Rating(scale), Some(raw_scale)) = (&design.response, &raw.scale) else {
        return Ok(());
    };
    let s = raw_scale.get_ref();
    let at = |problem: String| {
        let allowed = "criteria that stay strictly increasing once the scale is placed at each condition's criterion and d′: larger absent shares, a smaller d′ or a criterion nearer 0".to_string();
        match (&s.absent_shares, &s.criteria) {
            (Some(sh), _) => ctx.at_allowing(sh, problem, allowed),
            (None, Some(c)) => ctx.at_allowing(c, problem, allowed),
            (None, None) => ctx.at_allowing(raw_scale, problem, allowed),
        }
    };
    let collapsed = |v: &[f64]| {
        (1..v.len())
            .find(|&i| !(v[i].is_finite() && v[i - 1].is_finite() && v[i] > v[i - 1]))
            .map(|i| (i, i + 1))
    };
    if let Some((a, b)) = collapsed(&scale.criteria) {
        // Only criteria derived from absent shares get here: given ones were checked.
        let d = design.conditions[0].d_prime;
        let share = s
            .absent_shares
            .as_ref()
            .and_then(|sh| sh.get_ref().get(a).copied())
            .map(|v| format!("; share {b} is {}", shown(v)))
            .unwrap_or_default();
        return Err(at(format!(
            "criteria {a} and {b} that the absent shares give at d′ = {} are equal in double precision ({} and {}){share}",
            shown(d),
            shown(scale.criteria[a - 1]),
            shown(scale.criteria[b - 1])
        )));
    }
    let anchor = scale.criteria[scale.boundary - 1];
    for c in &design.conditions {
        // As the observation model holds them: offsets from the boundary criterion …
        let offsets: Vec<f64> = scale.criteria.iter().map(|x| x - anchor).collect();
        // … and as the rating fast path does: k_j = c_j + (c − c_b) + d′/2.
        let shift = c.criterion - anchor;
        let absolute: Vec<f64> = scale
            .criteria
            .iter()
            .map(|x| x + shift + c.d_prime / 2.0)
            .collect();
        if let Some((a, b)) = collapsed(&offsets).or_else(|| collapsed(&absolute)) {
            return Err(at(format!(
                "criteria {a} and {b} of the scale become equal in double precision once placed at condition \"{}\" (c = {}, d′ = {})",
                c.name,
                shown(c.criterion),
                shown(c.d_prime)
            )));
        }
    }
    Ok(())
}

/// The design as the simulation builds it: the data model, the analysis model, the cell
/// probabilities at the true values and, for one rating table, the fast path's parameters.
/// The checks above give the plain messages; this one makes sure nothing is left for `run`.
fn builds_into_the_model(
    ctx: &Ctx,
    raw: &RawDesign,
    design: &Design,
    observer: &Observer,
) -> Result<(), PlanError> {
    let fail = |what: String| {
        ctx.at_allowing(
            &raw.name,
            format!("design \"{}\" cannot be simulated as given: {what}", design.name),
            "finite parameter values, strictly increasing criteria and, where conditions share a parameter, one value for it".into(),
        )
    };
    let trials = design.trials[0];
    let truth = ObservationModel::new(truth_specs(design, observer, trials))
        .map_err(|e| fail(e.to_string()))?;
    let mut analysis = condition_specs(design, observer, trials);
    analysis.iter_mut().for_each(|c| c.lapse = None);
    ObservationModel::new(analysis).map_err(|e| fail(e.to_string()))?;
    let probabilities = cell_probabilities(&truth, &truth.hypothesised_theta(), Order::First)
        .map_err(|e| fail(e.to_string()))?;
    if probabilities
        .iter()
        .any(|b| b.p.iter().any(|p| !p.is_finite()))
    {
        return Err(fail("a cell probability is not a number".into()));
    }
    if let Response::Rating(scale) = &design.response {
        for c in &design.conditions {
            let shift = c.criterion - scale.criteria[scale.boundary - 1];
            let absolute: Vec<f64> = scale
                .criteria
                .iter()
                .map(|x| x + shift + c.d_prime / 2.0)
                .collect();
            RatingParams::new(c.d_prime, observer.sigma, &absolute)
                .map_err(|e| fail(format!("condition \"{}\": {e}", c.name)))?;
        }
    }
    Ok(())
}
