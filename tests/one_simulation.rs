//! One simulation, any analysis: the counts of replicate r of a scenario depend only on
//! (seed, scenario, replicate) and the truth, so adding a hypothesis (which adds tests beside
//! the estimates) leaves every estimate summary and every dataset share bit-identical.

mod common;

use std::path::Path;
use vigil::evaluate::{RunOptions, run_plan};
use vigil::plan::Plan;

/// Summaries of a plan text at 400 experiments, without the tests.
fn estimates(text: &str) -> Vec<String> {
    let plan = Plan::from_str(Path::new("inline.toml"), text)
        .unwrap()
        .with_experiments(400)
        .unwrap();
    run_plan(&plan, RunOptions::default(), &|_| {})
        .unwrap()
        .iter()
        .map(|s| format!("{:?} {:?} {:?}", s.quantities, s.datasets, s.correlation))
        .collect()
}

fn with_hypothesis(text: &str, hypothesis: &str) -> String {
    // Hypothesis tables may go anywhere after the designs; append at the end.
    format!("{text}\n[[hypothesis]]\n{hypothesis}\n")
}

#[test]
fn a_bias_hypothesis_leaves_yes_no_estimates_unchanged() {
    let text = common::plan_text("playback-yes-no.toml");
    let plain = estimates(&text);
    let tested = estimates(&with_hypothesis(
        &text,
        "name = \"any bias\"\nkind = \"bias\"\nsided = \"two-sided\"",
    ));
    assert_eq!(plain.len(), tested.len());
    for (a, b) in plain.iter().zip(&tested) {
        assert_eq!(a, b);
    }
}

#[test]
fn an_unequal_variance_hypothesis_leaves_rating_estimates_unchanged() {
    let text = common::plan_text("graded-alarm-response.toml");
    let plain = estimates(&text);
    let tested = estimates(&with_hypothesis(
        &text,
        "name = \"sigma\"\nkind = \"unequal-variance\"\nsided = \"two-sided\"",
    ));
    assert_eq!(plain, tested);
}

#[test]
fn the_tests_do_run_when_a_hypothesis_is_added() {
    // Guards the two tests above against a hypothesis that silently applies to nothing.
    let text = with_hypothesis(
        &common::plan_text("playback-yes-no.toml"),
        "name = \"any bias\"\nkind = \"bias\"\nsided = \"two-sided\"",
    );
    let plan = Plan::from_str(Path::new("inline.toml"), &text)
        .unwrap()
        .with_experiments(50)
        .unwrap();
    let s = run_plan(&plan, RunOptions::default(), &|_| {}).unwrap();
    assert!(s.iter().all(|x| x.tests.len() == 1), "{:?}", s[0].tests);
}
