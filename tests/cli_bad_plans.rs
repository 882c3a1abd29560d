//! Every kind of bad plan: exit code 2, one message naming file, line and key, no panic,
//! and no output file written.

mod common;

use common::{plan_text, rejected, stderr, vigil};

fn example() -> String {
    plan_text("playback-yes-no.toml")
}

fn line_of(text: &str, needle: &str) -> usize {
    text.lines()
        .position(|l| l.starts_with(needle))
        .expect("needle in plan")
        + 1
}

fn replace_first(text: &str, from: &str, to: &str) -> String {
    text.replacen(from, to, 1)
}

#[test]
fn unknown_key_suggests_the_nearest() {
    let text = replace_first(&example(), "trials = [20", "trails = [20");
    let msg = rejected(&text, line_of(&text, "trails"), "design[1].trails");
    assert!(msg.contains("did you mean `trials`"), "{msg}");
}

#[test]
fn unknown_table_suggests_the_nearest() {
    let text = example().replace("[observer]", "[obsrver]");
    let msg = rejected(&text, line_of(&text, "[obsrver]"), "obsrver");
    assert!(msg.contains("did you mean `observer`"), "{msg}");
}

#[test]
fn missing_key_names_its_table() {
    let text = example().replace("seed = 20261201\n", "");
    let msg = rejected(&text, line_of(&text, "[study]"), "study.seed");
    assert!(msg.contains("missing"), "{msg}");
}

#[test]
fn wrong_type_says_what_was_found() {
    let text = example().replace("experiments = 2000", "experiments = \"many\"");
    let msg = rejected(&text, line_of(&text, "experiments"), "study.experiments");
    assert!(msg.contains("whole number"), "{msg}");
}

#[test]
fn presence_outside_unit_interval() {
    let text = replace_first(&example(), "presence = 0.3", "presence = 1.3");
    rejected(
        &text,
        line_of(&text, "presence = 1.3"),
        "design[1].presence",
    );
}

#[test]
fn split_without_present_trials() {
    // 10% of 4 trials is 0.4, which rounds to 0 present trials.
    let text = replace_first(&example(), "presence = 0.3", "presence = 0.1");
    let text = replace_first(&text, "trials = [20, 40, 80, 160]", "trials = [4, 40]");
    let msg = rejected(&text, line_of(&text, "trials = [4"), "design[1].trials");
    assert!(msg.contains("0 present"), "{msg}");
}

#[test]
fn non_positive_experiments() {
    let text = example().replace("experiments = 2000", "experiments = 0");
    rejected(&text, line_of(&text, "experiments"), "study.experiments");
}

#[test]
fn confidence_outside_unit_interval() {
    let text = example().replace("confidence = 0.95", "confidence = 95");
    rejected(&text, line_of(&text, "confidence"), "study.confidence");
}

#[test]
fn negative_d_prime() {
    let text = example().replace("d_prime = 1.5", "d_prime = -0.5");
    rejected(&text, line_of(&text, "d_prime"), "observer.d_prime");
}

#[test]
fn unknown_correction_lists_the_choices() {
    let text = example().replace(
        "rate_correction = \"log-linear\"",
        "rate_correction = \"loglin\"",
    );
    let msg = rejected(
        &text,
        line_of(&text, "rate_correction"),
        "study.rate_correction",
    );
    assert!(msg.contains("half-n"), "{msg}");
}

#[test]
fn broken_toml_is_located() {
    let text = example().replace("confidence = 0.95", "confidence = [0.95");
    let msg = stderr(&{
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("bad.toml"), &text).unwrap();
        vigil(dir.path(), &["check", "bad.toml"])
    });
    assert!(msg.contains("bad.toml, line"), "{msg}");
}

#[test]
fn unwritable_output_fails_before_simulating() {
    let dir = tempfile::tempdir().unwrap();
    let plan = common::example_plan();
    let out = vigil(
        dir.path(),
        &[
            "run",
            plan.to_str().unwrap(),
            "--quiet",
            "--csv",
            "no/such/folder/out.csv",
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("the folder no/such/folder does not exist"),
        "{}",
        stderr(&out)
    );
}

fn graded() -> String {
    plan_text("graded-alarm-response.toml")
}

#[test]
fn rating_criteria_not_increasing() {
    let text = graded().replace(
        "absent_shares = [0.45, 0.352, 0.148, 0.05]",
        "criteria = [-0.5, 0.4, 0.3]",
    );
    let msg = rejected(&text, line_of(&text, "scale ="), "design[2].scale.criteria");
    assert!(msg.contains("increasing"), "{msg}");
}

#[test]
fn rating_categories_outside_range() {
    let text = graded().replace("categories = 4", "categories = 13");
    rejected(
        &text,
        line_of(&text, "scale ="),
        "design[2].scale.categories",
    );
}

#[test]
fn rating_boundary_outside_range() {
    let text = graded().replace("boundary = 2", "boundary = 4");
    rejected(&text, line_of(&text, "scale ="), "design[2].scale.boundary");
}

#[test]
fn rating_shares_not_summing_to_one() {
    let text = graded().replace("[0.45, 0.352, 0.148, 0.05]", "[0.45, 0.352, 0.148, 0.5]");
    let msg = rejected(
        &text,
        line_of(&text, "scale ="),
        "design[2].scale.absent_shares",
    );
    assert!(msg.contains("sum"), "{msg}");
}

#[test]
fn sigma_not_positive() {
    let text = graded().replace("sigma = 1.25", "sigma = -1");
    rejected(&text, line_of(&text, "sigma"), "observer.sigma");
}

fn sentinel() -> String {
    plan_text("sentinel-error-records.toml")
}

#[test]
fn census_not_positive() {
    let text = sentinel().replace("census = 150", "census = 0");
    rejected(&text, line_of(&text, "census = 0"), "design[3].census");
}

#[test]
fn base_rate_with_a_full_record() {
    let text = sentinel().replacen(
        "trials = [50, 100, 200, 400]\n",
        "trials = [50, 100, 200, 400]\nbase_rate = \"unknown\" # full\n",
        1,
    );
    let msg = rejected(
        &text,
        line_of(&text, "base_rate = \"unknown\" # full"),
        "design[1].base_rate",
    );
    assert!(msg.contains("full record"), "{msg}");
}

#[test]
fn error_totals_with_a_rating_scale() {
    let text = sentinel().replacen(
        "record = \"error-totals\"\nbase_rate = \"known\"",
        "record = \"error-totals\"\nbase_rate = \"known\"\nscale = { categories = 3, boundary = 1, criteria = [0.0, 1.0] }",
        1,
    );
    let msg = rejected(
        &text,
        line_of(&text, "record = \"error-totals\""),
        "design[2].record",
    );
    assert!(msg.contains("rating scale"), "{msg}");
}

#[test]
fn sharing_a_parameter_the_design_lacks() {
    let text = sentinel().replacen(
        "base_rate = \"known\"",
        "base_rate = \"known\"\nshared = [\"sigma\"]\n[[design.condition]]\nname = \"a\"\n[[design.condition]]\nname = \"b\"",
        1,
    );
    let msg = rejected(&text, line_of(&text, "shared ="), "design[2].shared");
    assert!(msg.contains("σ is fixed"), "{msg}");
}

fn colony() -> String {
    plan_text("predator-model-colony.toml")
}

#[test]
fn duplicate_animal_counts() {
    let text = colony().replace("counts = [8, 12, 16, 24]", "counts = [3, 3]");
    let msg = rejected(&text, line_of(&text, "counts = [3, 3]"), "animals.counts");
    assert!(msg.contains("listed twice"), "{msg}");
}

#[test]
fn duplicate_trial_counts() {
    let text = replace_first(
        &example(),
        "trials = [20, 40, 80, 160]",
        "trials = [20, 40, 20]",
    );
    let msg = rejected(
        &text,
        line_of(&text, "trials = [20, 40, 20]"),
        "design[1].trials",
    );
    assert!(msg.contains("listed twice"), "{msg}");
}

/// Every run is bounded: the plan's own `experiments` and `--experiments` share one
/// documented ceiling (10⁸), so `--experiments 18446744073709551615` is refused at once.
#[test]
fn experiments_beyond_the_ceiling_are_refused_both_ways() {
    let dir = tempfile::tempdir().unwrap();
    let text = common::plan_text("playback-yes-no.toml");
    std::fs::write(dir.path().join("p.toml"), &text).unwrap();
    let out = common::vigil(
        dir.path(),
        &[
            "run",
            "p.toml",
            "-q",
            "--experiments",
            "18446744073709551615",
        ],
    );
    assert_eq!(out.status.code(), Some(2), "{}", common::stderr(&out));
    assert!(common::stderr(&out).contains("--experiments"));
    let big = text.replace("experiments = 2000", "experiments = 200000000");
    assert_ne!(big, text, "the plan sets experiments = 2000");
    std::fs::write(dir.path().join("big.toml"), big).unwrap();
    let out = common::vigil(dir.path(), &["check", "big.toml"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        common::stderr(&out).contains("100000000"),
        "{}",
        common::stderr(&out)
    );
}

#[test]
fn two_choice_record_with_a_rating_scale_names_left_right_choices() {
    let text = "[study]\ntitle = \"x\"\nseed = 1\n[observer]\nd_prime = 1\ncriterion = 0\n\
                [[design]]\nname = \"a\"\npresence = 0.5\nrecord = \"two-choice\"\ntrials = [40]\n\
                scale = { categories = 4, boundary = 2, absent_shares = [0.4, 0.3, 0.2, 0.1] }\n";
    let msg = rejected(text, 10, "design[1].record");
    assert!(msg.contains("keeps left/right choices only"), "{msg}");
}

// The random-effects keys: a node count outside 1–15, and nodes without the analysis, are
// refused at their line and key.
#[test]
fn random_effects_nodes_are_checked() {
    let with =
        |extra: &str| colony().replace("trial_cap = 60 ", &format!("{extra}\ntrial_cap = 60 "));
    let text = with("random_effects = true\nquadrature_nodes = 40");
    let msg = rejected(
        &text,
        line_of(&text, "quadrature_nodes"),
        "animals.quadrature_nodes",
    );
    assert!(msg.contains("outside 1 to 15"), "{msg}");
    let text = with("quadrature_nodes = 5");
    let msg = rejected(
        &text,
        line_of(&text, "quadrature_nodes"),
        "animals.quadrature_nodes",
    );
    assert!(msg.contains("needs random_effects = true"), "{msg}");
}
