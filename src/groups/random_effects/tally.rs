//! What the random-effects analysis accumulates over simulated studies.

use super::analysis::RandomEffectsAnalysis;
use super::fit::MixedFit;
use super::layout::Layout;
use crate::groups::hypotheses::{GroupContrast, GroupTest};
use crate::groups::kernel::PrecisionTally;
use crate::infer::{Moments, Reference};
use serde::{Deserialize, Serialize};

/// Rejections and failures of one hypothesis under the random-effects analysis.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct RandomEffectsTestTally {
    pub wald_reject: u64,
    pub lr_reject: u64,
    /// Studies where the Wald test had no answer (the fit failed).
    pub wald_failed: u64,
    /// Studies where the LR test had no answer (the full or the restricted fit failed).
    pub lr_failed: u64,
    /// Rejections of the contrast's true value: false positives of each test.
    pub wald_false: u64,
    pub lr_false: u64,
}

impl RandomEffectsTestTally {
    /// Records one study: (Wald, LR) against the null, then against the truth.
    pub fn record(
        &mut self,
        at_null: (Option<bool>, Option<bool>),
        at_truth: (Option<bool>, Option<bool>),
    ) {
        match at_null.0 {
            Some(r) => self.wald_reject += u64::from(r),
            None => self.wald_failed += 1,
        }
        match at_null.1 {
            Some(r) => self.lr_reject += u64::from(r),
            None => self.lr_failed += 1,
        }
        self.wald_false += u64::from(at_truth.0 == Some(true));
        self.lr_false += u64::from(at_truth.1 == Some(true));
    }

    pub fn merge(&mut self, o: &Self) {
        self.wald_reject += o.wald_reject;
        self.lr_reject += o.lr_reject;
        self.wald_failed += o.wald_failed;
        self.lr_failed += o.lr_failed;
        self.wald_false += o.wald_false;
        self.lr_false += o.lr_false;
    }
}

/// Everything the random-effects analysis of a grid cell accumulates.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct RandomEffectsTally {
    /// Gauss–Hermite nodes per random effect, and the random effects' names.
    pub nodes: u32,
    pub random: Vec<String>,
    /// Main-study fits that converged, and that failed.
    pub fits: u64,
    pub failed: u64,
    /// Newton steps of the converged fits.
    pub steps: Moments,
    /// The fitted population mean c and d′ of the first condition, Wald SEs and intervals.
    pub criterion: PrecisionTally,
    pub d_prime: PrecisionTally,
    /// The fitted between-animal SDs of c and d′.
    pub sd_criterion: Moments,
    pub sd_d_prime: Moments,
    pub tests: Vec<RandomEffectsTestTally>,
    /// Degrees of freedom of each test's t reference (`None`: the normal), and of the mean
    /// c's interval: fixed by the design and the number of animals, recorded for the report.
    #[serde(default)]
    pub test_df: Vec<Option<f64>>,
    #[serde(default)]
    pub criterion_df: Option<f64>,
}

impl RandomEffectsTally {
    /// An empty tally for `tests` on studies of `animals` animals.
    pub fn new(tests: &[GroupTest], animals: usize, nodes: usize, layout: &Layout) -> Self {
        let df = |contrast: &GroupContrast| match RandomEffectsAnalysis::reference(
            layout, contrast, animals,
        ) {
            Reference::StudentsT(df) => Some(df),
            Reference::Normal => None,
        };
        let mean_c = GroupContrast::Criterion { condition: 0 };
        Self {
            nodes: nodes as u32,
            random: layout.random_names(),
            tests: vec![RandomEffectsTestTally::default(); tests.len()],
            test_df: tests.iter().map(|t| df(&t.contrast)).collect(),
            criterion_df: df(&mean_c),
            ..Self::default()
        }
    }

    /// Records the main study's fit (or its failure); `critical` = the interval's critical
    /// values for the mean (c, d′): t on the animals' N − 1 degrees of freedom for c, a
    /// between-animal contrast, and z for d′, a within-animal one (see
    /// `RandomEffectsAnalysis::reference`).
    pub fn record_fit(
        &mut self,
        fit: Option<&MixedFit>,
        layout: &Layout,
        critical: (f64, f64),
        truth: (f64, f64),
    ) {
        let Some(fit) = fit else {
            self.failed += 1;
            return;
        };
        self.fits += 1;
        self.steps.push(fit.steps as f64, 1.0);
        let (p, q) = (layout.p(), layout.q());
        let (d, c) = layout.conditions[0];
        if let (Some((ce, cs)), Some((de, ds))) =
            (fit.contrast(&[(c, 1.0)], p), fit.contrast(&[(d, 1.0)], p))
        {
            self.criterion.push(ce, cs, critical.0 * cs, truth.0);
            self.d_prime.push(de, ds, critical.1 * ds, truth.1);
        }
        let sigma = fit.sigma(p, q);
        self.sd_d_prime.push(sigma[0].sqrt(), 1.0);
        self.sd_criterion.push(sigma[q + 1].sqrt(), 1.0);
    }

    pub fn merge(&mut self, o: &Self) {
        self.fits += o.fits;
        self.failed += o.failed;
        self.steps.merge(&o.steps);
        self.criterion.merge(&o.criterion);
        self.d_prime.merge(&o.d_prime);
        self.sd_criterion.merge(&o.sd_criterion);
        self.sd_d_prime.merge(&o.sd_d_prime);
        for (a, b) in self.tests.iter_mut().zip(&o.tests) {
            a.merge(b);
        }
    }
}
