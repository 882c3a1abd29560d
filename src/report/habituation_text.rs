//! The habituation block of the group report: the model in words and, per design, the bias
//! it leaves in the group means (and, with the trend analysis, what the trend term costs).

use super::format::{number as number_to, signed as signed_to};
use crate::design::habituation::{Analysis, Order};
use crate::groups::GroupReport;
use crate::groups::habituation::HabituationReport;
use std::fmt::Write;

/// The model's sentence and one table per design; empty without habituation.
pub fn render(report: &GroupReport) -> String {
    let Some(h) = &report.habituation else {
        return String::new();
    };
    let mut out = String::new();
    let _ = writeln!(out, "{}", model_sentence(h));
    for (d, rows) in report.designs.iter().zip(&h.designs) {
        if rows.is_empty() {
            continue;
        }
        let mut table = super::style::new_table(vec![
            "trials",
            "animals",
            "ĉ bias",
            "d̂′ bias",
            "SE ĉ, stationary",
            "SE ĉ, trend",
        ]);
        for r in rows {
            table.add_row(vec![
                r.trials.to_string(),
                r.animals.to_string(),
                format!(
                    "{} ± {}",
                    signed(r.criterion.value),
                    number(r.criterion.mc_se)
                ),
                format!("{} ± {}", signed(r.d_prime.value), number(r.d_prime.mc_se)),
                number(r.within_se.0),
                number(r.within_se.1),
            ]);
        }
        let _ = writeln!(
            out,
            "\"{}\" — habituation: bias of the two-stage group means against the population's c and d′ at presentation 0 (± Monte Carlo SE) and the within-animal SE of ĉ",
            d.design
        );
        let _ = writeln!(out, "{table}");
    }
    let _ = writeln!(
        out,
        "The bias includes what lapses and small samples do without habituation. The within-animal SEs are those of the \
         population's mean animal from the expected information; their ratio is what a trend term costs."
    );
    let _ = writeln!(out);
    out
}

fn signed(x: f64) -> String {
    signed_to(x, 3)
}

fn number(x: f64) -> String {
    number_to(x, 3)
}

fn model_sentence(h: &HabituationReport) -> String {
    let m = &h.model;
    let mut parts = Vec::new();
    if m.criterion_drift != 0.0 {
        parts.push(format!(
            "each animal's criterion moves by {} per presentation (c_t = c + drift·t)",
            signed(m.criterion_drift)
        ));
    }
    if let Some(hl) = m.half_life {
        parts.push(format!(
            "its d′ halves every {} presentations (d′_t = d′·2^(−t/h))",
            number(hl)
        ));
    }
    if parts.is_empty() {
        parts.push("the animals do not change over the session".into());
    }
    let order = match m.order {
        Order::Alternating => "alternating",
        Order::Blocked => "blocked",
        Order::Randomised => "randomised",
    };
    let analysis = match m.analysis {
        Analysis::Stationary => {
            "stationary (one c and d′ per animal over the session, as a field study would fit; the drift stays in the estimates)"
        }
        Analysis::Trend => {
            "trend (a linear trend in each animal's criterion over presentations; ĉ is its criterion at presentation 0)"
        }
    };
    format!(
        "Habituation: {}; simulated in blocks of {} presentations, each held at its middle presentation's values; order {order}; analysis {analysis}.",
        parts.join("; "),
        m.block
    )
}
