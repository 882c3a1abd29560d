//! Shared helpers for command-line tests: run the built binary in a temporary folder.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// The bundled yes/no example plan.
pub fn example_plan() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/playback-yes-no.toml")
}

/// The text of a bundled plan.
pub fn plan_text(name: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("plans")
            .join(name),
    )
    .unwrap()
}

/// Runs `vigil` with `args` in `dir`, with extra environment variables.
pub fn vigil_env(dir: &Path, args: &[&str], env: &[(&str, &str)]) -> Output {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_vigil"));
    cmd.current_dir(dir).args(args);
    for (k, v) in env {
        cmd.env(k, v);
    }
    cmd.output().expect("vigil runs")
}

/// Runs `vigil` with `args` in `dir`.
pub fn vigil(dir: &Path, args: &[&str]) -> Output {
    vigil_env(dir, args, &[])
}

/// Standard error as text.
pub fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

/// Standard output as text.
pub fn stdout(out: &Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Writes `text` as bad.toml, runs `vigil run bad.toml --csv out.csv --json out.json`
/// and checks the contract; returns the message.
pub fn rejected(text: &str, line: usize, key: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("bad.toml"), text).unwrap();
    let out = vigil(
        dir.path(),
        &[
            "run", "bad.toml", "--quiet", "--csv", "out.csv", "--json", "out.json",
        ],
    );
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "exit code for: {msg}");
    assert!(!msg.contains("panicked"), "panic: {msg}");
    assert!(msg.contains("bad.toml"), "file not named: {msg}");
    assert!(
        msg.contains(&format!("line {line}")),
        "line {line} not named: {msg}"
    );
    assert!(
        msg.contains(&format!("`{key}`")),
        "key {key} not named: {msg}"
    );
    assert!(msg.contains("allowed:"), "no allowed values: {msg}");
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left.len(), 1, "files left behind: {left:?}");
    msg
}

/// Writes `text` as plan.toml and runs `vigil check plan.toml`, asserting exit 0; returns
/// standard output.
pub fn accepted(text: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), text).unwrap();
    let out = vigil(dir.path(), &["check", "plan.toml"]);
    assert_eq!(out.status.code(), Some(0), "rejected: {}", stderr(&out));
    stdout(&out)
}
