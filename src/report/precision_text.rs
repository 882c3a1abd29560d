//! How many experiments were simulated, in words: a fixed count, or the precision stop of
//! `[study.precision]` and what each row needed.

use super::format::plain;
use crate::engine::ScenarioSummary;
use crate::engine::parallel::CHUNK;
use crate::plan::Study;

/// "2000 simulated experiments", or the rule a precision run followed.
pub fn settings_phrase(study: &Study) -> String {
    let Some(p) = study.precision else {
        return format!("{} simulated experiments", study.experiments);
    };
    let mut targets = Vec::new();
    if let Some(se) = p.power_se {
        targets.push(format!(
            "every power's Monte Carlo SE was at most {}",
            plain(se)
        ));
    }
    if let Some(f) = p.mean_se_per_sd {
        targets.push(format!(
            "every mean's Monte Carlo SE at most {}% of its SD",
            plain(100.0 * f)
        ));
    }
    format!(
        "simulated experiments added {CHUNK} at a time, from {} until {}, or to a ceiling of {}",
        study.experiments,
        targets.join(" and "),
        p.max_experiments
    )
}

/// [`settings_phrase`] opening a sentence.
pub fn settings_sentence_start(study: &Study) -> String {
    let phrase = settings_phrase(study);
    let mut chars = phrase.chars();
    chars.next().map_or_else(String::new, |first| {
        first.to_uppercase().chain(chars).collect()
    })
}

/// Under a precision stop: the experiments each of these rows needed, and the rows that
/// reached the ceiling before their targets; `None` for a fixed count.
pub fn rows_lines(rows: &[&ScenarioSummary]) -> Vec<String> {
    let run: Vec<String> = rows
        .iter()
        .filter(|s| s.precision_met.is_some())
        .map(|s| format!("{} at {} trials", s.datasets.total, s.scenario.trials))
        .collect();
    if run.is_empty() {
        return Vec::new();
    }
    let mut lines = vec![format!("Experiments simulated: {}.", run.join(", "))];
    let short: Vec<String> = rows
        .iter()
        .filter(|s| s.precision_met == Some(false))
        .map(|s| format!("{} trials", s.scenario.trials))
        .collect();
    if !short.is_empty() {
        lines.push(format!(
            "Warning: at {} the ceiling of max_experiments came before the precision asked for; the ± there are wider than [study.precision] asks (raise max_experiments).",
            short.join(", ")
        ));
    }
    lines
}
