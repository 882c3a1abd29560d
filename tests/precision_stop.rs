//! `[study.precision]`: each scenario runs until its Monte Carlo error is as small as asked,
//! stopping at the first chunk boundary where it is, with the bits of a fixed run of that
//! count at any thread count.
//!
//! The power SE is recomputed here from the printed rejection counts with Wilson's (1927)
//! interval, written out independently of the crate: SE = half-width ÷ 1.959964.

mod common;
use common::{rejected, stderr, vigil_env};
use serde_json::Value;

const Z: f64 = 1.959_963_984_540_054;

fn plan(precision: &str) -> String {
    format!(
        "[study]\ntitle = \"precision stop (invented)\"\nseed = 7\nexperiments = 500\n\
         [study.precision]\n{precision}\n\
         [observer]\nd_prime = 1.0\ncriterion = 0.3\n\
         [[design]]\nname = \"yes/no\"\npresence = 0.5\ntrials = [20, 80]\n\
         [[hypothesis]]\nname = \"bias\"\nkind = \"bias\"\n"
    )
}

/// Runs the plan at `threads` threads; returns (stdout, CSV, JSON).
fn run(text: &str, threads: &str, extra: &[&str]) -> (String, String, Value) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("p.toml"), text).unwrap();
    let mut args = vec!["run", "p.toml", "--csv", "o.csv", "--json", "o.json"];
    args.extend_from_slice(extra);
    let out = vigil_env(dir.path(), &args, &[("RAYON_NUM_THREADS", threads)]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let csv = std::fs::read_to_string(dir.path().join("o.csv")).unwrap();
    let json = std::fs::read_to_string(dir.path().join("o.json")).unwrap();
    (
        String::from_utf8_lossy(&out.stdout).into_owned(),
        csv,
        serde_json::from_str(&json).unwrap(),
    )
}

/// Wilson (1927) 95% half-width ÷ z of x rejections in n.
fn wilson_se(x: f64, n: f64) -> f64 {
    let p = x / n;
    let z2 = Z * Z;
    Z / (1.0 + z2 / n) * (p * (1.0 - p) / n + z2 / (4.0 * n * n)).sqrt() / Z
}

/// The largest power SE of one scenario's JSON record.
fn worst_power_se(result: &Value) -> f64 {
    let n = result["datasets"]["total"].as_f64().unwrap();
    result["tests"]
        .as_array()
        .unwrap()
        .iter()
        .flat_map(|t| [&t["wald"]["value"], &t["likelihood_ratio"]["value"]])
        .map(|v| wilson_se((v.as_f64().unwrap() * n).round(), n))
        .fold(0.0, f64::max)
}

#[test]
fn power_target_is_met_at_the_first_chunk_that_meets_it() {
    let (_, _, json) = run(&plan("power_se = 0.01"), "2", &[]);
    for r in json["results"].as_array().unwrap() {
        let n = r["datasets"]["total"].as_f64().unwrap() as u64;
        assert_eq!(r["precision_met"], Value::Bool(true));
        assert_eq!(n % 256, 0, "stops at a chunk boundary: {n}");
        assert!(worst_power_se(r) <= 0.01, "target not met at {n}");
        // One chunk fewer (when past the fewest, 500) must still miss the target.
        if n - 256 >= 500 {
            let fewer = format!("{}", n - 256);
            let trials = r["scenario"]["trials"].as_u64().unwrap();
            let (_, _, fixed) = run(&plan("power_se = 0.01"), "2", &["--experiments", &fewer]);
            let same = fixed["results"]
                .as_array()
                .unwrap()
                .iter()
                .find(|f| f["scenario"]["trials"].as_u64() == Some(trials))
                .unwrap();
            assert!(worst_power_se(same) > 0.01, "could have stopped at {fewer}");
        }
    }
}

#[test]
fn same_bytes_at_one_and_two_threads_and_as_a_fixed_run_of_that_count() {
    let text = plan("power_se = 0.01");
    let (out1, csv1, json1) = run(&text, "1", &[]);
    let (out2, csv2, _) = run(&text, "2", &[]);
    assert_eq!(out1, out2);
    assert_eq!(csv1, csv2);
    assert!(out1.contains("Experiments simulated:"), "{out1}");
    // Each row equals the row of a fixed run at the count it stopped at.
    for (row, r) in json1["results"].as_array().unwrap().iter().enumerate() {
        let n = format!("{}", r["datasets"]["total"].as_f64().unwrap());
        let (_, fixed, _) = run(&text, "2", &["--experiments", &n]);
        let lines = |csv: &str| -> Vec<String> {
            csv.lines()
                .skip(1 + 2 * row)
                .take(2)
                .map(str::to_string)
                .collect()
        };
        assert_eq!(lines(&csv1), lines(&fixed), "row {row} at {n}");
    }
}

#[test]
fn mean_target_holds_in_the_csv() {
    let (_, csv, json) = run(&plan("mean_se_per_sd = 0.03"), "2", &[]);
    let mut reader = csv::Reader::from_reader(csv.as_bytes());
    let headers = reader.headers().unwrap().clone();
    let col = |name: &str| headers.iter().position(|h| h == name).unwrap();
    for rec in reader.records() {
        let rec = rec.unwrap();
        let se: f64 = rec[col("mean_mc_se")].parse().unwrap();
        let sd: f64 = rec[col("sd")].parse().unwrap();
        assert!(se <= 0.03 * sd, "{se} > 3% of {sd}");
    }
    // SE = SD/√n ≤ 0.03·SD needs n ≥ 1/0.03² = 1111.1 usable datasets: the first chunk
    // boundary past that is 1280 when every fit is usable.
    for r in json["results"].as_array().unwrap() {
        assert!(r["datasets"]["total"].as_f64().unwrap() >= 1280.0);
    }
}

#[test]
fn a_ceiling_reached_first_is_said() {
    let (out, _, json) = run(&plan("power_se = 0.001\nmax_experiments = 1000"), "2", &[]);
    for r in json["results"].as_array().unwrap() {
        assert_eq!(r["precision_met"], Value::Bool(false));
        assert_eq!(r["datasets"]["total"].as_f64(), Some(1000.0));
    }
    assert!(
        out.contains("Warning: at 20 trials, 80 trials the ceiling"),
        "{out}"
    );
}

#[test]
fn bad_precision_tables_are_located() {
    let msg = rejected(&plan(""), 5, "study.precision");
    assert!(msg.contains("names no target"), "{msg}");
    let msg = rejected(&plan("power_se = 0.5"), 6, "study.precision.power_se");
    assert!(msg.contains("outside"), "{msg}");
    let msg = rejected(
        &plan("power_se = 0.01\nmax_experiments = 100"),
        7,
        "study.precision.max_experiments",
    );
    assert!(msg.contains("the plan's experiments"), "{msg}");
}

#[test]
fn parts_and_checkpoints_are_refused() {
    for args in [
        &["--part", "1/2", "--part-file", "x.json"][..],
        &["--checkpoint", "c.json"][..],
    ] {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("p.toml"), plan("power_se = 0.01")).unwrap();
        let mut all = vec!["run", "p.toml"];
        all.extend_from_slice(args);
        let out = vigil_env(dir.path(), &all, &[]);
        assert_eq!(out.status.code(), Some(2));
        assert!(
            stderr(&out).contains("[study.precision]"),
            "{}",
            stderr(&out)
        );
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
    }
}
