//! The cost of checkpoints: the whole `vigil run` of plans/predator-model-colony.toml (the
//! invented colony plan) at 8,000 experiments, with and without `--checkpoint` (which saves
//! finished chunks as it goes and removes the file at the end). The bound is 2% of
//! the run. Run with `cargo bench --bench checkpoint`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;
use vigil::commands::{RunRequest, execute, prepare};

fn checkpoint(c: &mut Criterion) {
    let plan = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/predator-model-colony.toml");
    let dir = tempfile::tempdir().unwrap();
    let mut group = c.benchmark_group("checkpoint");
    group.sample_size(10);
    group.warm_up_time(Duration::from_secs(1));
    group.measurement_time(Duration::from_secs(30));
    for with in [false, true] {
        let req = RunRequest {
            plan: plan.clone(),
            experiments: Some(8000),
            checkpoint: with.then(|| dir.path().join("ck.json")),
            ..RunRequest::default()
        };
        let name = if with {
            "colony plan, 8000 experiments, with --checkpoint"
        } else {
            "colony plan, 8000 experiments, no checkpoint"
        };
        group.bench_function(name, |b| {
            b.iter(|| black_box(execute(prepare(&req).unwrap(), &|_| {}).unwrap()))
        });
    }
    group.finish();
}

criterion_group!(benches, checkpoint);
criterion_main!(benches);
