//! Truncated exact enumeration (`analytic::exact`) of one yes/no scenario at 10⁴ present and
//! 10⁴ absent trials (d′ = 1, c = 0.2): about half a million of the 10⁸ outcomes are kept,
//! each fitted and tallied. The bound is 20 ms. Run with `cargo bench --bench exact`.

use criterion::{Criterion, criterion_group, criterion_main};
use std::hint::black_box;
use std::path::Path;
use vigil::analytic::exact::enumerate;
use vigil::evaluate::scenario_kernel;
use vigil::plan::Plan;

fn exact(c: &mut Criterion) {
    let text = "[study]\ntitle = \"exact bench\"\nseed = 1\n[observer]\nd_prime = 1.0\ncriterion = 0.2\n[[design]]\nname = \"yes/no\"\npresence = 0.5\ntrials = [20000]\n";
    let plan = Plan::from_str(Path::new("bench.toml"), text).unwrap();
    let scenario = &plan.scenarios()[0];
    let kernel = scenario_kernel(&plan, scenario).unwrap();
    let mut group = c.benchmark_group("exact");
    group.sample_size(20);
    group.bench_function("yes/no 10^4/10^4 trials, truncated enumeration", |b| {
        b.iter(|| black_box(enumerate(&kernel).unwrap().kept))
    });
    group.finish();
}

criterion_group!(benches, exact);
criterion_main!(benches);
