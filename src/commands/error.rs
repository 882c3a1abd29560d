//! The failure of any command, and its documented exit code.

use crate::evaluate::RunError;
use crate::plan::PlanError;
use thiserror::Error;

/// Any failure of a command, with its exit code.
#[derive(Debug, Error)]
pub enum AppError {
    #[error("{0}")]
    Plan(#[from] PlanError),
    #[error("{0}")]
    Run(#[from] RunError),
    /// An output path refused before the work (exit 2) or a write failure after it (exit 1).
    #[error("{0}")]
    Output(#[from] crate::output::OutputError),
    #[error(
        "{path}: cannot write the report folder: {source}\n  allowed: a new folder, or one an earlier `vigil report` wrote, inside an existing, writable folder"
    )]
    OutputFolder {
        path: std::path::PathBuf,
        source: std::io::Error,
    },
    /// A bad command-line value, already worded with the option and what is allowed.
    #[error("{0}")]
    Input(String),
    #[error("{0}")]
    Groups(#[from] crate::groups::GroupError),
    #[error("{0}")]
    Shard(#[from] crate::shard::ShardError),
    #[error(
        "interrupted: {saved} of {total} chunks of simulated experiments are saved in the checkpoint {path}\n  resume: {resume}"
    )]
    Interrupted {
        path: std::path::PathBuf,
        saved: usize,
        total: usize,
        resume: String,
    },
    #[error("{0}")]
    /// Boxed: a located pilot-file error is large, and errors travel by value.
    Pilot(Box<crate::pilot::PilotError>),
    #[error("{0}")]
    Internal(String),
}

impl AppError {
    /// The documented exit code of this failure.
    pub fn exit_code(&self) -> i32 {
        match self {
            Self::Plan(_)
            | Self::Run(_)
            | Self::Input(_)
            | Self::Groups(_)
            | Self::OutputFolder { .. }
            | Self::Shard(_)
            | Self::Pilot(_) => 2,
            Self::Output(e) if e.is_bad_input() => 2,
            Self::Output(_) | Self::Internal(_) => 1,
            // The shell's code for a process stopped by SIGINT (128 + 2).
            Self::Interrupted { .. } => 130,
        }
    }
}

impl From<crate::pilot::PilotError> for AppError {
    fn from(e: crate::pilot::PilotError) -> Self {
        Self::Pilot(Box::new(e))
    }
}
