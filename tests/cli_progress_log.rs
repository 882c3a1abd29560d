//! `--log`: one parseable line per phase on stderr, for a plan with a sample-size search,
//! for the colony plan (groups grid and effort split) and for a split run and its merge;
//! stdout is the same bytes with or without it, and without it stderr stays empty when it
//! is not a terminal (the bar hides) or with -q.

mod common;

use std::collections::BTreeMap;

const EXPERIMENTS: u64 = 20;

/// One log line as its fields; panics (fails the test) on a line that is not
/// `vigil-phase key=value ...` with values either bare words or JSON strings.
fn parse(line: &str) -> BTreeMap<String, String> {
    let rest = line
        .strip_prefix("vigil-phase ")
        .unwrap_or_else(|| panic!("not a phase line: {line:?}"));
    let mut fields = BTreeMap::new();
    let mut s = rest;
    while !s.is_empty() {
        let (key, after) = s.split_once('=').expect("key=value");
        assert!(!key.contains(' '), "bad key in {line:?}");
        let (value, tail) = if after.starts_with('"') {
            let mut de = serde_json::Deserializer::from_str(after).into_iter::<String>();
            let v = de.next().expect("a JSON string").expect("valid JSON");
            let used = de.byte_offset();
            (v, &after[used..])
        } else {
            match after.split_once(' ') {
                Some((v, t)) => (v.to_string(), t),
                None => (after.to_string(), ""),
            }
        };
        fields.insert(key.to_string(), value);
        s = tail.strip_prefix(' ').unwrap_or(tail);
    }
    for key in ["phase", "units", "seconds"] {
        assert!(fields.contains_key(key), "{key} missing in {line:?}");
    }
    fields["units"].parse::<u64>().expect("units is a count");
    let secs: f64 = fields["seconds"].parse().expect("seconds is a number");
    assert!(secs >= 0.0);
    fields
}

fn phases(stderr: &str) -> Vec<BTreeMap<String, String>> {
    stderr.lines().map(parse).collect()
}

fn units(f: &BTreeMap<String, String>) -> u64 {
    f["units"].parse().unwrap()
}

fn run(dir: &std::path::Path, plan: &str, extra: &[&str]) -> std::process::Output {
    let n = EXPERIMENTS.to_string();
    let mut args = vec!["run", plan, "--experiments", &n];
    args.extend_from_slice(extra);
    let out = common::vigil(dir, &args);
    assert!(out.status.success(), "{}", common::stderr(&out));
    out
}

#[test]
fn a_search_plan_logs_the_table_then_numbered_search_rounds() {
    let dir = common::workspace_with_plans();
    let plan = "plans/base-rate-shift.toml";
    let logged = run(dir.path(), plan, &["--log"]);
    let lines = phases(&common::stderr(&logged));
    // The plan lists 3 designs × 4 trial counts = 12 scenarios (plans/base-rate-shift.toml).
    assert_eq!(lines[0]["phase"], "table");
    assert_eq!(lines[0]["scenarios"], "12");
    assert_eq!(units(&lines[0]), 12 * EXPERIMENTS);
    let search = &lines[1..];
    assert!(!search.is_empty(), "the plan has targets, so a search runs");
    let mut round_of: BTreeMap<String, u64> = BTreeMap::new();
    for f in search {
        assert_eq!(f["phase"], "search");
        // Each round is one Monte Carlo evaluation of `experiments` datasets.
        assert_eq!(units(f), EXPERIMENTS);
        let next = round_of.entry(f["design"].clone()).or_insert(0);
        *next += 1;
        assert_eq!(f["round"], next.to_string(), "rounds count up per design");
        f["trials"].parse::<u32>().expect("trials is a count");
    }
    assert_eq!(round_of.len(), 3, "every design is searched: {round_of:?}");
    // The log goes to stderr only: stdout is the same bytes without it.
    let plain = run(dir.path(), plan, &[]);
    assert_eq!(plain.stdout, logged.stdout);
    assert!(
        plain.stderr.is_empty(),
        "no bar when stderr is not a terminal"
    );
    let quiet = run(dir.path(), plan, &["-q"]);
    assert_eq!(quiet.stdout, logged.stdout);
    assert!(quiet.stderr.is_empty());
}

#[test]
fn the_colony_plan_logs_table_groups_grid_and_effort_split() {
    let dir = common::workspace_with_plans();
    let plan = "plans/predator-model-colony.toml";
    let logged = run(dir.path(), plan, &["--log"]);
    let lines = phases(&common::stderr(&logged));
    let names: Vec<&str> = lines.iter().map(|f| f["phase"].as_str()).collect();
    assert_eq!(names, ["table", "groups", "effort"]);
    assert_eq!(units(&lines[0]), 4 * EXPERIMENTS);
    // 4 animal counts × 3 trial counts under the cap of 60 (plans/predator-model-colony.toml).
    assert_eq!(units(&lines[1]), 12 * EXPERIMENTS);
    assert_eq!(lines[1]["design"], "flee or stay");
    assert!(
        units(&lines[2]) > 0,
        "the effort split simulates its candidates"
    );
    assert_eq!(run(dir.path(), plan, &[]).stdout, logged.stdout);
}

#[test]
fn a_split_run_logs_its_part_and_the_merge_then_what_the_merge_finishes() {
    let dir = common::workspace_with_plans();
    let plan = "plans/predator-model-colony.toml";
    let mut total = 0;
    for k in 1..=2 {
        let (part, file) = (format!("{k}/2"), format!("p{k}.json"));
        let out = run(
            dir.path(),
            plan,
            &["--part", &part, "--part-file", &file, "--log"],
        );
        let lines = phases(&common::stderr(&out));
        assert_eq!(lines.len(), 1);
        assert_eq!(lines[0]["phase"], "part");
        assert_eq!(lines[0]["part"], part);
        total += units(&lines[0]);
    }
    // The parts share the fixed points: 4 scenarios and 12 grid points.
    assert_eq!(total, 16 * EXPERIMENTS);
    let out = common::vigil(dir.path(), &["merge", plan, "p1.json", "p2.json", "--log"]);
    assert!(out.status.success(), "{}", common::stderr(&out));
    let lines = phases(&common::stderr(&out));
    let names: Vec<&str> = lines.iter().map(|f| f["phase"].as_str()).collect();
    assert_eq!(names, ["merge", "table", "groups", "effort"]);
    assert_eq!(lines[0]["parts"], "2");
    // The fixed points come from the parts; only the effort split simulates.
    assert_eq!(units(&lines[1]) + units(&lines[2]), 0);
    assert!(units(&lines[3]) > 0);
}

#[test]
fn log_and_quiet_together_are_refused() {
    let dir = common::workspace_with_plans();
    let out = common::vigil(
        dir.path(),
        &["run", "plans/playback-yes-no.toml", "--log", "-q"],
    );
    assert_eq!(out.status.code(), Some(2));
    assert!(common::stderr(&out).contains("--log"));
}
