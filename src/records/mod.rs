//! Turning one mapped file's bytes into records and records into field values: text
//! decoding (BOM, invalid UTF-8), the JSON, NDJSON and CSV readers, the JSONPath record
//! selector, cutting a large JSON file at its records array as it is read (split.rs),
//! and date parsing. Problems with single records become warnings; the rest of the
//! file is still read.

mod date;
mod decode;
mod prune;
mod reader;
mod split;
mod value;

pub use date::parse_date;
pub use decode::{decode_text, json_depth};
pub use prune::Keep;
pub use reader::{Record, RecordSink, read_records, records_found_nothing};
pub use split::{Split, SplitPlan, Unsplit, split_records};
pub use value::{FieldError, field_text, field_value};

/// What is wrong with a JSON text, without the " at line L column C" serde_json adds:
/// every message that shows it says the place itself, so it is said once.
pub fn json_reason(e: &serde_json::Error) -> String {
    let full = e.to_string();
    let place = format!(" at line {} column {}", e.line(), e.column());
    match full.strip_suffix(&place) {
        Some(reason) => reason.to_string(),
        None => full,
    }
}
