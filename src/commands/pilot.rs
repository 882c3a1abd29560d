//! `vigil pilot`: read pilot counts (a tidy CSV), fit each animal, estimate the population
//! values, print them and optionally write a plan skeleton holding them.

use super::AppError;
use crate::output::CommitSet;
use crate::pilot::{self, PilotError, PilotFitSettings, PopulationSettings};
use crate::plan::Plan;
use crate::report::{pilot_plan, pilot_text};
use crate::vocab::RateCorrection;
use std::path::PathBuf;

/// What `vigil pilot` was asked.
#[derive(Debug, Clone)]
pub struct PilotRequest {
    /// The pilot file (CSV).
    pub csv: PathBuf,
    /// Where to write the plan skeleton, if anywhere.
    pub plan_out: Option<PathBuf>,
    /// Response categories K of the pilot's scale (2 = yes/no).
    pub categories: usize,
    /// Yes/no boundary of a graded scale (1 … K−1); default ⌊K/2⌋.
    pub boundary: Option<usize>,
    /// Rule for rates of 0 or 1, by name.
    pub rate_correction: String,
    /// Seed of the bootstrap over animals.
    pub seed: u64,
}

/// Runs `vigil pilot`; returns the report text. Bad input is refused before anything is
/// written; the skeleton is checked as a plan and written whole (temporary file, then rename).
pub fn pilot(req: &PilotRequest) -> Result<String, AppError> {
    let correction = RateCorrection::from_name(&req.rate_correction).ok_or_else(|| {
        AppError::Input(format!(
            "option --rate-correction: unknown rule `{}`\n  allowed: {}",
            req.rate_correction,
            RateCorrection::NAMES
                .iter()
                .map(|n| format!("`{n}`"))
                .collect::<Vec<_>>()
                .join(", ")
        ))
    })?;
    let k = req.categories;
    let boundary = req.boundary.unwrap_or((k / 2).max(1));
    if k >= 2 && !(1..k).contains(&boundary) {
        return Err(AppError::Input(format!(
            "option --boundary: {boundary} is not a criterion of a {k}-category scale\n  allowed: 1 … {}",
            k - 1
        )));
    }
    // The skeleton's path is checked (and claimed) before the pilot is read: the pilot file
    // itself can never be overwritten.
    let mut set = CommitSet::new();
    set.input("pilot CSV", &req.csv);
    let slot = req
        .plan_out
        .as_ref()
        .map(|p| set.claim("--plan-out", p))
        .transpose()?;
    let data = pilot::read(&req.csv, k)?;
    let settings = PilotFitSettings {
        correction,
        boundary,
    };
    let population = PopulationSettings {
        seed: req.seed,
        ..PopulationSettings::default()
    };
    let analysis = pilot::analyse(data, settings, population).map_err(|e| {
        PilotError::file(
            &req.csv,
            e.to_string(),
            "counts from at least 2 animals whose fits exist (try --rate-correction log-linear)",
        )
    })?;
    if let (Some(path), Some(slot)) = (&req.plan_out, slot) {
        let text = pilot_plan::render(&analysis);
        // The skeleton must be a plan `vigil check` accepts; a refusal here is a bug of ours.
        Plan::from_str(path, &text)
            .map_err(|e| AppError::Internal(format!("the plan skeleton does not validate: {e}")))?;
        set.write(slot, text.as_bytes())?;
        set.commit()?;
    }
    Ok(pilot_text::render(&analysis, req.plan_out.as_deref()))
}
