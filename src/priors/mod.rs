//! Reference priors: the population statistics the observer is assumed to have. A JSON
//! file (format 1, documented in docs/priors.md) lists the protected attributes with
//! their values, base rates, alert thresholds and calibration, and the reference items
//! with their members' counts per attribute value, with provenance (source, licence,
//! method, differential-privacy parameters). Loading checks it and builds the indexes
//! that match an archive's items by id or normalised name.

mod error;
mod file;
mod index;
mod model;
mod write;

pub use error::{Error, Result};
pub use file::{
    AttributeSpec, Calibration, FORMAT, ItemSpec, MemberSpec, PriorsFile, PrivacySpec, Provenance,
    ValueSpec,
};
pub use index::MatchedBy;
pub use model::{AttrValue, Attribute, DEFAULT_SMOOTHING, PriorItem, Priors};
pub use write::{write_priors, write_priors_streaming};
