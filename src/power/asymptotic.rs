//! The targets under the expected information: normal-approximation power, interval
//! half-widths and the d′–c correlation at any trial count, without simulating. The search
//! uses it to bracket the answer before Monte Carlo confirms it.

use crate::cells::information::{UnitInformation, precision};
use crate::cells::observation_model::ObservationModel;
use crate::design::Design;
use crate::design::goals::Hypothesis;
use crate::design::model::condition_specs;
use crate::engine::Contrast;
use crate::infer::wald_power;
use crate::infer::z_critical;
use crate::plan::Plan;
use crate::vocab::Quantity;

/// Asymptotic values of every target at one trial count; `None` when not identified.
#[derive(Debug, Clone, PartialEq)]
pub struct AsymptoticPoint {
    pub trials: u32,
    /// Normal-approximation Wald power per contrast, in the order given.
    pub power: Vec<f64>,
    /// z·SE per half-width target (largest over conditions).
    pub half_width: Vec<f64>,
    /// |corr(d̂′, ĉ)| of the first condition.
    pub correlation: Option<f64>,
}

/// The analysis model of a design at `trials` (lapses are not part of the fit).
pub fn analysis_model(plan: &Plan, design: &Design, trials: u32) -> Option<ObservationModel> {
    let mut specs = condition_specs(design, plan.observer(), trials);
    specs.iter_mut().for_each(|s| s.lapse = None);
    ObservationModel::new(specs).ok()
}

/// Asymptotic target values at `trials`; `None` when the information is singular.
pub fn at(
    plan: &Plan,
    design: &Design,
    trials: u32,
    contrasts: &[(Contrast, &Hypothesis)],
    half_widths: &[(Quantity, f64)],
) -> Option<AsymptoticPoint> {
    let model = analysis_model(plan, design, trials)?;
    let theta = model.hypothesised_theta();
    let info = UnitInformation::new(&model, &theta)
        .ok()?
        .total(&model.block_sizes())
        .ok()?;
    let prec = precision(&model, &theta, &info).ok()??;
    let alpha = plan.study().alpha;
    let power = contrasts
        .iter()
        .map(|(c, _)| {
            let (_, se) = c.wald(&theta, &prec.covariance);
            wald_power(c.truth - c.null, se, alpha, c.sided).unwrap_or(0.0)
        })
        .collect();
    let z = z_critical(plan.study().confidence);
    let half_width = half_widths
        .iter()
        .map(|(q, _)| {
            prec.conditions
                .iter()
                .filter_map(|p| match q {
                    Quantity::DPrime => p.se_d_prime,
                    Quantity::Criterion => p.se_criterion,
                    Quantity::Sigma => p.se_sigma,
                    Quantity::BaseRate => p.se_base_rate,
                    _ => None,
                })
                .fold(f64::NAN, f64::max)
                * z
        })
        .collect();
    Some(AsymptoticPoint {
        trials,
        power,
        half_width,
        correlation: prec
            .conditions
            .first()
            .and_then(|p| p.corr_d_prime_criterion)
            .map(f64::abs),
    })
}

/// The normal-approximation power of one hypothesis at one trial count.
#[derive(Debug, Clone, PartialEq)]
pub struct PowerCurve {
    pub hypothesis: String,
    /// `(trials, power)`, in the order of the grid; counts where the information is singular
    /// are left out.
    pub points: Vec<(u32, f64)>,
}

/// The expected-information power curve of every hypothesis this design can test, over
/// `grid` (trial counts per condition). Hypotheses whose null is true still get a curve (it
/// stays near α).
pub fn power_curves(plan: &Plan, design: &Design, grid: &[u32]) -> Vec<PowerCurve> {
    let Some(model) = analysis_model(plan, design, design.trials[0]) else {
        return Vec::new();
    };
    let tested: Vec<(Contrast, &Hypothesis)> = plan
        .hypotheses()
        .iter()
        .filter(|h| h.kind != crate::design::goals::TestKind::GroupDifference)
        .filter_map(|h| crate::power::contrast(plan, design, &model, h).map(|c| (c, h)))
        .collect();
    let mut curves: Vec<PowerCurve> = tested
        .iter()
        .map(|(_, h)| PowerCurve {
            hypothesis: h.name.clone(),
            points: Vec::new(),
        })
        .collect();
    for &n in grid {
        if let Some(p) = at(plan, design, n, &tested, &[]) {
            for (curve, power) in curves.iter_mut().zip(p.power) {
                curve.points.push((n, power));
            }
        }
    }
    curves
}
