//! Every key a plan may hold, with what it accepts: the single source for error messages
//! ("allowed: …") and for nearest-key suggestions.

/// Keys allowed in each table, by table name (array-of-table entries use the bare name).
pub const TABLE_KEYS: &[(&str, &[&str])] = &[
    (
        "",
        &[
            "study",
            "observer",
            "design",
            "hypothesis",
            "targets",
            "animals",
            "budget",
            "sensitivity",
            "assurance",
        ],
    ),
    (
        "study",
        &[
            "title",
            "seed",
            "experiments",
            "confidence",
            "rate_correction",
            "alpha",
            "max_trials",
            "values_source",
            "precision",
        ],
    ),
    (
        "precision",
        &["power_se", "mean_se_per_sd", "max_experiments"],
    ),
    (
        "observer",
        &[
            "d_prime",
            "criterion",
            "criterion_fraction",
            "payoffs",
            "sigma",
            "lapse_rate",
            "lapse_yes",
        ],
    ),
    (
        "design",
        &[
            "name",
            "presence",
            "trials",
            "scale",
            "record",
            "base_rate",
            "census",
            "shared",
            "condition",
        ],
    ),
    ("condition", &["name", "presence", "d_prime", "criterion"]),
    (
        "payoffs",
        &[
            "value_hit",
            "cost_miss",
            "value_correct_rejection",
            "cost_false_alarm",
        ],
    ),
    (
        "hypothesis",
        &["name", "kind", "conditions", "sided", "power", "shift"],
    ),
    ("targets", &["power", "half_width", "max_correlation"]),
    (
        "animals",
        &[
            "counts",
            "sd_d_prime",
            "sd_criterion",
            "correlation",
            "sd_criterion_shift",
            "correlation_criterion_shift",
            "sd_d_prime_change",
            "correlation_d_prime_change",
            "sd_ln_sigma",
            "sd_lapse_rate",
            "trial_cap",
            "random_effects",
            "quadrature_nodes",
            "habituation",
        ],
    ),
    (
        "habituation",
        &["criterion_drift", "half_life", "block", "order", "analysis"],
    ),
    ("budget", &["cost_per_animal", "cost_per_trial", "total"]),
    ("assurance", &["draws", "target", "uncertain"]),
    (
        "scale",
        &[
            "categories",
            "boundary",
            "criteria",
            "absent_shares",
            "fix_sigma",
        ],
    ),
];

/// What a key accepts, in words a plan author can act on.
pub fn allowed(key: &str) -> &'static str {
    match key {
        "study" => "a [study] table with title and seed",
        "sensitivity" => {
            "a [sensitivity] table of assumption = [values] or { from, to, steps }, e.g. \"observer.d_prime\" = [0.8, 1.0, 1.2] (docs/plan-format.md)"
        }
        "assurance" => {
            "an [assurance] table with draws and target, and [assurance.uncertain] entries such as \"observer.d_prime\" = { sd = 0.15 }"
        }
        "draws" => {
            "values drawn for the assurance, a whole number from 100 to 1000000 (default 2000)"
        }
        "target" => "the assurance the search must reach, strictly between 0 and 1, e.g. 0.9",
        "uncertain" => {
            "a table [assurance.uncertain] of assumption = { sd = S, low = L, high = H }"
        }
        "observer" => "an [observer] table with d_prime and criterion",
        "design" => "one or more [[design]] tables",
        "title" => "text in quotes, e.g. title = \"Alarm-call playback, pilot\"",
        "values_source" => {
            "text in quotes naming where the hypothesised values come from (a pilot, a paper), 1 to 500 characters on one line, e.g. values_source = \"pilot 2025, 6 voles\""
        }
        "precision" => {
            "a table [study.precision] with power_se and/or mean_se_per_sd, and optionally max_experiments"
        }
        "power_se" => {
            "the largest Monte Carlo SE allowed on any power or rejection rate, from 0.0005 to 0.1, e.g. power_se = 0.005"
        }
        "mean_se_per_sd" => {
            "the largest Monte Carlo SE allowed on any mean estimate, as a fraction of that estimate's SD, from 0.001 to 0.5, e.g. mean_se_per_sd = 0.01"
        }
        "max_experiments" => {
            "the most experiments per scenario a precision run may simulate, a whole number from the plan's experiments to 100000000 (default 100000)"
        }
        "seed" => "a whole number from 0 to 9223372036854775807",
        "experiments" => {
            "a whole number of simulated experiments from 1 to 100000000 (default 2000); with [study.precision], the fewest each scenario runs before its precision is checked"
        }
        "confidence" => "a number strictly between 0 and 1, e.g. 0.95 (default 0.95)",
        "rate_correction" => "\"log-linear\" (default), \"half-n\" or \"none\"",
        "d_prime" => "a number ≥ 0 (sensitivity d′)",
        "criterion" => {
            "a number (c; positive = conservative), or \"optimal\" with an [observer.payoffs] table"
        }
        "criterion_fraction" => {
            "with criterion = \"optimal\": how far from c = 0 towards the ideal criterion the animal goes, 0 to 1 (default 1)"
        }
        "payoffs" => {
            "a table [observer.payoffs] with value_hit, cost_miss, value_correct_rejection, cost_false_alarm (each ≥ 0)"
        }
        "value_hit" | "cost_miss" | "value_correct_rejection" | "cost_false_alarm" => {
            "a number ≥ 0; value_hit + cost_miss and value_correct_rejection + cost_false_alarm must both be > 0"
        }
        "alpha" => "the level of every hypothesis test, strictly between 0 and 1 (default 0.05)",
        "max_trials" => {
            "the largest trial count per condition the search may propose, 2 to 1000000 (default 2000)"
        }
        "hypothesis" => "[[hypothesis]] tables with name and kind",
        "kind" => {
            "\"bias\", \"ideal-criterion\", \"criterion-shift\", \"sensitivity-difference\", \"unequal-variance\" or \"group-difference\""
        }
        "conditions" => {
            "a list of condition names: two for criterion-shift and sensitivity-difference, at most one otherwise"
        }
        "sided" => "\"two-sided\" (default), \"greater\" or \"less\"",
        "power" => "a power target strictly between 0 and 1, e.g. 0.8",
        "shift" => {
            "for group-difference: the second population's mean criterion minus the first's (a number)"
        }
        "targets" => "a [targets] table with power, half_width and/or max_correlation",
        "half_width" => {
            "an inline table of largest interval half-widths > 0, e.g. { criterion = 0.2, d_prime = 0.4 }"
        }
        "max_correlation" => "the largest acceptable |r(d̂′, ĉ)|, in (0, 1]",
        "animals" => "an [animals] table with counts",
        "counts" => "a list of different whole numbers of animals, 2 to 100000, e.g. [6, 10, 16]",
        "sd_d_prime" => "between-animal SD of d′, ≥ 0 (default 0)",
        "sd_criterion" => "between-animal SD of the criterion, ≥ 0 (default 0)",
        "correlation" => {
            "correlation of an animal's d′ and criterion, strictly between −1 and 1 (default 0)"
        }
        "sd_criterion_shift" => {
            "between-animal SD of each animal's criterion shift from the first condition to the others, ≥ 0 (default 0); needs a design with two or more conditions"
        }
        "correlation_criterion_shift" => {
            "correlation of an animal's criterion shift with its criterion deviation, strictly between −1 and 1 (default 0)"
        }
        "sd_d_prime_change" => {
            "between-animal SD of each animal's d′ change from the first condition to the others, ≥ 0 (default 0); needs a design with two or more conditions"
        }
        "correlation_d_prime_change" => {
            "correlation of an animal's d′ change with its d′ deviation, strictly between −1 and 1 (default 0)"
        }
        "sd_ln_sigma" => {
            "between-animal SD of ln σ (σ log-normal around the plan's σ), 0 to 2 (default 0)"
        }
        "sd_lapse_rate" => {
            "between-animal SD of the lapse rate (beta around [observer] lapse_rate λ), ≥ 0 and below √(λ(1 − λ)) (default 0)"
        }
        "trial_cap" => {
            "the most trials one animal can be given, a whole number at least as large as the smallest trial count of some design"
        }
        "random_effects" => {
            "true or false (default false): add the random-effects analysis (a probit mixed model of all animals at once) beside the two-stage and pooled ones; yes/no designs only"
        }
        "quadrature_nodes" => {
            "a whole number from 1 to 15: Gauss–Hermite nodes per random effect in the random-effects fit (1 = the Laplace approximation; default 7 with two random effects, 5 with three, 4 with four); needs random_effects = true"
        }
        "habituation" => {
            "an [animals.habituation] table with criterion_drift, half_life, block, order and analysis (all optional); with a drift, a half-life or the trend analysis every design must be a one-condition yes/no design with a full record"
        }
        "criterion_drift" => {
            "change of the animal's criterion per presentation, −1 to 1 (default 0): c_t = c + drift·t"
        }
        "half_life" => {
            "presentations after which the animal's d′ has halved, a number > 0 (default: no decay)"
        }
        "block" => {
            "presentations per simulated block, a whole number from 1 to 1000000 (default 10)"
        }
        "order" => "\"alternating\" (default), \"blocked\" or \"randomised\"",
        "analysis" => {
            "\"stationary\" (default: the fit ignores the drift) or \"trend\" (a linear trend in the criterion over presentations)"
        }
        "budget" => "a [budget] table with cost_per_animal and cost_per_trial",
        "cost_per_animal" => "a number ≥ 0",
        "cost_per_trial" => "a number ≥ 0",
        "total" => {
            "the money (or time) available, enough for at least one animal at the smallest trial count"
        }
        "lapse_rate" => {
            "a share of trials in [0, 1) on which the animal ignores the stimulus (default 0)"
        }
        "lapse_yes" => "the rate in [0, 1] of \"present\" responses on lapse trials (default 0.5)",
        "sigma" => "a number > 0 (SD of present-stimulus evidence; default 1)",
        "name" => "non-empty text in quotes, unique among designs",
        "presence" => {
            "a share strictly between 0 and 1 (e.g. 0.3 = stimulus on 30% of trials; in a two-choice design the share of trials with the target on the left); required on the design or on every condition"
        }
        "record" => {
            "\"full\" (default: every trial's stimulus and response), \"error-totals\" (false alarms, misses and correct responses summed over stimulus classes), \"response-totals\" (only how often the animal responded) or \"two-choice\" (both stimuli on every trial, target on the left or on the right, the animal picks a side)"
        }
        "base_rate" => {
            "for error-totals and response-totals records: \"known\" (default), \"census\" (estimated, helped by an independent census) or \"unknown\""
        }
        "census" => {
            "with base_rate = \"census\": the number of encounters in the census, a whole number ≥ 1"
        }
        "shared" => {
            "a list of parameters common to all conditions, from \"d_prime\", \"criterion\", \"sigma\", \"spacing\", \"base_rate\" (default with conditions: [\"d_prime\", \"sigma\", \"spacing\"] where they exist)"
        }
        "condition" => {
            "[[design.condition]] tables, each with a unique name and optionally presence, d_prime and criterion"
        }
        "trials" => {
            "a list of different whole numbers of trials per condition, 2 to 1000000, e.g. [20, 40, 80]"
        }
        "scale" => {
            "an inline table, e.g. scale = { categories = 4, boundary = 2, absent_shares = [0.4, 0.3, 0.2, 0.1] }"
        }
        "categories" => "a whole number of ordered response categories from 2 to 12",
        "boundary" => {
            "the 1-based index of the criterion that splits \"absent\" from \"present\" responses, from 1 to categories − 1"
        }
        "criteria" => "categories − 1 strictly increasing numbers (midpoint convention, like c)",
        "absent_shares" => {
            "categories numbers > 0 that sum to 1: the expected share of absent trials in each category, lowest first"
        }
        "fix_sigma" => "true or false (true holds σ = 1 in the fit)",
        _ => "",
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_key_is_documented() {
        for (_, keys) in TABLE_KEYS {
            for k in *keys {
                assert!(!allowed(k).is_empty(), "{k} has no description");
            }
        }
    }
}
