//! Expected information of plan designs (`vigil::analytic`): outside checks of the asymptotic
//! SEs, the per-count block sizes of a scan, the census, the null direction and the profile
//! ranges of a design that cannot separate its parameters.

use vigil::analytic::information::{DesignInformation, information_grid, scenario_information};
use vigil::cells::cell_probabilities::{Order, cell_probabilities};
use vigil::cells::information::expected_information;
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::verdict::{RangeEnd, Verdict};
use vigil::design::model::condition_specs;
use vigil::model::normal;
use vigil::plan::Plan;
use vigil::report::identification_text::verdict_sentence;
use vigil::vocab::Quantity;

mod common;

/// A one-design plan (invented numbers) with extra design keys.
fn plan(d_prime: f64, criterion: f64, presence: f64, trials: u32, extra: &str) -> Plan {
    let text = format!(
        "[study]\ntitle = \"test (invented)\"\nseed = 1\n\n[observer]\nd_prime = {d_prime:?}\n\
         criterion = {criterion:?}\n\n[[design]]\nname = \"d\"\npresence = {presence:?}\n\
         trials = [{trials}]\n{extra}\n"
    );
    Plan::from_str(std::path::Path::new("test.toml"), &text).expect("valid test plan")
}

fn se(plan: &Plan, trials: u32, q: Quantity) -> f64 {
    scenario_information(plan, &plan.designs()[0], trials)
        .unwrap()
        .se(q)
        .unwrap()
}

/// Gourevitch & Galanter (1967) asymptotic variances of a full yes/no record, check
/// values computed with SciPy 1.17 (the formula itself from memory):
/// Var(d′) = H(1−H)/(N_S φ(z_H)²) + F(1−F)/(N_N φ(z_F)²), Var(c) = Var(d′)/4.
#[test]
fn full_record_matches_gourevitch_galanter() {
    for (h, f, presence, trials, var_d, var_c) in [
        (0.8, 0.2, 0.5, 100, 0.081655, 0.020414),
        (0.7, 0.1, 0.5, 200, 0.046592, 0.011648),
        (0.9, 0.3, 0.4, 100, 0.102005, 0.025501),
    ] {
        let (zh, zf) = (normal::z(h).unwrap(), normal::z(f).unwrap());
        let p = plan(zh - zf, -0.5 * (zh + zf), presence, trials, "");
        let info = scenario_information(&p, &p.designs()[0], trials).unwrap();
        assert_eq!(info.verdict, Verdict::Identified);
        let vd = info.se(Quantity::DPrime).unwrap().powi(2);
        let vc = info.se(Quantity::Criterion).unwrap().powi(2);
        assert!(
            (vd - var_d).abs() < 1e-6,
            "Var(d′) {vd} vs {var_d} at H={h} F={f}"
        );
        assert!(
            (vc - var_c).abs() < 1e-6,
            "Var(c) {vc} vs {var_c} at H={h} F={f}"
        );
        // Cov(d′, c) = −½[Var z_H − Var z_F] (same source), so r = −(V_H − V_F)/(V_H + V_F).
        let n_s = (presence * f64::from(trials)).round();
        let n_n = f64::from(trials) - n_s;
        let v_h = h * (1.0 - h) / (n_s * normal::pdf(zh).powi(2));
        let v_f = f * (1.0 - f) / (n_n * normal::pdf(zf).powi(2));
        let r = -(v_h - v_f) / (v_h + v_f);
        assert!((info.corr_d_prime_criterion.unwrap() - r).abs() < 1e-9);
    }
}

/// Golden values from SciPy/NumPy (tests/golden/error_totals_information.json, written by
/// tests/golden/generate.py; library versions in its "meta" block), reached through a plan:
/// error totals with a known base rate. 1e-6 relative: the golden Jacobian is a central
/// difference.
#[test]
fn known_base_rate_matches_golden_error_totals() {
    let num = |v: &serde_json::Value| v.as_f64().unwrap();
    let near = |a: f64, b: f64| (a - b).abs() <= 1e-6 * b.abs().max(1e-3);
    for case in &common::golden_cases("error_totals_information.json") {
        let n = case["N"].as_u64().unwrap() as u32;
        let extra = "record = \"error-totals\"\nbase_rate = \"known\"";
        let p = plan(
            num(&case["d_prime"]),
            num(&case["c"]),
            num(&case["pi"]),
            n,
            extra,
        );
        let info = scenario_information(&p, &p.designs()[0], n).unwrap();
        assert!(near(
            info.se(Quantity::DPrime).unwrap(),
            num(&case["se_d_prime"])
        ));
        assert!(near(
            info.se(Quantity::Criterion).unwrap(),
            num(&case["se_c"])
        ));
        assert!(near(
            info.corr_d_prime_criterion.unwrap(),
            num(&case["correlation"])
        ));
    }
}

#[test]
fn a_scan_reuses_block_information_with_sizes_recomputed_per_count() {
    let p = plan(1.6, -0.3, 0.3, 50, "");
    let design = &p.designs()[0];
    let d = DesignInformation::new(&p, design).unwrap();
    // 15 × 0.3 = 4.5 rounds up, 17 × 0.3 = 5.1 down: the split moves with rounding.
    for n in [15, 17, 50, 333, 1001] {
        let mut specs = condition_specs(design, p.observer(), n);
        specs.iter_mut().for_each(|s| s.lapse = None);
        let model = ObservationModel::new(specs).unwrap();
        let theta = model.hypothesised_theta();
        let direct = expected_information(&model, &theta, &model.block_sizes()).unwrap();
        let reused = d.matrix(n).unwrap();
        assert!((direct - reused).abs().max() < 1e-9, "count {n}");
    }
    let grid = information_grid(&p, design, &[15, 17]).unwrap();
    assert_eq!(grid[1], scenario_information(&p, design, 17).unwrap());
    assert!(
        d.matrix(3).is_ok(),
        "3 × 0.3 rounds to 1 present, 2 absent: valid"
    );
    assert!(d.matrix(1).is_err(), "one trial cannot be split");
}

#[test]
fn a_count_without_present_trials_is_an_error_not_a_panic() {
    let p = plan(1.6, -0.3, 0.1, 50, "");
    let err = scenario_information(&p, &p.designs()[0], 4).unwrap_err();
    assert!(err.to_string().contains("4 trials"), "{err}");
}

/// A census is the only source of information on π in an error-totals record (the record's two
/// free cell probabilities are spent on d′ and c), so SE(π̂) = √(π(1−π)/M) whatever the count —
/// the binomial SE of the census (derivation: the error block's null direction has a non-zero
/// π component). SE(d′) shrinks towards the known-base-rate value as the census grows.
#[test]
fn a_larger_census_sharpens_d_prime_towards_the_known_base_rate() {
    let known = plan(
        1.6,
        -0.3,
        0.3,
        400,
        "record = \"error-totals\"\nbase_rate = \"known\"",
    );
    let se_known = se(&known, 400, Quantity::DPrime);
    let mut last = f64::INFINITY;
    for m in [50, 200, 1000] {
        let extra = format!("record = \"error-totals\"\nbase_rate = \"census\"\ncensus = {m}");
        let p = plan(1.6, -0.3, 0.3, 400, &extra);
        let s = se(&p, 400, Quantity::DPrime);
        assert!(
            s < last && s > se_known,
            "census {m}: {s} (known {se_known})"
        );
        last = s;
        let binomial = (0.3 * 0.7 / f64::from(m)).sqrt();
        assert!((se(&p, 400, Quantity::BaseRate) - binomial).abs() < 1e-9);
    }
    assert!(last < 1.02 * se_known);
}

/// The sentinel example's unknown-base-rate design: moving θ along the reported combination
/// leaves every cell probability unchanged (to the 2 decimals printed), and the profile range of
/// d′ ends just beyond the top of the ridge of exactly equal likelihood, which is computed here
/// independently: on the ridge (1−π)F = f₀ and π(1−H) = m₀, so d′ = −z(f₀/(1−π)) − z(m₀/π).
#[test]
fn unknown_base_rate_names_its_null_direction_and_profiles_d_prime() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/plans/sentinel-error-records.toml"
    );
    let p = Plan::load(std::path::Path::new(path)).unwrap();
    let design = p
        .designs()
        .iter()
        .find(|d| d.name.contains("unknown"))
        .unwrap();
    let info = scenario_information(&p, design, 1600).unwrap();
    let Verdict::NotIdentified {
        deficiency,
        null_directions,
        confounded,
    } = &info.verdict
    else {
        panic!("{:?}", info.verdict)
    };
    assert_eq!(*deficiency, 1);
    assert_eq!(confounded, &["d′", "c", "the base rate"]);
    assert!(info.quantities.iter().all(|q| q.se.is_none()));
    assert!(
        verdict_sentence(&info.verdict, info.corr_d_prime_criterion)
            .starts_with("not identified: d′, c and the base rate")
    );
    // Parse "logit π − 0.35·c + 0.17·d′" into θ order (d′, c, logit π).
    // The first (largest) coefficient is 1 and printed bare.
    let mut v = [0.0; 3];
    let text = null_directions[0].replace(" − ", " + -");
    for term in text.split(" + ") {
        let (coef, name) = term.split_once('·').unwrap_or(("1", term));
        let i = ["d′", "c", "logit π"].iter().position(|n| *n == name);
        v[i.unwrap_or_else(|| panic!("unknown name in {text}"))] = coef.parse::<f64>().unwrap();
    }
    let mut specs = condition_specs(design, p.observer(), 1600);
    specs.iter_mut().for_each(|s| s.lapse = None);
    let model = ObservationModel::new(specs).unwrap();
    let blocks = cell_probabilities(&model, &model.hypothesised_theta(), Order::First).unwrap();
    let j = &blocks[0].jacobian;
    let moved: Vec<f64> = (0..j.nrows())
        .map(|r| (0..3).map(|k| j[(r, k)] * v[k]).sum())
        .collect();
    let scale = j.abs().max() * v.iter().map(|x| x.abs()).sum::<f64>();
    assert!(
        moved.iter().all(|m| m.abs() < 0.01 * scale),
        "J·v = {moved:?} for v = {v:?}"
    );

    // The ridge top, by a fine scan over π (f₀, m₀ at the truth d′ = 1.6, c = −0.3, π = 0.3).
    // F = Φ(−d′/2 − c) = Φ(−0.5), 1 − H = Φ(c − d′/2) = Φ(−1.1).
    let (f0, m0) = (0.7 * normal::cdf(-0.5), 0.3 * normal::cdf(-1.1));
    let ridge_top = (1..10_000)
        .map(|i| f64::from(i) / 10_000.0)
        .filter(|&pi| f0 / (1.0 - pi) < 1.0 && m0 / pi < 1.0)
        .map(|pi| -normal::z(f0 / (1.0 - pi)).unwrap() - normal::z(m0 / pi).unwrap())
        .fold(f64::NEG_INFINITY, f64::max);
    let upper = |n: u32| {
        let info = scenario_information(&p, design, n).unwrap();
        let d = &info.profile.as_ref().unwrap()[0];
        assert_eq!(d.parameter, "d′");
        // Plans require d′ ≥ 0, so the range runs down to 0, never to the search window's
        // negative edge (it said "down to −8.40" before).
        assert_eq!(d.lower, RangeEnd::Floor { value: 0.0 }, "{d:?}");
        match d.upper {
            RangeEnd::At { value } => value,
            other => panic!("d′ should be bounded above: {other:?}"),
        }
    };
    let (small, large) = (upper(1600), upper(10_000_000));
    assert!(
        small > large && large >= ridge_top - 1e-3,
        "{small} {large} {ridge_top}"
    );
    assert!(large - ridge_top < 0.01, "{large} vs ridge top {ridge_top}");
}

#[test]
fn a_tiny_census_at_huge_counts_is_weak_with_its_figures() {
    let extra = "record = \"error-totals\"\nbase_rate = \"census\"\ncensus = 2";
    let p = plan(1.6, -0.3, 0.3, 100, extra);
    let info = scenario_information(&p, &p.designs()[0], 10_000_000).unwrap();
    let Verdict::Weak { max_abs_corr, .. } = info.verdict else {
        panic!("{:?}", info.verdict)
    };
    assert!(max_abs_corr > 0.95);
    let text = verdict_sentence(&info.verdict, info.corr_d_prime_criterion);
    assert!(
        text.starts_with("weakly identified: condition number") && text.contains("|r(d′, c)|"),
        "{text}"
    );
    assert!(info.se(Quantity::DPrime).is_some());
}
