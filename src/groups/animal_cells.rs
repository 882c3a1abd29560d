//! Animals of any other design (several conditions, error or response totals, base rates):
//! the general observation model of `cells`, as in `engine::cells_kernel`.
//!
//! An animal is the design's true model (lapses included) at θ with its own d′ and c: every
//! θ entry of a d′ moves by δd′ (held at 0 or above), every entry of a criterion by δc, so
//! shared parameters stay shared and the offsets between conditions are kept. Its counts are
//! fitted with the analysis model (lapses off, as a field analysis would), from the
//! population's values.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate};
use super::population::Deviation;
use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::information::precision;
use crate::cells::likelihood::Counts;
use crate::cells::newton::{FitOptions, Start, StopReason, fit};
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{SLOT_CRITERION, SLOT_D_PRIME, SLOT_LN_SIGMA, Slot};
use crate::design::Design;
use crate::design::model::condition_specs;
use crate::model::Observer;
use crate::simulate::{ReplicateRng, multinomial_into};
use crate::vocab::RateCorrection;

/// The general path of one design at one trial count.
#[derive(Debug, Clone)]
pub struct CellsAnimals {
    truth: ObservationModel,
    fit_model: ObservationModel,
    theta: Vec<f64>,
    d_prime_entries: Vec<usize>,
    criterion_entries: Vec<usize>,
    sizes: Vec<u64>,
    full_rows: Vec<bool>,
    correction: RateCorrection,
    options: FitOptions,
}

/// The θ entry a condition reads a local coordinate from, if it is estimated.
fn entry(model: &ObservationModel, condition: usize, slot: usize) -> Option<usize> {
    match model.parameters().slots(condition).get(slot) {
        Some(Slot::Theta(i)) => Some(*i),
        _ => None,
    }
}

impl CellsAnimals {
    pub fn new(
        design: &Design,
        observer: &Observer,
        trials: u32,
        correction: RateCorrection,
    ) -> Result<Self, SpecError> {
        let truth = ObservationModel::new(condition_specs(design, observer, trials))?;
        let mut analysis = condition_specs(design, observer, trials);
        analysis.iter_mut().for_each(|c| c.lapse = None);
        let fit_model = ObservationModel::new(analysis)?;
        let entries = |slot: usize| {
            let mut v: Vec<usize> = (0..truth.conditions().len())
                .filter_map(|j| entry(&truth, j, slot))
                .collect();
            v.sort_unstable();
            v.dedup();
            v
        };
        let blocks = truth.blocks();
        Ok(Self {
            theta: truth.hypothesised_theta(),
            d_prime_entries: entries(SLOT_D_PRIME),
            criterion_entries: entries(SLOT_CRITERION),
            sizes: blocks.iter().map(|b| b.n.round() as u64).collect(),
            full_rows: blocks
                .iter()
                .map(|b| matches!(b.kind, BlockKind::PresentTrials | BlockKind::AbsentTrials))
                .collect(),
            truth,
            fit_model,
            correction,
            options: FitOptions::default(),
        })
    }

    /// θ of the true model for an animal with this deviation.
    pub fn animal_theta(&self, deviation: &Deviation) -> Vec<f64> {
        let mut theta = self.theta.clone();
        for &i in &self.d_prime_entries {
            theta[i] = deviation.d_prime_at(self.theta[i]);
        }
        for &i in &self.criterion_entries {
            theta[i] = deviation.criterion_at(self.theta[i]);
        }
        theta
    }

    /// The analysis fit of (uncorrected) counts, after the plan's correction of full rows;
    /// `None` unless it converged at a point of full-rank information.
    fn fit_counts(&self, raw: &[Vec<f64>]) -> Option<crate::cells::newton::Fit> {
        let mut cells = raw.to_vec();
        for (row, &full) in cells.iter_mut().zip(&self.full_rows) {
            if full {
                self.correction.apply_to_row(row).ok()?;
            }
        }
        let counts = Counts::new(&self.fit_model, cells).ok()?;
        let result = fit(&self.fit_model, &counts, Start::Hypothesised, &self.options).ok()?;
        (result.stop == StopReason::Converged).then_some(result)
    }
}

impl AnimalPath for CellsAnimals {
    type Counts = Vec<Vec<f64>>;

    fn empty(&self) -> Vec<Vec<f64>> {
        self.truth
            .blocks()
            .iter()
            .map(|b| vec![0.0; b.cells.len()])
            .collect()
    }

    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> Vec<Vec<f64>> {
        let theta = self.animal_theta(deviation);
        let Ok(blocks) = cell_probabilities(&self.truth, &theta, Order::First) else {
            return self.empty();
        };
        blocks
            .iter()
            .zip(&self.sizes)
            .map(|(b, &n)| {
                let mut draw = vec![0u64; b.p.len()];
                multinomial_into(rng, n, &b.p, &mut draw);
                draw.iter().map(|&x| x as f64).collect()
            })
            .collect()
    }

    fn add(&self, into: &mut Vec<Vec<f64>>, other: &Vec<Vec<f64>>) {
        for (a, b) in into.iter_mut().zip(other) {
            for (x, y) in a.iter_mut().zip(b) {
                *x += y;
            }
        }
    }

    fn fit_animal(&self, counts: &Vec<Vec<f64>>) -> Option<AnimalEstimate> {
        let result = self.fit_counts(counts)?;
        let naturals = self.fit_model.natural(&result.theta).ok()?;
        let estimate = AnimalEstimate {
            d_prime: naturals.iter().map(|v| v.d_prime).collect(),
            criterion: naturals.iter().map(|v| v.criterion).collect(),
            ln_sigma: entry(&self.fit_model, 0, SLOT_LN_SIGMA).map(|i| result.theta[i]),
        };
        let finite = estimate
            .d_prime
            .iter()
            .chain(&estimate.criterion)
            .all(|x| x.is_finite());
        finite.then_some(estimate)
    }

    fn fit_pooled(&self, counts: &Vec<Vec<f64>>) -> Option<PooledEstimate> {
        let result = self.fit_counts(counts)?;
        let prec =
            precision(&self.fit_model, &result.theta, &result.observed_information).ok()??;
        let naturals = self.fit_model.natural(&result.theta).ok()?;
        let m = &self.fit_model;
        // θ index (if estimated) of every entry of the flattened (d′, c) vector.
        let index: Vec<Option<usize>> = (0..naturals.len())
            .flat_map(|j| [entry(m, j, SLOT_D_PRIME), entry(m, j, SLOT_CRITERION)])
            .collect();
        let values: Vec<f64> = naturals
            .iter()
            .flat_map(|v| [v.d_prime, v.criterion])
            .collect();
        let dim = values.len();
        let mut covariance = vec![0.0; dim * dim];
        for (a, ia) in index.iter().enumerate() {
            for (b, ib) in index.iter().enumerate() {
                if let (Some(i), Some(k)) = (ia, ib) {
                    covariance[a * dim + b] = prec.covariance[(*i, *k)];
                }
            }
        }
        let ln_sigma = entry(m, 0, SLOT_LN_SIGMA)
            .map(|i| (result.theta[i], prec.covariance[(i, i)].max(0.0).sqrt()));
        values
            .iter()
            .all(|x| x.is_finite())
            .then_some(PooledEstimate {
                values,
                covariance,
                ln_sigma,
            })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::{BaseRate, Condition, RecordKind, Response, SharedParameter};
    use crate::groups::animal::criterion_index;

    /// Two yes/no conditions sharing d′, criteria 0.5 and 0.0 (the general path).
    fn animals() -> CellsAnimals {
        let condition = |name: &str, presence: f64, criterion: f64| Condition {
            name: name.into(),
            presence,
            d_prime: 1.5,
            criterion,
        };
        let design = Design {
            name: "two".into(),
            presence: 0.25,
            trials: vec![400],
            response: Response::YesNo,
            record: RecordKind::Full,
            base_rate: BaseRate::Known,
            conditions: vec![condition("rare", 0.25, 0.5), condition("common", 0.6, 0.0)],
            shared: vec![SharedParameter::DPrime],
        };
        let observer = Observer {
            d_prime: 1.5,
            criterion: 0.5,
            sigma: 1.0,
            lapse: None,
        };
        CellsAnimals::new(&design, &observer, 400, RateCorrection::None).unwrap()
    }

    #[test]
    fn an_animal_moves_every_condition_alike() {
        let a = animals();
        let dev = Deviation {
            d_prime: 0.2,
            criterion: -0.3,
        };
        let theta = a.animal_theta(&dev);
        let values = a.truth.natural(&theta).unwrap();
        assert!((values[0].d_prime - 1.7).abs() < 1e-12);
        assert!((values[1].d_prime - 1.7).abs() < 1e-12);
        assert!((values[0].criterion - 0.2).abs() < 1e-12);
        assert!((values[1].criterion + 0.3).abs() < 1e-12);
    }

    // Expected counts of an animal (no sampling noise) fit back to its own values, and the
    // pooled fit's shift contrast (0.5 between conditions) has a positive SE.
    #[test]
    fn expected_counts_fit_back_to_the_animal() {
        let a = animals();
        let dev = Deviation {
            d_prime: -0.1,
            criterion: 0.2,
        };
        let theta = a.animal_theta(&dev);
        let blocks = cell_probabilities(&a.truth, &theta, Order::First).unwrap();
        let counts: Vec<Vec<f64>> = blocks
            .iter()
            .zip(&a.sizes)
            .map(|(b, &n)| b.p.iter().map(|p| p * n as f64).collect())
            .collect();
        let e = a.fit_animal(&counts).unwrap();
        assert!((e.d_prime[0] - 1.4).abs() < 1e-6 && (e.d_prime[1] - 1.4).abs() < 1e-6);
        assert!((e.criterion[0] - 0.7).abs() < 1e-6);
        assert!((e.criterion[1] - 0.2).abs() < 1e-6);
        let p = a.fit_pooled(&counts).unwrap();
        let (shift, se) = p
            .contrast(&[(criterion_index(0), 1.0), (criterion_index(1), -1.0)])
            .unwrap();
        assert!((shift - 0.5).abs() < 1e-6 && se > 0.0);
    }
}
