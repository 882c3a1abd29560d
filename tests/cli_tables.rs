//! `vigil run --tables DIR`: every table read back with the csv crate and checked against
//! the figure the terminal prints for the same run (parsed from the terminal text), the
//! files byte-identical at 1 and 2 threads and after a split run's merge, the estimates
//! the bytes of `--csv`, the JSON holding every point the search evaluated, and unsafe
//! paths refused before any work.
//!
//! The reference here is the terminal report of the same run: the CSV must carry the
//! number the user reads. Each comparison allows half a unit of the terminal's last
//! printed digit (it rounds; the CSV keeps full precision), plus 1e-9 for the binary
//! representation of the printed decimal.

mod common;

use common::{stderr, stdout, vigil_env, vigil_wide, workspace_with_plans};
use std::collections::HashMap;
use std::path::Path;

const FILES: [&str; 5] = [
    "estimates.csv",
    "power.csv",
    "search.csv",
    "group_grid.csv",
    "effort.csv",
];

/// One table as rows of (column → value).
fn read(dir: &Path, file: &str) -> Vec<HashMap<String, String>> {
    let mut r = csv::Reader::from_path(dir.join(file)).unwrap();
    let header: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            assert_eq!(rec.len(), header.len(), "{file}: ragged row");
            header
                .iter()
                .cloned()
                .zip(rec.iter().map(String::from))
                .collect()
        })
        .collect()
}

fn f(row: &HashMap<String, String>, column: &str) -> f64 {
    row[column]
        .parse()
        .unwrap_or_else(|_| panic!("{column} = {:?} is not a number", row[column]))
}

/// `csv` equals the printed decimal `printed` to its last digit (times `scale`, e.g. 100
/// for a percentage).
fn agrees(csv: f64, printed: &str, scale: f64) {
    let decimals = printed.split('.').nth(1).map_or(0, str::len);
    let half = 0.5 * 10f64.powi(-(decimals as i32));
    let p: f64 = printed.trim_end_matches('%').parse().unwrap();
    assert!(
        (csv * scale - p).abs() <= half + 1e-9,
        "CSV {csv} against the terminal's {printed}"
    );
}

/// The numbers of a terminal line, in order (`61.3% (55.7–66.7)` gives 61.3, 55.7, 66.7).
fn numbers(line: &str) -> Vec<String> {
    line.split(|c: char| !(c.is_ascii_digit() || c == '.' || c == '-'))
        .filter(|t| t.chars().any(|c| c.is_ascii_digit()))
        .map(String::from)
        .collect()
}

/// The first line after `marker` (a line containing it) that starts with `start` once
/// trimmed.
fn line_after<'a>(text: &'a str, marker: &str, start: &str) -> &'a str {
    text.lines()
        .skip_while(|l| !l.contains(marker))
        .find(|l| l.trim_start().starts_with(start))
        .unwrap_or_else(|| panic!("no line starting {start:?} after {marker:?}"))
}

/// Runs `args` with 1 and 2 threads; the tables must agree byte for byte. Returns the
/// terminal text.
fn run_twice(dir: &Path, args: &[&str]) -> String {
    let mut outputs = Vec::new();
    for threads in ["1", "2"] {
        let tb = dir.join(format!("tb{threads}"));
        std::fs::create_dir(&tb).unwrap();
        let mut a: Vec<&str> = args.to_vec();
        let name = format!("tb{threads}");
        a.extend(["--tables", &name, "--wide"]);
        let out = vigil_env(dir, &a, &[("RAYON_NUM_THREADS", threads)]);
        assert!(out.status.success(), "{}", stderr(&out));
        let bytes: Vec<Vec<u8>> = FILES
            .iter()
            .map(|f| std::fs::read(tb.join(f)).unwrap())
            .collect();
        outputs.push((stdout(&out), bytes));
    }
    assert_eq!(outputs[0].0, outputs[1].0, "terminal differs by threads");
    for (i, f) in FILES.iter().enumerate() {
        assert!(
            outputs[0].1[i] == outputs[1].1[i],
            "{f} differs between 1 and 2 threads"
        );
    }
    outputs.remove(0).0
}

#[test]
fn single_animal_tables_hold_the_terminal_figures() {
    let dir = workspace_with_plans();
    let args = [
        "run",
        "plans/base-rate-shift.toml",
        "-q",
        "--experiments",
        "300",
        "--csv",
        "run.csv",
        "--json",
        "run.json",
    ];
    let term = run_twice(dir.path(), &args);
    let tb = dir.path().join("tb1");
    // The estimates are the bytes of --csv.
    assert_eq!(
        std::fs::read(tb.join("estimates.csv")).unwrap(),
        std::fs::read(dir.path().join("run.csv")).unwrap()
    );
    // Estimates: "40 … d′ 1.300 1.258 ± 0.019 …" in the yes/no section.
    let line = line_after(&term, "■ yes/no", "40");
    let n = numbers(line);
    let est = read(&tb, "estimates.csv");
    let row = est
        .iter()
        .find(|r| r["design"] == "yes/no" && r["trials"] == "40" && r["quantity"] == "d_prime")
        .unwrap();
    agrees(f(row, "truth"), &n[1], 1.0);
    agrees(f(row, "mean"), &n[2], 1.0);
    agrees(f(row, "mean_mc_se"), &n[3], 1.0);
    // Power: "40   criterion shift   46.3% (40.8–52.0)   37.7% (32.4–43.3)" (the two tests
    // differ here, so a swapped column fails).
    let line = line_after(&term, "■ errors + census", "40   criterion shift");
    let n = numbers(line);
    let power = read(&tb, "power.csv");
    for (test, at) in [("likelihood-ratio", 1), ("wald", 4)] {
        let row = power
            .iter()
            .find(|r| {
                r["design"] == "errors + census"
                    && r["trials"] == "40"
                    && r["hypothesis"] == "criterion shift"
                    && r["test"] == test
            })
            .unwrap();
        agrees(f(row, "rejection_rate"), &n[at], 100.0);
        agrees(f(row, "rejection_low"), &n[at + 1], 100.0);
        agrees(f(row, "rejection_high"), &n[at + 2], 100.0);
        assert_eq!(row["null_true"], "false");
        assert_eq!(row["datasets"], "300");
    }
    // Search: the verdict's "yes/no   73 ± 5   power ≥ 0.8 …   0.800 (0.751–0.841)   72".
    let line = line_after(&term, "■ Verdict", "yes/no");
    let n = numbers(line);
    let search = read(&tb, "search.csv");
    let rows: Vec<_> = search.iter().filter(|r| r["design"] == "yes/no").collect();
    let answer: Vec<_> = rows.iter().filter(|r| r["answer"] == "true").collect();
    assert_eq!(answer.len(), 1, "one target, one answer row");
    assert_eq!(answer[0]["trials"], n[0]);
    assert_eq!(answer[0]["all_met"], "true");
    agrees(f(answer[0], "threshold"), &n[2], 1.0);
    agrees(f(answer[0], "value"), &n[3], 1.0);
    agrees(f(answer[0], "low"), &n[4], 1.0);
    agrees(f(answer[0], "high"), &n[5], 1.0);
    // The search bisects to adjacent counts: one below the answer was evaluated and failed.
    let below = (answer[0]["trials"].parse::<u32>().unwrap() - 1).to_string();
    assert!(
        rows.iter()
            .any(|r| r["trials"] == below && r["all_met"] == "false"),
        "no failing evaluation at {below} trials"
    );
    // The JSON keeps every evaluated point, as many as the search reports it made.
    let json: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("run.json")).unwrap()).unwrap();
    let first = &json["searches"][0];
    let evaluated = first["evaluated"].as_array().unwrap();
    assert_eq!(
        evaluated.len() as u64,
        first["outcome"]["evaluations"].as_u64().unwrap()
    );
    assert_eq!(evaluated.len(), rows.len());
    assert!(evaluated.len() > 2);
    // No groups in this plan: those tables hold their header only.
    for file in ["group_grid.csv", "effort.csv"] {
        assert!(read(&tb, file).is_empty(), "{file}");
        let text = std::fs::read_to_string(tb.join(file)).unwrap();
        assert_eq!(text.lines().count(), 1, "{file} has a header");
    }
}

#[test]
fn group_tables_hold_the_terminal_figures() {
    let dir = workspace_with_plans();
    let args = [
        "run",
        "plans/predator-model-colony.toml",
        "-q",
        "--experiments",
        "300",
    ];
    let term = run_twice(dir.path(), &args);
    let tb = dir.path().join("tb1");
    let grid = read(&tb, "group_grid.csv");
    let cell = |animals: &str, trials: &str, analysis: &str| {
        grid.iter()
            .find(|r| {
                r["design"] == "flee or stay"
                    && r["animals"] == animals
                    && r["trials"] == trials
                    && r["analysis"] == analysis
                    && r["test"] == "jumpy"
            })
            .unwrap_or_else(|| panic!("no row {animals} × {trials} {analysis}"))
    };
    // Two-stage power: "8   0.38 (0.32–0.43)   0.45 (0.39–0.51)   0.48 (0.43–0.54)" at
    // 20, 40, 60 trials.
    let n = numbers(line_after(&term, "two-stage power [95%]", "8 "));
    for (k, trials) in ["20", "40", "60"].iter().enumerate() {
        let row = cell("8", trials, "two-stage");
        agrees(f(row, "rejection_rate"), &n[1 + 3 * k], 1.0);
        agrees(f(row, "rejection_low"), &n[2 + 3 * k], 1.0);
        agrees(f(row, "rejection_high"), &n[3 + 3 * k], 1.0);
    }
    // Pooled: "24   0.89 · 0.07 …" (rejection rate · rejection rate of the true value).
    let n = numbers(line_after(&term, "pooled test's rejection rate", "24 "));
    let row = cell("24", "20", "pooled");
    agrees(f(row, "rejection_rate"), &n[1], 1.0);
    agrees(f(row, "true_value_rejection_rate"), &n[2], 1.0);
    // Group mean of c: "12   0.121 · 96.0% …" (mean SE · coverage).
    let n = numbers(line_after(&term, "Group mean of c", "12 "));
    let row = cell("12", "20", "two-stage");
    agrees(f(row, "criterion_mean_se"), &n[1], 1.0);
    agrees(f(row, "criterion_coverage"), &n[2], 100.0);
    // Effort, budget frontier: the row marked "← best".
    let effort = read(&tb, "effort.csv");
    let best_line = term
        .lines()
        .find(|l| l.contains("← best"))
        .expect("a best row");
    let n = numbers(best_line);
    let best: Vec<_> = effort
        .iter()
        .filter(|r| r["best_for_budget"] == "true")
        .collect();
    assert_eq!(best.len(), 1);
    let b = best[0];
    assert_eq!(b["frontier"], "budget");
    assert_eq!(b["trials_per_animal"], n[0]);
    assert_eq!(b["animals"], n[1]);
    agrees(f(b, "cost"), &n[2], 1.0);
    agrees(f(b, "approx_power"), &n[3], 1.0);
    agrees(f(b, "power"), &n[4], 1.0);
    agrees(f(b, "power_low"), &n[5], 1.0);
    agrees(f(b, "power_high"), &n[6], 1.0);
    agrees(f(b, "criterion_half_width"), &n[7], 1.0);
    // Targets frontier: "20   25 ± 2   5750   0.80   0.81 (0.76–0.85)   0.175   24: power 0.770
    // ← least cost".
    let least_line = term
        .lines()
        .find(|l| l.contains("← least cost"))
        .expect("a least-cost row");
    let n = numbers(least_line);
    let least: Vec<_> = effort
        .iter()
        .filter(|r| r["least_cost"] == "true")
        .collect();
    assert_eq!(least.len(), 1);
    let l = least[0];
    assert_eq!(l["frontier"], "targets");
    assert_eq!(l["trials_per_animal"], n[0]);
    assert_eq!(l["animals"], n[1]);
    assert_eq!(l["animals_band"], n[2]);
    agrees(f(l, "cost"), &n[3], 1.0);
    agrees(f(l, "power"), &n[5], 1.0);
    agrees(f(l, "criterion_half_width"), &n[8], 1.0);
    assert_eq!(l["one_fewer_animals"], n[9]);
    agrees(f(l, "one_fewer_power"), &n[10], 1.0);
    assert_eq!(l["meets_targets"], "true");
    // No sample-size search with [animals]: the search table holds its header only.
    assert!(read(&tb, "search.csv").is_empty());
}

#[test]
fn a_merged_split_run_writes_the_same_tables() {
    let dir = workspace_with_plans();
    let plan = "plans/predator-model-colony.toml";
    std::fs::create_dir(dir.path().join("whole")).unwrap();
    std::fs::create_dir(dir.path().join("merged")).unwrap();
    let ok = |args: &[&str]| {
        let out = vigil_wide(dir.path(), args);
        assert!(out.status.success(), "{args:?}: {}", stderr(&out));
    };
    ok(&[
        "run",
        plan,
        "-q",
        "--experiments",
        "200",
        "--tables",
        "whole",
    ]);
    for k in ["1/2", "2/2"] {
        let file = format!("part{}.json", &k[..1]);
        ok(&[
            "run",
            plan,
            "-q",
            "--experiments",
            "200",
            "--part",
            k,
            "--part-file",
            &file,
        ]);
    }
    // The merge takes the experiments from the parts.
    ok(&[
        "merge",
        plan,
        "part1.json",
        "part2.json",
        "-q",
        "--tables",
        "merged",
    ]);
    for file in FILES {
        assert!(
            std::fs::read(dir.path().join("whole").join(file)).unwrap()
                == std::fs::read(dir.path().join("merged").join(file)).unwrap(),
            "{file} differs between the whole run and the merge"
        );
    }
}

/// `vigil run` with `extra` fails with exit 2 before any work, naming `why`, and leaves
/// the folder `tb` as it was (holding only `keep`).
fn refused(dir: &Path, extra: &[&str], why: &str, keep: &[&str]) {
    let mut args = vec!["run", "plans/playback-yes-no.toml", "-q"];
    args.extend(extra);
    let out = vigil_wide(dir, &args);
    assert_eq!(out.status.code(), Some(2), "{extra:?}: {}", stderr(&out));
    let err = stderr(&out);
    assert!(err.contains("--tables") || err.contains("--part"), "{err}");
    assert!(err.contains(why), "{extra:?}: {err}");
    let mut left: Vec<String> = std::fs::read_dir(dir.join("tb"))
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    left.sort();
    assert_eq!(left, keep, "{extra:?}");
}

#[test]
fn unsafe_table_folders_and_files_are_refused_before_any_work() {
    let dir = workspace_with_plans();
    let d = dir.path();
    std::fs::create_dir(d.join("tb")).unwrap();
    refused(d, &["--tables", "missing"], "does not exist", &[]);
    refused(d, &["--tables", "-"], "standard output", &[]);
    refused(
        d,
        &["--tables", "plans/base-rate-shift.toml"],
        "not a folder",
        &[],
    );
    refused(
        d,
        &["--tables", "tb", "--csv", "tb/estimates.csv"],
        "names the same file",
        &[],
    );
    refused(
        d,
        &["--tables", "tb", "--part", "1/2", "--part-file", "p.json"],
        "--tables",
        &[],
    );
    #[cfg(unix)]
    {
        std::os::unix::fs::symlink("../elsewhere.csv", d.join("tb/power.csv")).unwrap();
        refused(d, &["--tables", "tb"], "symbolic link", &["power.csv"]);
        assert!(!d.join("elsewhere.csv").exists());
    }
}
