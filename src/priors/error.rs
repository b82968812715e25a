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
    #[error("{file}: the priors file has {}:\n{}", crate::reading::count(problems.len(), "problem", "problems"), problems.iter().map(|p| format!("  - {p}")).collect::<Vec<_>>().join("\n"))]
    Invalid { file: String, problems: Vec<String> },
}
