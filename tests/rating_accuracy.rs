//! Rating designs end to end: parameter recovery and interval coverage at large trial
//! counts (thresholds in Monte Carlo SEs), and the K = 2 fit against the closed-form
//! yes/no fit (Macmillan & Creelman 2005: with two categories and σ = 1 the rating model
//! is the yes/no model).

use std::path::Path;
use vigil::evaluate::{RunOptions, run_plan};
use vigil::fit::rating::{RatingFitOptions, RatingTable, apply_correction, fit, measures};
use vigil::fit::{fit_yes_no, z_variance};
use vigil::plan::Plan;
use vigil::vocab::Quantity;
use vigil::vocab::RateCorrection;

fn rating_plan(trials: u32, experiments: u64, fix_sigma: bool) -> Plan {
    let text = format!(
        "[study]\ntitle = \"t\"\nseed = 31\nexperiments = {experiments}\n\
         [observer]\nd_prime = 1.4\ncriterion = 0.2\nsigma = {}\n\
         [[design]]\nname = \"r\"\npresence = 0.5\ntrials = [{trials}]\n\
         scale = {{ categories = 5, boundary = 2, criteria = [-0.6, 0.2, 0.9, 1.6], fix_sigma = {fix_sigma} }}\n",
        if fix_sigma { 1.0 } else { 1.3 }
    );
    Plan::from_str(Path::new("t.toml"), &text).unwrap()
}

#[test]
fn recovers_parameters_and_covers_at_large_counts() {
    let plan = rating_plan(3000, 4000, false);
    let s = &run_plan(&plan, RunOptions::default(), &|_| {}).unwrap()[0];
    assert!(s.datasets.not_converged.value == 0.0 && s.datasets.degenerate.value == 0.0);
    for q in [
        Quantity::DPrime,
        Quantity::Criterion,
        Quantity::Sigma,
        Quantity::Slope,
        Quantity::DA,
        Quantity::Az,
    ] {
        let x = s.quantity(q).unwrap();
        // Bias within 5 MC SEs plus 0.5% of the truth (the O(1/n) bias of ML).
        let tol = 5.0 * x.mean.mc_se + 0.005 * x.truth.abs();
        assert!(
            x.bias.value.abs() < tol,
            "{q:?}: bias {} (tol {tol})",
            x.bias.value
        );
        // The mean SE from the observed information matches the MC SD within 5 MC SEs + 2%.
        let tol_se = 5.0 * x.sd.mc_se + 0.02 * x.sd.value;
        assert!(
            (x.mean_se.value - x.sd.value).abs() < tol_se,
            "{q:?}: SE {} vs SD {}",
            x.mean_se.value,
            x.sd.value
        );
        // Nominal 95% within the Wilson interval of the coverage, widened by 1 point.
        assert!(
            x.coverage.low - 0.01 <= 0.95 && 0.95 <= x.coverage.high + 0.01,
            "{q:?}: {:?}",
            x.coverage
        );
    }
}

#[test]
fn two_category_rating_fit_equals_closed_form() {
    let options = RatingFitOptions {
        fix_sigma: true,
        ..RatingFitOptions::default()
    };
    for rule in [
        RateCorrection::LogLinear,
        RateCorrection::HalfN,
        RateCorrection::None,
    ] {
        for (ns, nn) in [(10u32, 10u32), (7, 23), (40, 25)] {
            for h in 0..=ns {
                for f in (0..=nn).step_by(3) {
                    let raw = RatingTable::new(
                        &[f64::from(nn - f), f64::from(f)],
                        &[f64::from(ns - h), f64::from(h)],
                    )
                    .unwrap();
                    let closed = fit_yes_no(h, ns, f, nn, rule);
                    let Ok(table) = apply_correction(&raw, rule) else {
                        assert!(closed.is_none());
                        continue;
                    };
                    let ml = fit(&table, &options)
                        .ok()
                        .and_then(|fit| measures(&fit, 1).ok());
                    match (closed, ml) {
                        (Some(c), Some(m)) => {
                            assert!(
                                (c.measures.d_prime - m.d_prime.value).abs() < 1e-7,
                                "{rule:?} {h}/{ns} {f}/{nn}"
                            );
                            assert!(
                                (c.measures.criterion - m.c.value).abs() < 1e-7,
                                "{rule:?} {h}/{ns} {f}/{nn}"
                            );
                            // The log-linear table holds n + 1 trials per row, so its observed-
                            // information variances are the Gourevitch & Galanter ones (which use
                            // the actual n) times n/(n + 1), row by row.
                            let vh = z_variance(rule.rate(h, ns).unwrap(), f64::from(ns)).unwrap();
                            let vf = z_variance(rule.rate(f, nn).unwrap(), f64::from(nn)).unwrap();
                            let (sh, sf) = match rule {
                                RateCorrection::LogLinear => (
                                    f64::from(ns) / f64::from(ns + 1),
                                    f64::from(nn) / f64::from(nn + 1),
                                ),
                                _ => (1.0, 1.0),
                            };
                            let se_d = (vh * sh + vf * sf).sqrt();
                            assert!(
                                (se_d - m.d_prime.se).abs() < 1e-6,
                                "{rule:?} {h}/{ns} {f}/{nn}"
                            );
                            assert!(
                                (se_d / 2.0 - m.c.se).abs() < 1e-6,
                                "{rule:?} {h}/{ns} {f}/{nn}"
                            );
                        }
                        (None, None) => {}
                        (c, m) => panic!("{rule:?} {h}/{ns} {f}/{nn}: closed {c:?} vs ML {m:?}"),
                    }
                }
            }
        }
    }
}
