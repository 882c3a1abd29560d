//! The commands end to end: check, run, outputs, determinism across thread counts.

mod common;

use common::{example_plan, stdout, vigil, vigil_env};

#[test]
fn check_lists_every_scenario_with_its_split() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil(dir.path(), &["check", example_plan().to_str().unwrap()]);
    assert!(out.status.success());
    let text = stdout(&out);
    assert!(text.contains("plan is valid"));
    // 30% of 20 trials → 6 present, 14 absent; 50% of 160 → 80/80.
    assert!(
        text.lines()
            .any(|l| l.contains("20") && l.contains(" 6 ") && l.contains("14")),
        "{text}"
    );
    assert_eq!(text.lines().filter(|l| l.contains("call on")).count(), 8);
}

#[test]
fn run_prints_tables_and_writes_whole_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil(
        dir.path(),
        &[
            "run",
            example_plan().to_str().unwrap(),
            "--quiet",
            "--experiments",
            "300",
            "--csv",
            "out.csv",
            "--json",
            "out.json",
        ],
    );
    assert!(out.status.success(), "{}", common::stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("Reading: call on 30% of trials"));
    assert!(text.contains("animal-welfare body"));
    let csv = std::fs::read_to_string(dir.path().join("out.csv")).unwrap();
    // Header + 2 designs × 4 trial counts × 2 quantities.
    assert_eq!(csv.lines().count(), 1 + 16);
    assert!(csv.starts_with("design,record,trials,condition,n_present,n_absent"));
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("out.json")).unwrap())
            .unwrap();
    assert_eq!(json["seed"], 20261201);
    assert_eq!(json["plan"]["study"]["experiments"], 300);
    assert_eq!(json["results"].as_array().unwrap().len(), 8);
    assert!(json["version"].is_string());
}

#[test]
fn json_is_byte_identical_for_one_and_two_threads() {
    let dir = tempfile::tempdir().unwrap();
    let plan = example_plan();
    let run = |threads: &str, file: &str| {
        let out = vigil_env(
            dir.path(),
            &[
                "run",
                plan.to_str().unwrap(),
                "--quiet",
                "--experiments",
                "3000",
                "--json",
                file,
            ],
            &[("RAYON_NUM_THREADS", threads)],
        );
        assert!(out.status.success());
        std::fs::read(dir.path().join(file)).unwrap()
    };
    assert_eq!(run("1", "one.json"), run("2", "two.json"));
}

#[test]
fn exact_mode_reports_without_monte_carlo_error() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil(
        dir.path(),
        &[
            "run",
            example_plan().to_str().unwrap(),
            "--exact",
            "--json",
            "exact.json",
        ],
    );
    assert!(out.status.success(), "{}", common::stderr(&out));
    assert!(stdout(&out).contains("exact enumeration"));
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("exact.json")).unwrap())
            .unwrap();
    let first = &json["results"][0];
    assert_eq!(first["method"], "exact");
    assert_eq!(first["quantities"][0]["mean"]["mc_se"], 0.0);
}
