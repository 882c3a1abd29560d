//! Group runs end to end: the bundled example plan, every per-animal path, bit-identical
//! results for any thread count, and a progress count that ends exactly at its total.

mod common;

use std::path::Path;
use std::sync::atomic::{AtomicU64, Ordering};
use vigil::groups::{GroupError, run_groups, total_group_replicates};
use vigil::phase::Event;
use vigil::plan::Plan;
use vigil::report::groups_text::render;

fn example(experiments: u64) -> Plan {
    let text = common::plan_text("predator-model-colony.toml").replace(
        "experiments = 1000",
        &format!("experiments = {experiments}"),
    );
    Plan::from_str(Path::new("predator-model-colony.toml"), &text).unwrap()
}

#[test]
fn example_plan_answers_how_many_animals_and_trials() {
    let plan = example(200);
    let done = AtomicU64::new(0);
    let report = run_groups(&plan, &|e| {
        // The bar moves by finished and by skipped (upper bound not needed) units alike.
        if let Event::Done(k) | Event::Skipped(k) = e {
            done.fetch_add(k, Ordering::Relaxed);
        }
    })
    .unwrap();
    assert_eq!(done.load(Ordering::Relaxed), total_group_replicates(&plan));
    let d = &report.designs[0];
    // The cap of 60 trials collapses the listed 80 onto 60.
    assert_eq!(d.trials, vec![20, 40, 60]);
    assert!(d.capped);
    assert_eq!(d.cells.len(), 4 * 3);
    let e = d.effort.as_ref().expect("an effort split");
    let best = &e.budget_frontier[e.best_for_budget.unwrap()];
    assert!(best.cost <= 4800.0 && best.trials <= 60);
    let text = render(&plan, &report);
    for phrase in [
        "two-stage power",
        "pooled test's rejection rate",
        "with the budget of 4800:",
        "the least cost meeting power 0.8",
        "Reduction principle",
    ] {
        assert!(text.contains(phrase), "missing \"{phrase}\" in\n{text}");
    }
}

#[test]
fn results_do_not_depend_on_the_thread_count() {
    let plan = example(300);
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| serde_json::to_string(&run_groups(&plan, &|_| {}).unwrap()).unwrap())
    };
    assert_eq!(run(1), run(3));
}

// A rating design (the rating ML path, σ estimated) and a two-condition design (the general
// path) with shift, sensitivity and group-difference hypotheses: every test gets an answer.
#[test]
fn rating_and_multi_condition_designs_run() {
    let text = r#"
[study]
title = "paths (invented)"
seed = 3
experiments = 150

[observer]
d_prime = 1.2
criterion = 0.2
sigma = 1.25
lapse_rate = 0.03

[[design]]
name = "graded"
presence = 0.5
trials = [60]
scale = { categories = 4, boundary = 2, criteria = [-0.5, 0.2, 0.9] }

[[design]]
name = "two rates"
trials = [40]
shared = ["d_prime"]
[[design.condition]]
name = "rare"
presence = 0.25
criterion = 0.5
[[design.condition]]
name = "common"
presence = 0.6
criterion = 0.0

[animals]
counts = [6]
sd_criterion = 0.2
sd_d_prime = 0.2

[[hypothesis]]
name = "bias"
kind = "bias"

[[hypothesis]]
name = "uv"
kind = "unequal-variance"

[[hypothesis]]
name = "shift"
kind = "criterion-shift"
conditions = ["rare", "common"]

[[hypothesis]]
name = "populations"
kind = "group-difference"
shift = 0.4
"#;
    let plan = Plan::from_str(Path::new("paths.toml"), text).unwrap();
    let report = run_groups(&plan, &|_| {}).unwrap();
    let graded = &report.designs[0];
    let names: Vec<&str> = graded.tests.iter().map(|t| t.name.as_str()).collect();
    assert_eq!(names, ["bias", "uv", "populations"]);
    assert!(graded.notes.iter().any(|n| n.contains("\"shift\"")));
    let two = &report.designs[1];
    let names: Vec<&str> = two.tests.iter().map(|t| t.name.as_str()).collect();
    assert_eq!(names, ["bias", "shift", "populations"]);
    for d in [graded, two] {
        let s = &d.cells[0].summary;
        assert!(
            s.failed_studies.value < 0.05,
            "{}: {:?}",
            d.design,
            s.failed_studies
        );
        for t in &s.tests {
            assert!(
                t.two_stage_failed.value < 0.05 && t.pooled_failed.value < 0.05,
                "{} / {}: {:?} {:?}",
                d.design,
                t.name,
                t.two_stage_failed,
                t.pooled_failed
            );
        }
        // The population mean of c is estimated near its truth (lapses pull it towards 0).
        assert!((s.criterion.mean.value - d.truth_criterion).abs() < 0.15);
    }
    // The shift (0.5 − 0.0 in every animal) is found by the paired test most of the time.
    let shift = &two.cells[0].summary.tests[1];
    assert!(shift.two_stage.value > 0.5, "{:?}", shift.two_stage);
}

#[test]
fn plans_without_animals_are_refused() {
    let text = common::plan_text("playback-yes-no.toml");
    let plan = Plan::from_str(Path::new("p.toml"), &text).unwrap();
    assert_eq!(
        run_groups(&plan, &|_| {}).unwrap_err(),
        GroupError::NoAnimals
    );
    assert_eq!(total_group_replicates(&plan), 0);
}
