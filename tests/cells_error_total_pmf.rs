//! The distribution of the error total (misses + false alarms) against
//! tests/golden/error_total_pmf.json: numpy.convolve of two scipy.stats.binom.pmf arrays
//! (NumPy 2.4.6, SciPy 1.17.1; made by tests/golden/generate.py), for fixed numbers of
//! present and absent trials.
//!
//! What is checked on vigil's side: the per-class error rates of the observation model; the
//! error-totals coarsening (encounters of random class, present with probability π), whose
//! total is Bin(N, p_FA + p_miss) of its cells — the golden fixed-split distribution mixed
//! over the split, so equal to it in mean and, at c = 0 where both classes err alike,
//! everywhere; and the samplers the engine draws with, by chi-square.

use statrs::distribution::{Binomial, Discrete};
use vigil::cells::cell_probabilities::{Order, cell_probabilities};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{BaseRate, ConditionSpec, Record};
use vigil::simulate::{BinomialTable, multinomial_into, replicate_rng};

mod common;

struct Case {
    d_prime: f64,
    c: f64,
    n_present: u64,
    n_absent: u64,
    p_miss: f64,
    p_false_alarm: f64,
    mean: f64,
    variance: f64,
    p_le_20: f64,
    pmf: Vec<f64>,
}

fn cases() -> Vec<Case> {
    common::golden_cases("error_total_pmf.json")
        .iter()
        .map(|v| {
            let f = |k: &str| v[k].as_f64().unwrap_or_else(|| panic!("{k} is a number"));
            let u = |k: &str| v[k].as_u64().unwrap_or_else(|| panic!("{k} is a count"));
            let pmf: Vec<f64> = v["pmf"]
                .as_array()
                .expect("a pmf array")
                .iter()
                .map(|x| x.as_f64().expect("a probability"))
                .collect();
            assert_eq!(pmf.len() as u64, u("n_present") + u("n_absent") + 1);
            Case {
                d_prime: f("d_prime"),
                c: f("c"),
                n_present: u("n_present"),
                n_absent: u("n_absent"),
                p_miss: f("p_miss"),
                p_false_alarm: f("p_false_alarm"),
                mean: f("mean"),
                variance: f("variance"),
                p_le_20: f("p_total_le_20"),
                pmf,
            }
        })
        .collect()
}

/// Cell probabilities of the single block(s) of a one-condition model at its stated values.
fn cells(record: Record, case: &Case, pi: f64) -> Vec<Vec<f64>> {
    let spec = ConditionSpec::yes_no("field", record, case.d_prime, case.c, pi);
    let model = ObservationModel::new(vec![spec]).expect("a valid model");
    cell_probabilities(&model, &model.hypothesised_theta(), Order::First)
        .expect("probabilities")
        .into_iter()
        .map(|b| b.p)
        .collect()
}

// Φ(c − d′/2) and Φ(−d′/2 − c) from scipy.stats.norm.cdf: our Φ is libm's erfc, good to a few
// ulp, hence 1e-14.
#[test]
fn per_class_error_rates_match_scipy() {
    for case in cases() {
        let full = Record::Full {
            present: case.n_present,
            absent: case.n_absent,
        };
        let blocks = cells(full, &case, 0.5);
        // Full record: present block [miss, hit], absent block [correct rejection, false alarm].
        assert!(
            (blocks[0][0] - case.p_miss).abs() < 1e-14,
            "miss {}",
            blocks[0][0]
        );
        assert!((blocks[1][1] - case.p_false_alarm).abs() < 1e-14);
    }
}

// The error-totals record with π = n_present/N: cells (1 − π)F, π(1 − H), the rest. Its
// error total over N encounters is Bin(N, p_FA + p_miss): by the law of total variance its
// mean is the golden (fixed-split) mean and its variance the golden variance plus the split's
// share N·π(1 − π)(P(miss | present) − F)². Closed forms against numbers summed from the
// golden pmf: 1e-9 relative covers the pmf's rounding. At c = 0 both classes err with
// probability Φ(−d′/2) and the two distributions coincide: the pmfs agree to 1e-12.
#[test]
fn the_error_totals_coarsening_matches_the_golden_distribution() {
    for case in cases() {
        let n = case.n_present + case.n_absent;
        let pi = case.n_present as f64 / n as f64;
        let record = Record::ErrorTotals {
            encounters: n,
            base_rate: BaseRate::Known,
        };
        let block = &cells(record, &case, pi)[0];
        let (fa, miss) = (block[0], block[1]);
        assert!((fa - (1.0 - pi) * case.p_false_alarm).abs() < 1e-14);
        assert!((miss - pi * case.p_miss).abs() < 1e-14);
        let p = fa + miss;
        let nf = n as f64;
        let rel = |a: f64, b: f64| (a - b).abs() <= 1e-9 * b.abs();
        assert!(
            rel(nf * p, case.mean),
            "mean {} against {}",
            nf * p,
            case.mean
        );
        let split = nf * pi * (1.0 - pi) * (case.p_miss - case.p_false_alarm).powi(2);
        assert!(
            rel(nf * p * (1.0 - p), case.variance + split),
            "variance {} against {} + {split}",
            nf * p * (1.0 - p),
            case.variance
        );
        // The golden summaries are those of the golden pmf.
        let le_20: f64 = case.pmf[..21].iter().sum();
        assert!((le_20 - case.p_le_20).abs() < 1e-12);
        if case.c == 0.0 {
            let b = Binomial::new(p, n).expect("valid binomial");
            for (k, &want) in case.pmf.iter().enumerate() {
                assert!((b.pmf(k as u64) - want).abs() < 1e-12, "pmf[{k}]");
            }
        }
    }
}

// The engine's samplers against the golden pmf, by Pearson's chi-square at its 0.999 quantile
// (see tests/common): misses and false alarms drawn per class as binomials (a full record's
// rows), and, at c = 0, error totals drawn as the engine draws an error-totals block.
#[test]
fn simulated_error_totals_follow_the_golden_pmf() {
    const DRAWS: usize = 40_000;
    for (i, case) in cases().iter().enumerate() {
        let n = case.n_present + case.n_absent;
        let misses = BinomialTable::new(case.n_present as u32, case.p_miss);
        let false_alarms = BinomialTable::new(case.n_absent as u32, case.p_false_alarm);
        let mut rng = replicate_rng(11, i as u64, 0);
        let mut h = vec![0u64; n as usize + 1];
        for _ in 0..DRAWS {
            h[(misses.sample(&mut rng) + false_alarms.sample(&mut rng)) as usize] += 1;
        }
        let (stat, critical, df) = common::chi_square(&h, &case.pmf);
        assert!(
            stat <= critical,
            "case {i}: χ² = {stat} on {df} df, limit {critical}"
        );
        if case.c == 0.0 {
            let pi = case.n_present as f64 / n as f64;
            let record = Record::ErrorTotals {
                encounters: n,
                base_rate: BaseRate::Known,
            };
            let block = &cells(record, case, pi)[0];
            let mut out = [0u64; 3];
            let mut h = vec![0u64; n as usize + 1];
            for _ in 0..DRAWS {
                multinomial_into(&mut rng, n, block, &mut out);
                h[(out[0] + out[1]) as usize] += 1;
            }
            let (stat, critical, df) = common::chi_square(&h, &case.pmf);
            assert!(
                stat <= critical,
                "coarsened, case {i}: χ² = {stat} on {df} df"
            );
        }
    }
}
