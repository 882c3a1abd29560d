//! From tallies to the numbers a report shows, each with its Monte Carlo uncertainty.
//!
//! Means carry their Monte Carlo standard error; proportions carry a Wilson 95% interval
//! (Wilson 1927). Exact enumeration has no Monte Carlo error: its SEs are 0 and its
//! intervals collapse to the value.

use crate::vocab::Quantity;

use super::tally::{DatasetWeights, EstimateTally, QuantityTally};
use crate::infer::wilson_interval;
use crate::plan::Scenario;
use serde::Serialize;

/// Level of the Wilson intervals on Monte Carlo proportions.
pub const MC_LEVEL: f64 = 0.95;

/// A Monte Carlo mean and its standard error.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Figure {
    pub value: f64,
    pub mc_se: f64,
}

/// A proportion with a Wilson 95% interval for its Monte Carlo error.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Share {
    pub value: f64,
    pub low: f64,
    pub high: f64,
}

/// How the summaries were obtained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    MonteCarlo,
    Exact,
}

/// Summary of one estimated quantity over all usable datasets of a scenario.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct QuantitySummary {
    pub quantity: Quantity,
    /// Condition label for designs with several conditions.
    pub condition: Option<String>,
    pub truth: f64,
    pub mean: Figure,
    pub bias: Figure,
    pub sd: Figure,
    pub rmse: Figure,
    /// The SE the expected Fisher information predicts (`None` when it has none to give:
    /// not identified, or a derived rating measure).
    pub asymptotic_se: Option<f64>,
    pub mean_se: Figure,
    pub coverage: Share,
    pub mean_width: Figure,
}

/// Rejection rates of one hypothesis: its power, or its type-I error when the null is true.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TestSummary {
    pub hypothesis: String,
    pub null_true: bool,
    pub wald: Share,
    pub likelihood_ratio: Share,
}

/// Shares of datasets by outcome.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DatasetSummary {
    /// Datasets simulated (Monte Carlo) or 1 (exact: probabilities).
    pub total: f64,
    pub used: Share,
    pub extreme: Share,
    pub degenerate: Share,
    pub not_converged: Share,
}

/// Everything reported for one design × trial count.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScenarioSummary {
    pub scenario: Scenario,
    pub design: String,
    pub method: Method,
    pub quantities: Vec<QuantitySummary>,
    /// Correlation of d̂′ and ĉ across datasets.
    pub correlation: Figure,
    pub datasets: DatasetSummary,
    /// Power (or type-I error) of each hypothesis this design can test.
    pub tests: Vec<TestSummary>,
    /// The expected information's verdict in plain words when the design is weakly or not
    /// identified (with profile-likelihood ranges of d′ and c when not identified).
    pub identification: Option<crate::cells::verdict::Identification>,
    /// Under `[study.precision]`: whether the targets were met before the ceiling (the
    /// experiments run are `datasets.total`); `None` for a fixed count.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub precision_met: Option<bool>,
    /// Exact rows: at most this much probability lies in the outcomes the enumeration left
    /// out (`analytic::exact`); `None` for simulated rows.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub neglected_mass: Option<f64>,
}

impl QuantitySummary {
    /// Label for tables, e.g. `c[low]`.
    pub fn label(&self) -> String {
        self.quantity.label_in(self.condition.as_deref())
    }

    /// Machine name for CSV, e.g. `criterion[low]`.
    pub fn key(&self) -> String {
        self.quantity.key_in(self.condition.as_deref())
    }
}

impl ScenarioSummary {
    /// The summary of one quantity, if the design estimates it.
    pub fn quantity(&self, q: Quantity) -> Option<&QuantitySummary> {
        self.quantities.iter().find(|s| s.quantity == q)
    }
}

/// Summarises a tally.
pub fn summarise(
    scenario: Scenario,
    design: &str,
    tally: &EstimateTally,
    method: Method,
) -> ScenarioSummary {
    let exact = method == Method::Exact;
    let quantities = tally
        .quantities
        .iter()
        .map(|q| quantity(q, exact))
        .collect();
    let r = tally.pair.correlation();
    let n = tally.pair.count() as f64;
    let correlation = Figure {
        value: r,
        // Fisher-z approximation: SE(r) ≈ (1 − r²)/√(n − 3).
        mc_se: if exact {
            0.0
        } else {
            (1.0 - r * r) / (n - 3.0).max(1.0).sqrt()
        },
    };
    ScenarioSummary {
        scenario,
        design: design.to_string(),
        method,
        quantities,
        correlation,
        datasets: datasets(&tally.datasets, exact),
        tests: tally
            .tests
            .iter()
            .map(|t| TestSummary {
                hypothesis: t.hypothesis.clone(),
                null_true: t.null_true,
                wald: share(t.wald, tally.datasets.total, exact),
                likelihood_ratio: share(t.likelihood_ratio, tally.datasets.total, exact),
            })
            .collect(),
        identification: None,
        precision_met: None,
        neglected_mass: None,
    }
}

fn quantity(q: &QuantityTally, exact: bool) -> QuantitySummary {
    let mean = figure(q.estimate.mean(), q.estimate.mc_se(exact));
    let sd_value = q.estimate.variance(exact).sqrt();
    let mse = q.squared_error.mean();
    let rmse_value = mse.sqrt();
    QuantitySummary {
        quantity: q.quantity,
        condition: q.condition.clone(),
        truth: q.truth,
        bias: figure(mean.value - q.truth, mean.mc_se),
        // Fourth-moment MC error of an SD (`FourthMoments::sd_mc_se`): rating estimators are
        // far from normal, and the normal-theory SD/√(2(n − 1)) was 1.5–3.8× too small.
        sd: figure(sd_value, q.estimate.sd_mc_se(exact)),
        // RMSE = √(mean e²): the MC SE of mean e² is √(Var(e²)/n), and Var(e²) = E e⁴ − (E e²)²
        // is the fourth moment about the truth, so no normality is assumed; then the delta
        // method SE(√m) = SE(m)/(2√m).
        rmse: figure(
            rmse_value,
            q.squared_error.mc_se(exact) / (2.0 * rmse_value),
        ),
        mean,
        asymptotic_se: None,
        mean_se: figure(q.se.mean(), q.se.mc_se(exact)),
        coverage: share(q.covered, q.estimate_weight(), exact),
        mean_width: figure(q.width.mean(), q.width.mc_se(exact)),
    }
}

fn datasets(d: &DatasetWeights, exact: bool) -> DatasetSummary {
    DatasetSummary {
        total: d.total,
        used: share(d.used, d.total, exact),
        extreme: share(d.extreme, d.total, exact),
        degenerate: share(d.degenerate, d.total, exact),
        not_converged: share(d.not_converged, d.total, exact),
    }
}

fn figure(value: f64, mc_se: f64) -> Figure {
    Figure { value, mc_se }
}

/// A proportion `x / n`; Wilson interval for Monte Carlo counts, a point for exact weights.
fn share(x: f64, n: f64, exact: bool) -> Share {
    if n <= 0.0 {
        return Share {
            value: f64::NAN,
            low: f64::NAN,
            high: f64::NAN,
        };
    }
    let value = x / n;
    if exact {
        return Share {
            value,
            low: value,
            high: value,
        };
    }
    // Monte Carlo weights are whole counts.
    match wilson_interval(x.round() as u64, n.round() as u64, MC_LEVEL) {
        Ok(i) => Share {
            value,
            low: i.lower,
            high: i.upper,
        },
        Err(_) => Share {
            value,
            low: f64::NAN,
            high: f64::NAN,
        },
    }
}
