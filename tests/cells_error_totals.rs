//! Error-totals records: information against a hand-written delta-method computation, the
//! identification verdict with and without base-rate knowledge, and the value of a census.

use vigil::cells::identifiability::{EigenVerdict, assess};
use vigil::cells::information::{expected_information, precision};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{BaseRate, ConditionSpec, Record};
use vigil::model::normal::{cdf, pdf};

mod common;

fn model(knowledge: BaseRate, n: u64, d: f64, c: f64, pi: f64) -> ObservationModel {
    let rec = Record::ErrorTotals {
        encounters: n,
        base_rate: knowledge,
    };
    ObservationModel::new(vec![ConditionSpec::yes_no("field", rec, d, c, pi)]).unwrap()
}

/// Independent computation (written out here, not taken from the crate): with π known,
/// p_FA = (1−π)Φ(−d/2 − c), p_miss = πΦ(c − d/2), p_correct = 1 − p_FA − p_miss; for one
/// multinomial block, I = N Σ_cells ∇p ∇pᵀ / p (Fisher information of a multinomial; common
/// practice, e.g. Agresti, Categorical Data Analysis [memory]).
fn hand_information(n: f64, d: f64, c: f64, pi: f64) -> [[f64; 2]; 2] {
    let (a, b) = (-d / 2.0 - c, c - d / 2.0);
    let p_fa = (1.0 - pi) * cdf(a);
    let p_miss = pi * cdf(b);
    let p_correct = 1.0 - p_fa - p_miss;
    // ∂/∂d and ∂/∂c of each cell.
    let g_fa = [-(1.0 - pi) * pdf(a) / 2.0, -(1.0 - pi) * pdf(a)];
    let g_miss = [-pi * pdf(b) / 2.0, pi * pdf(b)];
    let g_correct = [-g_fa[0] - g_miss[0], -g_fa[1] - g_miss[1]];
    let mut info = [[0.0; 2]; 2];
    for (p, g) in [(p_fa, g_fa), (p_miss, g_miss), (p_correct, g_correct)] {
        for r in 0..2 {
            for s in 0..2 {
                info[r][s] += n * g[r] * g[s] / p;
            }
        }
    }
    info
}

#[test]
fn known_base_rate_information_matches_hand_delta_method() {
    for (n, d, c, pi) in [
        (100, 1.5, 0.3, 0.3),
        (40, 0.7, -0.4, 0.5),
        (500, 2.5, 0.9, 0.1),
    ] {
        let m = model(BaseRate::Known, n, d, c, pi);
        let theta = m.hypothesised_theta();
        let info = expected_information(&m, &theta, &m.block_sizes()).unwrap();
        let hand = hand_information(n as f64, d, c, pi);
        for r in 0..2 {
            for s in 0..2 {
                let rel = (info[(r, s)] - hand[r][s]).abs() / hand[r][s].abs().max(1e-12);
                assert!(rel < 1e-12, "({r},{s}) {} vs {}", info[(r, s)], hand[r][s]);
            }
        }
    }
}

/// Golden values from SciPy/NumPy written by the project's tests/golden/generate.py (case list
/// and library versions in the file's "meta" block): information, covariance, SEs and
/// correlation of (d′, c) for error totals with known π. Their Jacobian comes from central
/// differences (step 1e-6), hence the 1e-6 relative tolerance.
#[test]
fn golden_error_totals_information() {
    let cases = common::golden_cases("error_totals_information.json");
    let num = |v: &serde_json::Value| v.as_f64().expect("number");
    let near = |a: f64, b: f64| (a - b).abs() <= 1e-6 * b.abs().max(1e-3);
    for case in cases {
        let (d, c, pi) = (num(&case["d_prime"]), num(&case["c"]), num(&case["pi"]));
        let n = case["N"].as_u64().expect("N");
        let m = model(BaseRate::Known, n, d, c, pi);
        let theta = m.hypothesised_theta();
        let info = expected_information(&m, &theta, &m.block_sizes()).unwrap();
        let p = precision(&m, &theta, &info).unwrap().unwrap();
        for r in 0..2 {
            for s in 0..2 {
                let golden = num(&case["information"][r][s]);
                assert!(near(info[(r, s)], golden), "{d},{c},{pi},{n} I[{r}][{s}]");
                let golden = num(&case["covariance"][r][s]);
                assert!(
                    near(p.covariance[(r, s)], golden),
                    "{d},{c},{pi},{n} cov[{r}][{s}]"
                );
            }
        }
        let cp = &p.conditions[0];
        assert!(near(cp.se_d_prime.unwrap(), num(&case["se_d_prime"])));
        assert!(near(cp.se_criterion.unwrap(), num(&case["se_c"])));
        assert!(near(
            cp.corr_d_prime_criterion.unwrap(),
            num(&case["correlation"])
        ));
    }
}

#[test]
fn unknown_base_rate_is_not_identified_with_one_null_direction() {
    let m = model(BaseRate::Unknown, 200, 1.5, 0.3, 0.3);
    let theta = m.hypothesised_theta();
    let info = expected_information(&m, &theta, &m.block_sizes()).unwrap();
    let id = assess(&info, m.parameters().names()).unwrap();
    let EigenVerdict::NotIdentified {
        deficiency,
        null_directions,
    } = &id.verdict
    else {
        panic!("expected NotIdentified, got {:?}", id.verdict);
    };
    assert_eq!(*deficiency, 1);
    let text = null_directions[0].to_string();
    for name in ["d′[field]", "c[field]", "logit π[field]"] {
        assert!(text.contains(name), "{text}");
    }
    assert!(precision(&m, &theta, &info).unwrap().is_none());
}

#[test]
fn census_identifies_and_larger_census_shrinks_the_errors() {
    let mut last = (f64::INFINITY, f64::INFINITY);
    for size in [50, 200, 1000] {
        let m = model(BaseRate::Census(size), 200, 1.5, 0.3, 0.3);
        let theta = m.hypothesised_theta();
        let info = expected_information(&m, &theta, &m.block_sizes()).unwrap();
        let id = assess(&info, m.parameters().names()).unwrap();
        assert_eq!(id.rank, 3, "census {size}: {:?}", id.verdict);
        assert!(!matches!(id.verdict, EigenVerdict::NotIdentified { .. }));
        let p = precision(&m, &theta, &info).unwrap().unwrap();
        let c = &p.conditions[0];
        let (sd, sc) = (c.se_d_prime.unwrap(), c.se_criterion.unwrap());
        assert!(
            sd < last.0 && sc < last.1,
            "census {size}: {sd}, {sc} vs {last:?}"
        );
        last = (sd, sc);
    }
    // With π known the SEs are smaller still (the limit of an infinite census).
    let known = model(BaseRate::Known, 200, 1.5, 0.3, 0.3);
    let theta = known.hypothesised_theta();
    let info = expected_information(&known, &theta, &known.block_sizes()).unwrap();
    let p = precision(&known, &theta, &info).unwrap().unwrap();
    assert!(p.conditions[0].se_d_prime.unwrap() < last.0);
    assert!(p.conditions[0].se_base_rate.is_none());
}

/// The usage example of the report: two error-totals conditions (invented scenario) sharing d′,
/// each with its own criterion and a base-rate census of its own.
#[test]
fn two_condition_census_design_end_to_end() {
    use vigil::cells::likelihood::Counts;
    use vigil::cells::newton::{NewtonOptions, Start, StopReason, fit};
    use vigil::cells::profile::{Bound, ProfileOptions, ProfileTarget, profile_interval};
    use vigil::cells::spec::Role;

    let totals = |name: &str, c: f64, pi: f64| {
        let rec = Record::ErrorTotals {
            encounters: 150,
            base_rate: BaseRate::Census(80),
        };
        let mut spec = ConditionSpec::yes_no(name, rec, 1.5, c, pi);
        spec.roles.d_prime = Role::Shared;
        spec
    };
    let model =
        ObservationModel::new(vec![totals("dawn", 0.4, 0.3), totals("dusk", -0.2, 0.6)]).unwrap();
    let names = model.parameters().names();
    assert_eq!(
        names,
        ["d′", "c[dawn]", "logit π[dawn]", "c[dusk]", "logit π[dusk]"]
    );
    // Planning: expected information at the hypothesised values and the stated trial numbers.
    let theta = model.hypothesised_theta();
    let info = expected_information(&model, &theta, &model.block_sizes()).unwrap();
    assert!(matches!(
        assess(&info, names).unwrap().verdict,
        EigenVerdict::Identified
    ));
    let p = precision(&model, &theta, &info).unwrap().unwrap();
    assert!(p.conditions[0].se_d_prime.unwrap() > 0.0);
    // Analysis of one (invented) dataset: blocks are [errors dawn, census dawn, errors dusk,
    // census dusk]; error cells are [false alarms, misses, correct].
    let counts = Counts::new(
        &model,
        vec![
            vec![20.0, 18.0, 112.0],
            vec![25.0, 55.0],
            vec![31.0, 17.0, 102.0],
            vec![47.0, 33.0],
        ],
    )
    .unwrap();
    let f = fit(
        &model,
        &counts,
        Start::Hypothesised,
        &NewtonOptions::default(),
    )
    .unwrap();
    assert_eq!(f.stop, StopReason::Converged);
    let target = ProfileTarget::DPrime {
        condition: "dawn".into(),
    };
    let range = profile_interval(&model, &counts, &f, &target, &ProfileOptions::default()).unwrap();
    assert!(matches!(
        (range.lower, range.upper),
        (Bound::At(_), Bound::At(_))
    ));
}
