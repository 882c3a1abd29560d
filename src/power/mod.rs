//! Hypotheses, power and the search for the smallest experiment that meets the targets.
//!
//! Each hypothesis is tested in every simulated dataset by a Wald test and by a
//! likelihood-ratio test (the restricted model refitted). Power is the rejection rate over
//! all simulated datasets: a dataset whose fit fails cannot reject, so failures lower power
//! rather than being dropped.

pub mod asymptotic;
pub mod contrast;

pub use contrast::{contrast, ideal_criterion};

use crate::cells::observation_model::ObservationModel;
use crate::design::Design;
use crate::design::goals::TestKind;
use crate::engine::Contrast;
use crate::plan::Plan;

/// The contrasts of every plan hypothesis that this design can test.
pub fn contrasts_for(plan: &Plan, design: &Design, model: &ObservationModel) -> Vec<Contrast> {
    plan.hypotheses()
        .iter()
        .filter(|h| h.kind != TestKind::GroupDifference)
        .filter_map(|h| contrast(plan, design, model, h))
        .collect()
}
