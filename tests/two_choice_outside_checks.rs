//! Two-choice (2AFC) records against the closed forms of Macmillan & Creelman (2005,
//! *Detection Theory: A User's Guide*, 2nd ed., ch. 7): d′ = [z(H) − z(F)]/√2,
//! c = −[z(H) + z(F)]/2 and the unbiased proportion correct p_c = Φ(d′/√2), with their
//! delta-method SEs (Gourevitch & Galanter 1967 for the yes/no table), as SciPy 1.17.1
//! computes them (tests/golden/two_choice.json, made by tests/golden/two_choice_files.py);
//! and the Monte Carlo SD of d̂′ and p̂_c against their asymptotic SEs at large counts.

mod common;

use std::path::Path;
use vigil::cells::information::{expected_information, precision};
use vigil::cells::likelihood::Counts;
use vigil::cells::newton::{NewtonOptions, Start, StopReason, fit};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{ConditionSpec, Record};
use vigil::design::quantities::percent_correct;
use vigil::model::normal;
use vigil::plan::Plan;
use vigil::vocab::Quantity;

fn two_choice(left: u64, right: u64, d: f64, c: f64) -> ObservationModel {
    let rec = Record::TwoChoice { left, right };
    ObservationModel::new(vec![ConditionSpec::yes_no("2afc", rec, d, c, 0.5)]).unwrap()
}

#[test]
fn the_fit_and_its_information_match_the_closed_forms() {
    for g in common::golden_cases("two_choice.json") {
        let f = |k: &str| g[k].as_f64().unwrap();
        let (nl, nr) = (f("n_left") as u64, f("n_right") as u64);
        let model = two_choice(nl, nr, 1.0, 0.0);
        // Blocks: target left [right, left], target right [right, left].
        let counts = Counts::new(
            &model,
            vec![
                vec![f("n_left") - f("left_hits"), f("left_hits")],
                vec![
                    f("n_right") - f("right_false_alarms"),
                    f("right_false_alarms"),
                ],
            ],
        )
        .unwrap();
        let fitted = fit(&model, &counts, Start::Crude, &NewtonOptions::default()).unwrap();
        assert_eq!(fitted.stop, StopReason::Converged);
        let v = &model.natural(&fitted.theta).unwrap()[0];
        // Newton's stopping rule leaves the estimates within 1e-8 of the closed form.
        assert!(
            (v.d_prime - f("d_prime")).abs() < 1e-8,
            "d′ {} vs {}",
            v.d_prime,
            f("d_prime")
        );
        assert!(
            (v.criterion - f("criterion")).abs() < 1e-8,
            "c {} vs {}",
            v.criterion,
            f("criterion")
        );
        // The expected information at the closed-form values is a two-cell analytic sum:
        // it meets the delta-method SEs to rounding.
        let at = two_choice(nl, nr, f("d_prime"), f("criterion"));
        let theta = at.hypothesised_theta();
        let info = expected_information(&at, &theta, &at.block_sizes()).unwrap();
        let prec = precision(&at, &theta, &info).unwrap().unwrap();
        let p = &prec.conditions[0];
        let se_d = p.se_d_prime.unwrap();
        assert!(
            (se_d - f("se_d_prime")).abs() < 1e-10,
            "SE d′ {se_d} vs {}",
            f("se_d_prime")
        );
        assert!((p.se_criterion.unwrap() - f("se_criterion")).abs() < 1e-10);
        let (pc, se_pc) = percent_correct(f("d_prime"), se_d);
        assert!(
            (pc - f("p_correct")).abs() < 1e-12,
            "p_c {pc} vs {}",
            f("p_correct")
        );
        assert!((se_pc - f("se_p_correct")).abs() < 1e-10);
    }
}

#[test]
fn d_prime_from_an_unbiased_proportion_correct() {
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/golden/two_choice.json"),
    )
    .unwrap();
    let doc: serde_json::Value = serde_json::from_str(&text).unwrap();
    let rows = doc["unbiased"].as_array().unwrap();
    assert!(!rows.is_empty());
    for r in rows {
        let (pc, d) = (
            r["p_correct"].as_f64().unwrap(),
            r["d_prime"].as_f64().unwrap(),
        );
        // vigil's p_c of that d′ returns the p_c (Φ and z are inverse to ~1e-15).
        assert!((percent_correct(d, 0.0).0 - pc).abs() < 1e-12, "{pc}");
        // And d′ = √2·z(p_c) with vigil's z.
        assert!((std::f64::consts::SQRT_2 * normal::z(pc).unwrap() - d).abs() < 1e-12);
    }
}

#[test]
fn monte_carlo_spread_meets_the_asymptotic_se_at_large_counts() {
    let text = r#"[study]
title = "2afc spread"
seed = 17
experiments = 4000
[observer]
d_prime = 1.2
criterion = 0.15
[[design]]
name = "two-choice"
record = "two-choice"
presence = 0.5
trials = [2000]
"#;
    let plan = Plan::from_str(Path::new("spread.toml"), text).unwrap();
    let rows = vigil::run(&plan).unwrap();
    for q in [
        Quantity::DPrime,
        Quantity::Criterion,
        Quantity::PercentCorrect,
    ] {
        let s = rows[0].quantities.iter().find(|x| x.quantity == q).unwrap();
        let asymptotic = s.asymptotic_se.unwrap();
        // The SD of an MLE meets its asymptotic SE up to O(1/n) (under 1% at 1000 trials
        // per side) plus Monte Carlo error: within 3 Monte Carlo SEs and 1%.
        assert!(
            (s.sd.value - asymptotic).abs() < 3.0 * s.sd.mc_se + 0.01 * asymptotic,
            "{q:?}: SD {} ± {} vs asymptotic {asymptotic}",
            s.sd.value,
            s.sd.mc_se
        );
        // The hypothesised p_c is Φ(d′/√2) of the plan's d′.
        if q == Quantity::PercentCorrect {
            assert!((s.truth - normal::cdf(1.2 / std::f64::consts::SQRT_2)).abs() < 1e-15);
        }
    }
}

#[test]
fn groups_of_two_choice_animals_hold_alpha_on_a_null_side_bias() {
    // No side bias on average (c = 0), animals differ (SD of c 0.3): the two-stage t test
    // across animals is exact for normal per-animal estimates (Student 1908), so its
    // rejection rate must be α within Monte Carlo error (3 binomial SEs of 1000 studies).
    let text = r#"[study]
title = "2afc groups null"
seed = 23
experiments = 1000
[observer]
d_prime = 1.0
criterion = 0.0
[[design]]
name = "two-choice"
record = "two-choice"
presence = 0.5
trials = [40]
[animals]
counts = [12]
sd_d_prime = 0.2
sd_criterion = 0.3
[[hypothesis]]
name = "side bias"
kind = "bias"
"#;
    let plan = Plan::from_str(Path::new("null.toml"), text).unwrap();
    let report = vigil::groups::run_groups(&plan, &|_| {}).unwrap();
    let cell = &report.designs[0].cells[0];
    let t = &cell.summary.tests[0];
    assert!(t.effect.abs() < 1e-12);
    let se = (0.05f64 * 0.95 / 1000.0).sqrt();
    assert!(
        (t.two_stage.value - 0.05).abs() < 3.0 * se,
        "two-stage rejection rate {} at a true null",
        t.two_stage.value
    );
}
