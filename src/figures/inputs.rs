//! The typed results every figure draws from, gathered once: the run's summaries, the
//! searches, the groups, the expected information over a fine trial grid and its power
//! curves. This is the only file of `figures` that calls a statistics layer (the
//! expected-information power curves, computed on the scan's own grid); each figure file
//! is then a pure function of these values.

use crate::analytic::scan::DesignScan;
use crate::engine::ScenarioSummary;
use crate::groups::GroupReport;
use crate::plan::Plan;
use crate::power::asymptotic::{PowerCurve, power_curves};
use crate::search::SearchResult;

/// Everything a figure may show.
pub struct Inputs<'a> {
    pub plan: &'a Plan,
    pub summaries: &'a [ScenarioSummary],
    pub searches: &'a [SearchResult],
    pub groups: Option<&'a GroupReport>,
    /// Expected information per design over a fine grid (as `vigil explore` computes it).
    pub scans: &'a [DesignScan],
    /// Per design (plan order): the expected-information power of each hypothesis over the
    /// scan's grid.
    pub power_curves: Vec<Vec<PowerCurve>>,
    /// `[sensitivity]` and `[assurance]` results, when the plan has them.
    pub uncertainty: Option<&'a crate::uncertainty::UncertaintyReport>,
}

impl<'a> Inputs<'a> {
    /// Gathers the inputs and computes the power curves on each design's scan grid.
    pub fn new(
        plan: &'a Plan,
        summaries: &'a [ScenarioSummary],
        searches: &'a [SearchResult],
        groups: Option<&'a GroupReport>,
        scans: &'a [DesignScan],
    ) -> Self {
        let power_curves = plan
            .designs()
            .iter()
            .enumerate()
            .map(|(d, design)| {
                let grid: Vec<u32> = scans
                    .get(d)
                    .map(|s| s.rows.iter().map(|r| r.trials).collect())
                    .unwrap_or_default();
                power_curves(plan, design, &grid)
            })
            .collect();
        Self {
            plan,
            summaries,
            searches,
            groups,
            scans,
            power_curves,
            uncertainty: None,
        }
    }

    /// The same inputs with the sensitivity and assurance results.
    pub fn with_uncertainty(
        self,
        uncertainty: Option<&'a crate::uncertainty::UncertaintyReport>,
    ) -> Self {
        Self {
            uncertainty,
            ..self
        }
    }

    /// The summaries of design `d`, in trial order.
    pub fn rows(&self, d: usize) -> Vec<&'a ScenarioSummary> {
        self.summaries
            .iter()
            .filter(|s| s.scenario.design == d)
            .collect()
    }
}
