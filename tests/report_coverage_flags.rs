//! Every interval whose simulated coverage misses the confidence level, either way, is
//! flagged in the report, naming the quantity and where; two-stage false-positive rates
//! away from α are flagged too. The rule (a Wilson 95% interval, Wilson 1927, excluding the
//! nominal level) is applied here to the typed results independently of the report, and each
//! flag the report prints is checked to be one the rule calls for.

mod common;

use std::path::Path;
use vigil::engine::Share;
use vigil::evaluate::{RunOptions, run_plan};
use vigil::groups::run_groups;
use vigil::plan::Plan;
use vigil::report::{groups_text, terminal};

fn plan(name: &str, experiments: u64) -> Plan {
    Plan::from_str(Path::new(name), &common::plan_text(name))
        .unwrap()
        .with_experiments(experiments)
        .unwrap()
}

/// Wilson interval excludes the level: below (true) or above (false).
fn misses(s: &Share, level: f64) -> Option<bool> {
    if s.high < level {
        Some(true)
    } else if s.low > level {
        Some(false)
    } else {
        None
    }
}

fn note_lines(text: &str) -> Vec<&str> {
    text.lines().filter(|l| l.starts_with("Note:")).collect()
}

fn check_run_flags(name: &str) -> usize {
    let p = plan(name, 300);
    let summaries = run_plan(&p, RunOptions::default(), &|_| {}).unwrap();
    let advice = vigil::analytic::advice::RunAdvice::of(&p, &summaries);
    // Whole note lines: the unwrapped layout (wrapping is tested in tests/terminal_width.rs).
    vigil::report::layout::set_layout(vigil::report::layout::Layout::Wide);
    let text = terminal::render_run(&p, &summaries, &[], None, &advice, None);
    let level = p.study().confidence;
    let notes = note_lines(&text);
    let mut flagged = 0;
    for s in &summaries {
        for q in &s.quantities {
            let Some(below) = misses(&q.coverage, level) else {
                continue;
            };
            flagged += 1;
            let how = if below { "less often" } else { "more often" };
            let head = format!(
                "Note: the 95% intervals of {} hold the true value {how}",
                q.label()
            );
            let at = format!(
                "{} trials ({:.1}%",
                s.scenario.trials,
                100.0 * q.coverage.value
            );
            assert!(
                notes.iter().any(|l| l.starts_with(&head)
                    && (l.contains(&at) || l.contains("more trial counts"))),
                "{name}: {} at {} trials covers {:?}, not flagged:\n{text}",
                q.label(),
                s.scenario.trials,
                q.coverage
            );
        }
    }
    // Every coverage note names a place the rule flags (no flag without a miss).
    let coverage_notes = notes
        .iter()
        .filter(|l| l.contains("hold the true value"))
        .count();
    assert!(coverage_notes <= flagged, "{name}: more notes than misses");
    flagged
}

#[test]
fn run_flags_every_coverage_miss_both_ways() {
    // At 300 experiments these plans hold over-coverage (c at 20–30 trials) and
    // under-coverage (σ of the graded scale at 30 trials); the old report named neither
    // the direction above nor the quantity.
    let total: usize = ["graded-alarm-response.toml", "playback-yes-no.toml"]
        .iter()
        .map(|n| check_run_flags(n))
        .sum();
    assert!(total >= 2, "the plans must exercise the flags: {total}");
}

#[test]
fn group_report_flags_two_stage_and_pooled_coverage_and_low_false_positives() {
    let p = plan("predator-model-colony.toml", 300);
    let report = run_groups(&p, &|_| {}).unwrap();
    let text = groups_text::render(&p, &report);
    let notes = note_lines(&text);
    let level = report.confidence;
    let d = &report.designs[0];
    let mut seen = 0;
    for c in &d.cells {
        for (route, what, share) in [
            ("two-stage", "c", &c.summary.criterion.coverage),
            ("two-stage", "d′", &c.summary.d_prime.coverage),
            ("pooled", "c", &c.summary.pooled_criterion.coverage),
            ("pooled", "d′", &c.summary.pooled_d_prime.coverage),
        ] {
            if let Some(below) = misses(share, level) {
                seen += 1;
                let how = if below { "less often" } else { "more often" };
                let head = format!(
                    "Note: the {route} 95% interval of the group mean {what} holds the population mean {how}"
                );
                assert!(
                    notes.iter().any(|l| l.starts_with(&head)),
                    "{route} {what} at {} × {} covers {share:?}, not flagged:\n{text}",
                    c.animals,
                    c.trials_per_animal
                );
            }
        }
        for (i, t) in c.summary.tests.iter().enumerate() {
            if t.two_stage_false.high < report.alpha {
                seen += 1;
                let head = format!(
                    "Note: the two-stage test of \"{}\" rejects the population's true value in fewer than α",
                    d.tests[i].name
                );
                assert!(
                    notes
                        .iter()
                        .any(|l| l.starts_with(&head) && l.contains("not a safety margin")),
                    "false positives {:?} at {} × {} not flagged:\n{text}",
                    t.two_stage_false,
                    c.animals,
                    c.trials_per_animal
                );
            }
        }
    }
    assert!(seen >= 3, "the plan must exercise the group flags: {seen}");
}
