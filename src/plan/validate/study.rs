//! `[study]`: seed, number of experiments, confidence, correction, α and the search ceiling.

use super::{
    Ctx, DEFAULT_ALPHA, DEFAULT_CONFIDENCE, DEFAULT_EXPERIMENTS, DEFAULT_MAX_TRIALS, MAX_TRIALS,
    open_unit,
};
use crate::plan::raw::RawPlan;
use crate::plan::{PlanError, Study};
use crate::vocab::RateCorrection;

pub(super) fn study(ctx: &Ctx, raw: &RawPlan) -> Result<Study, PlanError> {
    let s = &raw.study;
    let seed = *s.seed.get_ref();
    if seed < 0 {
        return Err(ctx.at(&s.seed, "seed", format!("{seed} is negative")));
    }
    let experiments = match &s.experiments {
        None => DEFAULT_EXPERIMENTS,
        Some(e) if (1..=crate::plan::MAX_EXPERIMENTS as i64).contains(e.get_ref()) => {
            *e.get_ref() as u64
        }
        Some(e) => {
            return Err(ctx.at(
                e,
                "experiments",
                format!(
                    "{} is not a number of experiments from 1 to {} (10⁸)",
                    e.get_ref(),
                    crate::plan::MAX_EXPERIMENTS
                ),
            ));
        }
    };
    let confidence = match &s.confidence {
        None => DEFAULT_CONFIDENCE,
        Some(c) if open_unit(*c.get_ref()) => *c.get_ref(),
        Some(c) => {
            return Err(ctx.at(
                c,
                "confidence",
                format!("{} is outside (0, 1)", c.get_ref()),
            ));
        }
    };
    let rate_correction = match &s.rate_correction {
        None => RateCorrection::LogLinear,
        Some(r) => RateCorrection::from_name(r.get_ref()).ok_or_else(|| {
            ctx.at(
                r,
                "rate_correction",
                format!("\"{}\" is not a known correction", r.get_ref()),
            )
        })?,
    };
    let alpha = match &s.alpha {
        None => DEFAULT_ALPHA,
        Some(a) if open_unit(*a.get_ref()) => *a.get_ref(),
        Some(a) => return Err(ctx.at(a, "alpha", format!("{} is outside (0, 1)", a.get_ref()))),
    };
    let max_trials = match &s.max_trials {
        None => DEFAULT_MAX_TRIALS,
        Some(m) if (2..=MAX_TRIALS).contains(m.get_ref()) => *m.get_ref() as u32,
        Some(m) => {
            return Err(ctx.at(
                m,
                "max_trials",
                format!("{} is outside 2 to {MAX_TRIALS}", m.get_ref()),
            ));
        }
    };
    Ok(Study {
        title: s.title.clone(),
        seed: seed as u64,
        experiments,
        confidence,
        rate_correction,
        alpha,
        max_trials,
    })
}
