//! Splitting a trial count into present and absent trials by the presence rate.

use serde::Serialize;

/// Present and absent trials of one condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Split {
    pub present: u32,
    pub absent: u32,
}

/// Present trials = presence × trials rounded to the nearest integer, halves away from
/// zero (so 0.5 × 15 = 7.5 gives 8); absent trials are the rest. Deterministic, and the
/// total is always exactly `trials`.
pub fn split_trials(trials: u32, presence: f64) -> Split {
    let present = (presence * f64::from(trials))
        .round()
        .clamp(0.0, f64::from(trials)) as u32;
    Split {
        present,
        absent: trials - present,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounds_halves_away_from_zero() {
        assert_eq!(
            split_trials(15, 0.5),
            Split {
                present: 8,
                absent: 7
            }
        );
        assert_eq!(
            split_trials(40, 0.3),
            Split {
                present: 12,
                absent: 28
            }
        );
        assert_eq!(
            split_trials(10, 0.04),
            Split {
                present: 0,
                absent: 10
            }
        );
    }

    #[test]
    fn total_is_kept() {
        for t in 1..200 {
            for p in [0.01, 0.25, 0.333, 0.5, 0.9] {
                let s = split_trials(t, p);
                assert_eq!(s.present + s.absent, t);
            }
        }
    }
}
