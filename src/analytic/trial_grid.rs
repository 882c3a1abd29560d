//! Which trial counts a scan of a design covers: a log-spaced grid between two counts, plus the
//! counts the plan lists (so the scan's rows line up with `vigil run`), keeping only counts the
//! design can be run at.

use crate::design::{Design, split_trials};

/// Default number of log-spaced counts per design.
pub const DEFAULT_POINTS: usize = 40;
/// The default grid runs up to this multiple of the design's largest listed count.
pub const DEFAULT_REACH: u32 = 4;
/// Smallest trial count a design accepts (as in the plan format).
pub const MIN_TRIALS: u32 = 2;

/// `points` integers from `from` to `to`, spaced evenly on a log scale, rounded to the nearest
/// integer and deduplicated (so small ranges give fewer counts). Both ends are included.
pub fn log_spaced(from: u32, to: u32, points: usize) -> Vec<u32> {
    let (lo, hi) = (from.min(to), from.max(to));
    let mut out: Vec<u32> = crate::spacing::log_grid(f64::from(lo), f64::from(hi), points)
        .into_iter()
        .map(|x| (x.round() as u32).clamp(lo, hi))
        .collect();
    out.dedup();
    out
}

/// Whether `design` can be run at `trials` per condition: at least [`MIN_TRIALS`], and for full
/// (or two-choice) records every condition's split leaves at least one present and one absent trial.
pub fn fits_design(design: &Design, trials: u32) -> bool {
    trials >= MIN_TRIALS
        && (!design.record.fixes_rows()
            || design.conditions.iter().all(|c| {
                let s = split_trials(trials, c.presence);
                s.present > 0 && s.absent > 0
            }))
}

/// The design's default range: its smallest listed count to [`DEFAULT_REACH`] × its largest.
pub fn default_range(design: &Design) -> (u32, u32) {
    let lo = design.trials.iter().copied().min().unwrap_or(MIN_TRIALS);
    let hi = design.trials.iter().copied().max().unwrap_or(lo);
    (lo, hi.saturating_mul(DEFAULT_REACH))
}

/// The counts to scan for `design`: log-spaced from `from` to `to` (each defaulting to
/// [`default_range`]; a lone `from` above the default end, or a lone `to` below the default
/// start, moves the other end with it), merged with the listed counts inside the range,
/// increasing, without counts the design cannot be run at.
pub fn design_grid(design: &Design, from: Option<u32>, to: Option<u32>, points: usize) -> Vec<u32> {
    let (lo, hi) = default_range(design);
    let (from, to) = match (from, to) {
        (Some(f), Some(t)) => (f, t),
        (Some(f), None) => (f, hi.max(f)),
        (None, Some(t)) => (lo.min(t), t),
        (None, None) => (lo, hi),
    };
    let mut out = log_spaced(from, to, points);
    let (lo, hi) = (from.min(to), from.max(to));
    out.extend(design.trials.iter().filter(|&&n| (lo..=hi).contains(&n)));
    out.sort_unstable();
    out.dedup();
    out.retain(|&n| fits_design(design, n));
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::{BaseRate, Condition, RecordKind, Response};

    fn design(presence: f64, record: RecordKind) -> Design {
        Design {
            name: "d".into(),
            presence,
            trials: vec![50, 100, 400],
            response: Response::YesNo,
            record,
            base_rate: BaseRate::Known,
            conditions: vec![Condition {
                name: "d".into(),
                presence,
                d_prime: 1.0,
                criterion: 0.0,
            }],
            shared: Vec::new(),
        }
    }

    #[test]
    fn log_spacing_keeps_both_ends_and_no_repeats() {
        let g = log_spaced(50, 1600, 40);
        assert_eq!(g.first(), Some(&50));
        assert_eq!(g.last(), Some(&1600));
        assert_eq!(g.len(), 40);
        assert!(g.windows(2).all(|w| w[0] < w[1]));
        // 2 … 5 has only four integers: duplicates collapse.
        assert_eq!(log_spaced(2, 5, 40), [2, 3, 4, 5]);
        assert_eq!(log_spaced(7, 7, 40), [7]);
        assert_eq!(log_spaced(10, 20, 1), [10]);
    }

    #[test]
    fn default_grid_spans_to_four_times_the_largest_listed_count() {
        let g = design_grid(&design(0.3, RecordKind::Full), None, None, DEFAULT_POINTS);
        assert_eq!(g.first(), Some(&50));
        assert_eq!(g.last(), Some(&1600));
        for n in [50, 100, 400] {
            assert!(g.contains(&n), "listed count {n} missing");
        }
    }

    #[test]
    fn counts_with_an_empty_split_are_skipped() {
        // presence 0.1: 2, 3 and 4 trials give no present trial (0.4 rounds to 0).
        let full = design(0.1, RecordKind::Full);
        let g = design_grid(&full, Some(2), Some(12), 40);
        assert_eq!(g.first(), Some(&5));
        assert!(!fits_design(&full, 4));
        assert!(fits_design(&design(0.1, RecordKind::ErrorTotals), 4));
        assert!(!fits_design(&design(0.5, RecordKind::ErrorTotals), 1));
    }

    #[test]
    fn a_lone_end_moves_the_other_with_it() {
        let d = design(0.5, RecordKind::Full);
        assert_eq!(design_grid(&d, Some(5000), None, 3), [5000]);
        assert_eq!(design_grid(&d, None, Some(10), 2), [10]);
    }
}
