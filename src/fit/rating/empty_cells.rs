//! Empty cells: the named corrections a plan may choose, and the rule that says when a table
//! (corrected or not) has no finite maximum-likelihood estimate.
//!
//! An empty cell is harmless in itself, but some patterns of empty cells push the
//! likelihood's maximum to the boundary of the parameter space (a criterion at ±∞, two
//! criteria merging, μ running off, σ → 0 or ∞). Rather than let the solver wander off, such
//! tables are named as degenerate before fitting, by the rule of `cells::degeneracy` that the
//! general fit uses too, and the report counts them.

use super::table::{RatingTable, Row};
use crate::cells::degeneracy::{Degeneracy, Variance, table_degeneracy};
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

/// Says whether a (possibly corrected) table is degenerate under the model with σ free
/// (`fix_sigma = false`) or σ = 1 (`fix_sigma = true`); `None` means a finite maximum exists
/// and the table may be fitted. This is the one rule every route shares, proved in
/// [`crate::cells::degeneracy`]: the table is degenerate exactly when the supremum of lnL
/// lies on the boundary of the parameter space.
pub fn degeneracy(table: &RatingTable, fix_sigma: bool) -> Option<Degeneracy> {
    let variance = if fix_sigma {
        Variance::Held
    } else {
        Variance::Free
    };
    table_degeneracy(table.absent(), table.present(), variance)
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
    // (the N = 40 example; the rule as stated by Macmillan & Kaplan 1985 [memory]).
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
    fn delegates_to_the_shared_rule() {
        let t = table(&[5.0, 0.0, 3.0, 2.0], &[1.0, 0.0, 4.0, 5.0]);
        let empty = Some(Degeneracy::EmptyCategory { category: 1 });
        assert_eq!(degeneracy(&t, false), empty);
        assert_eq!(degeneracy(&t, true), empty);
        // Yes/no with H = 1: separated, for σ held.
        let t = table(&[8.0, 2.0], &[0.0, 10.0]);
        assert_eq!(
            degeneracy(&t, true),
            Some(Degeneracy::PresentAboveAbsent { at: 1 })
        );
        // A table with an interior maximum although only one criterion has both cumulative
        // rates strictly between 0 and 1 (the rule before this one refused it).
        let t = table(&[9.0, 6.0, 5.0, 4.0, 0.0], &[0.0, 0.0, 3.0, 5.0, 8.0]);
        assert_eq!(degeneracy(&t, false), None);
        assert_eq!(degeneracy(&t, true), None);
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
