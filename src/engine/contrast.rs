//! A hypothesis as the engine tests it: which θ entries it reads, its null value, and the
//! restricted model of its likelihood-ratio test. The power layer builds these from the
//! plan's hypotheses; the engine only evaluates them on fitted datasets.

use crate::cells::spec::ConditionSpec;
use crate::design::goals::TestKind;
use crate::vocab::Sided;
use nalgebra::DMatrix;

/// How a hypothesis reads θ.
#[derive(Debug, Clone, PartialEq)]
pub struct Contrast {
    pub name: String,
    pub kind: TestKind,
    pub sided: Sided,
    /// θ index of the tested entry (minus `minus`, when set).
    pub plus: usize,
    pub minus: Option<usize>,
    /// Null value of the contrast on θ's scale.
    pub null: f64,
    /// True value of the contrast under the plan's hypothesised observer.
    pub truth: f64,
    /// The model with the null imposed (one parameter fewer).
    pub restricted: Vec<ConditionSpec>,
}

impl Contrast {
    /// Whether the truth sits on the null (its rejection rate is then the type-I error).
    pub fn null_is_true(&self) -> bool {
        (self.truth - self.null).abs() < 1e-9
    }

    /// Estimate of the contrast and its SE from θ̂ and the covariance of θ̂.
    pub fn wald(&self, theta: &[f64], covariance: &DMatrix<f64>) -> (f64, f64) {
        let (a, est) = (self.plus, theta[self.plus]);
        match self.minus {
            None => (est, covariance[(a, a)].max(0.0).sqrt()),
            Some(b) => {
                let var = covariance[(a, a)] + covariance[(b, b)] - 2.0 * covariance[(a, b)];
                (est - theta[b], var.max(0.0).sqrt())
            }
        }
    }
}
