//! The report data: what every renderer shows, and exactly what `--format json` writes.
//! Field names here are a public interface (format 1): add fields, never rename them.

use std::collections::BTreeMap;
use std::sync::Arc;

use serde::Serialize;

use crate::alert::Rarity;
use crate::cautions::CAUTIONS;
use crate::evidence::Subject;
use crate::footprint::{Footprint, ItemKind};
use crate::infer::Exposure;
use crate::priors::Priors;
use crate::reading::{assess, with_footing};

use super::rows::{RowCount, Rows};
use super::sources::{
    FriendsReport, SourceReport, SpecialReport, friends_report, source_reports, special_report,
};

/// The report format version.
pub const REPORT_FORMAT: u32 = 1;

#[derive(Debug, Clone, Serialize)]
pub struct ScanReport {
    /// Set when the document was made knowing the person's real values (the explorer's
    /// export with a plan aimed at them): every renderer puts it first.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub warning: Option<String>,
    pub format: u32,
    pub tool: ToolInfo,
    pub archive: ArchiveInfo,
    pub priors: PriorsInfo,
    /// The rarity part of the alert rule every attribute's level is judged by: a
    /// value over `floor` and over `lift ×` its population rate counts as exposed.
    pub rarity: Rarity,
    pub attributes: Vec<AttributeReport>,
    /// Item × attribute rows, most revealing for this person first.
    pub items: Vec<ItemReport>,
    /// Your items that carry no evidence (no source recognises them): telltale
    /// cannot judge them.
    pub unmatched: Vec<UnmatchedItem>,
    /// The evidence sources that ran, with provenance and what each found.
    pub sources: Vec<SourceReport>,
    /// Items in special categories of personal data (GDPR Article 9(1)).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub special_categories: Option<SpecialReport>,
    /// What is known about the friends (counts only, never names) and what making the
    /// friend list private would change.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub friends: Option<FriendsReport>,
    pub warnings: Vec<String>,
    pub cautions: Vec<String>,
}

impl ScanReport {
    /// "3 of your items are not recognised by any evidence source, so telltale cannot
    /// judge them" (or "1 … is … it"), for every format; empty when all are.
    pub fn unmatched_sentence(&self) -> String {
        match self.unmatched.len() {
            0 => String::new(),
            1 => "1 of your items is not recognised by any evidence source, so telltale cannot judge it".into(),
            n => format!(
                "{n} of your items are not recognised by any evidence source, so telltale cannot judge them"
            ),
        }
    }

    /// Use the person's own alert levels (one per attribute, in the priors' order)
    /// instead of the priors': the threshold, level and reading of each attribute are
    /// worked out again, so every section of a document built from this report and a
    /// plan made with the same levels says the same thing. Levels that are not
    /// probabilities are skipped.
    pub fn set_alert_levels(&mut self, priors: &Priors, levels: &[f64]) {
        for ((a, attr), &t) in self
            .attributes
            .iter_mut()
            .zip(&priors.attributes)
            .zip(levels)
        {
            if !(t > 0.0 && t <= 1.0) || t == a.threshold {
                continue;
            }
            let probs: Vec<f64> = a.distribution.iter().map(|v| v.probability).collect();
            if probs.len() != attr.values.len() {
                continue;
            }
            let verdict = assess(attr, &probs, t, &priors.rarity);
            a.threshold = t;
            a.level = verdict.level.word().to_string();
            a.exposed_value = verdict.flag.map(|f| attr.values[f.value].id.clone());
            a.exposed_by_rarity = verdict.flag.is_some_and(|f| f.by_rarity);
            a.reading = verdict.reading;
            for v in &mut a.distribution {
                v.alert_level = priors.rarity.value_level(t, v.base_rate);
                v.exposed = priors.rarity.exposed(t, v.probability, v.base_rate);
            }
        }
    }

    /// An attribute's label for people, from its id (the id itself if unknown).
    pub fn attribute_label(&self, id: &str) -> String {
        self.attributes
            .iter()
            .find(|a| a.id == id)
            .map_or_else(|| id.to_string(), |a| a.label.clone())
    }

    /// A value's label for people, from its attribute's and its own id.
    pub fn value_label(&self, attribute: &str, value: &str) -> String {
        self.attributes
            .iter()
            .find(|a| a.id == attribute)
            .and_then(|a| a.distribution.iter().find(|d| d.id == value))
            .map_or_else(|| value.to_string(), |d| d.label.clone())
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct ToolInfo {
    pub name: String,
    pub version: String,
}

#[derive(Debug, Clone, Serialize)]
pub struct ArchiveInfo {
    /// File or folder name only (a full path can name the person).
    pub name: String,
    pub fingerprint: String,
    pub items: usize,
    pub by_kind: BTreeMap<String, usize>,
    pub friends: usize,
    pub files_read: usize,
    pub records_skipped: usize,
    pub hidden: usize,
    /// Records that repeated an item already read (same kind and id or name) and were
    /// counted once, into `items`.
    pub merged: usize,
}

impl ArchiveInfo {
    /// The item count as every report and the explorer say it: "114 items (15 events,
    /// 8 follows, 65 groups, 26 likes)", with "; 3 repeated records counted once" when
    /// the import merged repeats. Items are likes, groups, follows and events; the
    /// friend list is not one of them.
    pub fn items_phrase(&self) -> String {
        let kinds: Vec<String> = self
            .by_kind
            .iter()
            .filter(|(_, n)| **n > 0)
            .map(|(k, n)| crate::reading::count(*n, k.trim_end_matches('s'), k))
            .collect();
        let mut inside = if kinds.is_empty() {
            "none".to_string()
        } else {
            kinds.join(", ")
        };
        if self.merged > 0 {
            inside.push_str(&format!(
                "; {} counted once",
                crate::reading::count(self.merged, "repeated record", "repeated records")
            ));
        }
        format!(
            "{} ({inside})",
            crate::reading::count(self.items, "item", "items")
        )
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct PriorsInfo {
    pub name: String,
    pub source: String,
    pub licence: String,
    pub synthetic: bool,
    pub reference_items: usize,
    pub items_matched: usize,
}

#[derive(Debug, Clone, Serialize)]
pub struct ValueShare {
    pub id: String,
    pub label: String,
    pub probability: f64,
    pub base_rate: f64,
    /// This value's own alert level: `min(threshold, max(rarity floor, rarity lift ×
    /// base_rate))`.
    pub alert_level: f64,
    /// Over its own alert level.
    pub exposed: bool,
}

#[derive(Debug, Clone, Serialize)]
pub struct AttributeReport {
    pub id: String,
    pub label: String,
    /// Value id of the observer's best guess.
    pub best_guess: String,
    pub best_guess_label: String,
    pub probability: f64,
    /// Base rate of the best-guess value.
    pub base_rate: f64,
    /// probability / base_rate.
    pub lift: f64,
    /// 1/|V|: how often a uniform random guess is right.
    pub uniform_rate: f64,
    pub threshold: f64,
    /// exposed, leaning or quiet.
    pub level: String,
    /// The value the alert rule counts as exposed (the best guess, or a rarer value
    /// over the rarity floor and lift), if any.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub exposed_value: Option<String>,
    /// Exposed only by the rarity part of the rule (under the alert level).
    pub exposed_by_rarity: bool,
    /// Visible pieces of evidence feeding this attribute.
    pub feeding: usize,
    pub reading: String,
    /// Only rules of thumb (word lists) support the guess, so its probability is held
    /// at or under the stated ceiling (left out of the JSON when false).
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub rests_on_rules_of_thumb: bool,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub special_category: Option<String>,
    pub distribution: Vec<ValueShare>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ItemReport {
    pub name: String,
    /// like, group, follow, event, or friends (the friend list as a whole).
    pub kind: &'static str,
    /// Attribute id. (Strings that many rows repeat are shared, not copied.)
    pub attribute: Arc<str>,
    /// The value this item pushes this person's guess toward: the best guess when
    /// `contribution_bits` is positive, else the value it raises most
    /// ([`crate::effect`]).
    pub reveals: Arc<str>,
    pub reveals_label: Arc<str>,
    /// KL(p‖π) in bits: how far the item's members are from the population.
    pub bits: f64,
    /// 1 − H(p)/log₂|V|: measured against an even spread over the values, not against
    /// the population (members as mixed as everyone read above 0 when the population
    /// itself is uneven).
    pub homogeneity: f64,
    /// Leave-one-out, in bits: the observer's best guess's log₂-odds with this item
    /// shown minus with it hidden (negative: it argues against the guess). Its sign is
    /// always the sign of `if_hidden_drop`.
    pub contribution_bits: f64,
    /// How much the best guess's probability would fall if this item were hidden
    /// (negative: it would rise).
    pub if_hidden_drop: f64,
    /// Members behind the estimate.
    pub support: f64,
    /// priors, lexicon, friends or mark.
    pub source: &'static str,
    pub source_detail: Arc<str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub date: Option<i64>,
}

#[derive(Debug, Clone, Serialize)]
pub struct UnmatchedItem {
    pub name: String,
    pub kind: String,
    /// Archive file and record it came from.
    pub origin: String,
}

/// Build the report for the current state of an exposure, with every row.
pub fn build(
    archive_name: &str,
    footprint: &Footprint,
    priors: &Priors,
    exposure: &Exposure,
) -> ScanReport {
    build_with(archive_name, footprint, priors, exposure, RowCount::All)
}

/// Build the report, holding as many of its item rows as `rows` says.
pub fn build_with(
    archive_name: &str,
    footprint: &Footprint,
    priors: &Priors,
    exposure: &Exposure,
    rows: RowCount,
) -> ScanReport {
    let mut by_kind = BTreeMap::new();
    for kind in ItemKind::ALL {
        by_kind.insert(kind.plural().to_string(), footprint.count(kind));
    }
    let archive = ArchiveInfo {
        name: archive_name.to_string(),
        fingerprint: footprint.fingerprint.clone(),
        items: footprint.items.len(),
        by_kind,
        friends: footprint.friends.len(),
        files_read: footprint.stats.files_read,
        records_skipped: footprint.stats.records_skipped,
        hidden: exposure.hidden_subjects().len(),
        merged: footprint.stats.duplicates_merged,
    };
    let priors_info = PriorsInfo {
        name: std::path::Path::new(&priors.origin)
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| priors.origin.clone()),
        source: priors.provenance.source.clone(),
        licence: priors.provenance.licence.clone(),
        synthetic: priors.provenance.synthetic,
        reference_items: priors.len_items(),
        items_matched: exposure.evidence().matched_items,
    };

    let mut attributes = Vec::new();
    for (ai, attr) in priors.attributes.iter().enumerate() {
        let post = exposure.posterior(ai);
        let base = attr.base_rates[post.best];
        let guess = &attr.values[post.best];
        let verdict = assess(attr, &post.probs, attr.threshold, &priors.rarity);
        attributes.push(AttributeReport {
            id: attr.id.clone(),
            label: attr.label.clone(),
            best_guess: guess.id.clone(),
            best_guess_label: guess.label.clone(),
            probability: post.probability,
            base_rate: base,
            lift: post.probability / base,
            uniform_rate: attr.uniform_rate(),
            threshold: attr.threshold,
            level: verdict.level.word().to_string(),
            exposed_value: verdict.flag.map(|f| attr.values[f.value].id.clone()),
            exposed_by_rarity: verdict.flag.is_some_and(|f| f.by_rarity),
            feeding: exposure.feeding(ai),
            reading: with_footing(
                verdict.reading,
                post.rests_on_rules && attr.remainder() != Some(post.best),
            ),
            rests_on_rules_of_thumb: post.rests_on_rules,
            special_category: attr.special_category.clone(),
            distribution: attr
                .values
                .iter()
                .zip(&post.probs)
                .zip(&attr.base_rates)
                .map(|((v, &p), &b)| ValueShare {
                    id: v.id.clone(),
                    label: v.label.clone(),
                    probability: p,
                    base_rate: b,
                    alert_level: priors.rarity.value_level(attr.threshold, b),
                    exposed: priors.rarity.exposed(attr.threshold, p, b),
                })
                .collect(),
        });
    }
    let items = match rows {
        RowCount::Nothing => Vec::new(),
        RowCount::First(n) => Rows::new(footprint, priors, exposure)
            .iter()
            .take(n)
            .collect(),
        RowCount::All => Rows::new(footprint, priors, exposure).iter().collect(),
    };

    let mut has_evidence = vec![false; footprint.items.len()];
    for e in &exposure.evidence().list {
        if let Subject::Item(i) = e.subject()
            && let Some(h) = has_evidence.get_mut(i)
        {
            *h = true;
        }
    }
    let unmatched = footprint
        .items
        .iter()
        .zip(&has_evidence)
        .filter(|(_, h)| !**h)
        .map(|(it, _)| UnmatchedItem {
            name: String::from(&*it.name),
            kind: it.kind.as_str().to_string(),
            origin: it.origin.to_string(),
        })
        .collect();

    let mut warnings: Vec<String> = footprint.warnings.iter().map(|w| w.to_string()).collect();
    warnings.extend(
        priors
            .warnings
            .iter()
            .map(|w| format!("{}: {w}", priors_info.name)),
    );

    ScanReport {
        warning: None,
        format: REPORT_FORMAT,
        tool: ToolInfo {
            name: "telltale".into(),
            version: env!("CARGO_PKG_VERSION").into(),
        },
        archive,
        priors: priors_info,
        rarity: priors.rarity,
        attributes,
        items,
        unmatched,
        sources: source_reports(&exposure.evidence().sources, footprint, priors, exposure),
        special_categories: special_report(footprint, exposure),
        friends: friends_report(priors, exposure),
        warnings,
        cautions: CAUTIONS.iter().map(|s| s.to_string()).collect(),
    }
}
