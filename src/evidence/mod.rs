//! Evidence: for each visible item (and the friend list) and each protected attribute,
//! the likelihood ratios `L(v) = p(v)/π(v)` an observer would apply, with the item's
//! homogeneity, its information in bits, the support behind it and where it comes from
//! (the priors table, a lexicon, friends, the user's own marks). Every evidence source
//! produces the same [`Evidence`] so inference treats them alike.

mod model;
mod table;

pub use model::{Evidence, EvidenceSet, Origin, Subject};
pub use table::from_table;

use crate::footprint::Footprint;
use crate::priors::Priors;

/// Gather the evidence every available source gives for a footprint.
pub fn gather(footprint: &Footprint, priors: &Priors) -> EvidenceSet {
    let mut set = EvidenceSet::new(footprint.items.len());
    from_table(footprint, priors, &mut set);
    set
}
