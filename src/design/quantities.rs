//! Which natural quantities a design reports, in which order and under which labels.
//!
//! One rule for every consumer (the general Monte Carlo kernel, the expected-information
//! tables), so the asymptotic SEs line up row for row with the simulated ones: d′, c and σ of
//! every condition when estimated (once, for the first condition, when shared), then π when
//! the record leaves the base rate free (once when shared). A quantity carries the
//! condition's name as its label only when the design has several conditions and the
//! parameter is not shared. d′ and c of the first condition always come first, in that
//! order, because the trade-off figures r(d̂′, ĉ) read those two. A two-choice record also
//! reports p_c = Φ(d′/√2), the proportion correct of an unbiased observer (Macmillan &
//! Creelman 2005, ch. 7), after its d′.

use crate::cells::spec::{BaseRateLink, ConditionSpec, Record, Role};
use crate::model::normal;
use crate::vocab::Quantity;

/// The proportion correct of an unbiased two-choice observer, p_c = Φ(d′/√2), with its
/// delta-method SE φ(d′/√2)/√2 · SE(d′) (common practice).
pub fn percent_correct(d_prime: f64, se_d_prime: f64) -> (f64, f64) {
    let x = d_prime / std::f64::consts::SQRT_2;
    (
        normal::cdf(x),
        normal::pdf(x) / std::f64::consts::SQRT_2 * se_d_prime,
    )
}

/// One reported natural quantity of a design.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportedQuantity {
    /// Index of the condition whose value it is (0 for shared parameters).
    pub condition: usize,
    pub quantity: Quantity,
    /// The condition's name for designs with several conditions; `None` for single-condition
    /// designs and for shared parameters.
    pub label: Option<String>,
    /// The hypothesised (true) value.
    pub truth: f64,
}

/// The estimated natural quantities of the conditions `specs` (as built by
/// [`crate::design::model::condition_specs`]), in report order.
pub fn reported_quantities(specs: &[ConditionSpec]) -> Vec<ReportedQuantity> {
    let many = specs.len() > 1;
    let mut out = Vec::new();
    let mut add = |j: usize, quantity: Quantity, truth: f64, shared: bool| {
        out.push(ReportedQuantity {
            condition: j,
            quantity,
            label: (many && !shared).then(|| specs[j].name.clone()),
            truth,
        });
    };
    for (j, spec) in specs.iter().enumerate() {
        let v = &spec.values;
        let r = &spec.roles;
        for (quantity, role, truth) in [
            (Quantity::DPrime, r.d_prime, v.d_prime),
            (Quantity::Criterion, r.criterion, v.criterion),
            (Quantity::Sigma, r.sigma, v.sigma),
        ] {
            let shared = role == Role::Shared;
            if role != Role::Fixed && (!shared || j == 0) {
                add(j, quantity, truth, shared);
                if quantity == Quantity::DPrime && matches!(spec.record, Record::TwoChoice { .. }) {
                    add(
                        j,
                        Quantity::PercentCorrect,
                        percent_correct(truth, 0.0).0,
                        shared,
                    );
                }
            }
        }
        if spec
            .record
            .base_rate_knowledge()
            .is_some_and(|k| k.is_free())
        {
            let shared = r.base_rate == BaseRateLink::Shared;
            if !shared || j == 0 {
                add(j, Quantity::BaseRate, v.base_rate, shared);
            }
        }
    }
    // Keep d′ and c of the first condition in front, in that order (a stable sort).
    out.sort_by_key(|q| match (q.condition, q.quantity) {
        (0, Quantity::DPrime) => 0,
        (0, Quantity::Criterion) => 1,
        _ => 2,
    });
    out
}

/// Table label of a reported quantity, e.g. `d′` or `c[low]`.
pub fn quantity_label(q: &ReportedQuantity) -> String {
    q.quantity.label_in(q.label.as_deref())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{BaseRate, Record};

    fn totals(name: &str, knowledge: BaseRate) -> ConditionSpec {
        let rec = Record::ErrorTotals {
            encounters: 100,
            base_rate: knowledge,
        };
        ConditionSpec::yes_no(name, rec, 1.5, 0.3, 0.25)
    }

    fn labels(specs: &[ConditionSpec]) -> Vec<String> {
        reported_quantities(specs)
            .iter()
            .map(quantity_label)
            .collect()
    }

    #[test]
    fn single_condition_quantities_carry_no_label() {
        assert_eq!(labels(&[totals("a", BaseRate::Known)]), ["d′", "c"]);
        let q = reported_quantities(&[totals("a", BaseRate::Unknown)]);
        assert_eq!(q.len(), 3);
        assert_eq!(q[2].quantity, Quantity::BaseRate);
        assert!((q[2].truth - 0.25).abs() < 1e-15);
        assert!(q.iter().all(|x| x.condition == 0 && x.label.is_none()));
    }

    #[test]
    fn shared_parameters_appear_once_and_unlabelled() {
        let mut a = totals("low", BaseRate::Census(50));
        let mut b = totals("high", BaseRate::Census(50));
        for s in [&mut a, &mut b] {
            s.roles.d_prime = Role::Shared;
            s.roles.base_rate = BaseRateLink::Shared;
        }
        assert_eq!(labels(&[a, b]), ["d′", "c[low]", "π", "c[high]"]);
    }

    #[test]
    fn separate_parameters_are_labelled_by_condition() {
        let a = totals("low", BaseRate::Known);
        let b = totals("high", BaseRate::Unknown);
        let q = reported_quantities(&[a, b]);
        let got: Vec<(usize, String)> =
            q.iter().map(|x| (x.condition, quantity_label(x))).collect();
        assert_eq!(
            got,
            [
                (0, "d′[low]".to_string()),
                (0, "c[low]".to_string()),
                (1, "d′[high]".to_string()),
                (1, "c[high]".to_string()),
                (1, "π[high]".to_string()),
            ]
        );
    }
}
