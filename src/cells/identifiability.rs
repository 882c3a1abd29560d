//! Is θ identified by a design? Read off the eigen-decomposition of the information matrix scaled
//! to unit diagonal, S = D⁻¹ I D⁻¹ with D = diag(√I_ii), so that parameters on different scales
//! compare fairly (a correlation-like matrix; common practice in collinearity diagnostics).
//!
//! rank = #{λ > RANK_TOLERANCE·λ_max}; condition number κ = λ_max/λ_min. If S v = 0 then
//! I (D⁻¹ v) = 0: moving θ along D⁻¹ v leaves every cell probability unchanged to first order,
//! so that combination of parameters cannot be separated by any amount of data.

use nalgebra::{DMatrix, DVector, SymmetricEigen};

use crate::cells::error::InputError;

/// Relative eigenvalue tolerance for rank: an eigenvalue of the unit-diagonal information below
/// this fraction of the largest counts as zero. Exact non-identification leaves eigenvalues at
/// rounding level (~1e-16), while real designs in this model stay far above 1e-10.
pub const RANK_TOLERANCE: f64 = 1e-10;
/// A full-rank design is weakly identified when κ of the unit-diagonal information exceeds this.
pub const WEAK_CONDITION_NUMBER: f64 = 1e6;
/// … or when any two estimates correlate more strongly than this (in absolute value).
pub const WEAK_CORRELATION: f64 = 0.95;
/// Null-direction coefficients below this (after scaling the largest to 1) are dropped.
pub const NULL_COEFFICIENT_CUTOFF: f64 = 0.01;

/// One combination of θ entries that the design cannot separate.
#[derive(Debug, Clone, PartialEq)]
pub struct NullDirection {
    /// (θ name, coefficient), largest coefficient = 1, tiny ones dropped.
    pub coefficients: Vec<(String, f64)>,
}

impl std::fmt::Display for NullDirection {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        for (i, (name, c)) in self.coefficients.iter().enumerate() {
            let sign = if *c < 0.0 { "−" } else { "+" };
            match (i, sign) {
                (0, "−") => write!(f, "−")?,
                (0, _) => {}
                _ => write!(f, " {sign} ")?,
            }
            if (c.abs() - 1.0).abs() < 0.005 {
                write!(f, "{name}")?;
            } else {
                write!(f, "{:.2}·{name}", c.abs())?;
            }
        }
        write!(f, " cannot be separated")
    }
}

/// Identification verdict of a design at θ.
#[derive(Debug, Clone, PartialEq)]
pub enum EigenVerdict {
    Identified,
    Weak {
        condition_number: f64,
        max_abs_corr: f64,
    },
    NotIdentified {
        deficiency: usize,
        null_directions: Vec<NullDirection>,
    },
}

/// Full report of the eigen-analysis.
#[derive(Debug, Clone, PartialEq)]
pub struct Identifiability {
    pub dim: usize,
    pub rank: usize,
    /// Eigenvalues of the unit-diagonal information, ascending.
    pub eigenvalues: Vec<f64>,
    /// λ_max/λ_min of the unit-diagonal information (∞ when singular).
    pub condition_number: f64,
    /// Largest |corr| between two estimates (NaN unless full rank; 0 with one parameter).
    pub max_abs_corr: f64,
    pub verdict: EigenVerdict,
}

/// Scale factors D and the eigen-decomposition of D⁻¹ I D⁻¹ (eigenvalues ascending).
pub(crate) struct ScaledEigen {
    scale: DVector<f64>,
    values: Vec<f64>,
    vectors: DMatrix<f64>,
}

pub(crate) fn scaled_eigen(info: &DMatrix<f64>) -> Option<ScaledEigen> {
    if info.iter().any(|x| !x.is_finite()) || info.nrows() != info.ncols() {
        return None;
    }
    let n = info.nrows();
    // A zero diagonal means the parameter touches nothing: keep scale 1 so it shows up as a
    // zero eigenvalue along its own axis.
    let scale = DVector::from_fn(n, |i, _| {
        let d = info[(i, i)];
        if d > 0.0 { d.sqrt() } else { 1.0 }
    });
    let s = DMatrix::from_fn(n, n, |i, j| {
        let v = 0.5 * (info[(i, j)] + info[(j, i)]);
        v / (scale[i] * scale[j])
    });
    let eig = SymmetricEigen::try_new(s, f64::EPSILON, 10_000)?;
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| eig.eigenvalues[a].total_cmp(&eig.eigenvalues[b]));
    let values = order.iter().map(|&i| eig.eigenvalues[i]).collect();
    let vectors = DMatrix::from_fn(n, n, |r, c| eig.eigenvectors[(r, order[c])]);
    Some(ScaledEigen {
        scale,
        values,
        vectors,
    })
}

impl ScaledEigen {
    /// Smallest eigenvalue of the unit-diagonal matrix (0 for an empty matrix).
    pub(crate) fn smallest(&self) -> f64 {
        self.values.first().copied().unwrap_or(0.0)
    }

    /// Largest eigenvalue of the unit-diagonal matrix (0 for an empty matrix).
    pub(crate) fn largest(&self) -> f64 {
        self.values.last().copied().unwrap_or(0.0)
    }

    fn rank(&self) -> usize {
        let max = self.values.last().copied().unwrap_or(0.0);
        self.values
            .iter()
            .filter(|&&v| max > 0.0 && v > RANK_TOLERANCE * max)
            .count()
    }

    /// (S⁻¹ from the eigen-decomposition, then D⁻¹ S⁻¹ D⁻¹) when full rank.
    fn inverse(&self) -> Option<(DMatrix<f64>, DMatrix<f64>)> {
        let n = self.values.len();
        if self.rank() < n {
            return None;
        }
        let inv_values = DVector::from_iterator(n, self.values.iter().map(|v| 1.0 / v));
        let s_inv = &self.vectors * DMatrix::from_diagonal(&inv_values) * self.vectors.transpose();
        let cov = DMatrix::from_fn(n, n, |i, j| s_inv[(i, j)] / (self.scale[i] * self.scale[j]));
        Some((s_inv, cov))
    }
}

/// I⁻¹ when the information has full rank at [`RANK_TOLERANCE`]; `None` otherwise.
pub(crate) fn scaled_inverse(info: &DMatrix<f64>) -> Option<DMatrix<f64>> {
    scaled_eigen(info)?.inverse().map(|(_, cov)| cov)
}

fn null_direction(eig: &ScaledEigen, column: usize, names: &[String]) -> NullDirection {
    let v = eig.vectors.column(column);
    let raw: Vec<f64> = (0..v.len()).map(|i| v[i] / eig.scale[i]).collect();
    let (big, _) =
        raw.iter().enumerate().fold(
            (0, 0.0),
            |acc, (i, x)| if x.abs() > acc.1 { (i, x.abs()) } else { acc },
        );
    let norm = raw[big];
    let mut coefficients: Vec<(String, f64)> = raw
        .iter()
        .zip(names)
        .map(|(x, n)| (n.clone(), x / norm))
        .filter(|(_, c)| c.abs() >= NULL_COEFFICIENT_CUTOFF)
        .collect();
    coefficients.sort_by(|a, b| b.1.abs().total_cmp(&a.1.abs()));
    NullDirection { coefficients }
}

/// Rank, condition number, correlations and the verdict for an information matrix whose rows
/// and columns are named by `names` (θ names).
pub fn assess(info: &DMatrix<f64>, names: &[String]) -> Result<Identifiability, InputError> {
    if info.nrows() != names.len() || info.ncols() != names.len() {
        return Err(InputError::InformationShape {
            rows: info.nrows(),
            cols: info.ncols(),
            names: names.len(),
        });
    }
    let eig = scaled_eigen(info).ok_or(InputError::InformationNotFinite)?;
    let dim = names.len();
    let rank = eig.rank();
    let (min, max) = match (eig.values.first(), eig.values.last()) {
        (Some(&a), Some(&b)) => (a, b),
        _ => (1.0, 1.0),
    };
    let condition_number = if min > 0.0 { max / min } else { f64::INFINITY };
    let (max_abs_corr, verdict) = match eig.inverse() {
        None => {
            let null_directions = (0..dim - rank)
                .map(|c| null_direction(&eig, c, names))
                .collect();
            let verdict = EigenVerdict::NotIdentified {
                deficiency: dim - rank,
                null_directions,
            };
            (f64::NAN, verdict)
        }
        Some((s_inv, _)) => {
            let mut corr: f64 = 0.0;
            for i in 0..dim {
                for j in 0..i {
                    let r = s_inv[(i, j)] / (s_inv[(i, i)] * s_inv[(j, j)]).sqrt();
                    corr = corr.max(r.abs());
                }
            }
            let verdict = if condition_number > WEAK_CONDITION_NUMBER || corr > WEAK_CORRELATION {
                EigenVerdict::Weak {
                    condition_number,
                    max_abs_corr: corr,
                }
            } else {
                EigenVerdict::Identified
            };
            (corr, verdict)
        }
    };
    Ok(Identifiability {
        dim,
        rank,
        eigenvalues: eig.values.clone(),
        condition_number,
        max_abs_corr,
        verdict,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(n: &[&str]) -> Vec<String> {
        n.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn rank_one_matrix_names_its_null_direction() {
        // I = g gᵀ with g = (2, −1): null direction ∝ (1, 2) → "0.50·a + b".
        let info = DMatrix::from_row_slice(2, 2, &[4.0, -2.0, -2.0, 1.0]);
        let id = assess(&info, &names(&["a", "b"])).unwrap();
        let EigenVerdict::NotIdentified {
            deficiency,
            null_directions,
        } = &id.verdict
        else {
            panic!("{:?}", id.verdict)
        };
        assert_eq!(*deficiency, 1);
        assert_eq!(
            null_directions[0].to_string(),
            "b + 0.50·a cannot be separated"
        );
    }

    #[test]
    fn strong_correlation_is_weak() {
        let info = DMatrix::from_row_slice(2, 2, &[1.0, 0.99, 0.99, 1.0]);
        let id = assess(&info, &names(&["a", "b"])).unwrap();
        assert!(matches!(id.verdict, EigenVerdict::Weak { .. }));
        assert!((id.max_abs_corr - 0.99).abs() < 1e-9);
        let diag = DMatrix::from_diagonal(&DVector::from_vec(vec![3.0, 0.5]));
        let id = assess(&diag, &names(&["a", "b"])).unwrap();
        assert_eq!(id.verdict, EigenVerdict::Identified);
        assert!((id.condition_number - 1.0).abs() < 1e-12);
    }

    #[test]
    fn bad_input_is_an_error_not_a_panic() {
        let info = DMatrix::from_row_slice(1, 1, &[f64::NAN]);
        assert!(assess(&info, &names(&["a"])).is_err());
        assert!(assess(&info, &names(&["a", "b"])).is_err());
    }
}
