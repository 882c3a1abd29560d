//! The spellings a pilot file may use: header names for each column's role, stimulus labels,
//! response labels and counts. One list each, so the reader, the error messages and
//! `docs/pilot.md` agree.
//!
//! Header names are compared after trimming, lower-casing and reading spaces, dots and
//! hyphens as underscores, so `Animal`, `animal.id` (R) and `Animal ID` all match.

/// What a column holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnRole {
    Animal,
    Condition,
    Stimulus,
    Response,
    Count,
}

impl ColumnRole {
    /// Every role, in the order errors list them.
    pub const ALL: [ColumnRole; 5] = [
        ColumnRole::Animal,
        ColumnRole::Condition,
        ColumnRole::Stimulus,
        ColumnRole::Response,
        ColumnRole::Count,
    ];

    /// The header names accepted for this role (normalised spelling).
    pub fn names(self) -> &'static [&'static str] {
        match self {
            ColumnRole::Animal => &[
                "animal",
                "animal_id",
                "subject",
                "subject_id",
                "individual",
                "id",
            ],
            ColumnRole::Condition => &["condition", "treatment", "cond"],
            ColumnRole::Stimulus => &[
                "stimulus",
                "stimulus_class",
                "stim",
                "signal",
                "class",
                "trial_type",
            ],
            ColumnRole::Response => &["response", "resp", "category", "rating", "answer"],
            ColumnRole::Count => &["count", "n", "freq", "frequency"],
        }
    }

    /// Whether a file must have this column (a missing condition column means one condition).
    pub fn required(self) -> bool {
        self != ColumnRole::Condition
    }
}

/// Normalises a header name for comparison.
pub fn normalise(name: &str) -> String {
    name.trim()
        .to_lowercase()
        .chars()
        .map(|ch| {
            if matches!(ch, ' ' | '.' | '-') {
                '_'
            } else {
                ch
            }
        })
        .collect()
}

/// The role of a header, if it names one.
pub fn role_of(header: &str) -> Option<ColumnRole> {
    let n = normalise(header);
    ColumnRole::ALL
        .into_iter()
        .find(|r| r.names().contains(&n.as_str()))
}

/// Whether a header is a row-name or index column that R's `write.csv` (an empty name) or
/// pandas' `to_csv` (an empty name or `Unnamed: 0`) adds: such columns are ignored.
pub fn is_index_column(header: &str) -> bool {
    let n = normalise(header);
    n.is_empty() || n.starts_with("unnamed:")
}

/// Stimulus class of one row.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stimulus {
    Absent,
    Present,
}

/// The stimulus labels accepted, for error messages.
pub const STIMULUS_ALLOWED: &str =
    "`present` or `absent`, `signal` or `noise`, `1` or `0`, `true` or `false` (any case)";

/// Reads a stimulus label.
pub fn stimulus(value: &str) -> Option<Stimulus> {
    match value.trim().to_lowercase().as_str() {
        "present" | "signal" | "1" | "true" => Some(Stimulus::Present),
        "absent" | "noise" | "0" | "false" => Some(Stimulus::Absent),
        _ => None,
    }
}

/// What responses may be written as on a scale of `categories`, for error messages.
pub fn response_allowed(categories: usize) -> String {
    if categories == 2 {
        "on a yes/no scale: `yes` or `no`, `1` or `0` (1 = yes), `true` or `false` (any case)"
            .into()
    } else {
        format!(
            "on this {categories}-category scale: a category number 1 … {categories} (1 = least evidence of the stimulus)"
        )
    }
}

/// Reads a response as a 0-based category index on a scale of `categories`. On a yes/no
/// scale (K = 2) responses are words or 0/1 with 1 = yes (the way R and pandas code a binary
/// response), so index 1 = yes; on a graded scale they are category numbers 1 … K.
pub fn response(value: &str, categories: usize) -> Option<usize> {
    let v = value.trim().to_lowercase();
    if categories == 2 {
        return match v.as_str() {
            "yes" | "1" | "true" => Some(1),
            "no" | "0" | "false" => Some(0),
            _ => None,
        };
    }
    let k: usize = whole_number(&v)?.try_into().ok()?;
    (1..=categories).contains(&k).then(|| k - 1)
}

/// Why a count was refused.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BadCount {
    Missing,
    NotANumber,
    Negative,
    NotWhole,
    TooLarge,
}

/// Reads a count: a whole number ≥ 0, also when written as a decimal with a zero fraction
/// (`12.0`, as pandas writes an integer column that held a missing value).
pub fn count(value: &str) -> Result<u32, BadCount> {
    let v = value.trim();
    if v.is_empty() || v.eq_ignore_ascii_case("na") || v.eq_ignore_ascii_case("nan") {
        return Err(BadCount::Missing);
    }
    let x: f64 = v.parse().map_err(|_| BadCount::NotANumber)?;
    if !x.is_finite() {
        return Err(BadCount::NotANumber);
    }
    if x < 0.0 {
        return Err(BadCount::Negative);
    }
    if x.fract() != 0.0 {
        return Err(BadCount::NotWhole);
    }
    if x > f64::from(MAX_COUNT) {
        return Err(BadCount::TooLarge);
    }
    Ok(x as u32)
}

/// Largest count one row may hold (and one animal's total per condition and stimulus class).
pub const MAX_COUNT: u32 = 1_000_000;

fn whole_number(v: &str) -> Option<u64> {
    let x: f64 = v.parse().ok()?;
    (x.is_finite() && x >= 0.0 && x.fract() == 0.0 && x <= 1e6).then_some(x as u64)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headers_from_r_and_pandas() {
        assert_eq!(role_of("Animal"), Some(ColumnRole::Animal));
        assert_eq!(role_of("animal.id"), Some(ColumnRole::Animal));
        assert_eq!(role_of(" Stimulus Class "), Some(ColumnRole::Stimulus));
        assert_eq!(role_of("N"), Some(ColumnRole::Count));
        assert_eq!(role_of("weather"), None);
        assert!(is_index_column(""));
        assert!(is_index_column("Unnamed: 0"));
    }

    #[test]
    fn labels() {
        assert_eq!(stimulus("Signal"), Some(Stimulus::Present));
        assert_eq!(stimulus("FALSE"), Some(Stimulus::Absent));
        assert_eq!(stimulus("maybe"), None);
        assert_eq!(response("Yes", 2), Some(1));
        assert_eq!(response("0", 2), Some(0));
        assert_eq!(response("2", 2), None);
        assert_eq!(response("4", 4), Some(3));
        assert_eq!(response("5", 4), None);
        assert_eq!(response("0", 4), None);
        assert_eq!(response("2.5", 4), None);
    }

    #[test]
    fn counts() {
        assert_eq!(count("12"), Ok(12));
        assert_eq!(count("12.0"), Ok(12));
        assert_eq!(count("-1"), Err(BadCount::Negative));
        assert_eq!(count("2.5"), Err(BadCount::NotWhole));
        assert_eq!(count("NA"), Err(BadCount::Missing));
        assert_eq!(count("many"), Err(BadCount::NotANumber));
    }
}
