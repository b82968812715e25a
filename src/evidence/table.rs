//! Evidence from the priors table: each archive item matched to a reference item gives,
//! for every attribute the reference item has counts for, the smoothed member
//! distribution and its likelihood ratios.

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use crate::footprint::Footprint;
use crate::priors::Priors;
use crate::stats::smooth;

/// Add the priors-table evidence for every matched item.
pub fn from_table(footprint: &Footprint, priors: &Priors, set: &mut EvidenceSet) {
    for (i, item) in footprint.items.iter().enumerate() {
        let Some((ri, matched_by)) = priors.find(item) else {
            continue;
        };
        set.matched_items += 1;
        let reference = &priors.items[ri];
        for (ai, counts) in &reference.members {
            let attr = &priors.attributes[*ai];
            let p = smooth(counts, &attr.base_rates, attr.smoothing);
            let support = counts.iter().sum();
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                *ai,
                p,
                &attr.base_rates,
                support,
                Origin::Table {
                    matched_by,
                    reference: reference.name.clone(),
                },
            ));
        }
    }
}
