//! Yes/no throughput: datasets simulated, fitted and tallied per second on one core, and a
//! whole example plan on the machine's cores. Run with `cargo bench --bench yesno`.

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use vigil::engine::parallel::run_replicates;
use vigil::engine::scenario_kernel::ScenarioKernel;
use vigil::evaluate::{RunOptions, run_plan};
use vigil::infer::z_critical;
use vigil::model::Observer;
use vigil::plan::Plan;
use vigil::vocab::RateCorrection;

const REPLICATES: u64 = 1_000_000;

fn one_core(c: &mut Criterion) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    let observer = Observer {
        d_prime: 1.5,
        criterion: 0.3,
        sigma: 1.0,
        lapse: None,
    };
    let mut group = c.benchmark_group("yes/no datasets, one core");
    group.throughput(Throughput::Elements(REPLICATES));
    group.sample_size(20);
    for (present, absent) in [(12, 28), (50, 50), (200, 200)] {
        let kernel = ScenarioKernel::yes_no(
            &observer,
            present,
            absent,
            RateCorrection::LogLinear,
            z_critical(0.95),
        )
        .unwrap();
        group.bench_function(format!("{present}/{absent} trials"), |b| {
            b.iter(|| {
                pool.install(|| black_box(run_replicates(&kernel, 7, 0, REPLICATES, &|_| {})))
            })
        });
    }
    group.finish();
}

fn example_plan(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/playback-yes-no.toml");
    let plan = Plan::load(&path).unwrap();
    let mut group = c.benchmark_group("whole plan");
    group.sample_size(20);
    group.bench_function("plans/playback-yes-no.toml", |b| {
        b.iter(|| black_box(run_plan(&plan, RunOptions::default(), &|_| {}).unwrap()))
    });
    group.finish();
}

criterion_group!(benches, one_core, example_plan);
criterion_main!(benches);
