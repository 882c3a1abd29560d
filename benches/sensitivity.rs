//! The cost of `[sensitivity]` and `[assurance]` on plans/predator-model-colony.toml (the
//! invented colony plan): a sweep of 5 values × 3 assumptions under the expected information
//! with its 6 Monte Carlo corners (1,000 simulated studies each, the plan's experiments),
//! and a 2,000-draw assurance with its target search and 1,000 nested simulated studies.
//! The issue's bound for the sweep is 30 s on 2 cores. Run with
//! `cargo bench --bench sensitivity`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;
use vigil::plan::Plan;

const SWEEP: &str = r#"
[sensitivity]
"animals.sd_criterion" = [0.2, 0.275, 0.35, 0.425, 0.5]
"observer.d_prime" = [0.8, 1.0, 1.2, 1.4, 1.6]
"observer.criterion" = [-0.45, -0.35, -0.25, -0.15, -0.1]
"#;

const ASSURANCE: &str = r#"
[assurance]
draws = 2000
target = 0.9
[assurance.uncertain]
"observer.criterion" = { sd = 0.08 }
"animals.sd_criterion" = { sd = 0.08, low = 0 }
"#;

fn colony_with(extra: &str) -> Plan {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("plans/predator-model-colony.toml");
    let text = std::fs::read_to_string(&path).unwrap() + extra;
    Plan::from_str(&path, &text).unwrap()
}

fn uncertainty(c: &mut Criterion) {
    let mut group = c.benchmark_group("uncertainty");
    group.sample_size(10);
    group.warm_up_time(Duration::from_secs(1));
    group.measurement_time(Duration::from_secs(20));
    for (name, extra) in [
        (
            "colony sweep 5 values x 3 assumptions, corners simulated",
            SWEEP,
        ),
        (
            "colony assurance 2000 draws, target search, nested check",
            ASSURANCE,
        ),
    ] {
        let plan = colony_with(extra);
        group.bench_function(name, |b| {
            b.iter(|| black_box(vigil::uncertainty::run(&plan, &|_| {}).unwrap()))
        });
    }
    group.finish();
}

criterion_group!(benches, uncertainty);
criterion_main!(benches);
