//! Animals of any other design (several conditions, error or response totals, base rates),
//! simulated and fitted by the engine's general route, as one subject of the design is.
//!
//! An animal is the design's true model (`design::model::truth_specs`: lapses included, and
//! the animal's own σ even where the analysis holds σ at 1) with its own d′ and c: every
//! condition's d′ moves by δd′ (held at 0 or above) and its criterion by δc, so shared
//! parameters stay shared and the offsets between conditions are kept. Its counts are drawn
//! by the engine's `TableSampler` built from that animal's true model, and fitted by the
//! engine's `GeneralEstimator` (the analysis model, lapses off, the plan's correction and the
//! single-subject rule for datasets without a fit), so a fix to either lands here too.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate};
use super::population::{Deviation, Population};
use super::random_effects::{Layout, YesNoRow};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{SLOT_CRITERION, SLOT_D_PRIME, SLOT_LN_SIGMA, Slot};
use crate::cells::spec::ConditionSpec;
use crate::cells::spec::Record;
use crate::design::Design;
use crate::design::model::{condition_specs, truth_specs};
use crate::engine::general_fit::{FittedDataset, GeneralEstimator, GeneralFit};
use crate::engine::sampler::TableSampler;
use crate::model::Observer;
use crate::simulate::ReplicateRng;
use crate::vocab::RateCorrection;

/// The general path of one design at one trial count.
#[derive(Debug, Clone)]
pub struct CellsAnimals {
    /// The population's true condition specs; an animal's are these, moved.
    truth: Vec<ConditionSpec>,
    /// The sampler of the population's true model: the block layout of every animal's table.
    layout: TableSampler,
    estimator: GeneralEstimator,
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
        let truth = truth_specs(design, observer, trials);
        let layout = TableSampler::new(&ObservationModel::new(truth.clone())?)?;
        // The analysis model exactly as a single subject's (engine::scenario_kernel).
        let mut analysis = condition_specs(design, observer, trials);
        analysis.iter_mut().for_each(|c| c.lapse = None);
        let fit = GeneralFit::new(ObservationModel::new(analysis)?, correction);
        // The interval level is the tally's business; group fits read only the fit.
        let estimator = GeneralEstimator::new(fit, crate::infer::z_critical(0.95));
        Ok(Self {
            truth,
            layout,
            estimator,
        })
    }

    /// The true condition specs of an animal with this deviation.
    pub fn animal_specs(&self, deviation: &Deviation) -> Vec<ConditionSpec> {
        let mut specs = self.truth.clone();
        for (j, s) in specs.iter_mut().enumerate() {
            s.values.d_prime = deviation.d_prime_in(j, s.values.d_prime);
            s.values.criterion = deviation.criterion_in(j, s.values.criterion);
            s.values.sigma = deviation.sigma_at(s.values.sigma);
            if let (Some(l), Some(rate)) = (s.lapse.as_mut(), deviation.lapse_rate) {
                l.rate = rate;
            }
        }
        specs
    }

    fn model(&self) -> &ObservationModel {
        self.estimator.general_fit().model()
    }

    /// The single-subject fit of a table; `None` when it has no fit by the engine's rule.
    fn fit_table(&self, table: &[u64]) -> Option<FittedDataset> {
        let mut scratch = self.estimator.tally();
        self.estimator.record(&self.layout, table, &mut scratch)
    }
}

impl AnimalPath for CellsAnimals {
    /// The flat count table, blocks in model order (the sampler's layout).
    type Counts = Vec<u64>;

    fn empty(&self) -> Vec<u64> {
        vec![0; self.layout.cells()]
    }

    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> Vec<u64> {
        let mut table = self.empty();
        let sampler =
            ObservationModel::new(self.animal_specs(deviation)).and_then(|m| TableSampler::new(&m));
        // A model the animal's values cannot build (never for validated plans) leaves an
        // empty table, which has no fit and is counted as left out.
        if let Ok(sampler) = sampler {
            sampler.draw(rng, &mut table);
        }
        table
    }

    fn add(&self, into: &mut Vec<u64>, other: &Vec<u64>) {
        for (x, y) in into.iter_mut().zip(other) {
            *x += y;
        }
    }

    fn fit_animal(&self, table: &Vec<u64>) -> Option<AnimalEstimate> {
        let fitted = self.fit_table(table)?;
        let model = self.model();
        let naturals = model.natural(&fitted.result.theta).ok()?;
        Some(AnimalEstimate {
            d_prime: naturals.iter().map(|v| v.d_prime).collect(),
            criterion: naturals.iter().map(|v| v.criterion).collect(),
            ln_sigma: entry(model, 0, SLOT_LN_SIGMA).map(|i| fitted.result.theta[i]),
        })
    }

    /// Yes/no full-count conditions only, with every d′ and c estimated (shared ones read
    /// one fixed effect); slopes where the population has them and the conditions differ.
    fn random_effects_layout(&self, population: &Population) -> Option<Layout> {
        let model = self.model();
        let conditions = model.conditions();
        let mut pairs = Vec::with_capacity(conditions.len());
        for (j, c) in conditions.iter().enumerate() {
            let full = matches!(c.record, Record::Full { .. }) && c.categories == 2;
            let (Some(d), Some(k)) = (
                entry(model, j, SLOT_D_PRIME),
                entry(model, j, SLOT_CRITERION),
            ) else {
                return None;
            };
            if !full {
                return None;
            }
            pairs.push((d, k));
        }
        // Every θ entry must be one of these d′ or c (no σ, base rate or spacing).
        let fixed = model.dim();
        if (0..fixed).any(|i| !pairs.iter().any(|&(d, c)| d == i || c == i)) {
            return None;
        }
        let several = pairs.len() > 1;
        let criteria_differ = pairs.iter().any(|p| p.1 != pairs[0].1);
        let d_primes_differ = pairs.iter().any(|p| p.0 != pairs[0].0);
        Some(Layout {
            fixed,
            conditions: pairs,
            criterion_slope: several
                && criteria_differ
                && population.slopes.sd_criterion_shift > 0.0,
            d_prime_slope: several && d_primes_differ && population.slopes.sd_d_prime_change > 0.0,
            group_column: false,
        })
    }

    fn yes_no_rows(&self, table: &Vec<u64>) -> Option<Vec<YesNoRow>> {
        let model = self.model();
        let mut rows = vec![[0u64; 4]; model.conditions().len()];
        let mut offset = 0;
        for block in model.blocks() {
            let cells = block.cells.len();
            let counts = &table[offset..offset + cells];
            offset += cells;
            let total: u64 = counts.iter().sum();
            let row = &mut rows[block.condition];
            match block.kind {
                BlockKind::PresentTrials if cells == 2 => *row = [total, counts[1], row[2], row[3]],
                BlockKind::AbsentTrials if cells == 2 => *row = [row[0], row[1], total, counts[1]],
                _ => return None,
            }
        }
        Some(rows)
    }

    fn fit_pooled(&self, table: &Vec<u64>) -> Option<PooledEstimate> {
        let fitted = self.fit_table(table)?;
        let m = self.model();
        let naturals = m.natural(&fitted.result.theta).ok()?;
        // θ index (if estimated) of every entry of the flattened (d′, c) vector.
        let index: Vec<Option<usize>> = (0..naturals.len())
            .flat_map(|j| [entry(m, j, SLOT_D_PRIME), entry(m, j, SLOT_CRITERION)])
            .collect();
        let values: Vec<f64> = naturals
            .iter()
            .flat_map(|v| [v.d_prime, v.criterion])
            .collect();
        let dim = values.len();
        let cov = &fitted.precision.covariance;
        let mut covariance = vec![0.0; dim * dim];
        for (a, ia) in index.iter().enumerate() {
            for (b, ib) in index.iter().enumerate() {
                if let (Some(i), Some(k)) = (ia, ib) {
                    covariance[a * dim + b] = cov[(*i, *k)];
                }
            }
        }
        let ln_sigma = entry(m, 0, SLOT_LN_SIGMA)
            .map(|i| (fitted.result.theta[i], cov[(i, i)].max(0.0).sqrt()));
        Some(PooledEstimate {
            values,
            covariance,
            ln_sigma,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::cell_probabilities::{Order, cell_probabilities};
    use crate::design::{BaseRate, Condition, RecordKind, Response, SharedParameter};
    use crate::groups::animal::criterion_index;

    /// Two yes/no conditions sharing d′, criteria 0.5 and 0.0 (the general path).
    fn animals(trials: u32, sigma: f64) -> CellsAnimals {
        let condition = |name: &str, presence: f64, criterion: f64| Condition {
            name: name.into(),
            presence,
            d_prime: 1.5,
            criterion,
        };
        let design = Design {
            name: "two".into(),
            presence: 0.25,
            trials: vec![trials],
            response: Response::YesNo,
            record: RecordKind::Full,
            base_rate: BaseRate::Known,
            conditions: vec![condition("rare", 0.25, 0.5), condition("common", 0.6, 0.0)],
            shared: vec![SharedParameter::DPrime],
        };
        let observer = Observer {
            d_prime: 1.5,
            criterion: 0.5,
            sigma,
            lapse: None,
        };
        CellsAnimals::new(&design, &observer, trials, RateCorrection::None).unwrap()
    }

    #[test]
    fn an_animal_moves_every_condition_alike() {
        let a = animals(400, 1.0);
        let dev = Deviation {
            d_prime: 0.2,
            criterion: -0.3,
            ..Deviation::default()
        };
        let model = ObservationModel::new(a.animal_specs(&dev)).unwrap();
        let values = model.natural(&model.hypothesised_theta()).unwrap();
        assert!((values[0].d_prime - 1.7).abs() < 1e-12);
        assert!((values[1].d_prime - 1.7).abs() < 1e-12);
        assert!((values[0].criterion - 0.2).abs() < 1e-12);
        assert!((values[1].criterion + 0.3).abs() < 1e-12);
    }

    // A random slope moves every condition after the first by the animal's own shift and
    // change; σ and the lapse rate are the animal's in every condition.
    #[test]
    fn a_slope_moves_only_the_later_conditions() {
        let a = animals(400, 1.0);
        let dev = Deviation {
            criterion: 0.1,
            criterion_shift: -0.25,
            d_prime_change: 0.3,
            ln_sigma: 0.2,
            ..Deviation::default()
        };
        let specs = a.animal_specs(&dev);
        assert!((specs[0].values.criterion - 0.6).abs() < 1e-12);
        assert!((specs[1].values.criterion - (0.0 + 0.1 - 0.25)).abs() < 1e-12);
        assert!((specs[0].values.d_prime - 1.5).abs() < 1e-12);
        assert!((specs[1].values.d_prime - 1.8).abs() < 1e-12);
        for s in &specs {
            assert!((s.values.sigma - 0.2f64.exp()).abs() < 1e-12);
        }
    }

    // The data come from the animal's own σ (the engine's truth_specs) even though a yes/no
    // analysis holds σ at 1: with present evidence x ~ N(d′, σ²) and the criterion at
    // k = c + d′/2 (midpoint convention), P("yes" | present) = P(x > k) = Φ((d′ − k)/σ).
    #[test]
    fn animals_are_simulated_with_their_own_sigma() {
        let a = animals(400, 1.25);
        let dev = Deviation::default();
        let model = ObservationModel::new(a.animal_specs(&dev)).unwrap();
        let blocks = cell_probabilities(&model, &model.hypothesised_theta(), Order::First).unwrap();
        // Block 0: present trials of "rare" (k = 0.5 + 0.75 = 1.25); cell 1 = "yes".
        let want = crate::model::normal::cdf(-(1.25 - 1.5) / 1.25);
        assert!(
            (blocks[0].p[1] - want).abs() < 1e-12,
            "{} vs {want}",
            blocks[0].p[1]
        );
    }

    // Expected counts of an animal fit back to its own values, and the pooled fit's shift
    // contrast (0.5 between conditions) has a positive SE. Counts are whole numbers, so the
    // expected counts at 200,000 trials are rounded: rates move by at most 0.5/50,000 = 1e-5,
    // which moves z (and so d′ and c) by under 1e-4; allow 1e-3.
    #[test]
    fn expected_counts_fit_back_to_the_animal() {
        let a = animals(200_000, 1.0);
        let dev = Deviation {
            d_prime: -0.1,
            criterion: 0.2,
            ..Deviation::default()
        };
        let model = ObservationModel::new(a.animal_specs(&dev)).unwrap();
        let blocks = cell_probabilities(&model, &model.hypothesised_theta(), Order::First).unwrap();
        let table: Vec<u64> = blocks
            .iter()
            .zip(model.blocks())
            .flat_map(|(p, b)| p.p.iter().map(move |x| (x * b.n).round() as u64))
            .collect();
        let e = a.fit_animal(&table).unwrap();
        assert!((e.d_prime[0] - 1.4).abs() < 1e-3 && (e.d_prime[1] - 1.4).abs() < 1e-3);
        assert!((e.criterion[0] - 0.7).abs() < 1e-3);
        assert!((e.criterion[1] - 0.2).abs() < 1e-3);
        let p = a.fit_pooled(&table).unwrap();
        let (shift, se) = p
            .contrast(&[(criterion_index(0), 1.0), (criterion_index(1), -1.0)])
            .unwrap();
        assert!((shift - 0.5).abs() < 1e-3 && se > 0.0);
    }
}
