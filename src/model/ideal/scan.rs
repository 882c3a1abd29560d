//! A sweep over payoff ratios R = (V_CR + C_FA)/(V_H + C_M): the optimal criterion and
//! the expected false-alarm-to-miss ratio at each, to show how an ideal observer trades
//! one error for the other as the stakes change.
//!
//! Only R enters β_opt = [(1 − p)/p]·R (Green & Swets 1966), so the scan takes ratios,
//! not four payoffs.

use super::observer::{false_alarm_to_miss, rates_at};
use super::{IdealError, check_d_prime, check_presence_rate, ln_beta_from_ratio};
use serde::Serialize;

/// The ideal observer at one payoff ratio. Flat fields so a row maps to one CSV line.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ScanRow {
    /// R = (V_CR + C_FA)/(V_H + C_M).
    pub payoff_ratio: f64,
    /// β_opt = [(1 − p)/p]·R.
    pub optimal_beta: f64,
    /// c_opt = ln β_opt / d′.
    pub optimal_criterion: f64,
    /// H = Φ(d′/2 − c_opt).
    pub hit_rate: f64,
    /// F = Φ(−d′/2 − c_opt).
    pub false_alarm_rate: f64,
    /// (1 − p)F / (p(1 − H)); `None` when no misses are expected in floating point.
    pub false_alarm_to_miss_ratio: Option<f64>,
}

/// The optimal criterion, H, F and false-alarm-to-miss ratio for each payoff ratio, in
/// the order given.
///
/// Errors: d′ not finite and > 0, presence rate outside (0, 1), or any ratio not finite
/// and > 0 (the first bad one is reported).
pub fn scan_payoff_ratios(
    d_prime: f64,
    presence_rate: f64,
    ratios: &[f64],
) -> Result<Vec<ScanRow>, IdealError> {
    let d = check_d_prime(d_prime)?;
    let p = check_presence_rate(presence_rate)?;
    ratios
        .iter()
        .map(|&ratio| {
            if !(ratio.is_finite() && ratio > 0.0) {
                return Err(IdealError::PayoffRatio(ratio));
            }
            let ln_beta = ln_beta_from_ratio(p, ratio);
            let c = ln_beta / d;
            let r = rates_at(d, c);
            Ok(ScanRow {
                payoff_ratio: ratio,
                optimal_beta: ln_beta.exp(),
                optimal_criterion: c,
                hit_rate: r.hit,
                false_alarm_rate: r.false_alarm,
                false_alarm_to_miss_ratio: false_alarm_to_miss(p, &r),
            })
        })
        .collect()
}

/// `count` values from `low` to `high` (both included) equally spaced in ln, e.g.
/// `log_spaced(0.1, 10.0, 5)` = 0.1, 0.316…, 1, 3.16…, 10. With `count` = 1 the grid is
/// `[low]`. Errors unless 0 < low ≤ high, both finite, and count ≥ 1.
pub fn log_spaced(low: f64, high: f64, count: usize) -> Result<Vec<f64>, IdealError> {
    if !(low.is_finite() && high.is_finite() && low > 0.0 && low <= high && count >= 1) {
        return Err(IdealError::Grid { low, high, count });
    }
    Ok(crate::spacing::log_grid(low, high, count))
}

#[cfg(test)]
mod tests {
    use super::super::{IdealObserver, Payoffs};
    use super::*;

    #[test]
    fn scan_agrees_with_observer_built_from_payoffs() {
        // Worked case 3 (Green & Swets 1966 formula; SciPy 1.17 values): payoffs 10, 5, 1, 1
        // give R = 2/15.
        let pay = Payoffs::new(10.0, 5.0, 1.0, 1.0).unwrap();
        let obs = IdealObserver::new(2.0, 0.1, pay).unwrap();
        let row = scan_payoff_ratios(2.0, 0.1, &[pay.ratio()]).unwrap()[0];
        let out = obs.optimal_outcome();
        assert!((row.optimal_beta - 1.2).abs() < 1e-12);
        assert!((row.optimal_criterion - out.criterion).abs() < 1e-15);
        assert_eq!(row.hit_rate, out.hit_rate);
        assert_eq!(row.false_alarm_rate, out.false_alarm_rate);
        assert_eq!(row.false_alarm_to_miss_ratio, out.false_alarm_to_miss_ratio);
    }

    #[test]
    fn dearer_false_alarms_lower_the_false_alarm_to_miss_ratio() {
        let ratios = log_spaced(0.01, 100.0, 41).unwrap();
        let rows = scan_payoff_ratios(1.5, 0.3, &ratios).unwrap();
        for pair in rows.windows(2) {
            assert!(pair[1].optimal_criterion > pair[0].optimal_criterion);
            assert!(pair[1].false_alarm_rate < pair[0].false_alarm_rate);
            let (a, b) = (
                pair[0].false_alarm_to_miss_ratio.unwrap(),
                pair[1].false_alarm_to_miss_ratio.unwrap(),
            );
            assert!(b < a, "ratio should fall as false alarms get dearer");
        }
    }

    #[test]
    fn log_grid_end_points_and_spacing() {
        let g = log_spaced(0.1, 10.0, 5).unwrap();
        assert_eq!(g.len(), 5);
        assert_eq!(g[0], 0.1);
        assert_eq!(g[4], 10.0);
        assert!((g[2] - 1.0).abs() < 1e-15);
        assert!((g[1] / g[0] - g[4] / g[3]).abs() < 1e-12);
        assert_eq!(log_spaced(2.0, 5.0, 1).unwrap(), vec![2.0]);
        for (lo, hi, n) in [
            (0.0, 1.0, 3),
            (2.0, 1.0, 3),
            (1.0, 2.0, 0),
            (1.0, f64::NAN, 2),
        ] {
            assert!(matches!(
                log_spaced(lo, hi, n),
                Err(IdealError::Grid { .. })
            ));
        }
    }

    #[test]
    fn scan_rejects_bad_inputs() {
        assert!(matches!(
            scan_payoff_ratios(1.0, 0.5, &[1.0, 0.0]),
            Err(IdealError::PayoffRatio(0.0))
        ));
        assert!(matches!(
            scan_payoff_ratios(0.0, 0.5, &[1.0]),
            Err(IdealError::DPrime(_))
        ));
        assert!(matches!(
            scan_payoff_ratios(1.0, 1.0, &[1.0]),
            Err(IdealError::PresenceRate(_))
        ));
        assert!(scan_payoff_ratios(1.0, 0.5, &[]).unwrap().is_empty());
    }
}
