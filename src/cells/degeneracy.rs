//! The one degeneracy rule: when a two-row count table (absent and present trials over K
//! ordered categories) has no maximum-likelihood estimate inside the parameter space. Every
//! route uses it: the yes/no closed form (K = 2, σ held, where it reduces to "a rate is 0 or
//! 1"), the rating fast path (`fit::rating`) and the general Newton fit of
//! [`crate::cells::newton`] for each full-count condition whose parameters are its own.
//!
//! Model: absent evidence N(0, 1), present N(μ, σ²), criteria k₁ < … < k_{K−1}; σ is either
//! free or held at a known value (the argument is the same for any held value).
//!
//! # The rule
//!
//! Write lo_a, hi_a for the lowest and highest category with an absent count, lo_p, hi_p
//! likewise for the present row. The table is **degenerate** exactly when
//! 1. some category is empty in both rows; or
//! 2. the rows are separated: hi_a ≤ lo_p (present responses all at or above every absent
//!    one) or hi_p ≤ lo_a; or, with σ free only,
//! 3. the absent row has no count strictly between lo_p and hi_p, or the present row none
//!    strictly between lo_a and hi_a;
//!
//! and, with σ free, when K = 2 (one zROC point cannot fix both μ and σ: a ridge, not a
//! boundary maximum). Otherwise a finite maximum exists.
//!
//! # Why (the argument)
//!
//! lnL never exceeds the saturated value ℓ_sat = Σ n ln(n/N_row), reached only when every
//! cell probability equals its row's observed share (Σ n_i ln q_i has a unique maximum on the
//! simplex), so lnL is bounded and the question is only whether its supremum is reached
//! inside the parameter space or only on its boundary.
//!
//! *The closure.* Let A_j = Φ(k_j) and S_j = Φ((k_j − μ)/σ) be the two rows' probabilities
//! below criterion j (A₀ = S₀ = 0, A_K = S_K = 1). In z units the points (z A_j, z S_j) lie on
//! a line of slope 1/σ. Taking limits of slope (in [0, ∞]), intercept and points (in the
//! extended plane), every limit of model points lies, in order, on one of three curves from
//! (0, 0) to (1, 1): a proper binormal ROC (finite μ, σ); a *step* (σ → 0 with μ → m: S = 0
//! for A < Φ(m), a vertical segment at A = Φ(m), then S = 1; m = ±∞ gives the two edge paths
//! μ → ±∞); or a *flat step* (σ → ∞: a vertical segment at A = 0, a horizontal one at S = s₀,
//! a vertical one at A = 1). With σ held, the slope is fixed and only proper curves and the
//! two edge paths remain. Every configuration on these curves is such a limit.
//!
//! *Limit points with a finite lnL.* A cell of zero probability must hold no counts. On a
//! proper curve A_j = A_{j+1} ⇔ S_j = S_{j+1}, so a limit point off the model zeroes a
//! category in both rows: rule 1. On a step at A = t₀, present probability lives only on the
//! vertical segment: if its present cells are r…s, every category strictly between r and s
//! has both its criteria on that segment, hence absent probability 0. So a finite lnL needs
//! the present counts inside r…s and no absent count strictly inside: rule 3 (first half,
//! with r = lo_p, s = hi_p, the weakest choice); on the edge paths (t₀ ∈ {0, 1}) the absent
//! row must also sit wholly on one side: rule 2. The flat step is the same with the rows'
//! roles exchanged (second half of rule 3).
//!
//! *Degenerate.* Under rule 2 or 3 (and no empty category) the observed shares themselves lie
//! on such a curve (put the segment's criteria at the observed present, resp. absent,
//! cumulative shares and every other criterion at the other row's), so the supremum is ℓ_sat.
//! Such a table has an empty cell (for rule 3 with σ free, K ≥ 3 leaves a category strictly
//! inside or outside r…s), while every model point gives every cell a positive probability:
//! ℓ_sat is approached at the boundary and reached nowhere inside. Under rule 1, take an
//! empty category next to a non-empty one: moving the criterion between them to shrink the
//! empty one raises lnL at every point (∂lnL/∂k ≠ 0 everywhere), so no point inside is a
//! maximum either.
//!
//! *Not degenerate.* Otherwise lnL = −∞ at every limit point outside the model. The closure
//! is compact and lnL is continuous into [−∞, 0], so the supremum is attained on the closure,
//! at a point where lnL > −∞ — a model point with finite μ, σ and criteria.

use crate::cells::observation_model::ObservationModel;
use crate::cells::parameter_map::{
    SLOT_CRITERION, SLOT_D_PRIME, SLOT_FIRST_GAP, SLOT_LN_SIGMA, Slot,
};
use crate::cells::spec::Record;

/// Whether σ is estimated or held at a known value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Variance {
    /// σ held (at 1 or any other known value): the zROC slope is fixed.
    Held,
    /// σ estimated with μ and the criteria.
    Free,
}

/// Why a table has no maximum-likelihood estimate inside the parameter space; each variant
/// names where the supremum lies (see the module documentation for the argument).
#[derive(Debug, Clone, Copy, PartialEq, Eq, thiserror::Error)]
pub enum Degeneracy {
    /// No count in this category in either row: its criteria merge (or the end criterion
    /// runs to ±∞).
    #[error("category {category} is empty in both rows")]
    EmptyCategory { category: usize },
    /// Every present response is at or above category `at` and every absent one at or below
    /// it: μ → +∞.
    #[error(
        "the rows are separated: present responses are all at or above category {at}, absent ones all at or below it"
    )]
    PresentAboveAbsent { at: usize },
    /// Every present response is at or below category `at` and every absent one at or above
    /// it: μ → −∞.
    #[error(
        "the rows are separated: present responses are all at or below category {at}, absent ones all at or above it"
    )]
    PresentBelowAbsent { at: usize },
    /// σ free: no absent count strictly between the lowest and highest present categories,
    /// so σ → 0 with the present row's criteria gathered around μ fits the table exactly.
    #[error(
        "no absent response lies strictly between categories {lowest} and {highest}, which hold every present response (σ → 0)"
    )]
    PresentNarrow { lowest: usize, highest: usize },
    /// σ free: no present count strictly between the lowest and highest absent categories
    /// (σ → ∞).
    #[error(
        "no present response lies strictly between categories {lowest} and {highest}, which hold every absent response (σ → ∞)"
    )]
    AbsentNarrow { lowest: usize, highest: usize },
    /// σ free with two categories: μ and σ lie on a ridge of equal likelihood.
    #[error("with two categories σ cannot be estimated alongside μ")]
    SigmaWithTwoCategories,
}

/// The rule of the module documentation for one table: rows of equal length K ≥ 2 with
/// non-negative counts (whole or corrected) and a positive total each; `None` means a finite
/// maximum exists. Rows that break these preconditions are reported as an empty category or
/// a separation rather than a panic.
pub fn table_degeneracy(absent: &[f64], present: &[f64], variance: Variance) -> Option<Degeneracy> {
    let k = absent.len().min(present.len());
    if let Some(category) = (0..k).find(|&j| absent[j] <= 0.0 && present[j] <= 0.0) {
        return Some(Degeneracy::EmptyCategory { category });
    }
    if variance == Variance::Free && k == 2 {
        return Some(Degeneracy::SigmaWithTwoCategories);
    }
    let support = |row: &[f64]| {
        let lowest = row[..k].iter().position(|&x| x > 0.0)?;
        let highest = row[..k].iter().rposition(|&x| x > 0.0)?;
        Some((lowest, highest))
    };
    let (Some((lo_a, hi_a)), Some((lo_p, hi_p))) = (support(absent), support(present)) else {
        return Some(Degeneracy::EmptyCategory { category: 0 });
    };
    if hi_a <= lo_p {
        return Some(Degeneracy::PresentAboveAbsent { at: lo_p });
    }
    if hi_p <= lo_a {
        return Some(Degeneracy::PresentBelowAbsent { at: hi_p });
    }
    if variance == Variance::Free {
        // Categories strictly between lo and hi (none when hi ≤ lo + 1) hold no count.
        let none_inside = |row: &[f64], lo: usize, hi: usize| {
            hi <= lo + 1 || row[lo + 1..hi].iter().all(|&x| x <= 0.0)
        };
        if none_inside(absent, lo_p, hi_p) {
            return Some(Degeneracy::PresentNarrow {
                lowest: lo_p,
                highest: hi_p,
            });
        }
        if none_inside(present, lo_a, hi_a) {
            return Some(Degeneracy::AbsentNarrow {
                lowest: lo_a,
                highest: hi_a,
            });
        }
    }
    None
}

/// The rule applied to every condition of `model` it covers, with `cells` the counts of the
/// model's blocks: the first degenerate condition and why. A condition is covered when it
/// records full counts, has no lapse process, estimates d′, c and every criterion gap, holds
/// or estimates σ, and shares none of its θ entries with another condition. Its likelihood
/// is then a separate term of lnL, so the whole fit has no maximum inside when that term has
/// none. Conditions not covered (coarse records, shared or fixed parameters) get no verdict
/// here; the fit's own stationary-point check judges them.
pub fn model_degeneracy(
    model: &ObservationModel,
    cells: &[Vec<f64>],
) -> Option<(usize, Degeneracy)> {
    let mut block = 0;
    for (j, spec) in model.conditions().iter().enumerate() {
        let blocks = model.blocks()[block..]
            .iter()
            .take_while(|b| b.condition == j)
            .count();
        let rows = &cells[block.min(cells.len())..(block + blocks).min(cells.len())];
        block += blocks;
        let Some(variance) = covered(model, j) else {
            continue;
        };
        if !fixed_rows(&spec.record) || rows.len() != 2 {
            continue;
        }
        // Blocks of a full record: present trials first, then absent (see `coarsening`).
        if let Some(reason) = table_degeneracy(&rows[1], &rows[0], variance) {
            return Some((j, reason));
        }
    }
    None
}

/// Full counts, or a two-choice task: two class rows of fixed size. A two-choice table is the
/// full table at √2·d′, a one-to-one change of d′, so it has an interior maximum exactly when
/// the full table does.
fn fixed_rows(record: &Record) -> bool {
    matches!(record, Record::Full { .. } | Record::TwoChoice { .. })
}

/// `Some(variance)` when condition `j` is covered by the rule (see [`model_degeneracy`]).
fn covered(model: &ObservationModel, j: usize) -> Option<Variance> {
    let spec = &model.conditions()[j];
    if spec.lapse.is_some() || !fixed_rows(&spec.record) {
        return None;
    }
    let map = model.parameters();
    let slots = map.slots(j);
    let own = |slot: usize| match slots[slot] {
        Slot::Theta(i) => (0..model.conditions().len())
            .filter(|&o| o != j)
            .all(|o| !map.slots(o).contains(&Slot::Theta(i))),
        _ => false,
    };
    let gaps = SLOT_FIRST_GAP..SLOT_FIRST_GAP + spec.categories - 2;
    if !(own(SLOT_D_PRIME) && own(SLOT_CRITERION) && gaps.clone().all(own)) {
        return None;
    }
    match slots[SLOT_LN_SIGMA] {
        Slot::Fixed(_) => Some(Variance::Held),
        Slot::Theta(_) if own(SLOT_LN_SIGMA) => Some(Variance::Free),
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::cells::spec::{ConditionSpec, NaturalValues, Role};

    fn rule(a: &[f64], p: &[f64], v: Variance) -> Option<Degeneracy> {
        table_degeneracy(a, p, v)
    }

    #[test]
    fn each_reason_on_a_small_table() {
        use Degeneracy::*;
        use Variance::{Free, Held};
        let empty = rule(&[5.0, 0.0, 3.0], &[1.0, 0.0, 4.0], Free);
        assert_eq!(empty, Some(EmptyCategory { category: 1 }));
        // Yes/no: a rate of 0 or 1 is a separation, any other table is fine with σ held.
        let h_one = rule(&[8.0, 2.0], &[0.0, 10.0], Held);
        assert_eq!(h_one, Some(PresentAboveAbsent { at: 1 }));
        let f_zero = rule(&[8.0, 0.0], &[3.0, 7.0], Held);
        assert_eq!(f_zero, Some(PresentAboveAbsent { at: 0 }));
        let h_zero = rule(&[8.0, 2.0], &[10.0, 0.0], Held);
        assert_eq!(h_zero, Some(PresentBelowAbsent { at: 0 }));
        assert_eq!(rule(&[8.0, 2.0], &[3.0, 7.0], Held), None);
        assert_eq!(
            rule(&[8.0, 2.0], &[3.0, 7.0], Free),
            Some(SigmaWithTwoCategories)
        );
        // Present responses in two neighbouring categories: σ → 0 fits them exactly.
        let narrow = rule(&[4.0, 4.0, 4.0, 4.0], &[0.0, 5.0, 5.0, 0.0], Free);
        assert_eq!(
            narrow,
            Some(PresentNarrow {
                lowest: 1,
                highest: 2
            })
        );
        assert_eq!(
            rule(&[4.0, 4.0, 4.0, 4.0], &[0.0, 5.0, 5.0, 0.0], Held),
            None
        );
        // Absent responses in one category, present ones spread around it: σ → ∞.
        let gap = rule(&[0.0, 6.0, 0.0, 0.0], &[2.0, 3.0, 1.0, 4.0], Free);
        assert_eq!(
            gap,
            Some(AbsentNarrow {
                lowest: 1,
                highest: 1
            })
        );
        // Absent at both ends, present in the middle two: σ → 0 still fits exactly.
        let spread = rule(&[3.0, 0.0, 0.0, 3.0], &[0.0, 4.0, 4.0, 0.0], Free);
        assert_eq!(
            spread,
            Some(PresentNarrow {
                lowest: 1,
                highest: 2
            })
        );
        // Interleaved rows: no curve of the closure carries both, so the maximum is interior.
        let interleaved = rule(&[0.0, 4.0, 0.0, 4.0, 0.0], &[2.0, 0.0, 5.0, 0.0, 2.0], Free);
        assert_eq!(interleaved, None);
    }

    // Tables the previous rule ("two criteria with both cumulative rates strictly inside
    // (0, 1)") refused although their maximum is interior; the first is the example of a
    // finite maximum μ ≈ 2.12, σ ≈ 0.95 (checked against SciPy in the golden rating file).
    #[test]
    fn interior_maxima_with_one_interior_criterion_are_kept() {
        for (a, p) in [
            (
                [9.0, 6.0, 5.0, 4.0, 0.0].as_slice(),
                [0.0, 0.0, 3.0, 5.0, 8.0].as_slice(),
            ),
            (&[3.0, 3.0, 3.0, 0.0], &[0.0, 3.0, 3.0, 3.0]),
        ] {
            assert_eq!(rule(a, p, Variance::Free), None, "{a:?} {p:?}");
            assert_eq!(rule(a, p, Variance::Held), None, "{a:?} {p:?}");
        }
        // Perfect separation stays degenerate.
        assert!(rule(&[5.0, 5.0, 0.0, 0.0], &[0.0, 0.0, 5.0, 5.0], Variance::Free).is_some());
    }

    fn rating_model(shared_sigma: bool) -> ObservationModel {
        let values = NaturalValues {
            d_prime: 1.0,
            criterion: 0.0,
            sigma: 1.0,
            gaps: vec![0.5, 0.5],
            base_rate: 0.5,
        };
        let rec = Record::Full {
            present: 10,
            absent: 10,
        };
        let mut a = ConditionSpec::rating("a", 2, rec, values.clone());
        let mut b = ConditionSpec::rating("b", 2, rec, values);
        if shared_sigma {
            a.roles.sigma = Role::Shared;
            b.roles.sigma = Role::Shared;
        }
        ObservationModel::new(vec![a, b]).unwrap()
    }

    #[test]
    fn the_model_rule_covers_only_conditions_with_their_own_parameters() {
        let fine = vec![1.0, 3.0, 3.0, 3.0];
        let narrow = vec![0.0, 5.0, 5.0, 0.0];
        let absent = vec![4.0, 4.0, 4.0, 4.0];
        // Blocks per condition: present, then absent.
        let cells = vec![fine.clone(), absent.clone(), narrow, absent];
        let separate = rating_model(false);
        assert_eq!(
            model_degeneracy(&separate, &cells),
            Some((
                1,
                Degeneracy::PresentNarrow {
                    lowest: 1,
                    highest: 2
                }
            ))
        );
        // With σ shared, condition b's σ is pinned by condition a: no verdict from the rule.
        assert_eq!(model_degeneracy(&rating_model(true), &cells), None);
        let mut fixed = rating_model(false).conditions().to_vec();
        fixed[1].roles.criterion = Role::Fixed;
        let fixed = ObservationModel::new(fixed).unwrap();
        assert_eq!(model_degeneracy(&fixed, &cells), None);
    }
}
