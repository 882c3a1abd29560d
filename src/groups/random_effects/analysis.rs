//! The random-effects analysis of one simulated study: fit the mixed model to all animals'
//! counts, then test each hypothesis by Wald z on the fixed effects and by the signed-root
//! likelihood ratio against the restricted fit, at the hypothesis's null (power) and at the
//! population's true value (false positives), as the two-stage and pooled tests are.

use super::fit::{FitFailure, MixedFit, MixedProblem, Restriction, coarse_grid, start_theta};
use super::layout::{Layout, YesNoRow};
use super::marginal::AnimalRows;
use super::quadrature::{HermiteRule, ProductGrid};
use super::tally::{RandomEffectsTally, RandomEffectsTestTally};
use crate::groups::hypotheses::{GroupContrast, GroupTest};
use crate::infer::{Reference, signed_root_test_referred, wald_test_referred};

/// Where a fit starts: each condition's (d′, c) (the pooled fit's, a consistent guess for
/// the means), the SDs of the random effects (from the per-animal estimates) and, for a group
/// difference, the difference of the two populations' pooled criteria.
#[derive(Debug, Clone, PartialEq)]
pub struct Start {
    pub values: Vec<(f64, f64)>,
    pub sds: Vec<f64>,
    pub difference: f64,
}

/// Nodes per random effect when the plan does not say: 7 with two random effects, 5 with
/// three, 4 with four (49, 125 and 256 points per animal). `tests/random_effects_outside_checks.rs`
/// shows these move no estimate of the SciPy golden cases by more than 1e-4 from the converged
/// quadrature, while the Laplace approximation (1 node) moves them by far more.
pub fn default_nodes(q: usize) -> usize {
    match q {
        0..=2 => 7,
        3 => 5,
        _ => 4,
    }
}

/// The analysis of one design: its layout and quadrature rule.
#[derive(Debug, Clone)]
pub struct RandomEffectsAnalysis {
    pub layout: Layout,
    pub nodes: usize,
    grid: ProductGrid,
    coarse: ProductGrid,
}

/// A test's two outcomes: (Wald, LR), each `None` when it has no answer.
type Outcomes = (Option<bool>, Option<bool>);

impl RandomEffectsAnalysis {
    pub fn new(layout: Layout, nodes: usize) -> Self {
        let grid = ProductGrid::new(&HermiteRule::new(nodes), layout.q());
        let coarse = coarse_grid(layout.q());
        Self {
            layout,
            nodes,
            grid,
            coarse,
        }
    }

    /// Fits `rows` under `layout` from `start` (optionally restricted).
    pub fn fit(
        &self,
        layout: &Layout,
        rows: &[AnimalRows],
        start: &[f64],
        restriction: Option<&Restriction>,
    ) -> Result<MixedFit, FitFailure> {
        MixedProblem {
            p: layout.p(),
            q: layout.q(),
            grid: &self.grid,
            coarse: Some(&self.coarse),
            animals: rows,
        }
        .fit(start, restriction)
    }

    /// The fixed-effect weights of a hypothesis's contrast; `None` when the model cannot
    /// test it (σ, or two conditions that share the parameter).
    pub fn weights(layout: &Layout, contrast: &GroupContrast) -> Option<Vec<(usize, f64)>> {
        let cond = |j: usize| layout.conditions.get(j).copied();
        match *contrast {
            GroupContrast::Criterion { condition } => Some(vec![(cond(condition)?.1, 1.0)]),
            GroupContrast::CriterionShift { a, b } => {
                let (x, y) = (cond(a)?.1, cond(b)?.1);
                (x != y).then(|| vec![(x, 1.0), (y, -1.0)])
            }
            GroupContrast::SensitivityDifference { a, b } => {
                let (x, y) = (cond(a)?.0, cond(b)?.0);
                (x != y).then(|| vec![(x, 1.0), (y, -1.0)])
            }
            GroupContrast::LnSigma => None,
            GroupContrast::GroupDifference { .. } => {
                layout.group_column.then(|| vec![(layout.fixed, 1.0)])
            }
        }
    }

    /// What a contrast's Wald and signed-root statistics are referred to, with `animals`
    /// animals in the fit. A contrast between animals — the mean criterion, whose column is
    /// the same on all of an animal's rows, or a group difference — is referred to Student's
    /// t on the animals' degrees of freedom (N − 1; N − 2 for a group difference, whose fit
    /// has two means): the between-within rule (Schluchter & Elashoff 1990, *J. Stat.
    /// Comput. Simul.* 37:69–87; from memory), under which a mean of animals is tested as
    /// the two-stage t test tests it. So is a within-animal contrast (a shift between
    /// conditions) that carries a random slope, whose variance is then mostly between
    /// animals. A within-animal contrast with no random slope is referred to N(0, 1): its
    /// precision grows with trials, not animals.
    pub fn reference(layout: &Layout, contrast: &GroupContrast, animals: usize) -> Reference {
        let between = match contrast {
            GroupContrast::Criterion { .. } => Some(1),
            GroupContrast::GroupDifference { .. } => Some(2),
            GroupContrast::CriterionShift { .. } => layout.criterion_slope.then_some(1),
            GroupContrast::SensitivityDifference { .. } => layout.d_prime_slope.then_some(1),
            GroupContrast::LnSigma => None,
        };
        match between {
            Some(k) if animals > k => Reference::StudentsT((animals - k) as f64),
            _ => Reference::Normal,
        }
    }

    /// Wald and LR tests of contrast = `value` on a converged fit.
    #[allow(clippy::too_many_arguments)]
    fn test_at(
        &self,
        layout: &Layout,
        rows: &[AnimalRows],
        full: &MixedFit,
        weights: &[(usize, f64)],
        test: &GroupTest,
        value: f64,
        alpha: f64,
    ) -> Outcomes {
        let Some((estimate, se)) = full.contrast(weights, layout.p()) else {
            return (None, None);
        };
        let reference = Self::reference(layout, &test.contrast, rows.len());
        let wald = wald_test_referred(estimate, se, value, reference, test.sided, alpha)
            .ok()
            .map(|o| o.reject);
        let restriction = Restriction {
            weights: weights.to_vec(),
            value,
        };
        let lr = self
            .fit(layout, rows, &full.theta, Some(&restriction))
            .ok()
            .and_then(|r| {
                let fits = (full.loglik, r.loglik);
                signed_root_test_referred(fits, estimate, value, reference, test.sided, alpha).ok()
            })
            .map(|o| o.reject);
        (wald, lr)
    }

    fn record_test(
        &self,
        layout: &Layout,
        rows: &[AnimalRows],
        full: Option<&MixedFit>,
        test: &GroupTest,
        alpha: f64,
        into: &mut RandomEffectsTestTally,
    ) {
        let weights = Self::weights(layout, &test.contrast);
        let (Some(full), Some(weights)) = (full, weights) else {
            into.record((None, None), (None, None));
            return;
        };
        let at_null = self.test_at(layout, rows, full, &weights, test, test.null, alpha);
        let at_truth = self.test_at(layout, rows, full, &weights, test, test.truth, alpha);
        into.record(at_null, at_truth);
    }

    /// The main study: every test on one population, and the precision of the first
    /// condition's mean c and d′ (intervals ± `critical`·SE: t on N − 1 for c, z for d′).
    #[allow(clippy::too_many_arguments)]
    pub fn record_study(
        &self,
        tables: &[Vec<YesNoRow>],
        start: &Start,
        tests: &[GroupTest],
        alpha: f64,
        critical: (f64, f64),
        truth: (f64, f64),
        tally: &mut RandomEffectsTally,
    ) {
        let layout = &self.layout;
        let rows: Vec<AnimalRows> = tables.iter().map(|t| layout.rows(t, false)).collect();
        let theta = start_theta(&layout.start_beta(&start.values, 0.0), &start.sds);
        let full = self.fit(layout, &rows, &theta, None);
        tally.record_fit(full.as_ref().ok(), layout, critical, truth);
        for (test, into) in tests.iter().zip(tally.tests.iter_mut()) {
            if !test.two_populations() {
                self.record_test(layout, &rows, full.as_ref().ok(), test, alpha, into);
            }
        }
    }

    /// A group difference: both populations' animals in one fit with a difference column.
    pub fn record_groups(
        &self,
        first: &[Vec<YesNoRow>],
        second: &[Vec<YesNoRow>],
        start: &Start,
        test: &GroupTest,
        alpha: f64,
        into: &mut RandomEffectsTestTally,
    ) {
        let layout = self.layout.with_group_column();
        let rows: Vec<AnimalRows> = first
            .iter()
            .map(|t| layout.rows(t, false))
            .chain(second.iter().map(|t| layout.rows(t, true)))
            .collect();
        let beta = layout.start_beta(&start.values, start.difference);
        let full = self.fit(&layout, &rows, &start_theta(&beta, &start.sds), None);
        self.record_test(&layout, &rows, full.as_ref().ok(), test, alpha, into);
    }
}
