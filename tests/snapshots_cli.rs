//! Whole-output snapshots of the command line, to pin today's behaviour byte for byte:
//! `vigil check`, `vigil run` (terminal, `--csv`, `--json`) and `vigil explore` (terminal,
//! `--json`) on every bundled plan in `plans/`, and `vigil ideal` on the payoffs of
//! `plans/base-rate-shift.toml`. A restructuring of the code proves it changed nothing when
//! these still pass.
//!
//! These are regression pins, not correctness checks: the figures are checked against
//! outside references in the other test files; here only "the same as before" is asserted.
//!
//! - Every command runs twice in the same temporary folder (holding a copy of `plans/`, so
//!   plans are named `plans/NAME.toml` as in the README), once with RAYON_NUM_THREADS=1 and
//!   once with 2; stdout and every output file must agree byte for byte between the two,
//!   must be empty on stderr, and only then are compared with the snapshot.
//! - `run` uses reduced `--experiments` so the whole file runs in seconds in release.
//! - A missing or differing snapshot fails the test. Under CI=true insta writes nothing;
//!   elsewhere it also leaves `*.snap.new` beside the snapshot for review (git ignores them).
//!   To accept new output on purpose, see DEVELOPERS.md ("Snapshots"):
//!   `INSTA_UPDATE=always cargo test --profile quick --test snapshots_cli`, then review the
//!   diff of `tests/snapshots/` in git before committing.
//! - The temporary folder's absolute path is replaced by `[WORKDIR]` should any output ever
//!   contain it, so snapshots do not depend on where the test ran.

mod common;

use common::{bundled_plan_names, stderr, stdout, vigil_env, workspace_with_plans};
use std::path::Path;

/// What one command printed and wrote.
struct Outputs {
    stdout: String,
    /// (file name, contents) for each requested output file, in the order asked.
    files: Vec<(String, String)>,
}

/// Runs `vigil args` in `dir` with one and with two rayon threads and returns the outputs
/// after checking that both runs succeeded silently on stderr and agree byte for byte.
fn run_pinned(dir: &Path, args: &[&str], files: &[&str]) -> Outputs {
    let once = |threads: &str| {
        let out = vigil_env(dir, args, &[("RAYON_NUM_THREADS", threads)]);
        assert!(
            out.status.success(),
            "vigil {args:?} with {threads} thread(s) failed: {}",
            stderr(&out)
        );
        assert_eq!(stderr(&out), "", "vigil {args:?} wrote to stderr");
        let written = files
            .iter()
            .map(|f| {
                let text = std::fs::read_to_string(dir.join(f))
                    .unwrap_or_else(|e| panic!("vigil {args:?} did not write {f}: {e}"));
                std::fs::remove_file(dir.join(f)).unwrap();
                (f.to_string(), text)
            })
            .collect::<Vec<_>>();
        (stdout(&out), written)
    };
    let (one_out, one_files) = once("1");
    let (two_out, two_files) = once("2");
    assert!(
        one_out == two_out,
        "vigil {args:?}: stdout differs between 1 and 2 threads"
    );
    for ((name, a), (_, b)) in one_files.iter().zip(&two_files) {
        assert!(
            a == b,
            "vigil {args:?}: {name} differs between 1 and 2 threads"
        );
    }
    Outputs {
        stdout: one_out,
        files: one_files,
    }
}

/// `text` as a regular expression matching itself (for the path filter).
fn regex_literal(text: &str) -> String {
    text.chars()
        .flat_map(|c| {
            let special = "\\.+*?()|[]{}^$#&-~".contains(c);
            special.then_some('\\').into_iter().chain([c])
        })
        .collect()
}

/// Compares `text` with snapshot `name`, recording the command in the snapshot's header.
fn snapshot(dir: &Path, command: &[&str], name: &str, text: &str) {
    let mut settings = insta::Settings::clone_current();
    settings.set_description(format!("vigil {}", command.join(" ")));
    settings.set_omit_expression(true);
    settings.add_filter(&regex_literal(&dir.to_string_lossy()), "[WORKDIR]");
    settings.bind(|| insta::assert_snapshot!(name, text));
}

/// Runs `args` (pinned across thread counts) and snapshots stdout as `{prefix}` and each
/// output file as `{prefix}.{extension}`.
fn snapshot_command(prefix: &str, args: &[&str], files: &[&str]) {
    let dir = workspace_with_plans();
    let out = run_pinned(dir.path(), args, files);
    snapshot(dir.path(), args, prefix, &out.stdout);
    for (file, text) in &out.files {
        let ext = Path::new(file).extension().unwrap().to_string_lossy();
        snapshot(dir.path(), args, &format!("{prefix}.{ext}"), text);
    }
}

fn check(plan: &str) {
    let path = format!("plans/{plan}.toml");
    snapshot_command(&format!("{plan}__check"), &["check", &path], &[]);
}

fn explore(plan: &str) {
    let path = format!("plans/{plan}.toml");
    snapshot_command(
        &format!("{plan}__explore"),
        &["explore", &path, "--json", "explore.json"],
        &["explore.json"],
    );
}

fn run(plan: &str, experiments: &str) {
    let path = format!("plans/{plan}.toml");
    let args = [
        "run",
        &path,
        "--quiet",
        "--experiments",
        experiments,
        "--csv",
        "run.csv",
        "--json",
        "run.json",
    ];
    snapshot_command(&format!("{plan}__run"), &args, &["run.csv", "run.json"]);
}

/// One module of tests per bundled plan, and the list of plans they cover.
macro_rules! plan_snapshots {
    ($($module:ident: $plan:literal, experiments $experiments:literal;)*) => {
        const COVERED_PLANS: &[&str] = &[$($plan),*];
        $(mod $module {
            #[test]
            fn check() {
                super::check($plan);
            }
            #[test]
            fn explore() {
                super::explore($plan);
            }
            #[test]
            fn run() {
                super::run($plan, $experiments);
            }
        })*
    };
}

// 300 experiments keep every run near a second in release (the base-rate-shift search is
// the slowest) while still exercising every path of each plan.
plan_snapshots! {
    base_rate_shift: "base-rate-shift", experiments "300";
    graded_alarm_response: "graded-alarm-response", experiments "300";
    habituating_colony: "habituating-colony", experiments "300";
    playback_yes_no: "playback-yes-no", experiments "300";
    predator_model_colony: "predator-model-colony", experiments "300";
    sentinel_error_records: "sentinel-error-records", experiments "300";
    two_choice_discrimination: "two-choice-discrimination", experiments "300";
    vole_pilot_assurance: "vole-pilot-assurance", experiments "300";
}

#[test]
fn every_bundled_plan_has_snapshots() {
    let bundled = bundled_plan_names();
    assert!(!bundled.is_empty(), "no plans found in plans/");
    let mut covered: Vec<String> = COVERED_PLANS.iter().map(|s| s.to_string()).collect();
    covered.sort();
    assert_eq!(
        covered, bundled,
        "add every plan in plans/ to plan_snapshots! (and no other)"
    );
}

#[test]
fn run_exact_playback_yes_no() {
    snapshot_command(
        "playback-yes-no__run_exact",
        &[
            "run",
            "plans/playback-yes-no.toml",
            "--quiet",
            "--exact",
            "--csv",
            "run.csv",
            "--json",
            "run.json",
        ],
        &["run.csv", "run.json"],
    );
}

// `vigil ideal` takes no plan: these use the observer and payoffs of
// plans/base-rate-shift.toml (d′ = 1.3; hit 1, miss 4, correct rejection 1, false alarm 1)
// at each of its two base rates, with its criterion fraction 0.5 and with a payoff scan.
#[test]
fn ideal_rare_hawks_half_way() {
    snapshot_command(
        "ideal__rare_hawks_fraction",
        &[
            "ideal",
            "--d-prime",
            "1.3",
            "--presence",
            "0.2",
            "--payoffs",
            "1,4,1,1",
            "--fraction",
            "0.5",
            "--json",
            "ideal.json",
        ],
        &["ideal.json"],
    );
}

#[test]
fn ideal_common_hawks_scan() {
    snapshot_command(
        "ideal__common_hawks_scan",
        &[
            "ideal",
            "--d-prime",
            "1.3",
            "--presence",
            "0.6",
            "--payoffs",
            "1,4,1,1",
            "--scan",
            "0.1:10:9",
            "--json",
            "ideal.json",
        ],
        &["ideal.json"],
    );
}

// `--wide` keeps the full, unwrapped layout: this snapshot's text is the 100-column
// snapshot's layout before the terminal was fitted to a width (checked when it was added:
// its body equalled the earlier `base-rate-shift__run` snapshot byte for byte).
#[test]
fn run_wide_base_rate_shift() {
    snapshot_command(
        "base-rate-shift__run_wide",
        &[
            "run",
            "plans/base-rate-shift.toml",
            "--quiet",
            "--experiments",
            "300",
            "--wide",
        ],
        &[],
    );
}
