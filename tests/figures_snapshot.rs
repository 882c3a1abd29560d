//! The SVG text of the figures for one small invented plan, pinned as insta snapshots: a
//! regression pin (a change of drawing code must be seen and accepted), not a correctness
//! check — figures_render.rs checks that the SVG parses and renders.

use vigil::analytic::scan::{ScanOptions, scan_plan};
use vigil::commands::run::results;
use vigil::evaluate::RunOptions;
use vigil::figures::{self, Inputs};
use vigil::plan::Plan;

/// An INVENTED plan for this test only: one yes/no design, two trial counts, one test.
const PLAN: &str = r#"
[study]
title = "Snapshot plan (invented)"
seed = 7
experiments = 150

[observer]
d_prime = 1.0
criterion = 0.4

[[design]]
name = "yes/no"
presence = 0.5
trials = [30, 60]

[[hypothesis]]
name = "biased"
kind = "bias"
power = 0.8
"#;

#[test]
fn small_plan_figures_keep_their_svg_text() {
    let plan = Plan::from_str(std::path::Path::new("snapshot.toml"), PLAN).unwrap();
    let r = results(&plan, RunOptions::default(), &|_| {}).unwrap();
    let scans = scan_plan(&plan, ScanOptions::default()).unwrap();
    let inputs = Inputs::new(&plan, &r.summaries, &r.searches, r.groups.as_ref(), &scans);
    let figs = figures::all(&inputs).unwrap();
    let names: Vec<&str> = figs.iter().map(|f| f.name.as_str()).collect();
    insta::assert_snapshot!("figure_names", names.join("\n"));
    for stem in ["power-biased", "roc"] {
        let f = figs
            .iter()
            .find(|f| f.name.ends_with(stem))
            .unwrap_or_else(|| panic!("no {stem} figure in {names:?}"));
        insta::assert_snapshot!(format!("figure_{stem}"), &f.text);
    }
}
