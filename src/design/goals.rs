//! What the experiment must show: hypotheses tested on every simulated dataset, the
//! targets the smallest experiment must meet, and the group of animals it is run on.

use crate::vocab::Quantity;
use crate::vocab::Sided;
use serde::Serialize;

/// The kinds of hypothesis vigil tests.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum TestKind {
    /// The criterion differs from 0: the animal is biased.
    Bias,
    /// The criterion differs from the ideal observer's for the condition's payoffs.
    IdealCriterion,
    /// The criterion differs between two conditions.
    CriterionShift,
    /// d′ differs between two conditions.
    SensitivityDifference,
    /// σ ≠ 1 (rating designs).
    UnequalVariance,
    /// The mean criterion differs between two populations of animals.
    GroupDifference,
}

impl TestKind {
    pub const NAMES: [&'static str; 6] = [
        "bias",
        "ideal-criterion",
        "criterion-shift",
        "sensitivity-difference",
        "unequal-variance",
        "group-difference",
    ];

    /// The plan's spelling of the kind (one of [`Self::NAMES`]).
    pub fn name(self) -> &'static str {
        match self {
            Self::Bias => "bias",
            Self::IdealCriterion => "ideal-criterion",
            Self::CriterionShift => "criterion-shift",
            Self::SensitivityDifference => "sensitivity-difference",
            Self::UnequalVariance => "unequal-variance",
            Self::GroupDifference => "group-difference",
        }
    }

    pub fn from_name(name: &str) -> Option<Self> {
        Some(match name {
            "bias" => Self::Bias,
            "ideal-criterion" => Self::IdealCriterion,
            "criterion-shift" => Self::CriterionShift,
            "sensitivity-difference" => Self::SensitivityDifference,
            "unequal-variance" => Self::UnequalVariance,
            "group-difference" => Self::GroupDifference,
            _ => return None,
        })
    }

    /// How many conditions the hypothesis names (shift and difference compare two).
    pub fn conditions_needed(self) -> usize {
        match self {
            Self::CriterionShift | Self::SensitivityDifference => 2,
            _ => 1,
        }
    }
}

/// A hypothesis from the plan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Hypothesis {
    pub name: String,
    pub kind: TestKind,
    /// Named conditions; empty means "the first condition of each design".
    pub conditions: Vec<String>,
    pub sided: Sided,
    /// Power target for this hypothesis (falls back to `Targets::power`).
    pub power: Option<f64>,
    /// Group difference only: second population's mean criterion minus the first's.
    pub shift: f64,
}

/// What the smallest experiment must achieve.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct Targets {
    /// Power every hypothesis must reach unless it sets its own.
    pub power: Option<f64>,
    /// Largest acceptable mean interval half-width, per quantity.
    pub half_width: Vec<(Quantity, f64)>,
    /// Largest acceptable |corr(d̂′, ĉ)|.
    pub max_correlation: Option<f64>,
}

impl Targets {
    /// Whether any target is set.
    pub fn any(&self, hypotheses: &[Hypothesis]) -> bool {
        self.power.is_some()
            || !self.half_width.is_empty()
            || self.max_correlation.is_some()
            || hypotheses.iter().any(|h| h.power.is_some())
    }
}

/// A group of animals whose d′ and criterion vary around the observer's.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Animals {
    /// Numbers of animals to scan, increasing.
    pub counts: Vec<u32>,
    pub sd_d_prime: f64,
    pub sd_criterion: f64,
    /// Correlation of an animal's d′ and criterion, in (−1, 1).
    pub correlation: f64,
    /// Random slopes, σ and lapse rate between animals (all zero by default; left out of
    /// JSON then, so plans without them print as before).
    #[serde(skip_serializing_if = "Slopes::none")]
    pub slopes: Slopes,
    /// Most trials one animal can be given (habituation), if limited.
    pub trial_cap: Option<u32>,
    /// Gauss–Hermite nodes per random effect of the random-effects analysis, when the plan
    /// asks for it (`random_effects = true`); `Some(0)` means the default for the model's
    /// dimension.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub random_effects: Option<u32>,
    /// Change of the animal within its session (`[animals.habituation]`), if given.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub habituation: Option<super::habituation::Habituation>,
}

/// Between-animal variation beyond the intercepts (docs/groups.md, "Random slopes, σ and
/// lapses"): every field 0 means every animal shares the plan's value.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct Slopes {
    /// SD of an animal's own criterion shift from the first condition to every other, ≥ 0.
    pub sd_criterion_shift: f64,
    /// Correlation of that shift with the animal's criterion deviation, in (−1, 1).
    pub correlation_criterion_shift: f64,
    /// SD of an animal's own d′ change from the first condition to every other, ≥ 0.
    pub sd_d_prime_change: f64,
    /// Correlation of that change with the animal's d′ deviation, in (−1, 1).
    pub correlation_d_prime_change: f64,
    /// SD of ln σ between animals (σ log-normal, median the plan's σ), ≥ 0.
    pub sd_ln_sigma: f64,
    /// SD of the lapse rate between animals (beta, mean the plan's `lapse_rate`), ≥ 0.
    pub sd_lapse_rate: f64,
}

impl Slopes {
    /// True when every animal shares the plan's slopes, σ and lapse rate.
    pub fn none(&self) -> bool {
        !self.any()
    }

    /// True when some animal can differ from another beyond its d′ and criterion.
    pub fn any(&self) -> bool {
        self.sd_criterion_shift > 0.0
            || self.sd_d_prime_change > 0.0
            || self.sd_ln_sigma > 0.0
            || self.sd_lapse_rate > 0.0
    }
}

/// What animals and trials cost, and what may be spent.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Budget {
    pub cost_per_animal: f64,
    pub cost_per_trial: f64,
    pub total: Option<f64>,
}

impl Budget {
    /// Cost of `animals` animals given `trials` trials each (per condition × conditions).
    pub fn cost(&self, animals: u32, trials_per_animal: u32) -> f64 {
        f64::from(animals)
            * (self.cost_per_animal + self.cost_per_trial * f64::from(trials_per_animal))
    }
}
