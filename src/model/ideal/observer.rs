//! A validated ideal-observer setting (d′, presence rate, payoffs): the optimal β and c
//! (Green & Swets 1966), partial adjustment towards c_opt, and the outcome and expected
//! payoff of an observer at any criterion.

use super::{IdealError, Payoffs, check_d_prime, check_presence_rate, ln_beta_from_ratio};
use crate::model::normal;
use serde::Serialize;

/// The four response rates of an equal-variance observer at criterion c.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct OutcomeRates {
    pub hit: f64,
    pub miss: f64,
    pub false_alarm: f64,
    pub correct_rejection: f64,
}

/// H = Φ(d′/2 − c), F = Φ(−d′/2 − c); miss = 1 − H and CR = 1 − F are taken from the
/// upper tail so they keep full precision when H or F is near 1.
pub(crate) fn rates_at(d_prime: f64, criterion: f64) -> OutcomeRates {
    let upper = 0.5 * d_prime - criterion;
    let lower = -0.5 * d_prime - criterion;
    OutcomeRates {
        hit: normal::cdf(upper),
        miss: normal::sf(upper),
        false_alarm: normal::cdf(lower),
        correct_rejection: normal::sf(lower),
    }
}

/// Expected ratio of false alarms to misses, (1 − p)·F / (p·(1 − H)); `None` when the
/// expected number of misses is 0 in floating point (the ratio is then unbounded).
pub(crate) fn false_alarm_to_miss(presence_rate: f64, rates: &OutcomeRates) -> Option<f64> {
    let ratio = (1.0 - presence_rate) * rates.false_alarm / (presence_rate * rates.miss);
    ratio.is_finite().then_some(ratio)
}

/// An observer's situation: sensitivity d′ > 0, presence rate p ∈ (0, 1) and payoffs.
/// Validated once by [`IdealObserver::new`]; no method re-checks these.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct IdealObserver {
    d_prime: f64,
    presence_rate: f64,
    payoffs: Payoffs,
}

/// What an observer does at one criterion, with the expected payoff per trial.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PayoffOutcome {
    /// The criterion c (from the midpoint; positive = conservative).
    pub criterion: f64,
    /// H = Φ(d′/2 − c).
    pub hit_rate: f64,
    /// 1 − H.
    pub miss_rate: f64,
    /// F = Φ(−d′/2 − c).
    pub false_alarm_rate: f64,
    /// 1 − F.
    pub correct_rejection_rate: f64,
    /// Expected false alarms per expected miss, (1 − p)F / (p(1 − H)); `None` when
    /// no misses are expected in floating point.
    pub false_alarm_to_miss_ratio: Option<f64>,
    /// p(H·V_H − (1 − H)·C_M) + (1 − p)((1 − F)·V_CR − F·C_FA).
    pub expected_payoff: f64,
}

impl IdealObserver {
    /// Validates d′ (finite, > 0: c_opt = ln β_opt / d′ is undefined at d′ = 0) and the
    /// presence rate p (strictly between 0 and 1); `payoffs` is valid by construction.
    pub fn new(d_prime: f64, presence_rate: f64, payoffs: Payoffs) -> Result<Self, IdealError> {
        Ok(Self {
            d_prime: check_d_prime(d_prime)?,
            presence_rate: check_presence_rate(presence_rate)?,
            payoffs,
        })
    }

    /// Sensitivity d′.
    pub fn d_prime(&self) -> f64 {
        self.d_prime
    }

    /// Presence rate p = P(stimulus present).
    pub fn presence_rate(&self) -> f64 {
        self.presence_rate
    }

    /// The payoffs.
    pub fn payoffs(&self) -> Payoffs {
        self.payoffs
    }

    /// β_opt = [(1 − p)/p]·[(V_CR + C_FA)/(V_H + C_M)] (Green & Swets 1966): the
    /// likelihood ratio at which responding "present" starts to pay.
    pub fn optimal_beta(&self) -> f64 {
        self.ln_optimal_beta().exp()
    }

    /// c_opt = ln β_opt / d′ (Green & Swets 1966, with β = exp(c·d′)).
    pub fn optimal_criterion(&self) -> f64 {
        self.ln_optimal_beta() / self.d_prime
    }

    /// Partial adjustment: c = f·c_opt, a fraction f ∈ [0, 1] of the way from c = 0
    /// (no bias) to c_opt. Observers are often found to stop short of c_opt, and
    /// modelling that as a fixed fraction is common practice.
    pub fn partial_criterion(&self, fraction: f64) -> Result<f64, IdealError> {
        if (0.0..=1.0).contains(&fraction) {
            Ok(fraction * self.optimal_criterion())
        } else {
            Err(IdealError::Fraction(fraction))
        }
    }

    /// OutcomeRates, false-alarm-to-miss ratio and expected payoff at any finite criterion.
    pub fn outcome(&self, criterion: f64) -> Result<PayoffOutcome, IdealError> {
        if criterion.is_finite() {
            Ok(self.outcome_at(criterion))
        } else {
            Err(IdealError::Criterion(criterion))
        }
    }

    /// The outcome at c_opt.
    pub fn optimal_outcome(&self) -> PayoffOutcome {
        self.outcome_at(self.optimal_criterion())
    }

    /// The outcome at a criterion already known to be finite.
    fn outcome_at(&self, criterion: f64) -> PayoffOutcome {
        let r = rates_at(self.d_prime, criterion);
        let p = self.presence_rate;
        PayoffOutcome {
            criterion,
            hit_rate: r.hit,
            miss_rate: r.miss,
            false_alarm_rate: r.false_alarm,
            correct_rejection_rate: r.correct_rejection,
            false_alarm_to_miss_ratio: false_alarm_to_miss(p, &r),
            expected_payoff: self.payoffs.expected(p, &r),
        }
    }

    fn ln_optimal_beta(&self) -> f64 {
        ln_beta_from_ratio(self.presence_rate, self.payoffs.ratio())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn observer(d: f64, p: f64, pay: [f64; 4]) -> IdealObserver {
        let payoffs = Payoffs::new(pay[0], pay[1], pay[2], pay[3]).unwrap();
        IdealObserver::new(d, p, payoffs).unwrap()
    }

    /// One worked case: setting (d′, p, [V_H, C_M, V_CR, C_FA]) and the printed β_opt,
    /// c_opt, H and F.
    struct Worked {
        d: f64,
        p: f64,
        pay: [f64; 4],
        beta: f64,
        c: f64,
        h: f64,
        f: f64,
    }

    /// Worked cases of the ideal observer: formula from
    /// Green & Swets 1966 (form from memory); numbers computed with SciPy 1.17, the
    /// first also matched by numerical maximisation. Printed to 6 decimals.
    #[allow(
        clippy::approx_constant,
        reason = "0.693147 is the printed reference value (it is ln 2), kept as printed"
    )]
    const WORKED: [Worked; 3] = [
        Worked {
            d: 1.5,
            p: 0.25,
            pay: [1.0, 1.0, 1.0, 1.0],
            beta: 3.0,
            c: 0.732408,
            h: 0.507018,
            f: 0.069116,
        },
        Worked {
            d: 1.0,
            p: 0.5,
            pay: [1.0, 1.0, 1.0, 3.0],
            beta: 2.0,
            c: 0.693147,
            h: 0.423422,
            f: 0.116406,
        },
        Worked {
            d: 2.0,
            p: 0.1,
            pay: [10.0, 5.0, 1.0, 1.0],
            beta: 1.2,
            c: 0.091161,
            h: 0.818283,
            f: 0.137601,
        },
    ];

    #[test]
    fn worked_cases_match_reference_values() {
        for Worked {
            d,
            p,
            pay,
            beta,
            c,
            h,
            f,
        } in WORKED
        {
            let obs = observer(d, p, pay);
            let out = obs.optimal_outcome();
            let tol = 6e-7; // half a unit in the 6th printed decimal, plus rounding
            assert!((obs.optimal_beta() - beta).abs() < 1e-12, "β at d′ = {d}");
            assert!((obs.optimal_criterion() - c).abs() < tol, "c at d′ = {d}");
            assert!((out.hit_rate - h).abs() < tol, "H at d′ = {d}");
            assert!((out.false_alarm_rate - f).abs() < tol, "F at d′ = {d}");
            // Convention check: β = exp(c·d′).
            assert!((obs.optimal_beta() - (out.criterion * d).exp()).abs() < 1e-12);
        }
    }

    #[test]
    fn outcome_rates_are_complementary_and_payoff_is_the_formula() {
        let obs = observer(1.5, 0.25, [1.0, 1.0, 1.0, 1.0]);
        let out = obs.outcome(0.4).unwrap();
        assert!((out.hit_rate + out.miss_rate - 1.0).abs() < 1e-15);
        assert!((out.false_alarm_rate + out.correct_rejection_rate - 1.0).abs() < 1e-15);
        let (h, f, p) = (out.hit_rate, out.false_alarm_rate, 0.25);
        let ev = p * (h - (1.0 - h)) + (1.0 - p) * ((1.0 - f) - f);
        assert!((out.expected_payoff - ev).abs() < 1e-14);
        let ratio = (1.0 - p) * f / (p * (1.0 - h));
        assert!((out.false_alarm_to_miss_ratio.unwrap() - ratio).abs() < 1e-12);
    }

    /// Golden-section search for the maximum of a unimodal function on [lo, hi].
    fn golden_max(g: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
        let inv_phi = (5f64.sqrt() - 1.0) / 2.0;
        let mut a = hi - inv_phi * (hi - lo);
        let mut b = lo + inv_phi * (hi - lo);
        let (mut ga, mut gb) = (g(a), g(b));
        while hi - lo > 1e-12 {
            if ga > gb {
                hi = b;
                b = a;
                gb = ga;
                a = hi - inv_phi * (hi - lo);
                ga = g(a);
            } else {
                lo = a;
                a = b;
                ga = gb;
                b = lo + inv_phi * (hi - lo);
                gb = g(b);
            }
        }
        0.5 * (lo + hi)
    }

    #[test]
    fn optimal_criterion_maximises_expected_payoff() {
        let mut cases: Vec<_> = WORKED.iter().map(|w| (w.d, w.p, w.pay)).collect();
        cases.push((0.5, 0.8, [2.0, 0.0, 0.0, 7.0]));
        cases.push((3.0, 0.02, [0.0, 50.0, 1.0, 0.0]));
        for (d, p, pay) in cases {
            let obs = observer(d, p, pay);
            let ev = |c: f64| obs.outcome(c).unwrap().expected_payoff;
            let c_num = golden_max(ev, -10.0, 10.0);
            // The payoff is flat at its maximum, so the arg-max is found to about √ε.
            assert!(
                (c_num - obs.optimal_criterion()).abs() < 1e-6,
                "d′ = {d}, p = {p}: numerical {c_num} vs {}",
                obs.optimal_criterion()
            );
            let best = obs.optimal_outcome().expected_payoff;
            for dc in [-0.3, -0.01, 0.01, 0.3] {
                assert!(ev(obs.optimal_criterion() + dc) < best);
            }
        }
    }

    #[test]
    fn partial_adjustment_moves_from_zero_to_optimum() {
        let obs = observer(1.5, 0.25, [1.0, 1.0, 1.0, 1.0]);
        let c = obs.optimal_criterion();
        assert_eq!(obs.partial_criterion(0.0).unwrap(), 0.0);
        assert_eq!(obs.partial_criterion(1.0).unwrap(), c);
        assert!((obs.partial_criterion(0.5).unwrap() - 0.5 * c).abs() < 1e-15);
        for bad in [-0.1, 1.1, f64::NAN] {
            let err = obs.partial_criterion(bad).unwrap_err();
            assert!(matches!(err, IdealError::Fraction(_)));
            assert!(err.to_string().contains("[0, 1]"));
        }
    }

    #[test]
    fn invalid_settings_are_errors() {
        let pay = Payoffs::new(1.0, 1.0, 1.0, 1.0).unwrap();
        for d in [0.0, -1.0, f64::NAN, f64::INFINITY] {
            let err = IdealObserver::new(d, 0.5, pay).unwrap_err();
            assert!(matches!(err, IdealError::DPrime(_)), "d′ = {d}");
        }
        assert!(
            IdealObserver::new(0.0, 0.5, pay)
                .unwrap_err()
                .to_string()
                .contains("d′ > 0")
        );
        for p in [0.0, 1.0, -0.2, f64::NAN] {
            let err = IdealObserver::new(1.0, p, pay).unwrap_err();
            assert!(matches!(err, IdealError::PresenceRate(_)), "p = {p}");
        }
        let obs = IdealObserver::new(1.0, 0.5, pay).unwrap();
        assert!(matches!(
            obs.outcome(f64::NAN),
            Err(IdealError::Criterion(_))
        ));
    }

    #[test]
    fn no_expected_misses_gives_no_ratio() {
        let obs = observer(1.0, 0.5, [1.0, 1.0, 1.0, 1.0]);
        assert_eq!(obs.outcome(-60.0).unwrap().false_alarm_to_miss_ratio, None);
    }
}
