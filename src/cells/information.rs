//! Expected Fisher information and what follows from it: the asymptotic covariance of θ̂ and the
//! standard errors of the reported natural quantities (d′, c, σ, π per condition).
//!
//! For independent multinomial blocks, I(θ) = Σ_blocks n_b Σ_cells (∂p/∂θ)(∂p/∂θ)ᵀ / p
//! (e.g. Agresti, *Categorical Data Analysis*, 3rd ed., §16.1 \[memory\]). SEs of natural
//! quantities follow by the delta method through θ's scales: d′ and c are θ entries themselves,
//! σ = e^{ln σ} (∂σ = σ), π = logistic(logit π) (∂π = π(1 − π)).
//!
//! Hot path of the design sweeps: everything is accumulated in local coordinates and scattered
//! once per condition, and `UnitInformation` lets a caller reuse per-block pieces over a grid
//! of trial numbers (the information is linear in the block sizes).

use nalgebra::DMatrix;

use crate::cells::cell_probabilities::{Workspace, scatter_matrix};
use crate::cells::error::InputError;
use crate::cells::identifiability::scaled_inverse;
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{
    SLOT_CRITERION, SLOT_D_PRIME, SLOT_LN_SIGMA, Slot, slot_base_rate,
};

/// Expected information for block sizes `sizes` (one per block, e.g. `model.block_sizes()`).
pub fn expected_information(
    model: &ObservationModel,
    theta: &[f64],
    sizes: &[f64],
) -> Result<DMatrix<f64>, InputError> {
    model.check_theta(theta)?;
    model.check_sizes(sizes)?;
    let mut local: Vec<Vec<f64>> = model
        .conditions()
        .iter()
        .map(|c| vec![0.0; (c.categories + 2).pow(2)])
        .collect();
    let mut ws = Workspace::borrow_spare();
    ws.visit(model, theta, false, |c| {
        let n = sizes[c.block];
        // A cell of zero probability carries no information in the limit (∂p²/p → 0 in the
        // Gaussian tails), so it is skipped rather than divided by.
        if n <= 0.0 || c.value <= 0.0 {
            return;
        }
        add_outer(&mut local[c.condition], c.grad, n / c.value);
    });
    ws.give_back();
    let dim = model.dim();
    let mut info = DMatrix::zeros(dim, dim);
    for (j, m) in local.iter().enumerate() {
        scatter_matrix(model.parameters().slots(j), m, 1.0, &mut info);
    }
    Ok(info)
}

fn add_outer(out: &mut [f64], g: &[f64], scale: f64) {
    let l = g.len();
    for a in 0..l {
        let ga = scale * g[a];
        for b in 0..l {
            out[a * l + b] += ga * g[b];
        }
    }
}

/// Information of a single observation in each block at θ; the total for block sizes n is
/// Σ_b n_b·I_b. Compute once per θ, then call [`UnitInformation::total`] over a grid.
#[derive(Debug, Clone, PartialEq)]
pub struct UnitInformation {
    blocks: Vec<DMatrix<f64>>,
}

impl UnitInformation {
    /// I_b = Σ_cells ∂p ∂pᵀ / p for each block b at θ.
    pub fn new(model: &ObservationModel, theta: &[f64]) -> Result<Self, InputError> {
        model.check_theta(theta)?;
        let dim = model.dim();
        let conditions = model.conditions();
        let mut local: Vec<Vec<f64>> = model
            .blocks()
            .iter()
            .map(|b| vec![0.0; (conditions[b.condition].categories + 2).pow(2)])
            .collect();
        Workspace::default().visit(model, theta, false, |c| {
            if c.value > 0.0 {
                add_outer(&mut local[c.block], c.grad, 1.0 / c.value);
            }
        });
        let map = model.parameters();
        let blocks = model
            .blocks()
            .iter()
            .zip(&local)
            .map(|(b, m)| {
                let mut info = DMatrix::zeros(dim, dim);
                scatter_matrix(map.slots(b.condition), m, 1.0, &mut info);
                info
            })
            .collect();
        Ok(UnitInformation { blocks })
    }

    /// Σ_b n_b·I_b for block sizes `sizes`.
    pub fn total(&self, sizes: &[f64]) -> Result<DMatrix<f64>, InputError> {
        crate::cells::observation_model::check_block_sizes(sizes, self.blocks.len())?;
        let dim = self.blocks.first().map_or(0, |b| b.nrows());
        let mut info = DMatrix::zeros(dim, dim);
        for (b, &n) in self.blocks.iter().zip(sizes) {
            info += b * n;
        }
        Ok(info)
    }
}

/// Standard errors of one condition's natural quantities; `None` when the quantity is fixed
/// (known, not estimated) or not part of the condition's model.
#[derive(Debug, Clone, PartialEq)]
pub struct ConditionPrecision {
    pub name: String,
    pub se_d_prime: Option<f64>,
    pub se_criterion: Option<f64>,
    pub se_sigma: Option<f64>,
    pub se_base_rate: Option<f64>,
    /// corr(d̂′, ĉ); `None` unless both are estimated.
    pub corr_d_prime_criterion: Option<f64>,
}

/// Asymptotic covariance of θ̂ and per-condition precision of the natural quantities.
#[derive(Debug, Clone, PartialEq)]
pub struct Precision {
    /// I(θ)⁻¹.
    pub covariance: DMatrix<f64>,
    pub conditions: Vec<ConditionPrecision>,
}

/// Covariance and natural SEs from an information matrix at θ; `None` when the information is
/// not invertible (rank below full at the tolerance of [`crate::cells::identifiability`]).
pub fn precision(
    model: &ObservationModel,
    theta: &[f64],
    information: &DMatrix<f64>,
) -> Result<Option<Precision>, InputError> {
    model.check_theta(theta)?;
    let dim = model.dim();
    if information.nrows() != dim || information.ncols() != dim {
        return Err(InputError::InformationShape {
            rows: information.nrows(),
            cols: information.ncols(),
            names: dim,
        });
    }
    let Some(covariance) = scaled_inverse(information) else {
        return Ok(None);
    };
    let naturals = model.natural(theta)?;
    let map = model.parameters();
    let conditions = model
        .conditions()
        .iter()
        .enumerate()
        .map(|(j, spec)| {
            let slots = map.slots(j);
            let entry = |slot: usize| match slots[slot] {
                Slot::Theta(i) => Some(i),
                _ => None,
            };
            let se = |slot: usize, scale: f64| {
                entry(slot).map(|i| scale.abs() * covariance[(i, i)].max(0.0).sqrt())
            };
            let v = &naturals[j];
            let pi = v.base_rate;
            let corr = match (entry(SLOT_D_PRIME), entry(SLOT_CRITERION)) {
                (Some(a), Some(b)) => {
                    let s = (covariance[(a, a)] * covariance[(b, b)]).sqrt();
                    (s > 0.0).then(|| covariance[(a, b)] / s)
                }
                _ => None,
            };
            ConditionPrecision {
                name: spec.name.clone(),
                se_d_prime: se(SLOT_D_PRIME, 1.0),
                se_criterion: se(SLOT_CRITERION, 1.0),
                se_sigma: se(SLOT_LN_SIGMA, v.sigma),
                se_base_rate: se(slot_base_rate(spec.categories), pi * (1.0 - pi)),
                corr_d_prime_criterion: corr,
            }
        })
        .collect();
    Ok(Some(Precision {
        covariance,
        conditions,
    }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{BaseRate, ConditionSpec, NaturalValues, Record};

    fn two_condition_model() -> ObservationModel {
        let rec = Record::ErrorTotals {
            encounters: 120,
            base_rate: BaseRate::Census(80),
        };
        let rating = ConditionSpec::rating(
            "rating",
            2,
            Record::Full {
                present: 40,
                absent: 60,
            },
            NaturalValues {
                d_prime: 1.2,
                criterion: 0.1,
                sigma: 1.3,
                gaps: vec![0.6, 0.4],
                base_rate: 0.5,
            },
        );
        let totals = ConditionSpec::yes_no("totals", rec, 1.5, 0.3, 0.3);
        ObservationModel::new(vec![rating, totals]).unwrap()
    }

    #[test]
    fn unit_information_sums_to_the_direct_computation() {
        let model = two_condition_model();
        let theta = model.hypothesised_theta();
        let sizes = vec![13.0, 250.0, 77.0, 1.5];
        let direct = expected_information(&model, &theta, &sizes).unwrap();
        let unit = UnitInformation::new(&model, &theta).unwrap();
        let summed = unit.total(&sizes).unwrap();
        assert!((direct - summed).abs().max() < 1e-10);
        assert!(unit.total(&sizes[..2]).is_err());
        assert!(expected_information(&model, &theta, &[1.0, -1.0, 1.0, 1.0]).is_err());
    }

    #[test]
    fn information_is_linear_in_block_sizes() {
        let model = two_condition_model();
        let theta = model.hypothesised_theta();
        let one = expected_information(&model, &theta, &model.block_sizes()).unwrap();
        let sizes: Vec<f64> = model.block_sizes().iter().map(|n| 3.0 * n).collect();
        let three = expected_information(&model, &theta, &sizes).unwrap();
        assert!((three - &one * 3.0).abs().max() < 1e-9);
        let p = precision(&model, &theta, &one).unwrap().unwrap();
        assert!(p.conditions[0].se_sigma.unwrap() > 0.0);
        assert!(p.conditions[0].se_base_rate.is_none());
        assert!(p.conditions[1].se_base_rate.unwrap() > 0.0);
    }
}
