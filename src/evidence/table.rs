//! Evidence from the priors table: each archive item matched to a reference item gives,
//! for every attribute the reference item has counts for, the smoothed member
//! distribution and its likelihood ratios. Both are taken against the membership rates
//! μ(v) (the share of all memberships held by people with value v), which is what
//! multinomial naive Bayes over memberships prescribes: `P(i|v)/P(i) = p_i(v)/μ(v)`.
//! An item whose members look like everyone's memberships then carries no evidence,
//! even where people with some values join more items overall. Smoothing is described
//! at [`crate::stats::smooth_against`]. Counts released with noise (a priors file that
//! records its noise variance) first become the clean sample they are worth
//! ([`crate::stats::noise_equivalent`]), so an item whose counts sit within the noise
//! adds about nothing; its support is then that sample's size.
//!
//! Evidence depends only on the attribute and the counts, and large tables repeat the
//! same counts many times (items with a handful of members), so items whose counts are
//! equal share one set of numbers: the same numbers, computed once.

use std::sync::Arc;

use foldhash::{HashMap, HashMapExt};

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use crate::footprint::Footprint;
use crate::priors::{MatchedBy, Priors};
use crate::stats::{noise_equivalent, smooth_against};

/// Add the priors-table evidence for every matched item.
pub fn from_table(footprint: &Footprint, priors: &Priors, set: &mut EvidenceSet) {
    // Match first, so that the evidence list is made at its final size (it is the
    // largest thing a scan holds when a large reference table matches most items).
    let matched: Vec<(usize, usize, MatchedBy)> = footprint
        .items
        .iter()
        .enumerate()
        .filter_map(|(i, item)| priors.find(item).map(|(ri, by)| (i, ri, by)))
        .collect();
    set.matched_items += matched.len();
    let pieces: usize = matched
        .iter()
        .map(|&(_, ri, _)| priors.item(ri).attributes().count())
        .sum();
    set.list.reserve_exact(pieces);
    let mut counts = Vec::new();
    // Counts released with noise are worth fewer members (docs/priors.md).
    let noise = priors
        .provenance
        .privacy
        .as_ref()
        .map_or(0.0, |p| p.item_count_variance());
    // (attribute, coding, coded counts) → the evidence already made from them.
    let mut made: HashMap<(usize, u8, &[u8]), usize> = HashMap::new();
    for (i, ri, matched_by) in matched {
        let reference = priors.item(ri);
        let name: Arc<str> = reference.name().into();
        for ai in reference.attributes() {
            let origin = Origin::Table {
                matched_by,
                reference: name.clone(),
            };
            let key = reference
                .coded_counts(ai)
                .map(|(tag, bytes)| (ai, tag, bytes));
            if let Some(&at) = key.as_ref().and_then(|k| made.get(k)) {
                let e = set.list[at].sharing(Subject::Item(i), origin);
                set.push(e);
                continue;
            }
            reference.counts_into(ai, &mut counts);
            let attr = &priors.attributes[ai];
            if noise > 0.0 {
                counts = noise_equivalent(&counts, noise);
            }
            let (p, q) = smooth_against(
                &counts,
                &attr.member_rates,
                attr.smoothing,
                attr.pseudocount,
            );
            let support = counts.iter().sum();
            if let Some(k) = key {
                made.insert(k, set.list.len());
            }
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                ai,
                p,
                &q,
                support,
                origin,
            ));
        }
    }
}
