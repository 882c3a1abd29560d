//! Rating fits that pass as results but are not: a scale with σ free that is saturated (as
//! many parameters as free cells, so the fit reproduces any table and nothing checks σ) or on
//! which the expected information leaves σ barely determined. Both are read from the
//! design's expected information; the fix (hold σ = 1, or record more categories) is
//! evaluated the same way.
//!
//! A 3-step scale with σ free has d′, c, σ and one criterion spacing: 4 parameters for
//! 2 × (3 − 1) = 4 free cells. σ is then the slope of a zROC line through two points, fitted
//! exactly. With few trials per cell its estimate is far from normal and biased (σ̂ averages
//! well above the truth), and so are the d′ and c that move with it.
//!
//! Weak σ: the asymptotic half-width z·SE(σ) at the plan's level is at least σ itself, so
//! the interval for σ reaches 0 — the same yardstick as d′'s in [`super::advice`].

use serde::Serialize;

use super::advice::with_sigma_fixed;
use super::information::{DesignInformation, InformationError};
use super::trial_grid::fits_design;
use crate::design::{Design, Response};
use crate::infer::z_critical;
use crate::plan::Plan;
use crate::vocab::Quantity;

/// A saturated fit: parameters = free cells.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Saturation {
    pub parameters: usize,
    pub free_cells: usize,
}

/// A count at which σ is barely determined.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WeakSigma {
    pub trials: u32,
    /// z·SE(σ) from the expected information.
    pub half_width: f64,
    pub sigma: f64,
}

/// The expected SEs of d′ and c at one count with σ free and with σ held at 1.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SigmaFixed {
    pub trials: u32,
    pub se_d_prime_free: f64,
    pub se_d_prime_fixed: f64,
    pub se_criterion_free: f64,
    pub se_criterion_fixed: f64,
}

/// What is wrong with a rating design's fit with σ free, and what holding σ = 1 would give.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScaleFit {
    pub design: String,
    pub categories: usize,
    pub saturated: Option<Saturation>,
    /// Counts (of those asked, increasing) at which σ is weakly determined.
    pub weak_sigma: Vec<WeakSigma>,
    /// The fix evaluated at the largest flagged count.
    pub sigma_fixed: Option<SigmaFixed>,
}

impl ScaleFit {
    /// Whether the fit at `trials` is flagged (saturated at every count, or σ weak there).
    pub fn flags(&self, trials: u32) -> bool {
        self.saturated.is_some() || self.weak_sigma.iter().any(|w| w.trials == trials)
    }
}

/// The scale-fit flags of `design` over `counts`; `None` for designs without a free σ or
/// with nothing to flag.
pub fn scale_fit(
    plan: &Plan,
    design: &Design,
    counts: &[u32],
) -> Result<Option<ScaleFit>, InformationError> {
    let Response::Rating(scale) = &design.response else {
        return Ok(None);
    };
    if scale.fix_sigma {
        return Ok(None);
    }
    let info = DesignInformation::new(plan, design)?;
    let saturated = (info.dim() >= info.free_cells()).then_some(Saturation {
        parameters: info.dim(),
        free_cells: info.free_cells(),
    });
    let z = z_critical(plan.study().confidence);
    let sigma = plan.observer().sigma;
    let mut weak_sigma = Vec::new();
    for &n in counts.iter().filter(|&&n| fits_design(design, n)) {
        let at = info.at(n, false)?;
        if let Some(se) = at.se(Quantity::Sigma)
            && z * se >= sigma
        {
            weak_sigma.push(WeakSigma {
                trials: n,
                half_width: z * se,
                sigma,
            });
        }
    }
    if saturated.is_none() && weak_sigma.is_empty() {
        return Ok(None);
    }
    let at = weak_sigma.last().map(|w| w.trials).or_else(|| {
        counts
            .iter()
            .copied()
            .filter(|&n| fits_design(design, n))
            .max()
    });
    let sigma_fixed = match (at, with_sigma_fixed(design)) {
        (Some(n), Some(fixed)) => {
            let free = info.at(n, false)?;
            let held = DesignInformation::new(plan, &fixed)?.at(n, false)?;
            let get = |i: &super::information::ScenarioInformation, q| i.se(q);
            match (
                get(&free, Quantity::DPrime),
                get(&held, Quantity::DPrime),
                get(&free, Quantity::Criterion),
                get(&held, Quantity::Criterion),
            ) {
                (Some(a), Some(b), Some(c), Some(d)) => Some(SigmaFixed {
                    trials: n,
                    se_d_prime_free: a,
                    se_d_prime_fixed: b,
                    se_criterion_free: c,
                    se_criterion_fixed: d,
                }),
                _ => None,
            }
        }
        _ => None,
    };
    Ok(Some(ScaleFit {
        design: design.name.clone(),
        categories: scale.categories,
        saturated,
        weak_sigma,
        sigma_fixed,
    }))
}

/// The flags of every design of the plan over its listed counts (the rows of `vigil run`).
pub fn plan_scale_fits(plan: &Plan) -> Vec<ScaleFit> {
    plan.designs()
        .iter()
        .filter_map(|d| scale_fit(plan, d, &d.trials).ok().flatten())
        .collect()
}
