//! Splitting a trial count into present and absent trials by the presence rate.

use serde::Serialize;

/// Present and absent trials of one condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Split {
    pub present: u32,
    pub absent: u32,
}

/// Present trials = presence × trials rounded to the nearest integer, exact halves up (so
/// 0.5 × 15 = 7.5 gives 8 and 0.7 × 45 = 31.5 gives 32); absent trials are the rest.
///
/// The product is taken in exact integer arithmetic on the shortest decimal that reads back
/// as `presence` — the decimal the plan author wrote, up to 17 significant digits — not on
/// its binary approximation, where 0.7 × 45 is 31.499999999999996 and would round down.
/// Deterministic, and the total is always exactly `trials`.
pub fn split_trials(trials: u32, presence: f64) -> Split {
    let present = present_trials(trials, presence);
    Split {
        present,
        absent: trials - present,
    }
}

/// ⌊presence·trials + ½⌋ with presence = digits × 10^−k read from its shortest decimal form.
fn present_trials(trials: u32, presence: f64) -> u32 {
    if presence.is_nan() || presence <= 0.0 {
        return 0;
    }
    if presence >= 1.0 {
        return trials;
    }
    let Some((digits, k)) = shortest_decimal(presence) else {
        return 0;
    };
    // digits < 10^17 and trials < 2^32, so the product stays below 4.3·10^26: with k ≥ 27
    // it is under ½ and rounds to 0, and below that 2·10^k and the product fit in u128.
    if k >= 27 {
        return 0;
    }
    let scale = 10u128.pow(k);
    let twice = 2 * digits * u128::from(trials) + scale;
    let present = twice / (2 * scale);
    present.min(u128::from(trials)) as u32
}

/// A number in (0, 1) as (digits, k) with x = digits × 10^−k, from Rust's shortest
/// round-trip formatting (`{:e}`, e.g. `3.5e-1` → (35, 2)).
fn shortest_decimal(x: f64) -> Option<(u128, u32)> {
    let text = format!("{x:e}");
    let (mantissa, exponent) = text.split_once('e')?;
    let exponent: i32 = exponent.parse().ok()?;
    let (whole, fraction) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    let digits: u128 = format!("{whole}{fraction}").parse().ok()?;
    let k = fraction.len() as i32 - exponent;
    u32::try_from(k).ok().map(|k| (digits, k))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rounds_halves_up() {
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
    fn exact_halves_round_up_despite_binary_approximations() {
        // Each product is an exact half in decimal but falls just below it in binary
        // floating point (0.7 × 45 = 31.499999999999996), which rounded down before.
        for (trials, presence, present) in
            [(45, 0.7, 32), (85, 0.7, 60), (90, 0.35, 32), (50, 0.57, 29)]
        {
            assert_eq!(
                split_trials(trials, presence),
                Split {
                    present,
                    absent: trials - present
                },
                "{presence} × {trials}"
            );
        }
    }

    #[test]
    fn agrees_with_integer_rounding_of_every_two_and_three_digit_presence() {
        // Independent check: presence j/10^d as a fraction of integers, rounded half up
        // by integer division, for every j and every trial count up to 400.
        for (d, scale) in [(2u32, 100u64), (3, 1000)] {
            for j in 1..scale {
                let presence: f64 = format!("0.{j:0width$}", width = d as usize)
                    .parse()
                    .unwrap();
                for t in 1..=400u64 {
                    let expected = (2 * j * t + scale) / (2 * scale);
                    assert_eq!(
                        u64::from(split_trials(t as u32, presence).present),
                        expected,
                        "{presence} × {t}"
                    );
                }
            }
        }
    }

    #[test]
    fn extreme_presences_stay_in_range() {
        for p in [
            1e-300,
            5e-324,
            1e-17,
            0.999_999_999_999_999_9,
            f64::NAN,
            -0.5,
            1.5,
        ] {
            for t in [1, 2, 45, 1_000_000, u32::MAX] {
                let s = split_trials(t, p);
                assert_eq!(s.present + s.absent, t);
            }
        }
        assert_eq!(split_trials(u32::MAX, 0.5).present, 2_147_483_648);
        assert_eq!(split_trials(10, 1e-300).present, 0);
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
