//! `scale = { … }`: a rating scale, its criteria given directly or from absent shares.

use super::Ctx;
use crate::design::RatingScale;
use crate::model::{Observer, normal};
use crate::plan::PlanError;
use crate::plan::raw::RawScale;
use crate::vocab::MAX_CATEGORIES;
use toml::Spanned;

pub(super) fn scale(
    ctx: &Ctx,
    spanned: &Spanned<RawScale>,
    observer: &Observer,
) -> Result<RatingScale, PlanError> {
    let s = spanned.get_ref();
    let k = *s.categories.get_ref();
    if !(2..=MAX_CATEGORIES as i64).contains(&k) {
        return Err(ctx.at(
            &s.categories,
            "categories",
            format!("{k} categories is outside 2 to {MAX_CATEGORIES}"),
        ));
    }
    let b = *s.boundary.get_ref();
    if !(1..k).contains(&b) {
        return Err(ctx.at(
            &s.boundary,
            "boundary",
            format!("criterion {b} does not exist on a {k}-category scale"),
        ));
    }
    let k = k as usize;
    let criteria = match (&s.criteria, &s.absent_shares) {
        (Some(c), None) => {
            let v = c.get_ref();
            if v.len() != k - 1 {
                return Err(ctx.at(
                    c,
                    "criteria",
                    format!("{} criteria given for {k} categories", v.len()),
                ));
            }
            if v.iter().any(|x| !x.is_finite()) || v.windows(2).any(|w| w[0] >= w[1]) {
                return Err(ctx.at(
                    c,
                    "criteria",
                    "the criteria are not strictly increasing finite numbers".into(),
                ));
            }
            v.clone()
        }
        (None, Some(sh)) => criteria_from_shares(ctx, sh, k, observer.d_prime)?,
        (Some(c), Some(_)) => {
            return Err(ctx.at(
                c,
                "criteria",
                "give criteria or absent_shares, not both".into(),
            ));
        }
        (None, None) => {
            return Err(ctx.at(
                spanned,
                "scale",
                "the scale needs criteria or absent_shares".into(),
            ));
        }
    };
    let fix_sigma = s.fix_sigma.unwrap_or(false);
    if k == 2 && !fix_sigma {
        return Err(ctx.at(
            spanned,
            "fix_sigma",
            "a 2-category scale cannot estimate σ; set fix_sigma = true".into(),
        ));
    }
    Ok(RatingScale {
        categories: k,
        boundary: b as usize,
        criteria,
        fix_sigma,
    })
}

/// Criteria from the expected share of absent trials in each category: the absent
/// evidence is N(0, 1), so k_j = z(share of categories below j) and c_j = k_j − d′/2.
fn criteria_from_shares(
    ctx: &Ctx,
    sh: &Spanned<Vec<f64>>,
    k: usize,
    d_prime: f64,
) -> Result<Vec<f64>, PlanError> {
    let v = sh.get_ref();
    if v.len() != k {
        return Err(ctx.at(
            sh,
            "absent_shares",
            format!("{} shares given for {k} categories", v.len()),
        ));
    }
    if v.iter().any(|x| !(x.is_finite() && *x > 0.0)) {
        return Err(ctx.at(
            sh,
            "absent_shares",
            "every share must be a number > 0".into(),
        ));
    }
    let total: f64 = v.iter().sum();
    if (total - 1.0).abs() > 1e-6 {
        return Err(ctx.at(
            sh,
            "absent_shares",
            format!("the shares sum to {total}, not 1"),
        ));
    }
    let mut cumulative = 0.0;
    let mut out = Vec::with_capacity(k - 1);
    for share in &v[..k - 1] {
        cumulative += share;
        let z = normal::z(cumulative).ok_or_else(|| {
            ctx.at(
                sh,
                "absent_shares",
                "a cumulative share reached 0 or 1".into(),
            )
        })?;
        out.push(z - d_prime / 2.0);
    }
    Ok(out)
}
