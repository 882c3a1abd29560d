//! Evaluating scenarios: the one place that decides how a scenario is run (exact enumeration
//! or the engine's Monte Carlo, and which kernel), then puts the expected-information SE and
//! the identifiability verdict beside every simulated figure.
//!
//! It sits above `engine`, `analytic` and `power` and below the search and the commands, so
//! the engine never calls back up.

pub mod precision;

use crate::analytic::exact;
use crate::cells::verdict::{Identification, Verdict};
use crate::design::Response;
use crate::engine::parallel::{run_replicates, run_replicates_until};
use crate::engine::scenario_kernel::{FitSettings, ScenarioKernel};
use crate::engine::summary::{self, Method, ScenarioSummary};
use crate::engine::tally::EstimateTally;
use crate::infer::z_critical;
use crate::phase::{Event, Phase, Progress};
use crate::plan::{Plan, Scenario};
use thiserror::Error;

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
    #[error("design \"{design}\": {message}")]
    Model { design: String, message: String },
}

/// Number of replicates the whole plan will run (for progress bars).
pub fn total_replicates(plan: &Plan, options: RunOptions) -> u64 {
    if options.exact {
        0
    } else {
        plan.scenarios().len() as u64 * most_experiments(plan)
    }
}

/// The most experiments a scenario of the plan runs: its precision ceiling, or its count.
pub fn most_experiments(plan: &Plan) -> u64 {
    let study = plan.study();
    study
        .precision
        .map_or(study.experiments, |p| p.max_experiments)
}

/// Checks that the plan can be run with these options before any work starts.
pub fn preflight(plan: &Plan, options: RunOptions) -> Result<(), RunError> {
    if !options.exact {
        return Ok(());
    }
    if !plan.hypotheses().is_empty() {
        return Err(RunError::ExactWithHypotheses);
    }
    for s in plan.scenarios() {
        let design = &plan.designs()[s.design];
        if !matches!(design.response, Response::YesNo) || !design.is_single_table() {
            return Err(RunError::ExactNeedsYesNo {
                design: design.name.clone(),
            });
        }
        // The limit applies to the outcomes the truncation keeps.
        let kernel = scenario_kernel(plan, &s)?;
        let (kept, _) = exact::kept_outcomes(&kernel, exact::RELATIVE_CUTOFF).unwrap_or((0, 0));
        if kept > exact::MAX_OUTCOMES {
            return Err(RunError::TooLargeToEnumerate {
                design: design.name.clone(),
                trials: s.trials,
                outcomes: kept,
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
    progress: &Progress<'_>,
) -> Result<Vec<ScenarioSummary>, RunError> {
    run_plan_with(plan, options, progress, &|_| None)
}

/// [`run_plan`], taking a scenario's total tally from `stored` when it has one (the merge
/// of a run split into parts) instead of simulating it; everything after the tally is the
/// same code, so merged parts print the bytes of one whole run.
pub fn run_plan_with(
    plan: &Plan,
    options: RunOptions,
    progress: &Progress<'_>,
    stored: &dyn Fn(&Scenario) -> Option<EstimateTally>,
) -> Result<Vec<ScenarioSummary>, RunError> {
    preflight(plan, options)?;
    progress(Event::Start(Phase::Table {
        scenarios: plan.scenarios().len(),
    }));
    plan.scenarios()
        .iter()
        .map(|s| {
            let summary = match stored(s) {
                Some(tally) => summarise_simulated(plan, s, &tally),
                None => simulate_scenario(plan, s, options, progress)?,
            };
            Ok(with_information(plan, s, summary))
        })
        .collect()
}

/// Runs one scenario, with the expected-information SE beside every simulated figure.
pub fn run_scenario(
    plan: &Plan,
    scenario: &Scenario,
    options: RunOptions,
    progress: &Progress<'_>,
) -> Result<ScenarioSummary, RunError> {
    let summary = simulate_scenario(plan, scenario, options, progress)?;
    Ok(with_information(plan, scenario, summary))
}

/// Puts the expected-information SE and the identification beside a scenario's summary.
fn with_information(
    plan: &Plan,
    scenario: &Scenario,
    mut summary: ScenarioSummary,
) -> ScenarioSummary {
    let design = &plan.designs()[scenario.design];
    let Ok(information) = crate::analytic::information::DesignInformation::new(plan, design) else {
        return summary;
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
        summary.identification = match info.verdict {
            Verdict::Identified => None,
            Verdict::Weak { .. } => Some(Identification {
                verdict: info.verdict.clone(),
                corr_d_prime_criterion: info.corr_d_prime_criterion,
                ranges: Vec::new(),
            }),
            // Not identified: profile-likelihood ranges instead of meaningless SEs.
            Verdict::NotIdentified { .. } => {
                information
                    .at(scenario.trials, true)
                    .ok()
                    .map(|full| Identification {
                        verdict: full.verdict.clone(),
                        corr_d_prime_criterion: full.corr_d_prime_criterion,
                        ranges: full.profile.iter().flatten().cloned().collect(),
                    })
            }
        };
    }
    summary
}

/// The kernel of one scenario: the design's route, and the plan's hypotheses as tests.
pub fn scenario_kernel(plan: &Plan, scenario: &Scenario) -> Result<ScenarioKernel, RunError> {
    let design = &plan.designs()[scenario.design];
    let study = plan.study();
    let settings = FitSettings {
        correction: study.rate_correction,
        z_crit: z_critical(study.confidence),
        alpha: study.alpha,
    };
    ScenarioKernel::new(
        design,
        plan.observer(),
        scenario.trials,
        settings,
        &|model| crate::power::contrasts_for(plan, design, model),
    )
    .map_err(|e| RunError::Model {
        design: design.name.clone(),
        message: e.to_string(),
    })
}

/// Simulates (or enumerates) one scenario (no expected information beside it).
pub fn simulate_scenario(
    plan: &Plan,
    scenario: &Scenario,
    options: RunOptions,
    progress: &Progress<'_>,
) -> Result<ScenarioSummary, RunError> {
    let design = &plan.designs()[scenario.design];
    let study = plan.study();
    let kernel = scenario_kernel(plan, scenario)?;
    if options.exact
        && let Some(e) = exact::enumerate(&kernel)
    {
        let mut s = summary::summarise(scenario.clone(), &design.name, &e.tally, Method::Exact);
        s.neglected_mass = Some(e.neglected_bound);
        return Ok(s);
    }
    let Some(target) = study.precision else {
        let tally = run_replicates(
            &kernel,
            study.seed,
            scenario.id,
            study.experiments,
            progress,
        );
        return Ok(summarise_simulated(plan, scenario, &tally));
    };
    let grown = run_replicates_until(
        &kernel,
        study.seed,
        scenario.id,
        (study.experiments, target.max_experiments),
        &|tally| precision::precise_enough(&target, tally),
        progress,
    );
    // The bar counted the ceiling; what was not needed moves it on.
    progress(Event::Skipped(target.max_experiments - grown.replicates));
    let mut summary = summarise_simulated(plan, scenario, &grown.tally);
    summary.precision_met = Some(grown.met);
    Ok(summary)
}

/// The summary of a scenario's simulated total tally.
fn summarise_simulated(plan: &Plan, scenario: &Scenario, tally: &EstimateTally) -> ScenarioSummary {
    let design = &plan.designs()[scenario.design];
    summary::summarise(scenario.clone(), &design.name, tally, Method::MonteCarlo)
}
