//! Flags for intervals whose simulated coverage misses the nominal level, either way, and
//! for two-stage false-positive rates away from α — each naming the quantity and saying in
//! plain words what it means for the person planning.
//!
//! The rule: a Monte Carlo share misses its nominal value when its Wilson 95% interval
//! excludes it (Wilson 1927). Exact enumeration has no Monte Carlo error, so there a share
//! misses when it is more than half a percentage point away (the precision the tables print
//! coverage to is 0.1 point; half a point is the smallest miss worth a sentence).

use crate::engine::{ScenarioSummary, Share};
use crate::groups::summary::GroupPrecision;
use crate::groups::{DesignGroups, GridCell, GroupReport};
use crate::vocab::Sided;

/// Distance from nominal that counts as a miss for exact (collapsed) shares.
const EXACT_MISS: f64 = 0.005;
/// At most this many places are listed in one note; the rest are counted.
const LISTED: usize = 4;

/// Which way a share misses its nominal value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Miss {
    Below,
    Above,
}

/// Whether `share` misses `nominal`: its Wilson interval excludes it (Monte Carlo), or it is
/// more than half a point away (exact enumeration, where the interval is the value).
pub fn miss(share: &Share, nominal: f64) -> Option<Miss> {
    if !(share.low.is_finite() && share.high.is_finite()) {
        return None;
    }
    let exact = share.low == share.high;
    let (low, high) = if exact {
        (share.value - EXACT_MISS, share.value + EXACT_MISS)
    } else {
        (share.low, share.high)
    };
    if high < nominal {
        Some(Miss::Below)
    } else if low > nominal {
        Some(Miss::Above)
    } else {
        None
    }
}

/// "93.8%, 92.9–94.6%" or, for an exact share, "93.8%".
fn percent_with_interval(s: &Share) -> String {
    if s.low == s.high {
        format!("{:.1}%", 100.0 * s.value)
    } else {
        format!(
            "{:.1}%, {:.1}–{:.1}%",
            100.0 * s.value,
            100.0 * s.low,
            100.0 * s.high
        )
    }
}

/// "a, b, c and 2 more places".
fn listing(places: &[String], more: &str) -> String {
    let shown = &places[..places.len().min(LISTED)];
    let rest = places.len() - shown.len();
    if rest > 0 {
        format!("{} and {rest} more {more}", shown.join(", "))
    } else {
        shown.join(", ")
    }
}

/// One note per quantity and direction for a design's rows: where its intervals cover the
/// truth less (or more) often than the plan's confidence level, and what that means.
pub fn run_notes(rows: &[&ScenarioSummary], level: f64) -> Vec<String> {
    let pct = 100.0 * level;
    // (label, direction) in order of first appearance, with the rows that miss.
    let mut found: Vec<(String, Miss, Vec<String>)> = Vec::new();
    for s in rows {
        for q in &s.quantities {
            let Some(m) = miss(&q.coverage, level) else {
                continue;
            };
            let place = format!(
                "{} trials ({})",
                s.scenario.trials,
                percent_with_interval(&q.coverage)
            );
            let label = q.label();
            match found.iter_mut().find(|(l, d, _)| *l == label && *d == m) {
                Some((_, _, places)) => places.push(place),
                None => found.push((label, m, vec![place])),
            }
        }
    }
    found
        .into_iter()
        .map(|(label, m, places)| {
            let at = listing(&places, "trial counts");
            match m {
                Miss::Below => format!(
                    "Note: the {pct:.0}% intervals of {label} hold the true value less often than {pct:.0}% at {at}: \
                     they are too narrow there (the SE a study reports is smaller than the real scatter of the \
                     estimate, or the estimate is biased), so its interval and tests on {label} claim more precision \
                     than they have."
                ),
                Miss::Above => format!(
                    "Note: the {pct:.0}% intervals of {label} hold the true value more often than {pct:.0}% at {at}: \
                     they are too wide there: the SE a study reports is larger than the real scatter of the \
                     estimate, so its interval is more cautious than needed and tests on {label} lose power."
                ),
            }
        })
        .collect()
}

fn cell_place(c: &GridCell, s: &Share) -> String {
    format!(
        "{} animals × {} trials ({})",
        c.animals,
        c.trials_per_animal,
        percent_with_interval(s)
    )
}

/// The cells of a design whose share (picked by `pick`) misses `nominal` in direction `m`.
fn cells_missing(
    d: &DesignGroups,
    nominal: f64,
    m: Miss,
    pick: impl Fn(&GridCell) -> &Share,
) -> Vec<String> {
    d.cells
        .iter()
        .filter(|c| miss(pick(c), nominal) == Some(m))
        .map(|c| cell_place(c, pick(c)))
        .collect()
}

/// Notes for a design's group grid: two-stage and pooled intervals of the group means whose
/// coverage misses the confidence level, and two-stage false-positive rates away from α.
pub fn group_notes(r: &GroupReport, d: &DesignGroups) -> Vec<String> {
    let level = r.confidence;
    let pct = 100.0 * level;
    let mut out = Vec::new();
    type Pick = fn(&GridCell) -> &GroupPrecision;
    let intervals: [(&str, &str, Pick); 4] = [
        ("two-stage", "c", |c| &c.summary.criterion),
        ("two-stage", "d′", |c| &c.summary.d_prime),
        ("pooled", "c", |c| &c.summary.pooled_criterion),
        ("pooled", "d′", |c| &c.summary.pooled_d_prime),
    ];
    for (route, what, pick) in intervals {
        for m in [Miss::Below, Miss::Above] {
            let places = cells_missing(d, level, m, |c| &pick(c).coverage);
            if places.is_empty() {
                continue;
            }
            let at = listing(&places, "cells");
            let meaning = match (route, m) {
                ("two-stage", Miss::Below) => "too narrow — usually because each animal's estimate is biased at \
                     that trial count (the rate correction or lapses pull it), and more animals only narrow the \
                     interval around the biased value; more trials per animal remove the bias, more animals do not"
                    .to_string(),
                (_, Miss::Below) => {
                    "too narrow — the pooled fit treats differences between animals as sampling noise, so its SE \
                     is too small; use the two-stage figures"
                        .to_string()
                }
                (_, Miss::Above) => format!(
                    "too wide — a study's interval of the group mean {what} is more cautious than needed there, which \
                     costs power"
                ),
            };
            let how = match m {
                Miss::Below => "less",
                Miss::Above => "more",
            };
            out.push(format!(
                "Note: the {route} {pct:.0}% interval of the group mean {what} holds the population mean {how} often \
                 than {pct:.0}% at {at}: {meaning}."
            ));
        }
    }
    for (i, test) in d.tests.iter().enumerate() {
        let alpha = r.alpha;
        let below = cells_missing(d, alpha, Miss::Below, |c| {
            &c.summary.tests[i].two_stage_false
        });
        if !below.is_empty() {
            let why = if test.sided == Sided::TwoSided {
                "the test is conservative there (studies with too few usable animals give no answer and count as \
                 no rejection, or the animals' estimates are far from normal), so its power is understated too"
            } else {
                "the animals' estimates are pulled away from the truth towards the null (the rate correction at \
                 few trials and lapses shrink them), so the group mean understates the effect and the power shown \
                 is the power for a smaller effect than the population has"
            };
            out.push(format!(
                "Note: the two-stage test of \"{}\" rejects the population's true value in fewer than α = {alpha} of \
                 studies at {}. That is not a safety margin: {why}.",
                test.name,
                listing(&below, "cells")
            ));
        }
        let above = cells_missing(d, alpha, Miss::Above, |c| {
            &c.summary.tests[i].two_stage_false
        });
        if !above.is_empty() {
            out.push(format!(
                "Note: the two-stage test of \"{}\" rejects the population's true value in more than α = {alpha} of \
                 studies at {}: its p-values are too small there, so a rejection is weaker evidence than α says.",
                test.name,
                listing(&above, "cells")
            ));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn share(value: f64, low: f64, high: f64) -> Share {
        Share { value, low, high }
    }

    #[test]
    fn a_wilson_interval_excluding_the_level_misses_either_way() {
        assert_eq!(miss(&share(0.928, 0.91, 0.94), 0.95), Some(Miss::Below));
        assert_eq!(miss(&share(0.985, 0.97, 0.99), 0.95), Some(Miss::Above));
        assert_eq!(miss(&share(0.94, 0.92, 0.96), 0.95), None);
        assert_eq!(miss(&share(f64::NAN, f64::NAN, f64::NAN), 0.95), None);
    }

    #[test]
    fn exact_shares_miss_beyond_half_a_point() {
        assert_eq!(miss(&share(0.946, 0.946, 0.946), 0.95), None);
        assert_eq!(miss(&share(0.944, 0.944, 0.944), 0.95), Some(Miss::Below));
        assert_eq!(miss(&share(0.956, 0.956, 0.956), 0.95), Some(Miss::Above));
    }
}
