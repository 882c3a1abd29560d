//! A whole pilot analysed: the per-animal fits, the population values and the pilot's design
//! (trials per animal, share of present trials) that a plan skeleton starts from.

use super::animal_fit::{AnimalFit, NoFit, PilotFitSettings, fit_animals};
use super::population::{PopulationError, PopulationFit, PopulationSettings, fit_population};
use super::read::PilotData;

/// Everything `vigil pilot` computed, ready for the report.
#[derive(Debug, Clone, PartialEq)]
pub struct PilotAnalysis {
    pub data: PilotData,
    pub settings: PilotFitSettings,
    pub population_settings: PopulationSettings,
    /// One per animal, in file order.
    pub fits: Vec<AnimalFit>,
    pub population: PopulationFit,
    /// Median over animals and conditions of the trials (present + absent) per condition.
    pub median_trials: u32,
    /// Share of all pilot trials with the stimulus present.
    pub presence: f64,
    /// Animal × condition tables with a raw rate of 0 or 1 (or an empty graded cell).
    pub corrected_tables: usize,
}

impl PilotAnalysis {
    /// The animals left out, with the reason.
    pub fn excluded(&self) -> Vec<(&str, &NoFit)> {
        self.fits
            .iter()
            .filter_map(|a| a.fit.as_ref().err().map(|e| (a.name.as_str(), e)))
            .collect()
    }
}

/// Fits the animals of `data` and the population values of those with a fit.
pub fn analyse(
    data: PilotData,
    settings: PilotFitSettings,
    population_settings: PopulationSettings,
) -> Result<PilotAnalysis, PopulationError> {
    let fits = fit_animals(&data, settings);
    let fitted: Vec<&[_]> = fits
        .iter()
        .filter_map(|a| a.fit.as_ref().ok().map(Vec::as_slice))
        .collect();
    let population = fit_population(&fitted, &data.conditions, population_settings)?;
    let mut totals: Vec<u32> = data
        .animals
        .iter()
        .flat_map(|a| {
            a.tables
                .iter()
                .map(|t| t.absent_total() + t.present_total())
        })
        .collect();
    totals.sort_unstable();
    let median_trials = totals[totals.len() / 2];
    let (present, all) =
        data.animals
            .iter()
            .flat_map(|a| &a.tables)
            .fold((0u64, 0u64), |(p, n), t| {
                let tp = u64::from(t.present_total());
                (p + tp, n + tp + u64::from(t.absent_total()))
            });
    let corrected_tables = fitted
        .iter()
        .flat_map(|f| f.iter())
        .filter(|f| f.corrected)
        .count();
    Ok(PilotAnalysis {
        data,
        settings,
        population_settings,
        fits,
        population,
        median_trials,
        presence: present as f64 / all as f64,
        corrected_tables,
    })
}
