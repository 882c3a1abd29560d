//! `vigil explore` end to end on the bundled sentinel plan (an invented scenario): which records
//! separate bias from sensitivity, the JSON file, and bad options.

mod common;

use common::{stderr, stdout, vigil_wide};
use std::path::{Path, PathBuf};

fn sentinel() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/sentinel-error-records.toml")
}

/// The "Reading:" line of one design.
fn reading<'a>(text: &'a str, design: &str) -> &'a str {
    text.lines()
        .find(|l| l.starts_with(&format!("Reading: {design}:")))
        .unwrap_or_else(|| panic!("no reading for {design} in\n{text}"))
}

#[test]
fn sentinel_plan_separates_bias_and_sensitivity_except_with_an_unknown_base_rate() {
    let dir = tempfile::tempdir().unwrap();
    let out = vigil_wide(dir.path(), &["explore", sentinel().to_str().unwrap()]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    let unknown = reading(&text, "errors, base rate unknown");
    assert!(unknown.contains("not identified"), "{unknown}");
    for name in ["d′", "c", "the base rate", "logit π"] {
        assert!(unknown.contains(name), "{name} missing: {unknown}");
    }
    assert!(unknown.contains("profile likelihood"), "{unknown}");
    assert!(unknown.contains("unbounded"), "{unknown}");
    for design in [
        "full record",
        "errors, base rate known",
        "errors + census of 150",
    ] {
        let r = reading(&text, design);
        assert!(r.contains(": identified at every count"), "{r}");
        assert!(!r.contains("not identified"), "{r}");
    }
    // A fine grid: the default 40 log-spaced counts plus the listed ones, 50 … 1600.
    let rows = text
        .lines()
        .filter(|l| l.trim_end().ends_with("not identified"))
        .count();
    assert!(rows >= 40, "{rows} rows for the unknown-base-rate design");
    assert!(text.contains("animal-welfare body"));
}

#[test]
fn json_holds_every_row_with_its_verdict() {
    let dir = tempfile::tempdir().unwrap();
    let plan = sentinel();
    let args = [
        "explore",
        plan.to_str().unwrap(),
        "--from",
        "20",
        "--to",
        "800",
        "--points",
        "12",
        "--json",
        "explore.json",
    ];
    let out = vigil_wide(dir.path(), &args);
    assert!(out.status.success(), "{}", stderr(&out));
    let doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("explore.json")).unwrap())
            .unwrap();
    assert_eq!(doc["command"], "explore");
    assert_eq!(doc["thresholds"]["weak_condition_number"], 1e6);
    let designs = doc["designs"].as_array().unwrap();
    assert_eq!(designs.len(), 4);
    for d in designs {
        let rows = d["rows"].as_array().unwrap();
        assert_eq!(rows.first().unwrap()["trials"], 20);
        assert_eq!(rows.last().unwrap()["trials"], 800);
        let unknown = d["design"] == "errors, base rate unknown";
        for r in rows {
            let kind = r["verdict"]["kind"].as_str().unwrap();
            assert_eq!(
                kind,
                if unknown {
                    "not-identified"
                } else {
                    "identified"
                }
            );
            if unknown {
                assert!(r["condition_number"].is_null());
                assert!(r["quantities"][0]["se"].is_null());
                // d′ ≥ 0 in every plan: its range runs down to the floor 0.
                assert_eq!(r["profile"][0]["lower"]["kind"], "floor");
            } else {
                assert!(r["quantities"][0]["se"].as_f64().unwrap() > 0.0);
                assert!(r["profile"].is_null());
            }
        }
    }
}

#[test]
fn bad_grid_options_exit_2_with_a_clear_message() {
    let dir = tempfile::tempdir().unwrap();
    let plan = sentinel();
    let plan = plan.to_str().unwrap();
    for (args, expected) in [
        (
            vec!["--from", "500", "--to", "100"],
            "--from 500 is larger than --to 100",
        ),
        (vec!["--from", "1"], "1 is outside 2 to"),
        (vec!["--to", "0"], "0 is outside 2 to"),
        (vec!["--points", "0"], "0 points is outside 1 to"),
        (vec!["--from", "many"], "invalid value 'many'"),
        (
            vec!["--json", "/nonexistent-vigil-dir/x.json"],
            "does not exist",
        ),
    ] {
        let mut all = vec!["explore", plan];
        all.extend(&args);
        let out = vigil_wide(dir.path(), &all);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", stderr(&out));
        assert!(
            stderr(&out).contains(expected),
            "{args:?}: expected {expected:?} in {}",
            stderr(&out)
        );
        assert!(stdout(&out).is_empty(), "{args:?} printed a report");
    }
}
