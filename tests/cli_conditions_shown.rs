//! A design with several conditions shows every condition — its present/absent split and
//! its criterion — in `check`, in `run`'s terminal report, CSV and JSON, and its Reading
//! quotes the loosest criterion, not the first condition's.
//!
//! plans/base-rate-shift.toml (invented): d′ = 1.3, payoffs V_H = 1, C_M = 4, V_CR = 1,
//! C_FA = 1, criterion half way to the ideal one. The ideal criterion (Green & Swets 1966,
//! eq. for β_opt): β = ((1 − π)/π) · (V_CR + C_FA)/(V_H + C_M), c = ln β / d′. At π = 0.2,
//! β = 4 · 0.4 = 1.6 and c = 0.5 · ln 1.6 / 1.3 = +0.1808; at π = 0.6, β = (2/3) · 0.4 and
//! c = 0.5 · ln(0.26667) / 1.3 = −0.5084 (natural logs by hand; printed to 3 decimals).
//! Splits: 40 trials at 20% are 8/32, at 60% are 24/16 (presence × trials).

mod common;

use common::{stderr, stdout, vigil_wide, workspace_with_plans};
use serde_json::Value;

const PLAN: &str = "plans/base-rate-shift.toml";

fn ok(args: &[&str]) -> (tempfile::TempDir, String) {
    let dir = workspace_with_plans();
    let out = vigil_wide(dir.path(), args);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    (dir, text)
}

/// The words of the first line that contains every needle.
fn line_with<'a>(text: &'a str, needles: &[&str]) -> Vec<&'a str> {
    text.lines()
        .find(|l| needles.iter().all(|n| l.contains(n)))
        .unwrap_or_else(|| panic!("no line with {needles:?} in:\n{text}"))
        .split_whitespace()
        .collect()
}

#[test]
fn check_lists_every_condition_with_its_split_and_criterion() {
    let (_dir, text) = ok(&["check", PLAN]);
    let rare = line_with(&text, &["rare hawks", " 40 "]);
    assert!(
        rare.ends_with(&["0.2", "0.181", "40", "8", "32"]),
        "{rare:?}"
    );
    // The line after it is the 60% condition of the same scenario.
    let next = text
        .lines()
        .skip_while(|l| !(l.contains("rare hawks") && l.contains(" 40 ")))
        .nth(1)
        .unwrap();
    let common: Vec<&str> = next.split_whitespace().collect();
    assert_eq!(common, ["common", "hawks", "0.6", "-0.508", "24", "16"]);
    // Error totals do not fix the split: it is marked as expected.
    assert!(text.contains("≈24"), "{text}");
    // The observer's criterion is the rule, not the first condition's value.
    assert!(!text.contains("c = 0.18"), "{text}");
    assert!(
        text.contains("0.5 × the ideal observer's criterion"),
        "{text}"
    );
}

#[test]
fn run_shows_every_condition_in_the_terminal_csv_and_json() {
    let (dir, text) = ok(&[
        "run",
        PLAN,
        "--quiet",
        "--experiments",
        "300",
        "--csv",
        "out.csv",
        "--json",
        "out.json",
    ]);
    // Terminal: the header does not present the first condition's c as the observer's.
    let header = text.lines().nth(1).unwrap();
    assert!(!header.contains("+0.18"), "{header}");
    // Each design block names both criteria …
    assert!(
        text.contains("rare hawks 20% present, c = +0.18; common hawks 60% present, c = -0.51"),
        "{text}"
    );
    // … and each criterion row carries its own condition's split.
    let rare = line_with(&text, &["8/32", "c[rare hawks]"]);
    assert_eq!(rare[..3], ["8/32", "c[rare", "hawks]"]);
    let common = line_with(&text, &["24/16", "c[common hawks]"]);
    assert_eq!(common[..4], ["24/16", "c[common", "hawks]", "-0.508"]);

    // CSV: a condition column, and each row's own split (shared d′: the sum).
    let csv = std::fs::read_to_string(dir.path().join("out.csv")).unwrap();
    let mut rows = csv.lines();
    let head: Vec<&str> = rows.next().unwrap().split(',').collect();
    let col = |name: &str| head.iter().position(|h| *h == name).unwrap();
    let (design, trials, condition, quantity, present, absent) = (
        col("design"),
        col("trials"),
        col("condition"),
        col("quantity"),
        col("n_present"),
        col("n_absent"),
    );
    let find = |q: &str| -> Vec<String> {
        csv.lines()
            .map(|l| l.split(',').map(str::to_string).collect::<Vec<_>>())
            .find(|r| r[design] == "yes/no" && r[trials] == "40" && r[quantity] == q)
            .unwrap_or_else(|| panic!("no CSV row for {q}"))
    };
    let common = find("criterion[common hawks]");
    assert_eq!(
        (&*common[condition], &*common[present], &*common[absent]),
        ("common hawks", "24", "16")
    );
    let rare = find("criterion[rare hawks]");
    assert_eq!((&*rare[present], &*rare[absent]), ("8", "32"));
    let d = find("d_prime");
    assert_eq!(
        (&*d[condition], &*d[present], &*d[absent]),
        ("", "32", "48")
    );

    // JSON: every condition of every scenario, typed.
    let json: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("out.json")).unwrap())
            .unwrap();
    let conditions = json["results"][0]["scenario"]["conditions"]
        .as_array()
        .expect("conditions array");
    assert_eq!(conditions.len(), 2);
    assert_eq!(conditions[1]["name"], "common hawks");
    assert_eq!(conditions[1]["present"], 24);
    assert_eq!(conditions[1]["absent"], 16);
    assert_eq!(conditions[1]["counts"], "fixed");
    let c = conditions[1]["criterion"].as_f64().unwrap();
    // −0.5084 from the formula above (hand arithmetic to 4 decimals).
    assert!((c + 0.5084).abs() < 1e-4, "{c}");
    let totals = json["results"][8]["scenario"]["conditions"][1]["counts"].clone();
    assert_eq!(
        totals, "expected",
        "errors + census draws classes at the base rate"
    );
}

#[test]
fn the_reading_quotes_the_loosest_criterion() {
    let (dir, text) = ok(&[
        "run",
        PLAN,
        "--quiet",
        "--experiments",
        "300",
        "--json",
        "out.json",
    ]);
    let json: Value =
        serde_json::from_str(&std::fs::read_to_string(dir.path().join("out.json")).unwrap())
            .unwrap();
    // The errors + census design at its first count (scenario 9).
    let s = &json["results"][8];
    assert_eq!(s["design"], "errors + census");
    let half = |key: &str| {
        s["quantities"]
            .as_array()
            .unwrap()
            .iter()
            .find(|q| q["quantity"] == "criterion" && q["condition"] == key)
            .unwrap()["mean_width"]["value"]
            .as_f64()
            .unwrap()
            / 2.0
    };
    let (rare, common) = (half("rare hawks"), half("common hawks"));
    // The data can tell the rules apart: the second condition's c is the looser here.
    assert!(
        format!("{common:.2}") != format!("{rare:.2}") && common > rare,
        "{rare} {common}"
    );
    let reading = text
        .lines()
        .find(|l| l.starts_with("Reading: errors + census:"))
        .unwrap();
    assert!(
        reading.contains(&format!("c is pinned to ±{common:.2} ")),
        "{reading}"
    );
    assert!(reading.contains("widest of the 2 conditions"), "{reading}");
}
