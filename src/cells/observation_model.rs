//! The observation model: validated conditions, the θ layout and the observed blocks, built once
//! and trusted afterwards by the likelihood, the fit, the information and the profile.

use crate::cells::coarsening::{Block, blocks_for};
use crate::cells::error::{InputError, SpecError};
use crate::cells::parameter_map::ParameterMap;
use crate::cells::spec::{ConditionSpec, NaturalValues};

/// Conditions, θ layout and observed blocks of one design.
#[derive(Debug, Clone, PartialEq)]
pub struct ObservationModel {
    conditions: Vec<ConditionSpec>,
    map: ParameterMap,
    blocks: Vec<Block>,
}

impl ObservationModel {
    /// Validates the conditions and the sharing between them, then lays out θ and the blocks.
    pub fn new(conditions: Vec<ConditionSpec>) -> Result<Self, SpecError> {
        if conditions.is_empty() {
            return Err(SpecError::NoConditions);
        }
        for (i, c) in conditions.iter().enumerate() {
            c.validate(i)?;
            if conditions[..i].iter().any(|o| o.name == c.name) {
                return Err(SpecError::DuplicateName {
                    name: c.name.clone(),
                });
            }
        }
        let map = ParameterMap::new(&conditions)?;
        let blocks = conditions
            .iter()
            .enumerate()
            .flat_map(|(j, c)| blocks_for(j, c))
            .collect();
        Ok(ObservationModel {
            conditions,
            map,
            blocks,
        })
    }

    /// The validated conditions, in the order given.
    pub fn conditions(&self) -> &[ConditionSpec] {
        &self.conditions
    }

    /// Index of the condition with this name.
    pub fn condition_index(&self, name: &str) -> Result<usize, InputError> {
        self.conditions
            .iter()
            .position(|c| c.name == name)
            .ok_or_else(|| InputError::UnknownCondition {
                name: name.to_string(),
            })
    }

    /// The θ layout: names, kinds and per-condition slots.
    pub fn parameters(&self) -> &ParameterMap {
        &self.map
    }

    /// Number of free parameters.
    pub fn dim(&self) -> usize {
        self.map.dim()
    }

    /// Observed blocks, condition by condition in the order of the conditions.
    pub fn blocks(&self) -> &[Block] {
        &self.blocks
    }

    /// Block sizes n as stated by the records (a copy, to be scaled or replaced for a grid).
    pub fn block_sizes(&self) -> Vec<f64> {
        self.blocks.iter().map(|b| b.n).collect()
    }

    /// θ at the hypothesised values of the conditions.
    pub fn hypothesised_theta(&self) -> Vec<f64> {
        self.map.hypothesised_theta()
    }

    /// Natural values of every condition at θ.
    pub fn natural(&self, theta: &[f64]) -> Result<Vec<NaturalValues>, InputError> {
        self.check_theta(theta)?;
        Ok(self
            .conditions
            .iter()
            .enumerate()
            .map(|(j, c)| self.map.natural(j, c.categories, theta))
            .collect())
    }

    /// θ must have the model's length and finite entries.
    pub fn check_theta(&self, theta: &[f64]) -> Result<(), InputError> {
        if theta.len() != self.dim() {
            return Err(InputError::ThetaLength {
                expected: self.dim(),
                found: theta.len(),
            });
        }
        if let Some((index, &value)) = theta.iter().enumerate().find(|(_, v)| !v.is_finite()) {
            return Err(InputError::ThetaNotFinite {
                index,
                name: self.map.names()[index].clone(),
                value,
            });
        }
        Ok(())
    }

    /// Block sizes must match the blocks and be finite and ≥ 0.
    pub fn check_sizes(&self, sizes: &[f64]) -> Result<(), InputError> {
        check_block_sizes(sizes, self.blocks.len())
    }
}

/// `sizes` must hold `blocks` finite values ≥ 0.
pub fn check_block_sizes(sizes: &[f64], blocks: usize) -> Result<(), InputError> {
    if sizes.len() != blocks {
        return Err(InputError::BlockCount {
            what: "block sizes",
            expected: blocks,
            found: sizes.len(),
        });
    }
    if let Some((block, &value)) = sizes
        .iter()
        .enumerate()
        .find(|(_, n)| !(n.is_finite() && **n >= 0.0))
    {
        return Err(InputError::InvalidCount {
            what: "block size",
            block,
            cell: 0,
            value,
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{BaseRate, BaseRateLink, Record, Role};

    fn totals(name: &str, knowledge: BaseRate) -> ConditionSpec {
        let rec = Record::ErrorTotals {
            encounters: 100,
            base_rate: knowledge,
        };
        ConditionSpec::yes_no(name, rec, 1.5, 0.3, 0.25)
    }

    #[test]
    fn names_follow_conditions_and_sharing() {
        let mut a = totals("low", BaseRate::Census(50));
        let mut b = totals("high", BaseRate::Unknown);
        a.roles.d_prime = Role::Shared;
        b.roles.d_prime = Role::Shared;
        let m = ObservationModel::new(vec![a, b]).unwrap();
        let names: Vec<&str> = m.parameters().names().iter().map(|s| s.as_str()).collect();
        assert_eq!(
            names,
            ["d′", "c[low]", "logit π[low]", "c[high]", "logit π[high]"]
        );
        assert_eq!(m.blocks().len(), 3);
    }

    #[test]
    fn invalid_maps_are_reported() {
        let mut a = totals("a", BaseRate::Unknown);
        a.roles.sigma = Role::Free;
        assert!(matches!(
            ObservationModel::new(vec![a]),
            Err(SpecError::SigmaFreeForYesNo { .. })
        ));
        let mut k = totals("k", BaseRate::Known);
        k.roles.base_rate = BaseRateLink::Shared;
        let err = ObservationModel::new(vec![k]).unwrap_err();
        assert!(err.to_string().contains("known"), "{err}");
        let mut f = ConditionSpec::yes_no(
            "f",
            Record::Full {
                present: 5,
                absent: 5,
            },
            1.0,
            0.0,
            0.5,
        );
        f.roles.base_rate = BaseRateLink::Shared;
        assert!(matches!(
            ObservationModel::new(vec![f]),
            Err(SpecError::NothingToShare { .. })
        ));
        let mut x = totals("x", BaseRate::Unknown);
        let mut y = totals("y", BaseRate::Unknown);
        y.values.d_prime = 2.0;
        x.roles.d_prime = Role::Shared;
        y.roles.d_prime = Role::Shared;
        let err = ObservationModel::new(vec![x, y]).unwrap_err();
        assert!(matches!(err, SpecError::SharedValuesDiffer { .. }), "{err}");
        assert!(matches!(
            ObservationModel::new(vec![
                totals("d", BaseRate::Known),
                totals("d", BaseRate::Known)
            ]),
            Err(SpecError::DuplicateName { .. })
        ));
    }
}
