//! JSON: everything, plus the resolved plan, seed and version, so a result can be traced.
//! No timestamps or thread counts: the same plan and seed give the same bytes.

use crate::engine::ScenarioSummary;
use crate::plan::Plan;
use serde::Serialize;

#[derive(Serialize)]
struct Document<'a> {
    tool: &'static str,
    version: &'static str,
    seed: u64,
    plan: &'a Plan,
    results: &'a [ScenarioSummary],
    comparisons: Vec<super::comparison::Comparison>,
    /// What the expected information adds to the readings (advice, scale-fit flags).
    advice: &'a crate::analytic::advice::RunAdvice,
    searches: &'a [crate::search::SearchResult],
    #[serde(skip_serializing_if = "Option::is_none")]
    groups: Option<&'a crate::groups::GroupReport>,
    #[serde(skip_serializing_if = "Option::is_none")]
    uncertainty: Option<&'a crate::uncertainty::UncertaintyReport>,
    caution: &'static str,
}

/// The JSON bytes of a run (pretty-printed, newline-terminated).
pub fn render(
    plan: &Plan,
    summaries: &[ScenarioSummary],
    searches: &[crate::search::SearchResult],
    groups: Option<&crate::groups::GroupReport>,
    advice: &crate::analytic::advice::RunAdvice,
    uncertainty: Option<&crate::uncertainty::UncertaintyReport>,
) -> serde_json::Result<Vec<u8>> {
    let doc = Document {
        tool: "vigil",
        version: env!("CARGO_PKG_VERSION"),
        seed: plan.study().seed,
        plan,
        results: summaries,
        comparisons: super::comparison::comparisons(plan, summaries, &advice.scale_fits),
        advice,
        searches,
        groups,
        uncertainty,
        caution: super::CAUTION,
    };
    let mut bytes = serde_json::to_vec_pretty(&doc)?;
    bytes.push(b'\n');
    Ok(bytes)
}
