//! Errors from opening and reading an archive.

use std::path::PathBuf;

use crate::limits::LimitName;

pub type Result<T> = std::result::Result<T, Error>;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error("{path}: cannot open: {cause}")]
    Open {
        path: PathBuf,
        /// Said in the message and not also given as `source()`, so a printed error
        /// chain says it once.
        cause: std::io::Error,
    },
    #[error("{path}: not a zip file or a folder")]
    NotAnArchive { path: PathBuf },
    #[error("{path}: the zip file is damaged or truncated: {detail}")]
    BadZip { path: PathBuf, detail: String },
    #[error(
        "{entry}: stored encrypted; telltale cannot read encrypted entries (unpack the archive with its password first)"
    )]
    Encrypted { entry: String },
    #[error(
        "{entry}: compressed with a method telltale does not read ({detail}); unpack the archive and point telltale at the folder"
    )]
    Unsupported { entry: String, detail: String },
    #[error("{entry}: cannot read: {detail}")]
    Read { entry: String, detail: String },
    #[error(
        "{context}: over the limit on {what} ({limit}); raise it with --limit {key}=VALUE if the archive is trusted",
        what = name.describe(),
        key = name.key()
    )]
    Limit {
        context: String,
        name: LimitName,
        limit: String,
    },
    #[error("{entry}: no such entry in the archive")]
    NoEntry { entry: String },
}
