//! `[study]`: seed, number of experiments, confidence, correction, α and the search ceiling.

use super::{
    Ctx, DEFAULT_ALPHA, DEFAULT_CONFIDENCE, DEFAULT_EXPERIMENTS, DEFAULT_MAX_TRIALS, MAX_TRIALS,
    open_unit,
};
use crate::plan::raw::{RawPlan, RawPrecision};
use crate::plan::{DEFAULT_MAX_EXPERIMENTS, MAX_EXPERIMENTS, PlanError, Precision, Study};
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
    let precision = match &s.precision {
        None => None,
        Some(p) => Some(precision(ctx, p, experiments)?),
    };
    Ok(Study {
        title: s.title.clone(),
        values_source,
        precision,
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

/// Bounds of `power_se`: below 0.0005 a power needs some 10⁶ experiments per scenario.
const POWER_SE_RANGE: (f64, f64) = (0.0005, 0.1);
/// Bounds of `mean_se_per_sd`: below 0.001 a mean needs 10⁶ usable datasets.
const MEAN_SE_RANGE: (f64, f64) = (0.001, 0.5);

/// `[study.precision]`: at least one target, each in its range, and a ceiling no lower
/// than the plan's `experiments` (the fewest a scenario runs).
fn precision(
    ctx: &Ctx,
    p: &toml::Spanned<RawPrecision>,
    experiments: u64,
) -> Result<Precision, PlanError> {
    let raw = p.get_ref();
    let target = |v: &Option<toml::Spanned<f64>>, key: &str, (lo, hi): (f64, f64)| match v {
        None => Ok(None),
        Some(t) if (lo..=hi).contains(t.get_ref()) => Ok(Some(*t.get_ref())),
        Some(t) => Err(ctx.at(t, key, format!("{} is outside {lo} to {hi}", t.get_ref()))),
    };
    let power_se = target(&raw.power_se, "power_se", POWER_SE_RANGE)?;
    let mean_se_per_sd = target(&raw.mean_se_per_sd, "mean_se_per_sd", MEAN_SE_RANGE)?;
    if power_se.is_none() && mean_se_per_sd.is_none() {
        return Err(ctx.at(
            p,
            "precision",
            "names no target: give power_se, mean_se_per_sd or both".to_string(),
        ));
    }
    let max_experiments = match &raw.max_experiments {
        None => DEFAULT_MAX_EXPERIMENTS.max(experiments),
        Some(m) if (experiments as i64..=MAX_EXPERIMENTS as i64).contains(m.get_ref()) => {
            *m.get_ref() as u64
        }
        Some(m) => {
            return Err(ctx.at(
                m,
                "max_experiments",
                format!(
                    "{} is outside {experiments} (the plan's experiments) to {MAX_EXPERIMENTS}",
                    m.get_ref()
                ),
            ));
        }
    };
    Ok(Precision {
        power_se,
        mean_se_per_sd,
        max_experiments,
    })
}
