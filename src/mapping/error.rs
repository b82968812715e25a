//! Errors from reading and checking a mapping file.

use std::fmt;

pub type Result<T> = std::result::Result<T, Error>;

/// One thing wrong with a mapping file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// 1-based line in the mapping file, when known.
    pub line: Option<usize>,
    /// Which setting: `source[2].name`, `format`, …
    pub field: String,
    pub message: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(line) => write!(f, "line {line}, {}: {}", self.field, self.message),
            None => write!(f, "{}: {}", self.field, self.message),
        }
    }
}

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("{file}: the mapping file is {size}, over the limit of {limit} (mapping-bytes: the size of a mapping file); {hint}",
        size = crate::limits::human_bytes(*size), limit = crate::limits::human_bytes(*limit),
        hint = crate::limits::LimitName::MappingBytes.raise_hint())]
    TooBig { file: String, size: u64, limit: u64 },
    #[error("{file}: cannot read the mapping file: {cause}")]
    Read {
        file: String,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{file}: line {line}, column {column}: not valid TOML: {message}")]
    Syntax {
        file: String,
        line: usize,
        column: usize,
        message: String,
    },
    #[error("{file}: the mapping has {}:\n{}", crate::reading::count(problems.len(), "problem", "problems"), list(problems))]
    Invalid {
        file: String,
        problems: Vec<Problem>,
    },
    #[error(
        "no mapping file for {archive}: telltale needs one to know where your likes, groups and friends are.\n\
         Pass --mapping FILE, or put '{name}' inside the archive, or '{draft_to}' or '{name}' beside it.\n\
         To start one, run: telltale mapping draft {archive} > {draft_to}\n\
         (then check it with: telltale mapping check {archive}; docs/mapping.md explains every setting)",
        name = super::MAPPING_FILE_NAME
    )]
    NotFound {
        archive: String,
        /// Where a draft is found without --mapping: the mapping named after the
        /// archive, beside it.
        draft_to: String,
    },
}

fn list(problems: &[Problem]) -> String {
    problems
        .iter()
        .map(|p| format!("  - {p}"))
        .collect::<Vec<_>>()
        .join("\n")
}
