//! A hypothesis on one design: which θ entries it tests, its null value, and the restricted
//! model of its likelihood-ratio test.
//!
//! Every test is on an entry of θ or a difference of two: c of a condition (bias, ideal
//! criterion), ln σ (unequal variance, so the Wald test works on the scale where the
//! estimate is closest to normal), or c or d′ of two conditions (shift, difference).

use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{SLOT_CRITERION, SLOT_D_PRIME, SLOT_LN_SIGMA, Slot};
use crate::cells::spec::Role;
use crate::design::Design;
use crate::design::goals::{Hypothesis, TestKind};
use crate::engine::Contrast;
use crate::model::ideal::IdealObserver;
use crate::plan::{CriterionRule, Plan};

/// The ideal observer's criterion for a condition, when the plan has payoffs.
pub fn ideal_criterion(plan: &Plan, presence: f64, d_prime: f64) -> Option<f64> {
    match plan.criterion_rule() {
        CriterionRule::Optimal { payoffs, .. } => IdealObserver::new(d_prime, presence, *payoffs)
            .ok()
            .map(|i| i.optimal_criterion()),
        CriterionRule::Fixed { .. } => None,
    }
}

/// The contrast of `hyp` on a design's model, or `None` when the design cannot test it
/// (it lacks the named conditions, or does not estimate the parameter).
pub fn contrast(
    plan: &Plan,
    design: &Design,
    model: &ObservationModel,
    hyp: &Hypothesis,
) -> Option<Contrast> {
    let specs = model.conditions();
    let index = |name: &str| specs.iter().position(|c| c.name == name);
    let first = || hyp.conditions.first().map_or(Some(0), |c| index(c));
    let theta_at = |j: usize, slot: usize| match model.parameters().slots(j)[slot] {
        Slot::Theta(i) => Some(i),
        _ => None,
    };
    let truth_theta = model.hypothesised_theta();
    let mut restricted = specs.to_vec();
    let (plus, minus, null) = match hyp.kind {
        TestKind::Bias | TestKind::IdealCriterion => {
            let j = first()?;
            let null = if hyp.kind == TestKind::Bias {
                0.0
            } else {
                let c = &design.conditions[j];
                ideal_criterion(plan, c.presence, c.d_prime)?
            };
            restricted[j].roles.criterion = Role::Fixed;
            restricted[j].values.criterion = null;
            (theta_at(j, SLOT_CRITERION)?, None, null)
        }
        TestKind::UnequalVariance => {
            let j = first()?;
            let i = theta_at(j, SLOT_LN_SIGMA)?;
            for s in restricted.iter_mut() {
                s.roles.sigma = Role::Fixed;
                s.values.sigma = 1.0;
            }
            (i, None, 0.0)
        }
        TestKind::CriterionShift | TestKind::SensitivityDifference => {
            let (a, b) = (index(&hyp.conditions[0])?, index(&hyp.conditions[1])?);
            let slot = if hyp.kind == TestKind::CriterionShift {
                SLOT_CRITERION
            } else {
                SLOT_D_PRIME
            };
            let (ia, ib) = (theta_at(a, slot)?, theta_at(b, slot)?);
            if ia == ib {
                return None;
            }
            for j in [a, b] {
                if slot == SLOT_CRITERION {
                    restricted[j].roles.criterion = Role::Shared;
                    restricted[j].values.criterion = specs[a].values.criterion;
                } else {
                    restricted[j].roles.d_prime = Role::Shared;
                    restricted[j].values.d_prime = specs[a].values.d_prime;
                }
            }
            // Tested as (second − first), so "greater" means the second condition's is larger.
            (ib, Some(ia), 0.0)
        }
        TestKind::GroupDifference => return None,
    };
    let truth = truth_theta[plus] - minus.map_or(0.0, |m| truth_theta[m]);
    Some(Contrast {
        name: hyp.name.clone(),
        kind: hyp.kind,
        sided: hyp.sided,
        plus,
        minus,
        null,
        truth,
        restricted,
    })
}
