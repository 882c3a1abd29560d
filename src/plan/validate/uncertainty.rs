//! `[sensitivity]` and `[assurance]`: which assumptions vary or are uncertain, and how.
//!
//! Keys may be written quoted (`"observer.d_prime" = …`) or dotted (`observer.d_prime = …`,
//! which TOML reads as a nested table); both name the same assumption.

use super::Ctx;
use crate::plan::assumptions::{
    AssumptionKey, AssuranceSpec, DEFAULT_DRAWS, Sensitivity, Sweep, Uncertain, allowed_keys,
};
use crate::plan::locate::line_of;
use crate::plan::raw::RawPlan;
use crate::plan::{Plan, PlanError};
use std::ops::Range;

/// Most assumptions one section may name, and most values per assumption.
pub const MAX_ASSUMPTIONS: usize = 8;
pub const MAX_VALUES: usize = 12;
/// Range of `[assurance] draws`.
pub const DRAWS_RANGE: (i64, i64) = (100, 1_000_000);

/// A section's entries as (dotted key, value), nested tables flattened until `leaf` holds.
fn flatten(
    prefix: &str,
    table: &toml::Table,
    leaf: &dyn Fn(&toml::Value) -> bool,
    out: &mut Vec<(String, toml::Value)>,
) {
    for (k, v) in table {
        let key = if prefix.is_empty() {
            k.clone()
        } else {
            format!("{prefix}.{k}")
        };
        match v {
            toml::Value::Table(t) if !leaf(v) => flatten(&key, t, leaf, out),
            _ => out.push((key, v.clone())),
        }
    }
}

/// An error on one entry of a section: the line is where the key's last part first appears
/// after the section's header (TOML keeps no spans inside a free-form table, and a table's
/// span may cover its header only).
fn entry_error(
    ctx: &Ctx,
    span: &Range<usize>,
    key: &str,
    problem: String,
    allowed: String,
) -> PlanError {
    let text = ctx.source.get(span.start..).unwrap_or("");
    // The assumption as written (quoted form), else its last part (dotted form).
    let entry = key
        .strip_prefix("assurance.uncertain.")
        .or_else(|| key.strip_prefix("sensitivity."))
        .unwrap_or(key);
    let last = key.rsplit('.').next().unwrap_or(key);
    let offset = text
        .find(entry)
        .or_else(|| text.find(last))
        .map_or(span.start, |i| span.start + i);
    PlanError {
        file: ctx.path.to_path_buf(),
        line: Some(line_of(ctx.source, offset)),
        key: key.to_string(),
        problem,
        allowed,
    }
}

fn parse_key(
    ctx: &Ctx,
    span: &Range<usize>,
    section: &str,
    key: &str,
) -> Result<AssumptionKey, PlanError> {
    AssumptionKey::parse(key).ok_or_else(|| {
        entry_error(
            ctx,
            span,
            &format!("{section}.{key}"),
            format!("`{key}` is not an assumption vigil can vary"),
            allowed_keys(),
        )
    })
}

fn number(v: &toml::Value) -> Option<f64> {
    match v {
        toml::Value::Float(x) => Some(*x),
        toml::Value::Integer(i) => Some(*i as f64),
        _ => None,
    }
}

/// The plan's value of `key`, or an error at the entry.
fn plan_value(
    ctx: &Ctx,
    span: &Range<usize>,
    full: &str,
    key: &AssumptionKey,
    table: &toml::Table,
) -> Result<f64, PlanError> {
    key.value_in(table).map_err(|problem| {
        entry_error(
            ctx,
            span,
            full,
            problem,
            "an assumption the plan sets to a number (or one with a default)".into(),
        )
    })
}

/// The values of `{ from = A, to = B, steps = N }`: N evenly spaced from A to B, rounded to
/// 10 decimals so they print as typed (0.3, not 0.30000000000000004).
fn range_values(t: &toml::Table) -> Result<Vec<f64>, String> {
    if let Some(other) = t
        .keys()
        .find(|k| !["from", "to", "steps"].contains(&k.as_str()))
    {
        return Err(format!("`{other}` is not a key of a range"));
    }
    let get = |k: &str| {
        t.get(k)
            .and_then(number)
            .ok_or_else(|| format!("the range has no number `{k}`"))
    };
    let (from, to) = (get("from")?, get("to")?);
    let steps = match t.get("steps") {
        Some(toml::Value::Integer(n)) if (2..=MAX_VALUES as i64).contains(n) => *n as usize,
        _ => {
            return Err(format!(
                "`steps` must be a whole number from 2 to {MAX_VALUES}"
            ));
        }
    };
    if !(from.is_finite() && to.is_finite()) || from == to {
        return Err("the range needs two different finite ends".into());
    }
    Ok((0..steps)
        .map(|i| {
            let x = from + (to - from) * i as f64 / (steps - 1) as f64;
            (x * 1e10).round() / 1e10
        })
        .collect())
}

/// `[sensitivity]`.
pub(super) fn sensitivity(
    ctx: &Ctx,
    raw: &RawPlan,
    table: &toml::Table,
) -> Result<Option<Sensitivity>, PlanError> {
    let Some(section) = &raw.sensitivity else {
        return Ok(None);
    };
    let span = section.span();
    let mut entries = Vec::new();
    let is_range = |v: &toml::Value| {
        v.as_table()
            .is_some_and(|t| ["from", "to", "steps"].iter().any(|k| t.contains_key(*k)))
    };
    flatten(
        "",
        section.get_ref(),
        &|v| !v.is_table() || is_range(v),
        &mut entries,
    );
    let allowed_values = format!(
        "a list of 2 to {MAX_VALUES} different numbers, e.g. \"observer.d_prime\" = [0.8, 1.0, 1.2], or an evenly spaced range {{ from = A, to = B, steps = N }} with N from 2 to {MAX_VALUES}"
    );
    if entries.is_empty() || entries.len() > MAX_ASSUMPTIONS {
        return Err(entry_error(
            ctx,
            &span,
            "sensitivity",
            format!("{} assumptions listed", entries.len()),
            format!("1 to {MAX_ASSUMPTIONS} assumptions, each {allowed_values}"),
        ));
    }
    let mut sweeps = Vec::new();
    for (name, value) in entries {
        let full = format!("sensitivity.{name}");
        let key = parse_key(ctx, &span, "sensitivity", &name)?;
        let bad = |problem: String| entry_error(ctx, &span, &full, problem, allowed_values.clone());
        let mut values = match &value {
            toml::Value::Table(t) => range_values(t).map_err(&bad)?,
            _ => value
                .as_array()
                .ok_or_else(|| bad("not a list of numbers".into()))?
                .iter()
                .map(number)
                .collect::<Option<Vec<f64>>>()
                .ok_or_else(|| bad("a value is not a number".into()))?,
        };
        if !(2..=MAX_VALUES).contains(&values.len()) {
            return Err(bad(format!("{} values given", values.len())));
        }
        values.sort_by(f64::total_cmp);
        if values.windows(2).any(|w| w[0] == w[1]) {
            return Err(bad("a value is listed twice".into()));
        }
        let info = key.info();
        if let Some(v) = values
            .iter()
            .find(|v| !(v.is_finite() && info.low <= **v && **v <= info.high))
        {
            return Err(entry_error(
                ctx,
                &span,
                &full,
                format!("{v} is outside the range of {}", key.label()),
                format!("numbers from {} to {}", info.low, info.high),
            ));
        }
        if sweeps.iter().any(|s: &Sweep| s.key == key) {
            return Err(bad("this assumption is listed twice".into()));
        }
        let plan_value = plan_value(ctx, &span, &full, &key, table)?;
        sweeps.push(Sweep {
            key,
            plan_value,
            values,
        });
    }
    Ok(Some(Sensitivity { sweeps }))
}

/// `[assurance]`.
pub(super) fn assurance(
    ctx: &Ctx,
    raw: &RawPlan,
    table: &toml::Table,
) -> Result<Option<AssuranceSpec>, PlanError> {
    let Some(section) = &raw.assurance else {
        return Ok(None);
    };
    let a = section.get_ref();
    let draws = match &a.draws {
        None => DEFAULT_DRAWS,
        Some(d) if (DRAWS_RANGE.0..=DRAWS_RANGE.1).contains(d.get_ref()) => *d.get_ref() as usize,
        Some(d) => {
            return Err(ctx.at_allowing(
                d,
                format!("{} draws is outside the allowed range", d.get_ref()),
                format!(
                    "a whole number from {} to {} (default {DEFAULT_DRAWS})",
                    DRAWS_RANGE.0, DRAWS_RANGE.1
                ),
            ));
        }
    };
    let target = match &a.target {
        None => None,
        Some(t) if super::open_unit(*t.get_ref()) => Some(*t.get_ref()),
        Some(t) => {
            return Err(ctx.at_allowing(
                t,
                format!("{} is not a share strictly between 0 and 1", t.get_ref()),
                "the assurance the search must reach, e.g. target = 0.9".into(),
            ));
        }
    };
    let prior_allowed = "an inline table { sd = S } with S ≥ 0, optionally low = L and high = H around the plan's value, e.g. \"animals.sd_criterion\" = { sd = 0.1, low = 0 }";
    let Some(uncertain) = &a.uncertain else {
        return Err(ctx.at_allowing(
            section,
            "[assurance] names no uncertain assumption".into(),
            format!("a table [assurance.uncertain] with 1 to {MAX_ASSUMPTIONS} entries, each {prior_allowed}"),
        ));
    };
    let span = uncertain.span();
    let is_prior = |v: &toml::Value| {
        v.as_table()
            .is_some_and(|t| ["sd", "low", "high"].iter().any(|k| t.contains_key(*k)))
    };
    let mut entries = Vec::new();
    flatten(
        "",
        uncertain.get_ref(),
        &|v| !v.is_table() || is_prior(v),
        &mut entries,
    );
    if entries.is_empty() || entries.len() > MAX_ASSUMPTIONS {
        return Err(entry_error(
            ctx,
            &span,
            "assurance.uncertain",
            format!("{} uncertain assumptions listed", entries.len()),
            format!("1 to {MAX_ASSUMPTIONS} entries, each {prior_allowed}"),
        ));
    }
    let mut out: Vec<Uncertain> = Vec::new();
    for (name, value) in entries {
        let full = format!("assurance.uncertain.{name}");
        let key = parse_key(ctx, &span, "assurance.uncertain", &name)?;
        let bad = |problem: String| entry_error(ctx, &span, &full, problem, prior_allowed.into());
        let t = value
            .as_table()
            .ok_or_else(|| bad("not a table { sd = … }".into()))?;
        if let Some(other) = t
            .keys()
            .find(|k| !["sd", "low", "high"].contains(&k.as_str()))
        {
            return Err(bad(format!("`{other}` is not a key of a distribution")));
        }
        let get = |k: &str| -> Result<Option<f64>, PlanError> {
            t.get(k)
                .map(|v| number(v).ok_or_else(|| bad(format!("`{k}` is not a number"))))
                .transpose()
        };
        let sd = get("sd")?.ok_or_else(|| bad("no `sd` given".into()))?;
        if !(sd.is_finite() && sd >= 0.0) {
            return Err(bad(format!("sd = {sd} is not a finite number ≥ 0")));
        }
        let info = key.info();
        let plan_value = plan_value(ctx, &span, &full, &key, table)?;
        let low = get("low")?.unwrap_or(info.low);
        let high = get("high")?.unwrap_or(info.high);
        if low < info.low || high > info.high {
            return Err(entry_error(
                ctx,
                &span,
                &full,
                format!(
                    "the range {low} … {high} goes outside that of {}",
                    key.label()
                ),
                format!("low and high within {} … {}", info.low, info.high),
            ));
        }
        if !(low <= plan_value && plan_value <= high) {
            return Err(bad(format!(
                "the range {low} … {high} does not hold the plan's value {plan_value}"
            )));
        }
        if out.iter().any(|u| u.key == key) {
            return Err(bad("this assumption is listed twice".into()));
        }
        out.push(Uncertain {
            key,
            plan_value,
            sd,
            low,
            high,
        });
    }
    Ok(Some(AssuranceSpec {
        draws,
        target,
        uncertain: out,
    }))
}

/// How far into each tail of an uncertain assumption the plan must stay valid (in SDs).
const CHECKED_SDS: f64 = 4.0;

/// Every value the sections will try builds a valid plan: each listed sensitivity value, and
/// each uncertain assumption at its plan value ± 4 SDs (within its range), so a refusal is
/// reported now, at the entry, rather than as failed draws later.
pub(super) fn check_variants(ctx: &Ctx, plan: &Plan) -> Result<(), PlanError> {
    let refused = |section: &str, key: &AssumptionKey, v: f64, e: PlanError| {
        let full = format!("{section}.{}", key.dotted());
        let mut err = PlanError {
            file: ctx.path.to_path_buf(),
            line: None,
            key: full.clone(),
            problem: format!(
                "with {} = {v} the plan is refused: {}",
                key.dotted(),
                e.problem
            ),
            allowed: e.allowed,
        };
        // The entry's line: the key's first mention after the section's header.
        let header = if section == "sensitivity" {
            "[sensitivity"
        } else {
            "[assurance"
        };
        if let Some(start) = ctx.source.find(header) {
            let offset = ctx.source[start..]
                .find(key.name)
                .map_or(start, |i| start + i);
            err.line = Some(line_of(ctx.source, offset));
        }
        err
    };
    if let Some(s) = plan.sensitivity() {
        for sweep in &s.sweeps {
            for &v in &sweep.values {
                plan.with_values(&[(&sweep.key, v)])
                    .map_err(|e| refused("sensitivity", &sweep.key, v, e))?;
            }
        }
    }
    if let Some(a) = plan.assurance() {
        for u in &a.uncertain {
            let ends = [
                (u.plan_value - CHECKED_SDS * u.sd).max(u.low),
                (u.plan_value + CHECKED_SDS * u.sd).min(u.high),
            ];
            for v in ends {
                plan.with_values(&[(&u.key, v)])
                    .map_err(|e| refused("assurance.uncertain", &u.key, v, e))?;
            }
        }
    }
    Ok(())
}
