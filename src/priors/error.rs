//! Errors from loading a priors file.

pub type Result<T> = std::result::Result<T, Error>;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("{file}: cannot read the priors file: {cause}")]
    Read {
        file: String,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{file}: line {line}, column {column}: {message}")]
    Syntax {
        file: String,
        line: usize,
        column: usize,
        message: String,
    },
    #[error("{file}: this priors file is format {found}; this telltale reads format {expected}")]
    Version {
        file: String,
        found: String,
        expected: u32,
    },
    #[error("{file}: {what}, over the limit of {limit} ({key}: the {describe}); {hint}",
        limit = name.show(*limit), key = name.key(), describe = name.describe(), hint = name.raise_hint())]
    Limit {
        file: String,
        /// What is over the limit and by how much, e.g. "the file is 600.0 MiB" or
        /// "attributes[0] (politics) has 100,000 values".
        what: String,
        name: crate::limits::LimitName,
        limit: u64,
    },
    #[error("{file}: the priors file has {}:\n{}", crate::reading::count(problems.len(), "problem", "problems"), problems.iter().map(|p| format!("  - {p}")).collect::<Vec<_>>().join("\n"))]
    Invalid { file: String, problems: Vec<String> },
}
