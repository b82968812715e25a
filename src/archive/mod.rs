//! Reading a person's archive, zipped or unpacked, without trusting it: entries are
//! listed first, only the entries a mapping asks for are read, and every read is
//! bounded by [`Limits`](crate::limits::Limits).

mod error;
mod folder;
mod reader;
mod zipped;

pub use error::{Error, Result};
pub use reader::{Archive, CHUNK, Entry, ReadBudget};
