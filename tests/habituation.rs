//! Habituation within a session (docs/groups.md, "Habituation"): expected counts per block
//! against the probit formula written out here, the simulation against those expectations,
//! the trend analysis's lack of bias, the stationary analysis's bias against the pseudo-true
//! value of the summed expected table, zero habituation bit for bit, located refusals.

mod common;

use statrs::distribution::{ContinuousCDF, Normal};
use vigil::design::habituation::{Analysis, Habituation, Order};
use vigil::design::{Condition, Split};
use vigil::groups::animal::AnimalPath;
use vigil::groups::habituation::HabituatedYesNo;
use vigil::groups::population::Deviation;
use vigil::model::Observer;
use vigil::simulate::replicate_rng;
use vigil::vocab::RateCorrection;

const D: f64 = 1.2;
const C: f64 = -0.25;

fn path(
    trials: u32,
    drift: f64,
    half_life: Option<f64>,
    block: u32,
    analysis: Analysis,
) -> HabituatedYesNo {
    let observer = Observer {
        d_prime: D,
        criterion: C,
        sigma: 1.0,
        lapse: None,
    };
    let condition = Condition {
        name: "x".into(),
        presence: 0.5,
        d_prime: D,
        criterion: C,
    };
    let split = Split {
        present: trials / 2,
        absent: trials - trials / 2,
    };
    let h = Habituation {
        criterion_drift: drift,
        half_life,
        block,
        order: Order::Alternating,
        analysis,
    };
    HabituatedYesNo::new(&observer, &condition, split, RateCorrection::None, h)
}

/// Φ from statrs 0.19 (a general-purpose library), not the crate's own.
fn phi(x: f64) -> f64 {
    Normal::new(0.0, 1.0).unwrap().cdf(x)
}

// The equal-variance yes/no convention of vigil (DEVELOPERS.md: absent ~ N(0, 1), present
// ~ N(d′, 1), c from the midpoint): H = Φ(d′/2 − c), F = Φ(−d′/2 − c) (Macmillan & Creelman,
// *Detection Theory: A User's Guide*, 2nd ed., 2005, ch. 2), at each block's middle
// presentation t_k = 10k + 4.5 for blocks of 10 over 40 presentations, 5 present and 5 absent
// each (written out here, not taken from the crate); c_t = c + 0.02·t, d′_t = d′·2^(−t/30).
// Formula check; statrs and libm Φ agree to ~1e-15, so 1e-9 leaves room only for rounding.
#[test]
fn expected_counts_per_block_follow_the_probit_formula() {
    let p = path(40, 0.02, Some(30.0), 10, Analysis::Stationary);
    let got = p.expected(&Deviation::default());
    assert_eq!(got.len(), 4);
    for (k, (h, f)) in got.iter().enumerate() {
        let t = 10.0 * k as f64 + 4.5;
        let (d, c) = (D * 2f64.powf(-t / 30.0), C + 0.02 * t);
        assert!(
            (h - 5.0 * phi(d / 2.0 - c)).abs() < 1e-9,
            "block {k}: hits {h}"
        );
        assert!(
            (f - 5.0 * phi(-d / 2.0 - c)).abs() < 1e-9,
            "block {k}: false alarms {f}"
        );
        let b = p.blocks()[k];
        assert_eq!((b.present, b.absent, b.middle), (5, 5, t));
    }
}

// The simulated per-block counts average to the formula's expectations: 20,000 animals, a
// block's hit count has SD ≤ √(5·0.25) ≈ 1.12, so the MC SE of its mean is ≤ 0.0079; allow
// 5 SE (16 comparisons).
#[test]
fn simulated_blocks_average_to_the_formula() {
    let p = path(40, 0.02, Some(30.0), 10, Analysis::Stationary);
    let n = 20_000;
    let mut total = p.empty();
    let mut rng = replicate_rng(7, 3, 1);
    for _ in 0..n {
        let c = p.simulate(&mut rng, &Deviation::default());
        p.add(&mut total, &c);
    }
    for (k, b) in total.iter().enumerate() {
        let t = 10.0 * k as f64 + 4.5;
        let (d, c) = (D * 2f64.powf(-t / 30.0), C + 0.02 * t);
        let (h, f) = (b.hits as f64 / n as f64, b.false_alarms as f64 / n as f64);
        assert!(
            (h - 5.0 * phi(d / 2.0 - c)).abs() < 5.0 * 0.0079,
            "block {k}: {h}"
        );
        assert!(
            (f - 5.0 * phi(-d / 2.0 - c)).abs() < 5.0 * 0.0079,
            "block {k}: {f}"
        );
    }
}

/// Mean and MC SE (SD/√n) of a sample.
fn mean_se(x: &[f64]) -> (f64, f64) {
    let n = x.len() as f64;
    let m = x.iter().sum::<f64>() / n;
    let v = x.iter().map(|y| (y - m) * (y - m)).sum::<f64>() / (n - 1.0);
    (m, (v / n).sqrt())
}

// The trend analysis estimates the criterion at presentation 0 without the drift's bias: 400
// presentations (large enough that the probit fit's own small-sample bias, of order 1/n, is
// far below the MC SE), drift 0.002 (the criterion moves by 0.8 over the session), 4,000
// animals. The MC SE is the sample SD/√4000 (measured ≈ 0.0033 for ĉ₀); allow 4 SE.
#[test]
fn the_trend_analysis_is_unbiased() {
    let p = path(400, 0.002, None, 20, Analysis::Trend);
    let mut rng = replicate_rng(11, 5, 2);
    let (mut c0, mut d, mut slope) = (Vec::new(), Vec::new(), Vec::new());
    for _ in 0..4000 {
        let counts = p.simulate(&mut rng, &Deviation::default());
        let fit = p.fit_trend(&counts).expect("a fit at 400 trials");
        c0.push(fit.criterion_at_zero);
        d.push(fit.d_prime);
        slope.push(fit.slope);
    }
    let (mc, sc) = mean_se(&c0);
    let (md, sd) = mean_se(&d);
    let (ms, ss) = mean_se(&slope);
    assert!((mc - C).abs() < 4.0 * sc, "ĉ₀ {mc} ± {sc}");
    assert!((md - D).abs() < 4.0 * sd, "d̂′ {md} ± {sd}");
    assert!((ms - 0.002).abs() < 4.0 * ss, "slope {ms} ± {ss}");
}

// The stationary analysis converges to the pseudo-true value: the closed form (d′ = z(H) −
// z(F), c = −[z(H) + z(F)]/2; Macmillan & Creelman 2005, ch. 2) of the summed expected table,
// computed here with statrs' inverse Φ. Same 400 presentations and 4,000 animals; allow 4 MC
// SE. Its distance from the population's c is the bias the report shows (about 0.4 here).
#[test]
fn the_stationary_bias_is_the_pseudo_true_value() {
    let p = path(400, 0.002, None, 20, Analysis::Stationary);
    let normal = Normal::new(0.0, 1.0).unwrap();
    let (mut h, mut f) = (0.0, 0.0);
    for k in 0..20 {
        let t = 20.0 * k as f64 + 9.5;
        let c = C + 0.002 * t;
        h += 10.0 * phi(D / 2.0 - c);
        f += 10.0 * phi(-D / 2.0 - c);
    }
    let (zh, zf) = (normal.inverse_cdf(h / 200.0), normal.inverse_cdf(f / 200.0));
    let (pseudo_d, pseudo_c) = (zh - zf, -(zh + zf) / 2.0);
    let mut rng = replicate_rng(13, 5, 2);
    let (mut cs, mut ds) = (Vec::new(), Vec::new());
    for _ in 0..4000 {
        let counts = p.simulate(&mut rng, &Deviation::default());
        let e = p.fit_animal(&counts).expect("a fit at 400 trials");
        cs.push(e.criterion[0]);
        ds.push(e.d_prime[0]);
    }
    let (mc, sc) = mean_se(&cs);
    let (md, sd) = mean_se(&ds);
    assert!(
        (mc - pseudo_c).abs() < 4.0 * sc,
        "ĉ {mc} ± {sc} vs {pseudo_c}"
    );
    assert!(
        (md - pseudo_d).abs() < 4.0 * sd,
        "d̂′ {md} ± {sd} vs {pseudo_d}"
    );
    assert!(pseudo_c - C > 0.3, "the drift biases the stationary fit");
}

fn colony_with(table: &str) -> String {
    common::plan_text("predator-model-colony.toml").replace(
        "trial_cap = 60             # habituation: at most 60 presentations per vole\n",
        &format!("trial_cap = 60\n\n[animals.habituation]\n{table}"),
    )
}

// A habituation table whose keys are all zero (no drift, no half-life, stationary) changes
// no byte of the run: the same streams and fits as without the table.
#[test]
fn zero_habituation_is_bit_for_bit_the_plain_run() {
    let dir = tempfile::tempdir().unwrap();
    let plain = common::plan_text("predator-model-colony.toml");
    let zero = colony_with(
        "criterion_drift = 0\nblock = 7\norder = \"blocked\"\nanalysis = \"stationary\"\n",
    );
    assert_ne!(plain, zero);
    std::fs::write(dir.path().join("plain.toml"), &plain).unwrap();
    std::fs::write(dir.path().join("zero.toml"), &zero).unwrap();
    let run = |name: &str| {
        let out = common::vigil(
            dir.path(),
            &[
                "run",
                name,
                "--experiments",
                "200",
                "--quiet",
                "--csv",
                &format!("{name}.csv"),
            ],
        );
        assert_eq!(out.status.code(), Some(0), "{}", common::stderr(&out));
        (
            common::stdout(&out),
            std::fs::read_to_string(dir.path().join(format!("{name}.csv"))).unwrap(),
        )
    };
    assert_eq!(run("plain.toml"), run("zero.toml"));
}

#[test]
fn bad_habituation_keys_are_refused_where_they_stand() {
    // The table's first key is on line 38 of the colony copy.
    for (table, key) in [
        (
            "criterion_drift = 2.5\n",
            "animals.habituation.criterion_drift",
        ),
        ("half_life = 0\n", "animals.habituation.half_life"),
        ("block = 0\n", "animals.habituation.block"),
        ("order = \"zigzag\"\n", "animals.habituation.order"),
        ("analysis = \"mixed\"\n", "animals.habituation.analysis"),
        ("blok = 3\n", "animals.habituation.blok"),
    ] {
        common::rejected(&colony_with(table), 38, key);
    }
    // A design habituation cannot simulate yet (two conditions) is named at the table.
    let two = colony_with("criterion_drift = 0.01\n").replace(
        "trials = [20, 40, 60, 80]  # trials per vole to scan (80 lies above the cap and is capped)\n",
        "trials = [20, 40]\n[[design.condition]]\nname = \"a\"\n[[design.condition]]\nname = \"b\"\n",
    );
    let msg = common::rejected(&two, 41, "animals.habituation");
    assert!(
        msg.contains("\"flee or stay\" is not a one-condition yes/no design"),
        "{msg}"
    );
}
