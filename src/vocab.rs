//! The vocabulary every layer shares, at the bottom of the import graph: what is estimated
//! ([`Quantity`]), which way a test looks ([`Sided`]) and the rule for rates of 0 or 1
//! ([`RateCorrection`]). Types only (and their names); behaviour lives with the layer that
//! owns it (`infer` computes p-values, `fit` applies corrections).

use serde::{Deserialize, Serialize};

/// Largest number of ordered response categories a condition, a table or a plan's scale may
/// have: the one limit the plan validator, the rating fit's fixed-size arrays and the general
/// model share.
pub const MAX_CATEGORIES: usize = 12;

/// A quantity the report summarises.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Quantity {
    DPrime,
    Criterion,
    Sigma,
    Slope,
    DA,
    Az,
    BaseRate,
    /// Proportion correct of an unbiased two-choice observer, Φ(d′/√2).
    PercentCorrect,
}

impl Quantity {
    /// Label for tables.
    pub fn label(self) -> &'static str {
        match self {
            Self::DPrime => "d′",
            Self::Criterion => "c",
            Self::Sigma => "σ",
            Self::Slope => "zROC slope",
            Self::DA => "d_a",
            Self::Az => "A_z",
            Self::BaseRate => "π",
            Self::PercentCorrect => "p_c",
        }
    }

    /// Label of this quantity in a condition, e.g. `c[low]`; the bare label when the
    /// quantity belongs to no single condition. The one rule every table uses.
    pub fn label_in(self, condition: Option<&str>) -> String {
        match condition {
            Some(c) => format!("{}[{c}]", self.label()),
            None => self.label().to_string(),
        }
    }

    /// Machine name in a condition, e.g. `criterion[low]`.
    pub fn key_in(self, condition: Option<&str>) -> String {
        match condition {
            Some(c) => format!("{}[{c}]", self.key()),
            None => self.key().to_string(),
        }
    }

    /// Machine name for CSV and JSON.
    pub fn key(self) -> &'static str {
        match self {
            Self::DPrime => "d_prime",
            Self::Criterion => "criterion",
            Self::Sigma => "sigma",
            Self::Slope => "zroc_slope",
            Self::DA => "d_a",
            Self::Az => "a_z",
            Self::BaseRate => "base_rate",
            Self::PercentCorrect => "p_correct",
        }
    }
}

/// Direction of the alternative hypothesis for a parameter θ against its null value θ₀.
/// Serialized with the plan's own spelling (`two-sided`, `greater`, `less`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Sided {
    /// H₁: θ ≠ θ₀.
    TwoSided,
    /// H₁: θ > θ₀.
    Greater,
    /// H₁: θ < θ₀.
    Less,
}

/// A named rule for rates of 0 or 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RateCorrection {
    /// Add ½ to every cell, extreme or not: rate = (x + ½)/(n + 1) (Hautus 1995).
    LogLinear,
    /// Only extreme rates move: 0 → 1/(2n), 1 → 1 − 1/(2n) (Macmillan & Kaplan 1985).
    HalfN,
    /// No correction: a dataset with a rate of 0 or 1 is degenerate and left out.
    None,
}

impl RateCorrection {
    /// Names accepted in plan files, in the order shown to users.
    pub const NAMES: [&'static str; 3] = ["log-linear", "half-n", "none"];

    /// Parses a plan value; `None` when the name is not one of [`Self::NAMES`].
    pub fn from_name(name: &str) -> Option<Self> {
        match name {
            "log-linear" => Some(Self::LogLinear),
            "half-n" => Some(Self::HalfN),
            "none" => Some(Self::None),
            _ => Option::None,
        }
    }

    /// The plan-file name of this rule.
    pub fn name(self) -> &'static str {
        match self {
            Self::LogLinear => "log-linear",
            Self::HalfN => "half-n",
            Self::None => "none",
        }
    }
}

/// What the analysis knows of the base rate π (share of encounters that hold the stimulus) in a
/// record that does not fix present and absent trial counts. One type for the plan, the design
/// and the observation model.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", content = "encounters", rename_all = "kebab-case")]
pub enum BaseRate {
    /// Known: fixed by the experimenter, held at the condition's stated value.
    Known,
    /// Estimated, helped by an independent census of this many encounters, each counted as
    /// "stimulus present" with probability π.
    Census(u64),
    /// Estimated from the behavioural record alone.
    Unknown,
}

impl BaseRate {
    /// True when π is a free parameter.
    pub fn is_free(self) -> bool {
        !matches!(self, BaseRate::Known)
    }
}
