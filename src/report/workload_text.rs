//! What `vigil run` says about a long run: the note before it starts and the refusal above
//! the documented limit.

use crate::workload::{LIMIT_SECONDS, Workload};

/// "about 3 h 10 min", "about 12 min", "about 40 s".
pub fn duration(seconds: f64) -> String {
    if !seconds.is_finite() {
        return "longer than can be estimated".into();
    }
    let s = seconds.round() as u64;
    if s >= 3600 {
        format!("about {} h {} min", s / 3600, (s % 3600) / 60)
    } else if s >= 60 {
        format!("about {} min", s.div_ceil(60))
    } else {
        format!("about {s} s")
    }
}

fn estimate(w: &Workload) -> String {
    format!(
        "{} on this machine ({} datasets to simulate and fit; timed on short pilots of the same work)",
        duration(w.seconds.unwrap_or(f64::INFINITY)),
        w.datasets
    )
}

/// The note printed (to standard error) before a long run starts.
pub fn note(w: &Workload) -> String {
    format!("note: this run will take {}", estimate(w))
}

/// The refusal of a run above the limit, with what is allowed and the option that overrides.
pub fn refusal(w: &Workload) -> String {
    format!(
        "the run would take {}, more than the limit of {} for a run without confirmation\n  \
         allowed: fewer experiments (the plan's `experiments`, the `max_experiments` of a [study.precision] table, or --experiments; now up to {} per scenario), fewer trial counts, \
         animal counts or a smaller [budget] total — or pass --allow-long-run to run it anyway",
        estimate(w),
        duration(LIMIT_SECONDS).trim_start_matches("about "),
        w.experiments
    )
}
