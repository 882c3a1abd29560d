//! One `[[design]]`: its record, base rate, presence and trial counts.

use super::conditions::{conditions, shared};
use super::observer::ObserverSpec;
use super::scale::scale;
use super::scale_placement::place_scale;
use super::{Ctx, MAX_TRIALS, open_unit};
use crate::design::{BaseRate, Condition, Design, RecordKind, Response, split_trials};
use crate::plan::PlanError;
use crate::plan::raw::RawDesign;
use toml::Spanned;

pub(super) fn design(ctx: &Ctx, d: &RawDesign, spec: &ObserverSpec) -> Result<Design, PlanError> {
    let observer = &spec.observer;
    let name = d.name.get_ref().trim().to_string();
    if name.is_empty() {
        return Err(ctx.at(&d.name, "name", "the design name is empty".into()));
    }
    let response = match &d.scale {
        None => Response::YesNo,
        Some(s) => Response::Rating(scale(ctx, s, observer)?),
    };
    let record = record(ctx, d, &response)?;
    let response = match (response, &d.scale) {
        (Response::Rating(s), Some(raw)) => Response::Rating(place_scale(ctx, raw, s, spec)?),
        (other, _) => other,
    };
    let base_rate = base_rate(ctx, d, record)?;
    let default_presence = match &d.presence {
        Some(p) => Some(presence(ctx, p)?),
        None => None,
    };
    // A rating scale has been placed at the observer's criterion, so every design's
    // conditions start from it.
    let conditions = conditions(ctx, d, &name, default_presence, spec, observer.criterion)?;
    let trials = trials(ctx, d, record, &conditions)?;
    let shared = shared(ctx, d, &response, base_rate, conditions.len())?;
    Ok(Design {
        name,
        presence: conditions[0].presence,
        trials,
        response,
        record,
        base_rate,
        conditions,
        shared,
    })
}

pub(super) fn presence(ctx: &Ctx, p: &Spanned<f64>) -> Result<f64, PlanError> {
    let v = *p.get_ref();
    if open_unit(v) {
        Ok(v)
    } else {
        Err(ctx.at(p, "presence", format!("{v} is outside (0, 1)")))
    }
}

fn record(ctx: &Ctx, d: &RawDesign, response: &Response) -> Result<RecordKind, PlanError> {
    let Some(r) = &d.record else {
        return Ok(RecordKind::Full);
    };
    let kind = RecordKind::from_name(r.get_ref()).ok_or_else(|| {
        ctx.at(
            r,
            "record",
            format!("\"{}\" is not a known record", r.get_ref()),
        )
    })?;
    if kind != RecordKind::Full && matches!(response, Response::Rating(_)) {
        return Err(ctx.at(
            r,
            "record",
            format!(
                "a \"{}\" record keeps {} only; it cannot be combined with a rating scale",
                r.get_ref(),
                if kind == RecordKind::TwoChoice {
                    "left/right choices"
                } else {
                    "yes/no responses"
                }
            ),
        ));
    }
    Ok(kind)
}

fn base_rate(ctx: &Ctx, d: &RawDesign, record: RecordKind) -> Result<BaseRate, PlanError> {
    let census = match &d.census {
        Some(c) if *c.get_ref() >= 1 => Some((c, *c.get_ref() as u64)),
        Some(c) => {
            return Err(ctx.at(
                c,
                "census",
                format!("a census of {} encounters is not ≥ 1", c.get_ref()),
            ));
        }
        None => None,
    };
    let Some(b) = &d.base_rate else {
        if let Some((c, _)) = census {
            return Err(ctx.at(
                c,
                "census",
                "census is given but base_rate is not \"census\"".into(),
            ));
        }
        return Ok(BaseRate::Known);
    };
    if record == RecordKind::Full {
        return Err(ctx.at(
            b,
            "base_rate",
            "a full record fixes the present and absent trial counts, so it has no base rate to know or estimate"
                .into(),
        ));
    }
    if record == RecordKind::TwoChoice {
        return Err(ctx.at(
            b,
            "base_rate",
            "a two-choice record offers the target on every trial (left or right, at the presence share), so it has no base rate to know or estimate"
                .into(),
        ));
    }
    match (b.get_ref().as_str(), census) {
        ("known", None) => Ok(BaseRate::Known),
        ("unknown", None) => Ok(BaseRate::Unknown),
        ("census", Some((_, m))) => Ok(BaseRate::Census(m)),
        ("census", None) => Err(ctx.at(
            b,
            "census",
            "base_rate = \"census\" needs census = <encounters>".into(),
        )),
        ("known" | "unknown", Some((c, _))) => Err(ctx.at(
            c,
            "census",
            "census is given but base_rate is not \"census\"".into(),
        )),
        (other, _) => Err(ctx.at(
            b,
            "base_rate",
            format!("\"{other}\" is not a known base-rate option"),
        )),
    }
}

fn trials(
    ctx: &Ctx,
    d: &RawDesign,
    record: RecordKind,
    conditions: &[Condition],
) -> Result<Vec<u32>, PlanError> {
    if d.trials.get_ref().is_empty() {
        return Err(ctx.at(
            &d.trials,
            "trials",
            "the list of trial counts is empty".into(),
        ));
    }
    let mut trials = Vec::new();
    for t in d.trials.get_ref() {
        let n = *t.get_ref();
        if !(2..=MAX_TRIALS).contains(&n) {
            return Err(ctx.at(
                t,
                "trials",
                format!("{n} trials is outside 2 to {MAX_TRIALS}"),
            ));
        }
        if record.fixes_rows() {
            for c in conditions {
                let split = split_trials(n as u32, c.presence);
                if split.present == 0 || split.absent == 0 {
                    return Err(ctx.at(
                        t,
                        "trials",
                        format!(
                            "{n} trials at presence {} (condition \"{}\") leaves {} present and {} absent trials; both must be at least 1",
                            c.presence, c.name, split.present, split.absent
                        ),
                    ));
                }
            }
        }
        if trials.contains(&(n as u32)) {
            return Err(ctx.at(t, "trials", format!("{n} is listed twice")));
        }
        trials.push(n as u32);
    }
    trials.sort_unstable();
    Ok(trials)
}
