//! One simulated group study per replicate: draw every animal from the population, simulate
//! and fit it, test the group, fit the pooled counts, and tally.
//!
//! All randomness of a replicate comes from that replicate's own stream, so results are
//! bit-identical for any thread count. The stream first gives two seeds per group-difference
//! hypothesis (one per population), then one seed per animal of the main study; each animal
//! draws its deviation and then its counts from its own seed. So a study of N animals is
//! exactly the first N animals of a study of N + 1 (common random numbers: neighbouring
//! animal counts are compared on the same animals), and an animal's deviation is the same at
//! every trial count.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate, criterion_index, d_prime_index};
use super::approximation::t_quantile;
use super::hypotheses::GroupTest;
use super::population::{Deviation, Population};
use super::random_effects::{
    RandomEffectsAnalysis, RandomEffectsTally, Start, YesNoRow, default_nodes,
};
use crate::engine::parallel::Kernel;
use crate::infer::{FourthMoments, Moments};
use crate::simulate::ReplicateRng;
use rand::{Rng, SeedableRng};
use serde::{Deserialize, Serialize};

/// Running sums for an estimate of a population mean.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct PrecisionTally {
    /// With third and fourth sums, for the SD's Monte Carlo error.
    pub estimate: FourthMoments,
    pub se: Moments,
    pub half_width: Moments,
    pub covered: u64,
}

impl PrecisionTally {
    pub fn push(&mut self, est: f64, se: f64, half: f64, truth: f64) {
        self.estimate.push(est, 1.0);
        self.se.push(se, 1.0);
        self.half_width.push(half, 1.0);
        if (est - truth).abs() <= half {
            self.covered += 1;
        }
    }

    pub fn merge(&mut self, o: &Self) {
        self.estimate.merge(&o.estimate);
        self.se.merge(&o.se);
        self.half_width.merge(&o.half_width);
        self.covered += o.covered;
    }
}

/// Rejections and failures of one hypothesis.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct GroupTestTally {
    pub two_stage_reject: u64,
    /// Studies where the two-stage test had no answer (too few usable animals).
    pub two_stage_failed: u64,
    pub pooled_reject: u64,
    /// Studies where the pooled fit failed.
    pub pooled_failed: u64,
    /// Rejections of the contrast's true value: false positives of each test.
    pub two_stage_false: u64,
    pub pooled_false: u64,
}

impl GroupTestTally {
    /// Records one study: each test against the hypothesis's null and against the truth.
    fn record(&mut self, two_stage: [Option<bool>; 2], pooled: [Option<bool>; 2]) {
        match two_stage[0] {
            Some(r) => self.two_stage_reject += u64::from(r),
            None => self.two_stage_failed += 1,
        }
        match pooled[0] {
            Some(r) => self.pooled_reject += u64::from(r),
            None => self.pooled_failed += 1,
        }
        self.two_stage_false += u64::from(two_stage[1] == Some(true));
        self.pooled_false += u64::from(pooled[1] == Some(true));
    }

    fn merge(&mut self, o: &Self) {
        self.two_stage_reject += o.two_stage_reject;
        self.two_stage_failed += o.two_stage_failed;
        self.pooled_reject += o.pooled_reject;
        self.pooled_failed += o.pooled_failed;
        self.two_stage_false += o.two_stage_false;
        self.pooled_false += o.pooled_false;
    }
}

/// Everything a grid cell accumulates.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct GroupTally {
    pub studies: u64,
    /// Studies with fewer than 2 usable animals (no group mean with an SE).
    pub failed_studies: u64,
    pub animals: u64,
    pub animals_dropped: u64,
    pub tests: Vec<GroupTestTally>,
    /// Group mean of the animals' ĉ (first condition), its SE s/√m and t interval.
    pub criterion: PrecisionTally,
    /// The same for d̂′.
    pub d_prime: PrecisionTally,
    /// Pooled ĉ and d̂′ with Wald intervals.
    pub pooled_criterion: PrecisionTally,
    pub pooled_d_prime: PrecisionTally,
    pub pooled_failed: u64,
    /// The random-effects analysis, when the plan asks for it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub random_effects: Option<RandomEffectsTally>,
}

/// One group study of `animals` animals of one design at one trial count.
#[derive(Debug, Clone)]
pub struct GroupKernel<P: AnimalPath> {
    path: P,
    population: Population,
    animals: u32,
    tests: Vec<GroupTest>,
    alpha: f64,
    z_crit: f64,
    /// t_{1−(1−level)/2, df} for df = 0..animals (entry 0 unused).
    t_crit: Vec<f64>,
    /// Population means of c and d′ in the first condition.
    truth: (f64, f64),
    /// The random-effects analysis, when asked for and the design allows it.
    random_effects: Option<RandomEffectsAnalysis>,
}

/// What one simulated population gives: usable fits, drops, and the pooled fit.
struct Study {
    fits: Vec<AnimalEstimate>,
    dropped: u64,
    pooled: Option<PooledEstimate>,
    /// Every animal's yes/no rows, kept for the random-effects analysis.
    tables: Vec<Vec<YesNoRow>>,
}

impl Study {
    /// Where a random-effects fit of this study starts: the pooled fit's (d′, c) of each
    /// condition, and the spread of the per-animal estimates for the SDs (half of it for
    /// the slopes, which are differences).
    fn start(&self, conditions: usize, q: usize) -> Start {
        let values = match &self.pooled {
            Some(p) => (0..conditions)
                .map(|j| (p.values[d_prime_index(j)], p.values[criterion_index(j)]))
                .collect(),
            None => vec![(1.0, 0.0); conditions],
        };
        let sd = |f: &dyn Fn(&AnimalEstimate) -> f64| {
            let m: Moments = self.fits.iter().map(f).collect();
            let v = if self.fits.len() >= 2 {
                m.variance(false).sqrt()
            } else {
                0.3
            };
            if v.is_finite() { v.max(0.1) } else { 0.3 }
        };
        let mut sds = vec![sd(&|e| e.d_prime[0]), sd(&|e| e.criterion[0])];
        sds.resize(q, 0.5 * sds[1]);
        Start {
            values,
            sds,
            difference: 0.0,
        }
    }
}

impl<P: AnimalPath> GroupKernel<P> {
    /// `truth` = population means (c, d′) of the first condition; `level` sets the intervals.
    pub fn new(
        path: P,
        population: Population,
        animals: u32,
        tests: Vec<GroupTest>,
        alpha: f64,
        level: f64,
        truth: (f64, f64),
    ) -> Self {
        let p = 1.0 - (1.0 - level) / 2.0;
        let t_crit = (0..=animals)
            .map(|df| t_quantile(p, f64::from(df.max(1))))
            .collect();
        Self {
            path,
            population,
            animals,
            tests,
            alpha,
            z_crit: crate::infer::z_critical(level),
            t_crit,
            truth,
            random_effects: None,
        }
    }

    /// Adds the random-effects analysis with `nodes` quadrature nodes per dimension (0: the
    /// default for the model's dimension), when the design's records allow it (yes/no
    /// counts); otherwise the kernel is unchanged.
    pub fn with_random_effects(mut self, nodes: u32) -> Self {
        self.random_effects = self
            .path
            .random_effects_layout(&self.population)
            .map(|layout| {
                let n = if nodes == 0 {
                    default_nodes(layout.q())
                } else {
                    nodes as usize
                };
                RandomEffectsAnalysis::new(layout, n)
            });
        self
    }

    /// `animals` animals of one population; `seeds` gives one seed per animal, in order.
    fn study(&self, seeds: &mut ReplicateRng, animals: u32, shift: f64) -> Study {
        let mut pool = self.path.empty();
        let mut fits = Vec::with_capacity(animals as usize);
        let mut dropped = 0;
        let mut tables = Vec::new();
        for _ in 0..animals {
            let mut rng = ReplicateRng::seed_from_u64(seeds.next_u64());
            let deviation: Deviation = self.population.draw(&mut rng).shifted(shift);
            let counts = self.path.simulate(&mut rng, &deviation);
            self.path.add(&mut pool, &counts);
            if self.random_effects.is_some()
                && let Some(rows) = self.path.yes_no_rows(&counts)
            {
                tables.push(rows);
            }
            match self.path.fit_animal(&counts) {
                Some(e) => fits.push(e),
                None => dropped += 1,
            }
        }
        Study {
            fits,
            dropped,
            pooled: self.path.fit_pooled(&pool),
            tables,
        }
    }

    fn record_precision(&self, study: &Study, tally: &mut GroupTally) {
        let m = study.fits.len();
        if m < 2 {
            tally.failed_studies += 1;
        } else {
            let t = self.t_crit[(m - 1).min(self.t_crit.len() - 1)];
            for (values, into, truth) in [
                (
                    study
                        .fits
                        .iter()
                        .map(|e| e.criterion[0])
                        .collect::<Moments>(),
                    &mut tally.criterion,
                    self.truth.0,
                ),
                (
                    study.fits.iter().map(|e| e.d_prime[0]).collect::<Moments>(),
                    &mut tally.d_prime,
                    self.truth.1,
                ),
            ] {
                let se = values.mc_se(false);
                into.push(values.mean(), se, t * se, truth);
            }
        }
        let pooled = study.pooled.as_ref().and_then(|p| {
            Some((
                p.contrast(&[(criterion_index(0), 1.0)])?,
                p.contrast(&[(d_prime_index(0), 1.0)])?,
            ))
        });
        match pooled {
            Some(((c, sc), (d, sd))) => {
                let z = self.z_crit;
                tally.pooled_criterion.push(c, sc, z * sc, self.truth.0);
                tally.pooled_d_prime.push(d, sd, z * sd, self.truth.1);
            }
            None => tally.pooled_failed += 1,
        }
    }
}

impl<P: AnimalPath> Kernel for GroupKernel<P> {
    type Tally = GroupTally;

    fn tally(&self) -> GroupTally {
        GroupTally {
            tests: vec![GroupTestTally::default(); self.tests.len()],
            random_effects: self.random_effects.as_ref().map(|a| {
                let animals = self.animals as usize;
                RandomEffectsTally::new(&self.tests, animals, a.nodes, &a.layout)
            }),
            ..GroupTally::default()
        }
    }

    fn replicate(&self, rng: &mut ReplicateRng, tally: &mut GroupTally) {
        // Seeds of the two-population studies come first, a fixed number, so the main
        // study's animals sit at the same place in the stream whatever their number.
        let population_seeds: Vec<[u64; 2]> = self
            .tests
            .iter()
            .filter(|t| t.two_populations())
            .map(|_| [rng.next_u64(), rng.next_u64()])
            .collect();
        let mut population_seeds = population_seeds.into_iter();
        let main = self.study(rng, self.animals, 0.0);
        tally.studies += 1;
        tally.animals += u64::from(self.animals);
        tally.animals_dropped += main.dropped;
        self.record_precision(&main, tally);
        if let (Some(analysis), Some(into)) = (&self.random_effects, tally.random_effects.as_mut())
        {
            let start = main.start(analysis.layout.conditions.len(), analysis.layout.q());
            // c: t on the N − 1 degrees of freedom of the animals fitted; d′: z (see
            // `RandomEffectsAnalysis::reference`).
            let t = self.t_crit[main.tables.len().saturating_sub(1).max(1)];
            let critical = (t, self.z_crit);
            analysis.record_study(
                &main.tables,
                &start,
                &self.tests,
                self.alpha,
                critical,
                self.truth,
                into,
            );
        }
        for (test, into) in self.tests.iter().zip(tally.tests.iter_mut()) {
            if test.two_populations() {
                continue;
            }
            // Against the hypothesis's null (power), then against the truth (false positives).
            let [at_null, at_truth] = [test.null, test.truth].map(|value| {
                let two = if main.fits.len() >= 2 {
                    test.two_stage(&main.fits, value, self.alpha)
                } else {
                    None
                };
                let pooled = main
                    .pooled
                    .as_ref()
                    .and_then(|p| test.pooled(p, value, self.alpha));
                (two, pooled)
            });
            into.record([at_null.0, at_truth.0], [at_null.1, at_truth.1]);
        }
        // A group difference is its own study: half the animals from each population.
        for (index, test) in self.tests.iter().enumerate() {
            let into = &mut tally.tests[index];
            let super::hypotheses::GroupContrast::GroupDifference { shift, .. } = test.contrast
            else {
                continue;
            };
            let Some([a, b]) = population_seeds.next() else {
                continue;
            };
            let n1 = self.animals / 2;
            let first = self.study(&mut ReplicateRng::seed_from_u64(a), n1, 0.0);
            let second = self.study(
                &mut ReplicateRng::seed_from_u64(b),
                self.animals - n1,
                shift,
            );
            tally.animals += u64::from(self.animals);
            tally.animals_dropped += first.dropped + second.dropped;
            let [at_null, at_truth] = [test.null, test.truth].map(|value| {
                let two = test.two_stage_groups(&first.fits, &second.fits, value, self.alpha);
                let pooled = match (&first.pooled, &second.pooled) {
                    (Some(a), Some(b)) => test.pooled_groups(a, b, value, self.alpha),
                    _ => None,
                };
                (two, pooled)
            });
            into.record([at_null.0, at_truth.0], [at_null.1, at_truth.1]);
            if let (Some(analysis), Some(re)) =
                (&self.random_effects, tally.random_effects.as_mut())
            {
                let layout = &analysis.layout;
                let mut start = first.start(layout.conditions.len(), layout.q());
                let second_start = second.start(layout.conditions.len(), layout.q());
                start.difference = second_start.values[0].1 - start.values[0].1;
                analysis.record_groups(
                    &first.tables,
                    &second.tables,
                    &start,
                    test,
                    self.alpha,
                    &mut re.tests[index],
                );
            }
        }
    }

    fn merge(&self, into: &mut GroupTally, o: GroupTally) {
        into.studies += o.studies;
        into.failed_studies += o.failed_studies;
        into.animals += o.animals;
        into.animals_dropped += o.animals_dropped;
        for (a, b) in into.tests.iter_mut().zip(&o.tests) {
            a.merge(b);
        }
        into.criterion.merge(&o.criterion);
        into.d_prime.merge(&o.d_prime);
        into.pooled_criterion.merge(&o.pooled_criterion);
        into.pooled_d_prime.merge(&o.pooled_d_prime);
        into.pooled_failed += o.pooled_failed;
        if let (Some(a), Some(b)) = (into.random_effects.as_mut(), o.random_effects.as_ref()) {
            a.merge(b);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::{Condition, Split};
    use crate::groups::animal_yesno::YesNoAnimals;
    use crate::model::Observer;
    use crate::simulate::replicate_rng;
    use crate::vocab::RateCorrection;

    fn path() -> YesNoAnimals {
        let observer = Observer {
            d_prime: 1.2,
            criterion: -0.2,
            sigma: 1.0,
            lapse: None,
        };
        let condition = Condition {
            name: "c".into(),
            presence: 0.5,
            d_prime: 1.2,
            criterion: -0.2,
        };
        let split = Split {
            present: 15,
            absent: 15,
        };
        YesNoAnimals::new(&observer, &condition, split, RateCorrection::LogLinear)
    }

    // Common random numbers across animal counts: on the same replicate stream, the animals
    // of a study of N are exactly the first N of a study of N + 1.
    #[test]
    fn a_study_of_n_animals_is_the_first_n_of_n_plus_one() {
        let population = Population {
            sd_d_prime: 0.3,
            sd_criterion: 0.35,
            correlation: -0.3,
            ..Population::identical()
        };
        let kernel = GroupKernel::new(path(), population, 9, Vec::new(), 0.05, 0.95, (-0.2, 1.2));
        for r in 0..20 {
            let small = kernel.study(&mut replicate_rng(5, 1, r), 8, 0.0);
            let large = kernel.study(&mut replicate_rng(5, 1, r), 9, 0.0);
            assert_eq!(small.fits[..], large.fits[..small.fits.len()]);
            assert_eq!(small.dropped, 0);
        }
    }
}
