//! Rating throughput: datasets simulated (multinomial counts) and fitted (unequal-variance
//! maximum likelihood, observed-information SEs, derived measures) per second on one core.
//! Scenario (invented for the benchmark): K = 5, d′ = 1.5, σ = 1.25, 50 present and 50
//! absent trials, log-linear correction. Run with `cargo bench --bench rating`.
//! The same work in Python/SciPy: benches/python/rating_scipy.py.

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;
use vigil::design::{Condition, RatingScale, Split};
use vigil::engine::parallel::run_replicates;
use vigil::engine::rating_kernel::RatingKernel;
use vigil::infer::z_critical;
use vigil::model::Observer;
use vigil::vocab::RateCorrection;

const REPLICATES: u64 = 20_000;

fn one_core(c: &mut Criterion) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    let observer = Observer {
        d_prime: 1.5,
        criterion: 0.0,
        sigma: 1.25,
        lapse: None,
    };
    let condition = Condition {
        name: "bench".into(),
        presence: 0.5,
        d_prime: 1.5,
        criterion: 0.0,
    };
    let scale = RatingScale {
        categories: 5,
        boundary: 2,
        criteria: vec![-1.25, -0.5, 0.25, 1.0],
        fix_sigma: false,
    };
    let split = Split {
        present: 50,
        absent: 50,
    };
    let kernel = RatingKernel::new(
        &scale,
        &condition,
        &observer,
        split,
        RateCorrection::LogLinear,
        z_critical(0.95),
    )
    .unwrap();
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
