//! The fictional network's items. Each item has a kind, an invented name, a popularity
//! and "tilts": how much more likely members with a given attribute value are to join.
//! Most items tilt weakly and at random (hobbies); some tilt strongly toward an age
//! band, a place, a leaning or a faith, which gives the spread of homogeneity real
//! networks show.

use std::collections::HashSet;

use rand::Rng;

use super::places::STATES;
use super::words::*;
use super::world::{
    AGE, AGE_SPANS, LOCATION, POLITICS, Profile, RELIGION, cardinalities, is_ordinal, weighted,
};
use crate::footprint::ItemKind;
use crate::text::name_key;

/// The demo's "today": ages and years are counted from here.
pub const DEMO_YEAR: i32 = 2026;

/// A pull toward one attribute value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tilt {
    pub attr: usize,
    pub value: usize,
    /// Log-odds boost for an exact match (half for a neighbouring ordered value).
    pub strength: f64,
}

/// One item of the fictional network.
#[derive(Debug, Clone, PartialEq)]
pub struct CatItem {
    pub id: String,
    pub name: String,
    pub kind: ItemKind,
    pub category: &'static str,
    /// Relative popularity (log scale).
    pub log_popularity: f64,
    pub tilts: Vec<Tilt>,
    /// Which attribute the item was made to point at, if any.
    pub focus: Option<usize>,
}

impl CatItem {
    /// Log-weight of a member with `profile` joining this item.
    pub fn log_weight(&self, profile: &Profile) -> f64 {
        let mut w = self.log_popularity;
        for t in &self.tilts {
            let v = profile[t.attr];
            if v == t.value {
                w += t.strength;
            } else if is_ordinal(t.attr) && v.abs_diff(t.value) == 1 {
                w += t.strength * 0.5;
            }
        }
        w
    }
}

/// Shares of item focus (common practice, no source: most affiliations are hobbies).
const FOCUS_SHARES: [(Option<usize>, f64); 5] = [
    (None, 0.52),
    (Some(AGE), 0.13),
    (Some(LOCATION), 0.17),
    (Some(POLITICS), 0.09),
    (Some(RELIGION), 0.09),
];

struct Namer<'a, R: Rng> {
    rng: &'a mut R,
    state: usize,
    band: usize,
}

impl<R: Rng> Namer<'_, R> {
    fn pick<'w>(&mut self, list: &[&'w str]) -> &'w str {
        list[self.rng.random_range(0..list.len())]
    }

    fn fill(&mut self, template: &str) -> String {
        let mut out = template.to_string();
        let city_list = STATES[self.state].3;
        let fills: [(&str, String); 12] = [
            ("{city}", self.pick(city_list).to_string()),
            ("{state}", STATES[self.state].1.to_string()),
            (
                "{year}",
                self.rng.random_range(2015..=DEMO_YEAR).to_string(),
            ),
            ("{gy}", {
                let (lo, hi) = AGE_SPANS[self.band];
                // Graduating high school at 18: ages lo..=hi now means years below.
                self.rng
                    .random_range((DEMO_YEAR - hi + 18)..=(DEMO_YEAR - lo + 18))
                    .to_string()
            }),
            ("{saint}", self.pick(SAINTS).to_string()),
            ("{first}", self.pick(FIRST_NAMES).to_string()),
            ("{last}", self.pick(LAST_NAMES).to_string()),
            ("{adj}", self.pick(ADJECTIVES).to_string()),
            ("{topic}", self.pick(TOPICS).to_string()),
            ("{coll}", self.pick(COLLECTIVES).to_string()),
            ("{outlet}", self.pick(OUTLETS).to_string()),
            ("{event}", self.pick(EVENTS).to_string()),
        ];
        for (k, v) in fills {
            out = out.replace(k, &v);
        }
        out.replace("{trade}", self.pick(TRADES))
    }
}

/// Build `n` items with unique names (unique after name normalisation too).
pub fn build(rng: &mut impl Rng, n: usize) -> Vec<CatItem> {
    let mut items = Vec::with_capacity(n);
    let mut seen = HashSet::new();
    let k = cardinalities();
    let state_weights: Vec<f64> = STATES.iter().map(|s| s.2).collect();
    while items.len() < n {
        let focus = FOCUS_SHARES[weighted(rng, FOCUS_SHARES.iter().map(|f| f.1))].0;
        let state = weighted(rng, state_weights.iter().copied());
        let target = match focus {
            Some(LOCATION) => state,
            Some(a) => rng.random_range(0..k[a]),
            None => 0,
        };
        let band = if focus == Some(AGE) {
            target
        } else {
            rng.random_range(0..7)
        };
        let templates: &[(ItemKind, &str)] = match focus {
            None => GENERIC,
            Some(AGE) => AGE_TEMPLATES[target],
            Some(LOCATION) => PLACE_TEMPLATES,
            Some(POLITICS) => POLITICS_TEMPLATES[target],
            Some(_) => RELIGION_TEMPLATES[target],
        };
        let (kind, template) = templates[rng.random_range(0..templates.len())];
        let mut namer = Namer { rng, state, band };
        let mut name = namer.fill(template);
        let mut key = name_key(&name);
        let mut chapter = false;
        for _ in 0..8 {
            if !seen.contains(&key) {
                break;
            }
            name = namer.fill(template);
            key = name_key(&name);
        }
        if seen.contains(&key) {
            // A local chapter of an existing name: it points at its place as well.
            chapter = true;
            let base = name.clone();
            for town in STATES[state].3 {
                name = format!("{base} ({town} chapter)");
                key = name_key(&name);
                if !seen.contains(&key) {
                    break;
                }
            }
            if seen.contains(&key) {
                continue;
            }
        }
        seen.insert(key);

        let mut tilts = Vec::new();
        match focus {
            None => {
                for _ in 0..rng.random_range(0..=2) {
                    let attr = rng.random_range(0..4);
                    tilts.push(Tilt {
                        attr,
                        value: rng.random_range(0..k[attr]),
                        strength: rng.random_range(0.2..0.8),
                    });
                }
            }
            Some(a) => {
                let strength = match a {
                    AGE => rng.random_range(1.0..2.6),
                    LOCATION => rng.random_range(2.5..4.5),
                    POLITICS => rng.random_range(0.8..2.2),
                    _ => rng.random_range(1.2..3.0),
                };
                tilts.push(Tilt {
                    attr: a,
                    value: target,
                    strength,
                });
            }
        }
        if focus != Some(LOCATION)
            && (chapter || template.contains("{city}") || template.contains("{state}"))
        {
            tilts.push(Tilt {
                attr: LOCATION,
                value: state,
                strength: rng.random_range(2.0..3.5),
            });
        }
        let log_popularity =
            rng.random_range(-1.2..1.2) + if focus == Some(LOCATION) { -0.5 } else { 0.0 };
        items.push(CatItem {
            id: format!("lw-{:05}", items.len() + 1),
            name,
            kind,
            category: category(focus, kind),
            log_popularity,
            tilts,
            focus,
        });
    }
    items
}
