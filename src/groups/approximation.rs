//! A fast large-sample approximation of group power, used only to narrow the effort-split
//! search before Monte Carlo confirms it.
//!
//! For a two-stage test the per-animal estimate of the tested contrast varies between
//! animals with variance v(n) = b + w(n): b is the between-animal variance of the contrast
//! (s_c² for a criterion against a fixed value or between populations; 0 for a shift or
//! difference within animals, since an animal's deviation moves both conditions alike) and
//! w(n) the within-animal sampling variance at n trials per condition, from the inverse
//! expected Fisher information (Σ_b n_b·I_b; see `cells::information`). The group mean over N
//! animals has SE √(v/N) (Welch: √(v/N₁ + v/N₂)), and with δ the true contrast minus its null
//! the power of a t test at level α is approximately Φ(δ/SE − t_crit) (+ Φ(−δ/SE − t_crit)
//! when two-sided), t_crit on N − 1 df (N − 2 for Welch) — the normal approximation to the
//! noncentral t (common practice; slightly optimistic at small N, which the Monte Carlo
//! confirmation corrects).
//!
//! With lapses, the analysis model (lapses off) converges to pseudo-true values: θ* is the
//! analysis fit to the expected counts of the lapsing animal, and δ and w(n) are taken at θ*.

use super::hypotheses::{GroupContrast, GroupTest};
use super::population::Population;
use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::information::{UnitInformation, precision};
use crate::cells::likelihood::Counts;
use crate::cells::newton::{NewtonOptions, Start, StopReason, fit};
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{SLOT_CRITERION, SLOT_D_PRIME, SLOT_LN_SIGMA, Slot};
use crate::design::Design;
use crate::design::model::condition_specs;
use crate::model::{Observer, normal};
use crate::vocab::Sided;
use statrs::distribution::{ContinuousCDF, StudentsT};

/// What the approximation fixes for one design.
#[derive(Debug, Clone)]
pub struct Approximation {
    design: Design,
    model: ObservationModel,
    theta: Vec<f64>,
    unit: UnitInformation,
    population: Population,
}

/// Within-animal sampling variances at one trial count.
#[derive(Debug, Clone, PartialEq)]
pub struct WithinVariance {
    /// Per test, the variance of one animal's estimate of the contrast (None: not identified).
    pub tests: Vec<Option<f64>>,
    /// Of ĉ and d̂′ in the first condition.
    pub criterion: Option<f64>,
    pub d_prime: Option<f64>,
}

fn entry(model: &ObservationModel, condition: usize, slot: usize) -> Option<usize> {
    match model.parameters().slots(condition).get(slot) {
        Some(Slot::Theta(i)) => Some(*i),
        _ => None,
    }
}

impl Approximation {
    /// Builds the analysis model of `design` and its pseudo-true θ*; `None` when the model
    /// cannot be built or has no information.
    pub fn new(design: &Design, observer: &Observer, population: Population) -> Option<Self> {
        let at = *design.trials.last()?;
        let mut analysis = condition_specs(design, observer, at);
        analysis.iter_mut().for_each(|c| c.lapse = None);
        let model = ObservationModel::new(analysis).ok()?;
        let mut theta = model.hypothesised_theta();
        if observer.lapse.is_some() {
            if let Some(t) = pseudo_true(design, observer, at, &model) {
                theta = t;
            }
        }
        let unit = UnitInformation::new(&model, &theta).ok()?;
        Some(Self {
            design: design.clone(),
            model,
            theta,
            unit,
            population,
        })
    }

    /// The between-animal variation this approximation assumes.
    pub fn population(&self) -> Population {
        self.population
    }

    /// The contrast's value at θ* minus its null (the effect a study would see).
    pub fn effect(&self, test: &GroupTest) -> Option<f64> {
        let m = &self.model;
        let at = |j: usize, slot: usize| entry(m, j, slot).map(|i| self.theta[i]);
        let value = match test.contrast {
            GroupContrast::Criterion { condition } => at(condition, SLOT_CRITERION)?,
            GroupContrast::CriterionShift { a, b } => {
                at(a, SLOT_CRITERION)? - at(b, SLOT_CRITERION)?
            }
            GroupContrast::SensitivityDifference { a, b } => {
                at(a, SLOT_D_PRIME)? - at(b, SLOT_D_PRIME)?
            }
            GroupContrast::LnSigma => at(0, SLOT_LN_SIGMA)?,
            GroupContrast::GroupDifference { shift, .. } => shift,
        };
        Some(value - test.null)
    }

    /// Between-animal variance of a test's per-animal contrast.
    /// With random slopes (applied to every condition after the first), a contrast between
    /// the first condition and another varies with the slope's SD, and a criterion in a later
    /// condition with Var(δc + u) = s_c² + s_u² + 2·r·s_c·s_u.
    pub fn between(&self, test: &GroupTest) -> f64 {
        let p = &self.population;
        let s = &p.slopes;
        let one_is_first = |a: usize, b: usize| (a == 0) != (b == 0);
        match test.contrast {
            GroupContrast::Criterion { condition } if condition > 0 => {
                p.sd_criterion.powi(2)
                    + s.sd_criterion_shift.powi(2)
                    + 2.0 * s.correlation_criterion_shift * p.sd_criterion * s.sd_criterion_shift
            }
            GroupContrast::Criterion { .. } | GroupContrast::GroupDifference { .. } => {
                p.sd_criterion.powi(2)
            }
            GroupContrast::CriterionShift { a, b } if one_is_first(a, b) => {
                s.sd_criterion_shift.powi(2)
            }
            GroupContrast::SensitivityDifference { a, b } if one_is_first(a, b) => {
                s.sd_d_prime_change.powi(2)
            }
            GroupContrast::LnSigma => s.sd_ln_sigma.powi(2),
            _ => 0.0,
        }
    }

    /// Within-animal variances at `trials` per condition.
    pub fn within(&self, tests: &[GroupTest], trials: u32) -> WithinVariance {
        let none = WithinVariance {
            tests: vec![None; tests.len()],
            criterion: None,
            d_prime: None,
        };
        let sizes = self.sizes(trials);
        let Ok(info) = self.unit.total(&sizes) else {
            return none;
        };
        let Ok(Some(prec)) = precision(&self.model, &self.theta, &info) else {
            return none;
        };
        let cov = &prec.covariance;
        let m = &self.model;
        let var = |terms: &[(Option<usize>, f64)]| -> Option<f64> {
            let mut v = 0.0;
            for &(i, wi) in terms {
                for &(k, wk) in terms {
                    v += wi * wk * cov[(i?, k?)];
                }
            }
            (v.is_finite() && v > 0.0).then_some(v)
        };
        let c = |j: usize| entry(m, j, SLOT_CRITERION);
        let d = |j: usize| entry(m, j, SLOT_D_PRIME);
        WithinVariance {
            tests: tests
                .iter()
                .map(|t| match t.contrast {
                    GroupContrast::Criterion { condition, .. }
                    | GroupContrast::GroupDifference { condition, .. } => {
                        var(&[(c(condition), 1.0)])
                    }
                    GroupContrast::CriterionShift { a, b } => var(&[(c(a), 1.0), (c(b), -1.0)]),
                    GroupContrast::SensitivityDifference { a, b } => {
                        var(&[(d(a), 1.0), (d(b), -1.0)])
                    }
                    GroupContrast::LnSigma => var(&[(entry(m, 0, SLOT_LN_SIGMA), 1.0)]),
                })
                .collect(),
            criterion: var(&[(c(0), 1.0)]),
            d_prime: var(&[(d(0), 1.0)]),
        }
    }

    /// Block sizes at `trials` per condition (present/absent from the split, encounters =
    /// trials, census as stated).
    fn sizes(&self, trials: u32) -> Vec<f64> {
        crate::design::model::block_sizes(&self.design, &self.model, trials)
    }
}

/// The analysis fit to the expected counts of the true (lapsing) model at `trials`.
fn pseudo_true(
    design: &Design,
    observer: &Observer,
    trials: u32,
    analysis: &ObservationModel,
) -> Option<Vec<f64>> {
    let truth = ObservationModel::new(condition_specs(design, observer, trials)).ok()?;
    let blocks = cell_probabilities(&truth, &truth.hypothesised_theta(), Order::First).ok()?;
    let cells = blocks
        .iter()
        .zip(truth.blocks())
        .map(|(p, b)| p.p.iter().map(|x| x * b.n).collect())
        .collect();
    let counts = Counts::new(analysis, cells).ok()?;
    let result = fit(
        analysis,
        &counts,
        Start::Hypothesised,
        &NewtonOptions::default(),
    )
    .ok()?;
    (result.stop == StopReason::Converged).then_some(result.theta)
}

/// Student t quantile t_{p, df}. statrs' inverse is accurate to ~1e-9 up to df = 10⁴ but
/// drifts beyond; there the first Cornish–Fisher term, z + (z³ + z)/(4·df), is used
/// (Abramowitz & Stegun 26.7.5, from memory; its error is O(df⁻²) < 1e-8 there).
pub fn t_quantile(p: f64, df: f64) -> f64 {
    if df > 1e4 {
        let z = normal::z(p).unwrap_or(f64::NAN);
        return z + (z * z * z + z) / (4.0 * df);
    }
    StudentsT::new(0.0, 1.0, df.max(1e-3)).map_or(f64::NAN, |t| t.inverse_cdf(p))
}

/// Approximate power of a t test with effect `delta`, standard error `se`, `df` degrees of
/// freedom at level `alpha` (normal approximation to the noncentral t; see the module).
pub fn t_power(delta: f64, se: f64, df: f64, sided: Sided, alpha: f64) -> f64 {
    if !(se > 0.0 && df >= 1.0) {
        return 0.0;
    }
    power_beyond(delta / se, t_critical(sided, alpha, df), sided)
}

/// The critical value of a t test at level `alpha` on `df` degrees of freedom.
pub fn t_critical(sided: Sided, alpha: f64, df: f64) -> f64 {
    match sided {
        Sided::TwoSided => t_quantile(1.0 - alpha / 2.0, df),
        Sided::Greater | Sided::Less => t_quantile(1.0 - alpha, df),
    }
}

/// Normal-approximation power at noncentrality `ncp` = δ/SE and critical value `crit`
/// (callers that evaluate many effects at one df compute `crit` once).
pub fn power_beyond(ncp: f64, crit: f64, sided: Sided) -> f64 {
    match sided {
        Sided::TwoSided => normal::cdf(ncp - crit) + normal::cdf(-ncp - crit),
        Sided::Greater => normal::cdf(ncp - crit),
        Sided::Less => normal::cdf(-ncp - crit),
    }
}

/// SE and degrees of freedom of `test`'s group contrast with `animals` animals and
/// per-animal variance `v` (Welch's with two populations of ⌊N/2⌋ and the rest); `None` when
/// a population would have fewer than 2 animals.
pub fn group_se_df(test: &GroupTest, animals: u32, v: f64) -> Option<(f64, f64)> {
    let n = f64::from(animals);
    if test.two_populations() {
        let n1 = f64::from(animals / 2);
        let n2 = n - n1;
        (n1 >= 2.0).then(|| ((v / n1 + v / n2).sqrt(), n - 2.0))
    } else {
        Some(((v / n).sqrt(), n - 1.0))
    }
}

/// Approximate power of `test` with `animals` animals, given the per-animal variance
/// v = b + w of its contrast and effect δ.
pub fn group_power(test: &GroupTest, animals: u32, v: f64, delta: f64, alpha: f64) -> f64 {
    group_se_df(test, animals, v).map_or(0.0, |(se, df)| t_power(delta, se, df, test.sided, alpha))
}

/// Approximate half-width t_{1−(1−level)/2, N−1}·√(v/N) of a group mean's interval.
pub fn group_half_width(animals: u32, v: f64, level: f64) -> f64 {
    let n = f64::from(animals);
    StudentsT::new(0.0, 1.0, (n - 1.0).max(1.0)).map_or(f64::NAN, |t| {
        t.inverse_cdf(1.0 - (1.0 - level) / 2.0) * (v / n).sqrt()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Standard t table values (common practice): t(0.975; 8) = 2.306004, t(0.975; 30) =
    // 2.042272, t(0.975; 1000) = 1.962339; z(0.975) = 1.959964.
    #[test]
    fn t_quantiles_across_degrees_of_freedom() {
        for (df, q) in [
            (8.0, 2.306004),
            (30.0, 2.042272),
            (1000.0, 1.962339),
            (1e9, 1.959964),
        ] {
            assert!((t_quantile(0.975, df) - q).abs() < 1e-6, "df {df}");
        }
        // Continuity where the method changes.
        assert!((t_quantile(0.975, 1e4) - t_quantile(0.975, 1.0001e4)).abs() < 1e-6);
    }

    // At δ = 0 a two-sided test rejects with probability α in this approximation.
    #[test]
    fn null_power_is_alpha() {
        let p = t_power(0.0, 0.1, 1e6, Sided::TwoSided, 0.05);
        assert!((p - 0.05).abs() < 1e-6);
    }

    // Large df: power = Φ(δ/SE − 1.959964) + Φ(−δ/SE − 1.959964); at δ/SE = 2.801585
    // (1.959964 + 0.841621, the z values of 0.975 and 0.80; standard normal table) it is 0.80.
    #[test]
    fn eighty_percent_power_at_the_textbook_effect() {
        let p = t_power(2.801585, 1.0, 1e7, Sided::TwoSided, 0.05);
        assert!((p - 0.80).abs() < 1e-4, "{p}");
        let one = t_power(2.486475, 1.0, 1e7, Sided::Greater, 0.05); // 1.644854 + 0.841621
        assert!((one - 0.80).abs() < 1e-4, "{one}");
    }
}
