//! Profile-likelihood ranges: unbounded for a design that cannot identify d′, close to the Wald
//! interval for an identified design with many trials.

use vigil::cells::information::precision;
use vigil::cells::likelihood::Counts;
use vigil::cells::newton::{NewtonOptions, Start, StopReason, fit};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::profile::{Bound, ProfileOptions, ProfileTarget, profile_interval};
use vigil::cells::spec::{BaseRate, ConditionSpec, Record};

#[test]
fn not_identified_design_gives_an_unbounded_range() {
    // Invented counts (demo data): 200 encounters, 30 false alarms, 25 misses, π unknown.
    let rec = Record::ErrorTotals {
        encounters: 200,
        base_rate: BaseRate::Unknown,
    };
    let model =
        ObservationModel::new(vec![ConditionSpec::yes_no("field", rec, 1.5, 0.3, 0.3)]).unwrap();
    let counts = Counts::new(&model, vec![vec![30.0, 25.0, 145.0]]).unwrap();
    let f = fit(
        &model,
        &counts,
        Start::Hypothesised,
        &NewtonOptions::default(),
    )
    .unwrap();
    assert_eq!(f.stop, StopReason::NotIdentified);
    let target = ProfileTarget::DPrime {
        condition: "field".into(),
    };
    let range = profile_interval(&model, &counts, &f, &target, &ProfileOptions::default()).unwrap();
    let unbounded = |b: Bound| matches!(b, Bound::BeyondWindow { .. });
    assert!(
        unbounded(range.lower) || unbounded(range.upper),
        "expected an unbounded side: {range:?}"
    );
}

#[test]
fn identified_design_matches_wald_at_large_n() {
    // Counts at their expectations for H = .8, F = .2 with 5000 trials per class: the profile
    // range approaches θ̂ ± z₀.₉₇₅·SE as N grows (both are first-order equivalent; common practice).
    let rec = Record::Full {
        present: 5000,
        absent: 5000,
    };
    let model =
        ObservationModel::new(vec![ConditionSpec::yes_no("lab", rec, 1.0, 0.0, 0.5)]).unwrap();
    let counts = Counts::new(&model, vec![vec![1000.0, 4000.0], vec![4000.0, 1000.0]]).unwrap();
    let f = fit(&model, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
    assert_eq!(f.stop, StopReason::Converged);
    let p = precision(&model, &f.theta, &f.observed_information)
        .unwrap()
        .unwrap();
    let z = 1.959963984540054;
    for (target, index, se) in [
        (
            ProfileTarget::DPrime {
                condition: "lab".into(),
            },
            0,
            p.conditions[0].se_d_prime.unwrap(),
        ),
        (
            ProfileTarget::Criterion {
                condition: "lab".into(),
            },
            1,
            p.conditions[0].se_criterion.unwrap(),
        ),
    ] {
        let range =
            profile_interval(&model, &counts, &f, &target, &ProfileOptions::default()).unwrap();
        let (Bound::At(lo), Bound::At(hi)) = (range.lower, range.upper) else {
            panic!("expected a bounded range: {range:?}");
        };
        let (wald_lo, wald_hi) = (f.theta[index] - z * se, f.theta[index] + z * se);
        assert!((lo - wald_lo).abs() < 0.02 * z * se, "{lo} vs {wald_lo}");
        assert!((hi - wald_hi).abs() < 0.02 * z * se, "{hi} vs {wald_hi}");
        assert_eq!(range.inner_failures, 0);
        assert!((range.cutoff - 0.5 * z * z).abs() < 1e-9);
    }
}

#[test]
fn bad_targets_and_options_are_errors() {
    let rec = Record::Full {
        present: 50,
        absent: 50,
    };
    let mut spec = ConditionSpec::yes_no("lab", rec, 1.0, 0.0, 0.5);
    spec.roles.criterion = vigil::cells::spec::Role::Fixed;
    let model = ObservationModel::new(vec![spec]).unwrap();
    let counts = Counts::new(&model, vec![vec![10.0, 40.0], vec![35.0, 15.0]]).unwrap();
    let f = fit(&model, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
    let c = ProfileTarget::Criterion {
        condition: "lab".into(),
    };
    assert!(profile_interval(&model, &counts, &f, &c, &ProfileOptions::default()).is_err());
    let other = ProfileTarget::DPrime {
        condition: "nope".into(),
    };
    assert!(profile_interval(&model, &counts, &f, &other, &ProfileOptions::default()).is_err());
    let d = ProfileTarget::DPrime {
        condition: "lab".into(),
    };
    let bad = ProfileOptions {
        level: 1.5,
        ..ProfileOptions::default()
    };
    assert!(profile_interval(&model, &counts, &f, &d, &bad).is_err());
    assert!(profile_interval(&model, &counts, &f, &d, &ProfileOptions::default()).is_ok());
}
