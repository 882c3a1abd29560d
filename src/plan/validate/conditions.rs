//! `[[design.condition]]` tables and what linked conditions share.

use super::Ctx;
use super::design::presence;
use super::observer::{ObserverSpec, optimal_criterion};
use crate::design::{BaseRate, Condition, Response, SharedParameter};
use crate::plan::PlanError;
use crate::plan::raw::{RawCriterion, RawDesign};

pub(super) fn conditions(
    ctx: &Ctx,
    d: &RawDesign,
    design_name: &str,
    default_presence: Option<f64>,
    spec: &ObserverSpec,
    criterion: f64,
) -> Result<Vec<Condition>, PlanError> {
    let d_prime = spec.observer.d_prime;
    let Some(list) = &d.conditions else {
        let presence = default_presence.ok_or_else(|| {
            ctx.at(
                &d.name,
                "presence",
                format!("design \"{design_name}\" gives no presence rate"),
            )
        })?;
        return Ok(vec![Condition {
            name: design_name.to_string(),
            presence,
            d_prime,
            criterion: spec.default_criterion(ctx, presence, d_prime, criterion)?,
        }]);
    };
    if list.get_ref().is_empty() {
        return Err(ctx.at(list, "condition", "the list of conditions is empty".into()));
    }
    let mut out: Vec<Condition> = Vec::new();
    for c in list.get_ref() {
        let name = c.name.get_ref().trim().to_string();
        if name.is_empty() || out.iter().any(|x| x.name == name) {
            return Err(ctx.at(
                &c.name,
                "name",
                format!("condition name \"{name}\" is empty or used twice"),
            ));
        }
        let presence = match &c.presence {
            Some(p) => presence(ctx, p)?,
            None => default_presence.ok_or_else(|| {
                ctx.at(
                    &c.name,
                    "presence",
                    format!("condition \"{name}\" has no presence rate and the design gives none"),
                )
            })?,
        };
        let dp = match &c.d_prime {
            Some(v) if v.get_ref().is_finite() && *v.get_ref() >= 0.0 => *v.get_ref(),
            Some(v) => {
                return Err(ctx.at(
                    v,
                    "d_prime",
                    format!("{} is not a sensitivity ≥ 0", v.get_ref()),
                ));
            }
            None => d_prime,
        };
        let crit = match c.criterion.as_ref().map(|v| (v, v.get_ref())) {
            Some((_, RawCriterion::Value(x))) if x.is_finite() => *x,
            Some((v, RawCriterion::Word(w))) if w == "optimal" => {
                optimal_criterion(ctx, spec.payoffs, presence, dp, spec.fraction, &v.span())?
            }
            Some((v, _)) => {
                return Err(ctx.at(v, "criterion", "not a finite number or \"optimal\"".into()));
            }
            None => spec.default_criterion(ctx, presence, dp, criterion)?,
        };
        out.push(Condition {
            name,
            presence,
            d_prime: dp,
            criterion: crit,
        });
    }
    Ok(out)
}

pub(super) fn shared(
    ctx: &Ctx,
    d: &RawDesign,
    response: &Response,
    base_rate: BaseRate,
    conditions: usize,
) -> Result<Vec<SharedParameter>, PlanError> {
    let rating = match response {
        Response::YesNo => None,
        Response::Rating(s) => Some(s),
    };
    let has_sigma = rating.is_some_and(|s| !s.fix_sigma);
    let has_spacing = rating.is_some_and(|s| s.categories >= 3);
    let has_base_rate = base_rate != BaseRate::Known;
    let Some(list) = &d.shared else {
        // Default: one animal, one sensitivity and one scale shape; criteria (and base
        // rates) free per condition.
        let mut out = vec![SharedParameter::DPrime];
        if has_sigma {
            out.push(SharedParameter::Sigma);
        }
        if has_spacing {
            out.push(SharedParameter::Spacing);
        }
        return Ok(if conditions > 1 { out } else { Vec::new() });
    };
    if conditions < 2 {
        return Err(ctx.at(
            list,
            "shared",
            "sharing needs two or more [[design.condition]] tables".into(),
        ));
    }
    let mut out = Vec::new();
    for item in list.get_ref() {
        let p = SharedParameter::from_name(item.get_ref()).ok_or_else(|| {
            ctx.at(
                item,
                "shared",
                format!(
                    "\"{}\" is not a parameter that conditions can share",
                    item.get_ref()
                ),
            )
        })?;
        let missing = match p {
            SharedParameter::Sigma if !has_sigma => Some("σ is fixed at 1 in this design"),
            SharedParameter::Spacing if !has_spacing => {
                Some("the design has no criteria besides the boundary")
            }
            SharedParameter::BaseRate if !has_base_rate => {
                Some("the base rate is known (or fixed by a full record), not estimated")
            }
            _ => None,
        };
        if let Some(why) = missing {
            return Err(ctx.at(
                item,
                "shared",
                format!("\"{}\" cannot be shared: {why}", item.get_ref()),
            ));
        }
        if !out.contains(&p) {
            out.push(p);
        }
    }
    Ok(out)
}
