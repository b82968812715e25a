//! Evidence from the priors table: each archive item matched to a reference item gives,
//! for every attribute the reference item has counts for, the smoothed member
//! distribution and its likelihood ratios. Both are taken against the membership rates
//! μ(v) (the share of all memberships held by people with value v), which is what
//! multinomial naive Bayes over memberships prescribes: `P(i|v)/P(i) = p_i(v)/μ(v)`.
//! An item whose members look like everyone's memberships then carries no evidence,
//! even where people with some values join more items overall. Smoothing is described
//! at [`crate::stats::smooth_against`].

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use crate::footprint::Footprint;
use crate::priors::Priors;
use crate::stats::smooth_against;

/// Add the priors-table evidence for every matched item.
pub fn from_table(footprint: &Footprint, priors: &Priors, set: &mut EvidenceSet) {
    let mut counts = Vec::new();
    for (i, item) in footprint.items.iter().enumerate() {
        let Some((ri, matched_by)) = priors.find(item) else {
            continue;
        };
        set.matched_items += 1;
        let reference = priors.item(ri);
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
                    reference: reference.name().to_string(),
                },
            ));
        }
    }
}
