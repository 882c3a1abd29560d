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

/// The repository's `plans/` folder.
pub fn plans_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("plans")
}

/// The file stems of every bundled plan (`plans/*.toml`), sorted.
pub fn bundled_plan_names() -> Vec<String> {
    let mut names: Vec<String> = std::fs::read_dir(plans_dir())
        .expect("plans/ is readable")
        .map(|e| e.expect("plans/ entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .map(|p| p.file_stem().unwrap().to_string_lossy().into_owned())
        .collect();
    names.sort();
    names
}

/// A temporary folder holding a copy of `plans/`, so commands can name plans by the same
/// relative paths as in the README (`plans/NAME.toml`) and write output files without
/// touching the repository.
pub fn workspace_with_plans() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    let plans = dir.path().join("plans");
    std::fs::create_dir(&plans).unwrap();
    for name in bundled_plan_names() {
        let file = format!("{name}.toml");
        std::fs::copy(plans_dir().join(&file), plans.join(&file)).unwrap();
    }
    dir
}
