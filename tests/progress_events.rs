//! The events the sample-size search sends: every round starts a phase and announces the
//! datasets it will simulate (so the bar can grow to hold them), and then simulates exactly
//! that many.

mod common;

use std::path::Path;
use std::sync::Mutex;
use vigil::phase::{Event, Phase};
use vigil::plan::Plan;
use vigil::search::search_plan;

#[test]
fn every_search_round_simulates_what_it_announced() {
    let text = common::plan_text("base-rate-shift.toml");
    let plan = Plan::from_str(Path::new("base-rate-shift.toml"), &text)
        .unwrap()
        .with_experiments(40)
        .unwrap();
    let events = Mutex::new(Vec::new());
    search_plan(&plan, &|e| events.lock().unwrap().push(e)).unwrap();
    let events = events.into_inner().unwrap();
    // Cut the stream at each phase start: [Start, Planned, Done...] per round.
    let mut rounds: Vec<(Phase, u64, u64)> = Vec::new();
    for e in events {
        match e {
            Event::Start(p) => rounds.push((p, 0, 0)),
            Event::Planned(n) => rounds.last_mut().expect("a phase first").1 += n,
            Event::Done(n) => rounds.last_mut().expect("a phase first").2 += n,
            Event::Skipped(_) => panic!("the search counts no upper bound"),
        }
    }
    assert!(!rounds.is_empty());
    for (phase, planned, done) in &rounds {
        assert!(matches!(phase, Phase::SearchRound { .. }), "{phase:?}");
        assert_eq!((*planned, *done), (40, 40), "{phase:?}");
    }
}
