//! The one kernel of a single-subject scenario: draw the table with the scenario's sampler,
//! estimate by the design's route, test the hypotheses on the same counts.
//!
//! The route is chosen once, from the design alone ([`crate::design::Route`]): adding or
//! removing a hypothesis never changes which counts are drawn or how the estimates are
//! fitted, only whether the tests run beside them.

use super::contrast::Contrast;
use super::general_fit::{GeneralEstimator, GeneralFit, HypothesisTests};
use super::parallel::Kernel;
use super::rating_kernel::RatingEstimator;
use super::sampler::TableSampler;
use super::tally::EstimateTally;
use super::yesno_kernel::YesNoEstimator;
use crate::cells::error::SpecError;
use crate::cells::observation_model::ObservationModel;
use crate::cells::spec::{ConditionSpec, Record};
use crate::design::model::{condition_specs, lapse, truth_specs};
use crate::design::{Design, Response, Route};
use crate::model::Observer;
use crate::simulate::BinomialTable;
use crate::simulate::ReplicateRng;
use crate::vocab::RateCorrection;

/// How the estimates of one scenario are computed.
#[derive(Debug, Clone)]
pub enum Estimator {
    YesNo(YesNoEstimator),
    Rating(RatingEstimator),
    General(GeneralEstimator),
}

/// Everything one scenario fixes: its sampler, its estimating route and its tests.
#[derive(Debug, Clone)]
pub struct ScenarioKernel {
    sampler: TableSampler,
    estimator: Estimator,
    tests: Option<HypothesisTests>,
    /// The sampler's present and absent binomial tables when the closed-form route runs
    /// without tests: the replicate then draws hits and false alarms straight from them, in the
    /// sampler's block order (so the same stream gives the same counts), without the general
    /// table buffer. The closed-form route's hot loop; measured 1.28× more instructions than
    /// the direct draw before this.
    yes_no_draw: Option<[BinomialTable; 2]>,
}

/// The fitting settings a scenario takes from the plan.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitSettings {
    pub correction: RateCorrection,
    /// Critical value of the Wald intervals, z_{1−(1−level)/2}.
    pub z_crit: f64,
    /// Level of every hypothesis test.
    pub alpha: f64,
}

impl ScenarioKernel {
    /// The kernel of `design` at `trials` per condition, with the hypothesised `observer`;
    /// `contrasts` gives the tests to run on the analysis model (none for no hypotheses).
    pub fn new(
        design: &Design,
        observer: &Observer,
        trials: u32,
        settings: FitSettings,
        contrasts: &dyn Fn(&ObservationModel) -> Vec<Contrast>,
    ) -> Result<Self, SpecError> {
        let truth = ObservationModel::new(truth_specs(design, observer, trials))?;
        let sampler = TableSampler::new(&truth)?;
        let mut analysis = condition_specs(design, observer, trials);
        analysis.iter_mut().for_each(|c| c.lapse = None);
        let fit = GeneralFit::new(ObservationModel::new(analysis)?, settings.correction);
        let tests = HypothesisTests::new(fit.clone(), contrasts(fit.model()), settings.alpha)?;
        let condition = &design.conditions[0];
        let estimator = match (Route::of(design), &design.response) {
            (Route::YesNoClosedForm, _) => {
                let split = crate::design::split_trials(trials, condition.presence);
                Estimator::YesNo(YesNoEstimator::new(
                    [condition.d_prime, condition.criterion],
                    split.present,
                    split.absent,
                    settings.correction,
                    settings.z_crit,
                ))
            }
            (Route::RatingFastPath, Response::Rating(scale)) => {
                Estimator::Rating(RatingEstimator::new(
                    scale,
                    condition,
                    observer,
                    settings.correction,
                    settings.z_crit,
                ))
            }
            _ => Estimator::General(GeneralEstimator::new(fit, settings.z_crit)),
        };
        Ok(Self::assemble(sampler, estimator, tests))
    }

    fn assemble(
        sampler: TableSampler,
        estimator: Estimator,
        tests: Option<HypothesisTests>,
    ) -> Self {
        let yes_no_draw = match (&estimator, &tests) {
            (Estimator::YesNo(_), None) if sampler.block_count() == 2 => {
                match (sampler.binomial_table(0), sampler.binomial_table(1)) {
                    (Some(present), Some(absent)) => Some([present.clone(), absent.clone()]),
                    _ => None,
                }
            }
            _ => None,
        };
        Self {
            sampler,
            estimator,
            tests,
            yes_no_draw,
        }
    }

    /// A single yes/no table of `observer` with `n_present`/`n_absent` trials on the
    /// closed-form route, without tests (for checks and benchmarks of that route).
    pub fn yes_no(
        observer: &Observer,
        n_present: u32,
        n_absent: u32,
        correction: RateCorrection,
        z_crit: f64,
    ) -> Result<Self, SpecError> {
        let record = Record::Full {
            present: u64::from(n_present),
            absent: u64::from(n_absent),
        };
        let presence = f64::from(n_present) / f64::from((n_present + n_absent).max(1));
        let mut spec = ConditionSpec::yes_no(
            "yes/no",
            record,
            observer.d_prime,
            observer.criterion,
            presence.clamp(1e-9, 1.0 - 1e-9),
        );
        spec.values.sigma = observer.sigma;
        spec.lapse = observer.lapse.map(|l| lapse(l, 2, 1));
        let sampler = TableSampler::new(&ObservationModel::new(vec![spec])?)?;
        let estimator = Estimator::YesNo(YesNoEstimator::new(
            [observer.d_prime, observer.criterion],
            n_present,
            n_absent,
            correction,
            z_crit,
        ));
        Ok(Self::assemble(sampler, estimator, None))
    }

    /// The scenario's sampler (exact enumeration reads its binomial tables).
    pub fn sampler(&self) -> &TableSampler {
        &self.sampler
    }

    /// The estimating route.
    pub fn estimator(&self) -> &Estimator {
        &self.estimator
    }

    /// Whether hypothesis tests run beside the estimates.
    pub fn has_tests(&self) -> bool {
        self.tests.is_some()
    }
}

impl Kernel for ScenarioKernel {
    type Tally = EstimateTally;

    fn tally(&self) -> EstimateTally {
        let mut t = match &self.estimator {
            Estimator::YesNo(e) => e.tally(),
            Estimator::Rating(e) => e.tally(),
            Estimator::General(e) => e.tally(),
        };
        if let Some(tests) = &self.tests {
            t.tests = tests.tallies();
        }
        t
    }

    #[inline]
    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut EstimateTally) {
        if let (Some([present, absent]), Estimator::YesNo(e)) = (&self.yes_no_draw, &self.estimator)
        {
            // Block 0 (present trials) then block 1 (absent trials), as `TableSampler::draw`.
            let hits = present.sample(rng);
            let false_alarms = absent.sample(rng);
            e.record(hits, false_alarms, 1.0, tally);
            return;
        }
        // Two blocks of two cells (yes/no) or of K cells (rating) fit on the stack.
        let mut buffer = [0u64; 2 * crate::cells::spec::MAX_CATEGORIES];
        let mut heap;
        let table: &mut [u64] = if self.sampler.cells() <= buffer.len() {
            &mut buffer[..self.sampler.cells()]
        } else {
            heap = vec![0u64; self.sampler.cells()];
            &mut heap
        };
        self.sampler.draw(rng, table);
        let fitted = match &self.estimator {
            // Blocks in model order: present trials, then absent trials; cell 1 = "yes".
            Estimator::YesNo(e) => {
                e.record(table[1] as u32, table[3] as u32, 1.0, tally);
                None
            }
            Estimator::Rating(e) => {
                let present = self.sampler.block_range(0);
                let absent = self.sampler.block_range(1);
                e.record_counts(&table[absent], &table[present], tally);
                None
            }
            Estimator::General(e) => e.record(&self.sampler, table, tally),
        };
        if let Some(tests) = &self.tests {
            tests.record(&self.sampler, table, fitted, tally);
        }
    }

    fn merge(&self, into: &mut EstimateTally, other: EstimateTally) {
        into.merge(other);
    }
}
