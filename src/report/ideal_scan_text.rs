//! The payoff-ratio scan of the `vigil ideal` report: the table of the ideal observer at each
//! payoff ratio R, the point where false alarms and misses balance, and the one-line reading
//! of how the false-alarm-to-miss ratio moves over the scan.

use super::format::number;
use super::ideal_text::{PayoffScan, fa_per_miss, sig_n, sig_short};
use super::style::{new_table, right_align};
use crate::model::ideal::ScanRow;
use std::fmt::Write;

/// The scan table: R, β_opt, c_opt, H, F and false alarms per miss, one row per ratio.
pub(super) fn scan_table(out: &mut String, scan: &PayoffScan) {
    let _ = writeln!(
        out,
        "Payoff-ratio scan ({} ratios, log-spaced; d′ and presence rate as above):",
        scan.rows.len()
    );
    let mut t = new_table(vec![
        "R = (V_CR + C_FA)/(V_H + C_M)",
        "β_opt",
        "c_opt",
        "H",
        "F",
        "false alarms per miss",
    ]);
    for r in &scan.rows {
        t.add_row(vec![
            sig_n(r.payoff_ratio, 4),
            sig_n(r.optimal_beta, 4),
            number(r.optimal_criterion, 6),
            number(r.hit_rate, 6),
            number(r.false_alarm_rate, 6),
            fa_per_miss(r.false_alarm_to_miss_ratio, 4),
        ]);
    }
    right_align(&mut t, 0..6);
    let _ = writeln!(out, "{t}");
}

/// How a sequence moves: "fall at every step", "rise at every step", "never rise", "never
/// fall", or "move up and down". `None` (no expected misses) counts as +∞.
fn direction(values: &[Option<f64>]) -> &'static str {
    let v: Vec<f64> = values.iter().map(|x| x.unwrap_or(f64::INFINITY)).collect();
    let pairs = || v.windows(2).map(|w| (w[0], w[1]));
    if pairs().all(|(a, b)| b < a) {
        "fall at every step"
    } else if pairs().all(|(a, b)| b > a) {
        "rise at every step"
    } else if pairs().all(|(a, b)| b <= a) {
        "never rise"
    } else if pairs().all(|(a, b)| b >= a) {
        "never fall"
    } else {
        "move up and down"
    }
}

/// The payoff ratio at which false alarms and misses are expected equally often, by linear
/// interpolation of ln(FA per miss) against ln R between the two rows that bracket 1.
pub fn balance_ratio(rows: &[ScanRow]) -> Option<f64> {
    rows.windows(2).find_map(|w| {
        let (a, b) = (
            w[0].false_alarm_to_miss_ratio?,
            w[1].false_alarm_to_miss_ratio?,
        );
        if a == 1.0 {
            return Some(w[0].payoff_ratio);
        }
        if (a - 1.0) * (b - 1.0) > 0.0 || a <= 0.0 || b <= 0.0 || a == b {
            return None;
        }
        let t = a.ln() / (a.ln() - b.ln());
        let (ra, rb) = (w[0].payoff_ratio.ln(), w[1].payoff_ratio.ln());
        Some((ra + t * (rb - ra)).exp())
    })
}

pub(super) fn scan_reading(scan: &PayoffScan, own_ratio: f64) -> String {
    let rows = &scan.rows;
    let (Some(first), Some(last)) = (rows.first(), rows.last()) else {
        return "no payoff ratios to scan.".into();
    };
    if rows.len() == 1 {
        return format!(
            "one payoff ratio only (R = {}): {} false alarms per miss; give POINTS ≥ 2 to see how it moves.",
            sig_short(first.payoff_ratio),
            fa_per_miss(first.false_alarm_to_miss_ratio, 3)
        );
    }
    let ratios: Vec<Option<f64>> = rows.iter().map(|r| r.false_alarm_to_miss_ratio).collect();
    let mut s = format!(
        "as R rises from {} to {} (absent-trial outcomes weigh more against present-trial ones), c_opt moves \
         from {} to {} and the expected false alarms per miss {}, from {} to {}",
        sig_short(first.payoff_ratio),
        sig_short(last.payoff_ratio),
        super::format::signed(first.optimal_criterion, 2),
        super::format::signed(last.optimal_criterion, 2),
        direction(&ratios),
        fa_per_miss(first.false_alarm_to_miss_ratio, 3),
        fa_per_miss(last.false_alarm_to_miss_ratio, 3)
    );
    if let (Some(a), Some(b)) = (
        first.false_alarm_to_miss_ratio,
        last.false_alarm_to_miss_ratio,
    ) && a > 0.0
        && b > 0.0
        && a != b
    {
        let _ = write!(
            s,
            " (a {}-fold {} over a {}-fold rise in R)",
            sig_short((a / b).max(b / a)),
            if b < a { "fall" } else { "rise" },
            sig_short(last.payoff_ratio / first.payoff_ratio)
        );
    }
    match balance_ratio(rows) {
        Some(r) => {
            let _ = write!(
                s,
                "; false alarms and misses are expected equally often near R ≈ {}",
                sig_short(r)
            );
        }
        None => {
            let more = match last.false_alarm_to_miss_ratio {
                Some(r) if r < 1.0 => "misses outnumber false alarms",
                _ => "false alarms outnumber misses",
            };
            let _ = write!(s, "; {more} over the whole scan");
        }
    }
    let _ = write!(s, ". Your payoffs give R = {}.", sig_short(own_ratio));
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(r: f64, ratio: Option<f64>) -> ScanRow {
        ScanRow {
            payoff_ratio: r,
            optimal_beta: r,
            optimal_criterion: 0.0,
            hit_rate: 0.5,
            false_alarm_rate: 0.5,
            false_alarm_to_miss_ratio: ratio,
        }
    }

    #[test]
    fn balance_point_is_interpolated_on_log_scales() {
        // FA per miss 4 at R = 1 and 1/4 at R = 4: ln-linear crossing at R = 2.
        let rows = [row(1.0, Some(4.0)), row(4.0, Some(0.25))];
        assert!((balance_ratio(&rows).unwrap() - 2.0).abs() < 1e-12);
        assert_eq!(
            balance_ratio(&[row(1.0, Some(3.0)), row(2.0, Some(2.0))]),
            None
        );
        assert_eq!(balance_ratio(&[row(1.0, None), row(2.0, Some(0.5))]), None);
    }

    #[test]
    fn directions() {
        assert_eq!(
            direction(&[None, Some(2.0), Some(1.0)]),
            "fall at every step"
        );
        assert_eq!(direction(&[None, None, Some(1.0)]), "never rise");
        assert_eq!(direction(&[Some(1.0), Some(2.0)]), "rise at every step");
        assert_eq!(
            direction(&[Some(1.0), Some(2.0), Some(1.5)]),
            "move up and down"
        );
    }
}
