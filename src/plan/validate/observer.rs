//! `[observer]`: the hypothesised animal, and the ideal criterion when it is "optimal".

use super::{Ctx, shown};
use crate::model::ideal::{IdealObserver, Payoffs};
use crate::model::{LapseSpec, Observer};
use crate::plan::raw::{RawCriterion, RawPlan};
use crate::plan::{CriterionRule, PlanError};
use toml::Spanned;

/// The observer as written, before conditions resolve an "optimal" criterion.
pub(super) struct ObserverSpec {
    pub(super) observer: Observer,
    pub(super) payoffs: Option<Payoffs>,
    pub(super) fraction: f64,
    pub(super) optimal: bool,
    criterion_span: std::ops::Range<usize>,
}

impl ObserverSpec {
    /// Where `observer.criterion` is written (for messages that name it beside another key).
    pub(super) fn criterion_span(&self) -> std::ops::Range<usize> {
        self.criterion_span.clone()
    }

    pub(super) fn rule(&self) -> CriterionRule {
        match (self.optimal, self.payoffs) {
            (true, Some(payoffs)) => CriterionRule::Optimal {
                payoffs,
                fraction: self.fraction,
            },
            _ => CriterionRule::Fixed {
                criterion: self.observer.criterion,
            },
        }
    }

    /// The criterion of a condition without its own: the fixed one, or the ideal
    /// observer's for the condition's presence rate (times the partial-adjustment fraction).
    pub(super) fn default_criterion(
        &self,
        ctx: &Ctx,
        presence: f64,
        d_prime: f64,
        fixed: f64,
    ) -> Result<f64, PlanError> {
        if !self.optimal {
            return Ok(fixed);
        }
        optimal_criterion(
            ctx,
            self.payoffs,
            presence,
            d_prime,
            self.fraction,
            &self.criterion_span,
        )
    }
}

/// c_opt = ln β_opt / d′ for a presence rate (Green & Swets 1966), times `fraction`.
pub(super) fn optimal_criterion(
    ctx: &Ctx,
    payoffs: Option<Payoffs>,
    presence: f64,
    d_prime: f64,
    fraction: f64,
    span: &std::ops::Range<usize>,
) -> Result<f64, PlanError> {
    let at = Spanned::new(span.clone(), ());
    let payoffs = payoffs.ok_or_else(|| {
        ctx.at(
            &at,
            "criterion",
            "\"optimal\" needs an [observer.payoffs] table".into(),
        )
    })?;
    let ideal = IdealObserver::new(d_prime, presence, payoffs)
        .map_err(|e| ctx.at(&at, "criterion", e.to_string()))?;
    let c_opt = ideal.optimal_criterion();
    if !c_opt.is_finite() {
        // The payoffs and d′ pass their own checks, but ln β / d′ leaves double precision.
        let ratio = payoffs.ratio();
        let why = if !(ratio.is_finite() && ratio > 0.0) {
            format!(
                "the payoff ratio (value_correct_rejection + cost_false_alarm) / (value_hit + cost_miss) is {} in double precision",
                shown(ratio)
            )
        } else {
            format!("ln β / d′ overflows at d′ = {}", shown(d_prime))
        };
        return Err(ctx.at_allowing(
            &at,
            format!(
                "the ideal criterion c = ln β / d′ at presence {} is {c_opt}, not a number an animal can have: {why}",
                shown(presence)
            ),
            "payoffs and d′ for which c = ln β / d′ is a finite number; payoff sums value_hit + cost_miss and value_correct_rejection + cost_false_alarm below 1e300 whose ratio lies between 1e-300 and 1e300, with d′ ≥ 1e-300, always are".into(),
        ));
    }
    ideal
        .partial_criterion(fraction)
        .map_err(|e| ctx.at(&at, "criterion", e.to_string()))
}

pub(super) fn observer(ctx: &Ctx, raw: &RawPlan) -> Result<ObserverSpec, PlanError> {
    let o = &raw.observer;
    let d = *o.d_prime.get_ref();
    if !(d.is_finite() && d >= 0.0) {
        return Err(ctx.at(
            &o.d_prime,
            "d_prime",
            format!("{d} is not a sensitivity ≥ 0"),
        ));
    }
    let payoffs = match &o.payoffs {
        None => None,
        Some(p) => {
            let r = p.get_ref();
            Some(
                Payoffs::new(
                    r.value_hit,
                    r.cost_miss,
                    r.value_correct_rejection,
                    r.cost_false_alarm,
                )
                .map_err(|e| ctx.at(p, "payoffs", e.to_string()))?,
            )
        }
    };
    let fraction = match &o.criterion_fraction {
        None => 1.0,
        Some(f) if (0.0..=1.0).contains(f.get_ref()) => *f.get_ref(),
        Some(f) => {
            return Err(ctx.at(
                f,
                "criterion_fraction",
                format!("{} is outside [0, 1]", f.get_ref()),
            ));
        }
    };
    let (c, optimal) = match o.criterion.get_ref() {
        RawCriterion::Value(c) if c.is_finite() => (*c, false),
        RawCriterion::Value(c) => {
            return Err(ctx.at(
                &o.criterion,
                "criterion",
                format!("{c} is not a finite number"),
            ));
        }
        // A placeholder until each condition's presence rate gives its ideal criterion.
        RawCriterion::Word(w) if w == "optimal" => (0.0, true),
        RawCriterion::Word(w) => {
            return Err(ctx.at(
                &o.criterion,
                "criterion",
                format!("\"{w}\" is neither a number nor \"optimal\""),
            ));
        }
    };
    if optimal && payoffs.is_none() {
        return Err(ctx.at(
            &o.criterion,
            "criterion",
            "criterion = \"optimal\" needs an [observer.payoffs] table".into(),
        ));
    }
    if let (false, Some(f)) = (optimal, &o.criterion_fraction) {
        return Err(ctx.at(
            f,
            "criterion_fraction",
            "criterion_fraction applies only with criterion = \"optimal\"".into(),
        ));
    }
    let sigma = match &o.sigma {
        None => 1.0,
        Some(s) if s.get_ref().is_finite() && *s.get_ref() > 0.0 => *s.get_ref(),
        Some(s) => return Err(ctx.at(s, "sigma", format!("{} is not a positive SD", s.get_ref()))),
    };
    let lapse = match (&o.lapse_rate, &o.lapse_yes) {
        (None, None) => None,
        (None, Some(g)) => {
            return Err(ctx.at(
                g,
                "lapse_rate",
                "lapse_yes is given without lapse_rate".into(),
            ));
        }
        (Some(l), g) => {
            let rate = *l.get_ref();
            if !(rate.is_finite() && (0.0..1.0).contains(&rate)) {
                return Err(ctx.at(l, "lapse_rate", format!("{rate} is outside [0, 1)")));
            }
            let guess_yes = match g {
                None => 0.5,
                Some(g) if (0.0..=1.0).contains(g.get_ref()) => *g.get_ref(),
                Some(g) => {
                    return Err(ctx.at(
                        g,
                        "lapse_yes",
                        format!("{} is outside [0, 1]", g.get_ref()),
                    ));
                }
            };
            (rate > 0.0).then_some(LapseSpec { rate, guess_yes })
        }
    };
    let observer = Observer {
        d_prime: d,
        criterion: c,
        sigma,
        lapse,
    };
    Ok(ObserverSpec {
        observer,
        payoffs,
        fraction,
        optimal,
        criterion_span: o.criterion.span(),
    })
}
