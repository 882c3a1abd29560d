//! Plan errors: one message naming the file, line, key, the problem and what is allowed.

use std::fmt;
use std::path::PathBuf;

/// A plan that cannot be used, with enough context to fix it without reading the source.
#[derive(Debug, Clone, PartialEq)]
pub struct PlanError {
    /// The plan file as given on the command line.
    pub file: PathBuf,
    /// 1-based line of the offending value or table, when known.
    pub line: Option<usize>,
    /// Dotted key path, e.g. `design[2].presence`.
    pub key: String,
    /// What is wrong, in plain words.
    pub problem: String,
    /// What would be accepted instead.
    pub allowed: String,
}

impl fmt::Display for PlanError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some(line) = self.line {
            write!(f, ", line {line}")?;
        }
        write!(f, ", key `{}`: {}", self.key, self.problem)?;
        if !self.allowed.is_empty() {
            write!(f, "\n  allowed: {}", self.allowed)?;
        }
        Ok(())
    }
}

impl std::error::Error for PlanError {}
