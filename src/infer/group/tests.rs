//! Checks of the group t tests. Reference p-values come from closed forms of Student's
//! t CDF for 1 and 2 degrees of freedom (independent of statrs' incomplete beta):
//! ν = 1: F(t) = ½ + atan(t)/π; ν = 2: F(t) = ½ + t/(2√(2 + t²)) (common practice;
//! e.g. Johnson, Kotz & Balakrishnan, *Continuous Univariate Distributions* vol. 2).

use super::*;
use std::f64::consts::PI;

fn t_cdf_1(t: f64) -> f64 {
    0.5 + t.atan() / PI
}

fn t_cdf_2(t: f64) -> f64 {
    0.5 + t / (2.0 * (2.0 + t * t).sqrt())
}

#[test]
fn one_sample_against_closed_form_df2() {
    // 2, 4, 9 against 1: mean 5, s² = 13, SE = √(13/3), df = 2 (hand computation).
    let t_hand = 4.0 / (13.0f64 / 3.0).sqrt();
    let two = one_sample_t(&[2.0, 4.0, 9.0], 1.0, Sided::TwoSided, 0.05).unwrap();
    assert!((two.statistic - t_hand).abs() < 1e-12);
    assert_eq!(two.df(), Some(2.0));
    assert!((two.p_value - 2.0 * (1.0 - t_cdf_2(t_hand))).abs() < 1e-10);
    assert!(!two.reject);
    let up = one_sample_t(&[2.0, 4.0, 9.0], 1.0, Sided::Greater, 0.1).unwrap();
    assert!((up.p_value - (1.0 - t_cdf_2(t_hand))).abs() < 1e-10);
    assert!(up.reject); // p ≈ 0.097
    let low = one_sample_t(&[2.0, 4.0, 9.0], 1.0, Sided::Less, 0.1).unwrap();
    assert!((low.p_value - t_cdf_2(t_hand)).abs() < 1e-10);
}

#[test]
fn paired_against_closed_form_df1() {
    // Differences 2 and 5: mean 3.5, s² = 4.5, SE = 1.5, t = 7/3, df = 1.
    let t_hand = 7.0 / 3.0;
    let two = paired_t(&[3.0, 7.0], &[1.0, 2.0], 0.0, Sided::TwoSided, 0.05).unwrap();
    assert!((two.statistic - t_hand).abs() < 1e-12);
    assert_eq!(two.df(), Some(1.0));
    assert!((two.p_value - 2.0 * (1.0 - t_cdf_1(t_hand))).abs() < 1e-10);
    let less = paired_t(&[3.0, 7.0], &[1.0, 2.0], 0.0, Sided::Less, 0.05).unwrap();
    assert!((less.p_value - t_cdf_1(t_hand)).abs() < 1e-10);
    // A null difference shifts the statistic: (3.5 − 2)/1.5 = 1.
    let shifted = paired_t(&[3.0, 7.0], &[1.0, 2.0], 2.0, Sided::Greater, 0.05).unwrap();
    assert!((shifted.statistic - 1.0).abs() < 1e-12);
    assert!((shifted.p_value - 0.25).abs() < 1e-10); // 1 − F₁(1) = ½ − atan(1)/π = ¼
}

#[test]
fn welch_against_closed_form_df2() {
    // 0, 2 vs 3, 5: v₁ = v₂ = 1, t = −3/√2, df = 2²/(1 + 1) = 2.
    let t_hand = -3.0 / 2f64.sqrt();
    let w = welch_t(&[0.0, 2.0], &[3.0, 5.0], 0.0, Sided::Less, 0.05).unwrap();
    assert!((w.statistic - t_hand).abs() < 1e-12);
    assert!((w.df().unwrap() - 2.0).abs() < 1e-12);
    assert!((w.p_value - t_cdf_2(t_hand)).abs() < 1e-10);
}

#[test]
fn welch_df_is_welch_satterthwaite() {
    // Unequal sizes and spreads; df by hand from the formula in the doc comment.
    let a = [1.0, 2.0, 4.0, 7.0];
    let b = [2.0, 2.5, 3.0, 2.0, 2.5, 3.0];
    let (va, vb) = (7.0 / 4.0, 0.2 / 6.0); // means 3.5 and 2.5; s² = 7 and 0.2
    let df_hand = (va + vb) * (va + vb) / (va * va / 3.0 + vb * vb / 5.0);
    let w = welch_t(&a, &b, 0.0, Sided::TwoSided, 0.05).unwrap();
    assert!((w.df().unwrap() - df_hand).abs() < 1e-12);
    assert!((w.statistic - (3.5 - 2.5) / (va + vb).sqrt()).abs() < 1e-12);
}

#[test]
fn welch_with_one_constant_group_uses_the_other_df() {
    let w = welch_t(&[1.0, 1.0, 1.0], &[0.0, 2.0], 0.0, Sided::TwoSided, 0.05).unwrap();
    assert!((w.df().unwrap() - 1.0).abs() < 1e-12);
}

/// Student's (1908) sleep data as distributed with R (`datasets::sleep`): extra hours of
/// sleep under two drugs for the same ten patients. Expected values are R's `t.test`
/// output, recalled from memory and printed to 4–5 significant digits there:
/// paired t = −4.0621, df = 9, p = 0.002833; Welch t = −1.8608, df = 17.776, p = 0.07939.
#[test]
fn student_sleep_data_from_memory() {
    let drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
    let drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
    let paired = paired_t(&drug1, &drug2, 0.0, Sided::TwoSided, 0.05).unwrap();
    assert!((paired.statistic + 4.0621).abs() < 1e-4);
    assert_eq!(paired.df(), Some(9.0));
    assert!((paired.p_value - 0.002833).abs() < 1e-6);
    assert!(paired.reject);
    let welch = welch_t(&drug1, &drug2, 0.0, Sided::TwoSided, 0.05).unwrap();
    assert!((welch.statistic + 1.8608).abs() < 1e-4);
    assert!((welch.df().unwrap() - 17.776).abs() < 1e-3);
    assert!((welch.p_value - 0.07939).abs() < 1e-5);
    assert!(!welch.reject);
}

#[test]
fn degenerate_inputs_are_errors() {
    assert_eq!(
        one_sample_t(&[1.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::TooFewValues {
            what: "values",
            needed: 2,
            got: 1
        })
    );
    assert_eq!(
        one_sample_t(&[2.0, 2.0, 2.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::ZeroVariance { what: "values" })
    );
    assert!(matches!(
        one_sample_t(&[1.0, f64::NAN], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::NonFiniteValue { index: 1, .. })
    ));
    assert_eq!(
        paired_t(&[1.0, 2.0], &[1.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::LengthMismatch {
            first: 2,
            second: 1
        })
    );
    assert_eq!(
        paired_t(&[1.0, 2.0], &[0.0, 1.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::ZeroVariance {
            what: "differences"
        })
    );
    assert_eq!(
        welch_t(&[1.0, 1.0], &[3.0, 3.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::ZeroVariance {
            what: "first and second"
        })
    );
    assert!(matches!(
        welch_t(&[1.0, 2.0], &[3.0], 0.0, Sided::TwoSided, 0.05),
        Err(InferError::TooFewValues { what: "second", .. })
    ));
    assert_eq!(
        one_sample_t(&[1.0, 2.0], 0.0, Sided::TwoSided, 0.0),
        Err(InferError::Alpha(0.0))
    );
    assert!(matches!(
        one_sample_t(&[1.0, 2.0], f64::NAN, Sided::TwoSided, 0.05),
        Err(InferError::NonFinite { .. })
    ));
    // Finite values whose spread overflows f64: an error, not NaN.
    assert!(one_sample_t(&[-1e308, 1e308, 1e308], 0.0, Sided::TwoSided, 0.05).is_err());
}
