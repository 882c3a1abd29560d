//! The observed count table of a rating design: one row of absent-trial counts, one row of
//! present-trial counts, K ordered response categories.
//!
//! Counts are `f64` so corrected tables (half counts) are tables like any other. The
//! constructor checks everything once; the fitter trusts a `RatingTable` without re-checking.

use super::MAX_CATEGORIES;

/// Why a count table was rejected.
#[derive(Debug, Clone, Copy, PartialEq, thiserror::Error)]
pub enum TableError {
    /// K must lie in 2..=12.
    #[error("a rating table needs 2 to {max} response categories, got {got}")]
    CategoryCount { got: usize, max: usize },
    /// Both rows must have one count per category.
    #[error("the absent row has {absent} categories but the present row has {present}")]
    RowLengths { absent: usize, present: usize },
    /// Counts must be finite and non-negative.
    #[error(
        "count {value} in the {row} row, category {category}, is not a finite non-negative number"
    )]
    BadCount {
        row: Row,
        category: usize,
        value: f64,
    },
    /// Each row needs at least one trial (a positive total).
    #[error("the {row} row has no trials")]
    EmptyRow { row: Row },
}

/// Names a row of the table (stimulus class).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Row {
    /// Trials without the stimulus (noise alone).
    Absent,
    /// Trials with the stimulus.
    Present,
}

impl std::fmt::Display for Row {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Row::Absent => "absent",
            Row::Present => "present",
        })
    }
}

/// Counts of responses per category for absent and present trials.
///
/// Category 0 is the most confident "absent" response, K − 1 the most confident "present".
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingTable {
    absent: [f64; MAX_CATEGORIES],
    present: [f64; MAX_CATEGORIES],
    categories: usize,
}

impl RatingTable {
    /// Builds a table from the two rows; checks 2 ≤ K ≤ 12, equal lengths, finite
    /// non-negative counts and at least one trial in each row.
    pub fn new(absent: &[f64], present: &[f64]) -> Result<Self, TableError> {
        if absent.len() != present.len() {
            return Err(TableError::RowLengths {
                absent: absent.len(),
                present: present.len(),
            });
        }
        let categories = absent.len();
        if !(2..=MAX_CATEGORIES).contains(&categories) {
            return Err(TableError::CategoryCount {
                got: categories,
                max: MAX_CATEGORIES,
            });
        }
        let mut table = RatingTable {
            absent: [0.0; MAX_CATEGORIES],
            present: [0.0; MAX_CATEGORIES],
            categories,
        };
        for (row, values, target) in [
            (Row::Absent, absent, &mut table.absent),
            (Row::Present, present, &mut table.present),
        ] {
            for (category, (&value, slot)) in values.iter().zip(target.iter_mut()).enumerate() {
                if !value.is_finite() || value < 0.0 {
                    return Err(TableError::BadCount {
                        row,
                        category,
                        value,
                    });
                }
                *slot = value;
            }
            if values.iter().sum::<f64>() <= 0.0 {
                return Err(TableError::EmptyRow { row });
            }
        }
        Ok(table)
    }

    /// Number of response categories K.
    #[inline]
    pub fn categories(&self) -> usize {
        self.categories
    }

    /// Counts on absent trials, category 0 first.
    #[inline]
    pub fn absent(&self) -> &[f64] {
        &self.absent[..self.categories]
    }

    /// Counts on present trials, category 0 first.
    #[inline]
    pub fn present(&self) -> &[f64] {
        &self.present[..self.categories]
    }

    /// The counts of one row.
    #[inline]
    pub fn row(&self, row: Row) -> &[f64] {
        match row {
            Row::Absent => self.absent(),
            Row::Present => self.present(),
        }
    }

    /// Total number of absent trials N_n.
    pub fn absent_total(&self) -> f64 {
        self.absent().iter().sum()
    }

    /// Total number of present trials N_s.
    pub fn present_total(&self) -> f64 {
        self.present().iter().sum()
    }

    /// Mutable rows for the corrections in this module's sibling; keeps the invariants
    /// because corrections only add or move non-negative amounts within a row.
    pub(super) fn rows_mut(&mut self) -> (&mut [f64], &mut [f64]) {
        let k = self.categories;
        (&mut self.absent[..k], &mut self.present[..k])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn accepts_a_valid_table() {
        let t = RatingTable::new(&[5.0, 3.0, 2.0], &[1.0, 2.5, 6.5]).unwrap();
        assert_eq!(t.categories(), 3);
        assert_eq!(t.absent(), &[5.0, 3.0, 2.0]);
        assert_eq!(t.present(), &[1.0, 2.5, 6.5]);
        assert_eq!(t.absent_total(), 10.0);
        assert_eq!(t.present_total(), 10.0);
    }

    #[test]
    fn rejects_bad_shapes() {
        assert!(matches!(
            RatingTable::new(&[1.0], &[1.0]),
            Err(TableError::CategoryCount { got: 1, .. })
        ));
        assert!(matches!(
            RatingTable::new(&[1.0; 13], &[1.0; 13]),
            Err(TableError::CategoryCount { got: 13, .. })
        ));
        assert!(matches!(
            RatingTable::new(&[1.0, 2.0], &[1.0, 2.0, 3.0]),
            Err(TableError::RowLengths { .. })
        ));
    }

    #[test]
    fn rejects_bad_counts() {
        assert!(matches!(
            RatingTable::new(&[1.0, -1.0], &[1.0, 2.0]),
            Err(TableError::BadCount {
                row: Row::Absent,
                category: 1,
                ..
            })
        ));
        assert!(matches!(
            RatingTable::new(&[1.0, 1.0], &[f64::NAN, 2.0]),
            Err(TableError::BadCount {
                row: Row::Present,
                category: 0,
                ..
            })
        ));
        assert!(matches!(
            RatingTable::new(&[1.0, f64::INFINITY], &[1.0, 2.0]),
            Err(TableError::BadCount { .. })
        ));
        assert!(matches!(
            RatingTable::new(&[1.0, 1.0], &[0.0, 0.0]),
            Err(TableError::EmptyRow { row: Row::Present })
        ));
    }
}
