//! One log-likelihood for every design: lnL(θ) = Σ_blocks Σ_cells x_cell·ln p_cell(θ)
//! (multinomial kernel; the combinatorial constant is dropped), with
//! ∂lnL = Σ (x/p)·∂p and ∂²lnL = Σ (x/p)·∂²p − (x/p²)·∂p ∂pᵀ.
//!
//! Cells with a zero count contribute nothing (0·ln 0 = 0); a positive count on a cell of zero
//! probability makes lnL = −∞, which the fit treats as a rejected step.

use nalgebra::{DMatrix, DVector};

use crate::cells::cell_probabilities::{Workspace, scatter_matrix, scatter_vector};
use crate::cells::error::InputError;
use crate::cells::observation_model::ObservationModel;

/// Observed counts, one vector per block, one entry per cell (validated against a model).
#[derive(Debug, Clone, PartialEq)]
pub struct Counts {
    cells: Vec<Vec<f64>>,
}

impl Counts {
    /// Checks the shape against the model's blocks and that every count is finite and ≥ 0.
    pub fn new(model: &ObservationModel, cells: Vec<Vec<f64>>) -> Result<Self, InputError> {
        let counts = Counts { cells };
        counts.check_shape(model)?;
        for (block, row) in counts.cells.iter().enumerate() {
            if let Some((cell, &value)) = row
                .iter()
                .enumerate()
                .find(|(_, x)| !(x.is_finite() && **x >= 0.0))
            {
                return Err(InputError::InvalidCount {
                    what: "count",
                    block,
                    cell,
                    value,
                });
            }
        }
        Ok(counts)
    }

    /// Checks that these counts have the shape of `model`'s blocks (they may have been
    /// validated against another model).
    pub fn check_shape(&self, model: &ObservationModel) -> Result<(), InputError> {
        let blocks = model.blocks();
        if self.cells.len() != blocks.len() {
            return Err(InputError::BlockCount {
                what: "counts",
                expected: blocks.len(),
                found: self.cells.len(),
            });
        }
        for (block, (row, b)) in self.cells.iter().zip(blocks).enumerate() {
            if row.len() != b.cells.len() {
                return Err(InputError::CellCount {
                    block,
                    expected: b.cells.len(),
                    found: row.len(),
                });
            }
        }
        Ok(())
    }

    /// Counts per block and cell.
    pub fn cells(&self) -> &[Vec<f64>] {
        &self.cells
    }

    /// Total count of each block (its observed multinomial size).
    pub fn block_totals(&self) -> Vec<f64> {
        self.cells.iter().map(|r| r.iter().sum()).collect()
    }
}

/// lnL with its gradient and Hessian in θ.
#[derive(Debug, Clone, PartialEq)]
pub struct LogLikelihood {
    pub value: f64,
    pub gradient: DVector<f64>,
    pub hessian: DMatrix<f64>,
}

/// lnL(θ) for `counts`.
pub fn log_likelihood(
    model: &ObservationModel,
    counts: &Counts,
    theta: &[f64],
) -> Result<f64, InputError> {
    model.check_theta(theta)?;
    counts.check_shape(model)?;
    Ok(value_with(&mut Workspace::default(), model, counts, theta))
}

/// lnL(θ), ∂lnL/∂θ and ∂²lnL/∂θ∂θᵀ for `counts`, all analytic.
pub fn log_likelihood_derivatives(
    model: &ObservationModel,
    counts: &Counts,
    theta: &[f64],
) -> Result<LogLikelihood, InputError> {
    model.check_theta(theta)?;
    counts.check_shape(model)?;
    Ok(derivatives_with(
        &mut Workspace::default(),
        model,
        counts,
        theta,
    ))
}

/// lnL only (θ already checked).
pub(crate) fn value_with(
    ws: &mut Workspace,
    model: &ObservationModel,
    counts: &Counts,
    theta: &[f64],
) -> f64 {
    let mut total = 0.0;
    ws.visit(model, theta, false, |c| {
        let x = counts.cells[c.block][c.cell];
        if x > 0.0 {
            total += if c.value > 0.0 {
                x * c.value.ln()
            } else {
                f64::NEG_INFINITY
            };
        }
    });
    total
}

/// lnL with analytic gradient and Hessian (θ already checked). Accumulates per condition in
/// local coordinates and scatters once, which keeps a fit step cheap.
pub(crate) fn derivatives_with(
    ws: &mut Workspace,
    model: &ObservationModel,
    counts: &Counts,
    theta: &[f64],
) -> LogLikelihood {
    let conditions = model.conditions();
    let mut local_g = std::mem::take(&mut ws.local_g);
    let mut local_h = std::mem::take(&mut ws.local_h);
    local_g.resize_with(conditions.len(), Vec::new);
    local_h.resize_with(conditions.len(), Vec::new);
    for (c, (g, h)) in conditions.iter().zip(local_g.iter_mut().zip(&mut local_h)) {
        g.clear();
        g.resize(c.categories + 2, 0.0);
        h.clear();
        h.resize((c.categories + 2).pow(2), 0.0);
    }
    let mut value = 0.0;
    ws.visit(model, theta, true, |c| {
        let x = counts.cells[c.block][c.cell];
        if x <= 0.0 {
            return;
        }
        if c.value <= 0.0 {
            value = f64::NEG_INFINITY;
            return;
        }
        value += x * c.value.ln();
        let r = x / c.value;
        let r2 = r / c.value;
        let l = c.grad.len();
        let g = &mut local_g[c.condition];
        for (gi, d) in g.iter_mut().zip(c.grad) {
            *gi += r * d;
        }
        let h = &mut local_h[c.condition];
        for a in 0..l {
            for b in 0..l {
                h[a * l + b] += r * c.hess[a * l + b] - r2 * c.grad[a] * c.grad[b];
            }
        }
    });
    let dim = model.dim();
    let mut gradient = DVector::zeros(dim);
    let mut hessian = DMatrix::zeros(dim, dim);
    let map = model.parameters();
    for j in 0..conditions.len() {
        scatter_vector(map.slots(j), &local_g[j], 1.0, &mut gradient);
        scatter_matrix(map.slots(j), &local_h[j], 1.0, &mut hessian);
    }
    ws.local_g = local_g;
    ws.local_h = local_h;
    if !value.is_finite() {
        gradient.fill(f64::NAN);
        hessian.fill(f64::NAN);
    }
    LogLikelihood {
        value,
        gradient,
        hessian,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{ConditionSpec, Record};
    use crate::model::normal;

    #[test]
    fn yes_no_log_likelihood_is_the_binomial_kernel() {
        // lnL = h ln H + (N_S − h) ln(1 − H) + f ln F + (N_N − f) ln(1 − F) with
        // H = Φ(d′/2 − c), F = Φ(−d′/2 − c) (project convention).
        let rec = Record::Full {
            present: 30,
            absent: 40,
        };
        let model =
            ObservationModel::new(vec![ConditionSpec::yes_no("lab", rec, 1.0, 0.0, 0.5)]).unwrap();
        let counts = Counts::new(&model, vec![vec![9.0, 21.0], vec![30.0, 10.0]]).unwrap();
        let (d, c) = (1.3, 0.1);
        let h = normal::cdf(d / 2.0 - c);
        let f = normal::cdf(-d / 2.0 - c);
        let expected = 21.0 * h.ln() + 9.0 * (1.0 - h).ln() + 10.0 * f.ln() + 30.0 * (1.0 - f).ln();
        let got = log_likelihood(&model, &counts, &[d, c]).unwrap();
        assert!((got - expected).abs() < 1e-12);
        assert!(log_likelihood(&model, &counts, &[d]).is_err());
        assert!(log_likelihood(&model, &counts, &[d, f64::NAN]).is_err());
        assert!(Counts::new(&model, vec![vec![1.0, 2.0]]).is_err());
    }
}
