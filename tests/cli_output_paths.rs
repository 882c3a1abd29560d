//! Output paths (issue 11, defects 3–5): unsafe targets are refused before any work with
//! exit 2 and the reason; outputs appear together or not at all, and a write failure after
//! the work is exit 1; temporaries never outlive the run, whether it is interrupted or was
//! killed outright.

mod common;

use common::{stderr, stdout, vigil};
use std::path::Path;
use std::process::Command;

fn setup() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy(common::example_plan(), dir.path().join("plan.toml")).unwrap();
    dir
}

fn run_args<'a>(extra: &[&'a str]) -> Vec<&'a str> {
    let mut v = vec!["run", "plan.toml", "-q", "--experiments", "20"];
    v.extend_from_slice(extra);
    v
}

/// File names in `dir`, sorted (temporaries included: they start with a dot).
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

fn assert_refused(dir: &Path, extra: &[&str], path: &str, why: &str) {
    let before = names(dir);
    let out = vigil(dir, &run_args(extra));
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{extra:?}: {msg}");
    assert!(msg.contains(path) && msg.contains(why), "{extra:?}: {msg}");
    assert!(stdout(&out).is_empty(), "work was done: {}", stdout(&out));
    assert_eq!(names(dir), before, "{extra:?} changed the folder");
}

#[test]
fn the_plan_itself_is_never_an_output() {
    let dir = setup();
    let plan = std::fs::read(dir.path().join("plan.toml")).unwrap();
    assert_refused(
        dir.path(),
        &["--json", "plan.toml"],
        "plan.toml",
        "the plan",
    );
    assert_refused(
        dir.path(),
        &["--csv", "./plan.toml"],
        "plan.toml",
        "the plan",
    );
    std::fs::hard_link(dir.path().join("plan.toml"), dir.path().join("alias.toml")).unwrap();
    assert_refused(
        dir.path(),
        &["--json", "alias.toml"],
        "alias.toml",
        "the plan",
    );
    assert_eq!(std::fs::read(dir.path().join("plan.toml")).unwrap(), plan);
}

#[test]
fn json_and_csv_need_their_own_paths() {
    let dir = setup();
    assert_refused(
        dir.path(),
        &["--json", "x", "--csv", "x"],
        "x",
        "names the same file",
    );
    std::fs::create_dir(dir.path().join("sub")).unwrap();
    assert_refused(
        dir.path(),
        &["--json", "sub/../x", "--csv", "x"],
        "x",
        "names the same file",
    );
    assert_refused(
        dir.path(),
        &["--json", "-", "--csv", "-"],
        "-",
        "standard output",
    );
}

#[cfg(unix)]
#[test]
fn devices_pipes_links_and_folders_are_left_alone() {
    let dir = setup();
    assert_refused(
        dir.path(),
        &["--json", "/dev/null"],
        "/dev/null",
        "device node",
    );
    assert_refused(
        dir.path(),
        &["--csv", "/dev/stdout"],
        "/dev/stdout",
        "symbolic link",
    );
    let status = Command::new("mkfifo")
        .arg(dir.path().join("pipe"))
        .status()
        .unwrap();
    assert!(status.success());
    assert_refused(dir.path(), &["--json", "pipe"], "pipe", "named pipe");
    std::os::unix::fs::symlink("elsewhere.json", dir.path().join("link.json")).unwrap();
    assert_refused(
        dir.path(),
        &["--json", "link.json"],
        "link.json",
        "symbolic link",
    );
    assert!(
        std::fs::symlink_metadata(dir.path().join("link.json"))
            .unwrap()
            .is_symlink()
    );
    std::fs::create_dir(dir.path().join("folder")).unwrap();
    assert_refused(dir.path(), &["--json", "folder"], "folder", "folder");
    assert_refused(
        dir.path(),
        &["--json", "no/such/out.json"],
        "no/such",
        "does not exist",
    );
}

#[test]
fn dash_writes_the_output_to_standard_output() {
    let dir = setup();
    let out = vigil(dir.path(), &run_args(&["--json", "-", "--csv", "out.csv"]));
    assert!(out.status.success(), "{}", stderr(&out));
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).expect("stdout is JSON");
    assert_eq!(json["seed"], 20261201);
    assert_eq!(names(dir.path()), ["out.csv", "plan.toml"]);
}

/// A file-size limit (`ulimit -f`, with SIGXFSZ ignored so the write fails with EFBIG)
/// lets the small CSV be written and makes the larger JSON fail, as a full disk would.
#[cfg(target_os = "linux")]
#[test]
fn a_failed_write_after_the_work_changes_no_output_and_exits_1() {
    let dir = setup();
    std::fs::write(dir.path().join("out.json"), "old json").unwrap();
    std::fs::write(dir.path().join("out.csv"), "old csv").unwrap();
    let script = format!(
        "trap '' XFSZ; ulimit -f 16; exec '{}' run plan.toml -q --experiments 20 \
         --csv out.csv --json out.json",
        env!("CARGO_BIN_EXE_vigil")
    );
    let out = Command::new("sh")
        .arg("-c")
        .arg(&script)
        .current_dir(dir.path())
        .output()
        .unwrap();
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(1), "{msg}");
    assert!(
        msg.contains("out.json") && msg.contains("no output file was changed"),
        "{msg}"
    );
    assert_eq!(
        std::fs::read_to_string(dir.path().join("out.csv")).unwrap(),
        "old csv"
    );
    assert_eq!(
        std::fs::read_to_string(dir.path().join("out.json")).unwrap(),
        "old json"
    );
    assert_eq!(names(dir.path()), ["out.csv", "out.json", "plan.toml"]);
}

#[cfg(target_os = "linux")]
#[test]
fn temporaries_of_killed_runs_are_swept_by_the_next() {
    let dir = setup();
    // Process ids above the kernel's largest (2^22) never run.
    let stale = dir.path().join(".out.json.vigil-4194399.tmp");
    std::fs::write(&stale, "half").unwrap();
    let out = vigil(dir.path(), &run_args(&["--csv", "other.csv"]));
    assert!(out.status.success(), "{}", stderr(&out));
    assert_eq!(names(dir.path()), ["other.csv", "plan.toml"]);
}

/// SIGINT at moments spread over a run of about a second and a half: afterwards the folder
/// holds the plan and the two outputs only, and the outputs are either both the previous
/// ones or both the complete new ones (equal to an uninterrupted run's bytes).
#[cfg(unix)]
#[test]
fn an_interrupt_at_any_moment_leaves_only_whole_outputs() {
    let dir = setup();
    let args = [
        "run",
        "plan.toml",
        "-q",
        "--experiments",
        "2000000",
        "--json",
        "out.json",
        "--csv",
        "out.csv",
    ];
    let start = std::time::Instant::now();
    let full = vigil(dir.path(), &args);
    let took = start.elapsed();
    assert!(full.status.success(), "{}", stderr(&full));
    let new_json = std::fs::read(dir.path().join("out.json")).unwrap();
    let new_csv = std::fs::read(dir.path().join("out.csv")).unwrap();
    // Moments from a fixed sequence over 0–110% of the run, so some land after the commit.
    let mut x: u64 = 0x2545_f491_4f6c_dd1d;
    let mut interrupted = 0;
    for i in 0..8 {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        let fraction = if i == 0 {
            0.0
        } else {
            (x % 1100) as f64 / 1000.0
        };
        std::fs::write(dir.path().join("out.json"), "previous json").unwrap();
        std::fs::write(dir.path().join("out.csv"), "previous csv").unwrap();
        let mut child = Command::new(env!("CARGO_BIN_EXE_vigil"))
            .current_dir(dir.path())
            .args(args)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(took.mul_f64(fraction));
        Command::new("kill")
            .args(["-INT", &child.id().to_string()])
            .status()
            .unwrap();
        let status = child.wait().unwrap();
        assert!(
            matches!(status.code(), Some(0) | Some(130)) || status.code().is_none(),
            "moment {fraction:.3}: {status:?}"
        );
        if status.code() != Some(0) {
            interrupted += 1;
        }
        assert_eq!(
            names(dir.path()),
            ["out.csv", "out.json", "plan.toml"],
            "moment {fraction:.3}"
        );
        let json = std::fs::read(dir.path().join("out.json")).unwrap();
        let csv = std::fs::read(dir.path().join("out.csv")).unwrap();
        let previous = json == b"previous json" && csv == b"previous csv";
        let complete = json == new_json && csv == new_csv;
        assert!(
            previous || complete,
            "moment {fraction:.3}: a mixed or partial output"
        );
    }
    assert!(
        interrupted > 0,
        "no run was interrupted: the run is too short for the test"
    );
}

#[test]
fn explore_and_ideal_follow_the_same_rules() {
    let dir = setup();
    let out = vigil(dir.path(), &["explore", "plan.toml", "--json", "plan.toml"]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("the plan"), "{}", stderr(&out));
    let out = vigil(
        dir.path(),
        &[
            "ideal",
            "--d-prime",
            "1",
            "--presence",
            "0.5",
            "--payoffs",
            "1,1,1,1",
            "--json",
            "-",
        ],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).expect("stdout is JSON");
    assert_eq!(json["tool"], "vigil");
    assert_eq!(names(dir.path()), ["plan.toml"]);
}
