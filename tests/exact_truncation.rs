//! Truncated enumeration (`analytic::exact`): leaving out the outcomes below 1e-18 of the
//! most probable changes no reported figure by more than 1e-12 against the full
//! enumeration (Miller 1996: the exact distribution is the weighted sum over all outcomes),
//! the mass it leaves out is within its stated bound, and counts far beyond the old cap of
//! 4 million outcomes run.

mod common;

use std::path::Path;
use vigil::analytic::exact::{RELATIVE_CUTOFF, enumerate_with};
use vigil::engine::summary::{Method, summarise};
use vigil::evaluate::scenario_kernel;
use vigil::plan::Plan;

fn plan(trials: &str, d: f64, c: f64) -> Plan {
    let text = format!(
        "[study]\ntitle = \"t\"\nseed = 1\n[observer]\nd_prime = {d}\ncriterion = {c}\n[[design]]\nname = \"y\"\npresence = 0.5\ntrials = [{trials}]\n"
    );
    Plan::from_str(Path::new("t.toml"), &text).unwrap()
}

#[test]
fn truncated_and_full_enumeration_agree_to_1e_12() {
    for (trials, d, c) in [("40", 1.5, 0.3), ("80, 400", 1.0, -0.2), ("600", 2.5, 0.6)] {
        let p = plan(trials, d, c);
        for s in p.scenarios() {
            let k = scenario_kernel(&p, &s).unwrap();
            let cut = enumerate_with(&k, RELATIVE_CUTOFF).unwrap();
            let full = enumerate_with(&k, 0.0).unwrap();
            assert!(cut.kept < full.kept, "nothing was left out at {}", s.trials);
            assert_eq!(full.neglected_bound, 0.0);
            // The mass left out, summed outcome by outcome, is within the bound.
            let ph = k.sampler().binomial_table(0).unwrap().pmf();
            let pf = k.sampler().binomial_table(1).unwrap().pmf();
            let top =
                ph.iter().copied().fold(0.0, f64::max) * pf.iter().copied().fold(0.0, f64::max);
            let lost: f64 = ph
                .iter()
                .flat_map(|wh| pf.iter().map(move |wf| wh * wf))
                .filter(|&w| w < RELATIVE_CUTOFF * top)
                .sum();
            assert!(
                lost > 0.0 && lost <= cut.neglected_bound,
                "{lost} > {}",
                cut.neglected_bound
            );
            let a = summarise(s.clone(), "y", &cut.tally, Method::Exact);
            let b = summarise(s.clone(), "y", &full.tally, Method::Exact);
            for (x, y) in a.quantities.iter().zip(&b.quantities) {
                for (u, v) in [
                    (x.mean.value, y.mean.value),
                    (x.sd.value, y.sd.value),
                    (x.mean_se.value, y.mean_se.value),
                    (x.coverage.value, y.coverage.value),
                    (x.mean_width.value, y.mean_width.value),
                ] {
                    assert!(
                        (u - v).abs() < 1e-12,
                        "{} at {}: {u} vs {v}",
                        x.label(),
                        s.trials
                    );
                }
            }
        }
    }
}

#[test]
fn ten_thousand_trials_each_are_enumerated() {
    let p = plan("20000", 1.0, 0.2);
    let s = &p.scenarios()[0];
    let k = scenario_kernel(&p, s).unwrap();
    let e = enumerate_with(&k, RELATIVE_CUTOFF).unwrap();
    assert_eq!(e.outcomes, 10_001 * 10_001);
    assert!(e.kept < 1_000_000, "kept {}", e.kept);
    assert!(e.neglected_bound < 1e-13, "{}", e.neglected_bound);
    // Through the command: accepted (the old cap refused 10⁸ outcomes) and exact.
    let dir = tempfile::tempdir().unwrap();
    let text = String::new()
        + "[study]\ntitle = \"t\"\nseed = 1\n[observer]\nd_prime = 1.0\ncriterion = 0.2\n[[design]]\nname = \"y\"\npresence = 0.5\ntrials = [20000]\n";
    std::fs::write(dir.path().join("p.toml"), text).unwrap();
    let out = common::vigil(dir.path(), &["run", "p.toml", "--exact", "--quiet"]);
    assert!(out.status.success(), "{}", common::stderr(&out));
    assert!(common::stdout(&out).contains("exact enumeration of the outcomes"));
}
