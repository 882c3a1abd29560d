//! Group studies: a plan scanning 4 animal counts × 5 trial counts of a 4-category rating
//! design at 2,000 simulated studies per cell (every animal fitted by unequal-variance
//! maximum likelihood, plus one pooled fit per study), on all cores. The scenario is
//! invented for the benchmark. Run with `cargo bench --bench groups`; the issue's bound is
//! one minute on 2 cores.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;
use vigil::groups::run_groups;
use vigil::plan::Plan;

const PLAN: &str = r#"
[study]
title = "benchmark: graded responses of a group (invented)"
seed = 5
experiments = 2000

[observer]
d_prime = 1.2
criterion = 0.25
sigma = 1.25

[[design]]
name = "4-step graded"
presence = 0.5
trials = [20, 40, 60, 80, 120]
scale = { categories = 4, boundary = 2, absent_shares = [0.45, 0.352, 0.148, 0.05] }

[animals]
counts = [6, 10, 16, 24]
sd_d_prime = 0.3
sd_criterion = 0.3
correlation = 0.2

[[hypothesis]]
name = "bias"
kind = "bias"
"#;

fn rating_grid(c: &mut Criterion) {
    let plan = Plan::from_str(Path::new("bench.toml"), PLAN).unwrap();
    let mut group = c.benchmark_group("groups");
    group.sample_size(10);
    group.warm_up_time(Duration::from_secs(1));
    group.measurement_time(Duration::from_secs(30));
    group.bench_function(
        "4 animal counts × 5 trial counts, 4-category rating, 2000 studies",
        |b| b.iter(|| black_box(run_groups(&plan, &|_| {}).unwrap())),
    );
    group.finish();
}

criterion_group!(benches, rating_grid);
criterion_main!(benches);
