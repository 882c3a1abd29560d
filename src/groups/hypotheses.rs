//! Group-level hypotheses: the two-stage test on per-animal estimates and, beside it, the
//! pooled Wald test that ignores between-animal variation.
//!
//! Two-stage (the standard approach for groups of subjects; common practice): fit each
//! animal, then test its estimates across animals —
//! - bias / ideal criterion: one-sample t of the animals' ĉ against 0 / the ideal c;
//! - criterion shift / sensitivity difference: paired t of the animals' ĉ (d̂′) in the two
//!   conditions;
//! - unequal variance: one-sample t of the animals' ln σ̂ against 0;
//! - group difference: Welch t between the animals of two populations (the second's mean
//!   criterion is the first's + `shift`), on ĉ; the alternative is second − first.
//!
//! Pooled: all animals' counts summed into one table, fitted once, and the same contrast
//! tested with a Wald z on the pooled SE. It treats every trial as coming from one animal,
//! so when animals differ its SE is too small and its false-positive rate rises above α.

use super::animal::{AnimalEstimate, PooledEstimate, criterion_index, d_prime_index};
use crate::design::Design;
use crate::design::goals::{Hypothesis, TestKind};
use crate::infer::{one_sample_t, paired_t, wald_test, welch_t};
use crate::plan::Plan;
use crate::vocab::Sided;
use serde::Serialize;

/// What a hypothesis compares, in a design's condition indices.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "on", rename_all = "kebab-case")]
pub enum GroupContrast {
    /// c of one condition.
    Criterion { condition: usize },
    /// c of condition `a` minus c of condition `b`.
    CriterionShift { a: usize, b: usize },
    /// d′ of condition `a` minus d′ of condition `b`.
    SensitivityDifference { a: usize, b: usize },
    /// ln σ.
    LnSigma,
    /// Second population's mean c minus the first's, in one condition (true value `shift`).
    GroupDifference { condition: usize, shift: f64 },
}

/// A hypothesis as a design tests it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupTest {
    pub name: String,
    pub kind: TestKind,
    pub sided: Sided,
    pub contrast: GroupContrast,
    /// The value the hypothesis tests the contrast against (0, or the ideal criterion).
    pub null: f64,
    /// The contrast's value under the population means.
    pub truth: f64,
    /// `truth − null`: 0 means the rejection rates are type-I errors.
    pub effect: f64,
    /// Power target (the hypothesis's own, else the plan's).
    pub target: Option<f64>,
}

impl GroupTest {
    /// Whether the population means sit on the null (the rejection rate is then α's).
    pub fn null_is_true(&self) -> bool {
        self.effect.abs() < 1e-12
    }

    /// Whether the test needs a separate two-population study.
    pub fn two_populations(&self) -> bool {
        matches!(self.contrast, GroupContrast::GroupDifference { .. })
    }

    /// The two-stage test of contrast = `null` on one population's animals: `Some(reject)`,
    /// or `None` when the test has no answer (fewer than 2 usable animals, no spread).
    pub fn two_stage(&self, animals: &[AnimalEstimate], null: f64, alpha: f64) -> Option<bool> {
        let outcome = match self.contrast {
            GroupContrast::Criterion { condition } => {
                let c: Vec<f64> = animals.iter().map(|e| e.criterion[condition]).collect();
                one_sample_t(&c, null, self.sided, alpha)
            }
            GroupContrast::CriterionShift { a, b } => {
                let (x, y) = pairs(animals, |e| &e.criterion, a, b);
                paired_t(&x, &y, null, self.sided, alpha)
            }
            GroupContrast::SensitivityDifference { a, b } => {
                let (x, y) = pairs(animals, |e| &e.d_prime, a, b);
                paired_t(&x, &y, null, self.sided, alpha)
            }
            GroupContrast::LnSigma => {
                let s: Option<Vec<f64>> = animals.iter().map(|e| e.ln_sigma).collect();
                one_sample_t(&s?, null, self.sided, alpha)
            }
            GroupContrast::GroupDifference { .. } => return None,
        };
        outcome.ok().map(|o| o.reject)
    }

    /// The two-stage Welch test of a group difference (second − first).
    pub fn two_stage_groups(
        &self,
        first: &[AnimalEstimate],
        second: &[AnimalEstimate],
        null: f64,
        alpha: f64,
    ) -> Option<bool> {
        let GroupContrast::GroupDifference { condition, .. } = self.contrast else {
            return None;
        };
        let c = |g: &[AnimalEstimate]| -> Vec<f64> {
            g.iter().map(|e| e.criterion[condition]).collect()
        };
        welch_t(&c(second), &c(first), null, self.sided, alpha)
            .ok()
            .map(|o| o.reject)
    }

    /// The pooled Wald test of contrast = `null` on one population's summed counts.
    pub fn pooled(&self, p: &PooledEstimate, null: f64, alpha: f64) -> Option<bool> {
        let (estimate, se) = match self.contrast {
            GroupContrast::Criterion { condition } => {
                p.contrast(&[(criterion_index(condition), 1.0)])?
            }
            GroupContrast::CriterionShift { a, b } => {
                p.contrast(&[(criterion_index(a), 1.0), (criterion_index(b), -1.0)])?
            }
            GroupContrast::SensitivityDifference { a, b } => {
                p.contrast(&[(d_prime_index(a), 1.0), (d_prime_index(b), -1.0)])?
            }
            GroupContrast::LnSigma => p.ln_sigma?,
            GroupContrast::GroupDifference { .. } => return None,
        };
        wald_test(estimate, se, null, self.sided, alpha)
            .ok()
            .map(|o| o.reject)
    }

    /// The pooled Wald test of a group difference: z = (ĉ₂ − ĉ₁)/√(SE₁² + SE₂²), each
    /// population pooled on its own.
    pub fn pooled_groups(
        &self,
        first: &PooledEstimate,
        second: &PooledEstimate,
        null: f64,
        alpha: f64,
    ) -> Option<bool> {
        let GroupContrast::GroupDifference { condition, .. } = self.contrast else {
            return None;
        };
        let (c1, s1) = first.contrast(&[(criterion_index(condition), 1.0)])?;
        let (c2, s2) = second.contrast(&[(criterion_index(condition), 1.0)])?;
        wald_test(c2 - c1, s1.hypot(s2), null, self.sided, alpha)
            .ok()
            .map(|o| o.reject)
    }
}

fn pairs(
    animals: &[AnimalEstimate],
    get: impl Fn(&AnimalEstimate) -> &Vec<f64>,
    a: usize,
    b: usize,
) -> (Vec<f64>, Vec<f64>) {
    animals.iter().map(|e| (get(e)[a], get(e)[b])).unzip()
}

pub use crate::power::ideal_criterion;

/// The plan's hypotheses as `design` tests them, and a note for each it cannot test.
pub fn group_tests(plan: &Plan, design: &Design) -> (Vec<GroupTest>, Vec<String>) {
    let mut tests = Vec::new();
    let mut notes = Vec::new();
    for h in plan.hypotheses() {
        match group_test(plan, design, h) {
            Ok(t) => tests.push(t),
            Err(why) => notes.push(format!("\"{}\" is not tested here: {why}", h.name)),
        }
    }
    (tests, notes)
}

fn group_test(plan: &Plan, design: &Design, h: &Hypothesis) -> Result<GroupTest, String> {
    let index = |name: &String| {
        design
            .conditions
            .iter()
            .position(|c| &c.name == name)
            .ok_or_else(|| format!("the design has no condition \"{name}\""))
    };
    let first = || h.conditions.first().map_or(Ok(0), index);
    let conds = &design.conditions;
    let (contrast, null, truth) = match h.kind {
        TestKind::Bias => {
            let j = first()?;
            (
                GroupContrast::Criterion { condition: j },
                0.0,
                conds[j].criterion,
            )
        }
        TestKind::IdealCriterion => {
            let j = first()?;
            let ideal = ideal_criterion(plan, conds[j].presence, conds[j].d_prime).ok_or(
                "the ideal criterion is known only with criterion = \"optimal\" and payoffs",
            )?;
            (
                GroupContrast::Criterion { condition: j },
                ideal,
                conds[j].criterion,
            )
        }
        TestKind::CriterionShift | TestKind::SensitivityDifference => {
            let [a, b] = match h.conditions.as_slice() {
                [x, y] => [index(x)?, index(y)?],
                _ => return Err("it names two conditions".into()),
            };
            if h.kind == TestKind::CriterionShift {
                (
                    GroupContrast::CriterionShift { a, b },
                    0.0,
                    conds[a].criterion - conds[b].criterion,
                )
            } else {
                (
                    GroupContrast::SensitivityDifference { a, b },
                    0.0,
                    conds[a].d_prime - conds[b].d_prime,
                )
            }
        }
        TestKind::UnequalVariance => {
            let estimates_sigma = matches!(&design.response,
                crate::design::Response::Rating(s) if !s.fix_sigma);
            if !estimates_sigma {
                return Err("the design does not estimate σ".into());
            }
            (GroupContrast::LnSigma, 0.0, plan.observer().sigma.ln())
        }
        TestKind::GroupDifference => {
            let j = first()?;
            let contrast = GroupContrast::GroupDifference {
                condition: j,
                shift: h.shift,
            };
            (contrast, 0.0, h.shift)
        }
    };
    Ok(GroupTest {
        name: h.name.clone(),
        kind: h.kind,
        sided: h.sided,
        contrast,
        null,
        truth,
        effect: truth - null,
        target: h.power.or(plan.targets().power),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn animal(c: [f64; 2], d: [f64; 2]) -> AnimalEstimate {
        AnimalEstimate {
            d_prime: d.to_vec(),
            criterion: c.to_vec(),
            ln_sigma: None,
        }
    }

    fn test(contrast: GroupContrast) -> GroupTest {
        GroupTest {
            name: "h".into(),
            kind: TestKind::Bias,
            sided: Sided::TwoSided,
            contrast,
            null: 0.0,
            truth: 0.0,
            effect: 0.0,
            target: None,
        }
    }

    // One-sample t on 0.1, 0.3, 0.5, 0.7: mean 0.4, s = 0.258199, t = 3.098387 on 3 df,
    // between the two-sided critical values t(0.95; 3) = 2.353 and t(0.975; 3) = 3.182
    // (standard t table, common practice): rejected at α = 0.10, not at α = 0.05.
    #[test]
    fn criterion_test_is_the_one_sample_t() {
        let xs: Vec<AnimalEstimate> = [0.1, 0.3, 0.5, 0.7]
            .iter()
            .map(|&c| animal([c, 0.0], [1.0, 1.0]))
            .collect();
        let t = test(GroupContrast::Criterion { condition: 0 });
        assert_eq!(t.two_stage(&xs, 0.0, 0.05), Some(false));
        assert_eq!(t.two_stage(&xs, 0.0, 0.10), Some(true));
        assert_eq!(
            t.two_stage(&xs, 0.4, 0.10),
            Some(false),
            "tested at its own mean"
        );
        assert_eq!(t.two_stage(&xs[..1], 0.0, 0.05), None);
    }

    #[test]
    fn shift_test_pairs_the_conditions() {
        // Differences 0.30, 0.32, 0.28, 0.31: far from 0 relative to their spread.
        let xs = vec![
            animal([0.5, 0.2], [1.0, 1.0]),
            animal([0.1, -0.22], [1.0, 1.0]),
            animal([0.9, 0.62], [1.0, 1.0]),
            animal([0.4, 0.09], [1.0, 1.0]),
        ];
        let t = test(GroupContrast::CriterionShift { a: 0, b: 1 });
        assert_eq!(t.two_stage(&xs, 0.0, 0.01), Some(true));
        let s = test(GroupContrast::SensitivityDifference { a: 0, b: 1 });
        assert_eq!(
            s.two_stage(&xs, 0.0, 0.05),
            None,
            "no spread in d′ differences"
        );
    }

    #[test]
    fn pooled_wald_uses_the_pooled_se() {
        let p = PooledEstimate::single((1.5, 0.1), (0.2, 0.05), 0.0);
        let t = test(GroupContrast::Criterion { condition: 0 });
        assert_eq!(t.pooled(&p, 0.0, 0.05), Some(true)); // z = 4
        assert_eq!(t.pooled(&p, 0.15, 0.05), Some(false)); // z = 1
        let near = PooledEstimate::single((1.5, 0.1), (0.05, 0.05), 0.0);
        assert_eq!(t.pooled(&near, 0.0, 0.05), Some(false)); // z = 1
    }
}
