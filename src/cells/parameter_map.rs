//! The free vector θ and how each condition reads its parameters from it.
//!
//! Every condition has K + 2 local coordinates u, on scales where the constraints hold by
//! construction: u₀ = d′ (real), u₁ = c (real), u₂ = ln σ, u₃…u_K = ln of the K − 2 gaps
//! k_{m+1} − k_m (low to high), u_{K+1} = logit π. Each coordinate is either a constant (fixed),
//! unused (π of a full-count record), or one entry of θ; sharing means several conditions read
//! the same entry. So ∂u/∂θ is a 0/1 selection and derivatives in θ are local derivatives
//! scattered (and summed) into θ positions.

use crate::cells::error::SpecError;
use crate::cells::spec::{BaseRateLink, ConditionSpec, NaturalValues, Role};

/// Local coordinate of d′.
pub const SLOT_D_PRIME: usize = 0;
/// Local coordinate of the reported criterion c.
pub const SLOT_CRITERION: usize = 1;
/// Local coordinate of ln σ.
pub const SLOT_LN_SIGMA: usize = 2;
/// Local coordinate of the first log gap; gap m sits at `SLOT_FIRST_GAP + m`.
pub const SLOT_FIRST_GAP: usize = 3;

/// Local coordinate of logit π for a condition with `categories` categories.
pub fn slot_base_rate(categories: usize) -> usize {
    categories + 1
}

/// Number of local coordinates of a condition with `categories` categories.
pub fn local_dim(categories: usize) -> usize {
    categories + 2
}

/// Where one local coordinate of one condition comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Slot {
    /// Held at this value (on the local scale, e.g. ln σ).
    Fixed(f64),
    /// Read from θ at this index.
    Theta(usize),
    /// Not part of this condition's model (π of a full-count record).
    Unused,
}

/// What a θ entry is, on its own scale.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ParameterKind {
    DPrime,
    Criterion,
    LnSigma,
    /// ln(k_{m+2} − k_{m+1}) in 1-based criterion numbering, for gap index m (0-based).
    LnGap(usize),
    LogitBaseRate,
}

impl ParameterKind {
    fn label(self) -> String {
        match self {
            ParameterKind::DPrime => "d′".to_string(),
            ParameterKind::Criterion => "c".to_string(),
            ParameterKind::LnSigma => "ln σ".to_string(),
            ParameterKind::LnGap(m) => format!("ln(k{}−k{})", m + 2, m + 1),
            ParameterKind::LogitBaseRate => "logit π".to_string(),
        }
    }

    fn plain(self) -> &'static str {
        match self {
            ParameterKind::DPrime => "d′",
            ParameterKind::Criterion => "c",
            ParameterKind::LnSigma => "σ",
            ParameterKind::LnGap(_) => "criterion gaps",
            ParameterKind::LogitBaseRate => "the base rate",
        }
    }
}

/// Layout of θ: names, kinds, and per-condition slots.
#[derive(Debug, Clone, PartialEq)]
pub struct ParameterMap {
    names: Vec<String>,
    kinds: Vec<ParameterKind>,
    hypothesised: Vec<f64>,
    crude: Vec<f64>,
    slots: Vec<Vec<Slot>>,
}

/// First condition seen for a shared entry: (θ index, condition index, local value).
type SharedEntry = (ParameterKind, usize, usize, f64);

impl ParameterMap {
    /// Builds the map from validated condition specs (see `ObservationModel::new`); checks that
    /// shared parameters exist in every sharing condition and that sharers state one value.
    pub(crate) fn new(conditions: &[ConditionSpec]) -> Result<Self, SpecError> {
        let mut map = ParameterMap {
            names: Vec::new(),
            kinds: Vec::new(),
            hypothesised: Vec::new(),
            crude: Vec::new(),
            slots: Vec::with_capacity(conditions.len()),
        };
        let mut shared: Vec<SharedEntry> = Vec::new();
        for (j, spec) in conditions.iter().enumerate() {
            let k = spec.categories;
            let mut slots = vec![Slot::Unused; local_dim(k)];
            let v = &spec.values;
            let crude_gap = (3.0 / (k as f64 - 1.0)).ln();
            let mut wanted: Vec<(usize, ParameterKind, Role, f64, f64)> = vec![
                (
                    SLOT_D_PRIME,
                    ParameterKind::DPrime,
                    spec.roles.d_prime,
                    v.d_prime,
                    1.0,
                ),
                (
                    SLOT_CRITERION,
                    ParameterKind::Criterion,
                    spec.roles.criterion,
                    v.criterion,
                    0.0,
                ),
                (
                    SLOT_LN_SIGMA,
                    ParameterKind::LnSigma,
                    spec.roles.sigma,
                    v.sigma.ln(),
                    0.0,
                ),
            ];
            for (m, g) in v.gaps.iter().enumerate() {
                let kind = ParameterKind::LnGap(m);
                wanted.push((SLOT_FIRST_GAP + m, kind, spec.roles.gaps, g.ln(), crude_gap));
            }
            if let Some(knowledge) = spec.record.base_rate_knowledge() {
                let role = match (knowledge.is_free(), spec.roles.base_rate) {
                    (false, _) => Role::Fixed,
                    (true, BaseRateLink::PerCondition) => Role::Free,
                    (true, BaseRateLink::Shared) => Role::Shared,
                };
                let logit = (v.base_rate / (1.0 - v.base_rate)).ln();
                wanted.push((
                    slot_base_rate(k),
                    ParameterKind::LogitBaseRate,
                    role,
                    logit,
                    0.0,
                ));
            }
            for (slot, kind, role, value, crude) in wanted {
                slots[slot] = match role {
                    Role::Fixed => Slot::Fixed(value),
                    Role::Free => {
                        let name = format!("{}[{}]", kind.label(), spec.name);
                        Slot::Theta(map.push(name, kind, value, crude))
                    }
                    Role::Shared => {
                        Slot::Theta(map.shared(&mut shared, conditions, j, kind, value, crude)?)
                    }
                };
            }
            map.slots.push(slots);
        }
        Ok(map)
    }

    fn push(&mut self, name: String, kind: ParameterKind, value: f64, crude: f64) -> usize {
        self.names.push(name);
        self.kinds.push(kind);
        self.hypothesised.push(value);
        self.crude.push(crude);
        self.names.len() - 1
    }

    fn shared(
        &mut self,
        shared: &mut Vec<SharedEntry>,
        conditions: &[ConditionSpec],
        j: usize,
        kind: ParameterKind,
        value: f64,
        crude: f64,
    ) -> Result<usize, SpecError> {
        let Some(&(_, index, first, first_value)) = shared.iter().find(|e| e.0 == kind) else {
            let index = self.push(kind.label(), kind, value, crude);
            shared.push((kind, index, j, value));
            return Ok(index);
        };
        if let ParameterKind::LnGap(_) = kind
            && conditions[first].categories != conditions[j].categories
        {
            return Err(SpecError::SharedGapsShape {
                first: conditions[first].name.clone(),
                other: conditions[j].name.clone(),
            });
        }
        if (value - first_value).abs() > 1e-9 * (1.0 + first_value.abs()) {
            let natural = |x: f64| match kind {
                ParameterKind::LnSigma | ParameterKind::LnGap(_) => x.exp(),
                ParameterKind::LogitBaseRate => 1.0 / (1.0 + (-x).exp()),
                _ => x,
            };
            return Err(SpecError::SharedValuesDiffer {
                parameter: kind.plain(),
                first: conditions[first].name.clone(),
                other: conditions[j].name.clone(),
                first_value: natural(first_value),
                other_value: natural(value),
            });
        }
        Ok(index)
    }

    /// Number of free parameters (length of θ).
    pub fn dim(&self) -> usize {
        self.names.len()
    }

    /// Human names of the θ entries, e.g. `d′`, `c[low]`, `ln σ[high]`, `logit π[field]`.
    pub fn names(&self) -> &[String] {
        &self.names
    }

    /// What each θ entry is.
    pub fn kinds(&self) -> &[ParameterKind] {
        &self.kinds
    }

    /// Index of the θ entry with this exact name.
    pub fn index_of(&self, name: &str) -> Option<usize> {
        self.names.iter().position(|n| n == name)
    }

    /// Slots of condition `j` (length K + 2; empty if there is no condition `j`).
    pub fn slots(&self, j: usize) -> &[Slot] {
        self.slots.get(j).map_or(&[], |s| s.as_slice())
    }

    /// θ at the conditions' hypothesised values.
    pub fn hypothesised_theta(&self) -> Vec<f64> {
        self.hypothesised.clone()
    }

    /// A crude start: d′ = 1, c = 0, σ = 1, criteria 3/(K−1) apart, π = ½.
    pub fn crude_theta(&self) -> Vec<f64> {
        self.crude.clone()
    }

    /// Fills `out` with condition `j`'s local coordinates at θ (unused slots get 0).
    pub(crate) fn local_values(&self, j: usize, theta: &[f64], out: &mut [f64]) {
        for (o, s) in out.iter_mut().zip(&self.slots[j]) {
            *o = match *s {
                Slot::Fixed(v) => v,
                Slot::Theta(i) => theta[i],
                Slot::Unused => 0.0,
            };
        }
    }

    /// Natural values of condition `j` at θ: σ = e^{u₂}, gaps = e^{u_gap}, π = 1/(1 + e^{−u_π});
    /// π is NaN when the record has no base rate.
    pub(crate) fn natural(&self, j: usize, categories: usize, theta: &[f64]) -> NaturalValues {
        let mut u = vec![0.0; local_dim(categories)];
        self.local_values(j, theta, &mut u);
        let pi_slot = slot_base_rate(categories);
        NaturalValues {
            d_prime: u[SLOT_D_PRIME],
            criterion: u[SLOT_CRITERION],
            sigma: u[SLOT_LN_SIGMA].exp(),
            gaps: u[SLOT_FIRST_GAP..pi_slot].iter().map(|g| g.exp()).collect(),
            base_rate: match self.slots[j][pi_slot] {
                Slot::Unused => f64::NAN,
                _ => 1.0 / (1.0 + (-u[pi_slot]).exp()),
            },
        }
    }
}
