//! Lexicons: the reference word lists evidence sources read item names with. A
//! gazetteer of places (GeoNames, CC BY 4.0), life-stage rules (ages at graduation,
//! parenthood, retirement …), belief and special-category vocabulary, and the words
//! the mapping drafter reads record kinds with, all data
//! files in reference-priors/lexicons/ compiled into the binary and documented in
//! docs/evidence.md, plus the phrase matcher they share.

mod bundled;
mod error;
mod gazetteer;
mod key_image;
mod keys;
mod life_stages;
mod phrase;
mod place_cues;
mod record_kinds;
mod special;
mod vocabulary;

pub use bundled::{
    gazetteer as bundled_gazetteer, life_stages as bundled_life_stages,
    place_cues as bundled_place_cues, record_kinds as bundled_record_kinds,
    release as release_bundled, vocabulary as bundled_vocabulary,
};
pub use error::{Error, Result};
pub use gazetteer::{Candidate, City, CityRef, Country, Gazetteer, Mention, PlaceRef, Region};
pub use life_stages::{Calendar, Level, LifeStages, Rule, Stage, StageMatch};
pub use phrase::{Hit, Pattern, PhraseIndex, YearToken, is_unspaced, tokens};
pub use place_cues::{CueKind, PlaceCues, PlaceRole, Strengths};
pub use record_kinds::{RecordKind, RecordKinds};
pub use special::SpecialCategory;
pub use vocabulary::{Term, TermMatch, Vocabulary};
