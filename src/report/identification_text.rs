//! Identifiability in plain words: the verdict sentence, profile-likelihood ranges and the
//! small word helpers they share. The typed verdict comes from `cells::verdict`.

use crate::cells::verdict::{ProfileRange, RangeEnd, Verdict};

/// "d′ from 0.82 to 2.41", "d′ anywhere from 0.00 (the smallest value allowed) up to 1.79",
/// "c up to 1.79, unbounded below (no limit down to −8.40, the edge of the search window)",
/// "c unbounded both ways (no limit within −10.30 … 9.70, the
/// search window)".
pub fn range_sentence(range: &ProfileRange) -> String {
    let p = &range.parameter;
    match (range.lower, range.upper) {
        (RangeEnd::At { value: lo }, RangeEnd::At { value: hi }) => {
            format!("{p} from {lo:.2} to {hi:.2}")
        }
        (RangeEnd::BeyondWindow { edge }, RangeEnd::At { value: hi }) => format!(
            "{p} up to {hi:.2}, unbounded below (no limit down to {edge:.2}, the edge of the search window)"
        ),
        (RangeEnd::At { value: lo }, RangeEnd::BeyondWindow { edge }) => format!(
            "{p} from {lo:.2}, unbounded above (no limit up to {edge:.2}, the edge of the search window)"
        ),
        (RangeEnd::BeyondWindow { edge: lo }, RangeEnd::BeyondWindow { edge: hi }) => format!(
            "{p} unbounded both ways (no limit within {lo:.2} … {hi:.2}, the search window)"
        ),
        (RangeEnd::Floor { value: lo }, RangeEnd::At { value: hi }) => {
            format!("{p} anywhere from {lo:.2} (the smallest value allowed) up to {hi:.2}")
        }
        (RangeEnd::Floor { value: lo }, RangeEnd::BeyondWindow { edge }) => format!(
            "{p} anywhere from {lo:.2} (the smallest value allowed) up, unbounded above (no limit up to {edge:.2}, the edge of the search window)"
        ),
        (_, RangeEnd::Floor { value }) => format!("{p} at its smallest allowed value {value:.2}"),
    }
}

/// One sentence in plain words, e.g. "identified", "weakly identified: condition number
/// 3.2e6, |r(d′, c)| = 0.97", or "not identified: d′, c and the base rate cannot be told
/// apart — moving them together along logit π − 0.35·c + 0.17·d′ leaves every expected count
/// unchanged". `corr` is r(d̂′, ĉ) when the information gives one.
pub fn verdict_sentence(verdict: &Verdict, corr: Option<f64>) -> String {
    match verdict {
        Verdict::Identified => "identified".to_string(),
        Verdict::Weak {
            condition_number,
            max_abs_corr,
        } => {
            let mut s = format!(
                "weakly identified: condition number {}",
                condition_text(*condition_number)
            );
            let r = corr.map(f64::abs);
            if let Some(r) = r {
                s.push_str(&format!(", |r(d′, c)| = {r:.2}"));
            }
            if r.is_none_or(|r| (r - max_abs_corr).abs() > 0.005) {
                s.push_str(&format!(
                    ", largest |correlation| between estimates {max_abs_corr:.2}"
                ));
            }
            s
        }
        Verdict::NotIdentified {
            null_directions,
            confounded,
            ..
        } => format!(
            "not identified: {} cannot be told apart — moving them together along {} leaves \
             every expected count unchanged",
            join_words(confounded),
            null_directions.join("; or along ")
        ),
    }
}

/// The note a run prints under a scenario that is weakly or not identified: the verdict, and
/// for a design that is not identified the profile-likelihood ranges.
pub fn identification_note(id: &crate::cells::verdict::Identification) -> String {
    let sentence = verdict_sentence(&id.verdict, id.corr_d_prime_criterion);
    match id.verdict {
        Verdict::NotIdentified { .. } => {
            let ranges: Vec<String> = id.ranges.iter().map(range_sentence).collect();
            format!(
                "{sentence}; at the plan's confidence level the data are consistent with {}",
                ranges.join(" and ")
            )
        }
        _ => sentence,
    }
}

/// A condition number for text: 1 decimal below 10⁴, else `3.2e6`; `∞` when singular.
pub fn condition_text(k: f64) -> String {
    if !k.is_finite() {
        "∞".to_string()
    } else if k < 1e4 {
        format!("{k:.1}")
    } else {
        format!("{k:.1e}")
    }
}

/// "a", "a and b", "a, b and c".
pub fn join_words(words: &[String]) -> String {
    match words {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_and_numbers() {
        let w = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        assert_eq!(
            join_words(&w(&["d′", "c", "the base rate"])),
            "d′, c and the base rate"
        );
        assert_eq!(join_words(&w(&["d′"])), "d′");
        assert_eq!(condition_text(3.2e6), "3.2e6");
        assert_eq!(condition_text(12.34), "12.3");
        assert_eq!(condition_text(f64::INFINITY), "∞");
    }

    #[test]
    fn a_range_of_d_prime_stops_at_its_floor() {
        let r = ProfileRange {
            parameter: "d′".into(),
            truth: 1.6,
            level: 0.95,
            lower: RangeEnd::Floor { value: 0.0 },
            upper: RangeEnd::At { value: 1.79 },
            inner_failures: 0,
        };
        assert_eq!(
            range_sentence(&r),
            "d′ anywhere from 0.00 (the smallest value allowed) up to 1.79"
        );
    }

    #[test]
    fn unbounded_ends_say_so() {
        let r = ProfileRange {
            parameter: "c".into(),
            truth: -0.3,
            level: 0.95,
            lower: RangeEnd::At { value: -1.0 },
            upper: RangeEnd::BeyondWindow { edge: 9.7 },
            inner_failures: 0,
        };
        assert_eq!(
            range_sentence(&r),
            "c from -1.00, unbounded above (no limit up to 9.70, the edge of the search window)"
        );
    }
}
