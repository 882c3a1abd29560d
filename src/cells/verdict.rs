//! The identifiability verdict in a form reports can print and serialise: parameter names a
//! reader knows (no condition suffix in single-condition designs), null directions as
//! formulas, and profile-likelihood ranges. Typed data only: the sentences are written in
//! `report::identification_text`.
//!
//! The verdict itself comes from [`crate::cells::identifiability::assess`]: rank at relative
//! eigenvalue tolerance [`RANK_TOLERANCE`] of the unit-diagonal information; weak when its
//! condition number exceeds [`WEAK_CONDITION_NUMBER`] or any two estimates correlate beyond
//! [`WEAK_CORRELATION`] in absolute value.

use serde::Serialize;

use crate::cells::identifiability::{self, NullDirection};
use crate::cells::parameter_map::{ParameterKind, ParameterMap};
use crate::cells::profile::Bound;

pub use crate::cells::identifiability::{RANK_TOLERANCE, WEAK_CONDITION_NUMBER, WEAK_CORRELATION};

/// Serialisable copy of [`identifiability::EigenVerdict`], with null directions as text.
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
    v: &identifiability::EigenVerdict,
    map: &ParameterMap,
    names: &ParameterNames,
) -> Verdict {
    match v {
        identifiability::EigenVerdict::Identified => Verdict::Identified,
        identifiability::EigenVerdict::Weak {
            condition_number,
            max_abs_corr,
        } => Verdict::Weak {
            condition_number: *condition_number,
            max_abs_corr: *max_abs_corr,
        },
        identifiability::EigenVerdict::NotIdentified {
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
    /// The range reaches the smallest value the parameter can take (d′ ≥ 0 in every plan):
    /// every value from here up to the other end is consistent with the data.
    Floor { value: f64 },
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

/// What the expected information says about a scenario that is not plainly identified,
/// carried beside its simulated figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Identification {
    pub verdict: Verdict,
    /// r(d̂′, ĉ) of the first condition from the expected information, when defined.
    pub corr_d_prime_criterion: Option<f64>,
    /// Profile-likelihood ranges of d′ and c (filled when not identified).
    pub ranges: Vec<ProfileRange>,
}
