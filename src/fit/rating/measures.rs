//! Derived measures of a rating fit and their delta-method standard errors.
//!
//! Every measure is a function of (μ, σ, k_b) only, where b is the yes/no boundary ("present"
//! = categories ≥ b). Its variance is ∇fᵀ·Σ·∇f with Σ the fit's covariance of (μ, σ, k_b)
//! (delta method; common practice).

use crate::model::normal;

use super::fit::{FitStatus, Param, RatingFit};

/// An estimate with its asymptotic standard error.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    pub value: f64,
    /// Delta-method SE; 0 for σ and the slope when σ is held fixed (they are not estimated).
    pub se: f64,
}

/// Measures of sensitivity and bias from a rating fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatingMeasures {
    /// d′ = μ: distance between the means in absent-SD units.
    pub d_prime: Estimate,
    /// σ, the SD of the present distribution.
    pub sigma: Estimate,
    /// zROC slope 1/σ.
    pub slope: Estimate,
    /// d_a = μ/√((1 + σ²)/2) (Simpson & Fitter 1973, *Psychol. Bull.* 80:481–488).
    pub d_a: Estimate,
    /// A_z = Φ(d_a/√2) = Φ(μ/√(1 + σ²)), the area under the ROC.
    pub a_z: Estimate,
    /// c = k_b − μ/2: the boundary criterion measured from the midpoint between the means,
    /// in absent-SD units; positive = conservative.
    pub c: Estimate,
    /// corr(d̂′, ĉ) = [Cov(μ, k_b) − Var(μ)/2]/(SE(d′)·SE(c)).
    pub corr_d_prime_c: f64,
    /// The boundary b used for c.
    pub boundary: usize,
}

/// Why measures could not be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, thiserror::Error)]
pub enum MeasureError {
    /// b must lie in 1..=K−1.
    #[error("boundary {boundary} is outside 1..={max}")]
    BoundaryOutOfRange { boundary: usize, max: usize },
    /// The fit did not converge; its numbers are not estimates.
    #[error("the fit did not converge ({0:?})")]
    NotConverged(FitStatus),
    /// The observed information at the estimate is not positive definite.
    #[error("the covariance of the estimates is not positive definite")]
    NoCovariance,
}

/// d′, σ, slope, d_a, A_z and c with delta-method SEs, and corr(d̂′, ĉ), for a converged fit
/// whose covariance exists; `boundary` b splits "absent" (categories < b) from "present".
pub fn measures(fit: &RatingFit, boundary: usize) -> Result<RatingMeasures, MeasureError> {
    let k = fit.params().categories();
    if !(1..k).contains(&boundary) {
        return Err(MeasureError::BoundaryOutOfRange {
            boundary,
            max: k - 1,
        });
    }
    if fit.status != FitStatus::Converged {
        return Err(MeasureError::NotConverged(fit.status));
    }
    let cov = fit.covariance().ok_or(MeasureError::NoCovariance)?;
    let kb = Param::Criterion(boundary);
    // Covariance of (μ, σ, k_b); σ's row and column are 0 when σ is fixed.
    let pars = [Param::Mu, Param::Sigma, kb];
    let mut s = [[0.0; 3]; 3];
    for (a, &pa) in pars.iter().enumerate() {
        for (b, &pb) in pars.iter().enumerate() {
            s[a][b] = cov.get(pa, pb).unwrap_or(0.0);
        }
    }
    let se = |grad: [f64; 3]| -> Result<f64, MeasureError> {
        let mut v = 0.0;
        for a in 0..3 {
            for b in 0..3 {
                v += grad[a] * s[a][b] * grad[b];
            }
        }
        // A positive-definite covariance gives v > 0 for a non-zero gradient; v = 0 only
        // for σ-only measures with σ fixed.
        if v >= 0.0 && v.is_finite() {
            Ok(v.sqrt())
        } else {
            Err(MeasureError::NoCovariance)
        }
    };

    let (mu, sigma, k_b) = (fit.mu(), fit.sigma(), fit.criteria()[boundary - 1]);
    let q = 1.0 + sigma * sigma;
    let root_q = q.sqrt();
    // d_a = √2·μ/√q; A_z = Φ(t) with t = μ/√q.
    let d_a = std::f64::consts::SQRT_2 * mu / root_q;
    let t = mu / root_q;
    let dt_dmu = 1.0 / root_q;
    let dt_dsigma = -mu * sigma / (q * root_q);
    let phi_t = normal::pdf(t);
    let c = k_b - 0.5 * mu;

    let d_prime = Estimate {
        value: mu,
        se: se([1.0, 0.0, 0.0])?,
    };
    let c_est = Estimate {
        value: c,
        se: se([-0.5, 0.0, 1.0])?,
    };
    let cov_d_c = s[0][2] - 0.5 * s[0][0];
    Ok(RatingMeasures {
        d_prime,
        sigma: Estimate {
            value: sigma,
            se: se([0.0, 1.0, 0.0])?,
        },
        slope: Estimate {
            value: 1.0 / sigma,
            se: se([0.0, -1.0 / (sigma * sigma), 0.0])?,
        },
        d_a: Estimate {
            value: d_a,
            se: se([
                std::f64::consts::SQRT_2 * dt_dmu,
                std::f64::consts::SQRT_2 * dt_dsigma,
                0.0,
            ])?,
        },
        a_z: Estimate {
            value: normal::cdf(t),
            se: se([phi_t * dt_dmu, phi_t * dt_dsigma, 0.0])?,
        },
        c: c_est,
        corr_d_prime_c: cov_d_c / (d_prime.se * c_est.se),
        boundary,
    })
}

#[cfg(test)]
mod tests {
    use super::super::{RatingFitOptions, RatingTable, fit};
    use super::*;

    fn table() -> RatingTable {
        RatingTable::new(&[14.0, 12.0, 9.0, 10.0, 5.0], &[3.0, 6.0, 8.0, 13.0, 20.0]).unwrap()
    }

    /// Measures as plain functions of (μ, σ, k_b): d′, σ, slope, d_a, A_z, c.
    fn values(mu: f64, sigma: f64, kb: f64) -> [f64; 6] {
        let d_a = mu / ((1.0 + sigma * sigma) / 2.0).sqrt();
        [
            mu,
            sigma,
            1.0 / sigma,
            d_a,
            normal::cdf(d_a / std::f64::consts::SQRT_2),
            kb - mu / 2.0,
        ]
    }

    // The delta-method SEs equal ∇fᵀΣ∇f with ∇f from central differences of the definitions
    // (d_a of Simpson & Fitter 1973, A_z = Φ(d_a/√2)).
    #[test]
    fn standard_errors_follow_the_delta_method() {
        let f = fit(&table(), &RatingFitOptions::default()).unwrap();
        let cov = f.covariance().unwrap();
        for b in 1..=4 {
            let m = measures(&f, b).unwrap();
            let kb = f.criteria()[b - 1];
            let at = [f.mu(), f.sigma(), kb];
            let base = values(at[0], at[1], at[2]);
            assert_eq!(
                [m.d_prime.value, m.sigma.value, m.slope.value],
                [base[0], base[1], base[2]]
            );
            assert!((m.d_a.value - base[3]).abs() < 1e-14);
            assert!((m.a_z.value - base[4]).abs() < 1e-14);
            assert!((m.c.value - base[5]).abs() < 1e-14);
            let pars = [Param::Mu, Param::Sigma, Param::Criterion(b)];
            let h = 1e-6;
            let mut grads = [[0.0; 3]; 6];
            for i in 0..3 {
                let (mut up, mut down) = (at, at);
                up[i] += h;
                down[i] -= h;
                let (u, d) = (
                    values(up[0], up[1], up[2]),
                    values(down[0], down[1], down[2]),
                );
                for (row, (u, d)) in grads.iter_mut().zip(u.iter().zip(d)) {
                    row[i] = (u - d) / (2.0 * h);
                }
            }
            let ses = [
                m.d_prime.se,
                m.sigma.se,
                m.slope.se,
                m.d_a.se,
                m.a_z.se,
                m.c.se,
            ];
            for (grad, se) in grads.iter().zip(ses) {
                let mut v = 0.0;
                for a in 0..3 {
                    for c in 0..3 {
                        v += grad[a] * cov.get(pars[a], pars[c]).unwrap() * grad[c];
                    }
                }
                assert!(
                    (v.sqrt() - se).abs() < 1e-7 * (1.0 + se),
                    "{} vs {se}",
                    v.sqrt()
                );
            }
            let cov_dc = cov.get(Param::Mu, Param::Criterion(b)).unwrap()
                - 0.5 * cov.get(Param::Mu, Param::Mu).unwrap();
            let corr = cov_dc / (m.d_prime.se * m.c.se);
            assert!((m.corr_d_prime_c - corr).abs() < 1e-12);
            assert!(m.corr_d_prime_c.abs() <= 1.0);
        }
    }

    #[test]
    fn fixed_sigma_has_no_sigma_uncertainty() {
        let options = RatingFitOptions {
            fix_sigma: true,
            ..RatingFitOptions::default()
        };
        let m = measures(&fit(&table(), &options).unwrap(), 2).unwrap();
        assert_eq!((m.sigma.value, m.sigma.se), (1.0, 0.0));
        assert_eq!((m.slope.value, m.slope.se), (1.0, 0.0));
        // With σ = 1, d_a = d′ (Simpson & Fitter 1973) and A_z = Φ(d′/√2).
        assert!((m.d_a.value - m.d_prime.value).abs() < 1e-14);
        assert!((m.d_a.se - m.d_prime.se).abs() < 1e-14);
        let az = normal::cdf(m.d_prime.value / std::f64::consts::SQRT_2);
        assert!((m.a_z.value - az).abs() < 1e-15);
    }

    #[test]
    fn boundary_must_be_a_criterion() {
        let f = fit(&table(), &RatingFitOptions::default()).unwrap();
        assert_eq!(
            measures(&f, 0),
            Err(MeasureError::BoundaryOutOfRange {
                boundary: 0,
                max: 4
            })
        );
        assert!(measures(&f, 5).is_err());
        assert!(measures(&f, 4).is_ok());
    }
}
