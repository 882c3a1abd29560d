//! The terminal report fits its width: every line of `check`, `explore`, `run` and `ideal`
//! on every bundled plan is at most 100 columns by default (no terminal: a pipe, as here)
//! and at most 80 with `--width 80`; `--wide` keeps the full layout, so its lines are
//! longer; and fitting drops no figure (every number of the wide report is printed).
//!
//! Columns are counted with unicode-width, as terminals and comfy-table count them (the d̂ of
//! r(d̂′, ĉ) is a d and a zero-width combining mark).

mod common;

use common::{bundled_plan_names, stderr, stdout, vigil, workspace_with_plans};

fn commands(plan: &str) -> Vec<Vec<String>> {
    let path = format!("plans/{plan}.toml");
    vec![
        vec!["check".into(), path.clone()],
        vec!["explore".into(), path.clone()],
        vec![
            "run".into(),
            path,
            "--quiet".into(),
            "--experiments".into(),
            "100".into(),
        ],
    ]
}

fn printed(dir: &std::path::Path, args: &[String], extra: &[&str]) -> String {
    let mut all: Vec<&str> = args.iter().map(String::as_str).collect();
    all.extend(extra);
    let out = vigil(dir, &all);
    assert!(out.status.success(), "vigil {all:?}: {}", stderr(&out));
    stdout(&out)
}

fn widest(text: &str) -> usize {
    text.lines()
        .map(vigil::report::layout::columns)
        .max()
        .unwrap_or(0)
}

/// The numbers of a text, in order of first appearance, as a sorted multiset: fitting may
/// move a number to another panel or line but never drop one.
fn numbers(text: &str) -> Vec<String> {
    let mut v: Vec<String> = text
        .split(|c: char| !(c.is_ascii_digit() || c == '.'))
        .filter(|t| t.chars().any(|c| c.is_ascii_digit()))
        .map(str::to_string)
        .collect();
    v.sort();
    v
}

#[test]
fn every_line_fits_100_columns_by_default_and_80_when_asked() {
    let dir = workspace_with_plans();
    let plans = bundled_plan_names();
    assert!(!plans.is_empty());
    let mut some_wide_line = false;
    for plan in &plans {
        for args in commands(plan) {
            let fitted = printed(dir.path(), &args, &[]);
            assert!(widest(&fitted) <= 100, "vigil {args:?}:\n{fitted}");
            let narrow = printed(dir.path(), &args, &["--width", "80"]);
            assert!(
                widest(&narrow) <= 80,
                "vigil {args:?} --width 80:\n{narrow}"
            );
            let wide = printed(dir.path(), &args, &["--wide"]);
            some_wide_line |= widest(&wide) > 100;
            // Repeated key columns add numbers (trial counts), so the fitted text holds at
            // least every number of the wide one.
            let (f, w) = (numbers(&fitted), numbers(&wide));
            let mut missing = w.clone();
            for n in &f {
                if let Some(i) = missing.iter().position(|m| m == n) {
                    missing.swap_remove(i);
                }
            }
            assert!(missing.is_empty(), "vigil {args:?} dropped {missing:?}");
        }
    }
    assert!(some_wide_line, "--wide should keep lines over 100 columns");
}

#[test]
fn ideal_fits_too_and_a_width_below_60_is_refused() {
    let dir = workspace_with_plans();
    let args: Vec<String> = [
        "ideal",
        "--d-prime",
        "1.3",
        "--presence",
        "0.6",
        "--payoffs",
        "1,4,1,1",
        "--scan",
        "0.1:10:9",
    ]
    .map(String::from)
    .to_vec();
    let fitted = printed(dir.path(), &args, &[]);
    assert!(widest(&fitted) <= 100, "{fitted}");
    let out = vigil(
        dir.path(),
        &["check", "plans/playback-yes-no.toml", "--width", "30"],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("60"), "{}", stderr(&out));
}
