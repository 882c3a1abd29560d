//! `vigil check` passing means `vigil run` starts: what `run` would refuse, `check` refuses
//! first, with the file, line, key, problem and what is allowed (exit 2 from both).

mod common;

use common::{plan_text, rejected, stderr, vigil};

/// `run` (through [`rejected`]) and `check` both refuse `text` at `line` and `key`, with
/// the same message; returns it.
fn refused_by_check_and_run(text: &str, line: usize, key: &str) -> String {
    let msg = rejected(text, line, key);
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), text).unwrap();
    let out = vigil(dir.path(), &["check", "bad.toml"]);
    assert_eq!(
        out.status.code(),
        Some(2),
        "check accepted: {}",
        stderr(&out)
    );
    assert_eq!(stderr(&out), msg, "check and run disagree");
    msg
}

fn line_of(text: &str, needle: &str) -> usize {
    text.lines()
        .position(|l| l.starts_with(needle))
        .unwrap_or_else(|| panic!("{needle} not in plan"))
        + 1
}

/// The base-rate plan without its hypothesis, so nothing else stands in the way.
fn shift_plan() -> String {
    let text = plan_text("base-rate-shift.toml");
    text[..text.find("[[hypothesis]]").unwrap()].to_string()
}

#[test]
fn condition_with_its_own_d_prime_while_d_prime_is_shared_by_default() {
    let text = shift_plan().replacen(
        "name = \"rare hawks\"\npresence = 0.2",
        "name = \"rare hawks\"\npresence = 0.2\nd_prime = 2",
        1,
    );
    let msg = refused_by_check_and_run(
        &text,
        line_of(&text, "d_prime = 2"),
        "design[1].condition[1].d_prime",
    );
    assert!(msg.contains("shares d′"), "{msg}");
    assert!(msg.contains("default"), "{msg}");
    assert!(msg.contains("shared = []"), "{msg}");
}

#[test]
fn shared_criterion_with_different_criteria() {
    let text = shift_plan().replacen(
        "name = \"yes/no\"\n",
        "name = \"yes/no\"\nshared = [\"d_prime\", \"criterion\"]\n",
        1,
    );
    let msg = refused_by_check_and_run(&text, line_of(&text, "shared = "), "design[1].shared");
    assert!(msg.contains("shares the criterion"), "{msg}");
    let text = text.replacen(
        "name = \"rare hawks\"\npresence = 0.2",
        "name = \"rare hawks\"\npresence = 0.2\ncriterion = 0.4",
        1,
    );
    refused_by_check_and_run(
        &text,
        line_of(&text, "criterion = 0.4"),
        "design[1].condition[1].criterion",
    );
}

#[test]
fn shared_base_rate_with_different_presence_rates() {
    let text = shift_plan().replacen(
        "census = 100\n",
        "census = 100\nshared = [\"d_prime\", \"base_rate\"]\n",
        1,
    );
    let msg = refused_by_check_and_run(&text, line_of(&text, "shared = "), "design[3].shared");
    assert!(msg.contains("shares the base rate"), "{msg}");
}

#[test]
fn optimal_criterion_whose_payoffs_give_an_infinite_c() {
    // Allowed payoffs (finite, ≥ 0, non-zero sums) whose sum overflows: ratio 0, c = −inf.
    let text = shift_plan()
        .replace("value_hit = 1 ", "value_hit = 1e308 ")
        .replace("cost_miss = 4 ", "cost_miss = 1e308 ");
    let msg = refused_by_check_and_run(
        &text,
        line_of(&text, "criterion = \"optimal\""),
        "observer.criterion",
    );
    assert!(msg.contains("-inf"), "{msg}");
    assert!(msg.contains("1e300"), "{msg}");
    // A d′ so small that ln β / d′ overflows.
    let text = shift_plan().replace("d_prime = 1.3", "d_prime = 1e-310");
    let msg = refused_by_check_and_run(
        &text,
        line_of(&text, "criterion = \"optimal\""),
        "observer.criterion",
    );
    assert!(msg.contains("1e-310"), "{msg}");
}

fn graded() -> String {
    plan_text("graded-alarm-response.toml")
}

#[test]
fn absent_shares_that_collapse_two_criteria() {
    let text = graded().replace("[0.45, 0.352, 0.148, 0.05]", "[0.45, 1e-17, 0.5, 0.05]");
    let msg = refused_by_check_and_run(
        &text,
        line_of(&text, "scale ="),
        "design[2].scale.absent_shares",
    );
    assert!(msg.contains("share 2 is 1e-17"), "{msg}");
}

#[test]
fn d_prime_so_large_that_the_criteria_collapse() {
    let text = graded().replacen("d_prime = 1.2", "d_prime = 1e17", 1);
    assert_ne!(text, graded(), "the plan's d′ changed");
    let msg = refused_by_check_and_run(
        &text,
        line_of(&text, "scale ="),
        "design[2].scale.absent_shares",
    );
    assert!(msg.contains("1e17"), "{msg}");
}
