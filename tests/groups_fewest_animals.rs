//! The fewest animals meeting the targets: every row listed under "meeting the targets"
//! meets them, each row's animal count is the fewest at its trial count (one fewer falls
//! short on the same simulated studies), and the colony plan's answer holds on a fresh seed.
//!
//! The rule under test is the trial search's: a power target is met when the Monte Carlo
//! power itself (not an end of its Wilson interval) is at least the target. Checks made on
//! the studies the search itself simulated (same plan, same seed, common random numbers) are
//! exact: they recompute the very numbers the search judged, so no tolerance applies. The
//! fresh-seed checks allow Monte Carlo error, stated beside them.

mod common;

use std::path::Path;
use vigil::groups::grid::{DesignSetup, run_point};
use vigil::groups::hypotheses::group_tests;
use vigil::groups::{Population, run_groups};
use vigil::plan::Plan;
use vigil::report::groups_text::render;

const TARGET: f64 = 0.8;

fn colony(replace: &[(&str, &str)]) -> Plan {
    let mut text = common::plan_text("predator-model-colony.toml");
    for (from, to) in replace {
        assert!(text.contains(from), "the bundled plan has no {from:?}");
        text = text.replace(from, to);
    }
    Plan::from_str(Path::new("predator-model-colony.toml"), &text).unwrap()
}

fn setup(plan: &Plan) -> DesignSetup<'_> {
    let design = &plan.designs()[0];
    DesignSetup {
        plan,
        index: 0,
        design,
        tests: group_tests(plan, design).0,
        population: Population::from_animals(plan.animals().as_ref().unwrap()),
    }
}

/// Two-stage power of the plan's only hypothesis at (animals, trials) on `seed`.
fn power(plan: &Plan, animals: u32, trials: u32, studies: u64, seed: u64) -> f64 {
    let s = run_point(&setup(plan), animals, trials, studies, seed, &|_| {}).unwrap();
    s.tests[0].two_stage.value
}

// Without lapses the large-sample approximation is optimistic for this plan (the normal
// approximation to the noncentral t at 17–29 animals), so an approximate count can fall
// short in simulation: such a row must not appear in the table titled "meeting the targets".
// Before the search over animal counts, rows with power 0.791, 0.798 and 0.793 were listed.
#[test]
fn every_row_listed_as_meeting_the_targets_meets_them() {
    let plan = colony(&[
        ("lapse_rate = 0.04", "lapse_rate = 0.0"),
        ("seed = 20270315", "seed = 2"),
    ]);
    let report = run_groups(&plan, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().expect("an effort split");
    assert!(!e.target_frontier.is_empty());
    for row in &e.target_frontier {
        assert_eq!(
            row.meets_targets,
            Some(true),
            "{} × {}",
            row.animals,
            row.trials
        );
        assert!(
            row.power[0].value >= TARGET,
            "{} animals × {} trials listed with power {}",
            row.animals,
            row.trials,
            row.power[0].value
        );
    }
}

// The bundled plan once answered 19 animals × 60 trials while 17 and 18 meet the target.
// For every listed row, recompute N and N − 1 animals at its trial count on the plan's own
// seed and study count: N meets the target and N − 1 does not (exact: same streams).
#[test]
fn one_animal_fewer_misses_the_target_on_the_same_streams() {
    let plan = colony(&[]);
    let studies = plan.study().experiments;
    let seed = plan.study().seed;
    let report = run_groups(&plan, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().expect("an effort split");
    assert!(!e.target_frontier.is_empty());
    for row in &e.target_frontier {
        let at = power(&plan, row.animals, row.trials, studies, seed);
        assert_eq!(at, row.power[0].value, "the row's power is reproducible");
        assert!(at >= TARGET, "{} × {}: {at}", row.animals, row.trials);
        if row.animals > 2 {
            let fewer = power(&plan, row.animals - 1, row.trials, studies, seed);
            assert!(
                fewer < TARGET,
                "{} animals × {} trials meet the target ({fewer}), yet {} were reported as the fewest",
                row.animals - 1,
                row.trials,
                row.animals
            );
        }
    }
}

// The typed result says the same: each row carries the count one below it, which falls
// short, and the fewest-animals answer is the row with the fewest animals; the text states
// the rule it was judged by.
#[test]
fn the_fewest_animals_answer_names_its_rule_band_and_shortfall() {
    let plan = colony(&[]);
    let report = run_groups(&plan, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().expect("an effort split");
    let fewest = &e.target_frontier[e.fewest_animals.expect("a fewest-animals row")];
    assert!(
        e.target_frontier
            .iter()
            .all(|r| r.animals >= fewest.animals)
    );
    for row in &e.target_frontier {
        let below = row.one_fewer.as_ref().expect("a count one below");
        assert_eq!(below.animals, row.animals - 1);
        assert_eq!(below.meets_targets, Some(false));
        assert!(below.power[0].value < TARGET);
        assert!(row.band.is_some());
    }
    // More trials per animal never need more animals here (the cap row is the fewest).
    assert_eq!(fewest.trials, 60);
    let text = render(&plan, &report);
    for phrase in [
        "Fewest animals meeting the targets at each trial count (searched by simulation)",
        "A target counts as met when the simulated power itself (not an end of its interval) reaches it",
        "on the same simulated studies, and falls short",
        "← fewest animals",
        &format!(
            "Reading: the fewest animals meeting the same targets at any trial count simulated: {} ± {} animals × 60 trials each",
            fewest.animals,
            fewest.band.unwrap()
        ),
    ] {
        assert!(text.contains(phrase), "missing \"{phrase}\" in\n{text}");
    }
}

// A fresh seed with 4000 studies. The answer N was judged on 1000 studies, so its power
// estimate carries MC SE √(0.8·0.2/1000) = 0.0126 at the target, and the fresh estimate
// √(0.8·0.2/4000) = 0.0063; together 0.0141. Allowing 3 of these (0.042):
// - N animals still reach the target: a count chosen too small by several animals fails;
// - N − 1 − band animals (below the stated ± band) do not clear it by that margin: near the
//   answer power rises by 0.02–0.03 per animal (measured on this fresh seed: 0.746 at 15,
//   0.795 at 17, 0.850 at 20), so a count five or more animals too large fails here; smaller
//   excesses (19 where 17 met the target) are caught exactly by the same-streams test above.
#[test]
fn the_colony_answer_holds_on_a_fresh_seed() {
    let plan = colony(&[]);
    let report = run_groups(&plan, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().expect("an effort split");
    let row = &e.target_frontier[e.fewest_animals.expect("a fewest-animals row")];
    let band = row.band.expect("a band");
    let se = (TARGET * (1.0 - TARGET) * (1.0 / 1000.0 + 1.0 / 4000.0)).sqrt();
    let fresh = 990_017;
    let at = power(&plan, row.animals, row.trials, 4000, fresh);
    assert!(
        at >= TARGET - 3.0 * se,
        "{} animals: fresh power {at}",
        row.animals
    );
    let below = row.animals - 1 - band;
    let short = power(&plan, below, row.trials, 4000, fresh);
    assert!(
        short <= TARGET + 3.0 * se,
        "{below} animals: fresh power {short}"
    );
}
