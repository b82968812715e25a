//! The report's account of where the evidence came from: one entry per evidence
//! source (with its provenance, how much it found and notes such as "many items name
//! places in one region"), the items in special categories of personal data (GDPR
//! Article 9(1)), and what is known about the friends and what making the friend list
//! private would change. Friends are only ever counted here, never named.

use std::collections::BTreeMap;

use serde::Serialize;

use crate::evidence::{Evidence, Origin, SourceKind, Subject};
use crate::footprint::Footprint;
use crate::infer::Exposure;
use crate::lexicon::SpecialCategory;
use crate::priors::Priors;
use crate::reading::count;

/// Items naming places in one region before the report calls it a pattern (common
/// practice, no source).
const MANY_PLACE_ITEMS: usize = 3;

#[derive(Debug, Clone, Serialize)]
pub struct SourceReport {
    /// table, places, life-stages, vocabulary or friends.
    pub id: String,
    pub label: String,
    /// Where the source's knowledge comes from and how strong its numbers are.
    pub provenance: String,
    /// Pieces of evidence the source gave (item × attribute).
    pub pieces: usize,
    /// Items (or the friend list) the source said something about.
    pub subjects: usize,
    /// Bits the visible pieces add toward the observer's current best guesses.
    pub bits_toward_guesses: f64,
    pub notes: Vec<String>,
}

#[derive(Debug, Clone, Serialize)]
pub struct SpecialItemReport {
    pub name: String,
    pub kind: String,
    /// Article 9(1) wording of each category.
    pub categories: Vec<String>,
    /// The words that put the item there.
    pub terms: Vec<String>,
}

#[derive(Debug, Clone, Serialize)]
pub struct SpecialCategoryCount {
    pub category: String,
    pub items: usize,
}

#[derive(Debug, Clone, Serialize)]
pub struct SpecialReport {
    pub counts: Vec<SpecialCategoryCount>,
    pub items: Vec<SpecialItemReport>,
}

#[derive(Debug, Clone, Serialize)]
pub struct FriendAttributeReport {
    pub attribute: String,
    /// Friends whose value is known.
    pub known: usize,
    /// known / total friends.
    pub share_known: f64,
    /// Friends with a value that matches none of the attribute's values.
    pub unreadable: usize,
    pub best_guess: String,
    pub probability: f64,
    /// The best guess and its probability with the friend list private (or, when it
    /// is already hidden, shown again).
    pub best_guess_if_toggled: String,
    pub probability_if_toggled: f64,
}

#[derive(Debug, Clone, Serialize)]
pub struct FriendsReport {
    pub total: usize,
    /// The friend list is treated as hidden (private) now.
    pub hidden: bool,
    pub attributes: Vec<FriendAttributeReport>,
}

/// One entry per source that ran.
pub fn source_reports(
    enabled: &[SourceKind],
    footprint: &Footprint,
    priors: &Priors,
    exposure: &Exposure,
) -> Vec<SourceReport> {
    let list = &exposure.evidence().list;
    let n_items = exposure.evidence().n_items;
    let bests: Vec<usize> = (0..exposure.n_attributes())
        .map(|a| exposure.posterior(a).best)
        .collect();
    let kind_of = |o: &Origin| match o {
        Origin::Table { .. } => Some(SourceKind::Table),
        Origin::Lexicon(l) => SourceKind::of_rule(&l.rule),
        Origin::Friends { .. } => Some(SourceKind::Friends),
        Origin::Mark => None,
    };
    enabled
        .iter()
        .map(|&kind| {
            // Walked again rather than collected: a large archive has hundreds of
            // thousands of pieces.
            let mine = || list.iter().filter(move |e| kind_of(&e.origin) == Some(kind));
            let (pieces, subjects) = count_pieces_and_subjects(mine(), n_items);
            let bits: f64 = list
                .iter()
                .enumerate()
                .filter(|(_, e)| kind_of(&e.origin) == Some(kind))
                .filter(|(_, e)| !exposure.is_hidden(e.subject()))
                .map(|(ei, e)| {
                    exposure.piece_weight(ei) * e.log_lr()[bests[e.attribute()]]
                        / std::f64::consts::LN_2
                })
                .sum();
            let mut notes = Vec::new();
            match kind {
                SourceKind::Table => notes.push(format!(
                    "{} of {} matched a reference item",
                    exposure.evidence().matched_items,
                    count(footprint.items.len(), "item", "items")
                )),
                SourceKind::Places => {
                    // Items per value they point at, and their joint weight.
                    let mut by_value: BTreeMap<(usize, usize), (usize, f64)> = BTreeMap::new();
                    for (ei, e) in list.iter().enumerate().filter(|(_, e)| {
                        kind_of(&e.origin) == Some(kind) && !exposure.is_hidden(e.subject())
                    }) {
                        let v = e.leaning();
                        let w = exposure.piece_weight(ei);
                        let slot = by_value.entry((e.attribute(), v)).or_insert((0, 0.0));
                        slot.0 += 1;
                        slot.1 += w * e.log_lr()[v] / std::f64::consts::LN_2;
                    }
                    let mut many: Vec<_> = by_value
                        .into_iter()
                        .filter(|(_, (n, _))| *n >= MANY_PLACE_ITEMS)
                        .collect();
                    // The three named most often, and the current guess if it is not
                    // among them (it is what the reader wants explained).
                    many.sort_by_key(|m| std::cmp::Reverse(m.1.0));
                    let guess = |a: usize, v: usize| exposure.posterior(a).best == v;
                    let shown: Vec<_> = many
                        .iter()
                        .enumerate()
                        .filter(|(i, ((a, v), _))| *i < 3 || guess(*a, *v))
                        .map(|(_, m)| *m)
                        .collect();
                    for ((a, v), (n, bits)) in shown {
                        notes.push(format!(
                            "{n} items name places in {}: each alone is weak, but their likelihood ratios multiply, together {bits:+.1} bits toward {} (strong evidence)",
                            priors.attributes[a].values[v].label,
                            priors.attributes[a].values[v].label
                        ));
                    }
                }
                SourceKind::LifeStages => {
                    if let Some(t) = exposure.evidence().reference_time {
                        notes.push(format!(
                            "ages are counted to {} (the newest date in the archive, or today)",
                            crate::evidence::year_of(t)
                        ));
                    }
                }
                SourceKind::Vocabulary => {
                    let n = exposure.evidence().special.len();
                    if n > 0 {
                        notes.push(format!(
                            "{} in special categories of personal data (GDPR Art. 9), listed below",
                            crate::reading::count(n, "item", "items")
                        ));
                    }
                }
                SourceKind::Friends => {
                    if let Some(stats) = &exposure.evidence().friends
                        && stats.known.iter().all(|&k| k == 0)
                    {
                        notes.push(format!(
                            "none of your {} has a known attribute; give some with --friends FILE or the mapping's [source.attributes]",
                            count(stats.total, "friend", "friends")
                        ));
                    }
                }
            }
            if bits < -0.05 {
                notes.push(
                    "the sum is negative: these pieces point to many different values, so each counts against the others; a guess is the value they count against least"
                        .into(),
                );
            }
            SourceReport {
                id: kind.id().into(),
                label: kind.label().into(),
                provenance: kind.provenance().into(),
                pieces,
                subjects,
                // + 0.0 turns a negative zero into zero for printing.
                bits_toward_guesses: bits + 0.0,
                notes,
            }
        })
        .collect()
}

/// How many pieces of evidence, and how many distinct subjects they are about.
fn count_pieces_and_subjects<'a>(
    pieces: impl Iterator<Item = &'a Evidence>,
    n_items: usize,
) -> (usize, usize) {
    let mut seen = vec![false; n_items + 1];
    let (mut n, mut subjects) = (0, 0);
    for e in pieces {
        n += 1;
        let slot = match e.subject() {
            Subject::Item(i) => i,
            Subject::FriendList => n_items,
        };
        if !std::mem::replace(&mut seen[slot], true) {
            subjects += 1;
        }
    }
    (n, subjects)
}

/// The special-category items, flagged by the vocabulary.
pub fn special_report(footprint: &Footprint, exposure: &Exposure) -> Option<SpecialReport> {
    let flags = &exposure.evidence().special;
    if flags.is_empty() {
        return None;
    }
    let counts = SpecialCategory::ALL
        .into_iter()
        .map(|c| SpecialCategoryCount {
            category: c.label().into(),
            items: flags.iter().filter(|f| f.categories.contains(&c)).count(),
        })
        .filter(|c| c.items > 0)
        .collect();
    let items = flags
        .iter()
        .filter_map(|f| {
            let item = footprint.items.get(f.item)?;
            Some(SpecialItemReport {
                name: String::from(&*item.name),
                kind: item.kind.as_str().into(),
                categories: f.categories.iter().map(|c| c.label().to_string()).collect(),
                terms: f.terms.clone(),
            })
        })
        .collect();
    Some(SpecialReport { counts, items })
}

/// What is known about the friends and what the friend list's visibility changes.
pub fn friends_report(priors: &Priors, exposure: &Exposure) -> Option<FriendsReport> {
    let stats = exposure.evidence().friends.as_ref()?;
    let hidden = exposure.is_hidden(Subject::FriendList);
    let attributes = priors
        .attributes
        .iter()
        .enumerate()
        .map(|(a, attr)| {
            let now = exposure.posterior(a);
            let toggled = exposure.posterior_toggled(a, Subject::FriendList);
            let known = stats.known.get(a).copied().unwrap_or(0);
            FriendAttributeReport {
                attribute: attr.id.clone(),
                known,
                share_known: if stats.total > 0 {
                    known as f64 / stats.total as f64
                } else {
                    0.0
                },
                unreadable: stats.unreadable.get(a).copied().unwrap_or(0),
                best_guess: attr.values[now.best].id.clone(),
                probability: now.probability,
                best_guess_if_toggled: attr.values[toggled.best].id.clone(),
                probability_if_toggled: toggled.probability,
            }
        })
        .collect();
    Some(FriendsReport {
        total: stats.total,
        hidden,
        attributes,
    })
}
