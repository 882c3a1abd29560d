//! Numbers in reports (issue 11, defects 7 and 9): no NaN or inf, no runaway digits; a
//! quantity that cannot be computed is said to be so, with the reason; one trial count
//! gives one statement, not the same one twice.

mod common;

use common::{stderr, stdout, vigil};

fn plan(body: &str) -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), body).unwrap();
    dir
}

const HEAD: &str = "[study]\ntitle = \"invented\"\nseed = 1\nexperiments = 50\n";

/// No "NaN"/"inf" spelled out and no run of 16 or more digits (a fixed-point 1e300).
fn assert_tidy(text: &str) {
    assert!(!text.contains("NaN") && !text.contains("inf "), "{text}");
    let mut run = 0;
    for c in text.chars() {
        run = if c.is_ascii_digit() { run + 1 } else { 0 };
        assert!(run < 16, "runaway digits in: {text}");
    }
}

#[test]
fn every_fit_failing_is_reported_as_no_usable_dataset() {
    // d′ = 30 with no rate correction: every dataset has H = 1 and F = 0 (degenerate).
    let dir = plan(&format!(
        "{HEAD}rate_correction = \"none\"\n[observer]\nd_prime = 30\ncriterion = 0.3\n\
         [[design]]\nname = \"d\"\npresence = 0.7\ntrials = [20, 40]\n"
    ));
    let out = vigil(
        dir.path(),
        &["run", "plan.toml", "-q", "--json", "out.json"],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert_tidy(&text);
    assert!(
        text.contains("no usable dataset at any trial count"),
        "{text}"
    );
    let json = std::fs::read_to_string(dir.path().join("out.json")).unwrap();
    assert!(!json.contains("NaN") && !json.contains("Infinity"));
}

#[test]
fn one_trial_count_is_read_once() {
    let dir = plan(&format!(
        "{HEAD}[observer]\nd_prime = 1.5\ncriterion = 0.3\n\
         [[design]]\nname = \"d\"\npresence = 0.7\ntrials = [45]\n"
    ));
    let out = vigil(dir.path(), &["run", "plan.toml", "-q"]);
    let text = stdout(&out);
    let reading = text.lines().find(|l| l.starts_with("Reading:")).unwrap();
    // The half-widths once (the told-apart clause speaks of "every count").
    assert_eq!(reading.matches("at 45 trials").count(), 1, "{reading}");
    assert!(!reading.contains("trials, ±"), "{reading}");
}

#[test]
fn extreme_but_valid_values_are_written_briefly() {
    // d′ = 1e-300 gives c_opt ≈ 4e299: scientific notation, not 300 digits.
    let dir = tempfile::tempdir().unwrap();
    let out = vigil(
        dir.path(),
        &[
            "ideal",
            "--d-prime",
            "1e-300",
            "--presence",
            "0.5",
            "--payoffs",
            "1,1,1,2",
        ],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert_tidy(&text);
    assert!(
        text.contains("d′ = 1e-300") && text.contains("e299"),
        "{text}"
    );
    // A budget of 1e308 is echoed as such.
    let colony =
        common::plan_text("predator-model-colony.toml").replace("total = 4800 ", "total = 1e308 ");
    let dir = plan(&colony);
    let out = vigil(
        dir.path(),
        &["run", "plan.toml", "-q", "--experiments", "3"],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert_tidy(&text);
    assert!(text.contains("budget 1e308"), "{text}");
}

#[test]
fn ideal_refuses_an_optimum_that_overflows() {
    let dir = tempfile::tempdir().unwrap();
    for (args, option) in [
        (
            [
                "--d-prime",
                "1e-310",
                "--presence",
                "0.5",
                "--payoffs",
                "1,1,1,2",
            ],
            "--d-prime",
        ),
        (
            [
                "--d-prime",
                "1",
                "--presence",
                "0.5",
                "--payoffs",
                "1,1,1e308,1e308",
            ],
            "--payoffs",
        ),
    ] {
        let mut all = vec!["ideal"];
        all.extend(args);
        let out = vigil(dir.path(), &all);
        let msg = stderr(&out);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", stdout(&out));
        assert!(
            msg.starts_with(&format!("error: option {option} ")),
            "{msg}"
        );
        assert_tidy(&msg);
    }
}

/// Found by the long mutation campaign: a group study of a design that no animal can be fitted
/// on (error totals with an unknown base rate) printed "NaN · NaN%" in its grid and "±–" in
/// its reading. The grid now shows "–" and the reading says why.
#[test]
fn a_group_grid_without_usable_animals_says_so() {
    let dir = plan(&format!(
        "{HEAD}[observer]\nd_prime = 1.6\ncriterion = -0.3\n\
         [[design]]\nname = \"errors, base rate unknown\"\npresence = 0.3\ntrials = [50]\n\
         record = \"error-totals\"\nbase_rate = \"unknown\"\n\
         [animals]\ncounts = [4]\n"
    ));
    let out = vigil(dir.path(), &["run", "plan.toml", "-q"]);
    assert_eq!(out.status.code(), Some(0));
    let text = stdout(&out);
    assert_tidy(&text);
    assert!(
        text.contains("no usable group estimate at any count"),
        "{text}"
    );
}
