//! Bad group settings in a plan: a clear message naming file, line and key, and exit code 2
//! (`vigil check`, before any simulation). Each case edits the bundled example plan.

mod common;

use common::{plan_text, stderr, vigil};

fn rejected(from: &str, to: &str, key: &str) -> String {
    let text = plan_text("predator-model-colony.toml");
    assert!(text.contains(from), "example plan has no `{from}`");
    let text = text.replacen(from, to, 1);
    let line = text
        .lines()
        .position(|l| l.starts_with(to))
        .expect("edited line")
        + 1;
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), &text).unwrap();
    let out = vigil(dir.path(), &["check", "bad.toml"]);
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "exit code for: {msg}");
    assert!(!msg.contains("panicked"), "panic: {msg}");
    assert!(
        msg.contains(&format!("line {line}")),
        "line {line} not named: {msg}"
    );
    assert!(msg.contains(key), "key {key} not named: {msg}");
    msg
}

#[test]
fn the_example_plan_is_valid() {
    let dir = tempfile::tempdir().unwrap();
    let path =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/predator-model-colony.toml");
    let out = vigil(dir.path(), &["check", path.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
}

#[test]
fn negative_between_animal_sds() {
    rejected("sd_criterion = 0.35", "sd_criterion = -0.1", "sd_criterion");
    rejected("sd_d_prime = 0.3", "sd_d_prime = -0.3", "sd_d_prime");
}

#[test]
fn correlations_outside_the_open_interval() {
    for bad in ["1.0", "-1.0", "1.5"] {
        rejected(
            "correlation = -0.3",
            &format!("correlation = {bad}"),
            "correlation",
        );
    }
}

#[test]
fn lapse_rates_outside_zero_to_one() {
    for bad in ["1.0", "-0.1", "1.2"] {
        rejected(
            "lapse_rate = 0.04",
            &format!("lapse_rate = {bad}"),
            "lapse_rate",
        );
    }
}

#[test]
fn trial_cap_below_the_smallest_trial_count() {
    let msg = rejected("trial_cap = 60", "trial_cap = 10", "trial_cap");
    assert!(msg.contains("20"), "{msg}");
}

#[test]
fn budget_that_cannot_buy_one_animal() {
    // One vole at 20 trials costs 150 + 4·20 = 230.
    let msg = rejected("total = 4800", "total = 200", "total");
    assert!(msg.contains("230"), "{msg}");
}
