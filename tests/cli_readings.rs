//! Texts that must match what happened: readings, headers, `check` and JSON names. Each
//! check here failed on the code before issue 10's fixes (the old text is quoted beside it).

mod common;

use common::{plans_dir, stdout, vigil_wide};

fn run(dir: &std::path::Path, plan: &str, extra: &[&str]) -> String {
    let mut args = vec!["run", plan, "--quiet", "--experiments", "200"];
    args.extend_from_slice(extra);
    let out = vigil_wide(dir, &args);
    assert!(out.status.success(), "{}", common::stderr(&out));
    stdout(&out)
}

fn write(dir: &std::path::Path, name: &str, text: &str) -> String {
    std::fs::write(dir.join(name), text).unwrap();
    name.to_string()
}

fn reading<'a>(text: &'a str, design: &str) -> &'a str {
    let key = format!("Reading: {design}:");
    text.lines()
        .find(|l| l.starts_with(&key))
        .unwrap_or_else(|| panic!("no reading for {design} in\n{text}"))
}

fn bundled(name: &str) -> String {
    plans_dir().join(name).to_string_lossy().into_owned()
}

#[test]
fn full_yes_no_trade_off_advises_presence_not_more_trials() {
    let dir = tempfile::tempdir().unwrap();
    let text = run(dir.path(), &bundled("sentinel-error-records.toml"), &[]);
    let r = reading(&text, "full record");
    // Old: "d′ and c still trade off at 400 trials (r = -0.55): collect more trials or record more".
    assert!(!r.contains("collect more trials"), "{r}");
    assert!(r.contains("more trials do not help"), "{r}");
    assert!(r.contains("presenting the stimulus on"), "{r}");
}

#[test]
fn run_and_explore_judge_by_the_plans_own_correlation_target() {
    let dir = tempfile::tempdir().unwrap();
    // Invented: |r| ≈ 0.24 at 30% presence (d′ = 1.5, c = 0.3), target 0.2.
    let plan = write(
        dir.path(),
        "p.toml",
        "[study]\ntitle = \"t (invented)\"\nseed = 3\n[observer]\nd_prime = 1.5\ncriterion = 0.3\n\
         [[design]]\nname = \"d\"\npresence = 0.3\ntrials = [80, 160]\n\
         [targets]\nmax_correlation = 0.2\n",
    );
    let out = vigil_wide(dir.path(), &["explore", &plan]);
    let e = stdout(&out);
    let er = reading(&e, "d");
    // Old: explore judged "|r(d′, c)| is below 0.5" whatever the plan's target.
    assert!(er.contains("above 0.2, the plan's max_correlation"), "{er}");
    let r = run(dir.path(), &plan, &[]);
    let rr = reading(&r, "d");
    assert!(rr.contains("above 0.2, the plan's max_correlation"), "{rr}");
}

#[test]
fn a_wide_d_prime_interval_is_not_told_apart() {
    let dir = tempfile::tempdir().unwrap();
    // Invented: d′ = 1 with 10 trials: half-width ≈ 1.6 > d′.
    let plan = write(
        dir.path(),
        "p.toml",
        "[study]\ntitle = \"t (invented)\"\nseed = 3\n[observer]\nd_prime = 1.0\ncriterion = 0.0\n\
         [[design]]\nname = \"d\"\npresence = 0.5\ntrials = [10]\n",
    );
    let r = run(dir.path(), &plan, &[]);
    let rr = reading(&r, "d");
    // Old: "bias and sensitivity are told apart at every count (|r| ≤ 0.03)".
    assert!(!rr.contains("told apart at every count"), "{rr}");
    assert!(rr.contains("cannot tell sensitivity from none"), "{rr}");
}

#[test]
fn saturated_scale_is_flagged_with_its_fix_and_no_bare_side_by_side_verdict() {
    let dir = tempfile::tempdir().unwrap();
    let plan = write(
        dir.path(),
        "p.toml",
        "[study]\ntitle = \"t (invented)\"\nseed = 5\n[observer]\nd_prime = 1.0\ncriterion = 0.0\n\
         [[design]]\nname = \"yes/no\"\npresence = 0.5\ntrials = [10, 20]\n\
         [[design]]\nname = \"3-step\"\npresence = 0.5\ntrials = [10, 20]\n\
         scale = { categories = 3, boundary = 1, criteria = [0.0, 0.8] }\n",
    );
    let text = run(dir.path(), &plan, &[]);
    let r = reading(&text, "3-step");
    assert!(
        r.contains("saturated: 4 parameters for 4 free cells"),
        "{r}"
    );
    assert!(r.contains("fix_sigma = true"), "{r}");
    // Old: "recording the 3-step response raises the SE of d′ by …%" as a plain result.
    assert!(!text.contains("raises the SE"), "{text}");
    assert!(
        !text.contains("recording the 3-step response raises"),
        "{text}"
    );
    assert!(text.contains("* not a like-for-like result"), "{text}");
    let e = stdout(&vigil_wide(dir.path(), &["explore", &plan]));
    assert!(reading(&e, "3-step").contains("saturated"), "{e}");
}

#[test]
fn extreme_rates_are_described_by_what_was_done_with_them() {
    let dir = tempfile::tempdir().unwrap();
    let plan = write(
        dir.path(),
        "p.toml",
        "[study]\ntitle = \"t (invented)\"\nseed = 3\nrate_correction = \"none\"\n\
         [observer]\nd_prime = 2.0\ncriterion = 0.0\n\
         [[design]]\nname = \"d\"\npresence = 0.5\ntrials = [10, 40]\n",
    );
    let r = run(dir.path(), &plan, &[]);
    let rr = reading(&r, "d");
    // Old: "… so rows up to there lean on the correction" with no correction at all.
    assert!(!rr.contains("lean on"), "{rr}");
    assert!(rr.contains("are left out"), "{rr}");
    let s = run(dir.path(), &bundled("sentinel-error-records.toml"), &[]);
    let coarse = reading(&s, "errors, base rate known");
    assert!(!coarse.contains("lean on"), "{coarse}");
    assert!(
        coarse.contains("a coarse record gets no correction"),
        "{coarse}"
    );
}

#[test]
fn exact_output_claims_no_monte_carlo_error() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil_wide(
        dir.path(),
        &[
            "run",
            &bundled("playback-yes-no.toml"),
            "--quiet",
            "--exact",
        ],
    );
    let text = stdout(&out);
    // Old: "Figures are means over datasets ± their Monte Carlo SE".
    assert!(!text.contains("Monte Carlo SE"), "{text}");
    assert!(text.contains("exact expectations"), "{text}");
}

#[test]
fn unknown_base_rate_range_of_d_prime_stops_at_zero() {
    let dir = tempfile::tempdir().unwrap();
    let text = stdout(&vigil_wide(
        dir.path(),
        &["explore", &bundled("sentinel-error-records.toml")],
    ));
    let r = reading(&text, "errors, base rate unknown");
    // Old: "d′ up to 1.79, unbounded below (no limit down to -8.40, …)".
    assert!(!r.contains("-8.40"), "{r}");
    assert!(
        r.contains("d′ anywhere from 0.00 (the smallest value allowed)"),
        "{r}"
    );
}

#[test]
fn check_shows_every_section_with_plain_numbers() {
    let dir = tempfile::tempdir().unwrap();
    let colony = stdout(&vigil_wide(
        dir.path(),
        &["check", &bundled("predator-model-colony.toml")],
    ));
    assert!(
        colony.contains("hypothesis \"jumpy\": bias, sided less, power ≥ 0.8"),
        "{colony}"
    );
    assert!(
        colony.contains("animals: 8, 12, 16, 24 animals"),
        "{colony}"
    );
    assert!(
        colony.contains("budget: 150 per animal, 4 per trial; total 4800"),
        "{colony}"
    );
    assert!(
        colony.contains("lapse_rate = 0.04, lapse_yes = 0.5"),
        "{colony}"
    );
    let shift = stdout(&vigil_wide(
        dir.path(),
        &["check", &bundled("base-rate-shift.toml")],
    ));
    // Old: "c = 0.18077062663297522".
    assert!(!shift.contains("0.18077"), "{shift}");
    // Under "optimal" the observer line states the rule and each condition's row its c.
    assert!(shift.contains("the ideal observer's criterion"), "{shift}");
    assert!(
        shift.contains("rare hawks     0.2         0.181"),
        "{shift}"
    );
    assert!(shift.contains("targets: power ≥ 0.8"), "{shift}");
}

#[test]
fn json_uses_the_plans_spelling() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil_wide(
        dir.path(),
        &[
            "explore",
            &bundled("predator-model-colony.toml"),
            "--json",
            "e.json",
        ],
    );
    assert!(out.status.success());
    let json = std::fs::read_to_string(dir.path().join("e.json")).unwrap();
    // Old: "sided": "Less" and "guess_yes".
    assert!(json.contains("\"sided\": \"less\""), "{json}");
    assert!(json.contains("\"lapse_yes\": 0.5") && json.contains("\"lapse_rate\": 0.04"));
    assert!(!json.contains("guess_yes") && !json.contains("\"Less\""));
}

#[test]
fn side_by_side_names_its_spread_sd() {
    let dir = tempfile::tempdir().unwrap();
    let text = run(dir.path(), &bundled("graded-alarm-response.toml"), &[]);
    // Old: columns "SE d′ yes/no" holding SDs, and "cuts the SE of c".
    assert!(
        text.contains("SD d′ yes/no") && !text.contains("SE d′ yes/no"),
        "{text}"
    );
    assert!(!text.contains("the SE of c"), "{text}");
    assert!(text.contains("SD = spread of the estimates across simulated experiments"));
}

#[test]
fn a_small_census_is_advised_a_larger_one() {
    let dir = tempfile::tempdir().unwrap();
    let text = stdout(&vigil_wide(
        dir.path(),
        &["explore", &bundled("base-rate-shift.toml")],
    ));
    let r = reading(&text, "errors + census");
    // Old: "more trials do not bring it below 0.5; both targets together: never up to 1280".
    assert!(r.contains("instead of 100 gives |r| = 0.49"), "{r}");
    assert!(r.contains("a full record"), "{r}");
}
