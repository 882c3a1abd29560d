//! Closed-form yes/no fits, precomputed per scenario.
//!
//! A scenario fixes n_present and n_absent, so every possible hit count and false-alarm
//! count has a z value and a variance known in advance: a fit is two table lookups. This
//! is what lets the engine fit millions of datasets per second per core.

use crate::model::{YesNoMeasures, normal};
use crate::vocab::RateCorrection;

/// z of one rate and the Gourevitch & Galanter (1967) variance of that z:
/// Var z(p̂) ≈ p(1−p) / (N φ(z)²), evaluated at the (corrected) estimated rate with N the
/// corrected row total ([`RateCorrection::fitted_total`]; the one SE definition of every
/// route, see [`super::correction`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ZEntry {
    pub z: f64,
    pub var: f64,
}

/// z and its variance for every count 0..=n of one stimulus class; `None` marks counts the
/// correction leaves degenerate. With two categories and σ held, a table is degenerate by the
/// shared rule of `cells::degeneracy` exactly when a rate is 0 or 1, which is when an entry
/// is `None` (only under the `none` correction).
#[derive(Debug, Clone)]
pub struct ZTable {
    entries: Vec<Option<ZEntry>>,
    n: u32,
}

impl ZTable {
    pub fn new(n: u32, correction: RateCorrection) -> Self {
        let entries = (0..=n).map(|x| z_entry(x, n, correction)).collect();
        Self { entries, n }
    }

    #[inline]
    pub fn get(&self, x: u32) -> Option<ZEntry> {
        self.entries[x as usize]
    }

    /// Whether a count gives a raw rate of 0 or 1 (the correction had to act).
    #[inline]
    pub fn is_extreme(&self, x: u32) -> bool {
        x == 0 || x == self.n
    }
}

fn z_entry(x: u32, n: u32, correction: RateCorrection) -> Option<ZEntry> {
    let rate = correction.rate(x, n)?;
    Some(ZEntry {
        z: normal::z(rate)?,
        var: z_variance(rate, correction.fitted_total(n))?,
    })
}

/// Gourevitch & Galanter (1967) asymptotic variance of z(p̂) for a rate `p` estimated from
/// `n` trials: p(1 − p)/(n φ(z(p))²); `None` unless 0 < p < 1.
pub fn z_variance(p: f64, n: f64) -> Option<f64> {
    let phi = normal::pdf(normal::z(p)?);
    Some(p * (1.0 - p) / (n * phi * phi))
}

/// One yes/no fit: estimates and their asymptotic standard errors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct YesNoFit {
    pub measures: YesNoMeasures,
    /// SE of d̂′ = √(Var z(Ĥ) + Var z(F̂)) (Gourevitch & Galanter 1967).
    pub se_d_prime: f64,
    /// SE of ĉ = SE(d̂′)/2, since c = −[z(H) + z(F)]/2 has the same variance terms.
    pub se_criterion: f64,
    /// Cov(d̂′, ĉ) = −½[Var z(Ĥ) − Var z(F̂)].
    pub cov: f64,
}

impl YesNoFit {
    /// Combines the two z entries of a dataset.
    #[inline]
    pub fn from_entries(hit: ZEntry, false_alarm: ZEntry) -> Self {
        let var_d = hit.var + false_alarm.var;
        Self {
            measures: YesNoMeasures::from_z(hit.z, false_alarm.z),
            se_d_prime: var_d.sqrt(),
            se_criterion: 0.5 * var_d.sqrt(),
            cov: -0.5 * (hit.var - false_alarm.var),
        }
    }
}

/// Fits one yes/no dataset; `None` when the correction leaves it degenerate.
pub fn fit_yes_no(
    hits: u32,
    n_present: u32,
    false_alarms: u32,
    n_absent: u32,
    correction: RateCorrection,
) -> Option<YesNoFit> {
    if hits > n_present || false_alarms > n_absent || n_present == 0 || n_absent == 0 {
        return None;
    }
    let h = z_entry(hits, n_present, correction)?;
    let f = z_entry(false_alarms, n_absent, correction)?;
    Some(YesNoFit::from_entries(h, f))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Rates of 0 or 1 under the 1/(2N) (Macmillan & Kaplan 1985) and log-linear (Hautus 1995)
    // rules, check values computed with SciPy 1.17: 50/50 hits, 0/50 false alarms.
    #[test]
    fn corrected_worked_examples() {
        let cases = [
            (50, 50, 0, 50, RateCorrection::HalfN, 4.652696, 0.0),
            (50, 50, 0, 50, RateCorrection::LogLinear, 4.667537, 0.0),
            (20, 20, 5, 25, RateCorrection::HalfN, 2.801585, -0.559171),
            (
                20,
                20,
                5,
                25,
                RateCorrection::LogLinear,
                2.781847,
                -0.589829,
            ),
            (9, 10, 0, 10, RateCorrection::HalfN, 2.926405, 0.181651),
            (9, 10, 0, 10, RateCorrection::LogLinear, 2.787425, 0.296909),
        ];
        for (h, ns, f, nn, rule, d, c) in cases {
            let fit = fit_yes_no(h, ns, f, nn, rule).unwrap();
            assert!(
                (fit.measures.d_prime - d).abs() < 1e-6,
                "{h}/{ns} {f}/{nn} {rule:?}"
            );
            assert!(
                (fit.measures.criterion - c).abs() < 1e-6,
                "{h}/{ns} {f}/{nn} {rule:?}"
            );
        }
    }

    // Gourevitch & Galanter (1967, Psychometrika 32:25–33; formula from memory) with SciPy 1.17
    // check values: H = .8, F = .2, 50/50 → Var(d′) = 0.081655, Var(c) = 0.020414.
    #[test]
    fn gourevitch_galanter_variance() {
        let fit = fit_yes_no(40, 50, 10, 50, RateCorrection::None).unwrap();
        assert!((fit.se_d_prime.powi(2) - 0.081655).abs() < 1e-6);
        assert!((fit.se_criterion.powi(2) - 0.020414).abs() < 1e-6);
    }

    // Log-linear: 40/50 becomes 40.5/51, fitted with N = 51. By hand: p(1 − p)/(N φ(z(p))²)
    // for each row, Var d′ the sum, Var c a quarter of it (Gourevitch & Galanter 1967).
    #[test]
    fn log_linear_variance_uses_the_corrected_total() {
        let fit = fit_yes_no(40, 50, 10, 50, RateCorrection::LogLinear).unwrap();
        let var = |p: f64| p * (1.0 - p) / (51.0 * normal::pdf(normal::z(p).unwrap()).powi(2));
        let var_d = var(40.5 / 51.0) + var(10.5 / 51.0);
        assert!((fit.se_d_prime.powi(2) - var_d).abs() < 1e-15);
        assert!((fit.se_criterion.powi(2) - var_d / 4.0).abs() < 1e-15);
    }

    #[test]
    fn none_correction_is_degenerate_at_extremes() {
        assert!(fit_yes_no(10, 10, 3, 10, RateCorrection::None).is_none());
        assert!(fit_yes_no(7, 10, 0, 10, RateCorrection::None).is_none());
        assert!(fit_yes_no(7, 10, 3, 10, RateCorrection::None).is_some());
    }

    #[test]
    fn impossible_counts_are_rejected() {
        assert!(fit_yes_no(11, 10, 3, 10, RateCorrection::LogLinear).is_none());
    }
}
