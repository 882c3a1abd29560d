//! What a caller says about one condition: its response scale, what was recorded, the
//! hypothesised (true) parameter values, which parameters are fixed, free or shared, and an
//! optional lapse process.
//!
//! Model (the project's convention): evidence absent ~ N(0, 1), present ~ N(d′, σ²); K ordered
//! categories split by criteria k₁ < … < k_{K−1}; "yes" = categories ≥ b. The reported criterion
//! is c = k_b − d′/2 (midpoint convention, absent-SD units, positive = conservative). With K = 2
//! and σ = 1: H = Φ(d′/2 − c), F = Φ(−d′/2 − c) (Macmillan & Creelman 2005, ch. 2).

use crate::cells::error::SpecError;

pub use crate::vocab::MAX_CATEGORIES;

/// How one kind of natural parameter enters the free vector θ.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    /// Known: held at the condition's stated value, not estimated.
    Fixed,
    /// Estimated separately for this condition (its own θ entry).
    Free,
    /// Estimated once for every condition that marks it `Shared` (one θ entry).
    Shared,
}

/// Whether a free base rate is the condition's own or shared with other conditions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BaseRateLink {
    /// The condition's own θ entry (when the base rate is free at all).
    PerCondition,
    /// One θ entry for all conditions that mark it `Shared`.
    Shared,
}

/// Roles of the natural parameters of one condition.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Roles {
    pub d_prime: Role,
    pub criterion: Role,
    pub sigma: Role,
    /// All K − 2 gaps between neighbouring criteria move together.
    pub gaps: Role,
    /// Only meaningful when the record leaves the base rate free (census or unknown).
    pub base_rate: BaseRateLink,
}

impl Roles {
    /// d′, c and gaps free; σ free for rating scales and fixed for yes/no (σ is not identified
    /// from one yes/no table); base rate per condition.
    pub fn separate(categories: usize) -> Self {
        Roles {
            d_prime: Role::Free,
            criterion: Role::Free,
            sigma: if categories > 2 {
                Role::Free
            } else {
                Role::Fixed
            },
            gaps: Role::Free,
            base_rate: BaseRateLink::PerCondition,
        }
    }
}

pub use crate::vocab::BaseRate;

/// What was recorded for a condition: how the full stimulus × response table is coarsened.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Record {
    /// Ground truth per trial: `present` and `absent` trials (fixed numbers), each with its
    /// response category. Two multinomial blocks. The base rate plays no role.
    Full { present: u64, absent: u64 },
    /// Yes/no only: `encounters` encounters, each present with probability π; only false alarms,
    /// misses and correct responses (summed over classes) are recorded.
    ErrorTotals {
        encounters: u64,
        base_rate: BaseRate,
    },
    /// Yes/no only: `encounters` encounters; only how often the subject said yes.
    ResponseTotals {
        encounters: u64,
        base_rate: BaseRate,
    },
    /// A two-choice task (K = 2): `left` trials with the target on the left, `right` with it on
    /// the right, each scored as a choice of left (category 1) or right (category 0). The
    /// choice compares the two sides, so its table is the yes/no table with d′ replaced by
    /// √2·d′ (Macmillan & Creelman 2005, ch. 7): H = P(left | target left) = Φ(d′/√2 − c),
    /// F = P(left | target right) = Φ(−d′/√2 − c). Two blocks, target-left first.
    TwoChoice { left: u64, right: u64 },
}

impl Record {
    /// The base-rate knowledge, or `None` for records where π is not part of the model.
    pub fn base_rate_knowledge(&self) -> Option<BaseRate> {
        match *self {
            Record::Full { .. } | Record::TwoChoice { .. } => None,
            Record::ErrorTotals { base_rate, .. } | Record::ResponseTotals { base_rate, .. } => {
                Some(base_rate)
            }
        }
    }

    fn label(&self) -> &'static str {
        match self {
            Record::Full { .. } => "full counts",
            Record::ErrorTotals { .. } => "error totals",
            Record::ResponseTotals { .. } => "response totals",
            Record::TwoChoice { .. } => "two-choice",
        }
    }

    /// Factor on d′ in the table: √2 for a two-choice task (the choice sees the difference
    /// of two independent evidence samples, whose means lie 2·d′ apart at SD √2), else 1.
    pub fn d_prime_scale(&self) -> f64 {
        match self {
            Record::TwoChoice { .. } => std::f64::consts::SQRT_2,
            _ => 1.0,
        }
    }
}

/// Hypothesised (true) natural parameter values of a condition; fixed parameters are held at
/// them and free ones start from them.
#[derive(Debug, Clone, PartialEq)]
pub struct NaturalValues {
    pub d_prime: f64,
    /// Reported criterion c = k_b − d′/2.
    pub criterion: f64,
    /// SD of the present distribution (absent SD = 1).
    pub sigma: f64,
    /// Widths k_{m+1} − k_m of the K − 2 gaps between neighbouring criteria, low to high.
    pub gaps: Vec<f64>,
    /// Probability that an encounter holds the stimulus; ignored for `Record::Full`.
    pub base_rate: f64,
}

/// A lapse process: with probability `rate` the response ignores the evidence and falls in
/// category m with probability `guess[m]`, so P(m | class) = (1 − λ)·P_model(m | class) + λ·g_m.
#[derive(Debug, Clone, PartialEq)]
pub struct Lapse {
    pub rate: f64,
    pub guess: Vec<f64>,
}

impl Lapse {
    /// Yes/no lapse: on a lapse trial the response is yes with probability `guess_yes`.
    pub fn yes_no(rate: f64, guess_yes: f64) -> Self {
        Lapse {
            rate,
            guess: vec![1.0 - guess_yes, guess_yes],
        }
    }
}

/// Everything the model needs to know about one condition.
#[derive(Debug, Clone, PartialEq)]
pub struct ConditionSpec {
    pub name: String,
    /// Number of ordered response categories K (2..=12); category 0 = lowest evidence.
    pub categories: usize,
    /// Boundary index b (1..=K−1): "yes" = categories ≥ b; c is measured at k_b.
    pub boundary: usize,
    pub record: Record,
    pub values: NaturalValues,
    pub roles: Roles,
    pub lapse: Option<Lapse>,
}

impl ConditionSpec {
    /// A yes/no condition (K = 2, σ fixed at 1) with d′ and c free and base rate `base_rate`.
    pub fn yes_no(
        name: &str,
        record: Record,
        d_prime: f64,
        criterion: f64,
        base_rate: f64,
    ) -> Self {
        ConditionSpec {
            name: name.to_string(),
            categories: 2,
            boundary: 1,
            record,
            values: NaturalValues {
                d_prime,
                criterion,
                sigma: 1.0,
                gaps: Vec::new(),
                base_rate,
            },
            roles: Roles::separate(2),
            lapse: None,
        }
    }

    /// A rating condition with K = `values.gaps.len()` + 2 categories, everything free and
    /// separate (σ free when K > 2, fixed when K = 2).
    pub fn rating(name: &str, boundary: usize, record: Record, values: NaturalValues) -> Self {
        let categories = values.gaps.len() + 2;
        ConditionSpec {
            name: name.to_string(),
            categories,
            boundary,
            record,
            values,
            roles: Roles::separate(categories),
            lapse: None,
        }
    }

    /// Checks everything that concerns this condition alone.
    pub fn validate(&self, index: usize) -> Result<(), SpecError> {
        let condition = || self.name.clone();
        let k = self.categories;
        if self.name.trim().is_empty() {
            return Err(SpecError::EmptyName { index });
        }
        if !(2..=MAX_CATEGORIES).contains(&k) {
            return Err(SpecError::CategoriesOutOfRange {
                condition: condition(),
                categories: k,
            });
        }
        if self.boundary == 0 || self.boundary >= k {
            return Err(SpecError::BoundaryOutOfRange {
                condition: condition(),
                boundary: self.boundary,
                categories: k,
            });
        }
        let bad = |parameter, value, reason| SpecError::InvalidValue {
            condition: condition(),
            parameter,
            value,
            reason,
        };
        let v = &self.values;
        if !v.d_prime.is_finite() {
            return Err(bad("d′", v.d_prime, "must be finite"));
        }
        if !v.criterion.is_finite() {
            return Err(bad("c", v.criterion, "must be finite"));
        }
        if !(v.sigma.is_finite() && v.sigma > 0.0) {
            return Err(bad("σ", v.sigma, "must be finite and > 0"));
        }
        if v.gaps.len() != k - 2 {
            return Err(SpecError::GapCount {
                condition: condition(),
                categories: k,
                expected: k - 2,
                found: v.gaps.len(),
            });
        }
        if let Some(&g) = v.gaps.iter().find(|g| !(g.is_finite() && **g > 0.0)) {
            return Err(bad("criterion gap", g, "gaps must be finite and > 0"));
        }
        if k == 2 && self.roles.sigma != Role::Fixed {
            return Err(SpecError::SigmaFreeForYesNo {
                condition: condition(),
            });
        }
        if k == 2 && self.roles.gaps == Role::Shared {
            return Err(SpecError::NothingToShare {
                condition: condition(),
                parameter: "criterion gaps",
                reason: "a yes/no scale has a single criterion",
            });
        }
        self.validate_record(&bad)?;
        self.validate_lapse()
    }

    fn validate_record(
        &self,
        bad: &dyn Fn(&'static str, f64, &'static str) -> SpecError,
    ) -> Result<(), SpecError> {
        if matches!(self.record, Record::TwoChoice { .. }) && self.categories != 2 {
            return Err(SpecError::RecordNeedsYesNo {
                condition: self.name.clone(),
                record: self.record.label(),
                categories: self.categories,
            });
        }
        match self.record.base_rate_knowledge() {
            None => {
                if self.roles.base_rate == BaseRateLink::Shared {
                    return Err(SpecError::NothingToShare {
                        condition: self.name.clone(),
                        parameter: "the base rate",
                        reason: "full counts fix the numbers of present and absent trials",
                    });
                }
                Ok(())
            }
            Some(knowledge) => {
                if self.categories != 2 {
                    return Err(SpecError::RecordNeedsYesNo {
                        condition: self.name.clone(),
                        record: self.record.label(),
                        categories: self.categories,
                    });
                }
                let pi = self.values.base_rate;
                if !(pi.is_finite() && pi > 0.0 && pi < 1.0) {
                    return Err(bad(
                        "π",
                        pi,
                        "a base rate must lie strictly between 0 and 1",
                    ));
                }
                if !knowledge.is_free() && self.roles.base_rate == BaseRateLink::Shared {
                    return Err(SpecError::NothingToShare {
                        condition: self.name.clone(),
                        parameter: "the base rate",
                        reason: "its base rate is known, not estimated",
                    });
                }
                Ok(())
            }
        }
    }

    fn validate_lapse(&self) -> Result<(), SpecError> {
        let Some(lapse) = &self.lapse else {
            return Ok(());
        };
        let err = |reason| SpecError::InvalidLapse {
            condition: self.name.clone(),
            reason,
        };
        if !(lapse.rate.is_finite() && (0.0..1.0).contains(&lapse.rate)) {
            return Err(err("the lapse rate must lie in [0, 1)"));
        }
        if lapse.guess.len() != self.categories {
            return Err(err(
                "the guessing distribution needs one entry per category",
            ));
        }
        if lapse.guess.iter().any(|g| !(g.is_finite() && *g >= 0.0)) {
            return Err(err("guessing probabilities must be finite and ≥ 0"));
        }
        if (lapse.guess.iter().sum::<f64>() - 1.0).abs() > 1e-9 {
            return Err(err("guessing probabilities must sum to 1"));
        }
        Ok(())
    }
}
