//! Pilot data in: a tidy CSV of per-animal counts, fitted animal by animal with the existing
//! fits, and population values (mean and between-animal SD of d′ and c, their correlation)
//! with intervals, ready to fill a plan. The format is documented in `docs/pilot.md`.
//!
//! - [`labels`]: the accepted header names, stimulus and response labels and counts;
//! - [`read`]: the CSV into one count table per animal and condition, with located errors;
//! - [`animal_fit`]: per-animal maximum-likelihood fits (yes/no closed form or rating fit);
//! - [`population`]: the unweighted method of moments and its intervals;
//! - [`analysis`]: the whole pilot analysed, with the pilot design a plan starts from.

pub mod analysis;
pub mod animal_fit;
pub mod error;
pub mod labels;
pub mod population;
pub mod read;

pub use analysis::{PilotAnalysis, analyse};
pub use animal_fit::{AnimalFit, ConditionFit, NoFit, PilotFitSettings, fit_animals};
pub use error::PilotError;
pub use population::{PopulationFit, PopulationSettings, fit_population};
pub use read::{PilotData, read};
