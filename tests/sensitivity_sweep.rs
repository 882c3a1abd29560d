//! `[sensitivity]`: the answer is monotone where theory says it must be — more between-animal
//! SD of c never needs a cheaper study (the per-animal variance b + w(n) of the criterion
//! grows with it at every trial count, so the fewest animals at each count cannot fall;
//! Cochran 1977, *Sampling Techniques*, ch. 10, from memory), and the power at a fixed
//! design never rises with it; a larger |c| (a larger effect) never needs a dearer study. A
//! swept value equal to the plan's gives the plan's answer, and the corners are simulated
//! at the answer the approximation gives there.

mod common;

use std::path::Path;
use vigil::plan::Plan;
use vigil::uncertainty::sweep::DesignSensitivity;

fn colony_with(sweep: &str) -> Plan {
    let text = common::plan_text("predator-model-colony.toml") + "\n[sensitivity]\n" + sweep;
    Plan::from_str(Path::new("colony.toml"), &text).unwrap()
}

fn design(plan: &Plan) -> DesignSensitivity {
    let u = vigil::uncertainty::run(plan, &|_| {}).unwrap().unwrap();
    u.sensitivity.unwrap().designs.remove(0)
}

#[test]
fn more_between_animal_spread_never_needs_a_cheaper_study() {
    let d = design(&colony_with(
        "\"animals.sd_criterion\" = [0.0, 0.1, 0.2, 0.3, 0.35, 0.45, 0.6, 0.8]\n",
    ));
    let s = &d.sweeps[0];
    let costs: Vec<f64> = s
        .points
        .iter()
        .map(|p| p.answer.as_ref().unwrap().cost.unwrap())
        .collect();
    assert!(costs.windows(2).all(|w| w[0] <= w[1]), "{costs:?}");
    assert!(
        costs[0] < costs[costs.len() - 1],
        "the sweep moved nothing: {costs:?}"
    );
    let power: Vec<f64> = s.points.iter().map(|p| p.power_at_plan_answer[0]).collect();
    assert!(power.windows(2).all(|w| w[0] >= w[1]), "{power:?}");
    // The plan's own value reproduces the plan's answer.
    let at_plan = s.points.iter().find(|p| p.value == s.plan_value).unwrap();
    assert_eq!(at_plan.answer, d.plan_answer);
    assert_eq!(d.most_influential, Some(0));
}

#[test]
fn a_larger_effect_never_needs_a_dearer_study() {
    // "jumpy" tests c < 0: the further below 0 the criterion, the larger the effect.
    let d = design(&colony_with(
        "\"observer.criterion\" = [-0.6, -0.5, -0.4, -0.3, -0.25, -0.2]\n",
    ));
    let costs: Vec<f64> = d.sweeps[0]
        .points
        .iter()
        .map(|p| p.answer.as_ref().unwrap().cost.unwrap())
        .collect();
    assert!(costs.windows(2).all(|w| w[0] <= w[1]), "{costs:?}");
}

#[test]
fn corners_are_simulated_at_their_own_answers() {
    let plan = colony_with("\"observer.d_prime\" = [0.8, 1.2, 1.6]\n");
    let d = design(&plan);
    let s = &d.sweeps[0];
    assert_eq!(s.corners.len(), 2);
    for (c, k) in s.corners.iter().zip([0, s.points.len() - 1]) {
        assert_eq!(c.value, s.points[k].value);
        assert_eq!(c.chosen, s.points[k].answer.as_ref().unwrap().chosen);
        assert_eq!(c.experiments, plan.study().experiments);
        let p = &c.power[0];
        assert!(p.low <= p.value && p.value <= p.high);
    }
}

#[test]
fn a_one_animal_plan_sweeps_the_smallest_trial_count() {
    let text = common::plan_text("base-rate-shift.toml")
        + "\n[sensitivity]\n\"observer.criterion_fraction\" = [0.4, 0.5, 0.7]\n";
    let plan = Plan::from_str(Path::new("shift.toml"), &text).unwrap();
    let u = vigil::uncertainty::run(&plan, &|_| {}).unwrap().unwrap();
    let s = u.sensitivity.unwrap();
    assert!(!s.designs.is_empty());
    for d in &s.designs {
        for p in &d.sweeps[0].points {
            let a = p.answer.as_ref().expect("reached");
            assert_eq!(a.chosen.animals, None);
            assert_eq!(a.cost, None);
        }
    }
}

#[test]
fn a_range_lists_evenly_spaced_values() {
    let plan = colony_with("\"animals.sd_criterion\" = { from = 0.1, to = 0.5, steps = 5 }\n");
    let s = &plan.sensitivity().unwrap().sweeps[0];
    assert_eq!(s.values, [0.1, 0.2, 0.3, 0.4, 0.5]);
    // The dotted spelling is the same entry.
    let dotted = colony_with("animals.sd_criterion = { from = 0.1, to = 0.5, steps = 5 }\n");
    assert_eq!(dotted.sensitivity(), plan.sensitivity());
}
