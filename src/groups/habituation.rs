//! Animals that change over their presentations (docs/groups.md, "Habituation"): a yes/no
//! animal whose criterion drifts, c_t = c + drift·t, and whose d′ may decay,
//! d′_t = d′·2^(−t/h), over its presentations t = 0, 1, …
//!
//! The session is cut into blocks of `block` presentations (the last may be shorter), each
//! holding present and absent trials in their shares (cumulative rounding, so the blocks sum
//! to the animal's split exactly). Within a block the animal's d′ and c are held at their
//! values at the block's middle presentation, so one block is two binomial draws and the
//! count-based engine stays fast. The criterion is linear in t, so the block's mean criterion
//! is exact; what the approximation moves is Φ's curvature within a block, of order
//! (drift·b)²/24 in the rate's argument (under 1e-3 at drift 0.01, b = 10).
//!
//! The stationary analysis fits the summed table exactly as [`YesNoAnimals`] does (so it sees
//! what a field study would fit). The trend analysis fits each animal's per-block counts
//! with d′, a criterion at the session's middle and a slope per presentation (probit
//! maximum likelihood by Fisher scoring), and reports the criterion at presentation 0.

use super::animal::{AnimalEstimate, AnimalPath, PooledEstimate};
use super::animal_yesno::{YesNoAnimals, YesNoCounts};
use super::population::Deviation;
use crate::design::habituation::{Analysis, Habituation};
use crate::design::{Condition, Split};
use crate::model::Observer;
use crate::model::normal::{cdf, pdf, z};
use crate::simulate::ReplicateRng;
use crate::vocab::RateCorrection;
use nalgebra::{Matrix3, Vector3};
use rand_distr::{Binomial, Distribution};

/// One block of an animal's session.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Block {
    /// First presentation of the block (counted from 0).
    pub start: u32,
    pub present: u64,
    pub absent: u64,
    /// The block's middle presentation, (first + last)/2, where its parameters are held.
    pub middle: f64,
}

/// Blocks of `block` presentations over a session of `split` trials, present and absent
/// trials spread in their shares by cumulative rounding.
pub fn blocks(split: Split, block: u32) -> Vec<Block> {
    let present = u64::from(split.present);
    let total = present + u64::from(split.absent);
    let b = u64::from(block.max(1));
    let share = |t: u64| (present * t + total / 2) / total.max(1);
    let mut out = Vec::new();
    let mut start = 0;
    while start < total {
        let end = (start + b).min(total);
        let p = share(end) - share(start);
        out.push(Block {
            start: start as u32,
            present: p,
            absent: (end - start) - p,
            middle: (start + end - 1) as f64 / 2.0,
        });
        start = end;
    }
    out
}

/// The habituating yes/no path of one design at one trial count.
#[derive(Debug, Clone)]
pub struct HabituatedYesNo {
    /// The stationary path at the same split: its animal model and its fits of summed counts.
    plain: YesNoAnimals,
    habituation: Habituation,
    blocks: Vec<Block>,
    correction: RateCorrection,
    /// The centre of the trend's criterion: the session's middle presentation.
    centre: f64,
}

impl HabituatedYesNo {
    pub fn new(
        observer: &Observer,
        condition: &Condition,
        split: Split,
        correction: RateCorrection,
        habituation: Habituation,
    ) -> Self {
        let total = split.present + split.absent;
        Self {
            plain: YesNoAnimals::new(observer, condition, split, correction),
            habituation,
            blocks: blocks(split, habituation.block),
            correction,
            centre: f64::from(total.max(1) - 1) / 2.0,
        }
    }

    pub fn blocks(&self) -> &[Block] {
        &self.blocks
    }

    /// The animal with this deviation at presentation `t`.
    pub fn animal_at(&self, deviation: &Deviation, t: f64) -> Observer {
        let o = self.plain.animal(deviation);
        Observer {
            d_prime: self.habituation.d_prime_at(o.d_prime, t),
            criterion: self.habituation.criterion_at(o.criterion, t),
            ..o
        }
    }

    /// Expected (hits, false alarms) of each block for an animal with this deviation.
    pub fn expected(&self, deviation: &Deviation) -> Vec<(f64, f64)> {
        self.blocks
            .iter()
            .map(|b| {
                let r = self.animal_at(deviation, b.middle).rates();
                (b.present as f64 * r.hit, b.absent as f64 * r.false_alarm)
            })
            .collect()
    }

    fn summed(&self, counts: &[YesNoCounts]) -> YesNoCounts {
        let mut total = YesNoCounts::default();
        for c in counts {
            self.plain.add(&mut total, c);
        }
        total
    }
}

/// One Binomial(n, p) count.
#[inline]
fn binomial(rng: &mut ReplicateRng, n: u64, p: f64) -> u64 {
    Binomial::new(n, p.clamp(0.0, 1.0)).map_or(0, |b| b.sample(rng))
}

impl AnimalPath for HabituatedYesNo {
    /// Counts of each block, in session order.
    type Counts = Vec<YesNoCounts>;

    fn empty(&self) -> Vec<YesNoCounts> {
        vec![YesNoCounts::default(); self.blocks.len()]
    }

    fn simulate(&self, rng: &mut ReplicateRng, deviation: &Deviation) -> Vec<YesNoCounts> {
        // Block by block, hits then false alarms, from the animal's own stream.
        self.blocks
            .iter()
            .map(|b| {
                let r = self.animal_at(deviation, b.middle).rates();
                YesNoCounts {
                    hits: binomial(rng, b.present, r.hit),
                    present: b.present,
                    false_alarms: binomial(rng, b.absent, r.false_alarm),
                    absent: b.absent,
                }
            })
            .collect()
    }

    fn add(&self, into: &mut Vec<YesNoCounts>, other: &Vec<YesNoCounts>) {
        for (a, b) in into.iter_mut().zip(other) {
            self.plain.add(a, b);
        }
    }

    fn fit_animal(&self, counts: &Vec<YesNoCounts>) -> Option<AnimalEstimate> {
        match self.habituation.analysis {
            Analysis::Stationary => self.plain.fit_animal(&self.summed(counts)),
            Analysis::Trend => {
                let t = self.fit_trend(counts)?;
                Some(AnimalEstimate {
                    d_prime: vec![t.d_prime],
                    criterion: vec![t.criterion_at_zero],
                    ln_sigma: None,
                })
            }
        }
    }

    fn fit_pooled(&self, counts: &Vec<YesNoCounts>) -> Option<PooledEstimate> {
        match self.habituation.analysis {
            Analysis::Stationary => self.plain.fit_pooled(&self.summed(counts)),
            Analysis::Trend => {
                let t = self.fit_trend(counts)?;
                Some(PooledEstimate {
                    values: vec![t.d_prime, t.criterion_at_zero],
                    covariance: t.covariance.to_vec(),
                    ln_sigma: None,
                })
            }
        }
    }
}

/// A trend fit: d̂′, ĉ at presentation 0, the slope per presentation and the covariance of
/// (d̂′, ĉ₀) from the inverse expected information at the estimate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrendFit {
    pub d_prime: f64,
    pub criterion_at_zero: f64,
    pub slope: f64,
    /// Row-major 2 × 2 covariance of (d̂′, ĉ₀).
    pub covariance: [f64; 4],
}

/// One binomial row of the trend model: y successes of n at probit η = xᵀθ.
struct Row {
    y: f64,
    n: f64,
    x: Vector3<f64>,
}

impl HabituatedYesNo {
    /// The rows of the trend likelihood, with the plan's rate correction applied to each
    /// summed row (present, absent) and its pseudo-counts spread over the blocks in
    /// proportion to their trials, so the corrected table is fitted as if it were the data
    /// (the rule of fit/correction.rs).
    fn trend_rows(&self, counts: &[YesNoCounts]) -> Option<Vec<Row>> {
        let total = self.summed(counts);
        let adjust = |yes: u64, n: u64| -> Option<(f64, f64)> {
            let mut row = [yes as f64, (n - yes.min(n)) as f64];
            self.correction.apply_to_row(&mut row).ok()?;
            Some((row[0] - yes as f64, row[0] + row[1] - n as f64))
        };
        let (dh, dp) = adjust(total.hits, total.present)?;
        let (df, da) = adjust(total.false_alarms, total.absent)?;
        let mut rows = Vec::with_capacity(2 * counts.len());
        for (b, c) in self.blocks.iter().zip(counts) {
            let m = b.middle - self.centre;
            if total.present > 0 && c.present > 0 {
                let w = c.present as f64 / total.present as f64;
                rows.push(Row {
                    y: c.hits as f64 + w * dh,
                    n: c.present as f64 + w * dp,
                    x: Vector3::new(0.5, -1.0, -m),
                });
            }
            if total.absent > 0 && c.absent > 0 {
                let w = c.absent as f64 / total.absent as f64;
                rows.push(Row {
                    y: c.false_alarms as f64 + w * df,
                    n: c.absent as f64 + w * da,
                    x: Vector3::new(-0.5, -1.0, -m),
                });
            }
        }
        Some(rows)
    }

    /// Probit maximum likelihood of (d′, c at the middle, slope) by Fisher scoring with step
    /// halving, started at the stationary closed form of the corrected totals; `None` when
    /// it does not converge (the animal is left out, as any animal without a fit).
    pub fn fit_trend(&self, counts: &[YesNoCounts]) -> Option<TrendFit> {
        let rows = self.trend_rows(counts)?;
        let (mut hy, mut hn, mut fy, mut fn_) = (0.0, 0.0, 0.0, 0.0);
        for r in &rows {
            if r.x[0] > 0.0 {
                (hy, hn) = (hy + r.y, hn + r.n);
            } else {
                (fy, fn_) = (fy + r.y, fn_ + r.n);
            }
        }
        let (zh, zf) = (z(hy / hn)?, z(fy / fn_)?);
        let mut theta = Vector3::new(zh - zf, -(zh + zf) / 2.0, 0.0);
        let loglik = |t: &Vector3<f64>| -> f64 {
            rows.iter()
                .map(|r| {
                    let eta = r.x.dot(t);
                    r.y * cdf(eta).max(1e-300).ln() + (r.n - r.y) * cdf(-eta).max(1e-300).ln()
                })
                .sum()
        };
        let information = |t: &Vector3<f64>| -> (Vector3<f64>, Matrix3<f64>) {
            let mut score = Vector3::zeros();
            let mut info = Matrix3::zeros();
            for r in &rows {
                let eta = r.x.dot(t);
                let (p, q, f) = (cdf(eta), cdf(-eta), pdf(eta));
                let pq = (p * q).max(1e-300);
                score += r.x * ((r.y - r.n * p) * f / pq);
                info += r.x * r.x.transpose() * (r.n * f * f / pq);
            }
            (score, info)
        };
        let mut current = loglik(&theta);
        for _ in 0..100 {
            let (score, info) = information(&theta);
            let step = info.try_inverse()? * score;
            let mut scale = 1.0;
            let mut next = theta + step;
            let mut value = loglik(&next);
            // A NaN likelihood counts as a decrease, so the step is halved.
            while (value.is_nan() || value < current - 1e-12) && scale > 1e-6 {
                scale /= 2.0;
                next = theta + step * scale;
                value = loglik(&next);
            }
            theta = next;
            current = value;
            if (step * scale).amax() < 1e-10 {
                let (_, info) = information(&theta);
                let cov = info.try_inverse()?;
                let m = self.centre;
                // ĉ₀ = a − m·b: Var = Var a + m² Var b − 2m Cov(a, b).
                let var_c = cov[(1, 1)] + m * m * cov[(2, 2)] - 2.0 * m * cov[(1, 2)];
                let cov_dc = cov[(0, 1)] - m * cov[(0, 2)];
                let fit = TrendFit {
                    d_prime: theta[0],
                    criterion_at_zero: theta[1] - m * theta[2],
                    slope: theta[2],
                    covariance: [cov[(0, 0)], cov_dc, cov_dc, var_c],
                };
                return [fit.d_prime, fit.criterion_at_zero, var_c]
                    .iter()
                    .all(|x| x.is_finite())
                    .then_some(fit);
            }
        }
        None
    }
}

/// The bias habituation leaves in one grid cell's group means, against the population
/// means at presentation 0 (the plan's values), each with its Monte Carlo SE.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct BiasRow {
    pub animals: u32,
    /// Trials per condition.
    pub trials: u32,
    /// Two-stage group mean ĉ minus the population's c.
    pub criterion: crate::engine::Figure,
    /// Two-stage group mean d̂′ minus the population's d′.
    pub d_prime: crate::engine::Figure,
    /// Within-animal SE of ĉ of the population's mean animal from the expected information:
    /// (stationary fit, trend fit) — what the trend term costs.
    pub within_se: (f64, f64),
}

/// The habituation part of a group report.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HabituationReport {
    pub model: Habituation,
    /// Per design (in plan order), one row per trial count at the largest animal count.
    pub designs: Vec<Vec<BiasRow>>,
}

impl HabituatedYesNo {
    /// Within-animal SEs of ĉ for the animal with this deviation, from the expected
    /// information: the stationary closed form's (Gourevitch & Galanter 1967, at the rates
    /// of the summed expected table, where the stationary fit converges) and the trend
    /// fit's (inverse expected information of the trend model at the animal's values).
    pub fn within_se(&self, deviation: &Deviation) -> (f64, f64) {
        let e = self.expected(deviation);
        let (mut h, mut f, mut p, mut a) = (0.0, 0.0, 0.0, 0.0);
        for (b, (eh, ef)) in self.blocks.iter().zip(&e) {
            (h, f, p, a) = (h + eh, f + ef, p + b.present as f64, a + b.absent as f64);
        }
        let var_z = |x: f64, n: f64| {
            let r = x / n;
            z(r).map_or(f64::NAN, |q| r * (1.0 - r) / (n * pdf(q) * pdf(q)))
        };
        let stationary = ((var_z(h, p) + var_z(f, a)) / 4.0).sqrt();
        let m0 = self.centre;
        let mut info = Matrix3::zeros();
        for (b, (eh, ef)) in self.blocks.iter().zip(&e) {
            let m = b.middle - m0;
            for (x, n, y) in [
                (Vector3::new(0.5, -1.0, -m), b.present as f64, *eh),
                (Vector3::new(-0.5, -1.0, -m), b.absent as f64, *ef),
            ] {
                if n > 0.0 {
                    // Each block's expected rate (lapses included) gives its probit and
                    // binomial variance: the information at the trend model's best fit when
                    // the model holds, as it does without lapses.
                    let pi = (y / n).clamp(1e-12, 1.0 - 1e-12);
                    let q = z(pi).unwrap_or(0.0);
                    info += x * x.transpose() * (n * pdf(q) * pdf(q) / (pi * (1.0 - pi)));
                }
            }
        }
        let trend = info.try_inverse().map_or(f64::NAN, |c| {
            (c[(1, 1)] + m0 * m0 * c[(2, 2)] - 2.0 * m0 * c[(1, 2)]).sqrt()
        });
        (stationary, trend)
    }
}

/// The habituation report of a plan's designs, or `None` when nothing habituates.
pub fn report(
    setups: &[super::grid::DesignSetup],
    designs: &[super::DesignGroups],
) -> Option<HabituationReport> {
    let plan = setups.first()?.plan;
    let model = super::grid::habituation(plan)?;
    let correction = plan.study().rate_correction;
    let rows = setups
        .iter()
        .zip(designs)
        .map(|(s, d)| {
            let most = d.animals.iter().copied().max().unwrap_or(0);
            let condition = &s.design.conditions[0];
            d.cells
                .iter()
                .filter(|c| c.animals == most)
                .map(|c| {
                    let split = crate::design::split_trials(c.trials, condition.presence);
                    let path =
                        HabituatedYesNo::new(plan.observer(), condition, split, correction, model);
                    let bias = |p: &super::summary::GroupPrecision| crate::engine::Figure {
                        value: p.mean.value - p.truth,
                        mc_se: p.mean.mc_se,
                    };
                    BiasRow {
                        animals: c.animals,
                        trials: c.trials,
                        criterion: bias(&c.summary.criterion),
                        d_prime: bias(&c.summary.d_prime),
                        within_se: path.within_se(&Deviation::default()),
                    }
                })
                .collect()
        })
        .collect();
    Some(HabituationReport {
        model,
        designs: rows,
    })
}
