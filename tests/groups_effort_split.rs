//! The effort split finds the optimum that can be worked out by hand, and its answer meets
//! the targets on a fresh seed.
//!
//! The case, written out. Yes/no, presence 0.5, d′ = 1.5, population mean c = δ, animals'
//! criteria spread with SD s = 0.25 (d′ identical), no lapses. One animal with n trials
//! (n/2 present, n/2 absent) estimates c with the Gourevitch & Galanter (1967) variance
//!   Var ĉ = ¼·[H(1−H)/((n/2)·φ(z_H)²) + F(1−F)/((n/2)·φ(z_F)²)] = W/n,
//! with H = Φ(0.75 − δ), F = Φ(−0.75 − δ). The group mean of N animals has variance
//! (s² + W/n)/N, and a two-sided test at α = 0.05 has power 0.8 when
//!   N = (z_{0.975} + z_{0.80})²·(s² + W/n)/δ²          (normal approximation).
//! Its cost N·(a + t·n) is smallest at the classical two-stage optimum
//!   n* = √(a·W/(t·s²))                                   (Cochran, *Sampling Techniques*,
//! 3rd ed., 1977, ch. 10, from memory; it follows from d/dn[(s² + W/n)(a + t·n)] = 0).
//! With a budget T instead, power is highest where (s² + W/n)·(a + t·n) is smallest: the
//! same n*. With t = 1 and a = 115, n* = 60.0 for δ = 0.15 (W = 1.95685).
//!
//! Thresholds: the approximate search (many animals, δ = 0.05) lands within 10% of n* and
//! within 2% of the hand N (t instead of z quantiles and whole animals add < 1%); the full
//! search (simulated, δ = 0.15) lands where the hand cost is within 5% of its minimum (the
//! bottom of the curve is flat, and whole animals move the cost by ±3%); a fresh seed gives
//! power ≥ target − 3 MC SE.

use std::path::Path;
use vigil::groups::approximation::Approximation;
use vigil::groups::effort_search::{Goals, Search, candidate_trials, least_cost};
use vigil::groups::grid::{DesignSetup, run_point};
use vigil::groups::hypotheses::group_tests;
use vigil::groups::{Population, run_groups};
use vigil::model::normal;
use vigil::plan::Plan;

const S: f64 = 0.25;
const A: f64 = 115.0;
const T: f64 = 1.0;
const Z: f64 = 1.959_963_985 + 0.841_621_234; // z(0.975) + z(0.80), standard normal table

/// W of the hand calculation: n·Var ĉ for yes/no at presence 0.5 (Gourevitch & Galanter).
fn w(delta: f64) -> f64 {
    let (zh, zf) = (0.75 - delta, -0.75 - delta);
    let (h, f) = (normal::cdf(zh), normal::cdf(zf));
    let (ph, pf) = (normal::pdf(zh), normal::pdf(zf));
    0.25 * 2.0 * (h * (1.0 - h) / (ph * ph) + f * (1.0 - f) / (pf * pf))
}

/// Hand cost (continuous N) at n trials.
fn hand_cost(delta: f64, n: f64) -> f64 {
    Z * Z * (S * S + w(delta) / n) / (delta * delta) * (A + T * n)
}

fn n_star(delta: f64) -> f64 {
    (A * w(delta) / (T * S * S)).sqrt()
}

fn plan(delta: f64, experiments: u64, seed: u64, total: Option<f64>, cost_per_animal: f64) -> Plan {
    let total = total.map_or(String::new(), |t| format!("total = {t}"));
    let text = format!(
        r#"
[study]
title = "hand-worked effort split (invented)"
seed = {seed}
experiments = {experiments}
alpha = 0.05

[observer]
d_prime = 1.5
criterion = {delta}

[[design]]
name = "yes/no"
presence = 0.5
trials = [20, 40, 80, 160]

[animals]
counts = [20, 40]
sd_criterion = {S}
trial_cap = 200

[budget]
cost_per_animal = {cost_per_animal}
cost_per_trial = {T}
{total}

[[hypothesis]]
name = "bias"
kind = "bias"
power = 0.8
"#
    );
    Plan::from_str(Path::new("hand.toml"), &text).unwrap()
}

#[test]
fn hand_numbers_are_as_stated() {
    assert!((w(0.15) - 1.95685).abs() < 1e-4, "{}", w(0.15));
    assert!((n_star(0.15) - 60.0).abs() < 0.1);
}

// The approximate layer alone, where whole animals barely matter (N ≈ 300).
#[test]
fn approximate_search_finds_the_hand_optimum() {
    let delta = 0.05;
    let p = plan(delta, 10, 1, None, A);
    let design = &p.designs()[0];
    let (tests, _) = group_tests(&p, design);
    let goals = Goals {
        tests: vec![0],
        power: vec![Some(0.8)],
        criterion_half_width: None,
        d_prime_half_width: None,
    };
    let pop = Population::from_animals(p.animals().as_ref().unwrap());
    let approx = Approximation::new(design, p.observer(), pop).unwrap();
    let trials = candidate_trials(design, 20, 200);
    let search = Search::new(
        &approx,
        &tests,
        &goals,
        p.budget().unwrap(),
        1,
        0.05,
        0.95,
        &trials,
    );
    let line = search.target_line();
    let best = &line[least_cost(&line).unwrap()];
    let n = f64::from(best.trials);
    let star = n_star(delta);
    assert!((n - star).abs() <= 0.1 * star, "n = {n}, hand n* = {star}");
    let hand_n = Z * Z * (S * S + w(delta) / n) / (delta * delta);
    let ratio = f64::from(best.animals) / hand_n;
    assert!(
        (1.0..1.02).contains(&ratio),
        "N = {} vs hand {hand_n}",
        best.animals
    );
}

// The whole split, simulated: least cost for power 0.8, and best power for a budget.
#[test]
fn simulated_split_lands_on_the_hand_optimum_and_holds_on_a_fresh_seed() {
    let delta = 0.15;
    let p = plan(delta, 2000, 31, Some(6000.0), A);
    let report = run_groups(&p, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().unwrap();
    let floor = hand_cost(delta, n_star(delta));

    let least = &e.target_frontier[e.least_cost.expect("a least-cost answer")];
    let ratio = hand_cost(delta, f64::from(least.trials)) / floor;
    assert!(
        ratio < 1.05,
        "least cost at {} trials: hand cost ratio {ratio}",
        least.trials
    );
    assert!(least.power[0].value >= 0.8);
    let found = least.cost / floor;
    assert!(
        (0.97..1.15).contains(&found),
        "cost {} vs hand {floor}",
        least.cost
    );

    let best = &e.budget_frontier[e.best_for_budget.expect("a best allocation")];
    let ratio = hand_cost(delta, f64::from(best.trials)) / floor;
    assert!(
        ratio < 1.05,
        "best for budget at {} trials: ratio {ratio}",
        best.trials
    );
    assert!(best.cost <= 6000.0);

    // A fresh seed: the least-cost allocation still meets the target within MC error.
    let setup = DesignSetup {
        plan: &p,
        index: 0,
        design: &p.designs()[0],
        tests: group_tests(&p, &p.designs()[0]).0,
        population: Population::from_animals(p.animals().as_ref().unwrap()),
    };
    let fresh = run_point(&setup, least.animals, least.trials, 4000, 777_001, &|_| {}).unwrap();
    let power = fresh.tests[0].two_stage.value;
    let mc_se = (0.8f64 * 0.2 / 4000.0).sqrt();
    assert!(power >= 0.8 - 3.0 * mc_se, "fresh-seed power {power}");
}

// When animals are dear enough, n* lies beyond the cap and the hand cost falls all the way
// to it: the answer is the cap, up to whole animals (a count a few trials below the cap that
// needs the same number of animals is a little cheaper, so "at the cap" means within 5%).
#[test]
fn dear_animals_push_trials_to_the_cap() {
    let delta = 0.15;
    let dear = 5000.0;
    assert!((dear * w(delta) / (T * S * S)).sqrt() > 200.0);
    let p = plan(delta, 1000, 5, None, dear);
    let report = run_groups(&p, &|_| {}).unwrap();
    let e = report.designs[0].effort.as_ref().unwrap();
    let least = &e.target_frontier[e.least_cost.unwrap()];
    assert!(least.trials >= 190, "least cost at {} trials", least.trials);
    assert!(least.meets_targets == Some(true));
}
