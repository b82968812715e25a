//! Counting a cohort's memberships with each contributor's influence bounded. A person
//! contributes to at most `max_items` items (a uniform random choice among their own
//! matched items, made with the seeded generator and nothing but that person's list),
//! so adding or removing one person changes each attribute's item-by-value histogram
//! by at most `max_items` in L1 norm, and each attribute's population histogram by 1.

use rand::Rng;
use rand::seq::index::sample;

use super::load::Member;

/// Exact counts (before any noise).
#[derive(Debug, Clone, PartialEq)]
pub struct Counts {
    /// `items[i][a][v]`: counted members of candidate item `i` with value `v` of
    /// attribute `a`.
    pub items: Vec<Vec<Vec<f64>>>,
    /// `people[a][v]`: contributors who declared value `v` of attribute `a`.
    pub people: Vec<Vec<f64>>,
    /// Contributors counted.
    pub contributors: f64,
}

/// Each member's counted items: all of them when they have at most `max_items`,
/// otherwise a uniform random subset of that size (sorted).
pub fn bound_contributions(
    members: &[Member],
    max_items: usize,
    rng: &mut impl Rng,
) -> Vec<Vec<u32>> {
    members
        .iter()
        .map(|m| {
            if m.items.len() <= max_items {
                m.items.clone()
            } else {
                let mut pick: Vec<u32> = sample(rng, m.items.len(), max_items)
                    .into_iter()
                    .map(|k| m.items[k])
                    .collect();
                pick.sort_unstable();
                pick
            }
        })
        .collect()
}

/// Count `members` (each through its `counted` items) against `n_items` candidates and
/// attributes with `cardinalities` values.
pub fn count(
    members: &[Member],
    counted: &[Vec<u32>],
    n_items: usize,
    cardinalities: &[usize],
) -> Counts {
    let empty: Vec<Vec<f64>> = cardinalities.iter().map(|&k| vec![0.0; k]).collect();
    let mut items = vec![empty.clone(); n_items];
    let mut people = empty;
    for (m, list) in members.iter().zip(counted) {
        for (a, v) in m.values.iter().enumerate() {
            let Some(v) = *v else { continue };
            people[a][v] += 1.0;
            for &i in list {
                items[i as usize][a][v] += 1.0;
            }
        }
    }
    Counts {
        items,
        people,
        contributors: members.len() as f64,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;
    use rand_chacha::ChaCha8Rng;

    fn member(items: &[u32], values: &[Option<usize>]) -> Member {
        Member {
            items: items.to_vec(),
            values: values.to_vec(),
        }
    }

    // The sensitivity the privacy accounting relies on (Dwork & Roth 2014, §3.3:
    // L1 sensitivity is the largest change one person can make): removing any one
    // member changes an attribute's item histogram by at most max_items and its
    // population histogram by at most 1.
    #[test]
    fn one_member_moves_each_histogram_by_at_most_the_bound() {
        let members = vec![
            member(&[0, 1, 2, 3, 4, 5], &[Some(0), Some(1)]),
            member(&[1, 2], &[Some(1), None]),
            member(&[0, 5], &[Some(0), Some(0)]),
        ];
        let max_items = 3;
        let mut rng = ChaCha8Rng::seed_from_u64(1);
        let counted = bound_contributions(&members, max_items, &mut rng);
        assert_eq!(counted[0].len(), 3);
        assert!(counted[0].iter().all(|i| members[0].items.contains(i)));
        let all = count(&members, &counted, 6, &[2, 2]);
        for drop in 0..members.len() {
            let rest: Vec<Member> = members
                .iter()
                .enumerate()
                .filter(|(j, _)| *j != drop)
                .map(|(_, m)| m.clone())
                .collect();
            let rest_counted: Vec<Vec<u32>> = counted
                .iter()
                .enumerate()
                .filter(|(j, _)| *j != drop)
                .map(|(_, c)| c.clone())
                .collect();
            let fewer = count(&rest, &rest_counted, 6, &[2, 2]);
            for a in 0..2 {
                let l1_items: f64 = (0..6)
                    .flat_map(|i| (0..2).map(move |v| (i, v)))
                    .map(|(i, v)| (all.items[i][a][v] - fewer.items[i][a][v]).abs())
                    .sum();
                let l1_people: f64 = (0..2)
                    .map(|v| (all.people[a][v] - fewer.people[a][v]).abs())
                    .sum();
                assert!(l1_items <= max_items as f64);
                assert!(l1_people <= 1.0);
            }
        }
    }
}
