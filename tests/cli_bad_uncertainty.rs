//! Bad `[sensitivity]` and `[assurance]` tables: each refusal names the file, line and key,
//! says what is wrong and what is allowed, exits with 2 and leaves no file behind.

mod common;

use common::rejected;

/// A valid colony plan followed by `extra`; the line numbers below count from its end.
fn plan(extra: &str) -> (String, usize) {
    let base = common::plan_text("predator-model-colony.toml");
    let lines = base.lines().count();
    (format!("{base}\n{extra}"), lines + 1)
}

#[test]
fn an_unknown_assumption_is_refused_with_the_keys_allowed() {
    let (text, n) = plan("[sensitivity]\n\"observer.d_prim\" = [1, 2]\n");
    let msg = rejected(&text, n + 2, "sensitivity.observer.d_prim");
    assert!(msg.contains("observer.d_prime"), "{msg}");
}

#[test]
fn values_must_be_a_list_of_distinct_numbers_in_range() {
    for (entry, problem) in [
        ("\"observer.d_prime\" = 1.0", "not a list"),
        ("\"observer.d_prime\" = [1.0]", "1 values"),
        ("\"observer.d_prime\" = [1.0, 1.0]", "twice"),
        ("\"observer.d_prime\" = [1.0, \"x\"]", "not a number"),
        (
            "\"animals.sd_criterion\" = [-0.1, 0.2]",
            "outside the range",
        ),
    ] {
        let (text, n) = plan(&format!("[sensitivity]\n{entry}\n"));
        let key = entry.split(" =").next().unwrap().trim_matches('"');
        let msg = rejected(&text, n + 2, &format!("sensitivity.{key}"));
        assert!(msg.contains(problem), "{entry}: {msg}");
    }
}

#[test]
fn a_value_the_plan_format_refuses_is_refused_at_the_entry() {
    // sd_lapse_rate must stay below √(λ(1 − λ)) ≈ 0.196 at the colony's λ = 0.04.
    let (text, n) = plan("[sensitivity]\n\"animals.sd_lapse_rate\" = [0.0, 0.5]\n");
    let msg = rejected(&text, n + 2, "sensitivity.animals.sd_lapse_rate");
    assert!(msg.contains("= 0.5 the plan is refused"), "{msg}");
}

#[test]
fn a_distribution_must_give_an_sd_and_a_range_holding_the_plan_value() {
    for (entry, problem) in [
        ("\"observer.criterion\" = { low = -1 }", "no `sd`"),
        (
            "\"observer.criterion\" = { sd = -0.1 }",
            "not a finite number ≥ 0",
        ),
        (
            "\"observer.criterion\" = { sd = 0.1, low = 0 }",
            "does not hold",
        ),
        (
            "\"observer.criterion\" = { sd = 0.1, mean = 0 }",
            "`mean` is not a key",
        ),
        (
            "\"animals.sd_criterion\" = { sd = 0.1, low = -1 }",
            "goes outside",
        ),
    ] {
        let (text, n) = plan(&format!("[assurance]\n[assurance.uncertain]\n{entry}\n"));
        let key = entry.split(" =").next().unwrap().trim_matches('"');
        let msg = rejected(&text, n + 3, &format!("assurance.uncertain.{key}"));
        assert!(msg.contains(problem), "{entry}: {msg}");
    }
}

#[test]
fn draws_target_and_the_uncertain_table_are_checked() {
    let (text, n) = plan(
        "[assurance]\ndraws = 10\n[assurance.uncertain]\n\"observer.criterion\" = { sd = 0.1 }\n",
    );
    rejected(&text, n + 2, "assurance.draws");
    let (text, n) = plan(
        "[assurance]\ntarget = 1.5\n[assurance.uncertain]\n\"observer.criterion\" = { sd = 0.1 }\n",
    );
    rejected(&text, n + 2, "assurance.target");
    let (text, n) = plan("[assurance]\ndraws = 500\n");
    rejected(&text, n + 1, "assurance");
}

#[test]
fn a_range_needs_two_ends_and_a_step_count() {
    for (entry, problem) in [
        (
            "\"observer.d_prime\" = { from = 1.0, steps = 3 }",
            "no number `to`",
        ),
        (
            "\"observer.d_prime\" = { from = 1.0, to = 1.5, steps = 1 }",
            "`steps` must be",
        ),
        (
            "\"observer.d_prime\" = { from = 1.0, to = 1.0, steps = 3 }",
            "two different",
        ),
        (
            "\"observer.d_prime\" = { from = 1.0, to = 2.0, by = 3 }",
            "`by` is not a key",
        ),
    ] {
        let (text, n) = plan(&format!("[sensitivity]\n{entry}\n"));
        let msg = rejected(&text, n + 2, "sensitivity.observer.d_prime");
        assert!(msg.contains(problem), "{entry}: {msg}");
    }
}
