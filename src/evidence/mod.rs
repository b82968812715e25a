//! Evidence: for each visible item (and the friend list) and each protected attribute,
//! the likelihood ratios `L(v) = p(v)/π(v)` an observer would apply, with the item's
//! homogeneity, its information in bits, the support behind it and where it comes from
//! (the priors table, a lexicon, friends, the user's own marks). Every evidence source
//! produces the same [`Evidence`] so inference treats them alike; [`Sources`] says
//! which run. Sources and their numbers are described in docs/evidence.md.

mod beliefs;
mod friends;
mod gather;
mod home;
mod life_stage;
mod model;
mod places;
mod sources;
mod table;

pub use friends::{FRIEND_SMOOTHING, from_friends, relational_neighbour};
pub use gather::gather;
pub use home::{
    ELSEWHERE, HOME_COUNTRY, HOME_MAX_RATIO, HOME_REGION, HOME_TEMPERATURE, HOME_THRESHOLDS,
    HOME_TOWN, Level, TOWN_CAP, fit_home_levels, is_home_level,
};
pub use life_stage::{
    AgeBands, StageTime, age_bands, band_shares, newest_date, parse_age_range, year_of,
};
pub use model::{
    Evidence, EvidenceSet, Figures, FriendStats, LexiconRule, Nesting, Origin, SpecialFlag, Subject,
};
pub use places::{
    LOCALITY_SHARE, LocationValues, NamedPlace, NamedPlaces, PlaceCode, location_attributes,
    place_likelihoods, value_code,
};
pub use sources::{Lexicon, SourceKind, Sources};
pub use table::from_table;
