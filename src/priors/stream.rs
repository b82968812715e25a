//! Reading a priors file's JSON in one pass: the header (format, provenance,
//! attributes) is read as usual, then each reference item is read into reused buffers
//! and checked and stored straight away, so a table of a million items never exists as
//! a million `ItemSpec`s with their maps, strings and vectors (which made loading slow
//! and took gigabytes). The checks and their warnings are the very ones
//! [`super::Priors::from_file`] applies. When `items` comes before the attributes or the
//! format (JSON objects have no order), or the attributes have problems, the items are
//! read whole instead and checked afterwards, with the same result.

use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, MapAccess, SeqAccess, Visitor};

use super::check::{ItemBuilder, check_attributes};
use super::error::{Error, Result};
use super::file::{AttributeSpec, FORMAT, ItemSpec, Provenance};
use super::index::Index;
use super::model::{Attribute, Priors, check_items};
use super::store::Items;
use crate::footprint::ItemKind;

const TOP_FIELDS: &[&str] = &["format", "provenance", "attributes", "items"];
const ITEM_FIELDS: &[&str] = &["id", "name", "kind", "aliases", "members"];

/// Parse and check `text`. The outer error is a JSON error (syntax, shape, unknown
/// field), the inner one a checked problem (version, invalid attributes).
pub(crate) fn parse(text: &str, origin: &str) -> serde_json::Result<Result<Priors>> {
    let mut de = serde_json::Deserializer::from_str(text);
    let priors = Top { origin }.deserialize(&mut de)?;
    de.end()?;
    Ok(priors)
}

struct Top<'o> {
    origin: &'o str,
}

type Checked = (Vec<Attribute>, Result<(Items, Index, Vec<String>)>);

enum ReadItems {
    /// Checked while read (attributes were already known and valid).
    Checked(Box<Checked>),
    /// Read whole, to be checked at the end.
    Whole(Vec<ItemSpec>),
}

impl<'de> DeserializeSeed<'de> for Top<'_> {
    type Value = Result<Priors>;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<Self::Value, D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for Top<'_> {
    type Value = Result<Priors>;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a priors file (an object with format, provenance, attributes, items)")
    }

    fn visit_map<A: MapAccess<'de>>(
        self,
        mut map: A,
    ) -> std::result::Result<Self::Value, A::Error> {
        let mut format: Option<u32> = None;
        let mut provenance: Option<Provenance> = None;
        let mut attributes: Option<Vec<AttributeSpec>> = None;
        let mut items: Option<ReadItems> = None;
        let mut key = String::new();
        while map.next_key_seed(StrInto(&mut key))?.is_some() {
            match key.as_str() {
                "format" => {
                    if format.is_some() {
                        return Err(de::Error::duplicate_field("format"));
                    }
                    format = Some(map.next_value()?);
                }
                "provenance" => {
                    if provenance.is_some() {
                        return Err(de::Error::duplicate_field("provenance"));
                    }
                    provenance = Some(map.next_value()?);
                }
                "attributes" => {
                    if attributes.is_some() {
                        return Err(de::Error::duplicate_field("attributes"));
                    }
                    attributes = Some(map.next_value()?);
                }
                "items" => {
                    if items.is_some() {
                        return Err(de::Error::duplicate_field("items"));
                    }
                    let checked = match (&attributes, format) {
                        (Some(specs), Some(FORMAT)) => check_attributes(specs, self.origin).ok(),
                        _ => None,
                    };
                    items = Some(match checked {
                        Some(attrs) => {
                            let mut builder = ItemBuilder::new(&attrs, 0);
                            map.next_value_seed(ItemsSeed {
                                builder: &mut builder,
                                scratch: &mut Scratch::default(),
                            })?;
                            let done = builder.finish(self.origin);
                            ReadItems::Checked(Box::new((attrs, done)))
                        }
                        None => ReadItems::Whole(map.next_value()?),
                    });
                }
                other => return Err(de::Error::unknown_field(other, TOP_FIELDS)),
            }
        }
        let format = format.ok_or_else(|| de::Error::missing_field("format"))?;
        let provenance = provenance.ok_or_else(|| de::Error::missing_field("provenance"))?;
        let attributes = attributes.ok_or_else(|| de::Error::missing_field("attributes"))?;
        let origin = self.origin;
        Ok((|| {
            if format != FORMAT {
                return Err(Error::Version {
                    file: origin.to_string(),
                    found: format.to_string(),
                    expected: FORMAT,
                });
            }
            let (attributes, done) = match items {
                Some(ReadItems::Checked(checked)) => *checked,
                other => {
                    let specs = match other {
                        Some(ReadItems::Whole(specs)) => specs,
                        _ => Vec::new(),
                    };
                    let attrs = check_attributes(&attributes, origin)?;
                    let done = check_items(&attrs, &specs, origin);
                    (attrs, done)
                }
            };
            let (store, index, warnings) = done?;
            Ok(Priors {
                provenance,
                attributes,
                warnings,
                origin: origin.to_string(),
                cache_notes: Vec::new(),
                rarity: crate::alert::Rarity::default(),
                store,
                index,
                file_attributes: None,
            })
        })())
    }
}

/// Reused buffers for one item at a time.
#[derive(Default)]
struct Scratch {
    id: String,
    name: String,
    aliases: Vec<String>,
    keys: Vec<String>,
    counts: Vec<Vec<f64>>,
    order: Vec<usize>,
}

struct ItemsSeed<'b, 'a> {
    builder: &'b mut ItemBuilder<'a>,
    scratch: &'b mut Scratch,
}

impl<'de> DeserializeSeed<'de> for ItemsSeed<'_, '_> {
    type Value = ();
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<(), D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for ItemsSeed<'_, '_> {
    type Value = ();

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of reference items")
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> std::result::Result<(), A::Error> {
        let mut ii = 0usize;
        while seq
            .next_element_seed(ItemSeed {
                ii,
                builder: &mut *self.builder,
                scratch: &mut *self.scratch,
            })?
            .is_some()
        {
            ii += 1;
        }
        Ok(())
    }
}

struct ItemSeed<'b, 'a> {
    ii: usize,
    builder: &'b mut ItemBuilder<'a>,
    scratch: &'b mut Scratch,
}

impl<'de> DeserializeSeed<'de> for ItemSeed<'_, '_> {
    type Value = ();
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<(), D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for ItemSeed<'_, '_> {
    type Value = ();

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("struct ItemSpec")
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<(), A::Error> {
        let s = self.scratch;
        let (mut id, mut name, mut kind, mut aliases, mut members) = (
            None::<bool>,
            false,
            None::<Option<ItemKind>>,
            None::<usize>,
            None::<usize>,
        );
        let mut key = String::new();
        while map.next_key_seed(StrInto(&mut key))?.is_some() {
            match key.as_str() {
                "id" => {
                    if id.is_some() {
                        return Err(de::Error::duplicate_field("id"));
                    }
                    id = Some(map.next_value_seed(OptStrInto(&mut s.id))?);
                }
                "name" => {
                    if name {
                        return Err(de::Error::duplicate_field("name"));
                    }
                    map.next_value_seed(StrInto(&mut s.name))?;
                    name = true;
                }
                "kind" => {
                    if kind.is_some() {
                        return Err(de::Error::duplicate_field("kind"));
                    }
                    kind = Some(map.next_value()?);
                }
                "aliases" => {
                    if aliases.is_some() {
                        return Err(de::Error::duplicate_field("aliases"));
                    }
                    aliases = Some(map.next_value_seed(StringsInto(&mut s.aliases))?);
                }
                "members" => {
                    if members.is_some() {
                        return Err(de::Error::duplicate_field("members"));
                    }
                    members = Some(map.next_value_seed(MembersInto {
                        keys: &mut s.keys,
                        counts: &mut s.counts,
                    })?);
                }
                other => return Err(de::Error::unknown_field(other, ITEM_FIELDS)),
            }
        }
        if !name {
            return Err(de::Error::missing_field("name"));
        }
        let n_members = members.ok_or_else(|| de::Error::missing_field("members"))?;
        // Attribute ids in sorted order, the last of equal ids winning: what reading
        // into a sorted map gives.
        s.order.clear();
        s.order.extend(0..n_members);
        s.order
            .sort_by(|&a, &b| s.keys[a].cmp(&s.keys[b]).then(b.cmp(&a)));
        s.order.dedup_by(|b, a| s.keys[*a] == s.keys[*b]);
        let (keys, counts) = (&s.keys, &s.counts);
        self.builder.push(
            self.ii,
            id.unwrap_or(false).then_some(s.id.as_str()),
            &s.name,
            kind.flatten(),
            s.aliases[..aliases.unwrap_or(0)].iter().map(String::as_str),
            s.order
                .iter()
                .map(|&m| (keys[m].as_str(), counts[m].as_slice())),
        );
        Ok(())
    }
}

/// A string, copied into a reused buffer.
struct StrInto<'s>(&'s mut String);

impl<'de> DeserializeSeed<'de> for StrInto<'_> {
    type Value = ();
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<(), D::Error> {
        d.deserialize_str(self)
    }
}

impl<'de> Visitor<'de> for StrInto<'_> {
    type Value = ();
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a string")
    }
    fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<(), E> {
        self.0.clear();
        self.0.push_str(v);
        Ok(())
    }
}

/// A string or null; true for a string.
struct OptStrInto<'s>(&'s mut String);

impl<'de> DeserializeSeed<'de> for OptStrInto<'_> {
    type Value = bool;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<bool, D::Error> {
        d.deserialize_option(self)
    }
}

impl<'de> Visitor<'de> for OptStrInto<'_> {
    type Value = bool;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a string or null")
    }
    fn visit_none<E: de::Error>(self) -> std::result::Result<bool, E> {
        Ok(false)
    }
    fn visit_unit<E: de::Error>(self) -> std::result::Result<bool, E> {
        Ok(false)
    }
    fn visit_some<D: Deserializer<'de>>(self, d: D) -> std::result::Result<bool, D::Error> {
        StrInto(self.0).deserialize(d)?;
        Ok(true)
    }
}

/// A list of strings into reused buffers; the number read.
struct StringsInto<'s>(&'s mut Vec<String>);

impl<'de> DeserializeSeed<'de> for StringsInto<'_> {
    type Value = usize;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<usize, D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for StringsInto<'_> {
    type Value = usize;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of strings")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> std::result::Result<usize, A::Error> {
        let mut n = 0;
        loop {
            if self.0.len() == n {
                self.0.push(String::new());
            }
            if seq.next_element_seed(StrInto(&mut self.0[n]))?.is_none() {
                return Ok(n);
            }
            n += 1;
        }
    }
}

/// The members object: attribute id → counts (a list, or shares with n), into reused
/// buffers; the number of entries read.
struct MembersInto<'s> {
    keys: &'s mut Vec<String>,
    counts: &'s mut Vec<Vec<f64>>,
}

impl<'de> DeserializeSeed<'de> for MembersInto<'_> {
    type Value = usize;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<usize, D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for MembersInto<'_> {
    type Value = usize;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a map")
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<usize, A::Error> {
        let mut n = 0;
        loop {
            if self.keys.len() == n {
                self.keys.push(String::new());
                self.counts.push(Vec::new());
            }
            if map.next_key_seed(StrInto(&mut self.keys[n]))?.is_none() {
                return Ok(n);
            }
            map.next_value_seed(CountsInto(&mut self.counts[n]))?;
            n += 1;
        }
    }
}

/// Member counts for one attribute: a list of counts, or `{"shares": [...], "n": x}`
/// (counts are shares × n), as [`super::file::MemberSpec`] reads them.
struct CountsInto<'s>(&'s mut Vec<f64>);

impl<'de> DeserializeSeed<'de> for CountsInto<'_> {
    type Value = ();
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<(), D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for CountsInto<'_> {
    type Value = ();
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of member counts, or {\"shares\": [...], \"n\": number}")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> std::result::Result<(), A::Error> {
        self.0.clear();
        while let Some(c) = seq.next_element::<f64>()? {
            self.0.push(c);
        }
        Ok(())
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<(), A::Error> {
        let (mut shares, mut n) = (None::<Vec<f64>>, None::<f64>);
        let mut key = String::new();
        while map.next_key_seed(StrInto(&mut key))?.is_some() {
            match key.as_str() {
                "shares" => shares = Some(map.next_value()?),
                "n" => n = Some(map.next_value()?),
                other => return Err(de::Error::unknown_field(other, &["shares", "n"])),
            }
        }
        match (shares, n) {
            (Some(shares), Some(n)) => {
                self.0.clear();
                self.0.extend(shares.iter().map(|s| s * n));
                Ok(())
            }
            (None, _) => Err(de::Error::missing_field("shares")),
            (_, None) => Err(de::Error::missing_field("n")),
        }
    }
}
