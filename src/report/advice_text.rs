//! The words of the one "told apart" rule and its advice (`analytic::advice`), shared by the
//! readings of `vigil run` and `vigil explore`, and of the scale-fit flags
//! (`analytic::scale_fit`).

use crate::analytic::advice::{Lever, Limit, Shortfall};
use crate::analytic::scale_fit::ScaleFit;

/// "0.5 (the plan's max_correlation)" or "0.5 (vigil's default yardstick)".
pub fn limit_text(l: &Limit, key: &str) -> String {
    if l.from_plan {
        format!("{}, the plan's {key}", l.at_most)
    } else {
        format!(
            "{}, vigil's default ([targets] {key} sets your own)",
            l.at_most
        )
    }
}

/// One shortfall in plain words.
pub fn shortfall_text(s: &Shortfall) -> String {
    match s {
        Shortfall::TradeOff {
            abs_corr: Some(r),
            limit,
        } => format!(
            "their estimates trade off (|r| = {r:.2}, above {})",
            limit_text(limit, "max_correlation")
        ),
        Shortfall::TradeOff { abs_corr: None, .. } => {
            "the correlation of their estimates is undefined".into()
        }
        Shortfall::WiderThanEffect {
            half_width,
            d_prime,
        } => format!(
            "the half-width of d′ (±{half_width:.2}) is as large as d′ = {d_prime:.2} itself, so the data cannot tell sensitivity from none"
        ),
        Shortfall::Target {
            quantity,
            half_width,
            at_most,
        } => format!(
            "the half-width of {} (±{half_width:.2}) misses the plan's target ±{at_most}",
            quantity.label()
        ),
    }
}

/// The shortfalls joined.
pub fn shortfalls_text(s: &[Shortfall]) -> String {
    let words: Vec<String> = s.iter().map(shortfall_text).collect();
    super::identification_text::join_words(&words)
}

/// One lever in plain words.
pub fn lever_text(l: &Lever) -> String {
    match l {
        Lever::MetAsymptotically { trials, abs_corr } => format!(
            "it already meets every yardstick at {trials} trials{}, so the shortfall here is small-sample spread or Monte Carlo error rather than the design",
            abs_corr.map_or(String::new(), |r| format!(" (|r| = {r:.2})"))
        ),
        Lever::MoreTrials { trials } => {
            format!("about {trials} trials per condition would meet every yardstick")
        }
        Lever::TrialsLeaveCorrelation {
            from_trials,
            abs_corr_from,
            to_trials,
            abs_corr_to,
        } => format!(
            "more trials do not help: |r| is {abs_corr_from:.2} at {from_trials} trials and {abs_corr_to:.2} at {to_trials} (it is set by the response rates and the share of stimulus trials, not by the count)"
        ),
        Lever::TrialsNotEnough {
            from_trials,
            abs_corr_from,
            to_trials,
            abs_corr_to,
        } => {
            let r = match (abs_corr_from, abs_corr_to) {
                (Some(a), Some(b)) => {
                    format!(" (|r| is {a:.2} at {from_trials} trials and {b:.2} at {to_trials})")
                }
                _ => String::new(),
            };
            format!("no count up to {to_trials} trials meets every yardstick{r}")
        }
        Lever::Presence {
            from,
            presence,
            abs_corr,
        } => format!(
            "presenting the stimulus on {:.0}% of trials instead of {:.0}% gives |r| = {abs_corr:.2} at the same count",
            100.0 * presence,
            100.0 * from
        ),
        Lever::FullRecord { abs_corr } => format!(
            "recording each trial's stimulus and response (a full record) gives |r| = {abs_corr:.2} at the same count"
        ),
        Lever::LargerCensus {
            from,
            census,
            abs_corr,
        } => format!(
            "a census of {census} encounters instead of {from} gives |r| = {abs_corr:.2} at the same count"
        ),
        Lever::OtherDesign { design, abs_corr } => {
            format!("the plan's \"{design}\" gives |r| = {abs_corr:.2} at the same count")
        }
    }
}

/// "by the expected information, a; b; and c" (empty when there is no lever).
pub fn levers_text(levers: &[Lever]) -> String {
    if levers.is_empty() {
        return String::new();
    }
    let words: Vec<String> = levers.iter().map(lever_text).collect();
    format!("by the expected information, {}", words.join("; "))
}

/// The scale-fit warning of a rating design with σ free, with the fix.
pub fn scale_fit_text(f: &ScaleFit, level: f64) -> String {
    let mut parts = Vec::new();
    if let Some(s) = f.saturated {
        parts.push(format!(
            "with σ free the {}-step fit is saturated: {} parameters for {} free cells, so it reproduces any table exactly, nothing checks σ, and at small counts σ̂ and the d′ and c that move with it are biased and spread far beyond their asymptotic SEs",
            f.categories, s.parameters, s.free_cells
        ));
    }
    if let (Some(first), Some(last)) = (f.weak_sigma.first(), f.weak_sigma.last()) {
        let span = if first.trials == last.trials {
            format!("at {} trials", first.trials)
        } else {
            format!("from {} to {} trials", first.trials, last.trials)
        };
        parts.push(format!(
            "σ is barely determined {span} (expected {:.0}% half-width ±{:.2} at {} trials, against σ = {}: its interval reaches 0)",
            100.0 * level,
            last.half_width,
            last.trials,
            last.sigma
        ));
    }
    let mut fix = String::from(
        "hold σ at 1 (`fix_sigma = true` in the scale) if equal variances are a fair assumption, or record more categories",
    );
    if let Some(x) = f.sigma_fixed {
        fix.push_str(&format!(
            " (with σ held, the expected SE at {} trials is {:.3} instead of {:.3} for d′ and {:.3} instead of {:.3} for c)",
            x.trials, x.se_d_prime_fixed, x.se_d_prime_free, x.se_criterion_fixed, x.se_criterion_free
        ));
    }
    format!("{}; to fix it, {fix}", parts.join("; and "))
}
