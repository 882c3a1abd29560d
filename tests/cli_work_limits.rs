//! Bounded runs (issue 11, defect 6): `--experiments` has a documented ceiling, and a run
//! whose work, timed on short pilots, exceeds the documented limit is refused before any
//! work with exit 2, saying what is allowed and which option overrides.

mod common;

use common::{stderr, stdout, vigil};

#[test]
fn experiments_beyond_the_ceiling_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let plan = common::example_plan();
    let out = vigil(
        dir.path(),
        &[
            "run",
            plan.to_str().unwrap(),
            "-q",
            "--experiments",
            "18446744073709551615",
        ],
    );
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{msg}");
    assert!(
        msg.contains("--experiments") && msg.contains("100000000"),
        "{msg}"
    );
}

/// A budget of 1e308 lets the effort split simulate rows of 100,000 animals; at 100,000
/// experiments that is hours on any machine (about 3 min per 1,000 experiments here).
#[test]
fn a_run_estimated_over_the_limit_is_refused_with_the_override() {
    let dir = tempfile::tempdir().unwrap();
    let text = common::plan_text("predator-model-colony.toml")
        .replace("total = 4800 ", "total = 1e308 ")
        .replace("experiments = 1000 ", "experiments = 100000 ");
    assert!(text.contains("1e308") && text.contains("100000 "));
    std::fs::write(dir.path().join("plan.toml"), text).unwrap();
    let start = std::time::Instant::now();
    let out = vigil(
        dir.path(),
        &["run", "plan.toml", "-q", "--json", "out.json"],
    );
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{msg}");
    assert!(
        msg.contains("the run would take about") && msg.contains("h "),
        "{msg}"
    );
    assert!(
        msg.contains("--allow-long-run") && msg.contains("--experiments"),
        "{msg}"
    );
    assert!(stdout(&out).is_empty());
    // Refused after a short pilot, with no output file left behind.
    assert!(
        start.elapsed().as_secs() < 60,
        "the pilot took {:?}",
        start.elapsed()
    );
    let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
    assert_eq!(left.len(), 1, "only the plan remains");
}
