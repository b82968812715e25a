//! Errors that stop a cohort from being read or built at all. Problems with single
//! archives are warnings; the rest of the cohort goes on.

use std::path::PathBuf;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("cannot read the cohort folder {dir}: {cause}")]
    ReadDir {
        dir: PathBuf,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{dir}: no archive could be read ({}; see the warnings)", crate::reading::count(*warnings, "problem", "problems"))]
    Empty { dir: PathBuf, warnings: usize },
    #[error(
        "the schema has no candidate items: give --schema a priors file whose items list the pages, groups and accounts to count"
    )]
    NoCandidates,
    #[error("{0}")]
    Params(String),
}

pub type Result<T> = std::result::Result<T, Error>;
