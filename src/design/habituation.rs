//! How an animal changes over its presentations within a session (docs/groups.md,
//! "Habituation"): its criterion drifts linearly, its d′ may decay with a half-life, and the
//! engine simulates per block of presentations. Types only; the simulation is in
//! `groups::habituation`.

use serde::Serialize;

/// In what order an animal meets its conditions' presentations.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Order {
    /// Every block holds the conditions and present/absent trials in their shares.
    #[default]
    Alternating,
    /// All of the first condition's presentations, then the next condition's.
    Blocked,
    /// The conditions' blocks in a random order drawn per animal.
    Randomised,
}

/// What the group analysis fits to each animal.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Analysis {
    /// The fit a field study would do: one criterion and one d′ per condition over the
    /// whole session, ignoring the drift.
    #[default]
    Stationary,
    /// A linear trend in the criterion over presentations; ĉ is the criterion at
    /// presentation 0.
    Trend,
}

/// The `[animals.habituation]` table, validated.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Habituation {
    /// Change of the criterion per presentation: c_t = c + drift·t.
    pub criterion_drift: f64,
    /// Half-life of d′ in presentations: d′_t = d′·2^(−t/h); `None` = no decay.
    pub half_life: Option<f64>,
    /// Presentations per simulated block, ≥ 1.
    pub block: u32,
    pub order: Order,
    pub analysis: Analysis,
}

/// Presentations per simulated block when the plan does not say.
pub const DEFAULT_BLOCK: u32 = 10;

impl Default for Habituation {
    fn default() -> Self {
        Self {
            criterion_drift: 0.0,
            half_life: None,
            block: DEFAULT_BLOCK,
            order: Order::Alternating,
            analysis: Analysis::Stationary,
        }
    }
}

impl Habituation {
    /// True when the animal changes over the session or the analysis asks for a trend:
    /// otherwise every animal is simulated and fitted exactly as without the table.
    pub fn active(&self) -> bool {
        self.criterion_drift != 0.0 || self.half_life.is_some() || self.analysis == Analysis::Trend
    }

    /// The criterion at presentation `t` (counted from 0) of an animal whose criterion at
    /// presentation 0 is `c`.
    #[inline]
    pub fn criterion_at(&self, c: f64, t: f64) -> f64 {
        c + self.criterion_drift * t
    }

    /// d′ at presentation `t` of an animal whose d′ at presentation 0 is `d`.
    #[inline]
    pub fn d_prime_at(&self, d: f64, t: f64) -> f64 {
        match self.half_life {
            Some(h) => d * (-t / h).exp2(),
            None => d,
        }
    }
}
