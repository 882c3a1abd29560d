//! Streaming tallies of fitted estimates: memory is fixed, whatever the replicate count.

use crate::infer::{CoMoments, FourthMoments, Moments};
use crate::vocab::Quantity;
use serde::{Deserialize, Serialize};

/// Running sums for one estimated quantity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct QuantityTally {
    pub quantity: Quantity,
    /// The condition this quantity belongs to, for designs with several conditions
    /// (`None` for single-condition designs and for parameters shared by all conditions).
    pub condition: Option<String>,
    pub truth: f64,
    /// Critical value of the Wald interval, z_{1−(1−level)/2}.
    pub z_crit: f64,
    /// With third and fourth sums: the SD's Monte Carlo error needs the kurtosis.
    pub estimate: FourthMoments,
    /// Squared errors about the truth; their variance is the fourth moment about the truth,
    /// which the RMSE's Monte Carlo error needs.
    pub squared_error: Moments,
    pub se: Moments,
    pub width: Moments,
    /// Weight of datasets whose interval covered the truth.
    pub covered: f64,
}

impl QuantityTally {
    pub fn new(quantity: Quantity, truth: f64, z_crit: f64) -> Self {
        Self {
            quantity,
            condition: None,
            truth,
            z_crit,
            estimate: FourthMoments::default(),
            squared_error: Moments::default(),
            se: Moments::default(),
            width: Moments::default(),
            covered: 0.0,
        }
    }

    #[inline]
    fn push(&mut self, est: f64, se: f64, w: f64) {
        let err = est - self.truth;
        self.estimate.push(est, w);
        self.squared_error.push(err * err, w);
        self.se.push(se, w);
        let half = self.z_crit * se;
        self.width.push(2.0 * half, w);
        if err.abs() <= half {
            self.covered += w;
        }
    }

    /// The same tally labelled with a condition.
    pub fn in_condition(mut self, condition: Option<String>) -> Self {
        self.condition = condition;
        self
    }

    /// Total weight of datasets that entered this quantity.
    pub fn estimate_weight(&self) -> f64 {
        self.estimate.weight()
    }

    fn merge(&mut self, o: &Self) {
        self.estimate.merge(&o.estimate);
        self.squared_error.merge(&o.squared_error);
        self.se.merge(&o.se);
        self.width.merge(&o.width);
        self.covered += o.covered;
    }
}

/// What happened to the simulated datasets, as weights (counts for Monte Carlo,
/// probabilities for exact enumeration).
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize, Deserialize)]
pub struct DatasetWeights {
    /// All datasets.
    pub total: f64,
    /// Datasets whose fit entered the summaries.
    pub used: f64,
    /// Datasets with a rate of 0 or 1 (or an empty category) that the correction handled.
    pub extreme: f64,
    /// Datasets left out because no estimate exists (rate 0 or 1 with no correction).
    pub degenerate: f64,
    /// Datasets whose fit did not converge; left out, never averaged in.
    pub not_converged: f64,
}

/// Rejections of one hypothesis, as weights.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TestTally {
    pub hypothesis: String,
    /// Whether the simulated truth satisfies the null (rejections are then type-I errors).
    pub null_true: bool,
    pub wald: f64,
    pub likelihood_ratio: f64,
}

impl TestTally {
    pub fn new(hypothesis: String, null_true: bool) -> Self {
        Self {
            hypothesis,
            null_true,
            wald: 0.0,
            likelihood_ratio: 0.0,
        }
    }
}

/// Everything a scenario accumulates.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EstimateTally {
    pub quantities: Vec<QuantityTally>,
    /// Hypothesis tests, when the plan has any this design can test.
    pub tests: Vec<TestTally>,
    /// (d̂′, ĉ) pairs, for how strongly sensitivity and bias trade off.
    pub pair: CoMoments,
    pub datasets: DatasetWeights,
}

/// How a dataset ended.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DatasetOutcome {
    Fitted,
    Degenerate,
    NotConverged,
}

impl EstimateTally {
    pub fn new(quantities: Vec<QuantityTally>) -> Self {
        Self {
            quantities,
            tests: Vec::new(),
            pair: CoMoments::default(),
            datasets: DatasetWeights::default(),
        }
    }

    /// Records a fitted dataset. `values` holds (estimate, SE) in the order of
    /// `quantities`; the first two must be d′ and c.
    #[inline]
    pub fn push_fit(&mut self, values: &[(f64, f64)], extreme: bool, w: f64) {
        self.count(DatasetOutcome::Fitted, extreme, w);
        for (q, &(est, se)) in self.quantities.iter_mut().zip(values) {
            q.push(est, se, w);
        }
        self.pair.push(values[0].0, values[1].0, w);
    }

    /// Records which tests rejected (Wald, likelihood ratio), in the order of `tests`.
    #[inline]
    pub fn push_rejections(&mut self, rejections: &[(bool, bool)], w: f64) {
        for (t, &(wald, lr)) in self.tests.iter_mut().zip(rejections) {
            if wald {
                t.wald += w;
            }
            if lr {
                t.likelihood_ratio += w;
            }
        }
    }

    /// Records a dataset that gave no usable fit.
    #[inline]
    pub fn push_unfitted(&mut self, outcome: DatasetOutcome, extreme: bool, w: f64) {
        self.count(outcome, extreme, w);
    }

    #[inline]
    fn count(&mut self, outcome: DatasetOutcome, extreme: bool, w: f64) {
        let d = &mut self.datasets;
        d.total += w;
        if extreme {
            d.extreme += w;
        }
        match outcome {
            DatasetOutcome::Fitted => d.used += w,
            DatasetOutcome::Degenerate => d.degenerate += w,
            DatasetOutcome::NotConverged => d.not_converged += w,
        }
    }

    /// Adds another tally of the same scenario (fixed order → fixed bits).
    pub fn merge(&mut self, other: Self) {
        for (a, b) in self.quantities.iter_mut().zip(&other.quantities) {
            a.merge(b);
        }
        for (a, b) in self.tests.iter_mut().zip(&other.tests) {
            a.wald += b.wald;
            a.likelihood_ratio += b.likelihood_ratio;
        }
        self.pair.merge(&other.pair);
        let (d, o) = (&mut self.datasets, other.datasets);
        d.total += o.total;
        d.used += o.used;
        d.extreme += o.extreme;
        d.degenerate += o.degenerate;
        d.not_converged += o.not_converged;
    }
}
