//! The best possible guess on a synthetic cohort. The generator's model is known:
//! a member's profile is drawn from [`super::world::draw_profile`]'s joint distribution
//! and each item is joined with weight `exp(log_weight(profile))` (the catalogue made
//! from the cohort's seed). Given the items a member joined, the posterior over the
//! 12,495 possible profiles follows from Bayes' rule, and its marginals are the
//! Bayes-optimal guesses: no observer can do better on average.
//!
//! The members' items are drawn without replacement in proportion to their weights
//! (Efraimidis–Spirakis keys); the likelihood of a set of `d` items is taken as the
//! multinomial one, `Π w_i(p) / W(p)^d` with `W(p)` the total weight, which treats the
//! draws as made with replacement. With `d` about 40 of 1,600 items and no item holding
//! more than a small share of the weight, the two differ little; this is the one
//! approximation in the figure. How many items a member joins does not depend on the
//! profile, so it carries no information.

use std::collections::HashMap;

use super::catalogue::{self, CatItem};
use super::places::STATES;
use super::stream;
use super::world::{
    AGE_BANDS, POLITICS_VALUES, Profile, RELIGION_VALUES, cardinalities, is_ordinal,
};

/// The generator's model for one seed and catalogue size.
pub struct Oracle {
    catalogue: Vec<CatItem>,
    by_id: HashMap<String, usize>,
    /// Every profile, with ln P(profile) − and ln W(profile).
    profiles: Vec<Profile>,
    log_prior: Vec<f64>,
    log_total: Vec<f64>,
}

fn normalised(w: impl Iterator<Item = f64>) -> Vec<f64> {
    let w: Vec<f64> = w.collect();
    let total: f64 = w.iter().sum();
    w.into_iter().map(|x| x / total).collect()
}

/// ln P(profile) under [`super::world::draw_profile`]: age and location drawn from
/// their rates, politics and religion tilted by age.
fn log_prior(p: &Profile) -> f64 {
    let age = normalised(AGE_BANDS.iter().map(|v| v.2));
    let location = normalised(STATES.iter().map(|s| s.2));
    let tilt = p[0] as f64 - 3.0;
    let politics = normalised(
        POLITICS_VALUES
            .iter()
            .enumerate()
            .map(|(i, v)| v.2 * (0.12 * tilt * (i as f64 - 2.0)).exp()),
    );
    let religion = normalised(RELIGION_VALUES.iter().enumerate().map(|(i, v)| {
        if i == 0 {
            v.2 * (-0.15 * tilt).exp()
        } else {
            v.2
        }
    }));
    age[p[0]].ln() + location[p[1]].ln() + politics[p[2]].ln() + religion[p[3]].ln()
}

impl Oracle {
    /// The model of a cohort made by `synth cohort` with this seed and item count.
    pub fn new(seed: u64, items: usize) -> Oracle {
        let catalogue = catalogue::build(&mut stream(seed, 1), items);
        let k = cardinalities();
        let mut profiles = Vec::with_capacity(k.iter().product());
        for a in 0..k[0] {
            for l in 0..k[1] {
                for p in 0..k[2] {
                    for r in 0..k[3] {
                        profiles.push([a, l, p, r]);
                    }
                }
            }
        }
        let log_prior = profiles.iter().map(log_prior).collect();
        let log_total = profiles
            .iter()
            .map(|p| {
                catalogue
                    .iter()
                    .map(|c| c.log_weight(p).exp())
                    .sum::<f64>()
                    .ln()
            })
            .collect();
        let by_id = catalogue
            .iter()
            .enumerate()
            .map(|(i, c)| (c.id.clone(), i))
            .collect();
        Oracle {
            catalogue,
            by_id,
            profiles,
            log_prior,
            log_total,
        }
    }

    /// The catalogue index of an item id.
    pub fn index_of(&self, id: &str) -> Option<usize> {
        self.by_id.get(id).copied()
    }

    /// The posterior of each attribute's value given the items a member joined
    /// (catalogue indices, each once), in attribute order.
    pub fn posteriors(&self, items: &[usize]) -> Vec<Vec<f64>> {
        let k = cardinalities();
        // Σ over the items of each tilt's boost, per attribute and value: the part of
        // Σ ln w_i(p) that depends on p (popularity is the same for every profile).
        let mut boost: Vec<Vec<f64>> = k.iter().map(|&n| vec![0.0; n]).collect();
        for &i in items {
            let Some(c) = self.catalogue.get(i) else {
                continue;
            };
            for t in &c.tilts {
                for (v, b) in boost[t.attr].iter_mut().enumerate() {
                    if v == t.value {
                        *b += t.strength;
                    } else if is_ordinal(t.attr) && v.abs_diff(t.value) == 1 {
                        *b += t.strength * 0.5;
                    }
                }
            }
        }
        let d = items.len() as f64;
        let log_post: Vec<f64> = self
            .profiles
            .iter()
            .zip(self.log_prior.iter().zip(&self.log_total))
            .map(|(p, (lp, lw))| lp + (0..4).map(|a| boost[a][p[a]]).sum::<f64>() - d * lw)
            .collect();
        let max = log_post.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let mut out: Vec<Vec<f64>> = k.iter().map(|&n| vec![0.0; n]).collect();
        for (p, lp) in self.profiles.iter().zip(&log_post) {
            let w = (lp - max).exp();
            for a in 0..4 {
                out[a][p[a]] += w;
            }
        }
        for m in &mut out {
            let total: f64 = m.iter().sum();
            m.iter_mut().for_each(|x| *x /= total);
        }
        out
    }
}

/// The file `synth cohort` writes beside the archives, saying how they were made, so
/// `eval` can work out the best possible guesses.
pub const GENERATOR_FILE: &str = "cohort-generator.json";

/// What [`GENERATOR_FILE`] holds.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GeneratorRecord {
    /// Always "telltale synth cohort".
    pub generator: String,
    pub seed: u64,
    /// Items in the network.
    pub items: usize,
    /// Mean number of items a member joins (it does not depend on the profile).
    pub mean_degree: f64,
}

/// The oracle of a cohort seen through an eval schema: the schema's candidate items
/// are mapped to the catalogue by id.
pub struct CohortOracle {
    oracle: Oracle,
    record: GeneratorRecord,
    /// Schema candidate index → catalogue index.
    to_catalogue: Vec<Option<usize>>,
    /// The schema's attribute ids are the generator's, in its order.
    attributes_match: bool,
}

impl CohortOracle {
    /// The oracle for a cohort made with `record`, for `schema` (its items matched to
    /// the catalogue by id).
    pub fn new(record: GeneratorRecord, schema: &crate::priors::Priors) -> CohortOracle {
        let oracle = Oracle::new(record.seed, record.items);
        let to_catalogue = schema
            .items()
            .map(|it| it.id().and_then(|id| oracle.index_of(id)))
            .collect();
        let k = cardinalities();
        let attributes_match = schema.attributes.len() == 4
            && schema
                .attributes
                .iter()
                .zip(["age_band", "location", "politics", "religion"])
                .zip(k)
                .all(|((a, id), n)| a.id == id && a.values.len() == n);
        CohortOracle {
            oracle,
            record,
            to_catalogue,
            attributes_match,
        }
    }
}

impl crate::eval::BestGuess for CohortOracle {
    fn posteriors(&self, items: &[u32]) -> Option<Vec<Vec<f64>>> {
        if !self.attributes_match {
            return None;
        }
        let mut joined = Vec::with_capacity(items.len());
        for &i in items {
            joined.push(self.to_catalogue.get(i as usize).copied().flatten()?);
        }
        Some(self.oracle.posteriors(&joined))
    }

    fn describe(&self) -> String {
        format!(
            "the generator's own model (synth cohort, seed {}, {} items): the posterior over every profile given a member's items, with the draw of items without replacement taken as with replacement",
            self.record.seed, self.record.items
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::synth::membership::{affiliations, draw_degree};
    use crate::synth::world::draw_profile;

    /// With no items the posterior is the prior's marginals; the prior sums to 1.
    #[test]
    fn no_items_give_the_prior() {
        let o = Oracle::new(7, 200);
        let total: f64 = o.log_prior.iter().map(|l| l.exp()).sum();
        assert!((total - 1.0).abs() < 1e-9, "{total}");
        let post = o.posteriors(&[]);
        let age = normalised(AGE_BANDS.iter().map(|v| v.2));
        for (a, b) in post[0].iter().zip(&age) {
            assert!((a - b).abs() < 1e-9);
        }
    }

    /// Members drawn from the generator: the oracle's guesses beat the prior's
    /// most common value for every attribute (a check that can fail: a wrong sign or
    /// a mixed-up attribute would lose to it).
    #[test]
    fn the_oracle_beats_the_most_common_value() {
        let o = Oracle::new(7, 1600);
        let mut rng = stream(99, 4);
        let (mut hits, mut base) = ([0usize; 4], [0usize; 4]);
        let n = 300;
        for _ in 0..n {
            let p = draw_profile(&mut rng);
            let d = draw_degree(&mut rng, 40.0, 400);
            let items: Vec<usize> = affiliations(&mut rng, &o.catalogue, &p, d)
                .into_iter()
                .map(|i| i as usize)
                .collect();
            let post = o.posteriors(&items);
            let prior = o.posteriors(&[]);
            for a in 0..4 {
                hits[a] += usize::from(crate::stats::argmax(&post[a]).0 == p[a]);
                base[a] += usize::from(crate::stats::argmax(&prior[a]).0 == p[a]);
            }
        }
        for a in 0..4 {
            assert!(hits[a] > base[a], "attribute {a}: {hits:?} vs {base:?}");
        }
    }
}
