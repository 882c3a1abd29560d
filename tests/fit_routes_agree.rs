//! The three maximum-likelihood routes are one model: the yes/no closed form
//! (`fit::yesno`), the rating fast path (`fit::rating`) and the general Newton fit over
//! observed cells (`cells::newton`) must give the same degeneracy verdict, estimates, SEs and
//! log-likelihood for the same (corrected) table — on the committed golden datasets and on
//! random small tables, equal and unequal variance, K = 2 to 6.
//!
//! Tolerance: 1e-7, absolute for numbers up to 1 and relative above, with estimates measured
//! against their SE. Both iterative routes stop when the remaining Newton step is below 1e-8
//! standard errors (fast path: `gradient_tol` 1e-8; general path: decrement below 1e-16), so
//! each estimate is within ~1e-8·SE of the same maximum (small tables have SEs of σ above
//! 10, hence "against their SE"), SEs move by a relative ~1e-8 over that distance, and lnL
//! by its square; 1e-7 leaves a tenfold margin over these and over rounding (~1e-13
//! relative in lnL).

use proptest::prelude::*;
use serde_json::Value;
use vigil::cells::information::precision;
use vigil::cells::likelihood::Counts;
use vigil::cells::newton::{
    Fit, NewtonOptions as GeneralOptions, Start, StopReason, fit as general,
};
use vigil::cells::observation_model::ObservationModel;
use vigil::cells::spec::{ConditionSpec, NaturalValues, Record, Role};
use vigil::fit::fit_yes_no;
use vigil::fit::rating::{
    FitError, FitStatus, RatingFitOptions, RatingTable, apply_correction, fit as rating_fit,
    measures,
};
use vigil::vocab::RateCorrection;

const TOL: f64 = 1e-7;

/// What every route reports for one table; `None` when the route calls it degenerate.
#[derive(Debug, Clone, PartialEq)]
struct Answer {
    d_prime: f64,
    c: f64,
    sigma: f64,
    criteria: Vec<f64>,
    se_d_prime: f64,
    se_c: f64,
    /// 0 when σ is held.
    se_sigma: f64,
    ln_likelihood: f64,
}

/// |a − b| ≤ 1e-7·max(1, scale).
fn close(what: &str, a: f64, b: f64, scale: f64) -> Result<(), String> {
    if (a - b).abs() <= TOL * scale.abs().max(1.0) {
        Ok(())
    } else {
        Err(format!("{what}: {a} against {b} (difference {:e})", a - b))
    }
}

fn agree(a: &Answer, b: &Answer) -> Result<(), String> {
    // Criteria move with d′, c and σ: their SEs bound the scale of each.
    let largest_se = a.se_d_prime.max(a.se_c).max(a.se_sigma);
    close("d′", a.d_prime, b.d_prime, a.se_d_prime)?;
    close("c", a.c, b.c, a.se_c)?;
    close("σ", a.sigma, b.sigma, a.se_sigma)?;
    for (x, y) in a.criteria.iter().zip(&b.criteria) {
        close("criterion", *x, *y, largest_se.max(x.abs()))?;
    }
    close("SE d′", a.se_d_prime, b.se_d_prime, a.se_d_prime)?;
    close("SE c", a.se_c, b.se_c, a.se_c)?;
    close("SE σ", a.se_sigma, b.se_sigma, a.se_sigma)?;
    close("lnL", a.ln_likelihood, b.ln_likelihood, a.ln_likelihood)
}

/// The rating fast path: `Ok(None)` for a degenerate table, `Err` for a failed fit.
fn fast(table: &RatingTable, fix_sigma: bool, boundary: usize) -> Result<Option<Answer>, String> {
    let options = RatingFitOptions {
        fix_sigma,
        ..RatingFitOptions::default()
    };
    let f = match rating_fit(table, &options) {
        Err(FitError::Degenerate(_)) => return Ok(None),
        Err(e) => return Err(e.to_string()),
        Ok(f) => f,
    };
    if f.status != FitStatus::Converged {
        return Err(format!("fast path stopped: {:?}", f.status));
    }
    let m = measures(&f, boundary).map_err(|e| e.to_string())?;
    Ok(Some(Answer {
        d_prime: m.d_prime.value,
        c: m.c.value,
        sigma: m.sigma.value,
        criteria: f.criteria().to_vec(),
        se_d_prime: m.d_prime.se,
        se_c: m.c.se,
        se_sigma: m.sigma.se,
        ln_likelihood: f.ln_likelihood,
    }))
}

/// The single-condition observation model of a full-count design (see `design::model`):
/// K = 2 is the yes/no condition, more categories a rating condition, σ held at 1 or free.
fn model(table: &RatingTable, fix_sigma: bool, boundary: usize) -> ObservationModel {
    let k = table.categories();
    let record = Record::Full {
        present: table.present_total().round() as u64,
        absent: table.absent_total().round() as u64,
    };
    let mut spec = if k == 2 {
        ConditionSpec::yes_no("one", record, 1.0, 0.0, 0.5)
    } else {
        let values = NaturalValues {
            d_prime: 1.0,
            criterion: 0.0,
            sigma: 1.0,
            gaps: vec![0.5; k - 2],
            base_rate: 0.5,
        };
        ConditionSpec::rating("one", boundary, record, values)
    };
    if fix_sigma {
        spec.roles.sigma = Role::Fixed;
    }
    ObservationModel::new(vec![spec]).expect("a valid single-condition model")
}

/// The general Newton fit (from its own crude start): `Ok(None)` for a degenerate table.
fn general_path(
    table: &RatingTable,
    fix_sigma: bool,
    boundary: usize,
) -> Result<Option<Answer>, String> {
    let m = model(table, fix_sigma, boundary);
    // Blocks of a full record: present trials, then absent trials.
    let counts = Counts::new(&m, vec![table.present().to_vec(), table.absent().to_vec()])
        .map_err(|e| e.to_string())?;
    let f: Fit = general(&m, &counts, Start::Crude, &GeneralOptions::default())
        .map_err(|e| e.to_string())?;
    match f.stop {
        StopReason::Degenerate => return Ok(None),
        StopReason::Converged => {}
        other => return Err(format!("general path stopped: {other:?}")),
    }
    let v = &m.natural(&f.theta).map_err(|e| e.to_string())?[0];
    let p = precision(&m, &f.theta, &f.observed_information)
        .map_err(|e| e.to_string())?
        .ok_or("general path: information not invertible")?;
    let p = &p.conditions[0];
    // Criteria from c at the boundary and the gaps: k_b = c + d′/2.
    let mut criteria = vec![0.0; table.categories() - 1];
    criteria[boundary - 1] = v.criterion + v.d_prime / 2.0;
    for j in boundary..criteria.len() {
        criteria[j] = criteria[j - 1] + v.gaps[j - 1];
    }
    for j in (0..boundary - 1).rev() {
        criteria[j] = criteria[j + 1] - v.gaps[j];
    }
    Ok(Some(Answer {
        d_prime: v.d_prime,
        c: v.criterion,
        sigma: v.sigma,
        criteria,
        se_d_prime: p.se_d_prime.ok_or("no SE of d′")?,
        se_c: p.se_criterion.ok_or("no SE of c")?,
        se_sigma: p.se_sigma.unwrap_or(0.0),
        ln_likelihood: f.log_likelihood,
    }))
}

/// The yes/no closed form on raw counts and a rule; its lnL is that of the corrected table
/// at the corrected rates (the multinomial kernel, as on the other routes).
fn closed_form(raw: &RatingTable, rule: RateCorrection) -> Option<Answer> {
    let count = |x: f64| x.round() as u32;
    let (n_p, n_a) = (count(raw.present_total()), count(raw.absent_total()));
    let (hits, fas) = (count(raw.present()[1]), count(raw.absent()[1]));
    let f = fit_yes_no(hits, n_p, fas, n_a, rule)?;
    let (h, fa) = (rule.rate(hits, n_p)?, rule.rate(fas, n_a)?);
    let (tp, ta) = (rule.fitted_total(n_p), rule.fitted_total(n_a));
    let kernel = |x: f64, p: f64| if x > 0.0 { x * p.ln() } else { 0.0 };
    let ln_likelihood = kernel(tp * h, h)
        + kernel(tp * (1.0 - h), 1.0 - h)
        + kernel(ta * fa, fa)
        + kernel(ta * (1.0 - fa), 1.0 - fa);
    let d = f.measures.d_prime;
    let c = f.measures.criterion;
    Some(Answer {
        d_prime: d,
        c,
        sigma: 1.0,
        criteria: vec![c + d / 2.0],
        se_d_prime: f.se_d_prime,
        se_c: f.se_criterion,
        se_sigma: 0.0,
        ln_likelihood,
    })
}

/// Every route on one raw table and rule: same verdict, and the same answer when fitted.
fn routes_agree(
    raw: &RatingTable,
    rule: RateCorrection,
    fix_sigma: bool,
    boundary: usize,
) -> Result<bool, String> {
    let Ok(table) = apply_correction(raw, rule) else {
        return Ok(false); // half-n cannot correct a row this small: no route fits it
    };
    let a = fast(&table, fix_sigma, boundary)?;
    let b = general_path(&table, fix_sigma, boundary)?;
    let mut answers = vec![("rating fast path", a), ("general fit", b)];
    if table.categories() == 2 && fix_sigma {
        answers.push(("closed form", closed_form(raw, rule)));
    }
    let (first, reference) = &answers[0];
    for (name, answer) in &answers[1..] {
        match (reference, answer) {
            (None, None) => {}
            (Some(x), Some(y)) => agree(x, y).map_err(|e| format!("{first} vs {name}: {e}"))?,
            _ => {
                return Err(format!(
                    "{first} says {}, {name} says {}",
                    verdict(reference),
                    verdict(answer)
                ));
            }
        }
    }
    Ok(reference.is_some())
}

fn verdict(a: &Option<Answer>) -> &'static str {
    if a.is_some() { "fitted" } else { "degenerate" }
}

mod common;

fn golden(name: &str) -> Vec<Value> {
    common::golden_cases(name)
}

fn counts(v: &Value) -> Vec<f64> {
    v.as_array()
        .expect("an array of counts")
        .iter()
        .map(|x| x.as_f64().expect("a count"))
        .collect()
}

// The invented rating datasets of tests/golden (fitted there with statsmodels 0.15 and SciPy
// 1.17.1; that the fast path meets those values is tests/golden_rating.rs): every boundary.
#[test]
fn golden_rating_tables_agree_on_both_routes() {
    for (file, fix_sigma) in [
        ("rating_equal_variance.json", true),
        ("rating_unequal_variance.json", false),
    ] {
        for case in golden(file) {
            let raw = RatingTable::new(
                &counts(&case["absent_counts"]),
                &counts(&case["present_counts"]),
            )
            .expect("golden counts form a table");
            for boundary in 1..raw.categories() {
                let fitted = routes_agree(&raw, RateCorrection::None, fix_sigma, boundary)
                    .unwrap_or_else(|e| panic!("{} (b = {boundary}): {e}", case["name"]));
                assert!(fitted, "{} is fitted by every route", case["name"]);
            }
        }
    }
}

// The yes/no count sets of tests/golden/corrections.json (SciPy 1.17.1), under their rule and
// under the others: the closed form, the K = 2 rating fit and the general fit agree.
#[test]
fn golden_yes_no_tables_agree_on_all_three_routes() {
    let mut fitted = 0;
    for case in golden("corrections.json") {
        let n = |key: &str| case[key].as_f64().expect("a count");
        let raw = RatingTable::new(
            &[n("n_absent") - n("false_alarms"), n("false_alarms")],
            &[n("n_present") - n("hits"), n("hits")],
        )
        .expect("golden counts form a table");
        for rule in [
            RateCorrection::LogLinear,
            RateCorrection::HalfN,
            RateCorrection::None,
        ] {
            match routes_agree(&raw, rule, true, 1) {
                Ok(f) => fitted += usize::from(f),
                Err(e) => panic!("{case} under {rule:?}: {e}"),
            }
        }
    }
    assert!(fitted > 0);
}

// With two categories σ cannot be estimated: the fast path refuses the table, and the general
// model refuses σ free for a yes/no condition when it is built.
#[test]
fn two_categories_with_sigma_free_are_refused_by_both_routes() {
    let table = RatingTable::new(&[30.0, 10.0], &[12.0, 28.0]).unwrap();
    assert_eq!(fast(&table, false, 1), Ok(None));
    let mut spec = ConditionSpec::yes_no(
        "one",
        Record::Full {
            present: 40,
            absent: 40,
        },
        1.0,
        0.0,
        0.5,
    );
    spec.roles.sigma = Role::Free;
    assert!(ObservationModel::new(vec![spec]).is_err());
}

/// Random tables: K in 2..=6, counts 0..=12 per cell (many empty cells, so all degeneracy
/// patterns occur), each row with at least one trial, any rule, σ held or (K ≥ 3) free.
fn random_table() -> impl Strategy<Value = (RatingTable, RateCorrection, bool, usize)> {
    (2usize..=6)
        .prop_flat_map(|k| {
            (
                prop::collection::vec(0u32..=12, k),
                prop::collection::vec(0u32..=12, k),
                0usize..3,
                any::<bool>(),
                1..k,
            )
        })
        .prop_map(|(mut a, mut p, rule, free, boundary)| {
            let k = a.len();
            if a.iter().sum::<u32>() == 0 {
                a[0] = 1;
            }
            if p.iter().sum::<u32>() == 0 {
                p[k - 1] = 1;
            }
            let f = |v: &[u32]| v.iter().map(|&x| f64::from(x)).collect::<Vec<_>>();
            let rule = [
                RateCorrection::None,
                RateCorrection::LogLinear,
                RateCorrection::HalfN,
            ][rule];
            let table = RatingTable::new(&f(&a), &f(&p)).unwrap();
            (table, rule, free && k > 2, boundary)
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(600))]

    #[test]
    fn random_tables_agree_on_every_route((raw, rule, free, boundary) in random_table()) {
        let result = routes_agree(&raw, rule, !free, boundary);
        prop_assert!(result.is_ok(), "{raw:?} {rule:?} σ free {free} b {boundary}: {result:?}");
    }
}

// Every 4-category table with 0 to 2 trials per cell (each row non-empty), uncorrected, σ held
// and free: an exhaustive sweep of the small tables where degeneracy patterns crowd. Both
// verdicts must occur, and tables the previous rule refused although their maximum is
// interior (only one criterion with both cumulative rates inside (0, 1), σ free) must be
// among the fitted ones.
#[test]
fn every_small_four_category_table_agrees() {
    let (mut fitted, mut degenerate, mut one_interior_fitted) = (0, 0, 0);
    for code in 0..3usize.pow(8) {
        let cell = |i: usize| ((code / 3usize.pow(i as u32)) % 3) as f64;
        let a = [cell(0), cell(1), cell(2), cell(3)];
        let p = [cell(4), cell(5), cell(6), cell(7)];
        let Ok(raw) = RatingTable::new(&a, &p) else {
            continue; // a row without trials
        };
        for fix_sigma in [true, false] {
            match routes_agree(&raw, RateCorrection::None, fix_sigma, 1) {
                Ok(true) => fitted += 1,
                Ok(false) => degenerate += 1,
                Err(e) => panic!("{a:?} / {p:?}, σ held {fix_sigma}: {e}"),
            }
        }
        let interior = |j: usize| {
            let (below_a, below_p): (f64, f64) = (a[..j].iter().sum(), p[..j].iter().sum());
            below_a > 0.0
                && below_a < raw.absent_total()
                && below_p > 0.0
                && below_p < raw.present_total()
        };
        if (1..4).filter(|&j| interior(j)).count() == 1
            && routes_agree(&raw, RateCorrection::None, false, 1) == Ok(true)
        {
            one_interior_fitted += 1;
        }
    }
    assert!(
        fitted > 1000 && degenerate > 1000,
        "{fitted} fitted, {degenerate} degenerate"
    );
    assert!(one_interior_fitted > 0);
}
