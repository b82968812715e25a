//! Matching an archive's items against the reference items: by the archive's own id
//! first, then by normalised name (NFKC, case-folded, diacritics and punctuation
//! folded; see [`crate::text::name_key`]), then by a listed alias. When several
//! reference items share a name, one of the same kind wins, then the best supported.

use std::collections::HashMap;

use serde::Serialize;

use super::model::PriorItem;
use crate::footprint::Item;
use crate::text::name_key;

/// How an archive item was matched to a reference item.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum MatchedBy {
    Id,
    Name,
    Alias,
}

impl MatchedBy {
    pub fn as_str(self) -> &'static str {
        match self {
            MatchedBy::Id => "id",
            MatchedBy::Name => "name",
            MatchedBy::Alias => "alias",
        }
    }
}

#[derive(Debug, Default, Clone)]
pub(crate) struct Index {
    by_id: HashMap<String, u32>,
    by_name: HashMap<String, Vec<u32>>,
    by_alias: HashMap<String, Vec<u32>>,
}

impl Index {
    pub(crate) fn build(items: &[PriorItem], aliases: &[Vec<String>]) -> Index {
        let mut index = Index {
            by_id: HashMap::with_capacity(items.len()),
            by_name: HashMap::with_capacity(items.len()),
            by_alias: HashMap::new(),
        };
        for (i, item) in items.iter().enumerate() {
            let i = i as u32;
            if let Some(id) = &item.id {
                index.by_id.entry(id.clone()).or_insert(i);
            }
            let key = name_key(&item.name);
            if !key.is_empty() {
                index.by_name.entry(key).or_default().push(i);
            }
            for alias in aliases.get(i as usize).into_iter().flatten() {
                let key = name_key(alias);
                if !key.is_empty() {
                    index.by_alias.entry(key).or_default().push(i);
                }
            }
        }
        index
    }

    pub(crate) fn find(&self, items: &[PriorItem], item: &Item) -> Option<(usize, MatchedBy)> {
        if let Some(id) = &item.id
            && let Some(&i) = self.by_id.get(id)
        {
            return Some((i as usize, MatchedBy::Id));
        }
        let key = name_key(&item.name);
        if key.is_empty() {
            return None;
        }
        let pick = |cands: &Vec<u32>| -> usize {
            cands
                .iter()
                .copied()
                .max_by(|&a, &b| {
                    let (ia, ib) = (&items[a as usize], &items[b as usize]);
                    let kind_a = ia.kind == Some(item.kind);
                    let kind_b = ib.kind == Some(item.kind);
                    kind_a
                        .cmp(&kind_b)
                        .then(ia.support().total_cmp(&ib.support()))
                        .then(b.cmp(&a))
                })
                .map(|i| i as usize)
                .unwrap_or(0)
        };
        if let Some(c) = self.by_name.get(&key) {
            return Some((pick(c), MatchedBy::Name));
        }
        self.by_alias.get(&key).map(|c| (pick(c), MatchedBy::Alias))
    }
}
