//! Reference priors: the population statistics the observer is assumed to have. A JSON
//! file (format 1, documented in docs/priors.md) lists the protected attributes with
//! their values, base rates, alert thresholds and calibration, and the reference items
//! with their members' counts per attribute value, with provenance (source, licence,
//! method, differential-privacy parameters). Loading checks it into a columnar store and
//! builds the index that matches an archive's items by id or normalised name; a large
//! file's checked form is cached in binary so later loads skip the JSON.

mod bin;
mod cache;
mod check;
mod error;
mod file;
mod index;
mod model;
mod seeds;
mod store;
mod stream;
mod write;

pub use cache::{
    CACHE_DIR_ENV, CACHE_VERSION, MIN_CACHED_BYTES, MIN_CACHED_ITEMS, cache_dir, cache_path,
    disable_cache, hash_file, is_cache_problem,
};
pub(crate) use cache::{
    HEADER_LEN as CACHE_HEADER_LEN, decode_from as decode_cache, encode as encode_cache,
};
pub use check::short as short_name;
pub use error::{Error, Result};
pub use file::{
    AttributeSpec, Calibration, FORMAT, ItemSpec, MemberSpec, PriorsFile, PrivacySpec, Provenance,
    ValueSpec,
};
pub use index::MatchedBy;
pub use model::{AttrValue, Attribute, DEFAULT_SMOOTHING, Priors, REMAINDER_ID};
pub use store::PriorItem;
pub use write::{write_priors, write_priors_streaming};

#[cfg(test)]
mod limit_tests;
#[cfg(test)]
mod tests;
