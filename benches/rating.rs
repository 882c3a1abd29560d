//! Rating throughput: datasets simulated (multinomial counts) and fitted (unequal-variance
//! maximum likelihood, observed-information SEs, derived measures) per second on one core.
//! Scenario (invented for the benchmark): K = 5, d′ = 1.5, σ = 1.25, 50 present and 50
//! absent trials, log-linear correction. Run with `cargo bench --bench rating`.
//! The same work in Python/SciPy: benches/python/rating_scipy.py.

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use vigil::engine::parallel::run_replicates;
use vigil::evaluate::scenario_kernel;
use vigil::plan::Plan;

const REPLICATES: u64 = 20_000;

/// The benchmark scenario as a plan, so the kernel is the one `vigil run` builds.
const PLAN: &str = r#"
[study]
title = "rating benchmark (invented)"
seed = 11
rate_correction = "log-linear"

[observer]
d_prime = 1.5
criterion = 0.0
sigma = 1.25

[[design]]
name = "K = 5"
presence = 0.5
trials = [100]
scale = { categories = 5, boundary = 2, criteria = [-0.75, 0.0, 0.75, 1.5] }
"#;

fn one_core(c: &mut Criterion) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    let plan = Plan::from_str(Path::new("bench.toml"), PLAN).unwrap();
    let kernel = scenario_kernel(&plan, &plan.scenarios()[0]).unwrap();
    let mut group = c.benchmark_group("rating datasets, one core");
    group.throughput(Throughput::Elements(REPLICATES));
    group.sample_size(20);
    group.bench_function("K=5, unequal variance, 50/50 trials", |b| {
        b.iter(|| pool.install(|| black_box(run_replicates(&kernel, 11, 0, REPLICATES, &|_| {}))))
    });
    group.finish();
}

criterion_group!(benches, one_core);
criterion_main!(benches);
