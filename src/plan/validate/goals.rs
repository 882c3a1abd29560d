//! Checks of what the plan wants shown: hypotheses, targets, animals and budget.

use super::{Ctx, open_unit};
use crate::design::goals::{Animals, Budget, Hypothesis, Targets, TestKind};
use crate::design::{Design, Response, SharedParameter};
use crate::model::ideal::Payoffs;
use crate::plan::PlanError;
use crate::plan::Study;
use crate::plan::raw::{RawAnimals, RawBudget, RawHypothesis, RawPlan, RawTargets};
use crate::vocab::Quantity;
use crate::vocab::Sided;

/// The validated goals of a plan.
pub(super) struct Goals {
    pub hypotheses: Vec<Hypothesis>,
    pub targets: Targets,
    pub animals: Option<Animals>,
    pub budget: Option<Budget>,
}

pub(super) fn goals(
    ctx: &Ctx,
    raw: &RawPlan,
    designs: &[Design],
    _study: &Study,
    payoffs: Option<Payoffs>,
) -> Result<Goals, PlanError> {
    let animals = match &raw.animals {
        Some(a) => Some(animals(ctx, a, designs)?),
        None => None,
    };
    let mut hypotheses = Vec::new();
    for h in raw.hypotheses.iter().flatten() {
        let hyp = hypothesis(ctx, h, designs, payoffs.is_some(), animals.is_some())?;
        if hypotheses.iter().any(|x: &Hypothesis| x.name == hyp.name) {
            return Err(ctx.at(
                &h.name,
                "name",
                format!("hypothesis name \"{}\" is used twice", hyp.name),
            ));
        }
        hypotheses.push(hyp);
    }
    let targets = match &raw.targets {
        Some(t) => targets(ctx, t)?,
        None => Targets::default(),
    };
    let budget = match &raw.budget {
        Some(b) => Some(budget(ctx, b, designs, animals.as_ref())?),
        None => None,
    };
    Ok(Goals {
        hypotheses,
        targets,
        animals,
        budget,
    })
}

fn hypothesis(
    ctx: &Ctx,
    h: &RawHypothesis,
    designs: &[Design],
    has_payoffs: bool,
    has_animals: bool,
) -> Result<Hypothesis, PlanError> {
    let name = h.name.get_ref().trim().to_string();
    if name.is_empty() {
        return Err(ctx.at(&h.name, "name", "the hypothesis name is empty".into()));
    }
    let kind = TestKind::from_name(h.kind.get_ref()).ok_or_else(|| {
        ctx.at(
            &h.kind,
            "kind",
            format!("\"{}\" is not a known kind of hypothesis", h.kind.get_ref()),
        )
    })?;
    let sided = match h.sided.as_ref().map(|s| (s, s.get_ref().as_str())) {
        None | Some((_, "two-sided")) => Sided::TwoSided,
        Some((_, "greater")) => Sided::Greater,
        Some((_, "less")) => Sided::Less,
        Some((s, other)) => {
            return Err(ctx.at(s, "sided", format!("\"{other}\" is not a direction")));
        }
    };
    let power = match &h.power {
        None => None,
        Some(p) if open_unit(*p.get_ref()) => Some(*p.get_ref()),
        Some(p) => return Err(ctx.at(p, "power", format!("{} is outside (0, 1)", p.get_ref()))),
    };
    let conditions: Vec<String> = h
        .conditions
        .as_ref()
        .map(|c| c.get_ref().clone())
        .unwrap_or_default();
    let needed = kind.conditions_needed();
    let at_conditions = |problem: String| match &h.conditions {
        Some(c) => ctx.at(c, "conditions", problem),
        None => ctx.at(&h.kind, "conditions", problem),
    };
    if needed == 2 && conditions.len() != 2 || needed == 1 && conditions.len() > 1 {
        return Err(at_conditions(format!(
            "a \"{}\" hypothesis names {needed} condition(s), not {}",
            h.kind.get_ref(),
            conditions.len()
        )));
    }
    // Which designs can test it: they hold the named conditions (and, for a shift or a
    // difference, estimate the compared parameter per condition).
    let holds = |d: &Design| {
        conditions
            .iter()
            .all(|c| d.conditions.iter().any(|x| &x.name == c))
    };
    if !conditions.is_empty() && !designs.iter().any(holds) {
        return Err(at_conditions(format!(
            "no design has the condition(s) {conditions:?}"
        )));
    }
    for d in designs.iter().filter(|d| holds(d) && needed == 2) {
        let p = match kind {
            TestKind::CriterionShift => SharedParameter::Criterion,
            _ => SharedParameter::DPrime,
        };
        if d.shares(p) {
            return Err(at_conditions(format!(
                "design \"{}\" shares {} across its conditions, so it cannot differ between them; remove it from `shared`",
                d.name,
                if p == SharedParameter::Criterion {
                    "the criterion"
                } else {
                    "d′"
                }
            )));
        }
    }
    match kind {
        TestKind::IdealCriterion if !has_payoffs => {
            return Err(ctx.at(
                &h.kind,
                "kind",
                "an ideal-criterion hypothesis needs an [observer.payoffs] table".into(),
            ));
        }
        TestKind::UnequalVariance
            if !designs
                .iter()
                .any(|d| matches!(&d.response, Response::Rating(s) if !s.fix_sigma)) =>
        {
            return Err(ctx.at(
                &h.kind,
                "kind",
                "no design estimates σ (a rating scale with fix_sigma = false)".into(),
            ));
        }
        TestKind::GroupDifference if !has_animals => {
            return Err(ctx.at(
                &h.kind,
                "kind",
                "a group-difference hypothesis needs an [animals] table".into(),
            ));
        }
        _ => {}
    }
    let shift = match (&h.shift, kind) {
        (Some(s), TestKind::GroupDifference) if s.get_ref().is_finite() => *s.get_ref(),
        (Some(s), TestKind::GroupDifference) => {
            return Err(ctx.at(s, "shift", "not a finite number".into()));
        }
        (Some(s), _) => {
            return Err(ctx.at(
                s,
                "shift",
                "shift applies to group-difference hypotheses only".into(),
            ));
        }
        (None, _) => 0.0,
    };
    Ok(Hypothesis {
        name,
        kind,
        conditions,
        sided,
        power,
        shift,
    })
}

fn targets(ctx: &Ctx, t: &RawTargets) -> Result<Targets, PlanError> {
    let power = match &t.power {
        None => None,
        Some(p) if open_unit(*p.get_ref()) => Some(*p.get_ref()),
        Some(p) => return Err(ctx.at(p, "power", format!("{} is outside (0, 1)", p.get_ref()))),
    };
    let mut half_width = Vec::new();
    for (key, w) in t.half_width.iter().flat_map(|h| h.get_ref().iter()) {
        let q = match key.as_str() {
            "d_prime" => Quantity::DPrime,
            "criterion" => Quantity::Criterion,
            "sigma" => Quantity::Sigma,
            "base_rate" => Quantity::BaseRate,
            other => {
                return Err(ctx.at(
                    w,
                    "half_width",
                    format!("\"{other}\" is not a parameter with an interval"),
                ));
            }
        };
        if !(w.get_ref().is_finite() && *w.get_ref() > 0.0) {
            return Err(ctx.at(
                w,
                "half_width",
                format!("{} is not a half-width > 0", w.get_ref()),
            ));
        }
        half_width.push((q, *w.get_ref()));
    }
    let max_correlation = match &t.max_correlation {
        None => None,
        Some(r) if *r.get_ref() > 0.0 && *r.get_ref() <= 1.0 => Some(*r.get_ref()),
        Some(r) => {
            return Err(ctx.at(
                r,
                "max_correlation",
                format!("{} is outside (0, 1]", r.get_ref()),
            ));
        }
    };
    Ok(Targets {
        power,
        half_width,
        max_correlation,
    })
}

fn animals(ctx: &Ctx, a: &RawAnimals, designs: &[Design]) -> Result<Animals, PlanError> {
    if a.counts.get_ref().is_empty() {
        return Err(ctx.at(
            &a.counts,
            "counts",
            "the list of animal counts is empty".into(),
        ));
    }
    let mut counts = Vec::new();
    for c in a.counts.get_ref() {
        if !(2..=100_000).contains(c.get_ref()) {
            return Err(ctx.at(
                c,
                "counts",
                format!("{} animals is outside 2 to 100000", c.get_ref()),
            ));
        }
        let n = *c.get_ref() as u32;
        if counts.contains(&n) {
            return Err(ctx.at(c, "counts", format!("{n} animals is listed twice")));
        }
        counts.push(n);
    }
    counts.sort_unstable();
    let sd = |v: &Option<toml::Spanned<f64>>, key: &str| -> Result<f64, PlanError> {
        match v {
            None => Ok(0.0),
            Some(s) if s.get_ref().is_finite() && *s.get_ref() >= 0.0 => Ok(*s.get_ref()),
            Some(s) => Err(ctx.at(s, key, format!("{} is not an SD ≥ 0", s.get_ref()))),
        }
    };
    let correlation = match &a.correlation {
        None => 0.0,
        Some(r) if *r.get_ref() > -1.0 && *r.get_ref() < 1.0 => *r.get_ref(),
        Some(r) => {
            return Err(ctx.at(
                r,
                "correlation",
                format!("{} is outside (−1, 1)", r.get_ref()),
            ));
        }
    };
    let trial_cap = match &a.trial_cap {
        None => None,
        Some(c) => {
            // The cap counts every trial an animal receives, across its conditions.
            let smallest = designs
                .iter()
                .map(|d| d.trials[0] * d.conditions.len() as u32)
                .min()
                .unwrap_or(2);
            let cap = *c.get_ref();
            if cap < i64::from(smallest) {
                return Err(ctx.at(
                    c,
                    "trial_cap",
                    format!("a cap of {cap} trials is below the smallest trial count of every design ({smallest})"),
                ));
            }
            Some(cap.min(i64::from(u32::MAX)) as u32)
        }
    };
    let wanted = a.random_effects.as_ref().is_some_and(|b| *b.get_ref());
    let random_effects = match (&a.quadrature_nodes, wanted) {
        (Some(n), false) => {
            return Err(ctx.at(
                n,
                "quadrature_nodes",
                "quadrature_nodes needs random_effects = true".into(),
            ));
        }
        (Some(n), true) if !(1..=15).contains(n.get_ref()) => {
            return Err(ctx.at(
                n,
                "quadrature_nodes",
                format!("{} nodes is outside 1 to 15", n.get_ref()),
            ));
        }
        (Some(n), true) => Some(*n.get_ref() as u32),
        (None, true) => Some(0),
        (None, false) => None,
    };
    Ok(Animals {
        counts,
        sd_d_prime: sd(&a.sd_d_prime, "sd_d_prime")?,
        sd_criterion: sd(&a.sd_criterion, "sd_criterion")?,
        correlation,
        // Filled in by `animal_slopes`, which needs the observer's lapse rate.
        slopes: Default::default(),
        trial_cap,
        random_effects,
        // Filled in by `habituation`, which needs the designs' routes.
        habituation: None,
    })
}

fn budget(
    ctx: &Ctx,
    b: &RawBudget,
    designs: &[Design],
    animals: Option<&Animals>,
) -> Result<Budget, PlanError> {
    if animals.is_none() {
        return Err(ctx.at(
            &b.cost_per_animal,
            "budget",
            "a [budget] needs an [animals] table".into(),
        ));
    }
    let nonneg = |v: &toml::Spanned<f64>, key: &str| -> Result<f64, PlanError> {
        if v.get_ref().is_finite() && *v.get_ref() >= 0.0 {
            Ok(*v.get_ref())
        } else {
            Err(ctx.at(v, key, format!("{} is not a cost ≥ 0", v.get_ref())))
        }
    };
    let budget = Budget {
        cost_per_animal: nonneg(&b.cost_per_animal, "cost_per_animal")?,
        cost_per_trial: nonneg(&b.cost_per_trial, "cost_per_trial")?,
        total: None,
    };
    if budget.cost_per_animal == 0.0 && budget.cost_per_trial == 0.0 {
        return Err(ctx.at(
            &b.cost_per_animal,
            "cost_per_animal",
            "animals and trials cannot both be free".into(),
        ));
    }
    let total = match &b.total {
        None => None,
        Some(t) => {
            let smallest = designs
                .iter()
                .map(|d| d.trials[0] * d.conditions.len() as u32)
                .min()
                .unwrap_or(2);
            let one = budget.cost(1, smallest);
            if !(t.get_ref().is_finite() && *t.get_ref() >= one) {
                return Err(ctx.at(
                    t,
                    "total",
                    format!(
                        "{} cannot buy one animal at the smallest trial count ({one})",
                        t.get_ref()
                    ),
                ));
            }
            Some(*t.get_ref())
        }
    };
    Ok(Budget { total, ..budget })
}
