//! The items of the large benchmark world: a million or more invented pages and groups,
//! each made on demand from its number alone (name, id, kind, the attribute value it
//! points at and its member counts), so the large archive and the large reference table
//! agree without either being held in memory. Names are unique by construction: the
//! number is scrambled and read as digits of adjective × topic × collective × town.

use rand::Rng;

use super::demo::stream;
use super::places::STATES;
use super::words::{ADJECTIVES, COLLECTIVES, TOPICS};
use super::world::{
    AGE, AGE_BANDS, LOCATION, POLITICS, POLITICS_VALUES, RELIGION, RELIGION_VALUES, cardinalities,
    is_ordinal, round6,
};
use crate::footprint::ItemKind;

/// Random-stream purposes at and above this are per-item streams (item `j` uses
/// `ITEM_STREAMS + j`), far from the purposes the other generators use.
const ITEM_STREAMS: u64 = 1 << 40;

/// Towns of every state, flattened, with their state index.
fn towns() -> Vec<(&'static str, usize)> {
    STATES
        .iter()
        .enumerate()
        .flat_map(|(s, st)| st.3.iter().map(move |t| (*t, s)))
        .collect()
}

/// How many distinct names the scheme can make.
pub fn name_space() -> u64 {
    (ADJECTIVES.len() * TOPICS.len() * COLLECTIVES.len() * towns().len()) as u64
}

/// Multiplier that scrambles item numbers; coprime with the name space (checked in a
/// test), so different numbers give different names.
const SCRAMBLE: u64 = 1_000_003;

/// One invented item of the large world.
#[derive(Debug, Clone, PartialEq)]
pub struct LargeItem {
    pub id: String,
    pub name: String,
    pub kind: ItemKind,
    pub category: &'static str,
    /// The attribute the item points at and the value it points at, if any.
    pub focus: Option<(usize, usize)>,
    /// Member counts per attribute (attribute order of the generator), whole numbers.
    pub counts: [Vec<f64>; 4],
}

/// Population shares per attribute value, the observer's prior in the large world.
pub fn base_rates() -> [Vec<f64>; 4] {
    let norm = |v: Vec<f64>| {
        let t: f64 = v.iter().sum();
        v.into_iter().map(|x| round6(x / t)).collect::<Vec<f64>>()
    };
    [
        norm(AGE_BANDS.iter().map(|v| v.2).collect()),
        norm(STATES.iter().map(|s| s.2).collect()),
        norm(POLITICS_VALUES.iter().map(|v| v.2).collect()),
        norm(RELIGION_VALUES.iter().map(|v| v.2).collect()),
    ]
}

/// Shares of item focus (common practice, no source: most affiliations are hobbies).
const FOCUS: [(Option<usize>, f64); 5] = [
    (None, 0.5),
    (Some(AGE), 0.13),
    (Some(LOCATION), 0.17),
    (Some(POLITICS), 0.1),
    (Some(RELIGION), 0.1),
];

/// Makes items by number. Holds the lookup tables once.
pub struct ItemMaker {
    seed: u64,
    towns: Vec<(&'static str, usize)>,
    rates: [Vec<f64>; 4],
}

impl ItemMaker {
    pub fn new(seed: u64) -> ItemMaker {
        ItemMaker {
            seed,
            towns: towns(),
            rates: base_rates(),
        }
    }

    /// The name and the state of its town for item `j`.
    fn name(&self, j: u64) -> (String, usize) {
        let space = name_space();
        let mut x = (j.wrapping_mul(SCRAMBLE).wrapping_add(self.seed)) % space;
        let mut digit = |n: usize| {
            let d = (x % n as u64) as usize;
            x /= n as u64;
            d
        };
        let a = digit(ADJECTIVES.len());
        let t = digit(TOPICS.len());
        let c = digit(COLLECTIVES.len());
        let (town, state) = self.towns[digit(self.towns.len())];
        (
            format!(
                "{} {} {} of {town}",
                ADJECTIVES[a], TOPICS[t], COLLECTIVES[c]
            ),
            state,
        )
    }

    /// Item number `j` (any number below [`name_space`]).
    pub fn item(&self, j: u64) -> LargeItem {
        let mut rng = stream(self.seed, ITEM_STREAMS + j);
        let (name, state) = self.name(j);
        let kind = if rng.random_bool(0.85) {
            ItemKind::Like
        } else {
            ItemKind::Group
        };
        let k = cardinalities();
        let mut pick: f64 = rng.random();
        let focus_attr = FOCUS
            .iter()
            .find(|f| {
                pick -= f.1;
                pick <= 0.0
            })
            .and_then(|f| f.0);
        let focus = focus_attr.map(|a| {
            let v = if a == LOCATION {
                state
            } else {
                rng.random_range(0..k[a])
            };
            (a, v)
        });
        let strength = match focus_attr {
            Some(AGE) => rng.random_range(1.0..2.6),
            Some(LOCATION) => rng.random_range(2.5..4.5),
            Some(POLITICS) => rng.random_range(0.8..2.2),
            Some(_) => rng.random_range(1.2..3.0),
            None => 0.0,
        };
        // A weak random pull on one attribute for every item (hobbies lean a little).
        let weak_attr = rng.random_range(0..4);
        let weak = (weak_attr, rng.random_range(0..k[weak_attr]), 0.4);
        let log_n: f64 = 4.0 + 1.1 * super::membership::normal(&mut rng);
        let n = log_n.exp().clamp(5.0, 200_000.0).round();
        let counts = std::array::from_fn(|a| {
            let w: Vec<f64> = self.rates[a]
                .iter()
                .enumerate()
                .map(|(v, r)| {
                    let mut lw = 0.0;
                    for (fa, fv, s) in focus
                        .map(|(fa, fv)| (fa, fv, strength))
                        .into_iter()
                        .chain([weak])
                    {
                        if fa != a {
                            continue;
                        }
                        if v == fv {
                            lw += s;
                        } else if is_ordinal(a) && v.abs_diff(fv) == 1 {
                            lw += s * 0.5;
                        }
                    }
                    r * f64::exp(lw)
                })
                .collect();
            let total: f64 = w.iter().sum();
            w.iter().map(|x| (n * x / total).round()).collect()
        });
        let category = match focus_attr {
            None => "Interests",
            Some(AGE) => "Life stage",
            Some(LOCATION) => "Local",
            Some(POLITICS) => "Causes",
            Some(_) => "Faith",
        };
        LargeItem {
            id: format!("lw-x{j:07}"),
            name,
            kind,
            category,
            focus,
            counts,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::HashSet;

    #[test]
    fn names_are_unique_because_the_scramble_is_a_bijection() {
        // gcd(SCRAMBLE, space) = 1 makes j ↦ j·SCRAMBLE mod space one-to-one
        // (elementary number theory; any textbook on modular arithmetic).
        fn gcd(a: u64, b: u64) -> u64 {
            if b == 0 { a } else { gcd(b, a % b) }
        }
        assert_eq!(gcd(SCRAMBLE, name_space()), 1);
        assert!(name_space() > 1_200_000);
        let maker = ItemMaker::new(3);
        let keys: HashSet<String> = (0..20_000)
            .map(|j| crate::text::name_key(&maker.item(j).name))
            .collect();
        assert_eq!(keys.len(), 20_000);
    }

    #[test]
    fn items_are_reproducible_and_point_where_they_say() {
        let a = ItemMaker::new(5);
        let b = ItemMaker::new(5);
        for j in [0, 17, 999_999] {
            assert_eq!(a.item(j), b.item(j));
        }
        // A focused item's members lean to its value more than the population does.
        let rates = base_rates();
        let mut checked = 0;
        for j in 0..200 {
            let it = a.item(j);
            if let Some((attr, v)) = it.focus {
                let n: f64 = it.counts[attr].iter().sum();
                if n >= 200.0 {
                    assert!(it.counts[attr][v] / n > rates[attr][v], "item {j}");
                    checked += 1;
                }
            }
        }
        assert!(checked > 10);
    }
}
