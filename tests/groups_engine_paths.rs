//! Group studies on every route give the same bytes for any thread count: the rating fast
//! path and the general route (whose animals are drawn by the engine's table sampler and
//! fitted by its general estimator), with a two-population study beside them.

use std::path::Path;
use vigil::groups::run_groups;
use vigil::plan::Plan;

const PLAN: &str = r#"
[study]
title = "routes (invented)"
seed = 11
experiments = 120

[observer]
d_prime = 1.2
criterion = 0.2
sigma = 1.25
lapse_rate = 0.03

[[design]]
name = "graded"
presence = 0.5
trials = [40]
scale = { categories = 4, boundary = 2, criteria = [-0.5, 0.2, 0.9] }

[[design]]
name = "two rates"
trials = [40]
shared = ["d_prime"]
[[design.condition]]
name = "rare"
presence = 0.25
criterion = 0.5
[[design.condition]]
name = "common"
presence = 0.6
criterion = 0.0

[animals]
counts = [5, 8]
sd_criterion = 0.2
sd_d_prime = 0.2

[[hypothesis]]
name = "shift"
kind = "criterion-shift"
conditions = ["rare", "common"]

[[hypothesis]]
name = "populations"
kind = "group-difference"
shift = 0.4
"#;

#[test]
fn every_route_is_thread_count_independent() {
    let plan = Plan::from_str(Path::new("routes.toml"), PLAN).unwrap();
    let run = |threads: usize| {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| serde_json::to_string(&run_groups(&plan, &|_| {}).unwrap()).unwrap())
    };
    let one = run(1);
    assert_eq!(one, run(2));
    assert_eq!(one, run(3));
    // Both designs ran and fitted their animals.
    let report = run_groups(&plan, &|_| {}).unwrap();
    for d in &report.designs {
        assert_eq!(d.cells.len(), 2, "{}", d.design);
        for c in &d.cells {
            assert!(c.summary.animals_dropped.value < 0.05, "{}", d.design);
        }
    }
}
