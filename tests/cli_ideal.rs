//! `vigil ideal` end to end: the worked cases of the ideal observer, the payoff-ratio scan,
//! partial adjustment, and bad values (exit code 2, no JSON file left behind).
//!
//! Outside reference: the ideal-observer formulas of Green & Swets (1966), *Signal Detection
//! Theory and Psychophysics* [memory for the form], recomputed here independently with
//! statrs 0.19's normal CDF:
//!   β_opt = [P(absent)/P(present)]·[(V_CR + C_FA)/(V_H + C_M)],  c_opt = ln β_opt / d′,
//!   H = Φ(d′/2 − c), F = Φ(−d′/2 − c)  (equal-variance model, c from the midpoint).
//! The values of the three worked cases were computed with SciPy 1.17 from that formula (the
//! first also by numerical maximisation of the expected payoff).

mod common;

use common::{stderr, stdout, vigil_wide};
use serde_json::Value;
use statrs::distribution::{ContinuousCDF, Normal};
use std::path::Path;

/// Φ from statrs 0.19 (independent of vigil's own Φ, which uses libm's erfc).
fn phi(x: f64) -> f64 {
    Normal::standard().cdf(x)
}

/// β_opt and c_opt at setting (d′, p, [V_H, C_M, V_CR, C_FA]).
struct Formula {
    beta: f64,
    c_opt: f64,
}

impl Formula {
    /// Green & Swets (1966) [memory for the form].
    fn new(d: f64, p: f64, pay: [f64; 4]) -> Self {
        let [vh, cm, vcr, cfa] = pay;
        let beta = (1.0 - p) / p * (vcr + cfa) / (vh + cm);
        Self {
            beta,
            c_opt: beta.ln() / d,
        }
    }
}

/// H, F, FA per miss and expected payoff at criterion c (equal-variance model).
fn at(d: f64, p: f64, pay: [f64; 4], c: f64) -> (f64, f64, f64, f64) {
    let [vh, cm, vcr, cfa] = pay;
    let h = phi(d / 2.0 - c);
    let f = phi(-d / 2.0 - c);
    let ratio = (1.0 - p) * f / (p * (1.0 - h));
    let payoff = p * (h * vh - (1.0 - h) * cm) + (1.0 - p) * ((1.0 - f) * vcr - f * cfa);
    (h, f, ratio, payoff)
}

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

fn read_json(path: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// The first number that follows an `=` on the line that starts with `prefix`.
fn header_value(text: &str, prefix: &str) -> f64 {
    let line = text
        .lines()
        .find(|l| l.starts_with(prefix))
        .unwrap_or_else(|| panic!("no line {prefix:?} in\n{text}"));
    line.split('=')
        .skip(1)
        .find_map(|part| part.split_whitespace().next()?.parse().ok())
        .unwrap_or_else(|| panic!("no number after `=` in {line:?}"))
}

/// The first number in the outcome-table row labelled `label` (the value at c_opt).
fn row_value(text: &str, label: &str) -> f64 {
    let line = text
        .lines()
        .find(|l| l.trim_start().starts_with(label))
        .unwrap_or_else(|| panic!("no row {label:?} in\n{text}"));
    line.trim_start()[label.len()..]
        .split_whitespace()
        .next()
        .unwrap()
        .parse()
        .unwrap()
}

fn payoff_arg(pay: [f64; 4]) -> String {
    pay.map(|x| x.to_string()).join(",")
}

/// The three worked cases: (d′, P(present), [V_H, C_M, V_CR, C_FA]) and the printed
/// β_opt, c_opt, H, F (SciPy 1.17 values of the Green & Swets formula).
#[allow(
    clippy::approx_constant,
    reason = "0.693147 is the printed reference value (ln 2), kept as printed"
)]
const WORKED: [(f64, f64, [f64; 4], [f64; 4]); 3] = [
    (
        1.5,
        0.25,
        [1.0, 1.0, 1.0, 1.0],
        [3.0, 0.732408, 0.507018, 0.069116],
    ),
    (
        1.0,
        0.5,
        [1.0, 1.0, 1.0, 3.0],
        [2.0, 0.693147, 0.423422, 0.116406],
    ),
    (
        2.0,
        0.1,
        [10.0, 5.0, 1.0, 1.0],
        [1.2, 0.091161, 0.818283, 0.137601],
    ),
];

#[test]
fn worked_cases_are_printed_as_the_published_formula_gives() {
    for (d, p, pay, [beta_ref, c_ref, h_ref, f_ref]) in WORKED {
        let dir = tempfile::tempdir().unwrap();
        let args = [
            "ideal".to_string(),
            "--d-prime".into(),
            d.to_string(),
            "--presence".into(),
            p.to_string(),
            "--payoffs".into(),
            payoff_arg(pay),
            "--json".into(),
            "ideal.json".into(),
        ];
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = vigil_wide(dir.path(), &args);
        assert!(out.status.success(), "{}", stderr(&out));
        let text = stdout(&out);
        let g = Formula::new(d, p, pay);
        let (h, f, ratio, payoff) = at(d, p, pay, g.c_opt);

        // The formula itself reproduces the printed table (6 decimals).
        let printed = 6e-7;
        assert!((g.beta - beta_ref).abs() < 1e-12);
        assert!((g.c_opt - c_ref).abs() < printed, "c_opt, d′ = {d}");
        assert!((h - h_ref).abs() < printed, "H, d′ = {d}");
        assert!((f - f_ref).abs() < printed, "F, d′ = {d}");

        // Terminal text: six decimals (β to six significant digits).
        let case = format!("d′ = {d}, p = {p}\n{text}");
        assert!(
            (header_value(&text, "β_opt") - g.beta).abs() < 5e-6 * g.beta,
            "{case}"
        );
        assert!(
            (header_value(&text, "c_opt") - g.c_opt).abs() < printed,
            "{case}"
        );
        assert!(
            (row_value(&text, "hit rate H") - h).abs() < printed,
            "{case}"
        );
        assert!(
            (row_value(&text, "false-alarm rate F") - f).abs() < printed,
            "{case}"
        );
        assert!(
            (row_value(&text, "miss rate 1 − H") - (1.0 - h)).abs() < printed,
            "{case}"
        );
        let cr = row_value(&text, "correct-rejection rate 1 − F");
        assert!((cr - (1.0 - f)).abs() < printed, "{case}");
        let fa_miss = row_value(&text, "false alarms per miss");
        assert!((fa_miss - ratio).abs() < 5e-6 * ratio, "{case}");
        let ev = row_value(&text, "expected payoff per trial");
        assert!((ev - payoff).abs() < printed, "{case}");

        // JSON: full precision (statrs' Φ is good to about 1e-10 here).
        let doc = read_json(&dir.path().join("ideal.json"));
        assert_eq!(doc["command"], "ideal");
        let tol = 1e-9;
        assert!((num(&doc["optimal_beta"]) - g.beta).abs() < tol);
        let o = &doc["optimal"];
        assert!((num(&o["criterion"]) - g.c_opt).abs() < tol);
        assert!((num(&o["hit_rate"]) - h).abs() < tol);
        assert!((num(&o["false_alarm_rate"]) - f).abs() < tol);
        assert!((num(&o["miss_rate"]) - (1.0 - h)).abs() < tol);
        assert!((num(&o["correct_rejection_rate"]) - (1.0 - f)).abs() < tol);
        assert!((num(&o["false_alarm_to_miss_ratio"]) - ratio).abs() < tol * ratio.max(1.0));
        assert!((num(&o["expected_payoff"]) - payoff).abs() < tol);
        assert!(doc["partial"].is_null() && doc["scan"].is_null());
    }
}

#[test]
fn partial_adjustment_sits_a_fraction_of_the_way_to_c_opt() {
    let dir = tempfile::tempdir().unwrap();
    let (d, p, pay) = (1.5, 0.25, [1.0, 1.0, 1.0, 1.0]);
    let args = [
        "ideal",
        "--d-prime",
        "1.5",
        "--presence",
        "0.25",
        "--payoffs",
        "1,1,1,1",
        "--fraction",
        "0.5",
        "--json",
        "ideal.json",
    ];
    let out = vigil_wide(dir.path(), &args);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(stdout(&out).contains("at f·c_opt (f = 0.5)"));
    let doc = read_json(&dir.path().join("ideal.json"));
    let g = Formula::new(d, p, pay);
    let c = 0.5 * g.c_opt;
    let (h, f, ratio, payoff) = at(d, p, pay, c);
    let (.., best) = at(d, p, pay, g.c_opt);
    let part = &doc["partial"];
    assert_eq!(num(&part["fraction"]), 0.5);
    let o = &part["outcome"];
    let tol = 1e-9;
    assert!((num(&o["criterion"]) - c).abs() < tol);
    assert!((num(&o["hit_rate"]) - h).abs() < tol);
    assert!((num(&o["false_alarm_rate"]) - f).abs() < tol);
    assert!((num(&o["false_alarm_to_miss_ratio"]) - ratio).abs() < tol);
    assert!((num(&part["payoff_lost"]) - (best - payoff)).abs() < tol);
    assert!(num(&part["payoff_lost"]) > 0.0, "the optimum earns most");
}

#[test]
fn scan_shows_false_alarms_per_miss_falling_as_the_payoff_ratio_grows() {
    let dir = tempfile::tempdir().unwrap();
    let (d, p) = (1.5, 0.3);
    let args = [
        "ideal",
        "--d-prime",
        "1.5",
        "--presence",
        "0.3",
        "--payoffs",
        "1,1,1,1",
        "--scan",
        "0.01:100:21",
        "--json",
        "ideal.json",
    ];
    let out = vigil_wide(dir.path(), &args);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    let reading = text
        .lines()
        .find(|l| l.starts_with("Reading: as R rises"))
        .unwrap_or_else(|| panic!("no scan reading in\n{text}"));
    assert!(reading.contains("fall at every step"), "{reading}");
    assert!(reading.contains("equally often near R ≈"), "{reading}");

    let doc = read_json(&dir.path().join("ideal.json"));
    let rows = doc["scan"]["rows"].as_array().unwrap();
    assert_eq!(rows.len(), 21);
    assert_eq!(num(&rows[0]["payoff_ratio"]), 0.01);
    assert_eq!(num(&rows[20]["payoff_ratio"]), 100.0);
    let mut previous: Option<(f64, f64)> = None;
    for row in rows {
        let r = num(&row["payoff_ratio"]);
        // β_opt = [(1 − p)/p]·R; only R enters, so payoffs [1, 1, R, R] give it.
        let g = Formula::new(d, p, [1.0, 1.0, r, r]);
        let (h, f, ratio, _) = at(d, p, [1.0, 1.0, r, r], g.c_opt);
        assert!((num(&row["optimal_beta"]) - g.beta).abs() < 1e-9 * g.beta);
        assert!((num(&row["optimal_criterion"]) - g.c_opt).abs() < 1e-9);
        assert!((num(&row["hit_rate"]) - h).abs() < 1e-9);
        assert!((num(&row["false_alarm_rate"]) - f).abs() < 1e-9);
        let got = num(&row["false_alarm_to_miss_ratio"]);
        assert!((got - ratio).abs() < 1e-8 * ratio.max(1.0), "R = {r}");
        if let Some((r0, ratio0)) = previous {
            assert!(r > r0);
            assert!(
                got < ratio0,
                "FA per miss must fall as R grows: {ratio0} then {got}"
            );
        }
        previous = Some((r, got));
    }
    // Where false alarms and misses balance, the formula gives a ratio of 1.
    let balance = num(&doc["scan"]["balance_ratio"]);
    let g = Formula::new(d, p, [1.0, 1.0, balance, balance]);
    let (.., ratio, _) = at(d, p, [1.0, 1.0, balance, balance], g.c_opt);
    assert!((ratio - 1.0).abs() < 0.02, "ratio {ratio} at R = {balance}");
}

/// Runs `vigil ideal` with `extra` options after a valid base and `--json out.json`;
/// expects exit code 2, every `needles` in the message, and no file left behind.
fn rejects(base: [&str; 6], extra: &[&str], needles: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let mut args = vec!["ideal"];
    args.extend(base);
    args.extend(extra);
    args.extend(["--json", "out.json"]);
    let out = vigil_wide(dir.path(), &args);
    let err = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    for needle in needles {
        assert!(
            err.contains(needle),
            "{args:?}: missing {needle:?} in\n{err}"
        );
    }
    let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
    assert!(left.is_empty(), "{args:?} left {left:?}");
}

#[test]
fn bad_values_exit_2_naming_the_option_and_leave_no_file() {
    let base = |d: &'static str, p: &'static str, pay: &'static str| {
        ["--d-prime", d, "--presence", p, "--payoffs", pay]
    };
    // V_H + C_M = 0: β_opt divides by zero, c_opt is undefined.
    rejects(
        base("1.5", "0.25", "0,0,1,1"),
        &[],
        &[
            "--payoffs",
            "value_hit + cost_miss is 0",
            "undefined",
            "allowed:",
        ],
    );
    // V_CR + C_FA = 0: β_opt = 0, ln β_opt = −∞.
    rejects(
        base("1.5", "0.25", "1,1,0,0"),
        &[],
        &[
            "--payoffs",
            "value_correct_rejection + cost_false_alarm is 0",
        ],
    );
    rejects(
        base("1.5", "0.25", "1,-1,1,1"),
        &[],
        &["--payoffs", "cost_miss", "≥ 0"],
    );
    for p in ["0", "1", "1.5", "-0.1"] {
        rejects(
            base("1.5", p, "1,1,1,1"),
            &[],
            &["--presence", "strictly between 0 and 1"],
        );
    }
    for d in ["0", "-1", "inf"] {
        rejects(base(d, "0.25", "1,1,1,1"), &[], &["--d-prime", "> 0"]);
    }
    for pay in ["1,1,1", "1;1;1;1", "a,b,c,d", "1,1,1,1,1"] {
        rejects(
            base("1.5", "0.25", pay),
            &[],
            &["--payoffs", "V_H,C_M,V_CR,C_FA"],
        );
    }
    let ok = base("1.5", "0.25", "1,1,1,1");
    rejects(ok, &["--fraction", "1.2"], &["--fraction", "[0, 1]"]);
    rejects(ok, &["--scan", "10:0.1:5"], &["--scan", "0 < LOW ≤ HIGH"]);
    rejects(ok, &["--scan", "0:1:5"], &["--scan", "0 < LOW ≤ HIGH"]);
    rejects(ok, &["--scan", "0.1:10:0"], &["--scan", "POINTS"]);
    rejects(ok, &["--scan", "0.1-10"], &["--scan", "LOW:HIGH:POINTS"]);
}

#[test]
fn unwritable_json_path_exits_2() {
    let dir = tempfile::tempdir().unwrap();
    let args = [
        "ideal",
        "--d-prime",
        "1",
        "--presence",
        "0.5",
        "--payoffs",
        "1,1,1,1",
        "--json",
        "no-such-folder/out.json",
    ];
    let out = vigil_wide(dir.path(), &args);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("the folder no-such-folder does not exist"));
}
