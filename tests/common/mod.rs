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
