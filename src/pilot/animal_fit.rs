//! Per-animal maximum-likelihood fits of pilot counts, with the existing fits and their rule
//! for rates of 0 or 1: the yes/no closed form (`fit::fit_yes_no`, Gourevitch & Galanter
//! 1967 SEs of the corrected table) for two categories, the equal-variance rating fit
//! (`fit::rating`, Dorfman & Alf 1969; σ held at 1) for graded scales.

use super::read::{CountTable, PilotData};
use crate::fit::fit_yes_no;
use crate::fit::rating::{self, RatingFitOptions, RatingTable};
use crate::vocab::RateCorrection;

/// How the animals are fitted.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PilotFitSettings {
    /// The rule for rates of 0 or 1 (the plan's `rate_correction`).
    pub correction: RateCorrection,
    /// On a graded scale, the criterion (1 … K−1) that is the yes/no boundary: categories
    /// above it count as "present" responses; c is measured there.
    pub boundary: usize,
}

/// One animal's estimates in one condition, with their sampling (co)variances.
#[derive(Debug, Clone, PartialEq)]
pub struct ConditionFit {
    pub d_prime: f64,
    pub criterion: f64,
    pub var_d_prime: f64,
    pub var_criterion: f64,
    pub cov: f64,
    /// Every criterion of a graded scale in the midpoint convention (k_j − d′/2); empty on a
    /// yes/no scale.
    pub criteria: Vec<f64>,
    /// Whether a raw rate (or an empty cell of a graded scale) needed the correction.
    pub corrected: bool,
}

/// Why an animal has no fit.
#[derive(Debug, Clone, PartialEq)]
pub enum NoFit {
    /// A rate of 0 or 1 (or an empty-cell pattern) the correction leaves without a maximum.
    Degenerate { condition: String },
    /// The rating fit did not converge or has no covariance.
    NotConverged { condition: String },
}

/// One animal: a fit in every condition, or the reason it has none.
#[derive(Debug, Clone, PartialEq)]
pub struct AnimalFit {
    pub name: String,
    pub fit: Result<Vec<ConditionFit>, NoFit>,
}

/// Fits every animal of `data` in every condition.
pub fn fit_animals(data: &PilotData, settings: PilotFitSettings) -> Vec<AnimalFit> {
    data.animals
        .iter()
        .map(|animal| AnimalFit {
            name: animal.name.clone(),
            fit: animal
                .tables
                .iter()
                .zip(&data.conditions)
                .map(|(table, cond)| {
                    fit_table(table, settings).map_err(|degenerate| {
                        let condition = cond.clone();
                        if degenerate {
                            NoFit::Degenerate { condition }
                        } else {
                            NoFit::NotConverged { condition }
                        }
                    })
                })
                .collect(),
        })
        .collect()
}

/// One table's fit; `Err(true)` when degenerate, `Err(false)` when the rating fit did not
/// converge.
fn fit_table(table: &CountTable, settings: PilotFitSettings) -> Result<ConditionFit, bool> {
    if table.absent.len() == 2 {
        return fit_two(table, settings.correction).ok_or(true);
    }
    fit_graded(table, settings)
}

fn fit_two(table: &CountTable, correction: RateCorrection) -> Option<ConditionFit> {
    let (n_absent, n_present) = (table.absent_total(), table.present_total());
    let (hits, false_alarms) = (table.present[1], table.absent[1]);
    let fit = fit_yes_no(hits, n_present, false_alarms, n_absent, correction)?;
    let extreme = |x: u32, n: u32| x == 0 || x == n;
    Some(ConditionFit {
        d_prime: fit.measures.d_prime,
        criterion: fit.measures.criterion,
        var_d_prime: fit.se_d_prime.powi(2),
        var_criterion: fit.se_criterion.powi(2),
        cov: fit.cov,
        criteria: Vec::new(),
        corrected: extreme(hits, n_present) || extreme(false_alarms, n_absent),
    })
}

fn fit_graded(table: &CountTable, settings: PilotFitSettings) -> Result<ConditionFit, bool> {
    let as_f64 = |row: &[u32]| row.iter().map(|&x| f64::from(x)).collect::<Vec<_>>();
    let raw =
        RatingTable::new(&as_f64(&table.absent), &as_f64(&table.present)).map_err(|_| true)?;
    let corrected = table.absent.iter().chain(&table.present).any(|&x| x == 0);
    let fitted = rating::apply_correction(&raw, settings.correction).map_err(|_| true)?;
    if rating::degeneracy(&fitted, true).is_some() {
        return Err(true);
    }
    let options = RatingFitOptions {
        fix_sigma: true,
        ..RatingFitOptions::default()
    };
    let fit = rating::fit(&fitted, &options).map_err(|_| true)?;
    let m = rating::measures(&fit, settings.boundary).map_err(|_| false)?;
    let half_d = 0.5 * m.d_prime.value;
    Ok(ConditionFit {
        d_prime: m.d_prime.value,
        criterion: m.c.value,
        var_d_prime: m.d_prime.se.powi(2),
        var_criterion: m.c.se.powi(2),
        cov: m.corr_d_prime_c * m.d_prime.se * m.c.se,
        criteria: fit.criteria().iter().map(|k| k - half_d).collect(),
        corrected,
    })
}
