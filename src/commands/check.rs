//! `vigil check`: validate a plan and list its scenarios, without simulating.

use super::AppError;
use crate::plan::Plan;
use std::path::Path;

/// `vigil check`: the expanded scenarios, without simulating.
pub fn check(path: &Path) -> Result<String, AppError> {
    let plan = Plan::load(path)?;
    Ok(crate::report::check_text::render(path, &plan))
}
