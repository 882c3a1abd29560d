//! Profile-likelihood ranges for one θ entry (d′ or c of a condition, or any named entry).
//!
//! The range at level 1 − α holds the values v with max_{other θ} lnL(v, ·) ≥ lnL̂ − χ²₁(1 − α)/2
//! (Venzon & Moolgavkar 1988, *Appl. Stat.* 37:87–94 \[memory\]; χ²₁ quantile = z²_{1−α/2}).
//! Each side is bracketed by doubling steps outward from the estimate, then the crossing is found
//! by regula falsi with the Illinois modification. A side that never falls below the cutoff inside
//! the stated search window is reported as beyond the window: the honest answer for a design that
//! cannot identify the parameter.

use nalgebra::DMatrix;

use crate::cells::error::InputError;
use crate::cells::identifiability::scaled_inverse;
use crate::cells::likelihood::Counts;
use crate::cells::newton::{Fit, NewtonOptions, StopReason, maximise};
use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{SLOT_CRITERION, SLOT_D_PRIME, Slot};
use crate::model::normal;

/// Which θ entry to profile.
#[derive(Debug, Clone, PartialEq)]
pub enum ProfileTarget {
    /// d′ of the named condition (shared d′ profiles the shared entry).
    DPrime { condition: String },
    /// c of the named condition.
    Criterion { condition: String },
    /// Any θ entry by index.
    Parameter(usize),
}

/// Level, search window and tolerances of a profile.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProfileOptions {
    /// Coverage level, e.g. 0.95.
    pub level: f64,
    /// The search stops this far from the estimate (in the parameter's own units) on each side.
    pub half_width: f64,
    /// Width of the final bracket around each crossing.
    pub tolerance: f64,
    /// Options for the inner maximisations.
    pub fit: NewtonOptions,
}

impl Default for ProfileOptions {
    fn default() -> Self {
        ProfileOptions {
            level: 0.95,
            half_width: 10.0,
            tolerance: 1e-6,
            fit: NewtonOptions::default(),
        }
    }
}

/// One end of a profile range.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Bound {
    /// The profile crosses the cutoff here.
    At(f64),
    /// No crossing up to this edge of the search window: unbounded as far as was searched.
    BeyondWindow { edge: f64 },
}

/// A profile-likelihood range.
#[derive(Debug, Clone, PartialEq)]
pub struct ProfileInterval {
    pub parameter: String,
    pub estimate: f64,
    pub lower: Bound,
    pub upper: Bound,
    pub level: f64,
    /// χ²₁(level)/2: the allowed drop in lnL.
    pub cutoff: f64,
    /// Inner maximisations that stopped at the iteration limit or failed numerically.
    pub inner_failures: usize,
}

fn resolve(model: &ObservationModel, target: &ProfileTarget) -> Result<usize, InputError> {
    let (condition, slot, parameter) = match target {
        ProfileTarget::Parameter(i) => {
            return if *i < model.dim() {
                Ok(*i)
            } else {
                Err(InputError::ThetaLength {
                    expected: model.dim(),
                    found: *i + 1,
                })
            };
        }
        ProfileTarget::DPrime { condition } => (condition, SLOT_D_PRIME, "d′"),
        ProfileTarget::Criterion { condition } => (condition, SLOT_CRITERION, "c"),
    };
    let j = model.condition_index(condition)?;
    match model.parameters().slots(j)[slot] {
        Slot::Theta(i) => Ok(i),
        _ => Err(InputError::ProfileTargetFixed {
            parameter,
            condition: condition.clone(),
        }),
    }
}

fn check_options(o: &ProfileOptions) -> Result<(), InputError> {
    let bad = |option, value, reason| {
        Err(InputError::InvalidProfileOption {
            option,
            value,
            reason,
        })
    };
    if !(o.level > 0.0 && o.level < 1.0) {
        return bad("level", o.level, "must lie strictly between 0 and 1");
    }
    if !(o.half_width.is_finite() && o.half_width > 0.0) {
        return bad("half_width", o.half_width, "must be finite and > 0");
    }
    if !(o.tolerance.is_finite() && o.tolerance > 0.0) {
        return bad("tolerance", o.tolerance, "must be finite and > 0");
    }
    Ok(())
}

/// Profile-likelihood range of `target` around a fit (usually the unconstrained fit of
/// `counts`; its lnL is taken as the maximum).
pub fn profile_interval(
    model: &ObservationModel,
    counts: &Counts,
    fit: &Fit,
    target: &ProfileTarget,
    options: &ProfileOptions,
) -> Result<ProfileInterval, InputError> {
    check_options(options)?;
    model.check_theta(&fit.theta)?;
    counts.check_shape(model)?;
    if !fit.log_likelihood.is_finite() {
        return Err(InputError::ProfileFromFailedFit {
            value: fit.log_likelihood,
        });
    }
    let i = resolve(model, target)?;
    let z = normal::z(0.5 + 0.5 * options.level).unwrap_or(f64::NAN);
    let cutoff = 0.5 * z * z;
    let mut search = Search {
        model,
        counts,
        index: i,
        free: (0..model.dim()).map(|k| k != i).collect(),
        target: fit.log_likelihood - cutoff,
        options,
        failures: 0,
    };
    let step = initial_step(&fit.observed_information, i, options.half_width);
    let lower = search.side(fit, -1.0, step);
    let upper = search.side(fit, 1.0, step);
    Ok(ProfileInterval {
        parameter: model.parameters().names()[i].clone(),
        estimate: fit.theta[i],
        lower,
        upper,
        level: options.level,
        cutoff,
        inner_failures: search.failures,
    })
}

/// Wald SE from the observed information when available, kept inside sensible limits.
fn initial_step(observed: &DMatrix<f64>, i: usize, half_width: f64) -> f64 {
    let wald = (i < observed.nrows())
        .then(|| scaled_inverse(observed))
        .flatten()
        .and_then(|c| c.get((i, i)).map(|v| v.max(0.0).sqrt()));
    match wald {
        Some(se) if se.is_finite() && se > 0.0 => se.clamp(1e-3, half_width / 4.0),
        _ => half_width / 20.0,
    }
}

struct Search<'a> {
    model: &'a ObservationModel,
    counts: &'a Counts,
    index: usize,
    free: Vec<bool>,
    target: f64,
    options: &'a ProfileOptions,
    failures: usize,
}

impl Search<'_> {
    /// Profile lnL at θ_i = v minus the target, starting the inner fit from `warm`.
    fn excess(&mut self, v: f64, warm: &[f64]) -> (f64, Vec<f64>) {
        let mut theta = warm.to_vec();
        theta[self.index] = v;
        let f = maximise(
            self.model,
            self.counts,
            theta,
            &self.free,
            &self.options.fit,
        );
        if matches!(
            f.stop,
            StopReason::NumericalFailure | StopReason::IterationLimit
        ) {
            self.failures += 1;
        }
        let value = if f.log_likelihood.is_finite() {
            f.log_likelihood - self.target
        } else {
            f64::NEG_INFINITY
        };
        (value, f.theta)
    }

    fn side(&mut self, fit: &Fit, direction: f64, step: f64) -> Bound {
        let centre = fit.theta[self.index];
        let half = self.options.half_width;
        let (mut inside_v, mut inside_f) = (centre, fit.log_likelihood - self.target);
        let mut warm = fit.theta.clone();
        let mut offset = step;
        loop {
            let last = offset >= half;
            let v = centre + direction * offset.min(half);
            let (f, theta) = self.excess(v, &warm);
            if f < 0.0 {
                return Bound::At(self.crossing(inside_v, inside_f, v, f, &warm));
            }
            if last {
                return Bound::BeyondWindow { edge: v };
            }
            (inside_v, inside_f, warm) = (v, f, theta);
            offset *= 2.0;
        }
    }

    /// Illinois regula falsi on a bracket with f(a) ≥ 0 > f(b).
    fn crossing(&mut self, mut a: f64, mut fa: f64, mut b: f64, mut fb: f64, warm: &[f64]) -> f64 {
        let mut warm = warm.to_vec();
        let mut side = 0;
        for _ in 0..200 {
            if (b - a).abs() <= self.options.tolerance {
                break;
            }
            // An infinite or huge drop gives no useful secant: bisect instead.
            let m = if fb.is_finite() && fa.is_finite() && fa - fb > 0.0 {
                let s = a + (b - a) * fa / (fa - fb);
                if (s - a) * (s - b) < 0.0 {
                    s
                } else {
                    0.5 * (a + b)
                }
            } else {
                0.5 * (a + b)
            };
            let (fm, theta) = self.excess(m, &warm);
            if fm >= 0.0 {
                (a, fa, warm) = (m, fm, theta);
                if side == 1 {
                    fb *= 0.5;
                }
                side = 1;
            } else {
                (b, fb) = (m, fm);
                if side == -1 {
                    fa *= 0.5;
                }
                side = -1;
            }
        }
        0.5 * (a + b)
    }
}
