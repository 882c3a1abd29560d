//! The general path: any design the fast paths do not cover (linked conditions, error or
//! response totals, base rates known, censused or unknown, lapses), simulated block by
//! block and fitted with the one likelihood over observed cells.
//!
//! The simulation uses the true model (lapses included); the fit uses the model a field
//! analysis would use, without lapses, so lapses show up as bias, as they would in data.

use super::parallel::Kernel;
use super::tally::{EstimateTally, Outcome, Quantity, QuantityTally, TestTally};
use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::information::precision;
use crate::cells::likelihood::Counts;
use crate::cells::newton::{FitOptions, Start, StopReason, fit};
use crate::cells::observation_model::ObservationModel;
use crate::design::Design;
use crate::design::model::{condition_specs, truth_specs};
use crate::design::quantities::reported_quantities;
use crate::fit::RateCorrection;
use crate::infer::{Sided, likelihood_ratio_test, signed_root_test, wald_test};
use crate::model::Observer;
use crate::power::Contrast;
use crate::simulate::{ReplicateRng, multinomial_into};

/// Which natural quantity of which condition a tally slot holds.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Slot {
    condition: usize,
    quantity: Quantity,
}

/// A hypothesis ready to test: its contrast and its restricted (null) model.
#[derive(Debug, Clone)]
struct PreparedTest {
    contrast: Contrast,
    restricted: ObservationModel,
}

/// Everything one general scenario fixes.
#[derive(Debug, Clone)]
pub struct CellsKernel {
    tests: Vec<PreparedTest>,
    alpha: f64,
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
        Self::with_tests(
            design,
            observer,
            trials,
            correction,
            z_crit,
            &|_| Vec::new(),
            0.05,
        )
    }

    /// As [`CellsKernel::new`], also testing the contrasts `tests` gives for the fit model
    /// at level `alpha`.
    pub fn with_tests(
        design: &Design,
        observer: &Observer,
        trials: u32,
        correction: RateCorrection,
        z_crit: f64,
        tests: &dyn Fn(&ObservationModel) -> Vec<Contrast>,
        alpha: f64,
    ) -> Result<Self, SpecError> {
        let truth = ObservationModel::new(truth_specs(design, observer, trials))?;
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
        let tests = tests(&fit_model)
            .into_iter()
            .map(|contrast| {
                let restricted = ObservationModel::new(contrast.restricted.clone())?;
                Ok(PreparedTest {
                    contrast,
                    restricted,
                })
            })
            .collect::<Result<Vec<_>, SpecError>>()?;
        Ok(Self {
            tests,
            alpha,
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

/// The estimated natural quantities, one slot each, by the shared rule of
/// [`reported_quantities`] (so `explore` and `run` rows line up).
fn slots(model: &ObservationModel, z_crit: f64) -> (Vec<Slot>, Vec<QuantityTally>) {
    reported_quantities(model.conditions())
        .into_iter()
        .map(|q| {
            (
                Slot {
                    condition: q.condition,
                    quantity: q.quantity,
                },
                QuantityTally::new(q.quantity, q.truth, z_crit).in_condition(q.label),
            )
        })
        .unzip()
}

impl CellsKernel {
    /// Wald and likelihood-ratio decisions for one test; a test that cannot be computed
    /// (restricted fit failed, SE not finite) does not reject.
    fn test(
        &self,
        t: &PreparedTest,
        counts: &Counts,
        theta: &[f64],
        log_likelihood: f64,
        covariance: &nalgebra::DMatrix<f64>,
    ) -> (bool, bool) {
        let c = &t.contrast;
        let (est, se) = c.wald(theta, covariance);
        let wald = wald_test(est, se, c.null, c.sided, self.alpha).is_ok_and(|o| o.reject);
        let lr = match fit(&t.restricted, counts, Start::Hypothesised, &self.options) {
            Ok(r) if r.stop == StopReason::Converged => {
                let outcome = match c.sided {
                    Sided::TwoSided => {
                        likelihood_ratio_test(log_likelihood, r.log_likelihood, 1, self.alpha)
                    }
                    sided => signed_root_test(
                        log_likelihood,
                        r.log_likelihood,
                        est,
                        c.null,
                        sided,
                        self.alpha,
                    ),
                };
                outcome.is_ok_and(|o| o.reject)
            }
            _ => false,
        };
        (wald, lr)
    }
}

impl Kernel for CellsKernel {
    type Tally = EstimateTally;

    fn tally(&self) -> EstimateTally {
        let mut t = EstimateTally::new(self.template.clone());
        t.tests = self
            .tests
            .iter()
            .map(|p| TestTally::new(p.contrast.name.clone(), p.contrast.null_is_true()))
            .collect();
        t
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
            StopReason::NotIdentified | StopReason::Degenerate => {
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
        if !self.tests.is_empty() {
            let rejections: Vec<(bool, bool)> = self
                .tests
                .iter()
                .map(|t| {
                    self.test(
                        t,
                        &counts,
                        &result.theta,
                        result.log_likelihood,
                        &prec.covariance,
                    )
                })
                .collect();
            tally.push_rejections(&rejections, 1.0);
        }
    }

    fn merge(&self, into: &mut EstimateTally, other: EstimateTally) {
        into.merge(other);
    }
}
