//! `[animals.habituation]`: how an animal changes over its presentations (criterion drift,
//! d′ half-life), the block the engine simulates at a time, the presentation order and the
//! analysis. Every bad value is reported at its own line and key.

use super::{Ctx, shown};
use crate::design::habituation::{Analysis, DEFAULT_BLOCK, Habituation, Order};
use crate::design::{Design, Route};
use crate::plan::PlanError;
use crate::plan::raw::RawHabituation;
use toml::Spanned;

/// Largest accepted |criterion drift| per presentation: 1 moves the criterion by a whole
/// absent-evidence SD every presentation, beyond anything a plan means.
const MAX_DRIFT: f64 = 1.0;
/// Largest accepted block (presentations).
const MAX_BLOCK: i64 = 1_000_000;

pub(super) fn habituation(
    ctx: &Ctx,
    table: &Spanned<RawHabituation>,
    designs: &[Design],
) -> Result<Habituation, PlanError> {
    let h = table.get_ref();
    let mut out = Habituation::default();
    if let Some(v) = &h.criterion_drift {
        let x = *v.get_ref();
        if !x.is_finite() || x.abs() > MAX_DRIFT {
            return Err(ctx.at(
                v,
                "criterion_drift",
                format!("{} is outside −{MAX_DRIFT} to {MAX_DRIFT}", shown(x)),
            ));
        }
        out.criterion_drift = x;
    }
    if let Some(v) = &h.half_life {
        let x = *v.get_ref();
        if !x.is_finite() || x <= 0.0 {
            return Err(ctx.at(
                v,
                "half_life",
                format!("{} is not a number of presentations > 0", shown(x)),
            ));
        }
        out.half_life = Some(x);
    }
    if let Some(v) = &h.block {
        let b = *v.get_ref();
        if !(1..=MAX_BLOCK).contains(&b) {
            return Err(ctx.at(v, "block", format!("{b} is outside 1 to {MAX_BLOCK}")));
        }
        out.block = b as u32;
    } else {
        out.block = DEFAULT_BLOCK;
    }
    if let Some(v) = &h.order {
        out.order = match v.get_ref().as_str() {
            "alternating" => Order::Alternating,
            "blocked" => Order::Blocked,
            "randomised" => Order::Randomised,
            other => {
                return Err(ctx.at(v, "order", format!("\"{other}\" is not an order")));
            }
        };
    }
    if let Some(v) = &h.analysis {
        out.analysis = match v.get_ref().as_str() {
            "stationary" => Analysis::Stationary,
            "trend" => Analysis::Trend,
            other => {
                return Err(ctx.at(v, "analysis", format!("\"{other}\" is not an analysis")));
            }
        };
    }
    // Block-by-block simulation and the trend fit exist for one-condition yes/no designs.
    if out.active() {
        if let Some(d) = designs
            .iter()
            .find(|d| Route::of(d) != Route::YesNoClosedForm)
        {
            return Err(ctx.at(
                table,
                "habituation",
                format!(
                    "design \"{}\" is not a one-condition yes/no design with a full record; habituation is simulated only for those so far",
                    d.name
                ),
            ));
        }
    }
    Ok(out)
}
