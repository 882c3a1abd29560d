//! Every key a plan may hold, with what it accepts: the single source for error messages
//! ("allowed: …") and for nearest-key suggestions.

/// Keys allowed in each table, by table name (array-of-table entries use the bare name).
pub const TABLE_KEYS: &[(&str, &[&str])] = &[
    ("", &["study", "observer", "design"]),
    (
        "study",
        &[
            "title",
            "seed",
            "experiments",
            "confidence",
            "rate_correction",
        ],
    ),
    (
        "observer",
        &["d_prime", "criterion", "sigma", "lapse_rate", "lapse_yes"],
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
        "observer" => "an [observer] table with d_prime and criterion",
        "design" => "one or more [[design]] tables",
        "title" => "text in quotes, e.g. title = \"Alarm-call playback, pilot\"",
        "seed" => "a whole number from 0 to 9223372036854775807",
        "experiments" => "a whole number of simulated experiments, at least 1 (default 2000)",
        "confidence" => "a number strictly between 0 and 1, e.g. 0.95 (default 0.95)",
        "rate_correction" => "\"log-linear\" (default), \"half-n\" or \"none\"",
        "d_prime" => "a number ≥ 0 (sensitivity d′)",
        "criterion" => "a number (c; positive = conservative)",
        "lapse_rate" => {
            "a share of trials in [0, 1) on which the animal ignores the stimulus (default 0)"
        }
        "lapse_yes" => "the rate in [0, 1] of \"present\" responses on lapse trials (default 0.5)",
        "sigma" => "a number > 0 (SD of present-stimulus evidence; default 1)",
        "name" => "non-empty text in quotes, unique among designs",
        "presence" => {
            "a share strictly between 0 and 1 (e.g. 0.3 = stimulus on 30% of trials); required on the design or on every condition"
        }
        "record" => {
            "\"full\" (default: every trial's stimulus and response), \"error-totals\" (false alarms, misses and correct responses summed over stimulus classes) or \"response-totals\" (only how often the animal responded)"
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
        "trials" => "a list of whole numbers ≥ 2 per condition, e.g. [20, 40, 80]",
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
