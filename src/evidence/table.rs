//! Evidence from the priors table: each archive item matched to a reference item gives,
//! for every attribute the reference item has counts for, the smoothed member
//! distribution and its likelihood ratios. Both are taken against the membership rates
//! μ(v) (the share of all memberships held by people with value v), which is what
//! multinomial naive Bayes over memberships prescribes: `P(i|v)/P(i) = p_i(v)/μ(v)`.
//! An item whose members look like everyone's memberships then carries no evidence,
//! even where people with some values join more items overall. Smoothing is described
//! at [`crate::stats::smooth_against`].

use std::sync::Arc;

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use crate::footprint::Footprint;
use crate::priors::{MatchedBy, Priors};
use crate::stats::smooth_against;

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
    for (i, ri, matched_by) in matched {
        let reference = priors.item(ri);
        let name: Arc<str> = reference.name().into();
        for ai in reference.attributes() {
            reference.counts_into(ai, &mut counts);
            let attr = &priors.attributes[ai];
            let (p, q) = smooth_against(
                &counts,
                &attr.member_rates,
                attr.smoothing,
                attr.pseudocount,
            );
            let support = counts.iter().sum();
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                ai,
                p,
                &q,
                support,
                Origin::Table {
                    matched_by,
                    reference: name.clone(),
                },
            ));
        }
    }
}
