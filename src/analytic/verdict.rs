//! The identifiability verdict in a form reports can print and serialise: parameter names a
//! reader knows (no condition suffix in single-condition designs), null directions as text,
//! profile-likelihood ranges, and one plain sentence.
//!
//! The verdict itself comes from [`crate::cells::identifiability::assess`]: rank at relative
//! eigenvalue tolerance [`RANK_TOLERANCE`] of the unit-diagonal information; weak when its
//! condition number exceeds [`WEAK_CONDITION_NUMBER`] or any two estimates correlate beyond
//! [`WEAK_CORRELATION`] in absolute value.

use serde::Serialize;

use crate::analytic::information::ScenarioInformation;
use crate::cells::identifiability::{self, NullDirection};
use crate::cells::parameter_map::{ParameterKind, ParameterMap};
use crate::cells::profile::Bound;

pub use crate::cells::identifiability::{RANK_TOLERANCE, WEAK_CONDITION_NUMBER, WEAK_CORRELATION};

/// Serialisable copy of [`identifiability::Verdict`], with null directions as text.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Verdict {
    Identified,
    Weak {
        condition_number: f64,
        max_abs_corr: f64,
    },
    NotIdentified {
        deficiency: usize,
        /// Each unseparable combination, e.g. `logit π − 0.35·c + 0.17·d′`: moving θ along
        /// it (in these proportions) leaves every expected count unchanged to first order.
        null_directions: Vec<String>,
        /// Plain names of the parameters involved, e.g. `d′`, `c`, `the base rate`.
        confounded: Vec<String>,
    },
}

impl Verdict {
    /// One word (or two) for tables.
    pub fn short(&self) -> &'static str {
        match self {
            Verdict::Identified => "identified",
            Verdict::Weak { .. } => "weak",
            Verdict::NotIdentified { .. } => "not identified",
        }
    }
}

/// Names of θ entries as a reader sees them.
#[derive(Debug, Clone, PartialEq)]
pub struct ParameterNames {
    /// Symbolic names in θ order: `d′`, `logit π` (single condition) or `c[low]` (several).
    pub symbols: Vec<String>,
    /// Plain names in θ order: `d′`, `the base rate`, `c of low`.
    pub plain: Vec<String>,
}

impl ParameterNames {
    /// Names for the map of a design with conditions named `conditions`.
    pub fn new(map: &ParameterMap, conditions: &[String]) -> Self {
        let single = conditions.len() == 1;
        let mut symbols = Vec::with_capacity(map.dim());
        let mut plain = Vec::with_capacity(map.dim());
        for (name, kind) in map.names().iter().zip(map.kinds()) {
            // θ names are `label[condition]` for per-condition entries, `label` when shared.
            let (label, condition) = match name.strip_suffix(']').and_then(|s| s.split_once('[')) {
                Some((l, c)) if conditions.iter().any(|x| x == c) => (l, Some(c)),
                _ => (name.as_str(), None),
            };
            let base = match kind {
                ParameterKind::DPrime => "d′",
                ParameterKind::Criterion => "c",
                ParameterKind::LnSigma => "σ",
                ParameterKind::LnGap(_) => "the criterion spacing",
                ParameterKind::LogitBaseRate => "the base rate",
            };
            match condition {
                Some(c) if !single => {
                    symbols.push(name.clone());
                    plain.push(format!("{base} of {c}"));
                }
                _ => {
                    symbols.push(label.to_string());
                    plain.push(base.to_string());
                }
            }
        }
        ParameterNames { symbols, plain }
    }
}

/// Converts the eigen-analysis verdict, naming parameters with `names`.
pub fn from_assessment(
    v: &identifiability::Verdict,
    map: &ParameterMap,
    names: &ParameterNames,
) -> Verdict {
    match v {
        identifiability::Verdict::Identified => Verdict::Identified,
        identifiability::Verdict::Weak {
            condition_number,
            max_abs_corr,
        } => Verdict::Weak {
            condition_number: *condition_number,
            max_abs_corr: *max_abs_corr,
        },
        identifiability::Verdict::NotIdentified {
            deficiency,
            null_directions,
        } => {
            // Involved parameters in θ order (d′, c, …, the base rate), each named once.
            let mut involved: Vec<usize> = null_directions
                .iter()
                .flat_map(|d| d.coefficients.iter().filter_map(|(n, _)| map.index_of(n)))
                .collect();
            involved.sort_unstable();
            let mut confounded: Vec<String> = Vec::new();
            for i in involved {
                if !confounded.contains(&names.plain[i]) {
                    confounded.push(names.plain[i].clone());
                }
            }
            let texts = null_directions
                .iter()
                .map(|d| combination(d, map, names))
                .collect();
            Verdict::NotIdentified {
                deficiency: *deficiency,
                null_directions: texts,
                confounded,
            }
        }
    }
}

/// `logit π − 0.35·c + 0.17·d′`: largest coefficient 1 first, the rest by size.
fn combination(d: &NullDirection, map: &ParameterMap, names: &ParameterNames) -> String {
    let mut out = String::new();
    for (k, (name, c)) in d.coefficients.iter().enumerate() {
        let symbol = map
            .index_of(name)
            .map_or(name.as_str(), |i| names.symbols[i].as_str());
        let sign = if *c < 0.0 { "−" } else { "+" };
        if k == 0 {
            if *c < 0.0 {
                out.push('−');
            }
        } else {
            out.push_str(&format!(" {sign} "));
        }
        if (c.abs() - 1.0).abs() < 0.005 {
            out.push_str(symbol);
        } else {
            out.push_str(&format!("{:.2}·{symbol}", c.abs()));
        }
    }
    out
}

/// One end of a profile-likelihood range.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum RangeEnd {
    /// The profile likelihood crosses the cutoff here.
    At { value: f64 },
    /// No crossing up to this edge of the search window: unbounded as far as was searched.
    BeyondWindow { edge: f64 },
}

impl From<Bound> for RangeEnd {
    fn from(b: Bound) -> Self {
        match b {
            Bound::At(value) => RangeEnd::At { value },
            Bound::BeyondWindow { edge } => RangeEnd::BeyondWindow { edge },
        }
    }
}

/// Profile-likelihood range of d′ or c (first condition) on the expected data.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProfileRange {
    /// `d′` or `c`.
    pub parameter: String,
    /// The hypothesised value (the maximum of the expected-data likelihood).
    pub truth: f64,
    pub level: f64,
    pub lower: RangeEnd,
    pub upper: RangeEnd,
    /// Inner maximisations that hit the iteration limit or failed numerically.
    pub inner_failures: usize,
}

impl ProfileRange {
    /// "d′ from 0.82 to 2.41", "d′ up to 1.79, unbounded below (no limit down to −8.40, the
    /// edge of the search window)", "c unbounded both ways (no limit within −10.30 … 9.70, the
    /// search window)".
    pub fn describe(&self) -> String {
        let p = &self.parameter;
        match (self.lower, self.upper) {
            (RangeEnd::At { value: lo }, RangeEnd::At { value: hi }) => {
                format!("{p} from {lo:.2} to {hi:.2}")
            }
            (RangeEnd::BeyondWindow { edge }, RangeEnd::At { value: hi }) => format!(
                "{p} up to {hi:.2}, unbounded below (no limit down to {edge:.2}, the edge of the search window)"
            ),
            (RangeEnd::At { value: lo }, RangeEnd::BeyondWindow { edge }) => format!(
                "{p} from {lo:.2}, unbounded above (no limit up to {edge:.2}, the edge of the search window)"
            ),
            (RangeEnd::BeyondWindow { edge: lo }, RangeEnd::BeyondWindow { edge: hi }) => format!(
                "{p} unbounded both ways (no limit within {lo:.2} … {hi:.2}, the search window)"
            ),
        }
    }
}

/// One sentence in plain words, e.g. "identified", "weakly identified: condition number
/// 3.2e6, |r(d′, c)| = 0.97", or "not identified: d′, c and the base rate cannot be told
/// apart — moving them together along logit π − 0.35·c + 0.17·d′ leaves every expected count
/// unchanged".
pub fn plain_verdict(info: &ScenarioInformation) -> String {
    match &info.verdict {
        Verdict::Identified => "identified".to_string(),
        Verdict::Weak {
            condition_number,
            max_abs_corr,
        } => {
            let mut s = format!(
                "weakly identified: condition number {}",
                condition_text(*condition_number)
            );
            let r = info.corr_d_prime_criterion.map(f64::abs);
            if let Some(r) = r {
                s.push_str(&format!(", |r(d′, c)| = {r:.2}"));
            }
            if r.is_none_or(|r| (r - max_abs_corr).abs() > 0.005) {
                s.push_str(&format!(
                    ", largest |correlation| between estimates {max_abs_corr:.2}"
                ));
            }
            s
        }
        Verdict::NotIdentified {
            null_directions,
            confounded,
            ..
        } => format!(
            "not identified: {} cannot be told apart — moving them together along {} leaves \
             every expected count unchanged",
            join_words(confounded),
            null_directions.join("; or along ")
        ),
    }
}

/// A condition number for text: 1 decimal below 10⁴, else `3.2e6`; `∞` when singular.
pub fn condition_text(k: f64) -> String {
    if !k.is_finite() {
        "∞".to_string()
    } else if k < 1e4 {
        format!("{k:.1}")
    } else {
        format!("{k:.1e}")
    }
}

/// "a", "a and b", "a, b and c".
pub fn join_words(words: &[String]) -> String {
    match words {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_and_numbers() {
        let w = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        assert_eq!(
            join_words(&w(&["d′", "c", "the base rate"])),
            "d′, c and the base rate"
        );
        assert_eq!(join_words(&w(&["d′"])), "d′");
        assert_eq!(condition_text(3.2e6), "3.2e6");
        assert_eq!(condition_text(12.34), "12.3");
        assert_eq!(condition_text(f64::INFINITY), "∞");
    }

    #[test]
    fn unbounded_ends_say_so() {
        let r = ProfileRange {
            parameter: "c".into(),
            truth: -0.3,
            level: 0.95,
            lower: RangeEnd::At { value: -1.0 },
            upper: RangeEnd::BeyondWindow { edge: 9.7 },
            inner_failures: 0,
        };
        assert_eq!(
            r.describe(),
            "c from -1.00, unbounded above (no limit up to 9.70, the edge of the search window)"
        );
    }
}
