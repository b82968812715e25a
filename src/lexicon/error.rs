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

/// Parse a lexicon file's TOML, naming the file on a syntax error.
pub(super) fn parse_toml<T: serde::de::DeserializeOwned>(text: &str, origin: &str) -> Result<T> {
    toml::from_str(text).map_err(|e| Error::Syntax {
        file: origin.to_string(),
        message: e.to_string(),
    })
}

/// The list a lexicon's problems are gathered in, opened with one about the format
/// version when the file's is not the one this build reads.
pub(super) fn format_problems(found: i64, expected: i64) -> Vec<String> {
    if found == expected {
        Vec::new()
    } else {
        vec![format!(
            "format {found} is not the format this telltale reads ({expected})"
        )]
    }
}

/// `Ok(value)` when no problem was found, else every problem at once, naming the file.
pub(super) fn checked<T>(value: T, problems: Vec<String>, origin: &str) -> Result<T> {
    if problems.is_empty() {
        Ok(value)
    } else {
        Err(Error::Invalid {
            file: origin.to_string(),
            problems,
        })
    }
}
