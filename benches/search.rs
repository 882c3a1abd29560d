//! The whole sample-size search of plans/base-rate-shift.toml: three designs (yes/no, a
//! 4-category rating, error totals with a census), one criterion-shift hypothesis, 2000
//! simulated experiments per evaluated count, on all cores. Run with
//! `cargo bench --bench search`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use vigil::plan::Plan;
use vigil::search::search_plan;

fn whole_search(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/base-rate-shift.toml");
    let plan = Plan::load(&path).unwrap();
    assert_eq!(plan.study().experiments, 2000);
    let mut group = c.benchmark_group("search");
    group.sample_size(10);
    group.bench_function("plans/base-rate-shift.toml, 3 designs", |b| {
        b.iter(|| black_box(search_plan(&plan, &|_| {}).unwrap()))
    });
    group.finish();
}

criterion_group!(benches, whole_search);
criterion_main!(benches);
