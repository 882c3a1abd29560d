//! Random streams and count sampling. Knows nothing of fitting.
//!
//! Counts, not trials, are simulated: hits ~ Binomial(n_present, H), false alarms ~
//! Binomial(n_absent, F), and multinomial category counts for rating designs.

mod binomial_table;
mod multinomial;
mod stream;

pub use binomial_table::BinomialTable;
pub use multinomial::multinomial_into;
pub use stream::{ReplicateRng, replicate_rng};
