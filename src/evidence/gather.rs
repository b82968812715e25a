//! Running the evidence sources over a footprint. The priors table goes first; the
//! lexicon sources (places, life stages, vocabulary) then speak only for the item ×
//! attribute pairs the table said nothing about, so one membership is never counted
//! twice. Friends add one piece of evidence per attribute for the friend list as a
//! whole. Special-category flags are raised on every item, matched or not.

use std::collections::HashSet;

use super::beliefs::from_vocabulary;
use super::friends::from_friends;
use super::life_stage::{from_life_stages, newest_date};
use super::model::{EvidenceSet, Subject};
use super::places::from_places;
use super::sources::Sources;
use super::table::from_table;
use crate::footprint::Footprint;
use crate::priors::Priors;

/// Gather the evidence the chosen sources give for a footprint.
pub fn gather(footprint: &Footprint, priors: &Priors, sources: &Sources) -> EvidenceSet {
    let mut set = EvidenceSet::new(footprint.items.len());
    set.sources = sources.enabled();
    if sources.table {
        from_table(footprint, priors, &mut set);
    }
    let table: HashSet<(usize, usize)> = set
        .list
        .iter()
        .filter_map(|e| match e.subject {
            Subject::Item(i) => Some((i, e.attribute)),
            Subject::FriendList => None,
        })
        .collect();
    let covered = |item: usize, attribute: usize| table.contains(&(item, attribute));
    if let Some(gazetteer) = &sources.places {
        from_places(footprint, priors, gazetteer, &covered, &mut set);
    }
    if let Some(rules) = &sources.life_stages {
        let reference = sources
            .reference_time
            .or_else(|| newest_date(footprint))
            .unwrap_or_else(now);
        set.reference_time = Some(reference);
        from_life_stages(footprint, priors, rules, reference, &covered, &mut set);
    }
    if let Some(vocabulary) = &sources.vocabulary {
        from_vocabulary(footprint, priors, vocabulary, &covered, &mut set);
    }
    if sources.friends {
        from_friends(footprint, priors, &mut set);
    }
    set
}

fn now() -> i64 {
    std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_secs() as i64)
        .unwrap_or(0)
}
