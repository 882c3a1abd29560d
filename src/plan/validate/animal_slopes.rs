//! `[animals]` keys for variation beyond the intercepts: random slopes of the criterion shift
//! and the d′ change between conditions (with their correlations with the intercepts), a
//! log-normal σ and a beta lapse rate between animals. All default to 0; each bad value is
//! reported at its own line and key.

use super::{Ctx, shown};
use crate::design::Design;
use crate::design::goals::Slopes;
use crate::model::LapseSpec;
use crate::plan::PlanError;
use crate::plan::raw::RawAnimals;
use toml::Spanned;

/// Largest accepted SD of ln σ: beyond it a tenth of animals would have σ off by a factor
/// above 13, which no plan means.
const MAX_SD_LN_SIGMA: f64 = 2.0;

pub(super) fn slopes(
    ctx: &Ctx,
    a: &RawAnimals,
    designs: &[Design],
    lapse: Option<LapseSpec>,
) -> Result<Slopes, PlanError> {
    let sd = |v: &Option<Spanned<f64>>, key: &str| -> Result<f64, PlanError> {
        match v {
            None => Ok(0.0),
            Some(s) if s.get_ref().is_finite() && *s.get_ref() >= 0.0 => Ok(*s.get_ref()),
            Some(s) => Err(ctx.at(s, key, format!("{} is not an SD ≥ 0", shown(*s.get_ref())))),
        }
    };
    let correlation = |v: &Option<Spanned<f64>>, key: &str| -> Result<f64, PlanError> {
        match v {
            None => Ok(0.0),
            Some(r) if *r.get_ref() > -1.0 && *r.get_ref() < 1.0 => Ok(*r.get_ref()),
            Some(r) => Err(ctx.at(
                r,
                key,
                format!("{} is outside (−1, 1)", shown(*r.get_ref())),
            )),
        }
    };
    let slopes = Slopes {
        sd_criterion_shift: sd(&a.sd_criterion_shift, "sd_criterion_shift")?,
        correlation_criterion_shift: correlation(
            &a.correlation_criterion_shift,
            "correlation_criterion_shift",
        )?,
        sd_d_prime_change: sd(&a.sd_d_prime_change, "sd_d_prime_change")?,
        correlation_d_prime_change: correlation(
            &a.correlation_d_prime_change,
            "correlation_d_prime_change",
        )?,
        sd_ln_sigma: sd(&a.sd_ln_sigma, "sd_ln_sigma")?,
        sd_lapse_rate: sd(&a.sd_lapse_rate, "sd_lapse_rate")?,
    };
    // A slope is a change between conditions: it needs a design that has two.
    let several = designs.iter().any(|d| d.conditions.len() >= 2);
    for (value, key) in [
        (&a.sd_criterion_shift, "sd_criterion_shift"),
        (&a.sd_d_prime_change, "sd_d_prime_change"),
    ] {
        if let Some(v) = value.as_ref().filter(|v| *v.get_ref() > 0.0 && !several) {
            return Err(ctx.at(
                v,
                key,
                "no design has two or more conditions, so there is no change between conditions to vary".into(),
            ));
        }
    }
    if let Some(v) = a
        .sd_ln_sigma
        .as_ref()
        .filter(|v| *v.get_ref() > MAX_SD_LN_SIGMA)
    {
        return Err(ctx.at(
            v,
            "sd_ln_sigma",
            format!(
                "{} is above the largest SD of ln σ accepted ({MAX_SD_LN_SIGMA})",
                shown(*v.get_ref())
            ),
        ));
    }
    if let Some(v) = a.sd_lapse_rate.as_ref().filter(|v| *v.get_ref() > 0.0) {
        let rate = lapse.map_or(0.0, |l| l.rate);
        if rate <= 0.0 {
            return Err(ctx.at(
                v,
                "sd_lapse_rate",
                "the lapse rate varies around [observer] lapse_rate, which is 0 or not given"
                    .into(),
            ));
        }
        // A beta distribution with mean λ has variance below λ(1 − λ).
        let most = (rate * (1.0 - rate)).sqrt();
        if *v.get_ref() >= most {
            return Err(ctx.at(
                v,
                "sd_lapse_rate",
                format!(
                    "{} is not below √(λ(1 − λ)) = {} for lapse_rate λ = {}",
                    shown(*v.get_ref()),
                    shown(most),
                    shown(rate)
                ),
            ));
        }
    }
    Ok(slopes)
}
