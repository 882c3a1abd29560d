//! The `vigil pilot` report: each animal's fit, the population values with their intervals
//! and methods, a plain reading, and where the plan skeleton went.

use super::CAUTION;
use super::format::number;
use super::style::{new_table, right_align};
use crate::pilot::PilotAnalysis;
use crate::pilot::animal_fit::NoFit;
use crate::pilot::population::{PopulationInterval, SdEstimate};
use std::fmt::Write;
use std::path::Path;

/// Where the population methods come from, printed under the table.
pub const METHODS: &str = "Means: Student t over animals. Between-animal SDs: method of moments with equal weights \
(DerSimonian & Laird 1986): the spread of the animals' estimates minus their mean sampling variance, \
truncated at 0, with a chi-square interval (Viechtbauer 2007). Correlation: the values not rejected by a simulated test of the estimates' correlation (test inversion).";

fn interval(i: &PopulationInterval) -> String {
    format!("{} to {}", number(i.low, 2), number(i.high, 2))
}

fn scale_words(k: usize, boundary: usize) -> String {
    if k == 2 {
        "yes/no responses".into()
    } else {
        format!(
            "{k}-category graded responses (yes/no boundary above category {boundary}; equal-variance fit)"
        )
    }
}

/// The whole report; `plan_out` is the skeleton's path when one was written.
pub fn render(a: &PilotAnalysis, plan_out: Option<&Path>) -> String {
    let mut out = String::new();
    let d = &a.data;
    let p = &a.population;
    let conditions = d.conditions.len();
    let _ = writeln!(out, "vigil pilot — {}", d.file.display());
    let _ = writeln!(
        out,
        "{} animals, {} condition{}, {}; rates of 0 or 1: {} correction",
        d.animals.len(),
        conditions,
        if conditions == 1 { "" } else { "s" },
        scale_words(d.categories, a.settings.boundary),
        a.settings.correction.name()
    );
    out.push('\n');
    out.push_str(
        "Each animal fitted on its own (maximum likelihood; SE from the fit's information):\n",
    );
    out.push_str(&animal_table(a));
    for (name, why) in a.excluded() {
        let reason = match why {
            NoFit::Degenerate { condition } => format!(
                "a rate of 0 or 1 the correction leaves without a fit{}",
                in_condition(condition)
            ),
            NoFit::NotConverged { condition } => {
                format!("the rating fit did not converge{}", in_condition(condition))
            }
        };
        let _ = writeln!(out, "Left out: animal `{name}`: {reason}.");
    }
    if a.corrected_tables > 0 {
        let _ = writeln!(
            out,
            "{} of {} animal × condition tables had {} and were fitted after the {} correction.",
            a.corrected_tables,
            p.animals * conditions,
            if d.categories == 2 {
                "a rate of 0 or 1"
            } else {
                "an empty category"
            },
            a.settings.correction.name()
        );
    }
    out.push('\n');
    let level = format!("{:.0}%", 100.0 * p.confidence);
    let _ = writeln!(
        out,
        "Population values ({} animals with a fit; {level} intervals):",
        p.animals
    );
    out.push_str(&population_table(a, &level));
    out.push('\n');
    out.push_str(METHODS);
    out.push('\n');
    let _ = writeln!(
        out,
        "Spread of the estimates (variance): d′ {}, c {}; of it, sampling noise within animals: d′ {}, c {}.",
        number(p.observed_cov[0][0], 3),
        number(p.observed_cov[1][1], 3),
        number(p.within_cov[0][0], 3),
        number(p.within_cov[1][1], 3)
    );
    out.push('\n');
    let _ = writeln!(out, "Reading: {}", reading(a));
    out.push('\n');
    if let Some(path) = plan_out {
        let _ = writeln!(
            out,
            "Plan skeleton written to {} with these values, each commented with its interval; check it with `vigil check {}`.",
            path.display(),
            path.display()
        );
        out.push('\n');
    }
    let _ = writeln!(
        out,
        "Caution: {CAUTION} A pilot of {} animals pins these values only loosely: plan for the intervals, not only the estimates.",
        p.animals
    );
    super::layout::wrap_prose(&out)
}

fn in_condition(c: &str) -> String {
    if c.is_empty() {
        String::new()
    } else {
        format!(" in condition `{c}`")
    }
}

fn animal_table(a: &PilotAnalysis) -> String {
    let conditions = a.data.has_conditions();
    let mut header = vec!["animal"];
    if conditions {
        header.push("condition");
    }
    header.extend(["present", "absent"]);
    if a.data.categories == 2 {
        header.extend(["H", "F"]);
    }
    header.extend(["d′", "SE", "c", "SE"]);
    let numbers_from = if conditions { 2 } else { 1 };
    let width = header.len();
    let mut t = new_table(header);
    for (animal, fit) in a.data.animals.iter().zip(&a.fits) {
        for (j, table) in animal.tables.iter().enumerate() {
            let mut row = vec![animal.name.clone()];
            if conditions {
                row.push(a.data.conditions[j].clone());
            }
            row.push(table.present_total().to_string());
            row.push(table.absent_total().to_string());
            if a.data.categories == 2 {
                row.push(number(
                    f64::from(table.present[1]) / f64::from(table.present_total()),
                    3,
                ));
                row.push(number(
                    f64::from(table.absent[1]) / f64::from(table.absent_total()),
                    3,
                ));
            }
            match &fit.fit {
                Ok(fits) => {
                    let f = &fits[j];
                    row.push(number(f.d_prime, 3));
                    row.push(number(f.var_d_prime.sqrt(), 3));
                    row.push(format!("{:+.3}", f.criterion));
                    row.push(number(f.var_criterion.sqrt(), 3));
                }
                Err(_) => row.extend(["no fit", "", "", ""].map(String::from)),
            }
            t.add_row(row);
        }
    }
    right_align(&mut t, numbers_from..width);
    format!("{t}\n")
}

fn population_table(a: &PilotAnalysis, level: &str) -> String {
    let p = &a.population;
    let mut t = new_table(vec!["value", "estimate", "SE", level, "method"]);
    let multi = a.data.has_conditions();
    let mean_label = |q: &str| {
        if multi {
            format!("mean {q} (over conditions)")
        } else {
            format!("mean {q}")
        }
    };
    t.add_row(vec![
        mean_label("d′"),
        number(p.d_prime.value, 3),
        number(p.d_prime.se, 3),
        interval(&p.d_prime.interval),
        "t over animals".into(),
    ]);
    t.add_row(vec![
        mean_label("c"),
        format!("{:+.3}", p.criterion.value),
        number(p.criterion.se, 3),
        interval(&p.criterion.interval),
        "t over animals".into(),
    ]);
    if multi {
        for c in &p.conditions {
            t.add_row(vec![
                format!("mean d′ in {}", c.name),
                number(c.d_prime.value, 3),
                number(c.d_prime.se, 3),
                interval(&c.d_prime.interval),
                "t over animals".into(),
            ]);
            t.add_row(vec![
                format!("mean c in {}", c.name),
                format!("{:+.3}", c.criterion.value),
                number(c.criterion.se, 3),
                interval(&c.criterion.interval),
                "t over animals".into(),
            ]);
        }
    }
    let sd_row = |label: &str, s: &SdEstimate| {
        vec![
            label.to_string(),
            number(s.value, 3),
            "–".into(),
            interval(&s.interval),
            "moments, chi-square".into(),
        ]
    };
    t.add_row(sd_row("between-animal SD of d′", &p.sd_d_prime));
    t.add_row(sd_row("between-animal SD of c", &p.sd_criterion));
    let r = &p.correlation;
    t.add_row(vec![
        "correlation of d′ and c".into(),
        r.value.map_or("–".into(), |v| format!("{v:+.2}")),
        "–".into(),
        r.interval.as_ref().map_or("–".into(), interval),
        if r.simulations > 0 {
            format!(
                "test inversion, {} simulations, seed {}",
                r.simulations, a.population_settings.seed
            )
        } else {
            "needs 3 animals".into()
        },
    ]);
    right_align(&mut t, 1..4);
    format!("{t}\n")
}

/// One plain reading: which values the pilot pins and which it leaves open.
fn reading(a: &PilotAnalysis) -> String {
    let p = &a.population;
    let mut parts = Vec::new();
    for (name, s) in [("d′", &p.sd_d_prime), ("c", &p.sd_criterion)] {
        if s.value == 0.0 {
            parts.push(format!(
                "the animals' {name} estimates differ no more than sampling noise explains (SD estimated 0, up to {})",
                number(s.interval.high, 2)
            ));
        } else {
            parts.push(format!(
                "the between-animal SD of {name} could lie anywhere from {} to {}",
                number(s.interval.low, 2),
                number(s.interval.high, 2)
            ));
        }
    }
    let r = &p.correlation;
    match (r.value, r.interval) {
        (Some(_), Some(i)) if i.low <= 0.0 && i.high >= 0.0 => {
            parts.push("the correlation of d′ and c is not told apart from 0".into())
        }
        (Some(v), Some(_)) => parts.push(format!(
            "animals with a higher d′ tend to have a {} criterion",
            if v > 0.0 {
                "more conservative"
            } else {
                "more liberal"
            }
        )),
        _ => parts.push(
            "the correlation cannot be estimated (an SD is estimated as 0); the skeleton assumes 0"
                .into(),
        ),
    }
    let widest = if p.sd_criterion.interval.high - p.sd_criterion.interval.low
        >= p.sd_d_prime.interval.high - p.sd_d_prime.interval.low
    {
        "c"
    } else {
        "d′"
    };
    format!(
        "{}. The widest uncertainty is in the between-animal SD of {widest}: try the plan at both ends of its interval.",
        capitalise(&parts.join("; "))
    )
}

fn capitalise(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}
