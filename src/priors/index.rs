//! Matching an archive's items against the reference items: by the archive's own id
//! first, then by normalised name (NFKC, case-folded, diacritics and punctuation
//! folded; see [`crate::text::name_key`]), then by a listed alias. When several
//! reference items share a name, one of the same kind wins, then the best supported,
//! then the earliest.
//!
//! The index is three sorted arrays of (64-bit hash of the key, entry) — plain
//! columns, so the binary cache can store them and nothing is rebuilt on load. A hash
//! only proposes candidates: every hit is checked against the real key (the item's
//! id, the name key of its name, the stored alias key) before it counts, so a hash
//! collision can never make a wrong match.

use serde::Serialize;

use super::store::Items;
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

/// A stable 64-bit hash of a key (the same on every platform and build, as the cache
/// stores it): 8-byte little-endian words folded by multiply-xorshift, the length
/// mixed in, and the splitmix64 finaliser. Not a cryptographic hash; collisions are
/// harmless because hits are verified.
pub(crate) fn key_hash(s: &str) -> u64 {
    const K: u64 = 0x9E37_79B9_7F4A_7C15;
    let bytes = s.as_bytes();
    let mut h = (bytes.len() as u64).wrapping_mul(K) ^ 0x7465_6c6c_7461_6c65;
    let mut words = bytes.chunks_exact(8);
    for w in &mut words {
        let mut b = [0u8; 8];
        b.copy_from_slice(w);
        h = (h ^ u64::from_le_bytes(b)).wrapping_mul(K);
        h ^= h >> 29;
    }
    let rest = words.remainder();
    if !rest.is_empty() {
        let mut b = [0u8; 8];
        b[..rest.len()].copy_from_slice(rest);
        h = (h ^ u64::from_le_bytes(b)).wrapping_mul(K);
        h ^= h >> 29;
    }
    // splitmix64 finaliser.
    h ^= h >> 30;
    h = h.wrapping_mul(0xBF58_476D_1CE4_E5B9);
    h ^= h >> 27;
    h = h.wrapping_mul(0x94D0_49BB_1331_11EB);
    h ^ (h >> 31)
}

/// (hash, entry) pairs sorted by hash, then entry.
#[derive(Debug, Default, Clone, PartialEq)]
pub(crate) struct Keyed {
    pub hash: Vec<u64>,
    pub at: Vec<u32>,
}

impl Keyed {
    fn from_pairs(mut pairs: Vec<(u64, u32)>) -> Keyed {
        pairs.sort_unstable();
        Keyed {
            hash: pairs.iter().map(|p| p.0).collect(),
            at: pairs.iter().map(|p| p.1).collect(),
        }
    }

    /// Entries whose key hashes to `h`, in ascending order.
    fn lookup(&self, h: u64) -> impl Iterator<Item = usize> + '_ {
        let lo = self.hash.partition_point(|&x| x < h);
        let hi = lo + self.hash[lo..].partition_point(|&x| x == h);
        self.at[lo..hi].iter().map(|&a| a as usize)
    }

    pub fn is_sorted(&self) -> bool {
        self.hash.len() == self.at.len()
            && self
                .hash
                .windows(2)
                .zip(self.at.windows(2))
                .all(|(h, a)| (h[0], a[0]) <= (h[1], a[1]))
    }
}

#[derive(Debug, Default, Clone, PartialEq)]
pub(crate) struct Index {
    /// Hash of the item's id → item.
    pub ids: Keyed,
    /// Hash of the name key of the item's name → item.
    pub names: Keyed,
    /// Hash of an alias key → alias number.
    pub aliases: Keyed,
    /// Alias keys (already normalised), one after another.
    pub alias_text: String,
    /// `m + 1` offsets into `alias_text`.
    pub alias_spans: Vec<u32>,
    /// The item each alias belongs to.
    pub alias_item: Vec<u32>,
}

impl Index {
    /// Build the index; `aliases` lists (item, alias key) with non-empty keys.
    pub(crate) fn build(
        items: &Items,
        name_hashes: Vec<(u64, u32)>,
        aliases: Vec<(u32, String)>,
    ) -> Index {
        let mut ids = Vec::with_capacity(items.len());
        for i in 0..items.len() {
            if let Some(id) = items.id(i) {
                ids.push((key_hash(id), i as u32));
            }
        }
        let mut alias_text = String::new();
        let mut alias_spans = vec![0u32];
        let mut alias_item = Vec::with_capacity(aliases.len());
        let mut alias_pairs = Vec::with_capacity(aliases.len());
        for (n, (item, key)) in aliases.into_iter().enumerate() {
            alias_pairs.push((key_hash(&key), n as u32));
            alias_text.push_str(&key);
            alias_spans.push(alias_text.len() as u32);
            alias_item.push(item);
        }
        Index {
            ids: Keyed::from_pairs(ids),
            names: Keyed::from_pairs(name_hashes),
            aliases: Keyed::from_pairs(alias_pairs),
            alias_text,
            alias_spans,
            alias_item,
        }
    }

    fn alias_key(&self, a: usize) -> &str {
        &self.alias_text[self.alias_spans[a] as usize..self.alias_spans[a + 1] as usize]
    }

    pub(crate) fn find(&self, items: &Items, item: &Item) -> Option<(usize, MatchedBy)> {
        if let Some(id) = &item.id
            && let Some(i) = self
                .ids
                .lookup(key_hash(id))
                .find(|&i| items.id(i) == Some(&**id))
        {
            return Some((i, MatchedBy::Id));
        }
        let key = name_key(&item.name);
        if key.is_empty() {
            return None;
        }
        let h = key_hash(&key);
        let pick = |cands: &mut dyn Iterator<Item = usize>| -> Option<usize> {
            cands.max_by(|&a, &b| {
                let kind_a = items.kind(a) == Some(item.kind);
                let kind_b = items.kind(b) == Some(item.kind);
                kind_a
                    .cmp(&kind_b)
                    .then(items.support[a].total_cmp(&items.support[b]))
                    .then(b.cmp(&a))
            })
        };
        let mut by_name = self
            .names
            .lookup(h)
            .filter(|&i| name_key(items.name(i)) == key);
        if let Some(i) = pick(&mut by_name) {
            return Some((i, MatchedBy::Name));
        }
        let mut by_alias = self
            .aliases
            .lookup(h)
            .filter(|&a| self.alias_key(a) == key)
            .map(|a| self.alias_item[a] as usize);
        pick(&mut by_alias).map(|i| (i, MatchedBy::Alias))
    }
}
