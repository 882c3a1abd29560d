//! Property over plans generated from the bundled ones (key deletions, type swaps, extreme
//! numbers, unicode whitespace, truncation): `vigil check` accepting a plan means
//! `vigil run --experiments 5` finishes with exit 0 and a JSON file holding only finite
//! numbers (or null); a refusal is exit 2 naming a line; nothing ever panics (exit 101).
//!
//! Bounded: a fixed seed and a fixed number of cases (override with PROPTEST_CASES and
//! VIGIL_MUTATION_SEED, a number 0–255, to search further), each one or two short runs of
//! the binary. Counts that scale the work (trials, animals,
//! budgets) get small, out-of-range or budget-sized extremes (a total of 1e308); a run that
//! the work limit refuses (exit 2 naming `--allow-long-run`, before any work) keeps the
//! promise too, since `check` cannot know this machine's speed.

mod common;

use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestCaseError, TestRng, TestRunner};
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

const PLANS: [&str; 5] = [
    "playback-yes-no.toml",
    "graded-alarm-response.toml",
    "base-rate-shift.toml",
    "predator-model-colony.toml",
    "sentinel-error-records.toml",
];

/// Values of another type (or the same type, out of place) for a key.
const SWAPS: [&str; 10] = [
    "\"text\"",
    "7",
    "-2.5",
    "true",
    "[1, 2]",
    "[]",
    "{ a = 1 }",
    "\"optimal\"",
    "[\"d_prime\", \"criterion\"]",
    "1979-05-27",
];

/// Extreme numbers for parameters of the model (TOML spells nan and inf as bare words).
const EXTREMES: [&str; 19] = [
    "0",
    "-0.0",
    "-1",
    "1",
    "0.5",
    "2",
    "1e-9",
    "1e-17",
    "1e-300",
    "5e-324",
    "1e17",
    "1e300",
    "1.7976931348623157e308",
    "-1e300",
    "0.999999999999",
    "nan",
    "inf",
    "-inf",
    "9223372036854775807",
];

/// Keys whose value scales the work of a run; they get these instead.
const SIZE_KEYS: [&str; 9] = [
    "trials",
    "counts",
    "total",
    "experiments",
    "max_trials",
    "census",
    "trial_cap",
    "cost_per_animal",
    "cost_per_trial",
];
const SIZE_EXTREMES: [&str; 11] = [
    "0",
    "1",
    "2",
    "3",
    "-1",
    "500",
    "1000001",
    "9223372036854775807",
    "2.5",
    "1e17",
    "1e308",
];

/// Lines (or small tables) a plan author might add anywhere: they reach the rules that
/// link keys (sharing, ideal criteria, hypotheses on designs) rather than single values.
const INSERTS: [&str; 22] = [
    "d_prime = 2",
    "criterion = 0.4",
    "criterion = \"optimal\"",
    "shared = [\"criterion\"]",
    "shared = [\"d_prime\", \"criterion\"]",
    "shared = [\"base_rate\"]",
    "shared = []",
    "presence = 0.35",
    "record = \"error-totals\"",
    "base_rate = \"unknown\"",
    "lapse_rate = 0.1",
    "sigma = 2",
    "criterion_fraction = 0.5",
    "census = 10",
    "[[design.condition]]\nname = \"extra\"\npresence = 0.45",
    "[[hypothesis]]\nname = \"ideal\"\nkind = \"ideal-criterion\"",
    "[[hypothesis]]\nname = \"sens\"\nkind = \"sensitivity-difference\"\nconditions = [\"rare hawks\", \"common hawks\"]",
    "[[hypothesis]]\nname = \"sigma\"\nkind = \"unequal-variance\"",
    "[[hypothesis]]\nname = \"bias\"\nkind = \"bias\"",
    "[targets]\nhalf_width = { criterion = 0.3 }",
    "[animals]\ncounts = [4]",
    "[observer.payoffs]\nvalue_hit = 1\ncost_miss = 2\nvalue_correct_rejection = 1\ncost_false_alarm = 1",
];

/// Characters that pasted text brings: unicode spaces, line separators, zero-width ones.
const SPACES: [char; 8] = [
    '\u{a0}', '\u{3000}', '\u{2003}', '\u{2028}', '\u{85}', '\u{200b}', '\u{feff}', '\t',
];

#[derive(Debug, Clone)]
enum Mutation {
    /// Delete the n-th key or table header line.
    DeleteLine(usize),
    /// Give the n-th key a value from [`SWAPS`].
    SwapType(usize, usize),
    /// Replace the n-th number with an extreme.
    Extreme(usize, usize),
    /// Insert a character of [`SPACES`] at the start of line n (indentation) or, when the
    /// flag is set, at the n-th character.
    Unicode(usize, usize, bool),
    /// Insert a line of [`INSERTS`] before line n.
    Insert(usize, usize),
    /// Keep only the first n‰ of the text.
    Truncate(usize),
    /// Prefix a byte-order mark.
    Bom,
}

fn mutation() -> impl Strategy<Value = Mutation> {
    prop_oneof![
        3 => any::<usize>().prop_map(Mutation::DeleteLine),
        3 => (any::<usize>(), 0..SWAPS.len()).prop_map(|(k, v)| Mutation::SwapType(k, v)),
        5 => (any::<usize>(), any::<usize>()).prop_map(|(k, v)| Mutation::Extreme(k, v)),
        4 => (any::<usize>(), 0..SPACES.len(), any::<bool>())
            .prop_map(|(k, c, anywhere)| Mutation::Unicode(k, c, anywhere)),
        4 => (any::<usize>(), 0..INSERTS.len()).prop_map(|(k, v)| Mutation::Insert(k, v)),
        1 => (0usize..1000).prop_map(Mutation::Truncate),
        1 => Just(Mutation::Bom),
    ]
}

/// Byte ranges of the lines of `text` that hold a key (`key = …`) or a table header.
fn key_lines(text: &str, headers: bool) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    let mut start = 0;
    for line in text.split_inclusive('\n') {
        let t = line.trim_start();
        let is_key =
            t.starts_with(|c: char| c.is_ascii_alphabetic() || c == '"') && t.contains('=');
        if is_key || (headers && t.starts_with('[')) {
            out.push((start, start + line.len()));
        }
        start += line.len();
    }
    out
}

/// Byte ranges of number literals outside comments and strings, with the key of their line.
fn numbers(text: &str) -> Vec<(usize, usize, String)> {
    let mut out = Vec::new();
    let mut start = 0;
    for line in text.split_inclusive('\n') {
        let code = line.split('#').next().unwrap_or("");
        let key = code.split('=').next().unwrap_or("").trim().to_string();
        let bytes = code.as_bytes();
        let (mut i, mut in_string) = (code.find('=').map_or(code.len(), |e| e + 1), false);
        while i < bytes.len() {
            let b = bytes[i];
            if b == b'"' {
                in_string = !in_string;
            }
            let starts = b.is_ascii_digit()
                || (b == b'-' && bytes.get(i + 1).is_some_and(u8::is_ascii_digit));
            if !in_string && starts && (i == 0 || !bytes[i - 1].is_ascii_alphanumeric()) {
                let mut j = i + 1;
                while j < bytes.len()
                    && (bytes[j].is_ascii_alphanumeric() || b".+-_".contains(&bytes[j]))
                {
                    j += 1;
                }
                out.push((start + i, start + j, key.clone()));
                i = j;
            } else {
                i += 1;
            }
        }
        start += line.len();
    }
    out
}

/// The character boundary of `text` at or before byte `i`.
fn boundary(text: &str, mut i: usize) -> usize {
    i = i.min(text.len());
    while !text.is_char_boundary(i) {
        i -= 1;
    }
    i
}

fn apply(text: &str, m: &Mutation) -> String {
    let mut t = text.to_string();
    match *m {
        Mutation::DeleteLine(k) => {
            let lines = key_lines(&t, true);
            if !lines.is_empty() {
                let (a, b) = lines[k % lines.len()];
                t.replace_range(a..b, "");
            }
        }
        Mutation::SwapType(k, v) => {
            let lines = key_lines(&t, false);
            if !lines.is_empty() {
                let (a, b) = lines[k % lines.len()];
                let eq = a + t[a..b].find('=').unwrap_or(0);
                let end = if t[a..b].ends_with('\n') { b - 1 } else { b };
                t.replace_range(eq + 1..end, &format!(" {}", SWAPS[v]));
            }
        }
        Mutation::Extreme(k, v) => {
            let nums = numbers(&t);
            if !nums.is_empty() {
                let (a, b, key) = &nums[k % nums.len()];
                let value = if SIZE_KEYS.contains(&key.as_str()) {
                    SIZE_EXTREMES[v % SIZE_EXTREMES.len()]
                } else {
                    EXTREMES[v % EXTREMES.len()]
                };
                t.replace_range(*a..*b, value);
            }
        }
        Mutation::Unicode(k, c, anywhere) => {
            let at = if anywhere {
                boundary(&t, k % (t.len() + 1))
            } else {
                let starts: Vec<usize> = std::iter::once(0)
                    .chain(t.match_indices('\n').map(|(i, _)| i + 1))
                    .filter(|&i| i < t.len())
                    .collect();
                starts.get(k % starts.len().max(1)).copied().unwrap_or(0)
            };
            t.insert(at, SPACES[c]);
        }
        Mutation::Insert(k, v) => {
            let starts: Vec<usize> = std::iter::once(0)
                .chain(t.match_indices('\n').map(|(i, _)| i + 1))
                .collect();
            let at = starts[k % starts.len()];
            t.insert_str(at, &format!("{}\n", INSERTS[v]));
        }
        Mutation::Truncate(per_mille) => {
            let at = boundary(&t, t.len() * per_mille / 1000);
            t.truncate(at);
        }
        Mutation::Bom => t.insert(0, '\u{feff}'),
    }
    t
}

/// Exit code, standard error; the process is killed (and the case failed) after a minute.
fn run_vigil(dir: &Path, args: &[&str]) -> Result<(Option<i32>, String), TestCaseError> {
    let out = std::fs::File::create(dir.join("stdout.txt")).unwrap();
    let err = std::fs::File::create(dir.join("stderr.txt")).unwrap();
    let mut child = Command::new(env!("CARGO_BIN_EXE_vigil"))
        .current_dir(dir)
        .args(args)
        .stdout(Stdio::from(out))
        .stderr(Stdio::from(err))
        .spawn()
        .expect("vigil starts");
    let deadline = Instant::now() + Duration::from_secs(60);
    let status = loop {
        if let Some(status) = child.try_wait().unwrap() {
            break status;
        }
        if Instant::now() > deadline {
            child.kill().ok();
            child.wait().ok();
            return Err(TestCaseError::fail(format!(
                "vigil {args:?} ran over a minute"
            )));
        }
        std::thread::sleep(Duration::from_millis(5));
    };
    let stderr = std::fs::read_to_string(dir.join("stderr.txt")).unwrap_or_default();
    Ok((status.code(), stderr))
}

/// Whether a message names a line: "…, line 12, key …".
fn names_a_line(msg: &str) -> bool {
    msg.match_indices("line ")
        .any(|(i, m)| msg[i + m.len()..].starts_with(|c: char| c.is_ascii_digit()))
}

fn only_finite_numbers(v: &serde_json::Value) -> bool {
    match v {
        serde_json::Value::Number(n) => n.as_f64().is_some_and(f64::is_finite),
        serde_json::Value::Array(a) => a.iter().all(only_finite_numbers),
        serde_json::Value::Object(o) => o.values().all(only_finite_numbers),
        _ => true,
    }
}

/// The property for one plan text.
fn check_keeps_its_promise(text: &str) -> Result<bool, TestCaseError> {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("plan.toml"), text).unwrap();
    let (code, msg) = run_vigil(dir.path(), &["check", "plan.toml"])?;
    prop_assert!(!msg.contains("panicked"), "check panicked: {msg}");
    match code {
        Some(0) => {}
        Some(2) => {
            prop_assert!(names_a_line(&msg), "refusal without a line: {msg}");
            return Ok(false);
        }
        other => return Err(TestCaseError::fail(format!("check exit {other:?}: {msg}"))),
    }
    let args = [
        "run",
        "plan.toml",
        "--experiments",
        "5",
        "-q",
        "--json",
        "out.json",
    ];
    let (code, msg) = run_vigil(dir.path(), &args)?;
    prop_assert!(!msg.contains("panicked"), "run panicked: {msg}");
    if code == Some(2) && msg.contains("--allow-long-run") {
        prop_assert!(!dir.path().join("out.json").exists(), "refused but wrote");
        return Ok(false);
    }
    prop_assert_eq!(code, Some(0), "check passed but run failed: {}", msg);
    let json = std::fs::read_to_string(dir.path().join("out.json"))
        .map_err(|e| TestCaseError::fail(format!("no JSON written: {e}")))?;
    let value: serde_json::Value = serde_json::from_str(&json)
        .map_err(|e| TestCaseError::fail(format!("JSON does not parse: {e}")))?;
    prop_assert!(only_finite_numbers(&value), "non-finite number in the JSON");
    // The terminal report never spells NaN or inf (defect 7 of issue 11).
    let report = std::fs::read_to_string(dir.path().join("stdout.txt")).unwrap_or_default();
    let bad = ["NaN", "inf ", "inf)", "inf,", "-inf", "+inf"];
    prop_assert!(
        !bad.iter().any(|b| report.contains(b)),
        "NaN or inf in the report:\n{}",
        report
    );
    Ok(true)
}

#[test]
fn check_passing_means_run_finishes() {
    let texts: Vec<String> = PLANS.iter().map(|p| common::plan_text(p)).collect();
    let mut config = Config {
        cases: 200,
        max_shrink_iters: 200,
        failure_persistence: None,
        ..Config::default()
    };
    if let Some(n) = std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
    {
        config.cases = n;
    }
    let seed: u8 = std::env::var("VIGIL_MUTATION_SEED")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(11);
    let mut runner = TestRunner::new_with_rng(
        config,
        TestRng::from_seed(RngAlgorithm::ChaCha, &[seed; 32]),
    );
    let strategy = (0..PLANS.len(), prop::collection::vec(mutation(), 1..=3));
    let accepted = std::sync::atomic::AtomicU32::new(0);
    let result = runner.run(&strategy, |(plan, mutations)| {
        let text = mutations
            .iter()
            .fold(texts[plan].clone(), |t, m| apply(&t, m));
        if check_keeps_its_promise(&text)? {
            accepted.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        }
        Ok(())
    });
    if let Err(e) = result {
        panic!("{e}");
    }
    // The property says nothing if no mutated plan passes check: make sure some do.
    let accepted = accepted.into_inner();
    eprintln!("{accepted} of the generated plans passed check and were run");
    assert!(accepted > 0, "no generated plan passed check");
}

#[test]
fn mutations_change_the_text() {
    let text = common::plan_text("graded-alarm-response.toml");
    assert_ne!(apply(&text, &Mutation::DeleteLine(3)), text);
    assert_ne!(apply(&text, &Mutation::SwapType(3, 0)), text);
    assert_ne!(apply(&text, &Mutation::Extreme(3, 9)), text);
    assert!(apply(&text, &Mutation::Unicode(3, 0, false)).contains('\u{a0}'));
    assert!(apply(&text, &Mutation::Truncate(500)).len() < text.len());
    assert!(apply(&text, &Mutation::Insert(3, 0)).contains("\nd_prime = 2\n"));
    // Numbers are found in values and arrays, with their key.
    let nums = numbers("trials = [20, 40]\nd_prime = -1.5e3 # 7\nname = \"a 9\"\n");
    let keys: Vec<&str> = nums.iter().map(|n| n.2.as_str()).collect();
    assert_eq!(keys, ["trials", "trials", "d_prime"]);
}
