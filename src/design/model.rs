//! A design at one trial count, as the general observation model of `cells`.
//!
//! This is the one place where plan-level designs meet the model's condition specs: the
//! fits, the expected information and the simulation of coarse records all start here.

use super::{Design, RecordKind, Response, SharedParameter, split_trials};
use crate::cells::coarsening::BlockKind;
use crate::cells::error::SpecError;
use crate::cells::observation_model::ObservationModel;
use crate::cells::spec::{BaseRateLink, ConditionSpec, Lapse, NaturalValues, Record, Role, Roles};
use crate::model::{LapseSpec, Observer};

/// The observation model of `design` with `trials` trials (or encounters) per condition.
pub fn observation_model(
    design: &Design,
    observer: &Observer,
    trials: u32,
) -> Result<ObservationModel, SpecError> {
    ObservationModel::new(condition_specs(design, observer, trials))
}

/// The specs that generate data: as [`condition_specs`], but with the animal's own σ even
/// where the analysis holds σ at 1 (yes/no designs, `fix_sigma`), so a wrong
/// equal-variance assumption shows up as bias, as it would in real data.
///
/// A two-choice task compares the two sides, so both orders see the difference of one target
/// and one foil sample, of SD √(1 + σ²) in either order: its table keeps σ = 1 and a d′ of
/// d′·√(2/(1 + σ²)), which equals d′ when σ = 1 (the analysis's equal-variance reading).
pub fn truth_specs(design: &Design, observer: &Observer, trials: u32) -> Vec<ConditionSpec> {
    let mut specs = condition_specs(design, observer, trials);
    for s in &mut specs {
        if design.record == RecordKind::TwoChoice {
            s.values.d_prime *= (2.0 / (1.0 + observer.sigma * observer.sigma)).sqrt();
        } else {
            s.values.sigma = observer.sigma;
        }
    }
    specs
}

/// One condition spec per condition of the design, as the analysis sees it.
pub fn condition_specs(design: &Design, observer: &Observer, trials: u32) -> Vec<ConditionSpec> {
    let (categories, boundary, fix_sigma, offsets) = match &design.response {
        Response::YesNo => (2, 1, true, Vec::new()),
        Response::Rating(s) => {
            let at = s.criteria[s.boundary - 1];
            let offsets: Vec<f64> = s.criteria.iter().map(|c| c - at).collect();
            (s.categories, s.boundary, s.fix_sigma, offsets)
        }
    };
    let many = design.conditions.len() > 1;
    let role = |p: SharedParameter| {
        if many && design.shares(p) {
            Role::Shared
        } else {
            Role::Free
        }
    };
    let roles = Roles {
        d_prime: role(SharedParameter::DPrime),
        criterion: role(SharedParameter::Criterion),
        sigma: if categories == 2 || fix_sigma {
            Role::Fixed
        } else {
            role(SharedParameter::Sigma)
        },
        gaps: if categories <= 2 {
            Role::Free
        } else {
            role(SharedParameter::Spacing)
        },
        base_rate: if many && design.shares(SharedParameter::BaseRate) {
            BaseRateLink::Shared
        } else {
            BaseRateLink::PerCondition
        },
    };
    let knowledge = design.base_rate;
    design
        .conditions
        .iter()
        .map(|c| {
            let record = match design.record {
                RecordKind::Full => {
                    let s = split_trials(trials, c.presence);
                    Record::Full {
                        present: u64::from(s.present),
                        absent: u64::from(s.absent),
                    }
                }
                RecordKind::ErrorTotals => Record::ErrorTotals {
                    encounters: u64::from(trials),
                    base_rate: knowledge,
                },
                RecordKind::ResponseTotals => Record::ResponseTotals {
                    encounters: u64::from(trials),
                    base_rate: knowledge,
                },
                RecordKind::TwoChoice => {
                    let s = split_trials(trials, c.presence);
                    Record::TwoChoice {
                        left: u64::from(s.present),
                        right: u64::from(s.absent),
                    }
                }
            };
            // The whole scale moves with the condition's criterion; its spacing is kept.
            let gaps = offsets.windows(2).map(|w| w[1] - w[0]).collect();
            ConditionSpec {
                name: c.name.clone(),
                categories,
                boundary,
                record,
                values: NaturalValues {
                    d_prime: c.d_prime,
                    criterion: c.criterion,
                    sigma: if fix_sigma { 1.0 } else { observer.sigma },
                    gaps,
                    base_rate: c.presence,
                },
                roles,
                lapse: observer.lapse.map(|l| lapse(l, categories, boundary)),
            }
        })
        .collect()
}

/// The lapse process of the model: see [`LapseSpec::guess`].
pub fn lapse(l: LapseSpec, categories: usize, boundary: usize) -> Lapse {
    Lapse {
        rate: l.rate,
        guess: (0..categories)
            .map(|m| l.guess(m, categories, boundary))
            .collect(),
    }
}

/// Block sizes of `model` (built for `design`) at `trials` per condition: present and absent
/// trials from the split, encounters = trials, the census as stated. Lets one model's
/// per-block information serve every trial count.
pub fn block_sizes(design: &Design, model: &ObservationModel, trials: u32) -> Vec<f64> {
    model
        .blocks()
        .iter()
        .map(|b| {
            let split = || split_trials(trials, design.conditions[b.condition].presence);
            match b.kind {
                BlockKind::PresentTrials => f64::from(split().present),
                BlockKind::AbsentTrials => f64::from(split().absent),
                BlockKind::Encounters => f64::from(trials),
                BlockKind::Census => b.n,
            }
        })
        .collect()
}
