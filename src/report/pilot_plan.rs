//! The plan skeleton `vigil pilot --plan-out` writes: a valid plan whose hypothesised values
//! are the pilot's estimates, each commented with its estimate, its interval, the method and
//! the pilot file it came from. The user adds hypotheses and targets.

use crate::pilot::PilotAnalysis;
use crate::pilot::population::{MeanEstimate, PopulationInterval, SdEstimate};
use std::fmt::Write;

/// Largest correlation the skeleton writes (the plan needs |ρ| < 1).
const MAX_CORRELATION: f64 = 0.95;

fn quoted(s: &str) -> String {
    toml::Value::String(s.to_string()).to_string()
}

fn interval(i: &PopulationInterval) -> String {
    format!("{:.3} to {:.3}", i.low, i.high)
}

/// The skeleton as TOML text.
pub fn render(a: &PilotAnalysis) -> String {
    let p = &a.population;
    let d = &a.data;
    let file = d.file.display().to_string();
    let level = format!("{:.0}%", 100.0 * p.confidence);
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# vigil plan skeleton written by `vigil pilot` from the pilot file {file}"
    );
    let _ = writeln!(
        out,
        "# ({} animals with a fit, {} condition{}, {} response categories, {} correction).",
        p.animals,
        d.conditions.len(),
        if d.conditions.len() == 1 { "" } else { "s" },
        d.categories,
        a.settings.correction.name()
    );
    out.push_str(
        "# Every hypothesised value below is a pilot estimate, commented with its interval: the\n\
         # plan's answer rests on these assumptions. Review each value, add [[hypothesis]] and\n\
         # [targets], and settle numbers of animals with your animal-welfare body (Reduction).\n\n",
    );
    out.push_str("[study]\n");
    let _ = writeln!(
        out,
        "title = {}",
        quoted(&format!("Plan from the pilot {file}"))
    );
    let _ = writeln!(out, "seed = {}", a.population_settings.seed);
    out.push_str("experiments = 1000\n");
    let _ = writeln!(out, "confidence = {}", p.confidence);
    let _ = writeln!(
        out,
        "rate_correction = {}   # the rule the pilot animals were fitted with",
        quoted(a.settings.correction.name())
    );
    out.push('\n');

    out.push_str("[observer]\n");
    let mean_comment = |what: &str, m: &MeanEstimate| {
        format!(
            "# {what}: pilot mean {:.3} (SE {:.3}; {level} interval {}, t over {} animals) from {file}\n",
            m.value,
            m.se,
            interval(&m.interval),
            p.animals
        )
    };
    out.push_str(&mean_comment("d′", &p.d_prime));
    if p.d_prime.value < 0.0 {
        out.push_str("# (a negative mean d′ is written as 0: the plan needs d′ ≥ 0)\n");
    }
    let _ = writeln!(out, "d_prime = {:.3}", p.d_prime.value.max(0.0));
    out.push_str(&mean_comment("criterion c", &p.criterion));
    let _ = writeln!(out, "criterion = {:.3}", p.criterion.value);
    out.push('\n');

    out.push_str("[[design]]\n");
    out.push_str("name = \"as in the pilot\"\n");
    let presence = ((a.presence * 100.0).round() / 100.0).clamp(0.05, 0.95);
    let _ = writeln!(
        out,
        "presence = {presence}   # pilot: {:.1}% of trials had the stimulus present",
        100.0 * a.presence
    );
    let m = a.median_trials.clamp(10, 250_000);
    let _ = writeln!(
        out,
        "trials = [{m}, {}, {}]   # the pilot's median {} trials per animal and condition, doubled, quadrupled",
        2 * m,
        4 * m,
        a.median_trials
    );
    if d.categories > 2 {
        let criteria = mean_criteria(a);
        let list: Vec<String> = criteria.iter().map(|k| format!("{k:.3}")).collect();
        let _ = writeln!(
            out,
            "# criteria: the pilot animals' mean criteria (midpoint convention) from {file}"
        );
        let _ = writeln!(
            out,
            "scale = {{ categories = {}, boundary = {}, criteria = [{}], fix_sigma = true }}",
            d.categories,
            a.settings.boundary,
            list.join(", ")
        );
    }
    if d.has_conditions() {
        for c in &p.conditions {
            out.push_str("\n[[design.condition]]\n");
            let _ = writeln!(out, "name = {}", quoted(&c.name));
            let _ = writeln!(
                out,
                "# this condition's pilot mean d′ {:.3} ({level} interval {}); the plan shares one d′ across conditions",
                c.d_prime.value,
                interval(&c.d_prime.interval)
            );
            out.push_str(&mean_comment("criterion c in this condition", &c.criterion));
            let _ = writeln!(out, "criterion = {:.3}", c.criterion.value);
        }
    }
    out.push('\n');

    out.push_str("[animals]\n");
    let n = p.animals.clamp(2, 25_000);
    let _ = writeln!(
        out,
        "counts = [{n}, {}, {}, {}]   # the pilot's {} animals and multiples",
        2 * n,
        3 * n,
        4 * n,
        p.animals
    );
    let sd_comment = |what: &str, s: &SdEstimate| {
        format!(
            "# between-animal SD of {what}: pilot moment estimate {:.3} ({level} interval {}, chi-square) from {file}\n",
            s.value,
            interval(&s.interval)
        )
    };
    out.push_str(&sd_comment("d′", &p.sd_d_prime));
    let _ = writeln!(out, "sd_d_prime = {:.3}", p.sd_d_prime.value);
    out.push_str(&sd_comment("c", &p.sd_criterion));
    let _ = writeln!(out, "sd_criterion = {:.3}", p.sd_criterion.value);
    let r = &p.correlation;
    match r.value {
        Some(v) => {
            let _ = writeln!(
                out,
                "# correlation of an animal's d′ and c: pilot estimate {v:.3} ({level} interval {}, test inversion, {} simulations) from {file}",
                r.interval.as_ref().map_or("not available".into(), interval),
                r.simulations
            );
            if v.abs() > MAX_CORRELATION {
                let _ = writeln!(
                    out,
                    "# (held at ±{MAX_CORRELATION}: the plan needs |correlation| < 1)"
                );
            }
            let _ = writeln!(
                out,
                "correlation = {:.3}",
                v.clamp(-MAX_CORRELATION, MAX_CORRELATION)
            );
        }
        None => {
            let _ = writeln!(
                out,
                "# correlation of an animal's d′ and c: not estimable from {file} (a between-animal SD is estimated as 0); 0 assumed"
            );
            out.push_str("correlation = 0.0\n");
        }
    }
    assurance_section(&mut out, a);
    out.push_str(
        "\n# Add what the study tests, for example:\n\
         # [[hypothesis]]\n\
         # name = \"bias\"\n\
         # kind = \"bias\"\n\
         # power = 0.8\n",
    );
    out
}

/// `[assurance]` with each value's sampling distribution from the pilot: a mean's is normal
/// with the pilot's SE; an SD's is taken as normal with SD = the chi-square interval's
/// half-width ÷ z (the interval is skewed, so this is a rough, stated approximation), kept ≥ 0.
fn assurance_section(out: &mut String, a: &PilotAnalysis) {
    let p = &a.population;
    let z = crate::infer::z_critical(p.confidence);
    let half = |s: &SdEstimate| (s.interval.high - s.interval.low) / (2.0 * z);
    let file = a.data.file.display().to_string();
    let _ = writeln!(
        out,
        "\n# How uncertain {file} leaves these values, for the assurance (expected power over"
    );
    out.push_str(
        "# them; docs/plan-format.md): a mean as normal with its pilot SE; an SD as normal with the\n\
         # half-width of its interval ÷ z as SD, kept ≥ 0 (a rough form of a skewed interval).\n",
    );
    out.push_str("[assurance]\ndraws = 2000\n");
    out.push_str(
        "target = 0.9   # once the study has a hypothesis with a power target: the cheapest design\n\
         \x20              # whose expected power reaches 90%\n",
    );
    out.push_str("[assurance.uncertain]\n");
    let _ = writeln!(
        out,
        "\"observer.d_prime\" = {{ sd = {:.3}, low = 0 }}",
        p.d_prime.se
    );
    let _ = writeln!(
        out,
        "\"observer.criterion\" = {{ sd = {:.3} }}",
        p.criterion.se
    );
    for (key, s) in [
        ("animals.sd_d_prime", &p.sd_d_prime),
        ("animals.sd_criterion", &p.sd_criterion),
    ] {
        let sd = half(s);
        // A rounded SD of 0 is no uncertainty: the value stays the plan's point.
        if sd >= 0.0005 {
            let _ = writeln!(out, "\"{key}\" = {{ sd = {sd:.3}, low = 0 }}");
        } else {
            let _ = writeln!(
                out,
                "# {key}: its pilot interval has no width, so it is held at its value"
            );
        }
    }
}

/// Mean criteria over conditions of the per-condition mean criteria (the plan's scale is
/// shifted to each condition's criterion, so one spacing serves all).
fn mean_criteria(a: &PilotAnalysis) -> Vec<f64> {
    let conds = &a.population.conditions;
    let k = conds[0].criteria.len();
    (0..k)
        .map(|i| conds.iter().map(|c| c.criteria[i]).sum::<f64>() / conds.len() as f64)
        .collect()
}
