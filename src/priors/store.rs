//! The reference items in columns: one text arena for names and ids with `u32` spans,
//! one flag byte per item (kind, whether it has an id), and every item's member counts
//! in one byte buffer, coded per item and attribute without loss — whole numbers that
//! fit as `u8`, `u16` or `u32` at that width, anything else as the raw `f64` bits. A
//! million items with four attributes (about 70 counts each) take about 100 MB this
//! way instead of about 2 GB as one `Vec<f64>` per item and attribute. [`PriorItem`]
//! is the read-only view; counts are decoded into a caller's buffer.

use crate::footprint::ItemKind;

/// Count codings (the tag byte of an item-attribute entry).
pub(crate) const TAG_U8: u8 = 1;
pub(crate) const TAG_U16: u8 = 2;
pub(crate) const TAG_U32: u8 = 3;
pub(crate) const TAG_F64: u8 = 4;

/// Flag bit: the item has an id (an empty id is still an id).
pub(crate) const HAS_ID: u8 = 0x80;
/// Flag bits holding the kind: 0 = none, 1 + position in [`ItemKind::ALL`].
pub(crate) const KIND_MASK: u8 = 0x0f;

/// Bytes per count for a tag (0 for an unknown tag).
pub(crate) fn width(tag: u8) -> usize {
    match tag {
        TAG_U8 => 1,
        TAG_U16 => 2,
        TAG_U32 => 4,
        TAG_F64 => 8,
        _ => 0,
    }
}

pub(crate) fn kind_code(kind: Option<ItemKind>) -> u8 {
    match kind {
        None => 0,
        Some(k) => 1 + ItemKind::ALL.iter().position(|&x| x == k).unwrap_or(0) as u8,
    }
}

pub(crate) fn kind_of(code: u8) -> Option<ItemKind> {
    match code & KIND_MASK {
        0 => None,
        c => ItemKind::ALL.get(c as usize - 1).copied(),
    }
}

/// The reference items, column by column. Every field is public to the crate so the
/// cache can write and check it; nothing outside `priors` sees them.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct Items {
    /// Names and ids, item after item.
    pub text: String,
    /// `2n + 1` offsets into `text`: item i's name is `spans[2i]..spans[2i+1]`, its id
    /// `spans[2i+1]..spans[2i+2]`.
    pub spans: Vec<u32>,
    /// Per item: kind code and [`HAS_ID`].
    pub flags: Vec<u8>,
    /// `n + 1` offsets into `entry_attr`/`entry_tag`: item i's entries.
    pub entry_start: Vec<u32>,
    /// Attribute index of each entry (ascending within an item).
    pub entry_attr: Vec<u16>,
    /// Count coding of each entry.
    pub entry_tag: Vec<u8>,
    /// `n + 1` offsets into `counts`: item i's coded counts, its entries in order.
    pub counts_start: Vec<u64>,
    pub counts: Vec<u8>,
    /// Per item: the largest member total over its attributes.
    pub support: Vec<f64>,
    /// Values per attribute (from the attributes, not stored in the cache).
    pub value_counts: Vec<u32>,
}

impl Items {
    pub fn new(value_counts: Vec<u32>) -> Items {
        Items {
            value_counts,
            spans: vec![0],
            entry_start: vec![0],
            counts_start: vec![0],
            ..Items::default()
        }
    }

    pub fn len(&self) -> usize {
        self.flags.len()
    }

    /// Add an item; `members` are (attribute index, sanitised counts) in ascending
    /// attribute order. `None` when the arena would outgrow its `u32` offsets.
    pub fn push(
        &mut self,
        id: Option<&str>,
        name: &str,
        kind: Option<ItemKind>,
        members: &[(usize, &[f64])],
    ) -> Option<()> {
        if self.text.len() + name.len() + id.map_or(0, str::len) > u32::MAX as usize
            || self.entry_attr.len() + members.len() > u32::MAX as usize
            || members.iter().any(|&(a, _)| a > u16::MAX as usize)
        {
            return None;
        }
        self.text.push_str(name);
        self.spans.push(self.text.len() as u32);
        if let Some(id) = id {
            self.text.push_str(id);
        }
        self.spans.push(self.text.len() as u32);
        self.flags
            .push(kind_code(kind) | if id.is_some() { HAS_ID } else { 0 });
        let mut support = 0.0f64;
        for &(ai, counts) in members {
            self.entry_attr.push(ai as u16);
            self.entry_tag.push(encode(counts, &mut self.counts));
            support = support.max(counts.iter().sum::<f64>());
        }
        self.entry_start.push(self.entry_attr.len() as u32);
        self.counts_start.push(self.counts.len() as u64);
        self.support.push(support);
        Some(())
    }

    /// Bytes of entry `e`: its attribute's value count × its coding's width.
    pub fn entry_bytes(&self, e: usize) -> usize {
        let k = self
            .value_counts
            .get(self.entry_attr[e] as usize)
            .copied()
            .unwrap_or(0) as usize;
        k * width(self.entry_tag[e])
    }

    pub fn item(&self, i: usize) -> PriorItem<'_> {
        PriorItem { items: self, i }
    }

    pub fn name(&self, i: usize) -> &str {
        &self.text[self.spans[2 * i] as usize..self.spans[2 * i + 1] as usize]
    }

    pub fn id(&self, i: usize) -> Option<&str> {
        (self.flags[i] & HAS_ID != 0)
            .then(|| &self.text[self.spans[2 * i + 1] as usize..self.spans[2 * i + 2] as usize])
    }

    pub fn kind(&self, i: usize) -> Option<ItemKind> {
        kind_of(self.flags[i])
    }
}

/// Append `counts` in the smallest lossless coding and return its tag.
fn encode(counts: &[f64], out: &mut Vec<u8>) -> u8 {
    // A count is kept as an integer only when the integer gives back the very same bits
    // (so -0.0, fractions, NaN and the like stay raw).
    let whole = counts
        .iter()
        .all(|&c| ((c as u32) as f64).to_bits() == c.to_bits());
    if !whole {
        counts
            .iter()
            .for_each(|c| out.extend_from_slice(&c.to_le_bytes()));
        return TAG_F64;
    }
    let max = counts.iter().fold(0u32, |m, &c| m.max(c as u32));
    if max <= u8::MAX as u32 {
        out.extend(counts.iter().map(|&c| c as u8));
        TAG_U8
    } else if max <= u16::MAX as u32 {
        counts
            .iter()
            .for_each(|&c| out.extend_from_slice(&(c as u16).to_le_bytes()));
        TAG_U16
    } else {
        counts
            .iter()
            .for_each(|&c| out.extend_from_slice(&(c as u32).to_le_bytes()));
        TAG_U32
    }
}

/// Decode `k` counts of coding `tag` from `bytes` into `out` (cleared first).
fn decode(tag: u8, bytes: &[u8], out: &mut Vec<f64>) {
    out.clear();
    match tag {
        TAG_U8 => out.extend(bytes.iter().map(|&b| b as f64)),
        TAG_U16 => out.extend(
            bytes
                .chunks_exact(2)
                .map(|c| u16::from_le_bytes([c[0], c[1]]) as f64),
        ),
        TAG_U32 => out.extend(
            bytes
                .chunks_exact(4)
                .map(|c| u32::from_le_bytes([c[0], c[1], c[2], c[3]]) as f64),
        ),
        _ => out.extend(bytes.chunks_exact(8).map(|c| {
            let mut b = [0u8; 8];
            b.copy_from_slice(c);
            f64::from_le_bytes(b)
        })),
    }
}

/// A reference item, read-only.
#[derive(Clone, Copy)]
pub struct PriorItem<'a> {
    items: &'a Items,
    i: usize,
}

impl std::fmt::Debug for PriorItem<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("PriorItem")
            .field("index", &self.i)
            .field("id", &self.id())
            .field("name", &self.name())
            .field("kind", &self.kind())
            .finish()
    }
}

impl<'a> PriorItem<'a> {
    /// Position in the priors' item list.
    pub fn index(&self) -> usize {
        self.i
    }

    pub fn name(&self) -> &'a str {
        self.items.name(self.i)
    }

    pub fn id(&self) -> Option<&'a str> {
        self.items.id(self.i)
    }

    pub fn kind(&self) -> Option<ItemKind> {
        self.items.kind(self.i)
    }

    /// The largest member total over attributes.
    pub fn support(&self) -> f64 {
        self.items.support[self.i]
    }

    /// Attribute indices the item has counts for, ascending.
    pub fn attributes(&self) -> impl Iterator<Item = usize> + 'a {
        let s = &self.items;
        let range = s.entry_start[self.i] as usize..s.entry_start[self.i + 1] as usize;
        s.entry_attr[range].iter().map(|&a| a as usize)
    }

    /// Decode the counts for `attribute` into `out`; false (and `out` empty) when the
    /// item has none for it.
    pub fn counts_into(&self, attribute: usize, out: &mut Vec<f64>) -> bool {
        match self.coded_counts(attribute) {
            Some((tag, bytes)) => {
                decode(tag, bytes, out);
                true
            }
            None => {
                out.clear();
                false
            }
        }
    }

    /// The counts for `attribute` as stored: their coding and bytes. The coding loses
    /// nothing, so equal codings and bytes mean equal counts (what lets evidence made
    /// from them be shared).
    pub fn coded_counts(&self, attribute: usize) -> Option<(u8, &'a [u8])> {
        let s = self.items;
        let mut at = s.counts_start[self.i] as usize;
        let end = s.counts_start[self.i + 1] as usize;
        let entries = s.entry_start[self.i] as usize..s.entry_start[self.i + 1] as usize;
        for e in entries {
            let len = s.entry_bytes(e);
            if s.entry_attr[e] as usize == attribute {
                let bytes = s.counts.get(at..(at + len).min(end)).unwrap_or(&[]);
                return Some((s.entry_tag[e], bytes));
            }
            at += len;
        }
        None
    }

    /// Counts for `attribute`, if the item has statistics for it.
    pub fn counts(&self, attribute: usize) -> Option<Vec<f64>> {
        let mut out = Vec::new();
        self.counts_into(attribute, &mut out).then_some(out)
    }

    /// Every (attribute, counts) the item has, ascending by attribute.
    pub fn members(&self) -> Vec<(usize, Vec<f64>)> {
        self.attributes()
            .map(|a| (a, self.counts(a).unwrap_or_default()))
            .collect()
    }
}
