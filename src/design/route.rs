//! Which route fits a design's datasets, chosen once from the design alone: the closed-form
//! yes/no fit, the rating fast path, or the general Newton fit over observed cells. The
//! fast routes are optimisations of the one model, tested equal to the general fit on the
//! same tables; the hypotheses a plan states never change the route.

use super::{Design, Response};

/// The fitting route of a design.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Route {
    /// One condition, full yes/no record: d′ and c from z tables.
    YesNoClosedForm,
    /// One condition, full rating record: the allocation-free rating fit.
    RatingFastPath,
    /// Everything else: linked conditions, coarse records, base rates.
    General,
}

impl Route {
    /// The route of `design`.
    pub fn of(design: &Design) -> Route {
        if !design.is_single_table() {
            return Route::General;
        }
        match design.response {
            Response::YesNo => Route::YesNoClosedForm,
            Response::Rating(_) => Route::RatingFastPath,
        }
    }
}
