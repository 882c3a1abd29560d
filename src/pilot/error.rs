//! Pilot-file errors: one message naming the file, line and column, the problem and what is
//! allowed (exit code 2, like a bad plan).

use std::fmt;
use std::path::PathBuf;

/// A pilot file that cannot be used, located well enough to fix it without reading the code.
#[derive(Debug, Clone, PartialEq)]
pub struct PilotError {
    /// The pilot file as given on the command line.
    pub file: PathBuf,
    /// 1-based line of the offending row (the header is line 1), when one row is at fault.
    pub line: Option<u64>,
    /// 1-based column number and its header name, when one column is at fault.
    pub column: Option<(usize, String)>,
    /// What is wrong, in plain words.
    pub problem: String,
    /// What would be accepted instead.
    pub allowed: String,
}

impl PilotError {
    /// An error about the file as a whole.
    pub fn file(
        file: &std::path::Path,
        problem: impl Into<String>,
        allowed: impl Into<String>,
    ) -> Self {
        Self {
            file: file.to_path_buf(),
            line: None,
            column: None,
            problem: problem.into(),
            allowed: allowed.into(),
        }
    }

    /// The same error, located at `line`.
    pub fn at_line(mut self, line: u64) -> Self {
        self.line = Some(line);
        self
    }

    /// The same error, located at column `index` (0-based) named `name`.
    pub fn at_column(mut self, index: usize, name: &str) -> Self {
        self.column = Some((index + 1, name.to_string()));
        self
    }
}

impl fmt::Display for PilotError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some(line) = self.line {
            write!(f, ", line {line}")?;
        }
        if let Some((index, name)) = &self.column {
            write!(f, ", column {index} (`{name}`)")?;
        }
        write!(f, ": {}", self.problem)?;
        if !self.allowed.is_empty() {
            write!(f, "\n  allowed: {}", self.allowed)?;
        }
        Ok(())
    }
}

impl std::error::Error for PilotError {}
