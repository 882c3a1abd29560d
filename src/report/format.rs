//! Number formatting shared by the text outputs: the one place that decides how a number
//! looks. Fixed decimals for ordinary magnitudes, scientific notation (`4.05e305`) where
//! fixed notation would run to many digits, and a dash — never `NaN` or `inf` — for a
//! value that could not be computed (the sentence around it says why).

use crate::engine::{Figure, Share};

/// Magnitudes from here up are written in scientific notation (a fixed number would be
/// eight or more digits long).
pub const SCIENTIFIC_FROM: f64 = 1e7;
/// Magnitudes below this (but not 0) are written in scientific notation by [`plain`] and
/// [`significant`].
pub const SCIENTIFIC_BELOW: f64 = 1e-4;

/// What stands for a number that could not be computed.
pub const UNDEFINED: &str = "–";

/// `x` to `n` significant digits; scientific notation outside 1e-4 … 1e7; "–" if undefined.
pub fn significant(x: f64, n: usize) -> String {
    if !x.is_finite() {
        return UNDEFINED.into();
    }
    if x == 0.0 {
        return "0".into();
    }
    let e = x.abs().log10().floor() as i32;
    if !(-4..7).contains(&e) {
        let m = n.saturating_sub(1);
        return format!("{x:.m$e}");
    }
    let decimals = (n as i32 - 1 - e).max(0) as usize;
    format!("{x:.decimals$}")
}

/// A value the user gave, echoed back: its shortest exact spelling (`0.25`, `1e-300`),
/// scientific outside 1e-4 … 1e7 so it never runs to hundreds of digits.
pub fn plain(x: f64) -> String {
    if !x.is_finite() {
        return UNDEFINED.into();
    }
    if x == 0.0 || (SCIENTIFIC_BELOW..SCIENTIFIC_FROM).contains(&x.abs()) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// An amount such as a cost, to the unit ("5750", "20000000"); beyond 1e12, four
/// significant digits in scientific notation.
pub fn whole(x: f64) -> String {
    if !x.is_finite() {
        UNDEFINED.into()
    } else if x.abs() < 1e12 {
        format!("{x:.0}")
    } else {
        significant(x, 4)
    }
}

/// `x` with a sign and `digits` decimals ("+0.30"), as [`number`] otherwise.
pub fn signed(x: f64, digits: usize) -> String {
    if x.is_finite() && x.abs() < SCIENTIFIC_FROM {
        format!("{x:+.digits$}")
    } else if x.is_finite() {
        format!("{x:+.digits$e}")
    } else {
        UNDEFINED.into()
    }
}

/// A figure as "value ± mc_se" with `digits` decimals; exact figures show no ±, and an
/// undefined Monte Carlo error is left out rather than shown as "± –".
pub fn figure(f: &Figure, digits: usize) -> String {
    if !f.value.is_finite() {
        return UNDEFINED.into();
    }
    if f.mc_se == 0.0 || !f.mc_se.is_finite() {
        number(f.value, digits)
    } else {
        format!("{} ± {}", number(f.value, digits), number(f.mc_se, digits))
    }
}

/// A number with `digits` decimals; from 1e7 up in scientific notation with `digits`
/// decimals of the mantissa; a dash when undefined.
pub fn number(x: f64, digits: usize) -> String {
    if !x.is_finite() {
        UNDEFINED.into()
    } else if x.abs() < SCIENTIFIC_FROM {
        format!("{x:.digits$}")
    } else {
        format!("{x:.digits$e}")
    }
}

/// A share as a percentage with its Wilson interval, e.g. "94.8% (93.7–95.7)".
pub fn share(s: &Share) -> String {
    if !s.value.is_finite() {
        return UNDEFINED.into();
    }
    if s.low == s.high || !s.low.is_finite() || !s.high.is_finite() {
        format!("{:.1}%", 100.0 * s.value)
    } else {
        format!(
            "{:.1}% ({:.1}–{:.1})",
            100.0 * s.value,
            100.0 * s.low,
            100.0 * s.high
        )
    }
}

/// A share as a bare percentage.
pub fn percent(x: f64) -> String {
    if x.is_finite() {
        format!("{:.1}%", 100.0 * x)
    } else {
        "–".into()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats() {
        let f = Figure {
            value: 1.23456,
            mc_se: 0.0123,
        };
        assert_eq!(figure(&f, 3), "1.235 ± 0.012");
        assert_eq!(
            figure(
                &Figure {
                    value: 1.5,
                    mc_se: 0.0
                },
                2
            ),
            "1.50"
        );
        let s = Share {
            value: 0.948,
            low: 0.937,
            high: 0.957,
        };
        assert_eq!(share(&s), "94.8% (93.7–95.7)");
        assert_eq!(number(f64::NAN, 2), "–");
        assert_eq!(number(4.054651e305, 2), "4.05e305");
        assert_eq!(number(-2.5, 1), "-2.5");
        assert_eq!(signed(0.3, 2), "+0.30");
        assert_eq!(signed(f64::INFINITY, 2), "–");
        assert_eq!(plain(1e-300), "1e-300");
        assert_eq!(plain(1e308), "1e308");
        assert_eq!(plain(0.25), "0.25");
        assert_eq!(whole(2e7), "20000000");
        assert_eq!(whole(3e300), "3.000e300");
        assert_eq!(plain(4800.0), "4800");
        assert_eq!(significant(123456789.0, 3), "1.23e8");
        assert_eq!(significant(0.012345, 3), "0.0123");
        let no_se = Figure {
            value: 1.0,
            mc_se: f64::NAN,
        };
        assert_eq!(figure(&no_se, 2), "1.00");
    }
}
