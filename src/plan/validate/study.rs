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
    let values_source = match &s.values_source {
        None => None,
        Some(v) => Some(values_source(ctx, v)?),
    };
    Ok(Study {
        title: s.title.clone(),
        values_source,
        seed: seed as u64,
        experiments,
        confidence,
        rate_correction,
        alpha,
        max_trials,
    })
}

/// Longest `values_source` (a citation, not an essay: it is pasted into one sentence).
pub const MAX_VALUES_SOURCE: usize = 500;

/// The user's source of the hypothesised values: one line of 1 to 500 characters.
fn values_source(ctx: &Ctx, v: &toml::Spanned<String>) -> Result<String, PlanError> {
    let text = v.get_ref().trim();
    let problem = if text.is_empty() {
        Some("is empty".to_string())
    } else if text.chars().count() > MAX_VALUES_SOURCE {
        Some(format!(
            "has {} characters, more than {MAX_VALUES_SOURCE}",
            text.chars().count()
        ))
    } else if text.chars().any(char::is_control) {
        Some("holds a line break or another control character".to_string())
    } else {
        None
    };
    match problem {
        Some(p) => Err(ctx.at(v, "values_source", p)),
        None => Ok(text.to_string()),
    }
}
