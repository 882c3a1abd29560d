//! Population values from per-animal estimates: the mean and between-animal SD of d′ and c
//! and the correlation of an animal's d′ and c, each with an interval.
//!
//! # Method: unweighted method of moments
//!
//! Animal i has estimates yᵢ = (d̂′ᵢ, ĉᵢ) (averaged over conditions when there are several;
//! the plan's animals carry one deviation across conditions) with sampling covariance Sᵢ from
//! its own fit. If the animals' true values have covariance T (the between-animal part),
//! E[M] = T + S̄ for the sample covariance M of the yᵢ (divisor n − 1) and the mean S̄ of
//! the Sᵢ, so T̂ = M − S̄, each variance truncated at 0. This is the moment estimator of
//! DerSimonian & Laird (1986, *Controlled Clinical Trials* 7:177–188) [memory for the general
//! weighted form] with equal weights: τ̂² = Q/(n − 1) − mean(sᵢ²). Equal weights rather than
//! DerSimonian & Laird's inverse-variance weights because a yes/no animal's sampling variance
//! is a function of its own estimates (it grows with |d̂′| and |ĉ|): weighting by it would
//! pull the mean toward the animals that happen to look average, while the unweighted mean is
//! unbiased for the mean of the animals' estimates whatever their variances.
//!
//! # Intervals (level `confidence`, 0.95 by default)
//!
//! - Means: Student t, ȳ ± t_{n−1}·s/√n (common practice); exact when the yᵢ are normal with
//!   a common variance.
//! - Between-animal SDs: the chi-square ("Q-profile") interval of Viechtbauer (2007,
//!   *Statistics in Medicine* 26:37–52) [memory] in its equal-weight form: with a common
//!   sampling variance s², (n − 1)M/(τ² + s²) ~ χ²_{n−1}, so
//!   τ² ∈ [(n − 1)M/χ²_{hi} − S̄, (n − 1)M/χ²_{lo} − S̄], each end truncated at 0. When the
//!   upper end is 0 the data show no between-animal variation beyond sampling noise.
//! - Correlation: by inverting a test (Casella & Berger 2002, *Statistical Inference*, 2nd
//!   ed., §9.2.1 [memory]): a candidate ρ₀ on a grid of step 0.01 is kept when the sample
//!   correlation r of the animals' estimates lies within the central share of its
//!   distribution under ρ₀, simulated (fixed seed) from the normal approximation
//!   yᵢ ~ N(μ, T(ρ₀) + Sᵢ) with the between-animal SDs at their moment estimates (a
//!   parametric bootstrap; common practice). The sample correlation, not the moment one, is
//!   the test statistic because it always exists; when an SD is estimated as 0, r does not
//!   depend on ρ₀ and the interval is (nearly) all of −1 … 1, which is what such a pilot says.
//!   A percentile bootstrap over animals was tried first and covered only 70% at a nominal
//!   95% with 8 animals (tests/pilot_recovery.rs measures this interval).

use super::animal_fit::ConditionFit;
use rand::SeedableRng;
use rand_distr::{Distribution, StandardNormal};
use rand_xoshiro::Xoshiro256PlusPlus;
use statrs::distribution::{ChiSquared, ContinuousCDF, StudentsT};

/// A closed interval.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct PopulationInterval {
    pub low: f64,
    pub high: f64,
}

impl PopulationInterval {
    /// Whether `x` lies in the interval (ends included).
    pub fn contains(&self, x: f64) -> bool {
        self.low <= x && x <= self.high
    }
}

/// A population mean with its standard error and t interval.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct MeanEstimate {
    pub value: f64,
    /// s/√n over animals.
    pub se: f64,
    pub interval: PopulationInterval,
}

/// A between-animal SD (moment estimate, truncated at 0) with its chi-square interval.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SdEstimate {
    pub value: f64,
    pub interval: PopulationInterval,
}

/// The between-animal correlation of d′ and c with its interval by test inversion.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct CorrelationEstimate {
    /// `None` when either between-animal SD is estimated as 0 or there are fewer than 3 animals.
    pub value: Option<f64>,
    /// `None` with fewer than 3 animals, or when no candidate correlation is kept.
    pub interval: Option<PopulationInterval>,
    /// Simulated pilots per candidate correlation.
    pub simulations: usize,
}

/// Means of one condition.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ConditionMeans {
    pub name: String,
    pub d_prime: MeanEstimate,
    pub criterion: MeanEstimate,
    /// Mean criteria of a graded scale (midpoint convention); empty on a yes/no scale.
    pub criteria: Vec<f64>,
}

/// Settings of the population fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PopulationSettings {
    /// Level of every interval, strictly between 0 and 1.
    pub confidence: f64,
    /// Simulated pilots per candidate correlation for the correlation's interval.
    pub simulations: usize,
    /// Seed of those simulations (the same seed gives the same interval).
    pub seed: u64,
}

impl Default for PopulationSettings {
    /// 95% intervals, 1000 simulations per candidate correlation, seed 1.
    fn default() -> Self {
        Self {
            confidence: 0.95,
            simulations: 1000,
            seed: 1,
        }
    }
}

/// The population values of a pilot.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct PopulationFit {
    pub animals: usize,
    pub confidence: f64,
    /// Mean over animals of each animal's d′ averaged over conditions.
    pub d_prime: MeanEstimate,
    /// Mean over animals of each animal's c averaged over conditions.
    pub criterion: MeanEstimate,
    pub conditions: Vec<ConditionMeans>,
    pub sd_d_prime: SdEstimate,
    pub sd_criterion: SdEstimate,
    pub correlation: CorrelationEstimate,
    /// M: sample covariance of the animals' (d̂′, ĉ), divisor n − 1.
    pub observed_cov: [[f64; 2]; 2],
    /// S̄: mean sampling covariance of the animals' estimates.
    pub within_cov: [[f64; 2]; 2],
}

/// Why the population values cannot be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, thiserror::Error)]
pub enum PopulationError {
    #[error("{fitted} animal(s) with a fit; the between-animal SDs need at least 2")]
    TooFewAnimals { fitted: usize },
}

/// One animal's estimate vector and sampling covariance, averaged over its conditions.
fn summarise(fits: &[ConditionFit]) -> ([f64; 2], [[f64; 2]; 2]) {
    let c = fits.len() as f64;
    let mut y = [0.0; 2];
    let mut s = [[0.0; 2]; 2];
    for f in fits {
        y[0] += f.d_prime / c;
        y[1] += f.criterion / c;
        // Conditions hold separate trials, so their estimates are independent.
        s[0][0] += f.var_d_prime / (c * c);
        s[1][1] += f.var_criterion / (c * c);
        s[0][1] += f.cov / (c * c);
    }
    s[1][0] = s[0][1];
    (y, s)
}

/// Sample covariance (divisor n − 1) and mean within covariance over the animals `idx`.
fn moments(
    ys: &[[f64; 2]],
    ss: &[[[f64; 2]; 2]],
    idx: &[usize],
) -> ([f64; 2], [[f64; 2]; 2], [[f64; 2]; 2]) {
    let n = idx.len() as f64;
    let mut mean = [0.0; 2];
    for &i in idx {
        mean[0] += ys[i][0] / n;
        mean[1] += ys[i][1] / n;
    }
    let mut m = [[0.0; 2]; 2];
    let mut w = [[0.0; 2]; 2];
    for &i in idx {
        for a in 0..2 {
            for b in 0..2 {
                m[a][b] += (ys[i][a] - mean[a]) * (ys[i][b] - mean[b]) / (n - 1.0);
                w[a][b] += ss[i][a][b] / n;
            }
        }
    }
    (mean, m, w)
}

/// The between-animal correlation from M − S̄, when both variances are positive.
fn correlation(m: &[[f64; 2]; 2], w: &[[f64; 2]; 2]) -> Option<f64> {
    let (t00, t11, t01) = (m[0][0] - w[0][0], m[1][1] - w[1][1], m[0][1] - w[0][1]);
    (t00 > 0.0 && t11 > 0.0).then(|| (t01 / (t00 * t11).sqrt()).clamp(-1.0, 1.0))
}

/// Mean with t interval of `values` (n ≥ 2).
fn mean_estimate(values: &[f64], t: f64) -> MeanEstimate {
    let n = values.len() as f64;
    let mean = values.iter().sum::<f64>() / n;
    let var = values.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    let se = (var / n).sqrt();
    MeanEstimate {
        value: mean,
        se,
        interval: PopulationInterval {
            low: mean - t * se,
            high: mean + t * se,
        },
    }
}

/// Moment SD with the equal-weight chi-square interval.
fn sd_estimate(observed: f64, within: f64, n: usize, confidence: f64) -> SdEstimate {
    let df = (n - 1) as f64;
    let chi = ChiSquared::new(df).expect("df ≥ 1");
    let tail = 0.5 * (1.0 - confidence);
    let (q_low, q_high) = (chi.inverse_cdf(tail), chi.inverse_cdf(1.0 - tail));
    let root = |v: f64| v.max(0.0).sqrt();
    SdEstimate {
        value: root(observed - within),
        interval: PopulationInterval {
            low: root(df * observed / q_high - within),
            high: root(df * observed / q_low - within),
        },
    }
}

/// The population values of the fitted animals `fits` (each a fit per condition, in the order
/// of `conditions`).
pub fn fit_population(
    fits: &[&[ConditionFit]],
    conditions: &[String],
    settings: PopulationSettings,
) -> Result<PopulationFit, PopulationError> {
    let n = fits.len();
    if n < 2 {
        return Err(PopulationError::TooFewAnimals { fitted: n });
    }
    let (ys, ss): (Vec<_>, Vec<_>) = fits.iter().map(|f| summarise(f)).unzip();
    let all: Vec<usize> = (0..n).collect();
    let (_, m, w) = moments(&ys, &ss, &all);
    let t = StudentsT::new(0.0, 1.0, (n - 1) as f64)
        .expect("df ≥ 1")
        .inverse_cdf(0.5 + 0.5 * settings.confidence);
    let column = |k: usize| ys.iter().map(|y| y[k]).collect::<Vec<_>>();
    let conditions = conditions
        .iter()
        .enumerate()
        .map(|(j, name)| {
            let d: Vec<f64> = fits.iter().map(|f| f[j].d_prime).collect();
            let c: Vec<f64> = fits.iter().map(|f| f[j].criterion).collect();
            let k = fits[0][j].criteria.len();
            let criteria = (0..k)
                .map(|i| fits.iter().map(|f| f[j].criteria[i]).sum::<f64>() / n as f64)
                .collect();
            ConditionMeans {
                name: name.clone(),
                d_prime: mean_estimate(&d, t),
                criterion: mean_estimate(&c, t),
                criteria,
            }
        })
        .collect();
    Ok(PopulationFit {
        animals: n,
        confidence: settings.confidence,
        d_prime: mean_estimate(&column(0), t),
        criterion: mean_estimate(&column(1), t),
        conditions,
        sd_d_prime: sd_estimate(m[0][0], w[0][0], n, settings.confidence),
        sd_criterion: sd_estimate(m[1][1], w[1][1], n, settings.confidence),
        correlation: correlation_interval(
            &ys,
            &ss,
            [
                (m[0][0] - w[0][0]).max(0.0).sqrt(),
                (m[1][1] - w[1][1]).max(0.0).sqrt(),
            ],
            &m,
            &w,
            settings,
        ),
        observed_cov: m,
        within_cov: w,
    })
}

/// Grid of candidate correlations the interval is read from.
const GRID_STEP: f64 = 0.01;
const GRID_END: f64 = 0.99;

/// Sample correlation of the animals' estimates (location-free, so the means are not needed).
fn sample_correlation(ys: &[[f64; 2]]) -> f64 {
    let n = ys.len() as f64;
    let (sx, sy) = ys.iter().fold((0.0, 0.0), |(a, b), y| (a + y[0], b + y[1]));
    let (mx, my) = (sx / n, sy / n);
    let (mut xx, mut yy, mut xy) = (0.0, 0.0, 0.0);
    for y in ys {
        let (dx, dy) = (y[0] - mx, y[1] - my);
        xx += dx * dx;
        yy += dy * dy;
        xy += dx * dy;
    }
    xy / (xx * yy).sqrt()
}

/// Correlation interval by test inversion: a candidate ρ₀ is kept when the observed sample
/// correlation of the estimates lies within the central `confidence` share of its simulated
/// distribution under yᵢ ~ N(0, T(ρ₀) + Sᵢ), T(ρ₀) built from the moment SDs (see the module
/// documentation). Common random numbers across ρ₀ keep the acceptance region an interval.
fn correlation_interval(
    ys: &[[f64; 2]],
    ss: &[[[f64; 2]; 2]],
    sd: [f64; 2],
    m: &[[f64; 2]; 2],
    w: &[[f64; 2]; 2],
    settings: PopulationSettings,
) -> CorrelationEstimate {
    let n = ys.len();
    if n < 3 {
        return CorrelationEstimate {
            value: None,
            interval: None,
            simulations: 0,
        };
    }
    let observed = sample_correlation(ys);
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(settings.seed);
    let draws: Vec<Vec<[f64; 2]>> = (0..settings.simulations)
        .map(|_| {
            (0..n)
                .map(|_| {
                    [
                        StandardNormal.sample(&mut rng),
                        StandardNormal.sample(&mut rng),
                    ]
                })
                .collect()
        })
        .collect();
    let tail = 0.5 * (1.0 - settings.confidence);
    let steps = (2.0 * GRID_END / GRID_STEP).round() as usize;
    let mut accepted: Option<(f64, f64)> = None;
    let mut sim = vec![[0.0; 2]; n];
    let mut rs = Vec::with_capacity(settings.simulations);
    for g in 0..=steps {
        let rho = -GRID_END + g as f64 * GRID_STEP;
        // Cholesky factor of each animal's T(ρ₀) + Sᵢ.
        let factors: Vec<[f64; 3]> = ss
            .iter()
            .map(|s| {
                let a = sd[0] * sd[0] + s[0][0];
                let b = rho * sd[0] * sd[1] + s[0][1];
                let c = sd[1] * sd[1] + s[1][1];
                let l00 = a.max(0.0).sqrt();
                let l10 = if l00 > 0.0 { b / l00 } else { 0.0 };
                [l00, l10, (c - l10 * l10).max(0.0).sqrt()]
            })
            .collect();
        rs.clear();
        for z in &draws {
            for ((y, l), zi) in sim.iter_mut().zip(&factors).zip(z) {
                *y = [l[0] * zi[0], l[1] * zi[0] + l[2] * zi[1]];
            }
            let r = sample_correlation(&sim);
            if r.is_finite() {
                rs.push(r);
            }
        }
        if rs.is_empty() {
            continue;
        }
        rs.sort_by(f64::total_cmp);
        if quantile(&rs, tail) <= observed && observed <= quantile(&rs, 1.0 - tail) {
            accepted = Some(match accepted {
                None => (rho, rho),
                Some((lo, _)) => (lo, rho),
            });
        }
    }
    // A kept end of the grid stands for everything beyond it.
    let widen = |x: f64| {
        if x <= -GRID_END + 1e-9 {
            -1.0
        } else if x >= GRID_END - 1e-9 {
            1.0
        } else {
            x
        }
    };
    CorrelationEstimate {
        value: correlation(m, w),
        interval: accepted.map(|(lo, hi)| PopulationInterval {
            low: widen(lo),
            high: widen(hi),
        }),
        simulations: settings.simulations,
    }
}

/// Quantile of sorted values by linear interpolation between order statistics (the
/// default, "type 7", of R's `quantile` and NumPy's `quantile`).
fn quantile(sorted: &[f64], p: f64) -> f64 {
    let h = (sorted.len() - 1) as f64 * p;
    let (lo, frac) = (h.floor() as usize, h - h.floor());
    let hi = (lo + 1).min(sorted.len() - 1);
    sorted[lo] + frac * (sorted[hi] - sorted[lo])
}
