//! Expected information of a plan's designs over trial counts: asymptotic SEs of the reported
//! quantities, corr(d̂′, ĉ), rank, condition number and the identifiability verdict, and for
//! designs that cannot separate their parameters, profile-likelihood ranges of d′ and c.
//!
//! For independent multinomial blocks I(θ) = Σ_b n_b·I_b with I_b = Σ_cells ∂p ∂pᵀ / p
//! (see [`crate::cells::information`]); I_b does not depend on the trial count, so a scan
//! builds it once per design ([`DesignInformation::new`]) and only the block sizes change from
//! count to count: present/absent trials from the design's split (recomputed per count, since
//! rounding moves it), encounters = the count, census = its stated size.
//!
//! The model is the analysis model at the hypothesised values, without lapses: the
//! information a field analysis that ignores lapses would have if the animal did not lapse.
//! (With lapses in the data, the asymptotic SEs of that analysis are not these; the Monte
//! Carlo results of `vigil run` show the difference.)

use nalgebra::DMatrix;
use serde::Serialize;
use thiserror::Error;

use crate::cells::cell_probabilities::{Order, cell_probabilities};
use crate::cells::error::{InputError, SpecError};
use crate::cells::identifiability::assess;
use crate::cells::information::{ConditionPrecision, UnitInformation, precision};
use crate::cells::likelihood::Counts;
use crate::cells::newton::{NewtonOptions, Start, fit};
use crate::cells::observation_model::ObservationModel;
use crate::cells::profile::{ProfileOptions, ProfileTarget, profile_interval};
use crate::cells::verdict::{ParameterNames, ProfileRange, RangeEnd, Verdict, from_assessment};
use crate::design::Design;
use crate::design::model::condition_specs;
use crate::design::quantities::{ReportedQuantity, reported_quantities};
use crate::plan::Plan;
use crate::vocab::Quantity;

use super::trial_grid::fits_design;

/// Half-width of the profile search window, in the parameter's own units, on each side.
pub const PROFILE_WINDOW: f64 = 10.0;
/// Width of the final bracket around each profile crossing.
pub const PROFILE_TOLERANCE: f64 = 1e-4;

/// Why the information of a design could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum InformationError {
    #[error("design \"{design}\": {source}")]
    Model { design: String, source: SpecError },
    #[error("design \"{design}\": {source}")]
    Input { design: String, source: InputError },
    #[error(
        "design \"{design}\" cannot be run at {trials} trials: every design needs at least 2, \
         and a full record at least one present and one absent trial in every condition"
    )]
    Trials { design: String, trials: u32 },
    #[error("the plan has no design number {index} (designs are counted from 0)")]
    NoSuchDesign { index: usize },
}

/// Asymptotic SE of one reported quantity (same quantities, labels and order as the Monte
/// Carlo tables; see [`crate::design::quantities`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AsymptoticSe {
    pub quantity: Quantity,
    /// Condition name for designs with several conditions (not for shared parameters).
    pub condition: Option<String>,
    pub truth: f64,
    /// `None` when the information is singular (the design does not identify θ).
    pub se: Option<f64>,
}

impl AsymptoticSe {
    /// Table label, as in the Monte Carlo tables: `d′`, `c[low]`, `π`.
    pub fn label(&self) -> String {
        self.quantity.label_in(self.condition.as_deref())
    }
}

/// Everything the expected information says about one design at one trial count.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScenarioInformation {
    /// Trials (or encounters) per condition.
    pub trials: u32,
    /// Number of free parameters.
    pub dim: usize,
    /// Rank of the unit-diagonal information at relative tolerance
    /// [`crate::cells::identifiability::RANK_TOLERANCE`].
    pub rank: usize,
    /// λ_max/λ_min of the unit-diagonal information (∞ when the rank is below full; JSON null).
    pub condition_number: f64,
    /// Largest |corr| between two estimates (NaN, JSON null, when singular).
    pub max_abs_corr: f64,
    pub verdict: Verdict,
    pub quantities: Vec<AsymptoticSe>,
    /// corr(d̂′, ĉ) of the first condition, when both are estimated and θ is identified.
    pub corr_d_prime_criterion: Option<f64>,
    /// Profile-likelihood ranges of d′ and c (first condition) on the expected data, at the
    /// plan's confidence level; only for designs that are not identified.
    pub profile: Option<Vec<ProfileRange>>,
}

impl ScenarioInformation {
    /// The SE of the first reported quantity of this kind (d′ and c of the first condition).
    pub fn se(&self, quantity: Quantity) -> Option<f64> {
        self.quantities
            .iter()
            .find(|q| q.quantity == quantity)
            .and_then(|q| q.se)
    }
}

/// What a design fixes for a scan over trial counts: model, per-block unit information,
/// cell probabilities at the truth and names.
#[derive(Debug, Clone)]
pub struct DesignInformation {
    design: Design,
    model: ObservationModel,
    theta: Vec<f64>,
    unit: UnitInformation,
    probabilities: Vec<Vec<f64>>,
    names: ParameterNames,
    quantities: Vec<ReportedQuantity>,
    level: f64,
}

impl DesignInformation {
    /// Builds the analysis model of `design` (lapses off) at the plan's hypothesised values.
    pub fn new(plan: &Plan, design: &Design) -> Result<Self, InformationError> {
        let model_err = |source| InformationError::Model {
            design: design.name.clone(),
            source,
        };
        let input_err = |source| InformationError::Input {
            design: design.name.clone(),
            source,
        };
        // Block sizes are replaced per count, so any count builds the same layout.
        let at = design.trials.first().copied().unwrap_or(2);
        let mut specs = condition_specs(design, plan.observer(), at);
        specs.iter_mut().for_each(|s| s.lapse = None);
        let quantities = reported_quantities(&specs);
        let model = ObservationModel::new(specs).map_err(model_err)?;
        let theta = model.hypothesised_theta();
        let unit = UnitInformation::new(&model, &theta).map_err(input_err)?;
        let probabilities = cell_probabilities(&model, &theta, Order::First)
            .map_err(input_err)?
            .into_iter()
            .map(|b| b.p)
            .collect();
        let conditions: Vec<String> = design.conditions.iter().map(|c| c.name.clone()).collect();
        let names = ParameterNames::new(model.parameters(), &conditions);
        Ok(DesignInformation {
            design: design.clone(),
            model,
            theta,
            unit,
            probabilities,
            names,
            quantities,
            level: plan.study().confidence,
        })
    }

    /// Number of free parameters.
    pub fn dim(&self) -> usize {
        self.model.dim()
    }

    /// Free cells of the observed table: Σ over blocks of (cells − 1), the degrees of
    /// freedom a multinomial model of the table can use. A model with as many parameters
    /// reproduces any table exactly (it is saturated).
    pub fn free_cells(&self) -> usize {
        self.model
            .blocks()
            .iter()
            .map(|b| b.cells.len().saturating_sub(1))
            .sum()
    }

    /// Names of the free parameters as reports show them.
    pub fn parameter_names(&self) -> &ParameterNames {
        &self.names
    }

    /// Block sizes at `trials` per condition.
    pub fn block_sizes(&self, trials: u32) -> Result<Vec<f64>, InformationError> {
        if !fits_design(&self.design, trials) {
            return Err(InformationError::Trials {
                design: self.design.name.clone(),
                trials,
            });
        }
        Ok(crate::design::model::block_sizes(
            &self.design,
            &self.model,
            trials,
        ))
    }

    /// The expected information matrix I(θ_true) at `trials` per condition.
    pub fn matrix(&self, trials: u32) -> Result<DMatrix<f64>, InformationError> {
        let sizes = self.block_sizes(trials)?;
        self.unit
            .total(&sizes)
            .map_err(|source| InformationError::Input {
                design: self.design.name.clone(),
                source,
            })
    }

    /// The expected information, SEs and verdict at `trials`; with `profile`, also the
    /// profile ranges when the design is not identified.
    pub fn at(&self, trials: u32, profile: bool) -> Result<ScenarioInformation, InformationError> {
        let input_err = |source| InformationError::Input {
            design: self.design.name.clone(),
            source,
        };
        let sizes = self.block_sizes(trials)?;
        let info = self.unit.total(&sizes).map_err(input_err)?;
        let names = self.model.parameters().names();
        let id = assess(&info, names).map_err(input_err)?;
        let prec = precision(&self.model, &self.theta, &info).map_err(input_err)?;
        let conditions = prec.as_ref().map(|p| p.conditions.as_slice());
        let quantities = self
            .quantities
            .iter()
            .map(|q| AsymptoticSe {
                quantity: q.quantity,
                condition: q.label.clone(),
                truth: q.truth,
                se: conditions.and_then(|c| se_of(&c[q.condition], q.quantity, q.truth)),
            })
            .collect();
        let verdict = from_assessment(&id.verdict, self.model.parameters(), &self.names);
        let profile = match (&verdict, profile) {
            (Verdict::NotIdentified { .. }, true) => Some(self.profiles(&sizes)?),
            _ => None,
        };
        Ok(ScenarioInformation {
            trials,
            dim: id.dim,
            rank: id.rank,
            // Below full rank λ_min is rounding noise (~1e-17 relative): report ∞, not noise.
            condition_number: if id.rank < id.dim {
                f64::INFINITY
            } else {
                id.condition_number
            },
            max_abs_corr: id.max_abs_corr,
            verdict,
            quantities,
            corr_d_prime_criterion: conditions.and_then(|c| c[0].corr_d_prime_criterion),
            profile,
        })
    }

    /// Profile ranges of d′ and c of the first condition on the expected counts
    /// n_b·p_cell(θ_true), whose likelihood is maximal at the truth.
    fn profiles(&self, sizes: &[f64]) -> Result<Vec<ProfileRange>, InformationError> {
        let input_err = |source| InformationError::Input {
            design: self.design.name.clone(),
            source,
        };
        let cells = self
            .probabilities
            .iter()
            .zip(sizes)
            .map(|(p, &n)| p.iter().map(|x| n * x).collect())
            .collect();
        let counts = Counts::new(&self.model, cells).map_err(input_err)?;
        let options = ProfileOptions {
            level: self.level,
            half_width: PROFILE_WINDOW,
            tolerance: PROFILE_TOLERANCE,
            fit: NewtonOptions::default(),
        };
        let start = Start::Theta(self.theta.clone());
        let best = fit(&self.model, &counts, start, &options.fit).map_err(input_err)?;
        let spec = &self.model.conditions()[0];
        let condition = spec.name.clone();
        let mut out = Vec::new();
        for (parameter, truth, target) in [
            (
                "d′",
                spec.values.d_prime,
                ProfileTarget::DPrime {
                    condition: condition.clone(),
                },
            ),
            (
                "c",
                spec.values.criterion,
                ProfileTarget::Criterion { condition },
            ),
        ] {
            let r = profile_interval(&self.model, &counts, &best, &target, &options)
                .map_err(input_err)?;
            // `d′[x]` when the first condition has its own d′ among several, else `d′`.
            let symbol = self
                .model
                .parameters()
                .index_of(&r.parameter)
                .map_or(parameter.to_string(), |i| self.names.symbols[i].clone());
            let mut lower: RangeEnd = r.lower.into();
            // Plans require d′ ≥ 0: a lower end below 0 (a crossing or the window's edge)
            // means the data are consistent with every d′ down to 0, the smallest allowed.
            if parameter == "d′" && range_end_value(lower) < D_PRIME_FLOOR {
                lower = RangeEnd::Floor {
                    value: D_PRIME_FLOOR,
                };
            }
            out.push(ProfileRange {
                parameter: symbol,
                truth,
                level: r.level,
                lower,
                upper: r.upper.into(),
                inner_failures: r.inner_failures,
            });
        }
        Ok(out)
    }
}

/// The smallest d′ a plan allows (validation rejects negative d′).
pub const D_PRIME_FLOOR: f64 = 0.0;

fn range_end_value(end: RangeEnd) -> f64 {
    match end {
        RangeEnd::At { value } | RangeEnd::Floor { value } => value,
        RangeEnd::BeyondWindow { edge } => edge,
    }
}

/// The asymptotic SE of `quantity` (`truth` its hypothesised value, which p_c's delta method
/// needs).
fn se_of(p: &ConditionPrecision, quantity: Quantity, truth: f64) -> Option<f64> {
    match quantity {
        Quantity::PercentCorrect => {
            // d′ = √2·z(p_c) at the hypothesised value.
            let d = std::f64::consts::SQRT_2 * crate::model::normal::z(truth)?;
            p.se_d_prime
                .map(|se| crate::design::quantities::percent_correct(d, se).1)
        }
        Quantity::DPrime => p.se_d_prime,
        Quantity::Criterion => p.se_criterion,
        Quantity::Sigma => p.se_sigma,
        Quantity::BaseRate => p.se_base_rate,
        _ => None,
    }
}

/// The expected information of `design` at `trials` per condition, with profile ranges when
/// it is not identified.
pub fn scenario_information(
    plan: &Plan,
    design: &Design,
    trials: u32,
) -> Result<ScenarioInformation, InformationError> {
    DesignInformation::new(plan, design)?.at(trials, true)
}

/// The expected information of `design` over `trials` (per-block information built once),
/// with profile ranges at every count that does not identify θ.
pub fn information_grid(
    plan: &Plan,
    design: &Design,
    trials: &[u32],
) -> Result<Vec<ScenarioInformation>, InformationError> {
    let d = DesignInformation::new(plan, design)?;
    trials.iter().map(|&n| d.at(n, true)).collect()
}
