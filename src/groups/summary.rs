//! From a grid cell's tally to the numbers a report shows, each with its Monte Carlo
//! uncertainty: means carry their MC standard error, proportions a Wilson 95% interval
//! (Wilson 1927).
//!
//! Power is rejections over all simulated studies: a study whose test had no answer (too few
//! usable animals) counts as not rejecting, so failures never flatter the power; their share
//! is reported beside it.

use super::hypotheses::GroupTest;
use super::kernel::{GroupTally, GroupTestTally, PrecisionTally};
use super::random_effects::RandomEffectsTally;
use crate::design::goals::TestKind;
use crate::engine::summary::MC_LEVEL;
use crate::engine::{Figure, Share};
use crate::infer::wilson_interval;
use crate::vocab::Sided;
use serde::Serialize;

/// How well a group study estimates a population mean.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupPrecision {
    /// The population mean.
    pub truth: f64,
    /// Mean of the estimates over simulated studies.
    pub mean: Figure,
    /// SD of the estimates over simulated studies (the true SE of one study's estimate).
    pub sd: Figure,
    /// Mean of the SE one study would report.
    pub mean_se: Figure,
    /// Share of studies whose interval held the population mean.
    pub coverage: Share,
    /// Mean half-width of that interval.
    pub half_width: Figure,
}

/// Power of one hypothesis, two-stage and pooled.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupTestSummary {
    pub name: String,
    pub kind: TestKind,
    pub sided: Sided,
    /// True contrast minus its null value; 0 means the rejection rates are type-I errors.
    pub effect: f64,
    pub target: Option<f64>,
    pub two_stage: Share,
    pub pooled: Share,
    pub two_stage_failed: Share,
    pub pooled_failed: Share,
    /// Rejections of the contrast's true value (false positives), two-stage and pooled.
    pub two_stage_false: Share,
    pub pooled_false: Share,
}

impl GroupTestSummary {
    /// Whether the population sits on the null, so rejections are false positives.
    pub fn null_is_true(&self) -> bool {
        self.effect.abs() < 1e-12
    }
}

/// Everything reported for one design × animals × trials.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupSummary {
    pub studies: u64,
    pub tests: Vec<GroupTestSummary>,
    /// Two-stage: the mean of the animals' ĉ (first condition), SE s/√m, t interval.
    pub criterion: GroupPrecision,
    pub d_prime: GroupPrecision,
    /// Pooled fit: ĉ and d̂′ with Wald SEs and intervals.
    pub pooled_criterion: GroupPrecision,
    pub pooled_d_prime: GroupPrecision,
    /// Share of animal fits left out under the degenerate-animal rule.
    pub animals_dropped: Share,
    /// Share of studies with fewer than 2 usable animals.
    pub failed_studies: Share,
    /// Share of studies whose pooled fit failed.
    pub pooled_failed: Share,
    /// The random-effects analysis, when the plan asks for it and the design allows it.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub random_effects: Option<RandomEffectsSummary>,
}

/// Power of one hypothesis under the random-effects analysis: Wald z and signed-root LR.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RandomEffectsTestSummary {
    pub name: String,
    pub wald: Share,
    pub lr: Share,
    pub wald_failed: Share,
    pub lr_failed: Share,
    /// Rejections of the contrast's true value (false positives).
    pub wald_false: Share,
    pub lr_false: Share,
    /// Degrees of freedom of the Student's t both statistics are referred to; `None`: N(0, 1).
    pub df: Option<f64>,
}

/// What the random-effects analysis gives at one grid point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RandomEffectsSummary {
    /// Gauss–Hermite nodes per random effect, and the random effects fitted.
    pub nodes: u32,
    pub random: Vec<String>,
    /// Share of studies whose fit converged.
    pub converged: Share,
    /// Mean Newton steps of a converged fit.
    pub mean_steps: f64,
    /// The fitted population mean c and d′ (first condition), Wald SEs and z intervals.
    pub criterion: GroupPrecision,
    pub d_prime: GroupPrecision,
    /// Mean fitted between-animal SDs of c and d′.
    pub sd_criterion: Figure,
    pub sd_d_prime: Figure,
    /// Degrees of freedom of the t behind the mean c's intervals (d′'s use z).
    pub criterion_df: Option<f64>,
    pub tests: Vec<RandomEffectsTestSummary>,
}

fn random_effects_summary(
    tests: &[GroupTest],
    t: &RandomEffectsTally,
    studies: u64,
    truth: (f64, f64),
) -> RandomEffectsSummary {
    let figure = |m: &crate::infer::Moments| Figure {
        value: m.mean(),
        mc_se: m.mc_se(false),
    };
    RandomEffectsSummary {
        nodes: t.nodes,
        random: t.random.clone(),
        converged: share(t.fits, t.fits + t.failed),
        mean_steps: t.steps.mean(),
        criterion: precision(&t.criterion, truth.0),
        d_prime: precision(&t.d_prime, truth.1),
        sd_criterion: figure(&t.sd_criterion),
        sd_d_prime: figure(&t.sd_d_prime),
        criterion_df: t.criterion_df,
        tests: tests
            .iter()
            .zip(&t.tests)
            .enumerate()
            .map(|(i, (test, x))| RandomEffectsTestSummary {
                df: t.test_df.get(i).copied().flatten(),
                name: test.name.clone(),
                wald: share(x.wald_reject, studies),
                lr: share(x.lr_reject, studies),
                wald_failed: share(x.wald_failed, studies),
                lr_failed: share(x.lr_failed, studies),
                wald_false: share(x.wald_false, studies),
                lr_false: share(x.lr_false, studies),
            })
            .collect(),
    }
}

/// A Monte Carlo proportion x/n with its Wilson 95% interval.
pub fn share(x: u64, n: u64) -> Share {
    match wilson_interval(x, n, MC_LEVEL) {
        Ok(i) => Share {
            value: x as f64 / n as f64,
            low: i.lower,
            high: i.upper,
        },
        Err(_) => Share {
            value: f64::NAN,
            low: f64::NAN,
            high: f64::NAN,
        },
    }
}

fn precision(t: &PrecisionTally, truth: f64) -> GroupPrecision {
    let sd = t.estimate.variance(false).sqrt();
    GroupPrecision {
        truth,
        mean: Figure {
            value: t.estimate.mean(),
            mc_se: t.estimate.mc_se(false),
        },
        // Fourth-moment MC error of an SD (`FourthMoments::sd_mc_se`), not normal theory.
        sd: Figure {
            value: sd,
            mc_se: t.estimate.sd_mc_se(false),
        },
        mean_se: Figure {
            value: t.se.mean(),
            mc_se: t.se.mc_se(false),
        },
        coverage: share(t.covered, t.estimate.count()),
        half_width: Figure {
            value: t.half_width.mean(),
            mc_se: t.half_width.mc_se(false),
        },
    }
}

fn test_summary(test: &GroupTest, t: &GroupTestTally, studies: u64) -> GroupTestSummary {
    GroupTestSummary {
        name: test.name.clone(),
        kind: test.kind,
        sided: test.sided,
        effect: test.effect,
        target: test.target,
        two_stage: share(t.two_stage_reject, studies),
        pooled: share(t.pooled_reject, studies),
        two_stage_failed: share(t.two_stage_failed, studies),
        pooled_failed: share(t.pooled_failed, studies),
        two_stage_false: share(t.two_stage_false, studies),
        pooled_false: share(t.pooled_false, studies),
    }
}

/// Summarises a tally; `truth` = population means (c, d′) of the first condition.
pub fn summarise(tests: &[GroupTest], tally: &GroupTally, truth: (f64, f64)) -> GroupSummary {
    let n = tally.studies;
    GroupSummary {
        studies: n,
        tests: tests
            .iter()
            .zip(&tally.tests)
            .map(|(test, t)| test_summary(test, t, n))
            .collect(),
        criterion: precision(&tally.criterion, truth.0),
        d_prime: precision(&tally.d_prime, truth.1),
        pooled_criterion: precision(&tally.pooled_criterion, truth.0),
        pooled_d_prime: precision(&tally.pooled_d_prime, truth.1),
        animals_dropped: share(tally.animals_dropped, tally.animals),
        failed_studies: share(tally.failed_studies, n),
        pooled_failed: share(tally.pooled_failed, n),
        random_effects: tally
            .random_effects
            .as_ref()
            .map(|t| random_effects_summary(tests, t, n, truth)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Wilson (1927) 95% interval, as statsmodels' proportion_confint(method="wilson") gives it:
    // 80/100 → [0.711171, 0.866633].
    #[test]
    fn shares_carry_wilson_intervals() {
        let s = share(80, 100);
        assert!((s.low - 0.711171).abs() < 1e-6);
        assert!((s.high - 0.866633).abs() < 1e-6);
        assert!(share(0, 0).value.is_nan());
    }
}
