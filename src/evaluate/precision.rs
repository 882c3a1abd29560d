//! The precision stop: whether a scenario's tally is as precise as `[study.precision]` asks.
//!
//! A power's Monte Carlo SE is taken as the half-width of its 95% Wilson interval ÷ 1.96:
//! that is √(p(1 − p)/n) for a power away from 0 and 1, and, unlike it, stays above 0 when
//! every dataset (or none) rejects, so a run of 256 experiments that all reject is not
//! taken for an exact one. A mean's MC SE is the SD of its estimates ÷ √(usable datasets),
//! the same figure the report prints beside it.

use crate::engine::tally::EstimateTally;
use crate::infer::{wilson_interval, z_critical};
use crate::plan::Precision;

/// Level of the Wilson interval the power SE is read from (the report's own).
const LEVEL: f64 = crate::engine::summary::MC_LEVEL;

/// Whether every figure `precision` names is at least as precise as it asks. A target with
/// nothing to measure (no hypothesis, for `power_se`) is met; a figure with no usable
/// dataset yet is not.
pub fn precise_enough(precision: &Precision, tally: &EstimateTally) -> bool {
    let powers_ok = precision.power_se.is_none_or(|limit| {
        let n = tally.datasets.total.round() as u64;
        tally.tests.iter().all(|t| {
            [t.wald, t.likelihood_ratio]
                .iter()
                .all(|&x| share_se(x.round() as u64, n).is_some_and(|se| se <= limit))
        })
    });
    let means_ok = precision.mean_se_per_sd.is_none_or(|fraction| {
        tally.quantities.iter().all(|q| {
            let se = q.estimate.mc_se(false);
            let sd = q.estimate.variance(false).sqrt();
            se.is_finite() && sd.is_finite() && se <= fraction * sd
        })
    });
    powers_ok && means_ok
}

/// The Monte Carlo SE of a share `x / n` (Wilson half-width ÷ z); `None` before any dataset.
pub fn share_se(x: u64, n: u64) -> Option<f64> {
    let interval = wilson_interval(x, n, LEVEL).ok()?;
    Some((interval.upper - interval.lower) / 2.0 / z_critical(LEVEL))
}
