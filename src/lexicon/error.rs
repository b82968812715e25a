//! Errors from reading a lexicon file (gazetteer, life-stage rules, vocabulary).

pub type Result<T> = std::result::Result<T, Error>;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("{file}: cannot read the lexicon: {cause}")]
    Read {
        file: String,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{file}: line {line}: {message}")]
    Line {
        file: String,
        line: usize,
        message: String,
    },
    #[error("{file}: not valid TOML: {message}")]
    Syntax { file: String, message: String },
    #[error("{file}: the lexicon has {}:\n{}", crate::reading::count(problems.len(), "problem", "problems"), list(problems))]
    Invalid { file: String, problems: Vec<String> },
}

fn list(problems: &[String]) -> String {
    problems
        .iter()
        .map(|p| format!("  - {p}"))
        .collect::<Vec<_>>()
        .join("\n")
}
