//! Cohorts: reference statistics from a consenting group. Many archives, each with its
//! mapping and a self-declared attributes file, are read into [`Member`]s (which
//! candidate items each person shows, and their declared values); their memberships
//! are counted with each person's influence bounded, released with the Laplace
//! mechanism ([`privacy`]), and written as a priors file; smoothing and a logistic
//! calibration can be fitted on the labelled members ([`fit`]). The evaluation
//! (`crate::eval`) reuses all of it.

mod counts;
mod error;
pub mod fit;
mod load;
pub mod privacy;
mod release;

pub use counts::{Counts, bound_contributions, count};
pub use error::{Error, Result};
pub use load::{Cohort, Member, Schema, list_archives, load_cohort, read_member};
pub use release::{BuildParams, Built, Table, build_file, exact_table, noisy_table};
