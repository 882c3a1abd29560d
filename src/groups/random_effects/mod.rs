//! A random-effects analysis of a group study: a probit mixed model (the GLMM equivalent of
//! the signal-detection model) fitted to all animals' counts at once by marginal maximum
//! likelihood, beside the two-stage and pooled analyses.
//!
//! Every animal's answers are binomial rows with P(yes) = Φ(η), η linear in the fixed effects
//! (the population's mean d′ and c of each condition, and a group difference) and in the
//! animal's random effects (its d′ and c deviations, and its random slopes where the plan has
//! them), which are multivariate normal with a free covariance. The integral over each
//! animal's random effects is done by adaptive Gauss–Hermite quadrature
//! ([`marginal`], [`quadrature`]); the fit is a damped Newton ascent with the exact
//! quadrature gradient and Hessian ([`fit`]). [`layout`] turns a design's counts into rows,
//! and [`analysis`] runs the Wald and likelihood-ratio tests of the plan's hypotheses.
//! docs/groups.md documents the model and the choice of quadrature.

pub mod analysis;
pub mod fit;
pub mod layout;
pub mod marginal;
pub mod quadrature;
pub mod tally;

pub use analysis::{RandomEffectsAnalysis, Start, default_nodes};
pub use fit::{FitFailure, MixedFit, MixedProblem, Restriction};
pub use layout::{Layout, YesNoRow};
pub use marginal::AnimalRows;
pub use quadrature::{HermiteRule, ProductGrid};
pub use tally::{RandomEffectsTally, RandomEffectsTestTally};
