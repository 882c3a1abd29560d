//! The general path: any design the fast paths do not cover (linked conditions, error or
//! response totals, base rates known, censused or unknown, lapses), simulated block by
//! block and fitted with the one likelihood over observed cells.
//!
//! The simulation uses the true model (lapses included); the fit uses the model a field
//! analysis would use, without lapses, so lapses show up as bias, as they would in data.

use super::parallel::Kernel;
use super::tally::{EstimateTally, Outcome, Quantity, QuantityTally};
use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::information::precision;
use crate::cells::likelihood::Counts;
use crate::cells::newton::{FitOptions, Start, StopReason, fit};
use crate::cells::observation_model::ObservationModel;
use crate::cells::spec::{BaseRateLink, Role};
use crate::design::Design;
use crate::design::model::condition_specs;
use crate::fit::RateCorrection;
use crate::model::Observer;
use crate::simulate::{ReplicateRng, multinomial_into};

/// Which natural quantity of which condition a tally slot holds.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Slot {
    condition: usize,
    quantity: Quantity,
}

/// Everything one general scenario fixes.
#[derive(Debug, Clone)]
pub struct CellsKernel {
    fit_model: ObservationModel,
    /// Cell probabilities of every block under the true model.
    probabilities: Vec<Vec<f64>>,
    sizes: Vec<u64>,
    full_rows: Vec<bool>,
    correction: RateCorrection,
    slots: Vec<Slot>,
    template: Vec<QuantityTally>,
    options: FitOptions,
}

impl CellsKernel {
    pub fn new(
        design: &Design,
        observer: &Observer,
        trials: u32,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Result<Self, SpecError> {
        let truth = ObservationModel::new(condition_specs(design, observer, trials))?;
        let mut analysis = condition_specs(design, observer, trials);
        analysis.iter_mut().for_each(|c| c.lapse = None);
        let fit_model = ObservationModel::new(analysis)?;
        let theta = truth.hypothesised_theta();
        let probabilities = cell_probabilities(&truth, &theta, Order::First)
            .map_err(|e| SpecError::Probabilities(e.to_string()))?
            .into_iter()
            .map(|b| b.p)
            .collect();
        let blocks = truth.blocks();
        let sizes = blocks.iter().map(|b| b.n.round() as u64).collect();
        let full_rows = blocks
            .iter()
            .map(|b| matches!(b.kind, BlockKind::PresentTrials | BlockKind::AbsentTrials))
            .collect();
        let (slots, template) = slots(&fit_model, z_crit);
        Ok(Self {
            fit_model,
            probabilities,
            sizes,
            full_rows,
            correction,
            slots,
            template,
            options: FitOptions::default(),
        })
    }

    /// The observation model the fits use.
    pub fn model(&self) -> &ObservationModel {
        &self.fit_model
    }
}

/// The estimated natural quantities, one slot each: d′ and c of every condition (once when
/// shared), σ when estimated, π when estimated. The first two slots are d′ and c of the
/// first condition, as the tally's correlation expects.
fn slots(model: &ObservationModel, z_crit: f64) -> (Vec<Slot>, Vec<QuantityTally>) {
    let specs = model.conditions();
    let many = specs.len() > 1;
    let mut slots = Vec::new();
    let mut tallies = Vec::new();
    let mut add = |j: usize, quantity: Quantity, truth: f64, shared: bool| {
        let label = (many && !shared).then(|| specs[j].name.clone());
        slots.push(Slot {
            condition: j,
            quantity,
        });
        tallies.push(QuantityTally::new(quantity, truth, z_crit).in_condition(label));
    };
    for (j, spec) in specs.iter().enumerate() {
        let v = &spec.values;
        let r = &spec.roles;
        for (quantity, role, truth) in [
            (Quantity::DPrime, r.d_prime, v.d_prime),
            (Quantity::Criterion, r.criterion, v.criterion),
            (Quantity::Sigma, r.sigma, v.sigma),
        ] {
            let shared = role == Role::Shared;
            if role != Role::Fixed && (!shared || j == 0) {
                add(j, quantity, truth, shared);
            }
        }
        if spec
            .record
            .base_rate_knowledge()
            .is_some_and(|k| k.is_free())
        {
            let shared = r.base_rate == BaseRateLink::Shared;
            if !shared || j == 0 {
                add(j, Quantity::BaseRate, v.base_rate, shared);
            }
        }
    }
    // Keep d′ and c of the first condition in front, in that order.
    let order: Vec<usize> = {
        let mut idx: Vec<usize> = (0..slots.len()).collect();
        idx.sort_by_key(|&i| match (slots[i].condition, slots[i].quantity) {
            (0, Quantity::DPrime) => 0,
            (0, Quantity::Criterion) => 1,
            _ => 2 + i,
        });
        idx
    };
    (
        order.iter().map(|&i| slots[i]).collect(),
        order.iter().map(|&i| tallies[i].clone()).collect(),
    )
}

impl Kernel for CellsKernel {
    type Tally = EstimateTally;

    fn tally(&self) -> EstimateTally {
        EstimateTally::new(self.template.clone())
    }

    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut EstimateTally) {
        let mut extreme = false;
        let mut cells = Vec::with_capacity(self.sizes.len());
        for ((p, &n), &full) in self
            .probabilities
            .iter()
            .zip(&self.sizes)
            .zip(&self.full_rows)
        {
            let mut draw = vec![0u64; p.len()];
            multinomial_into(rng, n, p, &mut draw);
            let mut row: Vec<f64> = draw.iter().map(|&x| x as f64).collect();
            if full {
                match self.correction.apply_to_row(&mut row) {
                    Ok(empty) => extreme |= empty,
                    Err(_) => return tally.push_unfitted(Outcome::Degenerate, true, 1.0),
                }
            } else {
                extreme |= row.contains(&0.0);
            }
            cells.push(row);
        }
        let Ok(counts) = Counts::new(&self.fit_model, cells) else {
            tally.push_unfitted(Outcome::NotConverged, extreme, 1.0);
            return;
        };
        let Ok(result) = fit(&self.fit_model, &counts, Start::Hypothesised, &self.options) else {
            tally.push_unfitted(Outcome::NotConverged, extreme, 1.0);
            return;
        };
        match result.stop {
            StopReason::Converged => {}
            StopReason::NotIdentified => {
                return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0);
            }
            StopReason::IterationLimit | StopReason::NumericalFailure => {
                return tally.push_unfitted(Outcome::NotConverged, extreme, 1.0);
            }
        }
        let (Ok(naturals), Ok(Some(prec))) = (
            self.fit_model.natural(&result.theta),
            precision(&self.fit_model, &result.theta, &result.observed_information),
        ) else {
            return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0);
        };
        let mut values = Vec::with_capacity(self.slots.len());
        for s in &self.slots {
            let v = &naturals[s.condition];
            let p = &prec.conditions[s.condition];
            let (est, se) = match s.quantity {
                Quantity::DPrime => (v.d_prime, p.se_d_prime),
                Quantity::Criterion => (v.criterion, p.se_criterion),
                Quantity::Sigma => (v.sigma, p.se_sigma),
                Quantity::BaseRate => (v.base_rate, p.se_base_rate),
                _ => (f64::NAN, None),
            };
            values.push((est, se.unwrap_or(f64::NAN)));
        }
        if values
            .iter()
            .any(|(e, s)| !(e.is_finite() && s.is_finite()))
        {
            return tally.push_unfitted(Outcome::Degenerate, extreme, 1.0);
        }
        tally.push_fit(&values, extreme, 1.0);
    }

    fn merge(&self, into: &mut EstimateTally, other: EstimateTally) {
        into.merge(other);
    }
}
