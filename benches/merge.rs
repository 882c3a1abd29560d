//! Merging a split run: 100 partial-results files of plans/predator-model-colony.toml (the
//! invented colony plan), read, checked and folded in chunk order (`shard::merge_parts`), at
//! the plan's 1,000 experiments and at 25,600 (100 chunks per point, so every part holds 16
//! chunks); and the whole `vigil merge` at 1,000, which also runs the effort split on this
//! machine (docs/cluster.md says why the split is not sharded). The bound is 1 s for
//! the merge of 100 parts. Run with `cargo bench --bench merge`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::{Path, PathBuf};
use std::time::Duration;
use vigil::commands::merge::{MergeRequest, execute_merge, prepare_merge};
use vigil::plan::Plan;
use vigil::shard::{Part, merge_parts, plan_hash, run_part};

const PARTS: u32 = 100;

/// Writes the 100 parts of the colony plan at `experiments` into `dir`; returns their paths.
fn write_parts(dir: &Path, plan_path: &Path, experiments: u64) -> Vec<PathBuf> {
    let plan = Plan::load(plan_path)
        .unwrap()
        .with_experiments(experiments)
        .unwrap();
    let hash = plan_hash(&std::fs::read(plan_path).unwrap());
    (1..=PARTS)
        .map(|index| {
            let part = Part {
                index,
                count: PARTS,
            };
            let file = run_part(&plan, hash.clone(), part, &|_| {}).unwrap();
            let path = dir.join(format!("part-{index}.json"));
            std::fs::write(&path, serde_json::to_vec(&file).unwrap()).unwrap();
            path
        })
        .collect()
}

fn merge(c: &mut Criterion) {
    let plan_path = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/predator-model-colony.toml");
    let plan = Plan::load(&plan_path).unwrap();
    let hash = plan_hash(&std::fs::read(&plan_path).unwrap());
    let mut group = c.benchmark_group("merge");
    group.sample_size(10);
    group.warm_up_time(Duration::from_secs(1));
    group.measurement_time(Duration::from_secs(10));
    for experiments in [1000, 25_600] {
        let dir = tempfile::tempdir().unwrap();
        let paths = write_parts(dir.path(), &plan_path, experiments);
        group.bench_function(
            format!("combine 100 parts of the colony plan, {experiments} experiments"),
            |b| b.iter(|| black_box(merge_parts(&plan, &plan_path, &hash, &paths).unwrap())),
        );
        if experiments == 1000 {
            let req = MergeRequest {
                plan: plan_path.clone(),
                parts: paths.clone(),
                csv: None,
                json: None,
                tables: None,
            };
            group.bench_function(
                "vigil merge of 100 parts of the colony plan (with its effort split), 1000 experiments",
                |b| {
                    b.iter(|| {
                        let prepared = prepare_merge(&req).unwrap();
                        black_box(execute_merge(prepared, &|_| {}).unwrap())
                    })
                },
            );
        }
    }
    group.finish();
}

criterion_group!(benches, merge);
criterion_main!(benches);
