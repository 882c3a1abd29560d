//! The four payoffs of a detection trial and their validation.
//!
//! Values and costs are both stored as amounts ≥ 0 (a cost is subtracted), as in
//! Green & Swets (1966): V_H, C_M, V_CR, C_FA. Only the two sums V_H + C_M and
//! V_CR + C_FA matter for the optimal criterion, so each must be > 0.

use super::IdealError;
use super::observer::OutcomeRates;
use serde::Serialize;

/// Value of a hit, cost of a miss, value of a correct rejection and cost of a false
/// alarm, all ≥ 0. Built only through [`Payoffs::new`], so every `Payoffs` is valid.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Payoffs {
    value_hit: f64,
    cost_miss: f64,
    value_correct_rejection: f64,
    cost_false_alarm: f64,
}

impl Payoffs {
    /// Validates and stores V_H, C_M, V_CR, C_FA.
    ///
    /// Errors: any amount negative or not finite ([`IdealError::Payoff`], naming it);
    /// V_H + C_M = 0 ([`IdealError::NothingAtStakeWhenPresent`]); V_CR + C_FA = 0
    /// ([`IdealError::NothingAtStakeWhenAbsent`]). Either zero sum leaves
    /// β_opt = [(1 − p)/p]·(V_CR + C_FA)/(V_H + C_M) undefined or zero.
    pub fn new(
        value_hit: f64,
        cost_miss: f64,
        value_correct_rejection: f64,
        cost_false_alarm: f64,
    ) -> Result<Self, IdealError> {
        for (name, value) in [
            ("value_hit", value_hit),
            ("cost_miss", cost_miss),
            ("value_correct_rejection", value_correct_rejection),
            ("cost_false_alarm", cost_false_alarm),
        ] {
            if !(value.is_finite() && value >= 0.0) {
                return Err(IdealError::Payoff { name, value });
            }
        }
        if value_hit + cost_miss <= 0.0 {
            return Err(IdealError::NothingAtStakeWhenPresent);
        }
        if value_correct_rejection + cost_false_alarm <= 0.0 {
            return Err(IdealError::NothingAtStakeWhenAbsent);
        }
        Ok(Self {
            value_hit,
            cost_miss,
            value_correct_rejection,
            cost_false_alarm,
        })
    }

    /// V_H, the value of a hit.
    pub fn value_hit(&self) -> f64 {
        self.value_hit
    }

    /// C_M, the cost of a miss.
    pub fn cost_miss(&self) -> f64 {
        self.cost_miss
    }

    /// V_CR, the value of a correct rejection.
    pub fn value_correct_rejection(&self) -> f64 {
        self.value_correct_rejection
    }

    /// C_FA, the cost of a false alarm.
    pub fn cost_false_alarm(&self) -> f64 {
        self.cost_false_alarm
    }

    /// The payoff ratio R = (V_CR + C_FA)/(V_H + C_M): what is at stake on an absent
    /// trial relative to a present one (Green & Swets 1966). Always finite and > 0.
    pub fn ratio(&self) -> f64 {
        (self.value_correct_rejection + self.cost_false_alarm) / (self.value_hit + self.cost_miss)
    }

    /// Expected payoff per trial for hit rate H, false-alarm rate F and presence rate p:
    /// p·(H·V_H − (1 − H)·C_M) + (1 − p)·((1 − F)·V_CR − F·C_FA).
    /// Uses the miss and correct-rejection rates as given, so tail values keep their
    /// precision.
    pub(crate) fn expected(&self, p: f64, r: &OutcomeRates) -> f64 {
        p * (r.hit * self.value_hit - r.miss * self.cost_miss)
            + (1.0 - p)
                * (r.correct_rejection * self.value_correct_rejection
                    - r.false_alarm * self.cost_false_alarm)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratio_of_stakes() {
        let pay = Payoffs::new(10.0, 5.0, 1.0, 1.0).unwrap();
        assert!((pay.ratio() - 2.0 / 15.0).abs() < 1e-15);
        assert_eq!(pay.value_hit(), 10.0);
        assert_eq!(pay.cost_miss(), 5.0);
        assert_eq!(pay.value_correct_rejection(), 1.0);
        assert_eq!(pay.cost_false_alarm(), 1.0);
    }

    #[test]
    fn one_zero_in_each_pair_is_allowed() {
        assert!(Payoffs::new(0.0, 1.0, 1.0, 0.0).is_ok());
        assert!(Payoffs::new(1.0, 0.0, 0.0, 1.0).is_ok());
    }

    #[test]
    fn negative_or_non_finite_amount_is_named() {
        let err = Payoffs::new(1.0, -2.0, 1.0, 1.0).unwrap_err();
        assert_eq!(
            err,
            IdealError::Payoff {
                name: "cost_miss",
                value: -2.0
            }
        );
        assert!(err.to_string().contains("cost_miss"));
        assert!(err.to_string().contains("≥ 0"));
        assert!(matches!(
            Payoffs::new(1.0, 1.0, f64::NAN, 1.0),
            Err(IdealError::Payoff {
                name: "value_correct_rejection",
                ..
            })
        ));
        assert!(matches!(
            Payoffs::new(1.0, 1.0, 1.0, f64::INFINITY),
            Err(IdealError::Payoff {
                name: "cost_false_alarm",
                ..
            })
        ));
    }

    #[test]
    fn zero_stakes_say_which_side() {
        let present = Payoffs::new(0.0, 0.0, 1.0, 1.0).unwrap_err();
        assert_eq!(present, IdealError::NothingAtStakeWhenPresent);
        assert!(present.to_string().contains("value_hit + cost_miss is 0"));
        let absent = Payoffs::new(1.0, 1.0, 0.0, 0.0).unwrap_err();
        assert_eq!(absent, IdealError::NothingAtStakeWhenAbsent);
        assert!(
            absent
                .to_string()
                .contains("value_correct_rejection + cost_false_alarm is 0")
        );
    }
}
