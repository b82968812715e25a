//! The mapping file: how to read one archive layout. A mapping names sources (likes,
//! groups, follows, events, friends, and the person's own declared attributes), the
//! files inside the archive that hold each (globs), their format (JSON, NDJSON, CSV),
//! where the records are (a JSONPath query, RFC 9535) and which fields hold the name,
//! id, category and date. Parsing goes in two steps: a raw serde structure, then a
//! checked [`Mapping`] with every problem reported at once, by line and field.
//! [`draft`] writes a first mapping from an archive's structure and
//! [`check_against`] shows what each source of a mapping matches in an archive.

mod check;
pub mod draft;
mod error;
mod locate;
mod model;
mod raw;

pub use check::{MappingCheck, SourceCheck, check_against};
pub use draft::{Draft, draft};
pub use error::{Error, Problem, Result};
pub use locate::{FoundMapping, MAPPING_FILE_NAME, beside_mapping, locate, locate_within};
pub use model::{DateFormat, Field, Format, Mapping, Repair, Source, SourceKind};
