//! The reported quantities of `design::quantities` are exactly those the general Monte Carlo
//! kernel reports, in the same order and with the same labels, so asymptotic SEs line up row
//! for row with simulated ones.

use vigil::design::model::condition_specs;
use vigil::design::quantities::{quantity_label, reported_quantities};
use vigil::evaluate::{RunOptions, run_plan};
use vigil::plan::Plan;

/// Linked conditions, coarse records, sharing of every kind (invented numbers).
const PLAN: &str = r#"
[study]
title = "quantities (invented)"
seed = 3
experiments = 20

[observer]
d_prime = 1.4
criterion = 0.2

[[design]]
name = "two rates, full"
trials = [60]
[[design.condition]]
name = "sparse"
presence = 0.2
[[design.condition]]
name = "dense"
presence = 0.6
criterion = -0.1

[[design]]
name = "census shared"
trials = [80]
record = "error-totals"
base_rate = "census"
census = 40
shared = ["d_prime", "base_rate"]
[[design.condition]]
name = "a"
presence = 0.3
[[design.condition]]
name = "b"
presence = 0.3

[[design]]
name = "unknown, separate"
trials = [80]
record = "error-totals"
base_rate = "unknown"
shared = ["criterion"]
[[design.condition]]
name = "x"
presence = 0.2
[[design.condition]]
name = "y"
presence = 0.5

[[design]]
name = "single, census"
presence = 0.3
trials = [50]
record = "error-totals"
base_rate = "census"
census = 30
"#;

#[test]
fn labels_and_order_match_the_general_kernel() {
    let plan = Plan::from_str(std::path::Path::new("quantities.toml"), PLAN).unwrap();
    let summaries = run_plan(&plan, RunOptions::default(), &|_| {}).unwrap();
    assert_eq!(summaries.len(), plan.designs().len());
    for s in &summaries {
        let design = &plan.designs()[s.scenario.design];
        let specs = condition_specs(design, plan.observer(), s.scenario.trials);
        let ours: Vec<(String, f64)> = reported_quantities(&specs)
            .iter()
            .map(|q| (quantity_label(q), q.truth))
            .collect();
        let kernel: Vec<(String, f64)> =
            s.quantities.iter().map(|q| (q.label(), q.truth)).collect();
        assert_eq!(ours, kernel, "design {}", design.name);
    }
    let labels =
        |d: usize| -> Vec<String> { summaries[d].quantities.iter().map(|q| q.label()).collect() };
    assert_eq!(labels(0), ["d′", "c[sparse]", "c[dense]"]);
    assert_eq!(labels(1), ["d′", "c[a]", "π", "c[b]"]);
    assert_eq!(labels(2), ["d′[x]", "c", "π[x]", "d′[y]", "π[y]"]);
    assert_eq!(labels(3), ["d′", "c", "π"]);
}
