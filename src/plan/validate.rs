//! From the raw file to a trusted [`Plan`]: every range and consistency check, once.

use super::keys::allowed;
use super::locate::{key_path_of, line_of};
use super::raw::{RawDesign, RawPlan, RawScale};
use super::{Plan, PlanError, Study};
use crate::design::{Design, RatingScale, Response, split_trials};
use crate::fit::correction::RateCorrection;
use crate::model::{Observer, normal};
use std::path::Path;
use toml::Spanned;

/// Default number of simulated experiments per scenario.
pub const DEFAULT_EXPERIMENTS: u64 = 2000;
/// Default confidence level of intervals.
pub const DEFAULT_CONFIDENCE: f64 = 0.95;
/// Largest trial count per condition accepted (keeps tables and memory bounded).
pub const MAX_TRIALS: i64 = 1_000_000;

/// Error builder bound to one file's text.
struct Ctx<'a> {
    path: &'a Path,
    source: &'a str,
}

impl Ctx<'_> {
    /// An error at a value's span; the key path comes from the text, `key` names the rule.
    fn at<T>(&self, value: &Spanned<T>, key: &str, problem: String) -> PlanError {
        let span = value.span();
        PlanError {
            file: self.path.to_path_buf(),
            line: Some(line_of(self.source, span.start)),
            key: key_path_of(self.source, &span),
            problem,
            allowed: allowed(key).to_string(),
        }
    }
}

pub fn validate(path: &Path, source: &str, raw: RawPlan) -> Result<Plan, PlanError> {
    let ctx = Ctx { path, source };
    let study = study(&ctx, &raw)?;
    let observer = observer(&ctx, &raw)?;
    if raw.designs.get_ref().is_empty() {
        return Err(ctx.at(&raw.designs, "design", "no design given".into()));
    }
    let mut designs = Vec::new();
    for d in raw.designs.get_ref() {
        let design = design(&ctx, d, &observer)?;
        if designs.iter().any(|x: &Design| x.name == design.name) {
            return Err(ctx.at(
                &d.name,
                "name",
                format!("design name \"{}\" is used twice", design.name),
            ));
        }
        designs.push(design);
    }
    Ok(Plan {
        source: path.to_path_buf(),
        study,
        observer,
        designs,
    })
}

fn study(ctx: &Ctx, raw: &RawPlan) -> Result<Study, PlanError> {
    let s = &raw.study;
    let seed = *s.seed.get_ref();
    if seed < 0 {
        return Err(ctx.at(&s.seed, "seed", format!("{seed} is negative")));
    }
    let experiments = match &s.experiments {
        None => DEFAULT_EXPERIMENTS,
        Some(e) if *e.get_ref() >= 1 => *e.get_ref() as u64,
        Some(e) => {
            return Err(ctx.at(
                e,
                "experiments",
                format!("{} is not a positive number of experiments", e.get_ref()),
            ));
        }
    };
    let confidence = match &s.confidence {
        None => DEFAULT_CONFIDENCE,
        Some(c) if open_unit(*c.get_ref()) => *c.get_ref(),
        Some(c) => {
            return Err(ctx.at(
                c,
                "confidence",
                format!("{} is outside (0, 1)", c.get_ref()),
            ));
        }
    };
    let rate_correction = match &s.rate_correction {
        None => RateCorrection::LogLinear,
        Some(r) => RateCorrection::from_name(r.get_ref()).ok_or_else(|| {
            ctx.at(
                r,
                "rate_correction",
                format!("\"{}\" is not a known correction", r.get_ref()),
            )
        })?,
    };
    Ok(Study {
        title: s.title.clone(),
        seed: seed as u64,
        experiments,
        confidence,
        rate_correction,
    })
}

fn observer(ctx: &Ctx, raw: &RawPlan) -> Result<Observer, PlanError> {
    let o = &raw.observer;
    let d = *o.d_prime.get_ref();
    if !(d.is_finite() && d >= 0.0) {
        return Err(ctx.at(
            &o.d_prime,
            "d_prime",
            format!("{d} is not a sensitivity ≥ 0"),
        ));
    }
    let c = *o.criterion.get_ref();
    if !c.is_finite() {
        return Err(ctx.at(
            &o.criterion,
            "criterion",
            format!("{c} is not a finite number"),
        ));
    }
    let sigma = match &o.sigma {
        None => 1.0,
        Some(s) if s.get_ref().is_finite() && *s.get_ref() > 0.0 => *s.get_ref(),
        Some(s) => return Err(ctx.at(s, "sigma", format!("{} is not a positive SD", s.get_ref()))),
    };
    Ok(Observer {
        d_prime: d,
        criterion: c,
        sigma,
    })
}

fn design(ctx: &Ctx, d: &RawDesign, observer: &Observer) -> Result<Design, PlanError> {
    let name = d.name.get_ref().trim().to_string();
    if name.is_empty() {
        return Err(ctx.at(&d.name, "name", "the design name is empty".into()));
    }
    let presence = *d.presence.get_ref();
    if !open_unit(presence) {
        return Err(ctx.at(
            &d.presence,
            "presence",
            format!("{presence} is outside (0, 1)"),
        ));
    }
    if d.trials.get_ref().is_empty() {
        return Err(ctx.at(
            &d.trials,
            "trials",
            "the list of trial counts is empty".into(),
        ));
    }
    let mut trials = Vec::new();
    for t in d.trials.get_ref() {
        let n = *t.get_ref();
        if !(2..=MAX_TRIALS).contains(&n) {
            return Err(ctx.at(
                t,
                "trials",
                format!("{n} trials is outside 2 to {MAX_TRIALS}"),
            ));
        }
        let split = split_trials(n as u32, presence);
        if split.present == 0 || split.absent == 0 {
            return Err(ctx.at(
                t,
                "trials",
                format!(
                    "{n} trials at presence {presence} leaves {} present and {} absent trials; both must be at least 1",
                    split.present, split.absent
                ),
            ));
        }
        if trials.contains(&(n as u32)) {
            return Err(ctx.at(t, "trials", format!("{n} is listed twice")));
        }
        trials.push(n as u32);
    }
    trials.sort_unstable();
    let response = match &d.scale {
        None => Response::YesNo,
        Some(s) => Response::Rating(scale(ctx, s, observer)?),
    };
    Ok(Design {
        name,
        presence,
        trials,
        response,
    })
}

fn scale(
    ctx: &Ctx,
    spanned: &Spanned<RawScale>,
    observer: &Observer,
) -> Result<RatingScale, PlanError> {
    let s = spanned.get_ref();
    let k = *s.categories.get_ref();
    if !(2..=12).contains(&k) {
        return Err(ctx.at(
            &s.categories,
            "categories",
            format!("{k} categories is outside 2 to 12"),
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

fn open_unit(x: f64) -> bool {
    x > 0.0 && x < 1.0
}
