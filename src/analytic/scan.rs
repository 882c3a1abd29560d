//! A whole plan scanned by expected information: every design over its grid of trial counts.

use serde::Serialize;

use super::advice::{Advice, Figures, Yardsticks, advise, shortfalls};
use super::information::{DesignInformation, InformationError, ScenarioInformation};
use super::scale_fit::{ScaleFit, scale_fit};
use super::trial_grid::{DEFAULT_POINTS, design_grid};
use crate::cells::verdict::Verdict;
use crate::plan::Plan;

/// Which trial counts to scan; `None` ends default per design (see
/// [`super::trial_grid::design_grid`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ScanOptions {
    pub from: Option<u32>,
    pub to: Option<u32>,
    /// Log-spaced counts per design (before deduplication; the listed counts are added).
    pub points: usize,
}

impl Default for ScanOptions {
    fn default() -> Self {
        ScanOptions {
            from: None,
            to: None,
            points: DEFAULT_POINTS,
        }
    }
}

/// One design's scan.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignScan {
    pub design: String,
    /// Short description of the record, e.g. "error totals, unknown base rate".
    pub record: String,
    /// Free parameters in θ order, as the verdicts name them.
    pub parameters: Vec<String>,
    /// One row per trial count, increasing (empty when no count of the range suits the design).
    pub rows: Vec<ScenarioInformation>,
    /// When the largest count does not tell d′ and c apart (the rule of [`super::advice`]):
    /// what would.
    pub advice: Option<Advice>,
    /// A rating fit with σ free that is saturated or leaves σ barely determined.
    pub scale_fit: Option<ScaleFit>,
}

/// Scans every design of `plan`. Profile ranges are computed at every count that does not
/// identify θ (cheap next to a simulation: a few hundred small fits per count).
pub fn scan_plan(plan: &Plan, options: ScanOptions) -> Result<Vec<DesignScan>, InformationError> {
    plan.designs()
        .iter()
        .map(|design| {
            let info = DesignInformation::new(plan, design)?;
            let rows = design_grid(design, options.from, options.to, options.points)
                .into_iter()
                .map(|n| info.at(n, true))
                .collect::<Result<Vec<_>, _>>()?;
            let y = Yardsticks::of(plan.targets());
            let advice = match rows.last() {
                Some(last) if !matches!(last.verdict, Verdict::NotIdentified { .. }) => {
                    let seen = shortfalls(&y, &Figures::asymptotic(last, plan.study().confidence));
                    if seen.is_empty() {
                        None
                    } else {
                        Some(advise(plan, design, last.trials, &seen)?)
                    }
                }
                _ => None,
            };
            let counts: Vec<u32> = rows.iter().map(|r| r.trials).collect();
            let scale_fit = scale_fit(plan, design, &counts)?;
            Ok(DesignScan {
                design: design.name.clone(),
                record: design.record_label(),
                parameters: info.parameter_names().symbols.clone(),
                rows,
                advice,
                scale_fit,
            })
        })
        .collect()
}
