//! How conditions read in every text output: each condition's split, presence and
//! criterion, and the observer's criterion rule, so a multi-condition design never shows
//! its first condition in place of all of them.

use crate::design::{ConditionTrials, Design, TrialCounts};
use crate::plan::{CriterionRule, Plan};

/// "8/32", or "≈8/32" for an expected split (error and response totals draw each
/// encounter's class at the base rate).
pub fn split_text(c: &ConditionTrials) -> String {
    let mark = match c.counts {
        TrialCounts::Fixed => "",
        TrialCounts::Expected => "≈",
    };
    format!("{mark}{}/{}", c.present, c.absent)
}

/// Whether any condition of these scenarios has an expected (not fixed) split.
pub fn any_expected<'a>(conditions: impl IntoIterator<Item = &'a ConditionTrials>) -> bool {
    conditions
        .into_iter()
        .any(|c| c.counts == TrialCounts::Expected)
}

/// The footnote that explains "≈" in a split.
pub const EXPECTED_NOTE: &str = "≈: expected present/absent encounters; error and response totals draw each encounter's class at its presence rate.";

/// A criterion as the reports print it: "+0.18".
pub fn criterion(c: f64) -> String {
    format!("{:+.2}", c + 0.0)
}

/// The observer's criterion under `criterion = "optimal"`, where each condition has its
/// own; `None` for a fixed criterion (the caller prints the number).
pub fn optimal_rule_text(plan: &Plan) -> Option<String> {
    match plan.criterion_rule() {
        CriterionRule::Fixed { .. } => None,
        CriterionRule::Optimal { fraction, .. } if *fraction == 1.0 => Some(
            "c = the ideal observer's criterion for each condition's presence rate".to_string(),
        ),
        CriterionRule::Optimal { fraction, .. } => Some(format!(
            "c = {fraction} × the ideal observer's criterion for each condition's presence rate"
        )),
    }
}

/// A design's conditions for its block header: "rare hawks 20% present, c = +0.18;
/// common hawks 60% present, c = -0.51", with d′ where a condition has its own. A single
/// condition reads "stimulus present on 50% of trials", with c (and d′) only where they
/// are not the header observer's.
pub fn conditions_text(plan: &Plan, design: &Design) -> String {
    let o = plan.observer();
    let optimal = optimal_rule_text(plan).is_some();
    let own_d = |d: f64| {
        if d == o.d_prime {
            String::new()
        } else {
            format!(", d′ = {d:.2}")
        }
    };
    // In a two-choice task the presence share is the share of trials with the target on the
    // left: the stimulus is on every trial.
    let two_choice = design.record == crate::design::RecordKind::TwoChoice;
    if let [c] = design.conditions.as_slice() {
        let crit = if optimal || c.criterion != o.criterion {
            format!(", c = {}", criterion(c.criterion))
        } else {
            String::new()
        };
        let share = if two_choice {
            "target on the left on"
        } else {
            "stimulus present on"
        };
        return format!(
            "{share} {:.0}% of trials{crit}{}",
            100.0 * c.presence,
            own_d(c.d_prime)
        );
    }
    let each: Vec<String> = design
        .conditions
        .iter()
        .map(|c| {
            format!(
                "{} {:.0}% {}, c = {}{}",
                c.name,
                100.0 * c.presence,
                if two_choice {
                    "target on the left"
                } else {
                    "present"
                },
                criterion(c.criterion),
                own_d(c.d_prime)
            )
        })
        .collect();
    format!("conditions: {}", each.join("; "))
}
