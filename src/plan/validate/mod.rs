//! From the raw file to a trusted [`Plan`]: every range and consistency check, once.
//!
//! One file per plan section: `study`, `observer`, `design` (with `conditions` and the
//! rating `scale`), `goals` (hypotheses, targets, animals, budget) and `animal_slopes` (the
//! `[animals]` slope, σ and lapse SDs, checked against the observer's lapse rate) and
//! `habituation` (`[animals.habituation]`). This file
//! holds the error builder they share and the order in which the sections are checked.

mod animal_slopes;
mod conditions;
mod design;
pub(super) mod goals;
mod habituation;
mod observer;
mod runnable;
mod scale;
mod scale_placement;
mod study;
mod uncertainty;

use super::keys::allowed;
use super::locate::{key_path_of, line_of};
use super::raw::RawPlan;
use super::{Plan, PlanError};
use crate::design::Design;
use std::path::Path;
use toml::Spanned;

/// Default number of simulated experiments per scenario.
pub const DEFAULT_EXPERIMENTS: u64 = 2000;
/// Default confidence level of intervals.
pub const DEFAULT_CONFIDENCE: f64 = 0.95;
/// Default level of hypothesis tests.
pub const DEFAULT_ALPHA: f64 = 0.05;
/// Default ceiling of the sample-size search.
pub const DEFAULT_MAX_TRIALS: u32 = 2000;
/// Largest trial count per condition accepted (keeps tables and memory bounded).
pub const MAX_TRIALS: i64 = 1_000_000;

/// Error builder bound to one file's text.
pub(super) struct Ctx<'a> {
    pub(super) path: &'a Path,
    pub(super) source: &'a str,
}

impl Ctx<'_> {
    /// An error at a value's span; the key path comes from the text, `key` names the rule.
    pub(super) fn at<T>(&self, value: &Spanned<T>, key: &str, problem: String) -> PlanError {
        let span = value.span();
        PlanError {
            file: self.path.to_path_buf(),
            line: Some(line_of(self.source, span.start)),
            key: key_path_of(self.source, &span),
            problem,
            allowed: allowed(key).to_string(),
        }
    }

    /// As [`Ctx::at`], with what is allowed spelt out for this case.
    pub(super) fn at_allowing<T>(
        &self,
        value: &Spanned<T>,
        problem: String,
        allowed: String,
    ) -> PlanError {
        PlanError {
            allowed,
            ..self.at(value, "", problem)
        }
    }
}

pub(super) fn validate(path: &Path, source: &str, raw: RawPlan) -> Result<Plan, PlanError> {
    let ctx = Ctx { path, source };
    let study = study::study(&ctx, &raw)?;
    let spec = observer::observer(&ctx, &raw)?;
    if raw.designs.get_ref().is_empty() {
        return Err(ctx.at(&raw.designs, "design", "no design given".into()));
    }
    let mut designs = Vec::new();
    for d in raw.designs.get_ref() {
        let design = design::design(&ctx, d, &spec)?;
        runnable::runnable(&ctx, d, &design, &spec.observer)?;
        if designs.iter().any(|x: &Design| x.name == design.name) {
            return Err(ctx.at(
                &d.name,
                "name",
                format!("design name \"{}\" is used twice", design.name),
            ));
        }
        designs.push(design);
    }
    let mut observer = spec.observer;
    if spec.optimal {
        // The header's criterion: the ideal one for the first design's first condition.
        observer.criterion = designs[0].conditions[0].criterion;
    }
    let mut goals = goals::goals(&ctx, &raw, &designs, &study, spec.payoffs)?;
    if let (Some(animals), Some(raw_animals)) = (goals.animals.as_mut(), raw.animals.as_ref()) {
        animals.slopes = animal_slopes::slopes(&ctx, raw_animals, &designs, observer.lapse)?;
        if let Some(table) = &raw_animals.habituation {
            animals.habituation = Some(habituation::habituation(&ctx, table, &designs)?);
        }
    }
    // The plan's own values of the assumptions come from its text as TOML.
    let table: toml::Table = toml::from_str(source).unwrap_or_default();
    let sensitivity = uncertainty::sensitivity(&ctx, &raw, &table)?;
    let assurance = uncertainty::assurance(&ctx, &raw, &table)?;
    let plan = Plan {
        source: path.to_path_buf(),
        text: source.to_string(),
        sensitivity,
        assurance,
        study,
        observer,
        criterion_rule: spec.rule(),
        designs,
        hypotheses: goals.hypotheses,
        targets: goals.targets,
        animals: goals.animals,
        budget: goals.budget,
    };
    uncertainty::check_variants(&ctx, &plan)?;
    Ok(plan)
}

/// A number for a message: the shortest form that reads back as `x`, in scientific notation
/// when plain digits would run long (1e-310, not 0.000…0001).
pub(super) fn shown(x: f64) -> String {
    let a = x.abs();
    if !x.is_finite() || a == 0.0 || (1e-4..1e15).contains(&a) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}

/// Two numbers that differ, to four significant digits unless that makes them look equal.
pub(super) fn shown_pair(a: f64, b: f64) -> (String, String) {
    let short = |x: f64| {
        let s = shown(x);
        match s.parse::<f64>() {
            Ok(v) if v.is_finite() && v != 0.0 && (1e-4..1e15).contains(&v.abs()) => {
                let digits = (3 - v.abs().log10().floor() as i32).max(0) as usize;
                let r = format!("{v:.digits$}");
                if r.contains('.') {
                    r.trim_end_matches('0').trim_end_matches('.').to_string()
                } else {
                    r
                }
            }
            _ => s,
        }
    };
    let (sa, sb) = (short(a), short(b));
    if sa == sb && a != b {
        (shown(a), shown(b))
    } else {
        (sa, sb)
    }
}

pub(super) fn open_unit(x: f64) -> bool {
    x > 0.0 && x < 1.0
}
