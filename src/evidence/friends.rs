//! Evidence from friends: where the archive (through the mapping's
//! `[source.attributes]`) or the user's friends file gives some friends' attributes,
//! the weighted-vote relational neighbour estimate (Macskassy & Provost, "Classification
//! in Networked Data", JMLR 2007) says what the person's own value probably is: the
//! weight-normalised vote of the friends whose value is known,
//! `P(v) = Σ_j w_j·[x_j = v] / Σ_j w_j`. Archives say nothing about tie strength, so
//! every friend weighs 1 here; [`relational_neighbour`] takes weights for graphs that
//! have them.
//!
//! The estimate is smoothed toward the base rates with `α` pseudo-friends,
//! `D(v) = (n·P(v) + α·π(v)) / (n + α)`, where `α` is [`FRIEND_SMOOTHING`] per value of
//! the attribute (one pseudo-friend per value, as in add-one smoothing), so a few known
//! friends do not decide anything and an attribute with many values (51 home regions)
//! needs more friends than one with few; the estimate then enters the posterior as one piece of evidence about the
//! friend list as a whole ([`Subject::FriendList`]): making the friend list private
//! is one toggle. Friends' names never leave this module.

use super::model::{Evidence, EvidenceSet, FriendStats, Origin, Subject};
use crate::footprint::Footprint;
use crate::priors::Priors;

/// Pseudo-friends per attribute value, spread at the base rates, added to the vote
/// (common practice, no source: add-one smoothing).
pub const FRIEND_SMOOTHING: f64 = 1.0;

/// Weighted-vote relational neighbour: the class distribution implied by neighbours
/// with known classes, given as `(class, weight)`. `None` when no neighbour with a
/// positive weight is known.
pub fn relational_neighbour(neighbours: &[(usize, f64)], classes: usize) -> Option<Vec<f64>> {
    let mut votes = vec![0.0; classes];
    let mut total = 0.0;
    for &(c, w) in neighbours {
        if c < classes && w.is_finite() && w > 0.0 {
            votes[c] += w;
            total += w;
        }
    }
    (total > 0.0).then(|| votes.into_iter().map(|v| v / total).collect())
}

/// Count what is known about the friends and add one friend-list evidence per
/// attribute with known values.
pub fn from_friends(footprint: &Footprint, priors: &Priors, set: &mut EvidenceSet) {
    let total = footprint.friends.len();
    let mut stats = FriendStats {
        total,
        known: vec![0; priors.attributes.len()],
        unreadable: vec![0; priors.attributes.len()],
    };
    for (ai, attr) in priors.attributes.iter().enumerate() {
        let mut votes = Vec::new();
        for f in &footprint.friends {
            let Some(text) = f.attributes.get(&attr.id) else {
                continue;
            };
            match attr.value_index(text) {
                Some(v) => votes.push((v, 1.0)),
                None => stats.unreadable[ai] += 1,
            }
        }
        stats.known[ai] = votes.len();
        let Some(shares) = relational_neighbour(&votes, attr.values.len()) else {
            continue;
        };
        let n = votes.len() as f64;
        let a = FRIEND_SMOOTHING * attr.values.len() as f64;
        let dist: Vec<f64> = shares
            .iter()
            .zip(&attr.base_rates)
            .map(|(p, b)| (n * p + a * b) / (n + a))
            .collect();
        set.push(Evidence::from_distribution(
            Subject::FriendList,
            ai,
            dist,
            &attr.base_rates,
            n,
            Origin::Friends {
                known: votes.len(),
                total,
            },
        ));
    }
    set.friends = Some(stats);
}

#[cfg(test)]
mod tests {
    use super::*;

    // Worked by hand from the definition: neighbours of classes 0, 0, 1 with weights
    // 1, 2, 3 vote 3/6 for class 0 and 3/6 for class 1.
    #[test]
    fn votes_are_weight_normalised() {
        let p = relational_neighbour(&[(0, 1.0), (0, 2.0), (1, 3.0)], 3).unwrap();
        assert_eq!(p, vec![0.5, 0.5, 0.0]);
        assert_eq!(relational_neighbour(&[], 2), None);
        assert_eq!(relational_neighbour(&[(0, 0.0), (5, 1.0)], 2), None);
    }
}
