//! Checkpointed runs: a run stopped at any moment — SIGKILL, SIGINT or SIGTERM — and resumed
//! with `--resume` prints and writes the bytes of an uninterrupted run, and no output file is
//! ever left half-written at its path. The reference is the uninterrupted run itself (the
//! contract is equality of bytes, so no tolerance applies).

mod common;

use common::{stderr, stdout, vigil, workspace_with_plans};
use std::path::Path;
use std::process::{Child, Command, Stdio};
use std::time::Duration;

const PLAN: &str = "plans/predator-model-colony.toml";
/// 32 chunks per point: long enough (a few seconds) to be stopped in the middle.
const EXPERIMENTS: &str = "8000";

fn args<'a>(extra: &[&'a str]) -> Vec<&'a str> {
    let mut a = vec![
        "run",
        PLAN,
        "-q",
        "--experiments",
        EXPERIMENTS,
        "--json",
        "out.json",
    ];
    a.extend(extra);
    a
}

fn start(dir: &Path, extra: &[&str]) -> Child {
    Command::new(env!("CARGO_BIN_EXE_vigil"))
        .current_dir(dir)
        .args(args(extra))
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("vigil starts")
}

fn signal(child: &Child, name: &str) {
    let status = Command::new("kill")
        .args([format!("-{name}"), child.id().to_string()])
        .status()
        .unwrap();
    assert!(status.success());
}

/// The uninterrupted run's terminal text and JSON.
fn uninterrupted(dir: &Path) -> (String, Vec<u8>) {
    let out = vigil(dir, &args(&[]));
    assert!(out.status.success(), "{}", stderr(&out));
    let json = std::fs::read(dir.join("out.json")).unwrap();
    std::fs::remove_file(dir.join("out.json")).unwrap();
    (stdout(&out), json)
}

/// No output file may be left at its path by a stopped run; after a signal it can handle
/// (`killed` false) no temporary file either. SIGKILL runs no code, so the empty temporary
/// file claimed beside the output at the start may stay (it is never at the output path).
fn nothing_half_written(dir: &Path, killed: bool) {
    assert!(
        !dir.join("out.json").exists(),
        "a stopped run left its output"
    );
    for e in std::fs::read_dir(dir).unwrap() {
        let name = e.unwrap().file_name().to_string_lossy().into_owned();
        if killed && name.starts_with(".out.json.") {
            continue;
        }
        assert!(!name.contains("out.json"), "left behind: {name}");
    }
    // The checkpoint, if any, is always whole JSON.
    if let Ok(text) = std::fs::read_to_string(dir.join("ck.json")) {
        serde_json::from_str::<serde_json::Value>(&text).expect("the checkpoint is whole");
    }
}

/// Resumes until the run completes (a resumed run may itself be stopped first).
fn resume_to_the_end(dir: &Path) -> (String, Vec<u8>) {
    let out = vigil(dir, &args(&["--checkpoint", "ck.json", "--resume"]));
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(
        !dir.join("ck.json").exists(),
        "the checkpoint outlived the run"
    );
    (stdout(&out), std::fs::read(dir.join("out.json")).unwrap())
}

#[test]
fn killed_at_several_moments_and_resumed_equals_an_uninterrupted_run() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let expected = uninterrupted(dir);
    // Kill moments spread over the run (ms); each resume may be killed again.
    let mut stopped = 0;
    for plan_of_kills in [&[150u64][..], &[600, 400], &[1200, 300, 900]] {
        for &ms in plan_of_kills {
            let mut child = start(dir, &["--checkpoint", "ck.json", "--resume"]);
            std::thread::sleep(Duration::from_millis(ms));
            child.kill().unwrap(); // SIGKILL: no handler runs
            let status = child.wait().unwrap();
            if !status.success() {
                stopped += 1;
                nothing_half_written(dir, true);
            } else {
                std::fs::remove_file(dir.join("out.json")).unwrap();
            }
        }
        assert!(
            resume_to_the_end(dir) == expected,
            "kills at {plan_of_kills:?} ms"
        );
        std::fs::remove_file(dir.join("out.json")).unwrap();
    }
    // Most kills land mid-run (the run takes seconds); the test means nothing if none did.
    assert!(stopped >= 3, "only {stopped} of 6 kills stopped the run");
}

#[test]
fn sigint_and_sigterm_save_the_checkpoint_and_say_how_to_resume() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let expected = uninterrupted(dir);
    for name in ["INT", "TERM"] {
        let child = start(dir, &["--checkpoint", "ck.json"]);
        std::thread::sleep(Duration::from_millis(700));
        signal(&child, name);
        let out = child.wait_with_output().unwrap();
        assert_eq!(out.status.code(), Some(130), "SIG{name}: {}", stderr(&out));
        let msg = stderr(&out);
        assert!(msg.contains("saved in the checkpoint ck.json"), "{msg}");
        assert!(msg.contains("--checkpoint ck.json --resume"), "{msg}");
        nothing_half_written(dir, false);
        assert!(dir.join("ck.json").exists());
        assert!(resume_to_the_end(dir) == expected, "SIG{name}");
        std::fs::remove_file(dir.join("out.json")).unwrap();
    }
}

#[test]
fn checkpoints_are_not_reused_by_mistake() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let text = std::fs::read_to_string(dir.join(PLAN)).unwrap();
    // A checkpoint of this plan, stopped early.
    let mut child = start(dir, &["--checkpoint", "ck.json"]);
    // Wait for the first save (polled, so a loaded machine only makes the wait longer), then
    // stop the run.
    let saved = (0..400).any(|_| {
        std::thread::sleep(Duration::from_millis(50));
        dir.join("ck.json").exists()
    });
    child.kill().unwrap();
    child.wait().unwrap();
    assert!(
        saved && dir.join("ck.json").exists(),
        "no checkpoint saved after 20 s"
    );

    // Without --resume an existing checkpoint is refused, not overwritten.
    let out = vigil(dir, &args(&["--checkpoint", "ck.json"]));
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("add --resume"), "{}", stderr(&out));

    // Another plan (an edited file) or other experiments cannot resume it.
    std::fs::write(dir.join("edited.toml"), format!("{text}\n# edited\n")).unwrap();
    let out = vigil(
        dir,
        &[
            "run",
            "edited.toml",
            "-q",
            "--experiments",
            EXPERIMENTS,
            "--checkpoint",
            "ck.json",
            "--resume",
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("another plan"), "{}", stderr(&out));
    let out = vigil(
        dir,
        &[
            "run",
            PLAN,
            "-q",
            "--experiments",
            "4000",
            "--checkpoint",
            "ck.json",
            "--resume",
        ],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(
        stderr(&out).contains("resume with --experiments 8000"),
        "{}",
        stderr(&out)
    );

    // --resume alone names what it needs.
    let out = vigil(dir, &["run", PLAN, "-q", "--resume"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("--resume needs --checkpoint"));
}
