//! Linked conditions: sharing d′ between two full-count yes/no conditions pools their evidence.

use vigil::cells::information::{expected_information, precision};
use vigil::cells::likelihood::Counts;
use vigil::cells::newton::{NewtonOptions, Start, StopReason, fit};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{ConditionSpec, Record, Role};

fn condition(name: &str, present: u64, absent: u64, d: f64, c: f64, shared: bool) -> ConditionSpec {
    let mut spec = ConditionSpec::yes_no(name, Record::Full { present, absent }, d, c, 0.5);
    if shared {
        spec.roles.d_prime = Role::Shared;
    }
    spec
}

fn se_d_prime(model: &ObservationModel, theta: &[f64], info: &nalgebra::DMatrix<f64>) -> f64 {
    let p = precision(model, theta, info).unwrap().unwrap();
    p.conditions[0].se_d_prime.unwrap()
}

#[test]
fn shared_d_prime_is_at_least_as_precise_as_either_condition_alone() {
    // Expected information: Fisher information adds over independent conditions, so the shared
    // entry's variance can only shrink (the check is the Cramér–Rao ordering; common practice).
    let (d, c_low, c_high) = (1.4, -0.3, 0.6);
    let joint = ObservationModel::new(vec![
        condition("low", 40, 60, d, c_low, true),
        condition("high", 30, 30, d, c_high, true),
    ])
    .unwrap();
    assert_eq!(joint.parameters().names(), ["d′", "c[low]", "c[high]"]);
    let theta = joint.hypothesised_theta();
    let info = expected_information(&joint, &theta, &joint.block_sizes()).unwrap();
    let se_joint = se_d_prime(&joint, &theta, &info);
    for (name, ns, nn, c) in [("low", 40, 60, c_low), ("high", 30, 30, c_high)] {
        let alone = ObservationModel::new(vec![condition(name, ns, nn, d, c, false)]).unwrap();
        let t = alone.hypothesised_theta();
        let i = expected_information(&alone, &t, &alone.block_sizes()).unwrap();
        let se_alone = se_d_prime(&alone, &t, &i);
        assert!(
            se_joint <= se_alone,
            "{name}: joint {se_joint} vs alone {se_alone}"
        );
    }
}

#[test]
fn joint_fit_of_invented_counts_pools_the_two_conditions() {
    // Invented counts (demo data): low 30/40 hits, 18/60 false alarms; high 17/30, 4/30.
    let joint = ObservationModel::new(vec![
        condition("low", 40, 60, 1.0, 0.0, true),
        condition("high", 30, 30, 1.0, 0.0, true),
    ])
    .unwrap();
    let counts = Counts::new(
        &joint,
        vec![
            vec![10.0, 30.0],
            vec![42.0, 18.0],
            vec![13.0, 17.0],
            vec![26.0, 4.0],
        ],
    )
    .unwrap();
    let f = fit(&joint, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
    assert_eq!(f.stop, StopReason::Converged);
    let p = precision(&joint, &f.theta, &f.observed_information)
        .unwrap()
        .unwrap();
    let se_joint = p.conditions[0].se_d_prime.unwrap();
    for (name, ns, nn, rows) in [
        ("low", 40, 60, vec![vec![10.0, 30.0], vec![42.0, 18.0]]),
        ("high", 30, 30, vec![vec![13.0, 17.0], vec![26.0, 4.0]]),
    ] {
        let alone = ObservationModel::new(vec![condition(name, ns, nn, 1.0, 0.0, false)]).unwrap();
        let counts = Counts::new(&alone, rows).unwrap();
        let g = fit(&alone, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
        assert_eq!(g.stop, StopReason::Converged);
        let q = precision(&alone, &g.theta, &g.observed_information)
            .unwrap()
            .unwrap();
        let se_alone = q.conditions[0].se_d_prime.unwrap();
        assert!(
            se_joint <= se_alone,
            "{name}: joint {se_joint} vs alone {se_alone}"
        );
    }
}
