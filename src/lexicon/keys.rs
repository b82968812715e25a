//! The exact keys of a phrase index, stored compactly. Every key's text sits in one
//! string, a hash table holds only key numbers, and a key with one value keeps it
//! inline, so the bundled gazetteer's ~90,000 names cost a few bytes each instead of
//! two heap blocks apiece. The proper prefixes of the keys (whole tokens at a time)
//! live in the same table, marked, so that matching a run of tokens needs one lookup
//! to learn both whether it is a key and whether it can still grow into one.
//!
//! A table can also be read in place from bytes laid out at build time
//! ([`super::key_image`]; the bundled gazetteer): then it is read-only and only its
//! values are decoded when it is made.

use std::hash::BuildHasher;

use foldhash::fast::FixedState;
use hashbrown::HashTable;

/// The values stored under one key.
#[derive(Debug, Clone)]
enum Values<T> {
    /// A prefix of other keys only.
    None,
    One(T),
    /// Several: their position in `KeyTable::many` (kept out of line so that a key
    /// stays 16 bytes for a small value type; nearly every key has one value).
    Many(u32),
}

/// Bit of `Key::len_prefix` marking a key that is a proper prefix of another.
const PREFIX: u32 = 1 << 31;

#[derive(Debug, Clone)]
struct Key<T> {
    /// Byte span of the key in `KeyTable::text`.
    start: u32,
    /// The key's length in bytes, with [`PREFIX`] set when the key is a proper prefix
    /// (whole tokens) of another key.
    len_prefix: u32,
    values: Values<T>,
}

impl<T> Key<T> {
    fn span(&self) -> std::ops::Range<usize> {
        let start = self.start as usize;
        start..start + (self.len_prefix & !PREFIX) as usize
    }

    fn is_prefix(&self) -> bool {
        self.len_prefix & PREFIX != 0
    }
}

/// What a lookup finds.
#[derive(Debug, Clone, Copy)]
pub struct Found<'a, T> {
    /// The values stored under the key (empty when it is only a prefix).
    pub values: &'a [T],
    /// The key is the start of a longer key.
    pub prefix: bool,
}

/// Keys (tokens joined by single spaces) with their values.
#[derive(Debug, Clone)]
pub struct KeyTable<T> {
    text: String,
    keys: Vec<Key<T>>,
    /// The value lists of keys with several values.
    many: Vec<Box<[T]>>,
    table: HashTable<u32>,
    hasher: FixedState,
    /// Keys that carry values (not only prefixes).
    with_values: usize,
    /// A table laid out at build time, with its values decoded; when set, the table
    /// is read-only and the fields above stay empty.
    image: Option<(super::key_image::View<'static>, Vec<T>)>,
}

impl<T> Default for KeyTable<T> {
    fn default() -> Self {
        KeyTable {
            text: String::new(),
            keys: Vec::new(),
            many: Vec::new(),
            table: HashTable::new(),
            // A fixed seed: lookups need no randomness (the keys come from bundled or
            // user-written lists, not from an adversary choosing collisions).
            hasher: FixedState::with_seed(0x7e11_7a1e),
            with_values: 0,
            image: None,
        }
    }
}

impl<T> KeyTable<T> {
    /// A read-only table over bytes laid out by [`super::key_image::build`], each
    /// value decoded once; `None` when the bytes are not such a table or a value does
    /// not decode.
    pub fn from_image(bytes: &'static [u8], decode: impl Fn(u32) -> Option<T>) -> Option<Self> {
        let view = super::key_image::View::new(bytes)?;
        let values = (0..view.values)
            .map(|i| decode(view.value(i)))
            .collect::<Option<Vec<T>>>()?;
        Some(KeyTable {
            image: Some((view, values)),
            ..KeyTable::default()
        })
    }

    /// The image's header figures (most tokens in a key, longest key of unspaced
    /// script in characters), for a table read from bytes.
    pub fn image_limits(&self) -> Option<(usize, usize)> {
        self.image
            .as_ref()
            .map(|(v, _)| (v.max_tokens, v.max_unspaced_chars))
    }

    /// Number of keys that carry values.
    pub fn len(&self) -> usize {
        match &self.image {
            Some((view, _)) => view.with_values,
            None => self.with_values,
        }
    }

    fn position(&self, key: &str) -> Option<usize> {
        let hash = self.hasher.hash_one(key);
        self.table
            .find(hash, |&i| self.text[self.keys[i as usize].span()] == *key)
            .map(|&i| i as usize)
    }

    /// The entry for `key`, made empty when missing.
    fn entry(&mut self, key: &str) -> &mut Key<T> {
        let at = match self.position(key) {
            Some(at) => at,
            None => {
                let at = self.keys.len();
                let start = self.text.len();
                self.text.push_str(key);
                self.keys.push(Key {
                    start: start as u32,
                    len_prefix: key.len() as u32,
                    values: Values::None,
                });
                let (keys, text, hasher) = (&self.keys, &self.text, &self.hasher);
                let hash = hasher.hash_one(key);
                self.table.insert_unique(hash, at as u32, |&i| {
                    hasher.hash_one(&text[keys[i as usize].span()])
                });
                at
            }
        };
        &mut self.keys[at]
    }

    /// Add a value under a key, and mark the key's proper prefixes. Keys are whole
    /// names (a lexicon line); the table holds at most 4 GiB of key text. A table read
    /// from bytes is read-only: inserting into it does nothing.
    pub fn insert(&mut self, key: &str, value: T) {
        if self.image.is_some() {
            debug_assert!(false, "insert into a read-only key table");
            return;
        }
        for (at, _) in key.match_indices(' ') {
            self.entry(&key[..at]).len_prefix |= PREFIX;
        }
        let n_many = self.many.len() as u32;
        let k = self.entry(key);
        let was_empty = matches!(k.values, Values::None);
        match std::mem::replace(&mut k.values, Values::None) {
            Values::None => k.values = Values::One(value),
            Values::One(first) => {
                k.values = Values::Many(n_many);
                self.many.push(Box::new([first, value]));
            }
            Values::Many(at) => {
                k.values = Values::Many(at);
                let list = &mut self.many[at as usize];
                let mut grown = std::mem::take(list).into_vec();
                grown.push(value);
                *list = grown.into_boxed_slice();
            }
        }
        if was_empty {
            self.with_values += 1;
        }
    }

    /// The values under a key and whether it is the start of a longer key.
    pub fn lookup(&self, key: &str) -> Option<Found<'_, T>> {
        if let Some((view, values)) = &self.image {
            let (prefix, range) = view.find(key)?;
            return Some(Found {
                values: values.get(range).unwrap_or(&[]),
                prefix,
            });
        }
        let k = &self.keys[self.position(key)?];
        let values = match &k.values {
            Values::None => &[][..],
            Values::One(v) => std::slice::from_ref(v),
            Values::Many(at) => &self.many[*at as usize][..],
        };
        Some(Found {
            values,
            prefix: k.is_prefix(),
        })
    }

    /// The values under a key (empty when there are none).
    pub fn get(&self, key: &str) -> &[T] {
        self.lookup(key).map(|f| f.values).unwrap_or(&[])
    }

    /// Release the room kept for growth (after the last insert).
    pub fn shrink_to_fit(&mut self) {
        self.text.shrink_to_fit();
        self.keys.shrink_to_fit();
        self.many.shrink_to_fit();
        let (keys, text, hasher) = (&self.keys, &self.text, &self.hasher);
        self.table
            .shrink_to_fit(|&i| hasher.hash_one(&text[keys[i as usize].span()]));
    }
}

#[cfg(test)]
mod tests {
    use std::collections::{BTreeMap, BTreeSet};

    use proptest::prelude::*;

    use super::*;

    #[test]
    fn keys_values_and_prefixes() {
        let mut t = KeyTable::default();
        t.insert("new york city", 1u32);
        t.insert("york", 2);
        t.insert("york", 3);
        t.insert("new york", 4);
        t.shrink_to_fit();
        assert_eq!(t.len(), 3);
        assert_eq!(t.get("york"), &[2, 3]);
        assert_eq!(t.get("new york city"), &[1]);
        let new = t.lookup("new").unwrap();
        assert!(new.prefix && new.values.is_empty());
        let ny = t.lookup("new york").unwrap();
        assert!(ny.prefix && ny.values == [4]);
        assert!(!t.lookup("new york city").unwrap().prefix);
        assert!(t.lookup("boston").is_none());
    }

    /// The gazetteer's keys stay 16 bytes each (about 110,000 of them, prefixes
    /// included): a value list of several places is kept out of line.
    #[test]
    fn a_place_key_is_sixteen_bytes() {
        assert_eq!(
            std::mem::size_of::<Key<crate::lexicon::PlaceRef>>(),
            16,
            "key layout grew"
        );
    }

    proptest! {
        /// The table agrees with a plain map of keys to value lists and a set of
        /// prefixes built the obvious way (the standard library's BTreeMap/BTreeSet
        /// as the reference).
        #[test]
        fn agrees_with_a_plain_map(
            entries in prop::collection::vec(("[a-c]{1,2}( [a-c]{1,2}){0,2}", 0u8..5), 0..60),
            probes in prop::collection::vec("[a-c]{1,2}( [a-c]{1,2}){0,2}", 0..30),
        ) {
            let mut table = KeyTable::default();
            let mut map: BTreeMap<String, Vec<u8>> = BTreeMap::new();
            let mut prefixes = BTreeSet::new();
            for (key, value) in &entries {
                table.insert(key, *value);
                map.entry(key.clone()).or_default().push(*value);
                for (at, _) in key.match_indices(' ') {
                    prefixes.insert(key[..at].to_string());
                }
            }
            table.shrink_to_fit();
            prop_assert_eq!(table.len(), map.len());
            // The same keys laid out as bytes (as build.rs lays out the gazetteer)
            // and read in place give the same answers.
            let laid: Vec<(String, u32)> =
                entries.iter().map(|(k, v)| (k.clone(), u32::from(*v))).collect();
            let bytes: &'static [u8] =
                Box::leak(crate::lexicon::key_image::build(&laid, |_| false).into_boxed_slice());
            let image = KeyTable::from_image(bytes, |v| u8::try_from(v).ok()).unwrap();
            prop_assert_eq!(image.len(), map.len());
            for key in probes.iter().chain(map.keys()).chain(prefixes.iter()) {
                let expected = map.get(key).map(Vec::as_slice).unwrap_or(&[]);
                prop_assert_eq!(table.get(key), expected);
                let is_prefix = table.lookup(key).is_some_and(|f| f.prefix);
                prop_assert_eq!(is_prefix, prefixes.contains(key));
                prop_assert_eq!(image.get(key), expected);
                prop_assert_eq!(image.lookup(key).is_some_and(|f| f.prefix), is_prefix);
            }
        }
    }
}
