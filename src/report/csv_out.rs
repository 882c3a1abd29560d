//! Tidy CSV: one row per design × trial count × quantity.
//!
//! `condition` names the condition a quantity belongs to (empty for a single-condition
//! design and for a parameter the conditions share); `n_present`/`n_absent` are that
//! condition's trials, or for a shared parameter the sums over the conditions it is
//! estimated from. Error and response totals do not fix them: there they are the expected
//! split (presence × encounters, rounded as a fixed split is).

use crate::design::ConditionTrials;
use crate::engine::ScenarioSummary;
use crate::plan::Plan;

/// Column names, in order.
pub const COLUMNS: [&str; 31] = [
    "design",
    "record",
    "trials",
    "condition",
    "n_present",
    "n_absent",
    "method",
    "quantity",
    "truth",
    "mean",
    "mean_mc_se",
    "bias",
    "bias_mc_se",
    "sd",
    "sd_mc_se",
    "asymptotic_se",
    "rmse",
    "rmse_mc_se",
    "mean_se",
    "mean_se_mc_se",
    "coverage",
    "coverage_low",
    "coverage_high",
    "mean_width",
    "mean_width_mc_se",
    "corr_d_c",
    "corr_d_c_mc_se",
    "share_extreme",
    "share_degenerate",
    "share_not_converged",
    "datasets",
];

/// The CSV bytes of a run.
pub fn render(plan: &Plan, summaries: &[ScenarioSummary]) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(COLUMNS)?;
    for s in summaries {
        let design = &plan.designs()[s.scenario.design];
        let method = match s.method {
            crate::engine::Method::MonteCarlo => "monte-carlo",
            crate::engine::Method::Exact => "exact",
        };
        for q in &s.quantities {
            let (present, absent) = trials_of(&s.scenario.conditions, q.condition.as_deref());
            let row: Vec<String> = vec![
                design.name.clone(),
                design.record_label(),
                s.scenario.trials.to_string(),
                q.condition.clone().unwrap_or_default(),
                present.to_string(),
                absent.to_string(),
                method.to_string(),
                q.key(),
                num(q.truth),
                num(q.mean.value),
                num(q.mean.mc_se),
                num(q.bias.value),
                num(q.bias.mc_se),
                num(q.sd.value),
                num(q.sd.mc_se),
                q.asymptotic_se.map_or_else(String::new, num),
                num(q.rmse.value),
                num(q.rmse.mc_se),
                num(q.mean_se.value),
                num(q.mean_se.mc_se),
                num(q.coverage.value),
                num(q.coverage.low),
                num(q.coverage.high),
                num(q.mean_width.value),
                num(q.mean_width.mc_se),
                num(s.correlation.value),
                num(s.correlation.mc_se),
                num(s.datasets.extreme.value),
                num(s.datasets.degenerate.value),
                num(s.datasets.not_converged.value),
                num(s.datasets.total),
            ];
            w.write_record(&row)?;
        }
    }
    w.into_inner().map_err(|e| e.into_error().into())
}

/// Present and absent trials of the named condition, or summed over every condition for a
/// quantity that belongs to none (a single condition's own, a shared parameter's all).
fn trials_of(conditions: &[ConditionTrials], condition: Option<&str>) -> (u32, u32) {
    conditions
        .iter()
        .filter(|c| condition.is_none_or(|name| c.name == name))
        .fold((0, 0), |(p, a), c| (p + c.present, a + c.absent))
}

/// Full precision, empty for undefined values (so spreadsheets read NA, not text).
pub(crate) fn num(x: f64) -> String {
    if x.is_finite() {
        format!("{x}")
    } else {
        String::new()
    }
}
