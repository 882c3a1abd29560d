//! Split runs: `vigil run --part K/N` on every part, then `vigil merge`, must give the bytes
//! of one whole run (terminal, CSV, JSON) for every bundled plan, in any order of the parts;
//! the merge refuses parts of another plan, seed or version, repeated parts and missing ones.
//!
//! The reference is the whole run itself: the contract is equality of bytes, so no
//! tolerance applies. 700 experiments make three chunks per point (256 + 256 + 188), so
//! with 7 parts some parts hold one chunk of a point, some none, and the last chunk is short.

mod common;

use common::{bundled_plan_names, stderr, stdout, vigil, vigil_env, workspace_with_plans};
use std::path::Path;
use std::process::{Command, Stdio};

const EXPERIMENTS: &str = "700";

/// Terminal text, CSV and JSON of a whole run.
fn whole(dir: &Path, plan: &str) -> (String, Vec<u8>, Vec<u8>) {
    let out = vigil(
        dir,
        &[
            "run",
            plan,
            "-q",
            "--experiments",
            EXPERIMENTS,
            "--csv",
            "whole.csv",
            "--json",
            "whole.json",
        ],
    );
    assert!(out.status.success(), "{}", stderr(&out));
    (
        stdout(&out),
        std::fs::read(dir.join("whole.csv")).unwrap(),
        std::fs::read(dir.join("whole.json")).unwrap(),
    )
}

/// Runs part k of n into `part-k-of-n.json`; returns the file name.
fn part(dir: &Path, plan: &str, k: u32, n: u32) -> String {
    let file = format!("part-{k}-of-{n}.json");
    let spec = format!("{k}/{n}");
    let out = vigil(
        dir,
        &[
            "run",
            plan,
            "-q",
            "--experiments",
            EXPERIMENTS,
            "--part",
            &spec,
            "--part-file",
            &file,
        ],
    );
    assert!(out.status.success(), "part {spec}: {}", stderr(&out));
    file
}

/// Merges `files` (in the order given); returns terminal text, CSV and JSON.
fn merge(dir: &Path, plan: &str, files: &[String]) -> (String, Vec<u8>, Vec<u8>) {
    let mut args = vec![
        "merge",
        plan,
        "-q",
        "--csv",
        "merged.csv",
        "--json",
        "merged.json",
    ];
    args.extend(files.iter().map(String::as_str));
    let out = vigil(dir, &args);
    assert!(out.status.success(), "merge: {}", stderr(&out));
    let bytes = (
        stdout(&out),
        std::fs::read(dir.join("merged.csv")).unwrap(),
        std::fs::read(dir.join("merged.json")).unwrap(),
    );
    std::fs::remove_file(dir.join("merged.csv")).unwrap();
    std::fs::remove_file(dir.join("merged.json")).unwrap();
    bytes
}

/// A failed merge: exit 2, the message, and no output file left behind.
fn refused(dir: &Path, plan: &str, files: &[&str]) -> String {
    let mut args = vec!["merge", plan, "-q", "--json", "refused.json"];
    args.extend(files);
    let out = vigil(dir, &args);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(
        !dir.join("refused.json").exists(),
        "a refused merge wrote output"
    );
    let leftovers: Vec<_> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().contains(".tmp"))
        .collect();
    assert!(leftovers.is_empty(), "temporary files left: {leftovers:?}");
    stderr(&out)
}

#[test]
fn parts_of_every_bundled_plan_merge_to_the_whole_run() {
    let names = bundled_plan_names();
    assert!(names.len() >= 5, "bundled plans are missing: {names:?}");
    for name in names {
        let ws = workspace_with_plans();
        let dir = ws.path();
        let plan = format!("plans/{name}.toml");
        let expected = whole(dir, &plan);
        for n in [1u32, 2, 7] {
            let mut files: Vec<String> = (1..=n).map(|k| part(dir, &plan, k, n)).collect();
            let forward = merge(dir, &plan, &files);
            assert!(
                forward.0 == expected.0,
                "{name}, {n} parts: terminal differs"
            );
            assert!(forward.1 == expected.1, "{name}, {n} parts: CSV differs");
            assert!(forward.2 == expected.2, "{name}, {n} parts: JSON differs");
            // Any order of the files gives the same bytes.
            files.reverse();
            files.rotate_left(n as usize / 2);
            assert!(
                merge(dir, &plan, &files) == forward,
                "{name}, {n} parts: order matters"
            );
        }
    }
}

#[test]
fn seven_parts_as_parallel_processes_merge_to_the_whole_run() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let plan = "plans/predator-model-colony.toml";
    let expected = whole(dir, plan);
    // Seven separate processes at once, one thread each, as a job array would run them.
    let children: Vec<_> = (1..=7)
        .map(|k| {
            Command::new(env!("CARGO_BIN_EXE_vigil"))
                .current_dir(dir)
                .env("RAYON_NUM_THREADS", "1")
                .args(["run", plan, "-q", "--experiments", EXPERIMENTS])
                .args(["--part", &format!("{k}/7"), "--part-file"])
                .arg(format!("part-{k}.json"))
                .stdout(Stdio::null())
                .stderr(Stdio::piped())
                .spawn()
                .expect("vigil starts")
        })
        .collect();
    for child in children {
        let out = child.wait_with_output().unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let files: Vec<String> = (1..=7).map(|k| format!("part-{k}.json")).collect();
    assert!(merge(dir, plan, &files) == expected);
}

#[test]
fn merge_refuses_parts_of_another_plan_seed_or_version() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let plan = "plans/playback-yes-no.toml";
    let text = std::fs::read_to_string(dir.join(plan)).unwrap();
    let files: Vec<String> = (1..=3).map(|k| part(dir, plan, k, 3)).collect();

    // Another seed: the same plan with seed 20261201 changed.
    assert!(text.contains("seed = 20261201"));
    std::fs::write(
        dir.join("reseeded.toml"),
        text.replace("seed = 20261201", "seed = 5"),
    )
    .unwrap();
    let msg = refused(
        dir,
        "reseeded.toml",
        &["part-1-of-3.json", "part-2-of-3.json", "part-3-of-3.json"],
    );
    assert!(
        msg.contains("part-1-of-3.json") && msg.contains("seed 20261201"),
        "{msg}"
    );

    // Another plan: the same seed, one more comment line.
    std::fs::write(dir.join("edited.toml"), format!("{text}\n# edited\n")).unwrap();
    let msg = refused(
        dir,
        "edited.toml",
        &["part-1-of-3.json", "part-2-of-3.json", "part-3-of-3.json"],
    );
    assert!(
        msg.contains("part-1-of-3.json") && msg.contains("another plan"),
        "{msg}"
    );

    // Another version of vigil.
    let body = std::fs::read_to_string(dir.join(&files[1])).unwrap();
    let version = format!("\"vigil_version\":\"{}\"", env!("CARGO_PKG_VERSION"));
    assert!(body.contains(&version));
    std::fs::write(
        dir.join("old.json"),
        body.replace(&version, "\"vigil_version\":\"0.0.1\""),
    )
    .unwrap();
    let msg = refused(
        dir,
        plan,
        &["part-1-of-3.json", "old.json", "part-3-of-3.json"],
    );
    assert!(
        msg.contains("old.json") && msg.contains("vigil 0.0.1"),
        "{msg}"
    );

    // Not a partial-results file at all.
    let msg = refused(dir, plan, &["part-1-of-3.json", plan]);
    assert!(msg.contains("not a vigil partial-results file"), "{msg}");
}

#[test]
fn merge_refuses_repeated_overlapping_and_missing_parts() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let plan = "plans/sentinel-error-records.toml";
    for k in 1..=7 {
        part(dir, plan, k, 7);
    }
    let all: Vec<String> = (1..=7).map(|k| format!("part-{k}-of-7.json")).collect();
    let all: Vec<&str> = all.iter().map(String::as_str).collect();

    // The same part twice, under another name.
    std::fs::copy(dir.join("part-4-of-7.json"), dir.join("copy.json")).unwrap();
    let mut twice = all.clone();
    twice.push("copy.json");
    let msg = refused(dir, plan, &twice);
    assert!(
        msg.contains("copy.json")
            && msg.contains("part 4 of 7")
            && msg.contains("part-4-of-7.json"),
        "{msg}"
    );

    // Parts of two different splits overlap.
    part(dir, plan, 1, 2);
    let mut mixed = all.clone();
    mixed[0] = "part-1-of-2.json";
    let msg = refused(dir, plan, &mixed);
    assert!(
        msg.contains("part-1-of-2.json") && msg.contains("number of parts"),
        "{msg}"
    );

    // Missing parts are named by number.
    let msg = refused(dir, plan, &[all[0], all[1], all[3], all[5]]);
    assert!(msg.contains("missing parts 3, 5, 7 of 7"), "{msg}");
    let msg = refused(dir, plan, &[all[0], all[1], all[2], all[3], all[4], all[6]]);
    assert!(msg.contains("missing part 6 of 7"), "{msg}");

    // A file whose chunks were edited.
    let body = std::fs::read_to_string(dir.join(all[2])).unwrap();
    assert!(body.contains("\"chunk\":0"), "part 3 holds a chunk 0");
    std::fs::write(
        dir.join("edited.json"),
        body.replacen("\"chunk\":0", "\"chunk\":1", 1),
    )
    .unwrap();
    let mut edited = all.clone();
    edited[2] = "edited.json";
    let msg = refused(dir, plan, &edited);
    assert!(
        msg.contains("edited.json") && msg.contains("other chunks than part 3 of 7"),
        "{msg}"
    );
}

#[test]
fn part_options_are_checked_before_any_work() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let plan = "plans/playback-yes-no.toml";
    let cases: [(&[&str], &str); 5] = [
        (&["--part", "0/4", "--part-file", "p.json"], "1 ≤ K ≤ N"),
        (&["--part", "5/4", "--part-file", "p.json"], "1 ≤ K ≤ N"),
        (&["--part", "1/4"], "--part needs --part-file"),
        (&["--part-file", "p.json"], "--part-file needs --part"),
        (
            &["--part", "1/4", "--part-file", "p.json", "--json", "x.json"],
            "--csv, --json and --tables are written by `vigil merge",
        ),
    ];
    for (extra, expected) in cases {
        let mut args = vec!["run", plan, "-q"];
        args.extend(extra);
        let out = vigil_env(dir, &args, &[]);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {}", stderr(&out));
        assert!(
            stderr(&out).contains(expected),
            "{args:?}: {}",
            stderr(&out)
        );
        assert!(!dir.join("p.json").exists() && !dir.join("x.json").exists());
    }
}

#[test]
fn the_slurm_script_runs_the_part_of_its_array_index() {
    let ws = workspace_with_plans();
    let dir = ws.path();
    let plan = "plans/graded-alarm-response.toml";
    let expected = whole(dir, plan);
    let script = Path::new(env!("CARGO_MANIFEST_DIR")).join("scripts/vigil-array.sbatch");
    let bin = Path::new(env!("CARGO_BIN_EXE_vigil")).parent().unwrap();
    let path = format!(
        "{}:{}",
        bin.display(),
        std::env::var("PATH").unwrap_or_default()
    );
    // What SLURM sets for the tasks of `sbatch --array=1-3`.
    for k in 1..=3 {
        let out = Command::new("bash")
            .arg(&script)
            .args([plan, "parts", "--experiments", EXPERIMENTS])
            .current_dir(dir)
            .env("PATH", &path)
            .env("SLURM_ARRAY_TASK_ID", k.to_string())
            .env("SLURM_ARRAY_TASK_MIN", "1")
            .env("SLURM_ARRAY_TASK_MAX", "3")
            .env("SLURM_ARRAY_TASK_COUNT", "3")
            .env("SLURM_CPUS_PER_TASK", "1")
            .output()
            .unwrap();
        assert!(out.status.success(), "task {k}: {}", stderr(&out));
    }
    let files: Vec<String> = (1..=3).map(|k| format!("parts/part-{k}.json")).collect();
    assert!(merge(dir, plan, &files) == expected);
    // An array with a step is refused: its indices are not the parts 1..N.
    let out = Command::new("bash")
        .arg(&script)
        .arg(plan)
        .current_dir(dir)
        .env("PATH", &path)
        .env("SLURM_ARRAY_TASK_ID", "3")
        .env("SLURM_ARRAY_TASK_MIN", "1")
        .env("SLURM_ARRAY_TASK_MAX", "5")
        .env("SLURM_ARRAY_TASK_COUNT", "3")
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains("--array=1-N"));
}
