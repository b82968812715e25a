//! A read-only table of phrase keys laid out as bytes, so that a large bundled list
//! (the gazetteer's 282,000 names) is compiled into the binary ready to search and
//! costs nothing to load. build.rs compiles this same file to write the table; the
//! library reads it in place. Kept free of the rest of the crate for that reason.
//!
//! Layout (every number a little-endian u32): a header of [`HEADER_WORDS`] words
//! (magic, key count, keys with values, slot count, value count, text length, most
//! tokens in a key, longest key of unspaced script in characters); the slots of an
//! open-addressing hash table (key number + 1, 0 for empty; FNV-1a over the key's
//! bytes, linear probing, a power of two at most 5/8 full); per key four words (text
//! start, length with [`PREFIX`] set when the key is a proper prefix of another key,
//! first value, value count); the values; the keys' text.

/// Marks the table's first word.
pub const MAGIC: u32 = 0x5445_4b31;
pub const HEADER_WORDS: usize = 8;
/// Bit of a key's length word marking a key that is a proper prefix (whole tokens) of
/// another key.
pub const PREFIX: u32 = 1 << 31;

/// FNV-1a, 64 bits: the same at build time and at run time, on every platform.
pub fn hash(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// Lay out keys and their values (in the order given; a key may come several times).
/// `unspaced` tells whether a key is written in a script without spaces, for the
/// header's longest such key.
#[cfg_attr(not(test), allow(dead_code))]
pub fn build(entries: &[(String, u32)], unspaced: impl Fn(&str) -> bool) -> Vec<u8> {
    use std::collections::HashMap;
    let mut order: Vec<String> = Vec::new();
    let mut index: HashMap<String, usize> = HashMap::new();
    let mut values: Vec<Vec<u32>> = Vec::new();
    let mut prefix: Vec<bool> = Vec::new();
    let mut max_tokens = 0u32;
    let mut max_unspaced = 0u32;
    let mut slot_of =
        |key: &str, order: &mut Vec<String>, values: &mut Vec<Vec<u32>>, prefix: &mut Vec<bool>| {
            if let Some(&i) = index.get(key) {
                return i;
            }
            let i = order.len();
            index.insert(key.to_string(), i);
            order.push(key.to_string());
            values.push(Vec::new());
            prefix.push(false);
            i
        };
    for (key, value) in entries {
        if key.is_empty() {
            continue;
        }
        max_tokens = max_tokens.max(key.split(' ').count() as u32);
        if unspaced(key) {
            max_unspaced = max_unspaced.max(key.chars().count() as u32);
        }
        for (at, _) in key.match_indices(' ') {
            let p = slot_of(&key[..at], &mut order, &mut values, &mut prefix);
            prefix[p] = true;
        }
        let k = slot_of(key, &mut order, &mut values, &mut prefix);
        values[k].push(*value);
    }
    let n = order.len();
    let mut n_slots = 16usize;
    while n_slots * 5 < n * 8 {
        n_slots *= 2;
    }
    let mut slots = vec![0u32; n_slots];
    for (i, key) in order.iter().enumerate() {
        let mut s = (hash(key.as_bytes()) as usize) & (n_slots - 1);
        while slots[s] != 0 {
            s = (s + 1) & (n_slots - 1);
        }
        slots[s] = i as u32 + 1;
    }
    let with_values = values.iter().filter(|v| !v.is_empty()).count();
    let n_values: usize = values.iter().map(Vec::len).sum();
    let text_len: usize = order.iter().map(String::len).sum();
    let mut out: Vec<u8> =
        Vec::with_capacity(4 * (HEADER_WORDS + n_slots + 4 * n + n_values) + text_len);
    let put = |out: &mut Vec<u8>, w: usize| out.extend_from_slice(&(w as u32).to_le_bytes());
    for w in [
        MAGIC as usize,
        n,
        with_values,
        n_slots,
        n_values,
        text_len,
        max_tokens as usize,
        max_unspaced as usize,
    ] {
        put(&mut out, w);
    }
    for s in &slots {
        put(&mut out, *s as usize);
    }
    let (mut text_at, mut value_at) = (0usize, 0usize);
    for (i, key) in order.iter().enumerate() {
        put(&mut out, text_at);
        let flag = if prefix[i] { PREFIX as usize } else { 0 };
        put(&mut out, key.len() | flag);
        put(&mut out, value_at);
        put(&mut out, values[i].len());
        text_at += key.len();
        value_at += values[i].len();
    }
    for v in values.iter().flatten() {
        put(&mut out, *v as usize);
    }
    for key in &order {
        out.extend_from_slice(key.as_bytes());
    }
    out
}

/// A laid-out table, read in place.
#[derive(Debug, Clone, Copy)]
pub struct View<'a> {
    bytes: &'a [u8],
    pub with_values: usize,
    slots: usize,
    pub values: usize,
    pub max_tokens: usize,
    pub max_unspaced_chars: usize,
    keys_at: usize,
    values_at: usize,
    text_at: usize,
}

fn word(bytes: &[u8], at: usize) -> u32 {
    u32::from_le_bytes([bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]])
}

impl<'a> View<'a> {
    /// Check the header and the sizes; `None` when the bytes are not such a table.
    pub fn new(bytes: &'a [u8]) -> Option<View<'a>> {
        if bytes.len() < 4 * HEADER_WORDS || word(bytes, 0) != MAGIC {
            return None;
        }
        let h = |i: usize| word(bytes, 4 * i) as usize;
        let (keys, with_values, slots, values, text) = (h(1), h(2), h(3), h(4), h(5));
        let keys_at = 4 * (HEADER_WORDS + slots);
        let values_at = keys_at + 16 * keys;
        let text_at = values_at + 4 * values;
        if !slots.is_power_of_two() || text_at + text != bytes.len() || keys >= slots {
            return None;
        }
        Some(View {
            bytes,
            with_values,
            slots,
            values,
            max_tokens: h(6),
            max_unspaced_chars: h(7),
            keys_at,
            values_at,
            text_at,
        })
    }

    /// Key number `i`: its text, whether it is a proper prefix of another key, and
    /// the range of its values.
    pub fn key(&self, i: usize) -> (&'a [u8], bool, std::ops::Range<usize>) {
        let at = self.keys_at + 16 * i;
        let start = word(self.bytes, at) as usize;
        let len = word(self.bytes, at + 4);
        let first = word(self.bytes, at + 8) as usize;
        let count = word(self.bytes, at + 12) as usize;
        let from = self.text_at + start;
        let text = &self.bytes[from..from + (len & !PREFIX) as usize];
        (text, len & PREFIX != 0, first..first + count)
    }

    /// Value number `i`.
    pub fn value(&self, i: usize) -> u32 {
        word(self.bytes, self.values_at + 4 * i)
    }

    /// Where a key is: its number, whether it is a proper prefix of another key, and
    /// the range of its values.
    pub fn find(&self, key: &str) -> Option<(bool, std::ops::Range<usize>)> {
        let mask = self.slots - 1;
        let mut s = (hash(key.as_bytes()) as usize) & mask;
        loop {
            let k = word(self.bytes, 4 * (HEADER_WORDS + s)) as usize;
            if k == 0 {
                return None;
            }
            let (text, prefix, values) = self.key(k - 1);
            if text == key.as_bytes() {
                return Some((prefix, values));
            }
            s = (s + 1) & mask;
        }
    }
}
