//! `vigil pilot`'s population values against an independent NumPy/SciPy computation
//! (tests/golden/pilot_moments.json, written by tests/golden/pilot_files.py with the versions
//! in tests/golden/requirements.txt and recorded in the file's meta). The pilots go through
//! the CSV reader, so the test also pins how rows become count tables.

use serde_json::Value;
use std::path::Path;
use vigil::pilot::read::parse;
use vigil::pilot::{PilotFitSettings, PopulationSettings, analyse};
use vigil::vocab::RateCorrection;

mod common;

/// The golden pilot as a tidy CSV, in the spellings the reader documents.
fn csv_of(case: &Value) -> String {
    let rows = case["rows"].as_array().expect("rows");
    let conditions = rows.iter().any(|r| r["condition"].as_str() != Some(""));
    let mut out = String::from(if conditions {
        "animal,condition,stimulus,response,count\n"
    } else {
        "animal,stimulus,response,count\n"
    });
    for r in rows {
        let a = r["animal"].as_str().unwrap();
        let c = r["condition"].as_str().unwrap();
        let g = |k: &str| r[k].as_u64().unwrap();
        let cells = [
            ("present", "yes", g("hits")),
            ("present", "no", g("present") - g("hits")),
            ("absent", "yes", g("false_alarms")),
            ("absent", "no", g("absent") - g("false_alarms")),
        ];
        for (stim, resp, n) in cells {
            if conditions {
                out.push_str(&format!("{a},{c},{stim},{resp},{n}\n"));
            } else {
                out.push_str(&format!("{a},{stim},{resp},{n}\n"));
            }
        }
    }
    out
}

fn close(label: &str, ours: f64, golden: &Value, tol: f64) {
    let g = golden
        .as_f64()
        .unwrap_or_else(|| panic!("{label}: no golden value"));
    assert!(
        (ours - g).abs() <= tol * g.abs().max(1.0),
        "{label}: vigil {ours}, NumPy/SciPy {g}"
    );
}

// Tolerance 1e-10: both sides evaluate the same closed forms in double precision; the
// differences come from the normal, t and chi-square quantile routines (SciPy's against
// vigil's z and statrs' inverse CDFs); measured agreement when written: within 1e-13.
const TOL: f64 = 1e-10;

#[test]
fn moment_estimates_match_numpy_scipy() {
    let cases = common::golden_cases("pilot_moments.json");
    assert_eq!(cases.len(), 3, "the golden file holds three pilots");
    for case in &cases {
        let label = case["label"].as_str().unwrap();
        let data = parse(Path::new("golden.csv"), csv_of(case).as_bytes(), 2).unwrap();
        let settings = PilotFitSettings {
            correction: RateCorrection::LogLinear,
            boundary: 1,
        };
        let p = analyse(data, settings, PopulationSettings::default())
            .unwrap()
            .population;
        assert_eq!(
            p.animals as u64,
            case["animals"].as_u64().unwrap(),
            "{label}"
        );
        let checks = [
            ("mean_d_prime", p.d_prime.value),
            ("se_d_prime", p.d_prime.se),
            ("mean_d_prime_low", p.d_prime.interval.low),
            ("mean_d_prime_high", p.d_prime.interval.high),
            ("mean_criterion", p.criterion.value),
            ("se_criterion", p.criterion.se),
            ("mean_criterion_low", p.criterion.interval.low),
            ("mean_criterion_high", p.criterion.interval.high),
            ("sd_d_prime", p.sd_d_prime.value),
            ("sd_d_prime_low", p.sd_d_prime.interval.low),
            ("sd_d_prime_high", p.sd_d_prime.interval.high),
            ("sd_criterion", p.sd_criterion.value),
            ("sd_criterion_low", p.sd_criterion.interval.low),
            ("sd_criterion_high", p.sd_criterion.interval.high),
            ("observed_var_d_prime", p.observed_cov[0][0]),
            ("observed_var_criterion", p.observed_cov[1][1]),
            ("within_var_d_prime", p.within_cov[0][0]),
            ("within_var_criterion", p.within_cov[1][1]),
        ];
        for (key, ours) in checks {
            close(&format!("{label}: {key}"), ours, &case[key], TOL);
        }
        match (p.correlation.value, case["correlation"].as_f64()) {
            (Some(r), Some(g)) => close(&format!("{label}: correlation"), r, &Value::from(g), TOL),
            (None, None) => {}
            (ours, golden) => panic!("{label}: correlation vigil {ours:?}, NumPy {golden:?}"),
        }
    }
}
