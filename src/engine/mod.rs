//! The engine: for every scenario, simulate → fit → tally in parallel, then summarise.
//!
//! Printing stays out: progress goes to a callback the command line turns into a bar.

pub mod cells_kernel;
pub mod parallel;
pub mod rating_kernel;
pub mod summary;
pub mod tally;
pub mod yesno_kernel;

pub use summary::{DatasetSummary, Figure, Method, QuantitySummary, ScenarioSummary, Share};
pub use tally::Quantity;

use crate::analytic::exact;
use crate::analytic::verdict::{Verdict, plain_verdict};
use crate::design::{Design, Response};
use crate::model::normal;
use crate::plan::{Plan, Scenario};
use cells_kernel::CellsKernel;
use parallel::run_replicates;
use rating_kernel::RatingKernel;
use thiserror::Error;
use yesno_kernel::YesNoKernel;

/// How to run a plan.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct RunOptions {
    /// Enumerate yes/no outcomes exactly instead of simulating.
    pub exact: bool,
}

/// Why a plan could not be run as asked.
#[derive(Debug, Error, PartialEq)]
pub enum RunError {
    #[error(
        "design \"{design}\" at {trials} trials has {outcomes} outcomes, more than the {max} that --exact enumerates; drop --exact to simulate it"
    )]
    TooLargeToEnumerate {
        design: String,
        trials: u32,
        outcomes: u64,
        max: u64,
    },
    #[error(
        "design \"{design}\" is not a single-condition yes/no design with a full record; --exact covers those only"
    )]
    ExactNeedsYesNo { design: String },
    #[error(
        "--exact enumerates estimates only; hypothesis tests need simulation: drop --exact or the [[hypothesis]] tables"
    )]
    ExactWithHypotheses,
    #[error("--experiments must be at least 1")]
    NoExperiments,
    #[error("design \"{design}\": {message}")]
    Model { design: String, message: String },
}

/// Critical value of a two-sided Wald interval at `level`: z_{1−(1−level)/2}.
pub fn z_critical(level: f64) -> f64 {
    normal::z(1.0 - (1.0 - level) / 2.0).unwrap_or(f64::NAN)
}

/// Number of replicates the whole plan will run (for progress bars).
pub fn total_replicates(plan: &Plan, options: RunOptions) -> u64 {
    if options.exact {
        0
    } else {
        plan.scenarios().len() as u64 * plan.study.experiments
    }
}

/// Checks that the plan can be run with these options before any work starts.
pub fn preflight(plan: &Plan, options: RunOptions) -> Result<(), RunError> {
    if !options.exact {
        return Ok(());
    }
    if !plan.hypotheses.is_empty() {
        return Err(RunError::ExactWithHypotheses);
    }
    for s in plan.scenarios() {
        let design = &plan.designs[s.design];
        if !matches!(design.response, Response::YesNo) || !design.is_single_table() {
            return Err(RunError::ExactNeedsYesNo {
                design: design.name.clone(),
            });
        }
        if !exact::can_enumerate(s.split.present, s.split.absent) {
            return Err(RunError::TooLargeToEnumerate {
                design: design.name.clone(),
                trials: s.trials,
                outcomes: (u64::from(s.split.present) + 1) * (u64::from(s.split.absent) + 1),
                max: exact::MAX_OUTCOMES,
            });
        }
    }
    Ok(())
}

/// Runs every scenario of the plan and summarises each.
pub fn run_plan(
    plan: &Plan,
    options: RunOptions,
    progress: &(dyn Fn(u64) + Sync),
) -> Result<Vec<ScenarioSummary>, RunError> {
    preflight(plan, options)?;
    plan.scenarios()
        .iter()
        .map(|s| run_scenario(plan, s, options, progress))
        .collect()
}

/// Whether any plan hypothesis can be tested on this design (it then runs through the
/// general path, which fits the restricted models the likelihood-ratio tests need).
pub fn tests_apply(plan: &Plan, design: &Design) -> bool {
    if plan.hypotheses.is_empty() {
        return false;
    }
    let trials = design.trials[0];
    crate::design::model::observation_model(design, &plan.observer, trials)
        .map(|m| !crate::power::contrasts_for(plan, design, &m).is_empty())
        .unwrap_or(false)
}

/// Runs one scenario, with the expected-information SE beside every simulated figure.
pub fn run_scenario(
    plan: &Plan,
    scenario: &Scenario,
    options: RunOptions,
    progress: &(dyn Fn(u64) + Sync),
) -> Result<ScenarioSummary, RunError> {
    let mut summary = simulate_scenario(plan, scenario, options, progress)?;
    let design = &plan.designs[scenario.design];
    let Ok(information) = crate::analytic::information::DesignInformation::new(plan, design) else {
        return Ok(summary);
    };
    if let Ok(info) = information.at(scenario.trials, false) {
        for q in &mut summary.quantities {
            let label = q.label();
            q.asymptotic_se = info
                .quantities
                .iter()
                .find(|a| a.label() == label)
                .and_then(|a| a.se);
        }
        summary.identifiability = match info.verdict {
            Verdict::Identified => None,
            Verdict::Weak { .. } => Some(plain_verdict(&info)),
            // Not identified: profile-likelihood ranges instead of meaningless SEs.
            Verdict::NotIdentified { .. } => {
                information.at(scenario.trials, true).ok().map(|full| {
                    let ranges: Vec<String> = full
                        .profile
                        .iter()
                        .flatten()
                        .map(|r| r.describe())
                        .collect();
                    format!(
                        "{}; at the plan's confidence level the data are consistent with {}",
                        plain_verdict(&full),
                        ranges.join(" and ")
                    )
                })
            }
        };
    }
    Ok(summary)
}

/// Simulates (or enumerates) one scenario.
fn simulate_scenario(
    plan: &Plan,
    scenario: &Scenario,
    options: RunOptions,
    progress: &(dyn Fn(u64) + Sync),
) -> Result<ScenarioSummary, RunError> {
    let design = &plan.designs[scenario.design];
    let z_crit = z_critical(plan.study.confidence);
    let study = &plan.study;
    let model_error = |e: &dyn std::fmt::Display| RunError::Model {
        design: design.name.clone(),
        message: e.to_string(),
    };
    let simulate = |tally: tally::EstimateTally| {
        summary::summarise(*scenario, &design.name, &tally, Method::MonteCarlo)
    };
    if !design.is_single_table() || tests_apply(plan, design) {
        let kernel = CellsKernel::with_tests(
            design,
            &plan.observer,
            scenario.trials,
            study.rate_correction,
            z_crit,
            &|model| crate::power::contrasts_for(plan, design, model),
            study.alpha,
        )
        .map_err(|e| model_error(&e))?;
        return Ok(simulate(run_replicates(
            &kernel,
            study.seed,
            scenario.id,
            study.experiments,
            progress,
        )));
    }
    Ok(match &design.response {
        Response::YesNo => {
            let kernel = YesNoKernel::new(
                &design.conditions[0].observer(&plan.observer),
                scenario.split.present,
                scenario.split.absent,
                study.rate_correction,
                z_crit,
            );
            if options.exact {
                summary::summarise(
                    *scenario,
                    &design.name,
                    &exact::enumerate(&kernel),
                    Method::Exact,
                )
            } else {
                simulate(run_replicates(
                    &kernel,
                    study.seed,
                    scenario.id,
                    study.experiments,
                    progress,
                ))
            }
        }
        Response::Rating(scale) => {
            let kernel = RatingKernel::new(
                scale,
                &design.conditions[0],
                &plan.observer,
                scenario.split,
                study.rate_correction,
                z_crit,
            )
            .map_err(|e| model_error(&e))?;
            simulate(run_replicates(
                &kernel,
                study.seed,
                scenario.id,
                study.experiments,
                progress,
            ))
        }
    })
}
