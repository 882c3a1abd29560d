//! Where a rating scale sits: its boundary criterion is the observer's criterion.
//!
//! A rating design and a yes/no design of one plan describe one animal, whose yes/no
//! criterion is `observer.criterion`. The scale's boundary criterion (the one that splits
//! "present" from "absent" responses) is that same criterion seen through a finer record,
//! so the two must agree; when they do not, the plan holds two animals and every
//! comparison between its designs would be a comparison of different animals. A mismatch
//! is therefore an error naming both lines, never resolved silently in favour of either.
//!
//! With `criterion = "optimal"` each condition has its own ideal criterion and the scale
//! moves to it keeping its spacing, so the scale is written for an unbiased animal: its
//! boundary criterion must be 0 (the point the partial adjustment starts from).
//!
//! Agreement within [`PLACEMENT_TOLERANCE`] is accepted (absent shares rounded to three
//! decimals cannot hit a criterion exactly) and the scale is then moved by that small
//! amount so that its boundary criterion equals the observer's exactly.

use super::Ctx;
use super::observer::ObserverSpec;
use crate::design::RatingScale;
use crate::model::normal;
use crate::plan::PlanError;
use crate::plan::locate::line_of;
use crate::plan::raw::RawScale;
use toml::Spanned;

/// Largest accepted gap between the scale's boundary criterion and the observer's: half
/// the last digit of the two decimals reports show c to, so an accepted gap is invisible.
pub const PLACEMENT_TOLERANCE: f64 = 0.005;

/// The scale moved so that its boundary criterion is exactly the observer's criterion
/// (0 under `criterion = "optimal"`), or an error when the two differ by more than
/// [`PLACEMENT_TOLERANCE`].
pub(super) fn place_scale(
    ctx: &Ctx,
    raw: &Spanned<RawScale>,
    scale: RatingScale,
    spec: &ObserverSpec,
) -> Result<RatingScale, PlanError> {
    let b = scale.boundary;
    if scale
        .criteria
        .windows(2)
        .any(|w| w[0] >= w[1] || !w.iter().all(|x| x.is_finite()))
    {
        // Shares (or a d′) that collapse two criteria: `runnable` says so in plain words,
        // which is the fix to make first.
        return Ok(scale);
    }
    let at = scale.criteria[b - 1];
    let target = if spec.optimal {
        0.0
    } else {
        spec.observer.criterion
    };
    let gap = at - target;
    if gap.abs() <= PLACEMENT_TOLERANCE {
        let criteria = scale.criteria.iter().map(|c| c - gap).collect();
        return Ok(RatingScale { criteria, ..scale });
    }
    let observer_line = line_of(ctx.source, spec.criterion_span().start);
    let problem = if spec.optimal {
        format!(
            "the scale's boundary criterion (criterion {b}) is c = {}, but with criterion = \"optimal\" (line {observer_line}, key `observer.criterion`) each condition moves the scale to its own ideal criterion, so the scale is written for an unbiased animal with its boundary criterion at 0; as given, the rating design would not describe the plan's animal",
            short(at)
        )
    } else {
        format!(
            "the scale's boundary criterion (criterion {b}) is c = {}, but the observer's criterion is c = {} (line {observer_line}, key `observer.criterion`); the graded record would describe another animal than the plan's observer (and its yes/no designs)",
            short(at),
            short(target)
        )
    };
    let moved: Vec<String> = scale.criteria.iter().map(|c| short(c - gap)).collect();
    let s = raw.get_ref();
    let (value, allowed) = match (&s.absent_shares, &s.criteria) {
        (Some(shares), _) => {
            let d = spec.observer.d_prime;
            let below = normal::cdf(target + d / 2.0);
            (
                shares.span(),
                format!(
                    "absent shares whose first {b} add up to Φ(c + d′/2) = Φ({} + {}) = {below:.4}, which puts criterion {b} at c = {} (within {PLACEMENT_TOLERANCE}){}",
                    short(target),
                    short(d / 2.0),
                    short(target),
                    change_observer(spec, at)
                ),
            )
        }
        (None, Some(criteria)) => (
            criteria.span(),
            format!(
                "criteria whose criterion {b} is c = {} (within {PLACEMENT_TOLERANCE}): the same spacing is criteria = [{}]{}",
                short(target),
                moved.join(", "),
                change_observer(spec, at)
            ),
        ),
        (None, None) => (raw.span(), String::new()),
    };
    Err(ctx.at_allowing(&Spanned::new(value, ()), problem, allowed))
}

/// The other way out, when the observer's criterion is a number.
fn change_observer(spec: &ObserverSpec, at: f64) -> String {
    if spec.optimal {
        String::new()
    } else {
        format!(
            "; or, if the scale is right, observer.criterion = {}",
            short(at)
        )
    }
}

/// A criterion to at most four decimals, trailing zeros dropped (−1.2, 0.2491).
fn short(x: f64) -> String {
    let s = format!("{:.4}", x + 0.0);
    let s = s.trim_end_matches('0').trim_end_matches('.');
    match s {
        "-0" => "0".to_string(),
        _ => s.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::short;

    #[test]
    fn short_numbers_read_as_typed() {
        assert_eq!(short(-1.2000000000000002), "-1.2");
        assert_eq!(short(0.24912), "0.2491");
        assert_eq!(short(-0.00001), "0");
        assert_eq!(short(2.0), "2");
    }
}
