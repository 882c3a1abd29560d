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

/// Runs `vigil` with `args` and `--wide` in `dir`: for tests of what the report says, which
/// read whole lines and whole tables (the fitted 100-column layout is pinned by the
/// snapshots and `tests/terminal_width.rs`).
pub fn vigil_wide(dir: &Path, args: &[&str]) -> Output {
    let mut all = args.to_vec();
    all.push("--wide");
    vigil_env(dir, &all, &[])
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
    // Bundled pilot files (`vigil pilot plans/NAME.csv`).
    for entry in std::fs::read_dir(plans_dir()).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|x| x == "csv") {
            std::fs::copy(&path, plans.join(path.file_name().unwrap())).unwrap();
        }
    }
    dir
}

/// The `cases` of a golden file in tests/golden; panics (so the test fails) when the file is
/// missing, is not JSON, or holds no cases — a check must never pass on absent data.
pub fn golden_cases(name: &str) -> Vec<serde_json::Value> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/golden")
        .join(name);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| {
        panic!(
            "golden file {} is missing or unreadable: {e}",
            path.display()
        )
    });
    let doc: serde_json::Value = serde_json::from_str(&text)
        .unwrap_or_else(|e| panic!("golden file {} is not JSON: {e}", path.display()));
    let cases = doc["cases"]
        .as_array()
        .unwrap_or_else(|| panic!("golden file {} has no cases array", path.display()))
        .clone();
    assert!(
        !cases.is_empty(),
        "golden file {} has an empty cases array",
        path.display()
    );
    cases
}

/// Pearson's chi-square goodness-of-fit test of observed counts against expected
/// probabilities (Pearson 1900; common practice): neighbouring outcomes are pooled from the
/// low end until each bin expects at least 5 draws (the last bin takes any remainder), and
/// the statistic is compared with the 0.999 quantile of χ² with bins − 1 degrees of freedom
/// (statrs 0.19). With a fixed seed the test is deterministic; a correct sampler fails it for
/// one seed in a thousand. Returns (statistic, critical value, degrees of freedom).
pub fn chi_square(observed: &[u64], probabilities: &[f64]) -> (f64, f64, usize) {
    use statrs::distribution::{ChiSquared, ContinuousCDF};
    assert_eq!(observed.len(), probabilities.len());
    let n = observed.iter().sum::<u64>() as f64;
    let mut bins: Vec<(f64, f64)> = Vec::new();
    let (mut obs, mut exp) = (0.0, 0.0);
    for (&o, &p) in observed.iter().zip(probabilities) {
        obs += o as f64;
        exp += n * p;
        if exp >= 5.0 {
            bins.push((obs, exp));
            obs = 0.0;
            exp = 0.0;
        }
    }
    match bins.last_mut() {
        Some(last) => {
            last.0 += obs;
            last.1 += exp;
        }
        None => bins.push((obs, exp)),
    }
    let statistic = bins.iter().map(|(o, e)| (o - e).powi(2) / e).sum();
    let df = bins.len() - 1;
    let critical = ChiSquared::new(df.max(1) as f64)
        .expect("positive degrees of freedom")
        .inverse_cdf(0.999);
    (statistic, critical, df)
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
