//! One rule for whether a design tells d′ and c apart, and, from the expected information,
//! what would change the figure when it does not. `vigil run` (on simulated figures) and
//! `vigil explore` (on asymptotic ones) both judge with [`shortfalls`], against the same
//! [`Yardsticks`]: the plan's own `[targets]` where it sets them, the defaults below where it
//! does not.
//!
//! Told apart means all of:
//! - |r(d̂′, ĉ)| at most the correlation yardstick (the estimates do not move together);
//! - the half-width of d′ smaller than d′ itself: an interval reaching 0 cannot tell
//!   sensitivity from none, whatever r says (±1.74 on d′ = 1.0 is not "told apart");
//! - any half-width target the plan sets for d′ or c met.
//!
//! The advice is judged, not guessed: each lever (more trials, another presence rate, a full
//! record, another design of the plan, holding σ = 1) is evaluated by the expected
//! information of the changed design. For the full yes/no record, for example,
//! r = −(v_H − v_F)/(v_H + v_F) with v_H = H(1−H)/(n_p·φ(z_H)²) and v_F likewise (Macmillan &
//! Creelman 2005, ch. 13, delta-method variances of z(H) and z(F)), so r depends on the
//! present:absent split and the rates but not on the trial count: more trials cannot remove
//! that trade-off, a different presence rate can.

use serde::Serialize;

use super::information::{DesignInformation, InformationError, ScenarioInformation};
use super::trial_grid::fits_design;
use crate::design::goals::Targets;
use crate::design::{BaseRate, Design, RecordKind, Response};
use crate::infer::z_critical;
use crate::plan::Plan;
use crate::vocab::Quantity;

/// The correlation yardstick when the plan sets no `max_correlation`.
pub const DEFAULT_MAX_ABS_CORR: f64 = 0.5;
/// The half-width yardstick for c when the plan sets none (used by `explore`'s "pinned" line).
pub const DEFAULT_C_HALF_WIDTH: f64 = 0.25;
/// Presence rates tried as a lever (full records with one condition).
pub const PRESENCE_GRID: [f64; 17] = [
    0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9,
];
/// More trials are searched up to this multiple of the count judged (at least the plan's
/// `max_trials`).
pub const TRIAL_REACH: u32 = 64;
/// A larger census is tried at 2, 4, … 2^CENSUS_STEPS times the plan's.
pub const CENSUS_STEPS: u32 = 6;
/// |r| moving by less than this over the whole trial reach counts as "more trials leave it".
pub const FLAT_CORR: f64 = 0.02;

/// A yardstick and where it comes from.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Limit {
    pub at_most: f64,
    /// Set by the plan's `[targets]` (else vigil's default).
    pub from_plan: bool,
}

/// What "told apart" and "pinned" are judged against.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Yardsticks {
    /// |r(d̂′, ĉ)|: the plan's `max_correlation`, else [`DEFAULT_MAX_ABS_CORR`].
    pub abs_corr: Limit,
    /// Half-width of c: the plan's target, else [`DEFAULT_C_HALF_WIDTH`] (explore's line only).
    pub c_half_width: Limit,
    /// The plan's half-width targets for d′ and c, which "told apart" must meet.
    pub d_prime_target: Option<f64>,
    pub c_target: Option<f64>,
}

impl Yardsticks {
    pub fn of(targets: &Targets) -> Self {
        let target = |q: Quantity| {
            targets
                .half_width
                .iter()
                .find(|(t, _)| *t == q)
                .map(|(_, w)| *w)
        };
        let c_target = target(Quantity::Criterion);
        Yardsticks {
            abs_corr: match targets.max_correlation {
                Some(r) => Limit {
                    at_most: r,
                    from_plan: true,
                },
                None => Limit {
                    at_most: DEFAULT_MAX_ABS_CORR,
                    from_plan: false,
                },
            },
            c_half_width: Limit {
                at_most: c_target.unwrap_or(DEFAULT_C_HALF_WIDTH),
                from_plan: c_target.is_some(),
            },
            d_prime_target: target(Quantity::DPrime),
            c_target,
        }
    }
}

/// The figures the rule reads at one trial count (simulated or asymptotic).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Figures {
    /// The hypothesised d′ (the effect the interval must not swallow).
    pub d_prime: f64,
    pub half_width_d_prime: Option<f64>,
    pub half_width_criterion: Option<f64>,
    pub corr: Option<f64>,
}

impl Figures {
    /// The expected-information figures at one count, half-widths at `level`.
    pub fn asymptotic(info: &ScenarioInformation, level: f64) -> Self {
        let z = z_critical(level);
        Figures {
            d_prime: info
                .quantities
                .iter()
                .find(|q| q.quantity == Quantity::DPrime)
                .map_or(f64::NAN, |q| q.truth),
            half_width_d_prime: info.se(Quantity::DPrime).map(|s| z * s),
            half_width_criterion: info.se(Quantity::Criterion).map(|s| z * s),
            corr: info.corr_d_prime_criterion,
        }
    }
}

/// Why d′ and c are not told apart at a count.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Shortfall {
    /// |r| above the yardstick (or undefined): d̂′ and ĉ move together.
    TradeOff { abs_corr: Option<f64>, limit: Limit },
    /// The half-width of d′ is at least d′: the interval reaches 0.
    WiderThanEffect { half_width: f64, d_prime: f64 },
    /// A half-width target of the plan is missed.
    Target {
        quantity: Quantity,
        half_width: f64,
        at_most: f64,
    },
}

/// The one rule: every way the figures fall short of telling d′ and c apart (empty: told
/// apart). A figure that is missing is not judged (a design without c has no trade-off).
pub fn shortfalls(y: &Yardsticks, f: &Figures) -> Vec<Shortfall> {
    let mut out = Vec::new();
    let r = f.corr.filter(|r| r.is_finite()).map(f64::abs);
    if r.is_none_or(|r| r > y.abs_corr.at_most) {
        out.push(Shortfall::TradeOff {
            abs_corr: r,
            limit: y.abs_corr,
        });
    }
    if let Some(w) = f.half_width_d_prime
        && f.d_prime.is_finite()
        && w >= f.d_prime
    {
        out.push(Shortfall::WiderThanEffect {
            half_width: w,
            d_prime: f.d_prime,
        });
    }
    for (quantity, target, width) in [
        (Quantity::DPrime, y.d_prime_target, f.half_width_d_prime),
        (Quantity::Criterion, y.c_target, f.half_width_criterion),
    ] {
        if let (Some(at_most), Some(half_width)) = (target, width)
            && half_width > at_most
        {
            out.push(Shortfall::Target {
                quantity,
                half_width,
                at_most,
            });
        }
    }
    out
}

/// A change of the design that the expected information says would help.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Lever {
    /// The expected information already meets every yardstick at the count judged: the
    /// simulated shortfall is small-sample behaviour or Monte Carlo error, not the design.
    MetAsymptotically { trials: u32, abs_corr: Option<f64> },
    /// From this count on every shortfall is gone (asymptotically).
    MoreTrials { trials: u32 },
    /// Up to `to_trials` more trials leave |r| where it is.
    TrialsLeaveCorrelation {
        from_trials: u32,
        abs_corr_from: f64,
        to_trials: u32,
        abs_corr_to: f64,
    },
    /// No count up to `to_trials` meets every yardstick; |r| there and at the count judged.
    TrialsNotEnough {
        from_trials: u32,
        abs_corr_from: Option<f64>,
        to_trials: u32,
        abs_corr_to: Option<f64>,
    },
    /// Presenting the stimulus on this share of trials gives this |r| at the same count.
    Presence {
        from: f64,
        presence: f64,
        abs_corr: f64,
    },
    /// Recording each trial's stimulus and response gives this |r| at the same count.
    FullRecord { abs_corr: f64 },
    /// A census of this many encounters (instead of `from`) gives this |r| at the same count.
    LargerCensus {
        from: u64,
        census: u64,
        abs_corr: f64,
    },
    /// Another design of the plan gives this |r| at the same count.
    OtherDesign { design: String, abs_corr: f64 },
}

/// What the expected information advises for one design judged at one count.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Advice {
    pub trials: u32,
    pub levers: Vec<Lever>,
}

/// Levers that would remove `shortfalls` of `design` at `trials` (judged by `shortfalls` on
/// the expected information of each changed design).
pub fn advise(
    plan: &Plan,
    design: &Design,
    trials: u32,
    shortfalls_seen: &[Shortfall],
) -> Result<Advice, InformationError> {
    let mut levers = Vec::new();
    if shortfalls_seen.is_empty() {
        return Ok(Advice { trials, levers });
    }
    let level = plan.study().confidence;
    let y = Yardsticks::of(plan.targets());
    let info = DesignInformation::new(plan, design)?;
    let judge = |i: &ScenarioInformation| shortfalls(&y, &Figures::asymptotic(i, level));
    let reach = trials
        .saturating_mul(TRIAL_REACH)
        .max(plan.study().max_trials);
    levers.push(trial_lever(&info, design, trials, reach, &judge)?);
    let trade_off = shortfalls_seen
        .iter()
        .any(|s| matches!(s, Shortfall::TradeOff { .. }));
    if trade_off {
        let r_of = |d: &Design| -> Option<f64> {
            if !fits_design(d, trials) {
                return None;
            }
            let i = DesignInformation::new(plan, d)
                .ok()?
                .at(trials, false)
                .ok()?;
            i.corr_d_prime_criterion.map(f64::abs)
        };
        let meets = |r: f64| r <= y.abs_corr.at_most;
        if design.record == RecordKind::Full && design.conditions.len() == 1 {
            let best = PRESENCE_GRID
                .iter()
                .filter(|&&p| (p - design.presence).abs() > 1e-9)
                .filter_map(|&p| r_of(&with_presence(design, p)).map(|r| (p, r)))
                .min_by(|a, b| a.1.total_cmp(&b.1));
            if let Some((presence, abs_corr)) = best
                && meets(abs_corr)
            {
                levers.push(Lever::Presence {
                    from: design.presence,
                    presence,
                    abs_corr,
                });
            }
        }
        if !design.record.fixes_rows()
            && let Some(abs_corr) = r_of(&with_full_record(design))
            && meets(abs_corr)
        {
            levers.push(Lever::FullRecord { abs_corr });
        }
        if let BaseRate::Census(m) = design.base_rate {
            let larger = (1..=CENSUS_STEPS)
                .map(|k| m.saturating_mul(1 << k))
                .find_map(|census| {
                    let mut d = design.clone();
                    d.base_rate = BaseRate::Census(census);
                    r_of(&d).filter(|&r| meets(r)).map(|r| (census, r))
                });
            if let Some((census, abs_corr)) = larger {
                levers.push(Lever::LargerCensus {
                    from: m,
                    census,
                    abs_corr,
                });
            }
        }
        let other = plan
            .designs()
            .iter()
            .filter(|d| d.name != design.name)
            .filter_map(|d| r_of(d).map(|r| (d, r)))
            .filter(|(_, r)| meets(*r))
            .min_by(|a, b| a.1.total_cmp(&b.1));
        if let Some((d, abs_corr)) = other {
            levers.push(Lever::OtherDesign {
                design: d.name.clone(),
                abs_corr,
            });
        }
    }
    Ok(Advice { trials, levers })
}

/// The smallest count above `trials` (up to `reach`) from which the expected information
/// meets every yardstick; or why none does.
fn trial_lever(
    info: &DesignInformation,
    design: &Design,
    trials: u32,
    reach: u32,
    judge: &impl Fn(&ScenarioInformation) -> Vec<Shortfall>,
) -> Result<Lever, InformationError> {
    let ok = |n: u32| -> Result<Option<bool>, InformationError> {
        if !fits_design(design, n) {
            return Ok(None);
        }
        Ok(Some(judge(&info.at(n, false)?).is_empty()))
    };
    if ok(trials)? == Some(true) {
        return Ok(Lever::MetAsymptotically {
            trials,
            abs_corr: info.at(trials, false)?.corr_d_prime_criterion.map(f64::abs),
        });
    }
    // Geometric steps, then bisection between the last failing and the first passing count.
    let mut below = trials;
    let mut n = trials;
    while n < reach {
        n = (n + n / 4).max(n + 1).min(reach);
        match ok(n)? {
            Some(true) => {
                let mut hi = n;
                while hi - below > 1 {
                    let mid = below + (hi - below) / 2;
                    if ok(mid)? == Some(true) {
                        hi = mid;
                    } else {
                        below = mid;
                    }
                }
                return Ok(Lever::MoreTrials { trials: hi });
            }
            Some(false) => below = n,
            None => {}
        }
    }
    let r = |n: u32| -> Result<Option<f64>, InformationError> {
        Ok(info.at(n, false)?.corr_d_prime_criterion.map(f64::abs))
    };
    match (r(trials)?, r(reach)?) {
        (Some(a), Some(b)) if (a - b).abs() < FLAT_CORR => Ok(Lever::TrialsLeaveCorrelation {
            from_trials: trials,
            abs_corr_from: a,
            to_trials: reach,
            abs_corr_to: b,
        }),
        (a, b) => Ok(Lever::TrialsNotEnough {
            from_trials: trials,
            abs_corr_from: a,
            to_trials: reach,
            abs_corr_to: b,
        }),
    }
}

/// The design with every condition's presence rate set to `p`.
pub fn with_presence(design: &Design, p: f64) -> Design {
    let mut d = design.clone();
    d.presence = p;
    d.conditions.iter_mut().for_each(|c| c.presence = p);
    d
}

/// The design with a full record (each trial's stimulus and response) instead of totals.
pub fn with_full_record(design: &Design) -> Design {
    let mut d = design.clone();
    d.record = RecordKind::Full;
    d.base_rate = BaseRate::Known;
    d.shared
        .retain(|s| *s != crate::design::SharedParameter::BaseRate);
    d
}

/// The rating design with σ held at 1, if it is a rating design with σ free.
pub fn with_sigma_fixed(design: &Design) -> Option<Design> {
    let Response::Rating(scale) = &design.response else {
        return None;
    };
    if scale.fix_sigma {
        return None;
    }
    let mut d = design.clone();
    if let Response::Rating(s) = &mut d.response {
        s.fix_sigma = true;
    }
    d.shared
        .retain(|s| *s != crate::design::SharedParameter::Sigma);
    Some(d)
}

impl Figures {
    /// The simulated figures of one `vigil run` row: mean half-widths and r across datasets.
    pub fn simulated(s: &crate::engine::ScenarioSummary) -> Self {
        let half = |q: Quantity| s.quantity(q).map(|x| x.mean_width.value / 2.0);
        Figures {
            d_prime: s.quantity(Quantity::DPrime).map_or(f64::NAN, |q| q.truth),
            half_width_d_prime: half(Quantity::DPrime).filter(|w| w.is_finite()),
            half_width_criterion: half(Quantity::Criterion).filter(|w| w.is_finite()),
            corr: Some(s.correlation.value).filter(|r| r.is_finite()),
        }
    }
}

/// For each design of a run, the advice at its largest simulated count when the simulated
/// figures there fall short (`None` when they do not, or the design is not identified).
pub fn run_advice(
    plan: &Plan,
    summaries: &[crate::engine::ScenarioSummary],
) -> Vec<Option<Advice>> {
    let y = Yardsticks::of(plan.targets());
    plan.designs()
        .iter()
        .enumerate()
        .map(|(d, design)| {
            let last = summaries
                .iter()
                .filter(|s| s.scenario.design == d)
                .max_by_key(|s| s.scenario.trials)?;
            if last.identification.as_ref().is_some_and(|id| {
                matches!(
                    id.verdict,
                    crate::cells::verdict::Verdict::NotIdentified { .. }
                )
            }) {
                return None;
            }
            let seen = shortfalls(&y, &Figures::simulated(last));
            if seen.is_empty() {
                return None;
            }
            advise(plan, design, last.scenario.trials, &seen).ok()
        })
        .collect()
}

/// Everything the expected information adds to the readings of one run.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct RunAdvice {
    /// Per design (plan order): advice at its largest count when the figures fall short.
    pub designs: Vec<Option<Advice>>,
    /// Rating designs with σ free whose fit is saturated or whose σ is barely determined.
    pub scale_fits: Vec<super::scale_fit::ScaleFit>,
}

impl RunAdvice {
    pub fn of(plan: &Plan, summaries: &[crate::engine::ScenarioSummary]) -> Self {
        RunAdvice {
            designs: run_advice(plan, summaries),
            scale_fits: super::scale_fit::plan_scale_fits(plan),
        }
    }

    /// The scale-fit flags of the design named `design`.
    pub fn scale_fit(&self, design: &str) -> Option<&super::scale_fit::ScaleFit> {
        self.scale_fits.iter().find(|f| f.design == design)
    }
}
