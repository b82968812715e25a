//! Checking a priors file: the attributes (values, rates, thresholds, smoothing,
//! calibration — any problem refuses the file) and the reference items one by one (a
//! duplicate id, an unknown attribute, a count list of the wrong length or a count that
//! is not a number or over [`MAX_COUNT`] is skipped
//! with a warning; the first few are listed, the rest counted). The item checks feed
//! the columnar store and the match index as they go, so the JSON reader can check
//! items while it streams them.

use std::collections::{HashMap, HashSet};
use std::hash::{BuildHasherDefault, Hasher};

use super::error::{Error, Result};
use super::file::Calibration;
use super::index::{Index, key_hash};
use super::model::{AttrValue, Attribute, DEFAULT_SMOOTHING};
use super::store::Items;
use crate::footprint::ItemKind;
use crate::text::name_key;

/// The largest member count believed: 10¹⁵, over 100,000 times the world's population
/// (about 8.2 billion in 2025, UN World Population Prospects 2024, from memory), so
/// only a broken or hostile file reaches it.
pub(crate) const MAX_COUNT: f64 = 1e15;

/// Item-level problems listed in detail before they are only counted.
const DETAILED_PROBLEMS: usize = 10;

/// The start of a name for a message: at most 60 characters, with "…" when cut, so
/// a hostile name never fills a screen or a warning list.
pub fn short(name: &str) -> std::borrow::Cow<'_, str> {
    const KEEP: usize = 60;
    match name.char_indices().nth(KEEP) {
        None => name.into(),
        Some((end, _)) => format!("{}…", &name[..end]).into(),
    }
}

/// Check the attributes; every problem is listed in the error.
pub(crate) fn check_attributes(
    specs: &[super::file::AttributeSpec],
    origin: &str,
) -> Result<Vec<Attribute>> {
    let mut problems = Vec::new();
    let mut attributes = Vec::new();
    let mut seen_ids = HashSet::new();
    for (ai, spec) in specs.iter().enumerate() {
        let at = format!("attributes[{ai}] ({})", spec.id);
        if !seen_ids.insert(spec.id.clone()) {
            problems.push(format!("{at}: the id '{}' is used twice", spec.id));
        }
        if spec.values.len() < 2 {
            problems.push(format!("{at}: needs at least two values"));
            continue;
        }
        let mut value_ids = HashSet::new();
        for v in &spec.values {
            if !value_ids.insert(v.id.as_str()) {
                problems.push(format!("{at}: the value '{}' is listed twice", v.id));
            }
            if !(v.base_rate.is_finite() && v.base_rate > 0.0) {
                problems.push(format!(
                    "{at}: value '{}' has base_rate {}; base rates must be above 0",
                    v.id, v.base_rate
                ));
            }
        }
        let total: f64 = spec.values.iter().map(|v| v.base_rate).sum();
        if (total - 1.0).abs() > 0.01 {
            problems.push(format!(
                "{at}: base rates add up to {total:.4}; they must add up to 1"
            ));
        }
        if !(spec.threshold > 0.0 && spec.threshold <= 1.0) {
            problems.push(format!(
                "{at}: threshold {} must be above 0 and at most 1",
                spec.threshold
            ));
        }
        let smoothing = spec.smoothing.unwrap_or(DEFAULT_SMOOTHING);
        if !(smoothing.is_finite() && smoothing >= 0.0) {
            problems.push(format!("{at}: smoothing must be 0 or more"));
        }
        let pseudocount = spec.pseudocount.unwrap_or(0.0);
        if !(pseudocount.is_finite() && pseudocount >= 0.0) {
            problems.push(format!("{at}: pseudocount must be 0 or more"));
        }
        if smoothing + pseudocount <= 0.0 {
            problems.push(format!(
                "{at}: smoothing and pseudocount cannot both be 0 (items with one member would be certain)"
            ));
        }
        let calibration = spec.calibration.clone().unwrap_or_default();
        let lambda = crate::calibration::lambda(&calibration);
        if !(lambda.is_finite() && lambda > 0.0) {
            problems.push(format!("{at}: calibration lambda must be above 0"));
        }
        if let Calibration::Logistic {
            intercept,
            log_odds,
            log_base_rate,
            evidence_spread,
            ..
        } = calibration
            && ![intercept, log_odds, log_base_rate, evidence_spread]
                .iter()
                .all(|w| w.is_finite())
        {
            problems.push(format!(
                "{at}: logistic calibration weights must be finite numbers"
            ));
        }
        let mut member_rates = Vec::with_capacity(spec.values.len());
        let given = spec
            .values
            .iter()
            .filter(|v| v.member_rate.is_some())
            .count();
        if given != 0 && given != spec.values.len() {
            problems.push(format!(
                "{at}: member_rate is given for {given} of {} values; give it for all or none",
                spec.values.len()
            ));
        }
        for v in &spec.values {
            let m = v.member_rate.unwrap_or(v.base_rate);
            if !(m.is_finite() && m > 0.0) {
                problems.push(format!(
                    "{at}: value '{}' has member_rate {m}; it must be above 0",
                    v.id
                ));
            }
            member_rates.push(m.max(f64::MIN_POSITIVE));
        }
        let member_total: f64 = member_rates.iter().sum();
        member_rates.iter_mut().for_each(|m| *m /= member_total);
        let base_rates: Vec<f64> = spec
            .values
            .iter()
            .map(|v| v.base_rate.max(f64::MIN_POSITIVE) / total)
            .collect();
        attributes.push(Attribute {
            id: spec.id.clone(),
            label: spec.label.clone(),
            values: spec
                .values
                .iter()
                .map(|v| AttrValue {
                    id: v.id.clone(),
                    label: v.label.clone(),
                })
                .collect(),
            log_base: base_rates.iter().map(|p| p.ln()).collect(),
            base_rates,
            member_rates,
            threshold: spec.threshold,
            smoothing,
            pseudocount,
            special_category: spec.special_category.clone(),
            calibration,
        });
    }
    if attributes.is_empty() && problems.is_empty() {
        problems.push("no attributes: the file must list at least one".into());
    }
    if !problems.is_empty() {
        return Err(Error::Invalid {
            file: origin.to_string(),
            problems,
        });
    }

    Ok(attributes)
}

/// A hasher for keys that are already well-mixed 64-bit hashes.
#[derive(Default)]
struct PassThrough(u64);

impl Hasher for PassThrough {
    fn finish(&self) -> u64 {
        self.0
    }
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.0 = (self.0 << 8) | b as u64;
        }
    }
    fn write_u64(&mut self, n: u64) {
        self.0 = n;
    }
}

/// Checks reference items one at a time and stores those that pass.
pub(crate) struct ItemBuilder<'a> {
    attr_index: HashMap<&'a str, usize>,
    value_counts: Vec<u32>,
    items: Items,
    name_hashes: Vec<(u64, u32)>,
    aliases: Vec<(u32, String)>,
    /// First item with an id hash, and the next item with the same hash (a chain, so
    /// a duplicate id is found by comparing real ids, never by hash alone).
    id_head: HashMap<u64, u32, BuildHasherDefault<PassThrough>>,
    id_next: Vec<u32>,
    warnings: Vec<String>,
    n_problems: usize,
    too_large: bool,
    members: Vec<(usize, std::ops::Range<usize>)>,
    counts: Vec<f64>,
    /// Longest name, id or alias kept.
    name_bytes: usize,
}

const NO_ITEM: u32 = u32::MAX;

impl<'a> ItemBuilder<'a> {
    pub fn new(
        attributes: &'a [Attribute],
        capacity: usize,
        limits: &crate::limits::Limits,
    ) -> ItemBuilder<'a> {
        ItemBuilder {
            attr_index: attributes
                .iter()
                .enumerate()
                .map(|(i, a)| (a.id.as_str(), i))
                .collect(),
            value_counts: attributes.iter().map(|a| a.values.len() as u32).collect(),
            items: Items::new(attributes.iter().map(|a| a.values.len() as u32).collect()),
            name_hashes: Vec::with_capacity(capacity),
            aliases: Vec::new(),
            id_head: HashMap::with_capacity_and_hasher(capacity, Default::default()),
            id_next: Vec::with_capacity(capacity),
            warnings: Vec::new(),
            n_problems: 0,
            too_large: false,
            members: Vec::new(),
            counts: Vec::new(),
            name_bytes: usize::try_from(limits.name_bytes).unwrap_or(usize::MAX),
        }
    }

    /// Record an item problem (listed in detail up to a point, then counted).
    pub(crate) fn note(&mut self, w: String) {
        self.n_problems += 1;
        if self.n_problems <= DETAILED_PROBLEMS {
            self.warnings.push(w);
        }
    }

    /// Check item `ii` and store it unless it must be skipped. `members` are (attribute
    /// id, counts as read, how many counts the list had) in ascending attribute-id
    /// order, each id once (as a sorted map gives them). A name, id or alias over the
    /// name limit is skipped with a warning.
    pub fn push<'m>(
        &mut self,
        ii: usize,
        id: Option<&str>,
        name: &str,
        kind: Option<ItemKind>,
        aliases: impl Iterator<Item = &'m str>,
        members: impl Iterator<Item = (&'m str, &'m [f64], usize)>,
    ) {
        let at = || format!("items[{ii}] ('{}')", short(name));
        let over = [("name", Some(name)), ("id", id)]
            .into_iter()
            .find_map(|(field, text)| {
                text.filter(|t| t.len() > self.name_bytes)
                    .map(|t| (field, t.len()))
            });
        if let Some((field, len)) = over {
            let w = format!(
                "{}: the {field} is {} bytes long, over the limit of {} (name-bytes); item skipped ({})",
                at(),
                crate::limits::thousands(len as u64),
                crate::limits::LimitName::NameBytes.show(self.name_bytes as u64),
                crate::limits::LimitName::NameBytes.raise_hint()
            );
            self.note(w);
            return;
        }
        let n = self.items.len() as u32;
        if let Some(id) = id {
            let h = key_hash(id);
            let mut next = self.id_head.get(&h).copied().unwrap_or(NO_ITEM);
            let head = next;
            while next != NO_ITEM {
                if self.items.id(next as usize) == Some(id) {
                    let w = format!(
                        "{}: the id '{id}' is listed twice; the later entry is ignored",
                        at()
                    );
                    self.note(w);
                    return;
                }
                next = self.id_next[next as usize];
            }
            self.id_head.insert(h, n);
            self.id_next.push(head);
        } else {
            self.id_next.push(NO_ITEM);
        }
        self.members.clear();
        self.counts.clear();
        for (attr_id, m, len) in members {
            let Some(&ai) = self.attr_index.get(attr_id) else {
                let w = format!(
                    "{}: unknown attribute '{}'; its counts are ignored",
                    at(),
                    short(attr_id)
                );
                self.note(w);
                continue;
            };
            let k = self.value_counts[ai] as usize;
            if m.len() != k || len != k {
                let w = format!(
                    "{}: '{attr_id}' has {} counts for {k} values; ignored",
                    at(),
                    len
                );
                self.note(w);
                continue;
            }
            // A count no group of people can have — not a number, or far more members
            // than people alive — makes the attribute's counts meaningless: ignored,
            // not clamped into something that looks like evidence. A count below
            // zero (noise released without clamping) is taken as 0, with a warning.
            if let Some(&bad) = m.iter().find(|c| !c.is_finite() || **c > MAX_COUNT) {
                let w = format!(
                    "{}: '{attr_id}' has a count of {bad:e}, more members than any group can have; ignored",
                    at()
                );
                self.note(w);
                continue;
            }
            if let Some(&bad) = m.iter().find(|c| **c < 0.0) {
                let w = format!(
                    "{}: '{attr_id}' has a count below 0 ({bad}); taken as 0",
                    at()
                );
                self.note(w);
            }
            let start = self.counts.len();
            self.counts.extend(m.iter().map(|&c| c.max(0.0)));
            self.members.push((ai, start..self.counts.len()));
        }
        self.members.sort_by_key(|(a, _)| *a);
        let sorted: Vec<(usize, &[f64])> = self
            .members
            .iter()
            .map(|(a, r)| (*a, &self.counts[r.clone()]))
            .collect();
        if self.items.push(id, name, kind, &sorted).is_none() {
            self.too_large = true;
            return;
        }
        let key = name_key(name);
        if !key.is_empty() {
            self.name_hashes.push((key_hash(&key), n));
        }
        for alias in aliases.filter(|a| a.len() <= self.name_bytes) {
            let key = name_key(alias);
            if !key.is_empty() {
                self.aliases.push((n, key));
            }
        }
    }

    /// The stored items, their index and the item warnings.
    pub fn finish(mut self, origin: &str) -> Result<(Items, Index, Vec<String>)> {
        if self.too_large {
            return Err(Error::Invalid {
                file: origin.to_string(),
                problems: vec![
                    "the reference items' names and ids take more than 4 GiB; split the file"
                        .into(),
                ],
            });
        }
        if self.n_problems > DETAILED_PROBLEMS {
            self.warnings.push(format!(
                "… and {} more",
                crate::reading::count(
                    self.n_problems - DETAILED_PROBLEMS,
                    "item problem",
                    "item problems"
                )
            ));
        }
        let index = Index::build(&self.items, self.name_hashes, self.aliases);
        Ok((self.items, index, self.warnings))
    }
}
