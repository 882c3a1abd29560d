//! `vigil pilot` from the command line: a good pilot writes a plan `vigil check` accepts;
//! the spellings of R and pandas long tables read the same; every bad file is refused with
//! its file, line and column, exit code 2 and nothing written.

mod common;

use common::{stderr, stdout, vigil};
use std::path::Path;

const GOOD: &str = "animal,stimulus,response,count
a,present,yes,14
a,present,no,6
a,absent,yes,5
a,absent,no,15
b,present,yes,17
b,present,no,3
b,absent,yes,8
b,absent,no,12
c,present,yes,11
c,present,no,9
c,absent,yes,2
c,absent,no,18
d,present,yes,15
d,present,no,5
d,absent,yes,6
d,absent,no,14
";

/// Files in `dir` other than `keep`.
fn others(dir: &Path, keep: &str) -> Vec<String> {
    std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != keep)
        .collect()
}

/// Runs `vigil pilot pilot.csv --plan-out plan.toml EXTRA…` on `csv` in a fresh folder.
fn run_pilot(csv: &str, extra: &[&str]) -> (tempfile::TempDir, std::process::Output) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("pilot.csv"), csv).unwrap();
    let mut args = vec!["pilot", "pilot.csv", "--plan-out", "plan.toml"];
    args.extend_from_slice(extra);
    let out = vigil(dir.path(), &args);
    (dir, out)
}

#[test]
fn good_pilot_writes_a_plan_that_checks() {
    let (dir, out) = run_pilot(GOOD, &[]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("between-animal SD of c"), "{text}");
    assert!(
        text.contains("animal-welfare body"),
        "caution missing: {text}"
    );
    let plan = std::fs::read_to_string(dir.path().join("plan.toml")).unwrap();
    assert!(plan.contains("sd_criterion = "), "{plan}");
    assert!(
        plan.contains("from pilot.csv"),
        "each value names its pilot file: {plan}"
    );
    let check = vigil(dir.path(), &["check", "plan.toml"]);
    assert!(check.status.success(), "{}", stderr(&check));
    // Nothing but the pilot and the plan: the temporary file was renamed into place.
    let mut files = others(dir.path(), "pilot.csv");
    files.sort();
    assert_eq!(files, ["plan.toml"]);
}

/// The same counts as R's `write.csv` writes them (a quoted empty row-name column, dotted
/// names, TRUE/FALSE) and as pandas writes them (an index column, 1/0 stimulus codes,
/// float counts, capitalised headers, one row per trial summed): the same report.
#[test]
fn r_and_pandas_spellings_read_the_same() {
    let (_, canonical) = run_pilot(GOOD, &[]);
    let mut r = String::from("\"\",\"Animal.ID\",\"Stimulus\",\"Response\",\"n\"\n");
    let mut pandas = String::from(",Subject,Signal,Answer,Count\n");
    let mut row = 1;
    for line in GOOD.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let stim_r = if f[1] == "present" { "TRUE" } else { "FALSE" };
        let resp_r = if f[2] == "yes" { "TRUE" } else { "FALSE" };
        r.push_str(&format!(
            "\"{row}\",\"{}\",{stim_r},{resp_r},{}\n",
            f[0], f[3]
        ));
        let stim_p = if f[1] == "present" { "1" } else { "0" };
        let resp_p = if f[2] == "yes" { "Yes" } else { "No" };
        // One row per trial with a count of 1.0: the reader sums repeated cells.
        for _ in 0..f[3].parse::<u32>().unwrap() {
            pandas.push_str(&format!("{row},{},{stim_p},{resp_p},1.0\n", f[0]));
            row += 1;
        }
        row += 1;
    }
    for (name, text) in [("R", r), ("pandas", pandas)] {
        let (_, out) = run_pilot(&text, &[]);
        assert!(out.status.success(), "{name}: {}", stderr(&out));
        assert_eq!(stdout(&out), stdout(&canonical), "{name} spelling");
    }
}

/// A bad file: exit 2, a message naming file, line and column, and no file written.
fn refused(csv: &str, extra: &[&str], location: &str, problem: &str) {
    let (dir, out) = run_pilot(csv, extra);
    let err = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("pilot.csv"), "names the file: {err}");
    assert!(err.contains(location), "expected `{location}` in: {err}");
    assert!(err.contains(problem), "expected `{problem}` in: {err}");
    assert!(err.contains("allowed:"), "says what is allowed: {err}");
    assert!(!err.contains("panicked"), "{err}");
    assert!(
        others(dir.path(), "pilot.csv").is_empty(),
        "nothing written"
    );
}

fn with_line(line: usize, replacement: &str) -> String {
    GOOD.lines()
        .enumerate()
        .map(|(i, l)| if i + 1 == line { replacement } else { l })
        .collect::<Vec<_>>()
        .join("\n")
        + "\n"
}

#[test]
fn negative_count() {
    refused(
        &with_line(3, "a,present,no,-6"),
        &[],
        "line 3, column 4 (`count`)",
        "negative",
    );
}

#[test]
fn non_integer_count() {
    refused(
        &with_line(4, "a,absent,yes,5.5"),
        &[],
        "line 4, column 4 (`count`)",
        "not a whole number",
    );
}

#[test]
fn missing_count() {
    refused(
        &with_line(4, "a,absent,yes,NA"),
        &[],
        "line 4, column 4 (`count`)",
        "missing",
    );
}

#[test]
fn unknown_stimulus_label() {
    refused(
        &with_line(6, "b,hawk,yes,17"),
        &[],
        "line 6, column 2 (`stimulus`)",
        "unknown stimulus label `hawk`",
    );
}

#[test]
fn response_outside_the_yes_no_scale() {
    refused(
        &with_line(7, "b,present,2,3"),
        &[],
        "line 7, column 3 (`response`)",
        "not a category",
    );
}

#[test]
fn category_outside_a_graded_scale() {
    let csv = "animal,stimulus,response,count\na,present,4,3\na,absent,1,5\na,present,5,2\n";
    refused(
        csv,
        &["--categories", "4"],
        "line 4, column 3 (`response`)",
        "`5` is not a category",
    );
}

#[test]
fn animal_with_no_absent_trials() {
    let csv = GOOD.replace("c,absent,yes,2\nc,absent,no,18\n", "");
    refused(
        &csv,
        &[],
        "line 10, column 2 (`stimulus`)",
        "animal `c` (first row here) has no absent-stimulus trials",
    );
}

#[test]
fn animal_missing_a_condition() {
    let csv = "animal,condition,stimulus,response,count
a,open,present,yes,3
a,open,absent,no,3
a,cover,present,yes,3
a,cover,absent,no,3
b,open,present,yes,3
b,open,absent,yes,3
";
    refused(
        csv,
        &[],
        "line 6, column 2 (`condition`)",
        "no rows for condition `cover`",
    );
}

#[test]
fn missing_column() {
    let csv = GOOD.replace(
        "animal,stimulus,response,count",
        "animal,stimulus,response,cuont",
    );
    refused(&csv, &[], "line 1", "no count column");
}

#[test]
fn ragged_row() {
    refused(
        &with_line(5, "a,absent,no"),
        &[],
        "line 5",
        "3 fields but the header has 4",
    );
}

#[test]
fn empty_file() {
    refused("", &[], "pilot.csv", "the file is empty");
}

#[test]
fn header_only() {
    refused(
        "animal,stimulus,response,count\n",
        &[],
        "pilot.csv",
        "no data rows",
    );
}

#[test]
fn bad_options_are_refused_before_reading() {
    let (dir, out) = run_pilot(GOOD, &["--categories", "4", "--boundary", "4"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("--boundary"), "{}", stderr(&out));
    assert!(others(dir.path(), "pilot.csv").is_empty());
    let (dir, out) = run_pilot(GOOD, &["--rate-correction", "laplace"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("half-n"), "{}", stderr(&out));
    assert!(others(dir.path(), "pilot.csv").is_empty());
}

#[test]
fn unwritable_plan_path_fails_without_leftovers() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("pilot.csv"), GOOD).unwrap();
    let out = vigil(
        dir.path(),
        &[
            "pilot",
            "pilot.csv",
            "--plan-out",
            "no/such/folder/plan.toml",
        ],
    );
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("no/such/folder/plan.toml"));
    assert!(others(dir.path(), "pilot.csv").is_empty());
}

/// A graded pilot (4 categories, boundary 2) with two conditions: the rating fit per animal
/// and a skeleton with a scale and conditions that `vigil check` accepts.
#[test]
fn graded_pilot_with_conditions_writes_a_plan_that_checks() {
    let mut csv = String::from("Animal,Treatment,Stimulus,Rating,N\n");
    let shapes = [
        ([9, 6, 3, 2], [2, 4, 6, 8]),
        ([8, 7, 4, 1], [3, 3, 7, 7]),
        ([10, 5, 4, 1], [1, 5, 6, 8]),
        ([7, 7, 4, 2], [2, 3, 8, 7]),
        ([9, 8, 2, 1], [3, 5, 5, 7]),
    ];
    for (i, (absent, present)) in shapes.iter().enumerate() {
        for (cond, shift) in [("open", 0usize), ("cover", 1)] {
            for k in 0..4 {
                // The cover condition moves one count toward "absent" in each row.
                let a = absent[k] + usize::from(k == 0) * shift - usize::from(k == 3) * shift;
                let p = present[k] + usize::from(k == 0) * shift - usize::from(k == 3) * shift;
                csv.push_str(&format!(
                    "m{i},{cond},absent,{},{a}\nm{i},{cond},present,{},{p}\n",
                    k + 1,
                    k + 1
                ));
            }
        }
    }
    let (dir, out) = run_pilot(&csv, &["--categories", "4"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let plan = std::fs::read_to_string(dir.path().join("plan.toml")).unwrap();
    assert!(
        plan.contains("scale = { categories = 4, boundary = 2"),
        "{plan}"
    );
    assert!(plan.contains("name = \"cover\""), "{plan}");
    let check = vigil(dir.path(), &["check", "plan.toml"]);
    assert!(check.status.success(), "{}\n{plan}", stderr(&check));
}

/// Lines starting with `#` are comments (the bundled pilot is labelled that way) and still
/// count in the line numbers errors give.
#[test]
fn comment_lines_keep_line_numbers() {
    let csv = format!(
        "# invented\n# two comment lines\n{}",
        with_line(3, "a,present,no,x")
    );
    refused(
        &csv,
        &[],
        "line 5, column 4 (`count`)",
        "the count `x` is not a number",
    );
}

/// The README's excerpt of the bundled pilot's skeleton (the ```toml block under the
/// `<!-- file: pilot-plan.toml from vigil … -->` marker) is what the command writes: its
/// lines appear in the written file, in order and consecutive.
#[test]
fn readme_skeleton_excerpt_is_what_the_command_writes() {
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    let marker = "<!-- file: pilot-plan.toml from vigil ";
    let start = readme
        .find(marker)
        .expect("the README shows the skeleton excerpt");
    let rest = &readme[start + marker.len()..];
    let args: Vec<&str> = rest[..rest.find(" -->").unwrap()]
        .split_whitespace()
        .collect();
    let block = rest
        .split("```toml\n")
        .nth(1)
        .unwrap()
        .split("```")
        .next()
        .unwrap();
    let excerpt: Vec<&str> = block.lines().collect();
    assert!(excerpt.len() >= 3, "{excerpt:?}");
    let dir = common::workspace_with_plans();
    let out = vigil(dir.path(), &args);
    assert!(out.status.success(), "{}", stderr(&out));
    let written = std::fs::read_to_string(dir.path().join("pilot-plan.toml")).unwrap();
    let lines: Vec<&str> = written.lines().collect();
    let found = lines
        .windows(excerpt.len())
        .any(|w| w == excerpt.as_slice());
    assert!(
        found,
        "README excerpt not in the written skeleton:\n{written}"
    );
}

/// Under `--rate-correction none` an animal with a rate of 1 has no fit: it is named and left
/// out, and the others still give the population values.
#[test]
fn animal_without_a_fit_is_named_and_left_out() {
    let csv = GOOD.replace(
        "b,present,yes,17\nb,present,no,3",
        "b,present,yes,20\nb,present,no,0",
    );
    let (dir, out) = run_pilot(&csv, &["--rate-correction", "none"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("Left out: animal `b`"), "{text}");
    assert!(text.contains("3 animals with a fit"), "{text}");
    let check = vigil(dir.path(), &["check", "plan.toml"]);
    assert!(check.status.success(), "{}", stderr(&check));
}

/// Two animals give means and SDs but no correlation (it needs 3); one animal is refused.
#[test]
fn two_animals_suffice_for_sds_and_one_is_refused() {
    let two: String = GOOD.lines().take(9).map(|l| format!("{l}\n")).collect();
    let (dir, out) = run_pilot(&two, &[]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(stdout(&out).contains("needs 3 animals"), "{}", stdout(&out));
    let check = vigil(dir.path(), &["check", "plan.toml"]);
    assert!(check.status.success(), "{}", stderr(&check));
    let one: String = GOOD.lines().take(5).map(|l| format!("{l}\n")).collect();
    refused(&one, &[], "pilot.csv", "1 animal(s) with a fit");
}

/// A condition column with a single condition still writes a plan `vigil check` accepts.
#[test]
fn one_named_condition_writes_a_plan_that_checks() {
    let csv: String = GOOD
        .lines()
        .enumerate()
        .map(|(i, l)| {
            let (a, rest) = l.split_once(',').unwrap();
            if i == 0 {
                format!("{a},condition,{rest}\n")
            } else {
                format!("{a},open,{rest}\n")
            }
        })
        .collect();
    let (dir, out) = run_pilot(&csv, &[]);
    assert!(out.status.success(), "{}", stderr(&out));
    let check = vigil(dir.path(), &["check", "plan.toml"]);
    assert!(check.status.success(), "{}", stderr(&check));
}

/// The README's walk-through starts from `vigil pilot plans/pilot-vole-season.csv` and
/// continues with plans/vole-pilot-assurance.toml: every value that plan takes from the
/// pilot must be the one the skeleton holds (so the walk-through shows what the tool does).
#[test]
fn the_bundled_vole_plan_holds_the_pilot_skeletons_values() {
    let dir = tempfile::tempdir().unwrap();
    let csv = common::plans_dir().join("pilot-vole-season.csv");
    let out = vigil(
        dir.path(),
        &["pilot", csv.to_str().unwrap(), "--plan-out", "plan.toml"],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    let read =
        |p: &Path| -> toml::Table { toml::from_str(&std::fs::read_to_string(p).unwrap()).unwrap() };
    let skeleton = read(&dir.path().join("plan.toml"));
    let bundled = read(&common::plans_dir().join("vole-pilot-assurance.toml"));
    let at = |t: &toml::Table, path: &[&str]| -> toml::Value {
        let mut v = toml::Value::Table(t.clone());
        for k in path {
            v = v.get(*k).unwrap_or_else(|| panic!("no {path:?}")).clone();
        }
        v
    };
    for path in [
        &["observer", "d_prime"][..],
        &["observer", "criterion"],
        &["animals", "sd_d_prime"],
        &["animals", "sd_criterion"],
        &["animals", "correlation"],
        &["study", "rate_correction"],
        &["assurance", "draws"],
        &["assurance", "target"],
        &["assurance", "uncertain"],
    ] {
        assert_eq!(at(&skeleton, path), at(&bundled, path), "{path:?}");
    }
}
