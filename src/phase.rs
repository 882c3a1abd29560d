//! Typed progress events the layers send while they work: which phase is running and how
//! many work units (simulated datasets or group studies) finished. The library never
//! draws; the command line renders these as a bar or as one log line per phase.

/// A stretch of work the user can tell apart from the next.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Phase {
    /// The table of fixed scenarios (design × trial count).
    Table { scenarios: usize },
    /// One Monte Carlo evaluation of the sample-size search for a design.
    SearchRound {
        design: String,
        round: u32,
        trials: u32,
    },
    /// The grid of animal counts × trial counts of a design with `[animals]`.
    GroupsGrid { design: String },
    /// The effort split (animals against trials) of a design.
    EffortSplit { design: String },
    /// Sensitivity and assurance of a design: the sweep, its Monte Carlo corners and the
    /// assurance's check by simulation.
    Assumptions { design: String },
    /// Part `index` of a run split into `of` parts (a job-array task).
    Part { index: u32, of: u32 },
    /// The fixed points of a run saved to a checkpoint as it goes.
    Checkpointed { resumed: bool },
    /// Combining the partial-results files of a split run.
    Merge { parts: usize },
}

impl Phase {
    /// A short machine-readable name, stable for scripts.
    pub fn name(&self) -> &'static str {
        match self {
            Phase::Table { .. } => "table",
            Phase::SearchRound { .. } => "search",
            Phase::GroupsGrid { .. } => "groups",
            Phase::EffortSplit { .. } => "effort",
            Phase::Assumptions { .. } => "assumptions",
            Phase::Part { .. } => "part",
            Phase::Checkpointed { .. } => "checkpoint",
            Phase::Merge { .. } => "merge",
        }
    }
}

/// What a layer tells the renderer.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Event {
    /// A new phase starts (the previous one, if any, has ended).
    Start(Phase),
    /// This many work units finished.
    Done(u64),
    /// The phase just started will do this many units, which the bar's total may not hold
    /// (the search's rounds are not known before it runs): the bar grows to fit them.
    Planned(u64),
    /// Work counted in the bar's total that turned out not to be needed (an upper bound
    /// not reached); moves the bar, is no work done.
    Skipped(u64),
}

/// The callback every long-running layer takes.
pub type Progress<'a> = dyn Fn(Event) + Sync + 'a;
