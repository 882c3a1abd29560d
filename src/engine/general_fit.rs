//! The general route: any design the closed forms do not cover (linked conditions, error or
//! response totals, base rates known, censused or unknown), fitted with the one likelihood
//! over observed cells by Newton's method; and the hypothesis tests of every route, which
//! refit the restricted models on the same counts.
//!
//! The counts come from the scenario's [`super::sampler::TableSampler`], drawn from the true
//! model (lapses included); the fit uses the model a field analysis would use, without
//! lapses, so lapses show up as bias, as they would in data.

use super::contrast::Contrast;
use super::sampler::TableSampler;
use super::tally::{DatasetOutcome, EstimateTally, QuantityTally, TestTally};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::information::{Precision, precision};
use crate::cells::likelihood::Counts;
use crate::cells::newton::{Fit, NewtonOptions, Start, StopReason, fit};
use crate::cells::observation_model::ObservationModel;
use crate::design::quantities::{percent_correct, reported_quantities};
use crate::infer::{likelihood_ratio_test, signed_root_test, wald_test};
use crate::vocab::{Quantity, RateCorrection, Sided};

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

/// The analysis model with the plan's correction: turns sampled counts into fitted counts.
#[derive(Debug, Clone)]
pub struct GeneralFit {
    model: ObservationModel,
    /// Whether each block is a full row of one stimulus class (the correction applies).
    full_rows: Vec<bool>,
    correction: RateCorrection,
    options: NewtonOptions,
}

/// A converged general fit of one dataset, with the counts it was fitted to.
pub struct FittedDataset {
    pub counts: Counts,
    pub result: Fit,
    /// Covariance and natural SEs from the observed information at θ̂.
    pub precision: Precision,
}

/// Why a dataset has no usable general fit.
enum Unfitted {
    Degenerate,
    NotConverged,
}

impl GeneralFit {
    /// The fit of `model` (the analysis model, lapses off) under `correction`.
    pub fn new(model: ObservationModel, correction: RateCorrection) -> Self {
        let full_rows = model
            .blocks()
            .iter()
            .map(|b| matches!(b.kind, BlockKind::PresentTrials | BlockKind::AbsentTrials))
            .collect();
        Self {
            model,
            full_rows,
            correction,
            options: NewtonOptions::default(),
        }
    }

    /// The observation model the fits use.
    pub fn model(&self) -> &ObservationModel {
        &self.model
    }

    /// The corrected count rows of a sampled table, and whether any full row had an empty
    /// cell; `None` when the correction leaves the dataset degenerate.
    fn rows(&self, sampler: &TableSampler, table: &[u64]) -> Option<(Vec<Vec<f64>>, bool)> {
        let mut extreme = false;
        let mut rows = Vec::with_capacity(sampler.block_count());
        for (b, &full) in self.full_rows.iter().enumerate() {
            let mut row: Vec<f64> = table[sampler.block_range(b)]
                .iter()
                .map(|&x| x as f64)
                .collect();
            if full {
                match self.correction.apply_to_row(&mut row) {
                    Ok(empty) => extreme |= empty,
                    Err(_) => return None,
                }
            } else {
                extreme |= row.contains(&0.0);
            }
            rows.push(row);
        }
        Some((rows, extreme))
    }

    /// Fits one sampled table; the flag says whether it had an empty cell.
    fn fit(
        &self,
        sampler: &TableSampler,
        table: &[u64],
    ) -> (Result<FittedDataset, Unfitted>, bool) {
        let Some((rows, extreme)) = self.rows(sampler, table) else {
            return (Err(Unfitted::Degenerate), true);
        };
        let Ok(counts) = Counts::new(&self.model, rows) else {
            return (Err(Unfitted::NotConverged), extreme);
        };
        let Ok(result) = fit(&self.model, &counts, Start::Hypothesised, &self.options) else {
            return (Err(Unfitted::NotConverged), extreme);
        };
        match result.stop {
            StopReason::Converged => {}
            StopReason::NotIdentified | StopReason::Degenerate => {
                return (Err(Unfitted::Degenerate), extreme);
            }
            StopReason::IterationLimit | StopReason::NumericalFailure => {
                return (Err(Unfitted::NotConverged), extreme);
            }
        }
        match precision(&self.model, &result.theta, &result.observed_information) {
            Ok(Some(precision)) => (
                Ok(FittedDataset {
                    counts,
                    precision,
                    result,
                }),
                extreme,
            ),
            _ => (Err(Unfitted::Degenerate), extreme),
        }
    }
}

/// The general route's estimates: every reported natural quantity of every condition.
#[derive(Debug, Clone)]
pub struct GeneralEstimator {
    fit: GeneralFit,
    slots: Vec<Slot>,
    template: Vec<QuantityTally>,
}

impl GeneralEstimator {
    pub fn new(fit: GeneralFit, z_crit: f64) -> Self {
        let (slots, template) = slots(fit.model(), z_crit);
        Self {
            fit,
            slots,
            template,
        }
    }

    /// The fit this estimator uses.
    pub fn general_fit(&self) -> &GeneralFit {
        &self.fit
    }

    /// An empty tally of the reported quantities.
    pub fn tally(&self) -> EstimateTally {
        EstimateTally::new(self.template.clone())
    }

    /// Fits one sampled table and records its estimates; returns the fit for the tests.
    pub fn record(
        &self,
        sampler: &TableSampler,
        table: &[u64],
        tally: &mut EstimateTally,
    ) -> Option<FittedDataset> {
        let (fitted, extreme) = self.fit.fit(sampler, table);
        let fitted = match fitted {
            Ok(f) => f,
            Err(Unfitted::Degenerate) => {
                tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0);
                return None;
            }
            Err(Unfitted::NotConverged) => {
                tally.push_unfitted(DatasetOutcome::NotConverged, extreme, 1.0);
                return None;
            }
        };
        let model = self.fit.model();
        let (Ok(naturals), Ok(Some(prec))) = (
            model.natural(&fitted.result.theta),
            precision(
                model,
                &fitted.result.theta,
                &fitted.result.observed_information,
            ),
        ) else {
            tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0);
            return None;
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
                Quantity::PercentCorrect => match p.se_d_prime {
                    Some(se) => {
                        let (pc, se) = percent_correct(v.d_prime, se);
                        (pc, Some(se))
                    }
                    None => (f64::NAN, None),
                },
                _ => (f64::NAN, None),
            };
            values.push((est, se.unwrap_or(f64::NAN)));
        }
        if values
            .iter()
            .any(|(e, s)| !(e.is_finite() && s.is_finite()))
        {
            tally.push_unfitted(DatasetOutcome::Degenerate, extreme, 1.0);
            return None;
        }
        tally.push_fit(&values, extreme, 1.0);
        Some(fitted)
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

/// The plan's hypotheses on one scenario: Wald tests on the general fit's covariance and
/// likelihood-ratio tests against the restricted fits, all on the same counts.
#[derive(Debug, Clone)]
pub struct HypothesisTests {
    fit: GeneralFit,
    tests: Vec<PreparedTest>,
    alpha: f64,
}

impl HypothesisTests {
    /// Tests of `contrasts` at level `alpha` with the analysis fit `fit`; `None` without
    /// contrasts.
    pub fn new(
        fit: GeneralFit,
        contrasts: Vec<Contrast>,
        alpha: f64,
    ) -> Result<Option<Self>, SpecError> {
        if contrasts.is_empty() {
            return Ok(None);
        }
        let tests = contrasts
            .into_iter()
            .map(|contrast| {
                let restricted = ObservationModel::new(contrast.restricted.clone())?;
                Ok(PreparedTest {
                    contrast,
                    restricted,
                })
            })
            .collect::<Result<Vec<_>, SpecError>>()?;
        Ok(Some(Self { fit, tests, alpha }))
    }

    /// Empty test tallies, in plan order.
    pub fn tallies(&self) -> Vec<TestTally> {
        self.tests
            .iter()
            .map(|p| TestTally::new(p.contrast.name.clone(), p.contrast.null_is_true()))
            .collect()
    }

    /// Tests one dataset. `fitted` is the general fit when the estimating route already made
    /// it; otherwise it is made here. A dataset without a fit rejects nothing.
    pub fn record(
        &self,
        sampler: &TableSampler,
        table: &[u64],
        fitted: Option<FittedDataset>,
        tally: &mut EstimateTally,
    ) {
        let fitted = match fitted {
            Some(f) => f,
            None => match self.fit.fit(sampler, table).0 {
                Ok(f) => f,
                Err(_) => {
                    return tally.push_rejections(&vec![(false, false); self.tests.len()], 1.0);
                }
            },
        };
        let rejections: Vec<(bool, bool)> = self
            .tests
            .iter()
            .map(|t| {
                self.test(
                    t,
                    &fitted.counts,
                    &fitted.result.theta,
                    fitted.result.log_likelihood,
                    &fitted.precision.covariance,
                )
            })
            .collect();
        tally.push_rejections(&rejections, 1.0);
    }

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
        let lr = match fit(
            &t.restricted,
            counts,
            Start::Hypothesised,
            &self.fit.options,
        ) {
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
