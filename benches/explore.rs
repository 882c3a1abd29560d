//! `vigil explore` of the whole sentinel plan (4 designs × the default grid of ~43 trial
//! counts, profile ranges included): expected information, verdicts, text and JSON rendering.
//! Run with `cargo bench --bench explore`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use vigil::analytic::scan::{ScanOptions, scan_plan};
use vigil::commands::explore::{ExploreRequest, explore};
use vigil::plan::Plan;

fn sentinel(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/sentinel-error-records.toml");
    let mut group = c.benchmark_group("explore");
    group.sample_size(50);
    let req = ExploreRequest {
        plan: path.clone(),
        ..ExploreRequest::default()
    };
    group.bench_function("plans/sentinel-error-records.toml, command", |b| {
        b.iter(|| black_box(explore(&req).unwrap()))
    });
    let plan = Plan::load(&path).unwrap();
    group.bench_function("plans/sentinel-error-records.toml, scan only", |b| {
        b.iter(|| black_box(scan_plan(&plan, ScanOptions::default()).unwrap()))
    });
    group.finish();
}

criterion_group!(benches, sentinel);
criterion_main!(benches);
