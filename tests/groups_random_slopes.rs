//! Random slopes between animals: the two-stage test of a criterion shift loses power as the
//! between-animal SD of the shift grows, and bad slope keys are refused with file, line and
//! key (exit 2).
//!
//! Why power must fall: the paired t statistic is the mean per-animal shift over its SE
//! √((s_u² + w)/N), with s_u the slope SD and w the within-animal sampling variance
//! (the summary-statistics approach for groups, common practice), so a larger s_u lowers the
//! noncentrality at a fixed true shift.

mod common;

use common::{stderr, vigil};
use std::path::Path;
use vigil::groups::run_groups;
use vigil::plan::Plan;

const EXPERIMENTS: u64 = 1500;

fn plan(slope_keys: &str) -> String {
    format!(
        r#"
[study]
title = "random slopes (invented)"
seed = 2718
experiments = {EXPERIMENTS}

[observer]
d_prime = 1.5
criterion = 0.2

[[design]]
name = "two rates"
trials = [40]
shared = ["d_prime"]
[[design.condition]]
name = "rare"
presence = 0.5
criterion = 0.4
[[design.condition]]
name = "common"
presence = 0.5
criterion = 0.0

[animals]
counts = [10]
sd_criterion = 0.3
{slope_keys}

[[hypothesis]]
name = "shift"
kind = "criterion-shift"
conditions = ["rare", "common"]
"#
    )
}

fn power(sd: f64) -> f64 {
    let text = plan(&format!(
        "sd_criterion_shift = {sd}\ncorrelation_criterion_shift = 0.3"
    ));
    let p = Plan::from_str(Path::new("slopes.toml"), &text).unwrap();
    let report = run_groups(&p, &|_| {}).unwrap();
    report.designs[0].cells[0].summary.tests[0].two_stage.value
}

// Monotone within MC error: each step may rise by at most 3 binomial MC SEs of the
// difference, √(2·0.25/R) (worst case p = ½), and over the whole range power must fall by
// far more than that (the shift of 0.4 against an SE near 0.09 at s_u = 0 is almost always
// found; at s_u = 0.8 the SE is near 0.26).
#[test]
fn two_stage_power_falls_as_the_slope_sd_grows() {
    let sds = [0.0, 0.2, 0.4, 0.8];
    let powers: Vec<f64> = sds.iter().map(|&s| power(s)).collect();
    eprintln!("two-stage power at slope SDs {sds:?}: {powers:?}");
    let step = 3.0 * (0.5 / EXPERIMENTS as f64).sqrt();
    for w in powers.windows(2) {
        assert!(w[1] <= w[0] + step, "{powers:?}");
    }
    assert!(powers[0] - powers[3] > 0.3, "{powers:?}");
}

fn refused(slope_keys: &str, key: &str) {
    let text = plan(slope_keys);
    let first = slope_keys.lines().next().unwrap();
    let line = text.lines().position(|l| l == first).unwrap() + 1;
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), &text).unwrap();
    let out = vigil(dir.path(), &["check", "bad.toml"]);
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{msg}");
    assert!(!msg.contains("panicked"), "{msg}");
    assert!(msg.contains(&format!("line {line}")), "line {line}: {msg}");
    assert!(msg.contains(key), "{key}: {msg}");
}

#[test]
fn bad_slope_keys_are_located() {
    refused("sd_criterion_shift = -0.2", "sd_criterion_shift");
    refused("sd_d_prime_change = -1.0", "sd_d_prime_change");
    refused(
        "correlation_criterion_shift = 1.0",
        "correlation_criterion_shift",
    );
    refused(
        "correlation_d_prime_change = -1.5",
        "correlation_d_prime_change",
    );
    refused("sd_ln_sigma = 2.5", "sd_ln_sigma");
    // No lapses in [observer]: a lapse rate cannot vary around 0.
    refused("sd_lapse_rate = 0.05", "sd_lapse_rate");
}

#[test]
fn the_lapse_sd_must_fit_a_beta_around_the_rate() {
    let text = plan("sd_lapse_rate = 0.2")
        .replace("criterion = 0.2\n", "criterion = 0.2\nlapse_rate = 0.04\n");
    let err = Plan::from_str(Path::new("lapse.toml"), &text).unwrap_err();
    let msg = err.to_string();
    assert!(
        msg.contains("sd_lapse_rate") && msg.contains("√(λ(1 − λ))"),
        "{msg}"
    );
    let ok = plan("sd_lapse_rate = 0.02")
        .replace("criterion = 0.2\n", "criterion = 0.2\nlapse_rate = 0.04\n");
    assert!(Plan::from_str(Path::new("lapse.toml"), &ok).is_ok());
}

#[test]
fn slopes_need_two_conditions() {
    let text = vigil_one_condition();
    let err = Plan::from_str(Path::new("one.toml"), &text).unwrap_err();
    assert!(err.to_string().contains("sd_criterion_shift"), "{err}");
}

fn vigil_one_condition() -> String {
    r#"
[study]
title = "one condition (invented)"
seed = 1
experiments = 10

[observer]
d_prime = 1.5
criterion = 0.2

[[design]]
name = "yes/no"
presence = 0.5
trials = [40]

[animals]
counts = [4]
sd_criterion_shift = 0.3
"#
    .into()
}

// The terminal header and the JSON carry the slope SDs the plan sets, so a reader sees
// which between-animal variation the power figure includes.
#[test]
fn the_slope_sds_are_reported() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("slopes.toml");
    let text = plan("sd_criterion_shift = 0.25\ncorrelation_criterion_shift = 0.3")
        .replace(&format!("experiments = {EXPERIMENTS}"), "experiments = 100");
    std::fs::write(&path, text).unwrap();
    let out = vigil(dir.path(), &["run", "slopes.toml"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let terminal = String::from_utf8_lossy(&out.stdout);
    assert!(
        terminal.contains("criterion shift between conditions 0.25 (correlation with its c +0.30)"),
        "{terminal}"
    );
    let json = vigil(dir.path(), &["run", "slopes.toml", "--json", "-"]);
    assert!(json.status.success(), "{}", stderr(&json));
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    let text = v.to_string();
    assert!(text.contains("\"sd_criterion_shift\":0.25"), "{text}");
}
