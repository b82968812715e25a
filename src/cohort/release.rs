//! From counts to a priors file: exact tables (for evaluation and tests) or tables
//! released with the discrete Laplace mechanism ([`super::privacy`]), then post-processed —
//! items with fewer than K (noisy) members dropped, negative counts set to 0, counts
//! rounded — and written with the schema's attributes, the cohort's base and
//! membership rates and a provenance that records the privacy parameters.

use std::collections::BTreeMap;

use rand::Rng;

use super::counts::Counts;
use super::error::{Error, Result};
use super::load::Schema;
use super::privacy::{Budget, laplace_variance};
use crate::priors::{
    AttributeSpec, Calibration, FORMAT, ItemSpec, MemberSpec, PriorsFile, PrivacySpec, Provenance,
};
use crate::stats::noise_equivalent;

/// Statistics ready to be written.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// `items[i][a][v]`, non-negative.
    pub items: Vec<Vec<Vec<f64>>>,
    /// Whether item `i` has at least the member threshold and is written.
    pub keep: Vec<bool>,
    /// `people[a][v]`, non-negative.
    pub people: Vec<Vec<f64>>,
    /// `memberships[a][v]`: memberships per value over all candidate items, ≥ 0.
    pub memberships: Vec<Vec<f64>>,
    /// Contributors (noisy when released with noise), ≥ 0.
    pub contributors: f64,
}

impl Table {
    /// Rates `(x + ½)/(Σx + ½K)`: never zero (a value no one declared stays possible).
    pub fn rates(x: &[f64]) -> Vec<f64> {
        let total: f64 = x.iter().sum::<f64>() + 0.5 * x.len() as f64;
        x.iter().map(|c| (c + 0.5) / total).collect()
    }

    pub fn kept(&self) -> usize {
        self.keep.iter().filter(|&&k| k).count()
    }
}

fn finish(
    raw_items: Vec<Vec<Vec<f64>>>,
    raw_people: Vec<Vec<f64>>,
    contributors: f64,
    min_members: f64,
    round: bool,
) -> Table {
    let n_attr = raw_people.len();
    // Size of an item: its members averaged over attributes (before clamping, so
    // noise averages out rather than piling up).
    let keep: Vec<bool> = raw_items
        .iter()
        .map(|per_attr| {
            let n: f64 =
                per_attr.iter().map(|c| c.iter().sum::<f64>()).sum::<f64>() / n_attr.max(1) as f64;
            n >= min_members
        })
        .collect();
    let memberships: Vec<Vec<f64>> = (0..n_attr)
        .map(|a| {
            let k = raw_people[a].len();
            (0..k)
                .map(|v| {
                    raw_items
                        .iter()
                        .map(|per_attr| per_attr[a][v])
                        .sum::<f64>()
                        .max(0.0)
                })
                .collect()
        })
        .collect();
    let clean = |x: f64| {
        let x = x.max(0.0);
        if round { x.round() } else { x }
    };
    Table {
        items: raw_items
            .into_iter()
            .map(|per_attr| {
                per_attr
                    .into_iter()
                    .map(|c| c.into_iter().map(clean).collect())
                    .collect()
            })
            .collect(),
        keep,
        people: raw_people
            .into_iter()
            .map(|c| c.into_iter().map(clean).collect())
            .collect(),
        memberships,
        contributors: clean(contributors),
    }
}

/// The exact table (no noise): for evaluation, tests, and cohorts whose statistics
/// never leave the room.
pub fn exact_table(counts: &Counts, min_members: f64) -> Table {
    finish(
        counts.items.clone(),
        counts.people.clone(),
        counts.contributors,
        min_members,
        false,
    )
}

/// The table released with the discrete Laplace mechanism: integer noise from the
/// exact sampler on every count of every candidate item (zero counts too), on the
/// population histograms and on the number of contributors, with the scales `budget`
/// gives. Fails only when the budget cannot be used ([`Budget::problem`]).
pub fn noisy_table(
    counts: &Counts,
    budget: &Budget,
    min_members: f64,
    rng: &mut impl Rng,
) -> Result<Table> {
    if let Some(p) = budget.problem() {
        return Err(Error::Params(p));
    }
    let (Some(item_noise), Some(people_noise)) = (budget.items_noise(), budget.people_noise())
    else {
        return Err(Error::Params("the privacy budget cannot be used".into()));
    };
    // Counts are whole numbers; the noise is too, so the released values are exact
    // integers (the rounding below changes nothing for them).
    let mut noisy = |x: f64, n: &super::privacy::DiscreteLaplace| x.round() + n.sample(rng) as f64;
    let items = counts
        .items
        .iter()
        .map(|per_attr| {
            per_attr
                .iter()
                .map(|c| c.iter().map(|&x| noisy(x, &item_noise)).collect())
                .collect()
        })
        .collect();
    let people = counts
        .people
        .iter()
        .map(|c| c.iter().map(|&x| noisy(x, &people_noise)).collect())
        .collect();
    let contributors = noisy(counts.contributors, &people_noise);
    Ok(finish(items, people, contributors, min_members, true))
}

/// What goes into the file besides the table.
#[derive(Debug, Clone, PartialEq)]
pub struct BuildParams {
    /// The budget, when the table was released with noise.
    pub budget: Option<Budget>,
    pub min_members: f64,
    pub source: String,
    pub licence: String,
    /// `YYYY-MM-DD`.
    pub created: String,
    /// Per attribute: smoothing α, pseudo-count k, calibration; `None` keeps the
    /// schema's.
    pub settings: Option<Vec<(f64, f64, Calibration)>>,
    /// Extra words for the provenance's method (e.g. how calibration was fitted).
    pub method_note: String,
    /// True when the cohort is invented (e.g. `telltale synth cohort`).
    pub synthetic: bool,
}

/// A built priors file and what was dropped.
#[derive(Debug, Clone)]
pub struct Built {
    pub file: PriorsFile,
    pub kept_items: usize,
    pub dropped_items: usize,
}

/// Write the table as a priors file with the schema's attributes and candidate items.
/// Only the schema's names appear: nothing from any contributor's archive.
pub fn build_file(schema: &Schema, table: &Table, params: &BuildParams) -> Built {
    let attributes: Vec<AttributeSpec> = schema
        .file
        .attributes
        .iter()
        .enumerate()
        .map(|(a, spec)| {
            let mut spec = spec.clone();
            let base = Table::rates(&table.people[a]);
            let member = Table::rates(&table.memberships[a]);
            for ((v, b), m) in spec.values.iter_mut().zip(base).zip(member) {
                v.base_rate = round6(b);
                v.member_rate = Some(round6(m));
            }
            if let Some(settings) = &params.settings
                && let Some((alpha, k, cal)) = settings.get(a)
            {
                spec.smoothing = Some(*alpha);
                spec.pseudocount = Some(*k);
                spec.calibration = Some(cal.clone());
            }
            spec
        })
        .collect();
    let mut items = Vec::new();
    for (i, item) in schema.priors.items().enumerate() {
        if !table.keep[i] {
            continue;
        }
        let mut members = BTreeMap::new();
        for (a, spec) in attributes.iter().enumerate() {
            members.insert(
                spec.id.clone(),
                MemberSpec::Counts(table.items[i][a].clone()),
            );
        }
        items.push(ItemSpec {
            id: item.id().map(str::to_string),
            name: item.name().to_string(),
            kind: item.kind(),
            aliases: Vec::new(),
            members,
        });
    }
    let contributors = table.contributors.round() as u64;
    let kept = items.len();
    let dropped = schema.priors.len_items() - kept;
    let (privacy, how) = match &params.budget {
        Some(b) => (
            Some(PrivacySpec {
                mechanism: "discrete_laplace".into(),
                epsilon: b.epsilon,
                sensitivity: b.items_sensitivity(),
                min_members: params.min_members,
                budget_split: b.describe(),
                item_noise_scale: Some(b.items_scale()),
                item_noise_variance: Some(laplace_variance(b.items_scale())),
                warning: noise_check(table, laplace_variance(b.items_scale()))
                    .map(|c| c.warning(b.epsilon)),
            }),
            format!(
                "Member counts from about {contributors} consenting contributors' archives (a noisy count), released with the discrete Laplace mechanism (ε = {}); ",
                b.epsilon
            ),
        ),
        None => (
            None,
            format!(
                "Exact member counts from {contributors} contributors' archives, without noise; "
            ),
        ),
    };
    let method = format!(
        "{how}{kept} of {} candidate items kept (at least {} members); base and membership rates from the same release.{}",
        schema.priors.len_items(),
        params.min_members,
        params.method_note
    );
    Built {
        file: PriorsFile {
            format: FORMAT,
            provenance: Provenance {
                source: params.source.clone(),
                licence: params.licence.clone(),
                created: params.created.clone(),
                method,
                synthetic: params.synthetic,
                contributors: Some(contributors),
                privacy,
            },
            attributes,
            items,
        },
        kept_items: kept,
        dropped_items: dropped,
    }
}

/// How much the released item counts are worth once their noise is accounted for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NoiseCheck {
    /// Median, over written items and attributes, of the clean sample the noisy counts
    /// are worth ([`noise_equivalent`]).
    pub median_worth: f64,
    /// Share of those item × attribute counts worth at least one member.
    pub worth_one: f64,
}

impl NoiseCheck {
    /// The sentence written into the file and printed by `priors build`.
    pub fn warning(&self, epsilon: f64) -> String {
        format!(
            "This cohort is too small for ε = {epsilon}: once the noise is accounted for, the median item's member counts are worth {:.2} members, and only {:.0}% of item counts are worth one member or more. Expect guesses from this file to be little better than guessing the most common value; use a larger cohort or a larger ε.",
            self.median_worth,
            self.worth_one * 100.0
        )
    }
}

/// Below this median worth (in members) a release counts as too noisy to be useful
/// (common practice, no source: a typical item then says less than one member's
/// declaration, so an observer's guess stays near the most common value).
pub const USEFUL_MEDIAN_WORTH: f64 = 1.0;

/// `Some` when the released table is too noisy to be useful: the median written item
/// count is worth less than [`USEFUL_MEDIAN_WORTH`] members (or nothing was written).
pub fn noise_check(table: &Table, noise_variance: f64) -> Option<NoiseCheck> {
    let mut worth: Vec<f64> = table
        .items
        .iter()
        .zip(&table.keep)
        .filter(|(_, k)| **k)
        .flat_map(|(per_attr, _)| per_attr.iter())
        .map(|c| noise_equivalent(c, noise_variance).iter().sum::<f64>())
        .collect();
    worth.sort_by(f64::total_cmp);
    let check = NoiseCheck {
        median_worth: worth.get(worth.len() / 2).copied().unwrap_or(0.0),
        worth_one: if worth.is_empty() {
            0.0
        } else {
            worth.iter().filter(|&&w| w >= 1.0).count() as f64 / worth.len() as f64
        },
    };
    (check.median_worth < USEFUL_MEDIAN_WORTH).then_some(check)
}

fn round6(x: f64) -> f64 {
    (x * 1e6).round() / 1e6
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table(sizes: &[f64]) -> Table {
        Table {
            items: sizes.iter().map(|&n| vec![vec![n / 4.0; 4]; 2]).collect(),
            keep: vec![true; sizes.len()],
            people: vec![vec![1.0; 4]; 2],
            memberships: vec![vec![1.0; 4]; 2],
            contributors: 100.0,
        }
    }

    /// The guide's practice run: m = 50, ε = 4, four attributes give Laplace scale
    /// 50/0.9 ≈ 55.6 on each item count (variance 2b² ≈ 6,173; Dwork & Roth 2014), and
    /// a few dozen members per item are worth well under one member.
    #[test]
    fn small_cohorts_are_flagged_and_large_ones_are_not() {
        let b: f64 = 50.0 / 0.9;
        let var = laplace_variance(b);
        let small = noise_check(&table(&[20.0, 40.0, 60.0, 80.0, 100.0]), var)
            .expect("a 500-member cohort at ε = 4 is too noisy");
        // Median item 60 members over 4 values: the clamping alone lifts 4 empty
        // cells by 4·E[max(0, X)] ≈ 111 > 60, so it is worth nothing
        // (max(0, 60 − 111)² / (… + 4·6172.8) = 0).
        let n_hat = (60.0 - 4.0 * crate::stats::clamped_noise_mean(var)).max(0.0);
        assert_eq!(n_hat, 0.0);
        assert!((small.median_worth - n_hat * n_hat / (n_hat + 4.0 * var)).abs() < 1e-9);
        assert_eq!(small.worth_one, 0.0);
        assert!(small.warning(4.0).contains("too small for ε = 4"));
        // Items of 20,000 members are worth thousands: no warning.
        assert!(noise_check(&table(&[20_000.0; 5]), var).is_none());
        // No noise, no warning; nothing written, a warning.
        assert!(noise_check(&table(&[5.0; 3]), 0.0).is_none());
        let mut none = table(&[5.0]);
        none.keep = vec![false];
        assert!(noise_check(&none, var).is_some());
    }
}
