//! The failure of any command, and its documented exit code.

use crate::evaluate::RunError;
use crate::plan::PlanError;
use std::path::PathBuf;
use thiserror::Error;

/// Any failure of a command, with its exit code.
#[derive(Debug, Error)]
pub enum AppError {
    #[error("{0}")]
    Plan(#[from] PlanError),
    #[error("{0}")]
    Run(#[from] RunError),
    #[error(
        "{path}: cannot write output: {source}\n  allowed: a file path in an existing, writable folder"
    )]
    Output {
        path: PathBuf,
        source: std::io::Error,
    },
    /// A bad command-line value, already worded with the option and what is allowed.
    #[error("{0}")]
    Input(String),
    #[error("{0}")]
    Groups(#[from] crate::groups::GroupError),
    #[error("{0}")]
    Pilot(#[from] crate::pilot::PilotError),
    #[error("{0}")]
    Internal(String),
}

impl AppError {
    /// The documented exit code of this failure.
    pub fn exit_code(&self) -> i32 {
        match self {
            Self::Plan(_)
            | Self::Run(_)
            | Self::Output { .. }
            | Self::Input(_)
            | Self::Groups(_)
            | Self::Pilot(_) => 2,
            Self::Internal(_) => 1,
        }
    }
}
