//! Number formatting shared by the text outputs.

use crate::engine::{Figure, Share};

/// A figure as "value ± mc_se" with `digits` decimals; exact figures show no ±.
pub fn figure(f: &Figure, digits: usize) -> String {
    if !f.value.is_finite() {
        return "–".into();
    }
    if f.mc_se == 0.0 {
        format!("{:.digits$}", f.value)
    } else {
        format!("{:.digits$} ± {:.digits$}", f.value, f.mc_se)
    }
}

/// A plain number with `digits` decimals, or a dash when undefined.
pub fn number(x: f64, digits: usize) -> String {
    if x.is_finite() {
        format!("{x:.digits$}")
    } else {
        "–".into()
    }
}

/// A share as a percentage with its Wilson interval, e.g. "94.8% (93.7–95.7)".
pub fn share(s: &Share) -> String {
    if !s.value.is_finite() {
        return "–".into();
    }
    if s.low == s.high {
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
    }
}
