//! A rating scale describes the plan's animal: its boundary criterion is the observer's
//! criterion (0 under `criterion = "optimal"`, where each condition moves the scale to its
//! own ideal criterion). A mismatch is a located error naming both lines; agreement within
//! 0.005 places the scale exactly; and the side-by-side comparison never pairs designs
//! that simulate different animals (docs/plan-format.md, "Rating scales").

mod common;

use common::{plan_text, rejected, stderr, stdout, vigil};
use std::path::Path;
use vigil::design::Response;
use vigil::plan::Plan;

fn line_of(text: &str, needle: &str) -> usize {
    text.lines()
        .position(|l| l.starts_with(needle))
        .unwrap_or_else(|| panic!("{needle} not in plan"))
        + 1
}

/// A yes/no and a 3-step design of an animal with c = 0.2, the scale given as `scale`.
fn two_designs(scale: &str) -> String {
    format!(
        "[study]\ntitle = \"t\"\nseed = 1\nexperiments = 100\n\n\
         [observer]\nd_prime = 1.2\ncriterion = 0.2\n\n\
         [[design]]\nname = \"yes/no\"\npresence = 0.5\ntrials = [40]\n\n\
         [[design]]\nname = \"graded\"\npresence = 0.5\ntrials = [40]\n\
         scale = {{ categories = 3, boundary = 2, {scale} }}\n"
    )
}

/// `check` refuses too (exit 2, the same message as `run`).
fn check_refuses(text: &str, msg: &str) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), text).unwrap();
    let out = vigil(dir.path(), &["check", "bad.toml"]);
    assert_eq!(
        out.status.code(),
        Some(2),
        "check accepted: {}",
        stdout(&out)
    );
    assert_eq!(stderr(&out), msg, "check and run disagree");
}

#[test]
fn given_criteria_whose_boundary_is_not_the_observers_criterion_are_refused() {
    // The case of issue 10, item 3: c = 0.2, boundary criterion 0.9.
    let text = two_designs("criteria = [-0.5, 0.9]");
    let msg = rejected(&text, line_of(&text, "scale ="), "design[2].scale.criteria");
    check_refuses(&text, &msg);
    // Both lines named: the scale's (above) and the observer's criterion.
    let observer_line = line_of(&text, "criterion = 0.2");
    assert!(
        msg.contains(&format!("line {observer_line}, key `observer.criterion`")),
        "{msg}"
    );
    assert!(msg.contains("c = 0.9") && msg.contains("c = 0.2"), "{msg}");
    // What is allowed: the same spacing at the observer's criterion, or the other fix.
    assert!(msg.contains("criteria = [-1.2, 0.2]"), "{msg}");
    assert!(msg.contains("observer.criterion = 0.9"), "{msg}");
}

#[test]
fn absent_shares_whose_boundary_misses_the_observers_criterion_are_refused() {
    // 0.3 + 0.5 = 0.8 of absent trials below criterion 2: z(0.8) − 0.6 = 0.24162 (Python
    // 3.11 statistics.NormalDist), shown to four decimals.
    let text = two_designs("absent_shares = [0.3, 0.5, 0.2]");
    let msg = rejected(
        &text,
        line_of(&text, "scale ="),
        "design[2].scale.absent_shares",
    );
    check_refuses(&text, &msg);
    assert!(msg.contains("c = 0.2416"), "{msg}");
    // Φ(0.2 + 0.6) = 0.788145 (Python 3.11 statistics.NormalDist.cdf), shown to four decimals.
    assert!(msg.contains("= 0.7881"), "{msg}");
}

#[test]
fn under_the_optimal_rule_the_scale_is_written_for_an_unbiased_animal() {
    let text = plan_text("base-rate-shift.toml")
        .replace("criteria = [-0.8, 0.0, 0.8]", "criteria = [-0.3, 0.5, 1.3]");
    let msg = rejected(&text, line_of(&text, "scale ="), "design[2].scale.criteria");
    let observer_line = line_of(&text, "criterion = \"optimal\"");
    assert!(
        msg.contains(&format!("line {observer_line}, key `observer.criterion`")),
        "{msg}"
    );
    assert!(msg.contains("criteria = [-0.8, 0, 0.8]"), "{msg}");
}

#[test]
fn a_gap_within_the_tolerance_is_closed_exactly() {
    // The bundled graded plan's shares put criterion 2 at z(0.802) − 0.6 = 0.2488, 0.0012
    // from the observer's c = 0.25 (shares given to three decimals): both designs then
    // simulate c = 0.25 exactly, and the scale keeps its spacing.
    let plan = Plan::from_str(
        Path::new("graded.toml"),
        &plan_text("graded-alarm-response.toml"),
    )
    .unwrap();
    let graded = &plan.designs()[1];
    let Response::Rating(scale) = &graded.response else {
        panic!("design 2 is the graded one");
    };
    assert_eq!(scale.criteria[scale.boundary - 1], 0.25);
    assert_eq!(graded.conditions[0].criterion, 0.25);
    assert_eq!(plan.designs()[0].conditions[0].criterion, 0.25);
    // Spacing from the shares: z(0.45) − z(0.802) = −0.974448032771 (Python 3.11
    // statistics.NormalDist.inv_cdf; 1e-9 allows for the crate's z, accurate to ~1e-15).
    assert!((scale.criteria[0] - scale.criteria[1] + 0.974448032771).abs() < 1e-9);
}

#[test]
fn no_side_by_side_of_two_different_animals() {
    // The yes/no design's one condition sets its own criterion: it is another animal than
    // the graded design's, so the two are not compared.
    let text = two_designs("criteria = [-0.5, 0.2]").replace(
        "name = \"yes/no\"\npresence = 0.5\ntrials = [40]\n",
        "name = \"yes/no\"\ntrials = [40]\n[[design.condition]]\nname = \"bold\"\npresence = 0.5\ncriterion = 0.9\n",
    );
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), &text).unwrap();
    let out = vigil(dir.path(), &["run", "plan.toml", "--quiet"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(!stdout(&out).contains("Side by side"), "{}", stdout(&out));
    // The same plan with one animal is compared.
    let same = two_designs("criteria = [-0.5, 0.2]");
    std::fs::write(dir.path().join("same.toml"), &same).unwrap();
    let out = vigil(dir.path(), &["run", "same.toml", "--quiet"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(stdout(&out).contains("Side by side"), "{}", stdout(&out));
}
