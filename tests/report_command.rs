//! `vigil report` end to end: the folder and what it holds, the justification against the
//! verdict table, failures before any simulation, and the README's figure.

mod common;

use common::{stderr, stdout, vigil_wide, workspace_with_plans};
use std::collections::BTreeSet;
use std::path::Path;

/// Every number in `text` as written (digits with an optional decimal part).
fn numbers(text: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    for ch in text.chars().chain(std::iter::once(' ')) {
        if ch.is_ascii_digit() || (ch == '.' && !cur.is_empty() && !cur.contains('.')) {
            cur.push(ch);
        } else if !cur.is_empty() {
            out.push(cur.trim_end_matches('.').to_string());
            cur.clear();
        }
    }
    out
}

/// The data rows of the terminal's verdict table: cells split on runs of 2+ spaces.
fn verdict_rows(terminal: &str) -> Vec<Vec<String>> {
    let start = terminal
        .lines()
        .position(|l| l.starts_with("■ Verdict"))
        .expect("a verdict block");
    terminal
        .lines()
        .skip(start + 2)
        .take_while(|l| !l.starts_with("Power is"))
        .filter(|l| !l.trim_start().starts_with('─') && !l.trim().is_empty())
        .map(|l| {
            l.split("  ")
                .map(str::trim)
                .filter(|c| !c.is_empty())
                .map(String::from)
                .collect()
        })
        .collect()
}

/// "0.803 (0.755–0.844)": the power with its interval, as both texts write it.
fn power_triples(text: &str) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    for (i, _) in text.match_indices(" (0.") {
        let head: String = text[..i]
            .chars()
            .rev()
            .take_while(|c| c.is_ascii_digit() || *c == '.')
            .collect::<Vec<_>>()
            .into_iter()
            .rev()
            .collect();
        if let Some(end) = text[i..].find(')') {
            out.insert(format!("{head}{}", &text[i..i + end + 1]));
        }
    }
    out
}

#[test]
fn justification_states_exactly_the_verdict_numbers() {
    let dir = workspace_with_plans();
    let plan = "plans/base-rate-shift.toml";
    let run = vigil_wide(dir.path(), &["run", plan, "--quiet"]);
    assert!(run.status.success(), "{}", stderr(&run));
    let report = vigil_wide(dir.path(), &["report", plan, "--out", "out", "--quiet"]);
    assert!(report.status.success(), "{}", stderr(&report));
    let rows = verdict_rows(&stdout(&run));
    assert_eq!(rows.len(), 3, "{rows:?}");
    let justification = std::fs::read_to_string(dir.path().join("out/justification.md")).unwrap();
    let found: BTreeSet<String> = numbers(&justification).into_iter().collect();
    for row in &rows {
        // [design, trials ± band, binding target, value (low–high), expected information]
        assert_eq!(row.len(), 5, "{row:?}");
        assert!(
            justification.contains(&format!("\"{}\"", row[0])),
            "{}",
            row[0]
        );
        assert!(
            justification.contains(&format!("{} trials per condition", row[1])),
            "{row:?}"
        );
        assert!(justification.contains(&row[3]), "{row:?}\n{justification}");
        assert!(
            justification.contains(&format!("put it at {}", row[4])),
            "{row:?}"
        );
        for n in row[1..].iter().flat_map(|c| numbers(c)) {
            assert!(
                found.contains(&n),
                "{n} of {row:?} is not in the justification"
            );
        }
    }
    // Exactly: the powers the justification states are the verdict's, no more, no fewer.
    let verdict_powers: BTreeSet<String> = rows.iter().map(|r| r[3].clone()).collect();
    assert_eq!(power_triples(&justification), verdict_powers);
    assert!(justification.contains("animal-welfare body"));
    assert!(justification.contains("Reduction principle"));
    assert!(justification.contains(&format!("vigil {}", env!("CARGO_PKG_VERSION"))));
    assert!(justification.contains("seed 90210"));
}

#[test]
fn report_folder_holds_a_self_contained_page_and_every_file() {
    let dir = workspace_with_plans();
    let out = vigil_wide(
        dir.path(),
        &[
            "report",
            "plans/playback-yes-no.toml",
            "--out",
            "rep",
            "--experiments",
            "150",
            "-q",
        ],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(stdout(&out).contains("index.html"));
    let rep = dir.path().join("rep");
    for f in [
        "index.html",
        "report.md",
        "justification.md",
        "results.csv",
        "results.json",
        "plan.toml",
        ".vigil-report",
        "tables/estimates.csv",
        "tables/power.csv",
        "tables/search.csv",
        "tables/group_grid.csv",
        "tables/effort.csv",
    ] {
        assert!(rep.join(f).is_file(), "{f} missing");
    }
    // The folder's estimates table is the bytes of its results.csv.
    assert_eq!(
        std::fs::read(rep.join("tables/estimates.csv")).unwrap(),
        std::fs::read(rep.join("results.csv")).unwrap()
    );
    let figures: Vec<_> = std::fs::read_dir(rep.join("figures")).unwrap().collect();
    assert!(figures.len() >= 6, "{} figures", figures.len());
    let html = std::fs::read_to_string(rep.join("index.html")).unwrap();
    assert_eq!(html.matches("<svg ").count(), figures.len());
    // Self-contained: nothing fetched, no script.
    assert!(!html.contains("<script"));
    assert!(!html.contains("src=\"http") && !html.contains("href=\"http"));
    assert!(html.contains("animal-welfare body") && html.contains("Reduction principle"));
    let md = std::fs::read_to_string(rep.join("report.md")).unwrap();
    assert_eq!(md.matches("](figures/").count(), figures.len());
    assert!(md.contains("Justification"));
    let plan_copy = std::fs::read_to_string(rep.join("plan.toml")).unwrap();
    assert_eq!(plan_copy, common::plan_text("playback-yes-no.toml"));
    let mut csv = csv::Reader::from_path(rep.join("results.csv")).unwrap();
    assert!(csv.records().count() > 0);
    // A second run replaces the folder vigil wrote, leaving no temporary siblings.
    let again = vigil_wide(
        dir.path(),
        &[
            "report",
            "plans/playback-yes-no.toml",
            "--out",
            "rep",
            "--experiments",
            "150",
            "-q",
        ],
    );
    assert!(again.status.success(), "{}", stderr(&again));
    let siblings: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(siblings.len(), 2, "{siblings:?}"); // plans/ and rep/
}

#[test]
fn a_bad_folder_fails_before_any_simulation_with_exit_2() {
    let dir = workspace_with_plans();
    // 10⁸ experiments would run for hours: a prompt exit proves nothing was simulated.
    let slow = ["--experiments", "100000000", "-q"];
    let missing = vigil_wide(
        dir.path(),
        &[
            &[
                "report",
                "plans/base-rate-shift.toml",
                "--out",
                "no/such/folder",
            ][..],
            &slow,
        ]
        .concat(),
    );
    assert_eq!(missing.status.code(), Some(2), "{}", stderr(&missing));
    assert!(stderr(&missing).contains("no/such/folder"));
    assert!(stderr(&missing).contains("allowed:"));
    // A folder of the user's is never replaced.
    std::fs::create_dir(dir.path().join("mine")).unwrap();
    std::fs::write(dir.path().join("mine/notes.txt"), "keep").unwrap();
    let theirs = vigil_wide(
        dir.path(),
        &[
            &["report", "plans/base-rate-shift.toml", "--out", "mine"][..],
            &slow,
        ]
        .concat(),
    );
    assert_eq!(theirs.status.code(), Some(2));
    assert!(stderr(&theirs).contains("not a vigil report folder"));
    assert_eq!(
        std::fs::read_to_string(dir.path().join("mine/notes.txt")).unwrap(),
        "keep"
    );
    let entries = std::fs::read_dir(dir.path()).unwrap().count();
    assert_eq!(entries, 2, "a temporary folder was left behind");
}

#[test]
fn values_source_is_quoted_and_checked() {
    let dir = tempfile::tempdir().unwrap();
    let text = common::plan_text("playback-yes-no.toml").replacen(
        "[study]\n",
        "[study]\nvalues_source = \"pilot season 2025, 9 birds (invented)\"\n",
        1,
    );
    assert!(
        text.contains("values_source"),
        "the plan has a [study] line"
    );
    std::fs::write(dir.path().join("p.toml"), &text).unwrap();
    let out = vigil_wide(
        dir.path(),
        &[
            "report",
            "p.toml",
            "--out",
            "r",
            "--experiments",
            "100",
            "-q",
        ],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let j = std::fs::read_to_string(dir.path().join("r/justification.md")).unwrap();
    assert!(
        j.contains("these values come from pilot season 2025, 9 birds (invented)."),
        "{j}"
    );
    let bad = text.replace("pilot season 2025, 9 birds (invented)", "  ");
    std::fs::write(dir.path().join("bad.toml"), bad).unwrap();
    let out = vigil_wide(dir.path(), &["check", "bad.toml"]);
    assert_eq!(out.status.code(), Some(2));
    let err = stderr(&out);
    assert!(
        err.contains("values_source") && err.contains("is empty"),
        "{err}"
    );
}

/// The README's figure is the one `vigil report` draws for the colony plan, byte for byte.
#[test]
fn readme_figure_is_what_the_command_draws() {
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    let command = "vigil report plans/predator-model-colony.toml --out colony-report";
    assert!(readme.contains(command), "the README shows the command");
    assert!(readme.contains("docs/figures/colony-group-power.svg"));
    let dir = workspace_with_plans();
    let args: Vec<&str> = command.split(' ').skip(1).chain(["-q"]).collect();
    let out = vigil_wide(dir.path(), &args);
    assert!(out.status.success(), "{}", stderr(&out));
    let drawn = std::fs::read_to_string(
        dir.path()
            .join("colony-report/figures/07-groups-power-flee-or-stay-jumpy.svg"),
    )
    .unwrap();
    let committed = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/figures/colony-group-power.svg"),
    )
    .unwrap();
    assert!(
        drawn == committed,
        "docs/figures/colony-group-power.svg is out of date: rerun the command and copy the figure"
    );
}

/// The folder's every byte is the same on one thread and on two.
#[test]
fn report_folder_is_identical_for_one_and_two_threads() {
    let dir = workspace_with_plans();
    for (threads, out) in [("1", "one"), ("2", "two")] {
        let run = common::vigil_env(
            dir.path(),
            &[
                "report",
                "plans/base-rate-shift.toml",
                "--out",
                out,
                "--experiments",
                "200",
                "-q",
            ],
            &[("RAYON_NUM_THREADS", threads)],
        );
        assert!(run.status.success(), "{}", stderr(&run));
    }
    let files = |root: &Path| -> Vec<(String, Vec<u8>)> {
        let mut out = Vec::new();
        let mut stack = vec![root.to_path_buf()];
        while let Some(d) = stack.pop() {
            for e in std::fs::read_dir(&d).unwrap() {
                let p = e.unwrap().path();
                if p.is_dir() {
                    stack.push(p);
                } else {
                    let rel = p.strip_prefix(root).unwrap().display().to_string();
                    out.push((rel, std::fs::read(&p).unwrap()));
                }
            }
        }
        out.sort();
        out
    };
    let (one, two) = (
        files(&dir.path().join("one")),
        files(&dir.path().join("two")),
    );
    assert!(one.len() > 8);
    assert_eq!(one.len(), two.len());
    for (a, b) in one.iter().zip(&two) {
        assert_eq!(a.0, b.0);
        assert!(a.1 == b.1, "{} differs between thread counts", a.0);
    }
}
