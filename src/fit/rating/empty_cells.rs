//! Empty cells: the named corrections a plan may choose, and the rule that says when a table
//! (corrected or not) has no finite maximum-likelihood estimate.
//!
//! An empty cell is harmless in itself, but some patterns of empty cells push the
//! likelihood's maximum to infinity (a criterion at ±∞, two criteria merging, a zROC line
//! with no finite points). Rather than let the solver wander off, such tables are named as
//! degenerate before fitting, and the report counts them.

use super::table::{RatingTable, Row};
use crate::fit::correction::RowTooSmall;
use crate::vocab::RateCorrection;

/// Why a correction could not be applied to a table.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
#[error("the {row} row: {source}")]
pub struct CorrectionError {
    pub row: Row,
    pub source: RowTooSmall,
}

/// Applies the plan's correction (see [`RateCorrection::apply_to_row`]) to both rows and
/// returns the corrected table. Log-linear adds ½ to every cell of both rows, empty or not:
/// Hautus (1995) proposed it for yes/no tables; applying it to every cell of a rating table
/// is our extension, always applied, as in the yes/no rule. Half-n gives every empty cell
/// half a count from the largest cell of its row; with K = 2 it is the 1/(2N) rule of
/// Macmillan & Kaplan (1985).
pub fn apply_correction(
    table: &RatingTable,
    correction: RateCorrection,
) -> Result<RatingTable, CorrectionError> {
    let mut out = *table;
    let (absent, present) = out.rows_mut();
    correction
        .apply_to_row(absent)
        .map_err(|source| CorrectionError {
            row: Row::Absent,
            source,
        })?;
    correction
        .apply_to_row(present)
        .map_err(|source| CorrectionError {
            row: Row::Present,
            source,
        })?;
    Ok(out)
}

/// Why a table has no finite maximum-likelihood estimate.
#[derive(Debug, Clone, Copy, PartialEq, Eq, thiserror::Error)]
pub enum DegenerateReason {
    /// No response at all in this category (0 in both rows): the likelihood grows as the two
    /// criteria around it merge (or, for an end category, as its criterion goes to ±∞), so
    /// the maximum lies on the edge of the parameter space.
    #[error("category {category} is empty in both rows")]
    EmptyCategory { category: usize },
    /// Too few criteria where both cumulative rates lie strictly between 0 and 1. Only such a
    /// criterion gives a finite point (z(F_j), z(H_j)) on the zROC; the model's zROC is a
    /// line, and a line is pinned down by two finite points (one when the slope is fixed at
    /// 1 by σ = 1). With fewer, the likelihood keeps rising along a ray on which μ, σ or a
    /// criterion runs off to infinity.
    #[error(
        "only {interior} criteria have both cumulative rates strictly between 0 and 1; {needed} needed"
    )]
    TooFewInteriorCriteria { interior: usize, needed: usize },
}

/// Says whether a (possibly corrected) table is degenerate under the model with σ free
/// (`fix_sigma = false`) or σ = 1 (`fix_sigma = true`); `None` means it may be fitted.
///
/// The rule: degenerate when a category column is empty in both rows, or when fewer than 2
/// criteria (1 when σ is fixed) have both cumulative rates F_j = P(response ≥ j | absent)
/// and H_j = P(response ≥ j | present) strictly between 0 and 1. With K = 2 and σ free the
/// table is always degenerate: one zROC point cannot fix both μ and σ. The rule is a cheap
/// necessary condition for a finite estimate; rarer separation patterns that pass it show up
/// as solver failures, never as converged fits.
pub fn degeneracy(table: &RatingTable, fix_sigma: bool) -> Option<DegenerateReason> {
    let (absent, present) = (table.absent(), table.present());
    if let Some(category) = (0..table.categories()).find(|&j| absent[j] == 0.0 && present[j] == 0.0)
    {
        return Some(DegenerateReason::EmptyCategory { category });
    }
    // Criterion j (1-based) is interior for a row when the row has counts both below and at
    // or above category j; running sums from the bottom give "below" for every j at once.
    let (total_a, total_p) = (table.absent_total(), table.present_total());
    let (mut below_a, mut below_p) = (0.0, 0.0);
    let mut interior = 0;
    for j in 1..table.categories() {
        below_a += absent[j - 1];
        below_p += present[j - 1];
        if below_a > 0.0 && below_a < total_a && below_p > 0.0 && below_p < total_p {
            interior += 1;
        }
    }
    let needed = if fix_sigma { 1 } else { 2 };
    (interior < needed).then_some(DegenerateReason::TooFewInteriorCriteria { interior, needed })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table(a: &[f64], p: &[f64]) -> RatingTable {
        RatingTable::new(a, p).unwrap()
    }

    #[test]
    fn log_linear_adds_half_everywhere() {
        let t = apply_correction(
            &table(&[0.0, 3.0, 7.0], &[2.0, 0.0, 8.0]),
            RateCorrection::LogLinear,
        )
        .unwrap();
        assert_eq!(t.absent(), &[0.5, 3.5, 7.5]);
        assert_eq!(t.present(), &[2.5, 0.5, 8.5]);
    }

    #[test]
    fn half_count_keeps_row_totals() {
        let raw = table(&[0.0, 3.0, 7.0, 0.0], &[2.0, 5.0, 6.0, 1.0]);
        let t = apply_correction(&raw, RateCorrection::HalfN).unwrap();
        assert_eq!(t.absent(), &[0.5, 3.0, 6.0, 0.5]);
        assert_eq!(t.present(), raw.present());
        assert_eq!(t.absent_total(), raw.absent_total());
    }

    // With K = 2 the half-count rule is the 1/(2N) rule (Macmillan & Kaplan 1985; common
    // practice): 50/50 hits becomes H = 1 − 1/100, 0/40 false alarms becomes F = 1/80 = 0.0125
    // (the N = 40 example in references.md).
    #[test]
    fn half_count_with_two_categories_is_the_one_over_2n_rule() {
        let t =
            apply_correction(&table(&[40.0, 0.0], &[0.0, 50.0]), RateCorrection::HalfN).unwrap();
        assert_eq!(t.absent()[1] / t.absent_total(), 0.0125);
        assert_eq!(t.present()[1] / t.present_total(), 1.0 - 1.0 / 100.0);
    }

    #[test]
    fn half_count_refuses_rows_too_small() {
        let raw = table(&[1.0, 0.0, 0.0, 0.0], &[1.0, 1.0, 1.0, 1.0]);
        assert_eq!(
            apply_correction(&raw, RateCorrection::HalfN),
            Err(CorrectionError {
                row: Row::Absent,
                source: RowTooSmall { empty: 3 }
            })
        );
        // One trial, two categories: (0, 1) becomes (0.5, 0.5).
        let t = apply_correction(&table(&[0.0, 1.0], &[1.0, 1.0]), RateCorrection::HalfN).unwrap();
        assert_eq!(t.absent(), &[0.5, 0.5]);
    }

    #[test]
    fn none_changes_nothing() {
        let raw = table(&[0.0, 3.0], &[2.0, 0.0]);
        assert_eq!(apply_correction(&raw, RateCorrection::None).unwrap(), raw);
    }

    #[test]
    fn empty_column_is_degenerate() {
        let t = table(&[5.0, 0.0, 3.0, 2.0], &[1.0, 0.0, 4.0, 5.0]);
        assert_eq!(
            degeneracy(&t, false),
            Some(DegenerateReason::EmptyCategory { category: 1 })
        );
        assert_eq!(
            degeneracy(&t, true),
            Some(DegenerateReason::EmptyCategory { category: 1 })
        );
    }

    #[test]
    fn counts_interior_criteria() {
        // Yes/no with H = 1: no interior criterion.
        let t = table(&[8.0, 2.0], &[0.0, 10.0]);
        assert_eq!(
            degeneracy(&t, true),
            Some(DegenerateReason::TooFewInteriorCriteria {
                interior: 0,
                needed: 1
            })
        );
        // Yes/no with both rates interior: fine with σ fixed, never with σ free.
        let t = table(&[8.0, 2.0], &[3.0, 7.0]);
        assert_eq!(degeneracy(&t, true), None);
        assert_eq!(
            degeneracy(&t, false),
            Some(DegenerateReason::TooFewInteriorCriteria {
                interior: 1,
                needed: 2
            })
        );
        // Perfect separation in a four-category table: no criterion is interior in both rows.
        let t = table(&[5.0, 5.0, 0.0, 0.0], &[0.0, 0.0, 5.0, 5.0]);
        assert!(matches!(
            degeneracy(&t, true),
            Some(DegenerateReason::TooFewInteriorCriteria { interior: 0, .. })
        ));
        // Only the middle criterion is interior: enough for σ = 1, not for σ free.
        let t = table(&[3.0, 3.0, 3.0, 0.0], &[0.0, 3.0, 3.0, 3.0]);
        assert_eq!(degeneracy(&t, true), None);
        assert!(degeneracy(&t, false).is_some());
        let t = table(&[4.0, 3.0, 2.0, 1.0], &[1.0, 2.0, 3.0, 4.0]);
        assert_eq!(degeneracy(&t, false), None);
    }

    #[test]
    fn corrected_tables_are_never_degenerate() {
        let raw = table(&[5.0, 5.0, 0.0, 0.0], &[0.0, 0.0, 5.0, 5.0]);
        for c in [RateCorrection::LogLinear, RateCorrection::HalfN] {
            let t = apply_correction(&raw, c).unwrap();
            assert_eq!(degeneracy(&t, false), None, "{c:?}");
        }
    }
}
