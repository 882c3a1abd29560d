//! The samplers against the distributions they claim to draw from: mean, variance and a
//! chi-square goodness-of-fit test. A sampler that returned round(n·p) would meet the mean
//! and fail the other two.
//!
//! Reference: the binomial pmf of statrs 0.19 (`statrs::distribution::Binomial`), and the
//! textbook moments np and np(1 − p), −n·p_i·p_j for multinomial covariances.
//! Thresholds: means and variances within 5 Monte Carlo SEs (the MC SE of a sample variance
//! is √((μ₄ − σ⁴)/draws), with μ₄ the binomial's fourth central moment, np(1−p)[1 + 3(n−2)p(1−p)]);
//! chi-square at its 0.999 quantile. All seeds are fixed.

use statrs::distribution::{Binomial, Discrete};
use vigil::simulate::{BinomialTable, multinomial_into, replicate_rng};

mod common;

const DRAWS: usize = 40_000;

/// Sample mean and variance of draws.
fn moments(xs: &[f64]) -> (f64, f64) {
    let n = xs.len() as f64;
    let mean = xs.iter().sum::<f64>() / n;
    let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean, var)
}

/// Checks mean and variance of binomial(n, p) draws within 5 MC SEs.
fn check_binomial_moments(what: &str, xs: &[f64], n: u64, p: f64) {
    let (nf, q) = (n as f64, 1.0 - p);
    let var = nf * p * q;
    let mu4 = var * (1.0 + 3.0 * (nf - 2.0) * p * q);
    let draws = xs.len() as f64;
    let (m, v) = moments(xs);
    let se_mean = (var / draws).sqrt();
    let se_var = ((mu4 - var * var) / draws).sqrt();
    assert!(
        (m - nf * p).abs() <= 5.0 * se_mean,
        "{what}: mean {m} against {}",
        nf * p
    );
    assert!(
        (v - var).abs() <= 5.0 * se_var,
        "{what}: variance {v} against {var}"
    );
}

fn histogram(xs: impl Iterator<Item = u64>, n: u64) -> Vec<u64> {
    let mut h = vec![0u64; n as usize + 1];
    for x in xs {
        h[x as usize] += 1;
    }
    h
}

fn binomial_pmf(n: u64, p: f64) -> Vec<f64> {
    let b = Binomial::new(p, n).expect("valid binomial");
    (0..=n).map(|k| b.pmf(k)).collect()
}

#[test]
fn binomial_table_draws_follow_the_binomial() {
    for (i, (n, p)) in [(12u32, 0.5), (40, 0.08), (200, 0.73), (1, 0.3)]
        .into_iter()
        .enumerate()
    {
        let table = BinomialTable::new(n, p);
        let mut rng = replicate_rng(2024, i as u64, 0);
        let xs: Vec<u64> = (0..DRAWS)
            .map(|_| u64::from(table.sample(&mut rng)))
            .collect();
        let floats: Vec<f64> = xs.iter().map(|&x| x as f64).collect();
        check_binomial_moments(&format!("Bin({n}, {p})"), &floats, u64::from(n), p);
        let (stat, critical, df) = common::chi_square(
            &histogram(xs.into_iter(), u64::from(n)),
            &binomial_pmf(u64::from(n), p),
        );
        assert!(
            stat <= critical,
            "Bin({n}, {p}): χ² = {stat} on {df} df, limit {critical}"
        );
    }
}

#[test]
fn multinomial_margins_and_covariances_follow_the_multinomial() {
    let probs = [0.05, 0.25, 0.4, 0.3];
    let n = 30u64;
    let mut rng = replicate_rng(99, 1, 2);
    let mut out = [0u64; 4];
    let mut columns: Vec<Vec<f64>> = (0..4).map(|_| Vec::with_capacity(DRAWS)).collect();
    for _ in 0..DRAWS {
        multinomial_into(&mut rng, n, &probs, &mut out);
        assert_eq!(out.iter().sum::<u64>(), n);
        for (c, &x) in columns.iter_mut().zip(&out) {
            c.push(x as f64);
        }
    }
    for (j, &p) in probs.iter().enumerate() {
        check_binomial_moments(&format!("category {j}"), &columns[j], n, p);
        let h = histogram(columns[j].iter().map(|&x| x as u64), n);
        let (stat, critical, df) = common::chi_square(&h, &binomial_pmf(n, p));
        assert!(
            stat <= critical,
            "category {j}: χ² = {stat} on {df} df, limit {critical}"
        );
    }
    // Cov(n_i, n_j) = −n p_i p_j; the MC SE of a sample covariance is below
    // √(Var n_i · Var n_j / draws)·√2 for these moderate probabilities (common practice).
    let draws = DRAWS as f64;
    let (m1, v1) = moments(&columns[1]);
    let (m2, v2) = moments(&columns[2]);
    let cov = columns[1]
        .iter()
        .zip(&columns[2])
        .map(|(a, b)| (a - m1) * (b - m2))
        .sum::<f64>()
        / (draws - 1.0);
    let want = -(n as f64) * probs[1] * probs[2];
    let se = (2.0 * v1 * v2 / draws).sqrt();
    assert!(
        (cov - want).abs() <= 5.0 * se,
        "covariance {cov} against {want}"
    );
}
