//! The one "told apart" rule and the advice it gives, checked against the published
//! delta-method variances of the yes/no estimates, computed here with statrs (not the crate).
//!
//! Yes/no full record (Macmillan & Creelman 2005, *Detection Theory*, 2nd ed., ch. 13; Gourevitch
//! & Galanter 1967): Var z(H) = v_H = H(1−H)/(n_p·φ(z_H)²), Var z(F) = v_F likewise, so with
//! d = z_H − z_F and c = −(z_H + z_F)/2, r(d̂′, ĉ) = −(v_H − v_F)/(v_H + v_F). It depends on
//! the present:absent split and the rates, not on the trial count.

use statrs::distribution::{Continuous, ContinuousCDF, Normal};
use std::path::Path;
use vigil::analytic::advice::{
    Figures, Lever, Shortfall, Yardsticks, advise, shortfalls, with_presence,
};
use vigil::analytic::information::scenario_information;
use vigil::analytic::scale_fit::scale_fit;
use vigil::design::goals::Targets;

/// r(d̂′, ĉ) of the full yes/no record by the published formula (see the file comment).
fn r_formula(d: f64, c: f64, present: f64, absent: f64) -> f64 {
    let n = Normal::new(0.0, 1.0).unwrap();
    let (zh, zf) = (d / 2.0 - c, -d / 2.0 - c);
    let (h, f) = (n.cdf(zh), n.cdf(zf));
    let vh = h * (1.0 - h) / (present * n.pdf(zh).powi(2));
    let vf = f * (1.0 - f) / (absent * n.pdf(zf).powi(2));
    -(vh - vf) / (vh + vf)
}

fn plan(extra_targets: &str) -> vigil::Plan {
    // Invented: the sentinel plan's full record (d′ = 1.6, c = −0.3, 30% present).
    let text = format!(
        "[study]\ntitle = \"t (invented)\"\nseed = 1\nexperiments = 200\n{extra_targets}\
         [observer]\nd_prime = 1.6\ncriterion = -0.3\n\
         [[design]]\nname = \"full record\"\npresence = 0.3\ntrials = [50, 400]\n"
    );
    vigil::load_plan_text(Path::new("t.toml"), &text).unwrap()
}

#[test]
fn a_half_width_larger_than_the_effect_is_not_told_apart() {
    // The case the old reading called "told apart": ±1.74 on d′ = 1.0 with |r| = 0.06.
    let y = Yardsticks::of(&Targets::default());
    let f = Figures {
        d_prime: 1.0,
        half_width_d_prime: Some(1.74),
        half_width_criterion: Some(0.8),
        corr: Some(-0.06),
    };
    assert_eq!(
        shortfalls(&y, &f),
        vec![Shortfall::WiderThanEffect {
            half_width: 1.74,
            d_prime: 1.0
        }]
    );
    let narrow = Figures {
        half_width_d_prime: Some(0.4),
        ..f
    };
    assert!(shortfalls(&y, &narrow).is_empty());
}

#[test]
fn the_plans_own_targets_are_the_yardsticks() {
    let p = plan("[targets]\nmax_correlation = 0.2\nhalf_width = { criterion = 0.1 }\n");
    let y = Yardsticks::of(p.targets());
    assert!(y.abs_corr.from_plan && y.abs_corr.at_most == 0.2);
    assert!(y.c_half_width.from_plan && y.c_half_width.at_most == 0.1);
    let f = Figures {
        d_prime: 1.6,
        half_width_d_prime: Some(0.3),
        half_width_criterion: Some(0.15),
        corr: Some(-0.3),
    };
    // |r| = 0.3 passes the default 0.5 but not the plan's 0.2; c misses ±0.1.
    let s = shortfalls(&y, &f);
    assert_eq!(s.len(), 2, "{s:?}");
    assert!(shortfalls(&Yardsticks::of(&Targets::default()), &f).is_empty());
}

#[test]
fn full_yes_no_trade_off_is_fixed_by_presence_not_by_trials() {
    let p = plan("");
    let design = &p.designs()[0];
    // The expected information's r agrees with the formula (to 1e-9: both are exact
    // closed forms of the same variances; the difference is rounding).
    for n in [50u32, 400, 4000] {
        let info = scenario_information(&p, design, n).unwrap();
        let present = (0.3 * f64::from(n)).round();
        let expect = r_formula(1.6, -0.3, present, f64::from(n) - present);
        let r = info.corr_d_prime_criterion.unwrap();
        assert!((r - expect).abs() < 1e-9, "{n}: {r} vs {expect}");
    }
    // Same formula at 400 and 4000 trials: the count does not move r.
    assert!(
        (r_formula(1.6, -0.3, 120.0, 280.0) - r_formula(1.6, -0.3, 1200.0, 2800.0)).abs() < 1e-12
    );
    let info = scenario_information(&p, design, 400).unwrap();
    let seen = shortfalls(
        &Yardsticks::of(p.targets()),
        &Figures::asymptotic(&info, 0.95),
    );
    assert!(matches!(seen[..], [Shortfall::TradeOff { .. }]), "{seen:?}");
    let advice = advise(&p, design, 400, &seen).unwrap();
    assert!(
        matches!(advice.levers[0], Lever::TrialsLeaveCorrelation { .. }),
        "more trials must not be advised: {:?}",
        advice.levers
    );
    let Some(&Lever::Presence {
        presence, abs_corr, ..
    }) = advice
        .levers
        .iter()
        .find(|l| matches!(l, Lever::Presence { .. }))
    else {
        panic!("a presence rate lever: {:?}", advice.levers)
    };
    let present = (presence * 400.0).round();
    let expect = r_formula(1.6, -0.3, present, 400.0 - present).abs();
    assert!((abs_corr - expect).abs() < 1e-9, "{abs_corr} vs {expect}");
    assert!(abs_corr <= 0.5);
    // And the lever is judged on the changed design's own information.
    let moved = with_presence(design, presence);
    assert_eq!(moved.conditions[0].presence, presence);
}

#[test]
fn a_three_step_scale_with_sigma_free_is_flagged_saturated() {
    let text = "[study]\ntitle = \"t (invented)\"\nseed = 1\n[observer]\nd_prime = 1.0\n\
                criterion = 0.0\n[[design]]\nname = \"3-step\"\npresence = 0.5\ntrials = [10, 20]\n\
                scale = { categories = 3, boundary = 1, criteria = [0.0, 0.8] }\n";
    let p = vigil::load_plan_text(Path::new("t.toml"), text).unwrap();
    let f = scale_fit(&p, &p.designs()[0], &[10, 20])
        .unwrap()
        .expect("flagged");
    // d′, c, σ and one spacing against 2 rows × (3 − 1) free cells.
    let s = f.saturated.expect("saturated");
    assert_eq!((s.parameters, s.free_cells), (4, 4));
    assert!(f.flags(10) && f.flags(20));
    // The same scale with σ held at 1 has 3 parameters: not saturated, nothing flagged.
    let fixed = text.replace(
        "criteria = [0.0, 0.8] }",
        "criteria = [0.0, 0.8], fix_sigma = true }",
    );
    let p = vigil::load_plan_text(Path::new("t.toml"), &fixed).unwrap();
    assert!(scale_fit(&p, &p.designs()[0], &[10, 20]).unwrap().is_none());
}
