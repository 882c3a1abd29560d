//! The pilot fit recovers known population values from simulated pilots: over many simulated
//! pilots from a known population, each stated interval covers the true value at about its
//! nominal rate, and with no between-animal variation the SD is estimated near 0 with an
//! interval that includes 0.
//!
//! The simulation here is written for the test (its own bivariate normal and binomial draws,
//! not vigil's simulator), so the check does not lean on the code it tests. Thresholds are in
//! Monte Carlo SEs of a coverage proportion, √(p(1 − p)/R) (Morris, White & Crowther 2019,
//! *Statistics in Medicine* 38:2074–2102 [memory]).

use rand::SeedableRng;
use rand_distr::{Binomial, Distribution, StandardNormal};
use rand_xoshiro::Xoshiro256PlusPlus;
use std::path::PathBuf;
use vigil::pilot::population::PopulationFit;
use vigil::pilot::read::{CountTable, PilotAnimal, PilotData};
use vigil::pilot::{PilotFitSettings, PopulationSettings, analyse};
use vigil::vocab::RateCorrection;

/// A population of animals and the pilot design.
#[derive(Clone, Copy)]
struct Truth {
    mean_d: f64,
    mean_c: f64,
    sd_d: f64,
    sd_c: f64,
    rho: f64,
    animals: usize,
    per_class: u32,
}

fn phi(x: f64) -> f64 {
    0.5 * libm::erfc(-x / std::f64::consts::SQRT_2)
}

/// One simulated pilot: each animal's (d′, c) from the bivariate normal, then binomial hits
/// and false alarms, H = Φ(d′/2 − c), F = Φ(−d′/2 − c) (Macmillan & Creelman 2005).
fn simulate(t: Truth, rng: &mut Xoshiro256PlusPlus) -> PilotData {
    let animals = (0..t.animals)
        .map(|i| {
            let z1: f64 = StandardNormal.sample(rng);
            let z2: f64 = StandardNormal.sample(rng);
            let d = t.mean_d + t.sd_d * z1;
            let c = t.mean_c + t.sd_c * (t.rho * z1 + (1.0 - t.rho * t.rho).sqrt() * z2);
            let n = u64::from(t.per_class);
            let hits = Binomial::new(n, phi(d / 2.0 - c)).unwrap().sample(rng) as u32;
            let fas = Binomial::new(n, phi(-d / 2.0 - c)).unwrap().sample(rng) as u32;
            PilotAnimal {
                name: format!("a{i}"),
                tables: vec![CountTable {
                    absent: vec![t.per_class - fas, fas],
                    present: vec![t.per_class - hits, hits],
                    first_line: 2,
                }],
            }
        })
        .collect();
    PilotData {
        file: PathBuf::from("simulated.csv"),
        categories: 2,
        conditions: vec![String::new()],
        animals,
    }
}

fn fit(data: PilotData, resamples: usize) -> PopulationFit {
    let settings = PilotFitSettings {
        correction: RateCorrection::LogLinear,
        boundary: 1,
    };
    let population = PopulationSettings {
        simulations: resamples,
        ..PopulationSettings::default()
    };
    analyse(data, settings, population).unwrap().population
}

/// Share of `runs` simulated pilots whose interval covers each true value, in the order of
/// [`NAMES`].
fn coverage(t: Truth, runs: usize, seed: u64) -> [f64; 5] {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(seed);
    let mut hits = [0usize; 5];
    for _ in 0..runs {
        let p = fit(simulate(t, &mut rng), SIMULATIONS);
        let covered = [
            p.d_prime.interval.contains(t.mean_d),
            p.criterion.interval.contains(t.mean_c),
            p.sd_d_prime.interval.contains(t.sd_d),
            p.sd_criterion.interval.contains(t.sd_c),
            p.correlation.interval.is_some_and(|i| i.contains(t.rho)),
        ];
        for (h, c) in hits.iter_mut().zip(covered) {
            *h += usize::from(c);
        }
    }
    hits.map(|h| h as f64 / runs as f64)
}

const NAMES: [&str; 5] = ["mean d′", "mean c", "SD of d′", "SD of c", "correlation"];
/// Simulated pilots per candidate correlation inside each fit (the command uses 1000; 200
/// keeps the test short and only makes each interval's edges a little noisier).
const SIMULATIONS: usize = 200;
const RUNS: usize = 400;

/// Every coverage within 4 Monte Carlo SEs of the nominal 95%: √(.95·.05/400) = 0.0109, so
/// 0.906 … 0.994. Measured when written: 0.938, 0.940, 0.955, 0.965, 0.953 (8 animals) and
/// 0.953, 0.940, 0.940, 0.948, 0.940 (20 animals).
fn assert_nominal(label: &str, cov: [f64; 5]) {
    let se = (0.95f64 * 0.05 / RUNS as f64).sqrt();
    for (name, c) in NAMES.iter().zip(cov) {
        assert!(
            (c - 0.95).abs() <= 4.0 * se,
            "{label}: {name} interval covered {c:.3}, outside 0.95 ± {:.3}",
            4.0 * se
        );
    }
}

const TYPICAL: Truth = Truth {
    mean_d: 1.2,
    mean_c: 0.2,
    sd_d: 0.4,
    sd_c: 0.3,
    rho: -0.3,
    animals: 8,
    per_class: 50,
};

#[test]
fn intervals_cover_at_nominal_rate_eight_animals() {
    assert_nominal("8 animals × 100 trials", coverage(TYPICAL, RUNS, 11));
}

#[test]
fn intervals_cover_at_nominal_rate_twenty_animals() {
    let t = Truth {
        animals: 20,
        rho: 0.5,
        ..TYPICAL
    };
    assert_nominal("20 animals × 100 trials, ρ = 0.5", coverage(t, RUNS, 12));
}

/// With no between-animal variation the moment SDs sit near 0 (most pilots estimate exactly
/// 0 after truncation) and the interval includes 0 at least at the nominal rate (0 is the
/// truth; 4 MC SEs below 95% allowed).
#[test]
fn zero_variation_gives_sd_near_zero_with_interval_including_it() {
    let t = Truth {
        sd_d: 0.0,
        sd_c: 0.0,
        rho: 0.0,
        animals: 12,
        ..TYPICAL
    };
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(13);
    let (mut includes, mut zero, mut mean_sd) = ([0usize; 2], [0usize; 2], [0.0f64; 2]);
    for _ in 0..RUNS {
        let p = fit(simulate(t, &mut rng), SIMULATIONS);
        for (k, s) in [p.sd_d_prime, p.sd_criterion].iter().enumerate() {
            includes[k] += usize::from(s.interval.low == 0.0);
            zero[k] += usize::from(s.value == 0.0);
            mean_sd[k] += s.value / RUNS as f64;
        }
    }
    let se = (0.95f64 * 0.05 / RUNS as f64).sqrt();
    for k in 0..2 {
        let share = includes[k] as f64 / RUNS as f64;
        assert!(
            share >= 0.95 - 4.0 * se,
            "{}: interval includes 0 in {share:.3}",
            NAMES[k + 2]
        );
        // Under no variation the moment estimate is positive about half the time (the
        // spread exceeds its expectation), so at least 40% of pilots estimate exactly 0.
        assert!(
            zero[k] as f64 / RUNS as f64 >= 0.4,
            "{}: {} exact zeros",
            NAMES[k + 2],
            zero[k]
        );
        // The SE of one animal's d′ here is about 0.3 (c: 0.15); a mean moment SD below a
        // third of that is "near zero" against the typical SDs of 0.3–0.4 the plan asks about.
        let limit = if k == 0 { 0.1 } else { 0.05 };
        assert!(
            mean_sd[k] < limit,
            "{}: mean estimate {:.3}",
            NAMES[k + 2],
            mean_sd[k]
        );
    }
}
