//! Observed-cell probabilities p(θ) with analytic ∂p/∂θ and ∂²p/∂θ∂θᵀ, for every block.
//!
//! A cell is Σ_terms w·S with w ∈ {1, π, 1 − π} and S = P(category | class) or 1, so
//! ∂p = Σ w ∂S + S ∂w and ∂²p = Σ w ∂²S + ∂w ∂Sᵀ + ∂S ∂wᵀ + S ∂²w, with π = 1/(1 + e^{−η}),
//! ∂π/∂η = π(1 − π), ∂²π/∂η² = π(1 − π)(1 − 2π). Everything is first computed in the block's
//! condition's local coordinates and then scattered into θ (sharing sums the contributions).

use nalgebra::{DMatrix, DVector};

use crate::cells::coarsening::{Source, Weight};
use crate::cells::error::InputError;
use crate::cells::full_table::TableJets;
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{Slot, local_dim, slot_base_rate};

/// How many derivatives to compute.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Order {
    /// p and ∂p/∂θ.
    First,
    /// p, ∂p/∂θ and ∂²p/∂θ∂θᵀ.
    Second,
}

/// One cell in its condition's local coordinates (L = K + 2).
pub(crate) struct LocalCell<'a> {
    pub block: usize,
    pub cell: usize,
    pub condition: usize,
    pub value: f64,
    pub grad: &'a [f64],
    /// L × L row-major; empty for first order.
    pub hess: &'a [f64],
}

/// Scratch space reused across evaluations (one per fit or worker).
#[derive(Debug, Default)]
pub(crate) struct Workspace {
    tables: Vec<TableJets>,
    u: Vec<f64>,
    pi: Vec<(f64, f64, f64)>,
    grad: Vec<f64>,
    hess: Vec<f64>,
    /// Per-condition gradient and Hessian sums of `derivatives_with`, kept between calls so
    /// a Newton step allocates nothing for them.
    pub(crate) local_g: Vec<Vec<f64>>,
    pub(crate) local_h: Vec<Vec<f64>>,
}

thread_local! {
    /// One workspace per worker thread, lent to each fit: buffers sized by the first fit are
    /// reused by every later one (a fresh workspace per fit was a fifth of the general route's
    /// time in allocation). Every buffer is overwritten before it is read, so reuse cannot
    /// change a result.
    static SPARE: std::cell::Cell<Option<Workspace>> = const { std::cell::Cell::new(None) };
}

impl Workspace {
    /// This thread's spare workspace (or a new one); hand it back with [`Workspace::give_back`].
    pub(crate) fn borrow_spare() -> Workspace {
        SPARE.with(|s| s.take()).unwrap_or_default()
    }

    /// Returns a workspace for the next fit on this thread.
    pub(crate) fn give_back(self) {
        SPARE.with(|s| s.set(Some(self)));
    }
}

impl Workspace {
    /// Evaluates every cell at θ (already checked) and hands each to `visit`, block by block.
    pub fn visit(
        &mut self,
        model: &ObservationModel,
        theta: &[f64],
        second: bool,
        mut visit: impl FnMut(&LocalCell),
    ) {
        let conditions = model.conditions();
        self.tables
            .resize_with(conditions.len(), TableJets::default);
        self.pi.resize(conditions.len(), (0.0, 0.0, 0.0));
        for (j, spec) in conditions.iter().enumerate() {
            let l = local_dim(spec.categories);
            self.u.resize(l, 0.0);
            model.parameters().local_values(j, theta, &mut self.u);
            self.tables[j].evaluate(
                &self.u,
                spec.categories,
                spec.boundary,
                spec.lapse.as_ref(),
                second,
                spec.record.d_prime_scale(),
            );
            let pi = 1.0 / (1.0 + (-self.u[slot_base_rate(spec.categories)]).exp());
            let q = pi * (1.0 - pi);
            self.pi[j] = (pi, q, q * (1.0 - 2.0 * pi));
        }
        for (bi, block) in model.blocks().iter().enumerate() {
            let j = block.condition;
            let table = &self.tables[j];
            let l = table.dim();
            let ps = slot_base_rate(conditions[j].categories);
            let (pi, dpi, d2pi) = self.pi[j];
            for (ci, cell) in block.cells.iter().enumerate() {
                self.grad.clear();
                self.grad.resize(l, 0.0);
                self.hess.clear();
                self.hess.resize(if second { l * l } else { 0 }, 0.0);
                let mut value = 0.0;
                for term in &cell.terms {
                    let (w, dw, d2w) = match term.weight {
                        Weight::One => (1.0, 0.0, 0.0),
                        Weight::BaseRate => (pi, dpi, d2pi),
                        Weight::NotBaseRate => (1.0 - pi, -dpi, -d2pi),
                    };
                    let (s, ds, d2s) = match term.source {
                        Source::Table { class, category } => (
                            table.value(class, category),
                            table.grad(class, category),
                            table.hess(class, category),
                        ),
                        Source::Constant => (1.0, &[][..], &[][..]),
                    };
                    value += w * s;
                    for (g, d) in self.grad.iter_mut().zip(ds) {
                        *g += w * d;
                    }
                    self.grad[ps] += dw * s;
                    if second {
                        for (h, d) in self.hess.iter_mut().zip(d2s) {
                            *h += w * d;
                        }
                        for (a, d) in ds.iter().enumerate() {
                            self.hess[a * l + ps] += dw * d;
                            self.hess[ps * l + a] += dw * d;
                        }
                        self.hess[ps * l + ps] += d2w * s;
                    }
                }
                visit(&LocalCell {
                    block: bi,
                    cell: ci,
                    condition: j,
                    value,
                    grad: &self.grad,
                    hess: &self.hess,
                });
            }
        }
    }
}

/// Adds `scale`·local into the θ vector through the slots.
pub(crate) fn scatter_vector(slots: &[Slot], local: &[f64], scale: f64, out: &mut DVector<f64>) {
    for (s, v) in slots.iter().zip(local) {
        if let Slot::Theta(i) = *s {
            out[i] += scale * v;
        }
    }
}

/// Adds `scale`·local (L × L row-major) into the θ matrix through the slots.
pub(crate) fn scatter_matrix(slots: &[Slot], local: &[f64], scale: f64, out: &mut DMatrix<f64>) {
    let l = slots.len();
    for (a, sa) in slots.iter().enumerate() {
        let Slot::Theta(i) = *sa else { continue };
        for (b, sb) in slots.iter().enumerate() {
            if let Slot::Theta(k) = *sb {
                out[(i, k)] += scale * local[a * l + b];
            }
        }
    }
}

/// Cell probabilities of one block with their θ derivatives.
#[derive(Debug, Clone, PartialEq)]
pub struct BlockProbabilities {
    /// p for each cell.
    pub p: Vec<f64>,
    /// ∂p/∂θ: one row per cell, one column per θ entry.
    pub jacobian: DMatrix<f64>,
    /// ∂²p/∂θ∂θᵀ for each cell (empty for `Order::First`).
    pub hessians: Vec<DMatrix<f64>>,
}

/// Probabilities of every observed cell at θ, with analytic derivatives of the requested order.
pub fn cell_probabilities(
    model: &ObservationModel,
    theta: &[f64],
    order: Order,
) -> Result<Vec<BlockProbabilities>, InputError> {
    model.check_theta(theta)?;
    let dim = model.dim();
    let mut out: Vec<BlockProbabilities> = model
        .blocks()
        .iter()
        .map(|b| BlockProbabilities {
            p: vec![0.0; b.cells.len()],
            jacobian: DMatrix::zeros(b.cells.len(), dim),
            hessians: Vec::new(),
        })
        .collect();
    let second = order == Order::Second;
    let map = model.parameters();
    Workspace::default().visit(model, theta, second, |c| {
        let slots = map.slots(c.condition);
        let block = &mut out[c.block];
        block.p[c.cell] = c.value;
        let mut g = DVector::zeros(dim);
        scatter_vector(slots, c.grad, 1.0, &mut g);
        block.jacobian.set_row(c.cell, &g.transpose());
        if second {
            let mut h = DMatrix::zeros(dim, dim);
            scatter_matrix(slots, c.hess, 1.0, &mut h);
            block.hessians.push(h);
        }
    });
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{BaseRate, ConditionSpec, Record};

    #[test]
    fn error_totals_cells_sum_to_one_with_zero_gradient_sum() {
        let rec = Record::ErrorTotals {
            encounters: 60,
            base_rate: BaseRate::Census(40),
        };
        let model =
            ObservationModel::new(vec![ConditionSpec::yes_no("f", rec, 1.2, 0.4, 0.3)]).unwrap();
        let blocks = cell_probabilities(&model, &[1.2, 0.4, -0.7], Order::Second).unwrap();
        for b in &blocks {
            assert!((b.p.iter().sum::<f64>() - 1.0).abs() < 1e-14);
            for col in b.jacobian.column_iter() {
                assert!(col.sum().abs() < 1e-14);
            }
            let total: DMatrix<f64> = b.hessians.iter().sum();
            assert!(total.abs().max() < 1e-13);
        }
    }
}
