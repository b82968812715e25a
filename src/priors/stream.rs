//! Reading a priors file's JSON in one pass: the header (format, provenance,
//! attributes) is read as usual, then each reference item is read into reused buffers
//! and checked and stored straight away, so a table of a million items never exists as
//! a million `ItemSpec`s with their maps, strings and vectors (which made loading slow
//! and took gigabytes). The checks and their warnings are the very ones
//! [`super::Priors::from_file`] applies. When `items` comes before the attributes or the
//! format (JSON objects have no order), the items are skipped without being kept and
//! the text is read a second time with the attributes known, so every item goes
//! through the same bounded reader. The reading limits ([`Limits`]) hold throughout:
//! no name, id, alias, member list or count list is copied past its limit, a file
//! with too many items, attributes or values stops with a message naming the limit.

use std::cell::RefCell;
use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};

use super::check::{ItemBuilder, check_attributes, short};
use super::error::{Error, Result};
use super::file::{AttributeSpec, FORMAT, Provenance};
use super::model::{Attribute, Priors};
use super::seeds::{MembersInto, OptStrInto, StrInto, StringsInto};
use crate::footprint::ItemKind;
use crate::limits::{LimitName, Limits, thousands};

const TOP_FIELDS: &[&str] = &["format", "provenance", "attributes", "items"];
const ITEM_FIELDS: &[&str] = &["id", "name", "kind", "aliases", "members"];

/// Parse and check `text` within `limits`. The outer error is a JSON error (syntax,
/// shape, unknown field), the inner one a checked problem (version, invalid
/// attributes, a limit).
pub(crate) fn parse(
    text: &str,
    origin: &str,
    limits: &Limits,
) -> serde_json::Result<Result<Priors>> {
    let stop = RefCell::new(None);
    let mut known = None;
    for _pass in 0..2 {
        let mut de = serde_json::Deserializer::from_str(text);
        let top = Top {
            origin,
            limits,
            known: known.take(),
            stop: &stop,
        };
        let read = top.deserialize(&mut de).and_then(|r| de.end().map(|()| r));
        match read {
            Ok(Pass::Done(priors)) => return Ok(*priors),
            Ok(Pass::Again(attrs)) => known = Some(attrs),
            Err(e) => return stop.take().map(Err).ok_or(e),
        }
    }
    // The second pass always has the attributes, so it never asks for a third.
    Ok(Err(Error::Invalid {
        file: origin.to_string(),
        problems: vec!["the items could not be read".into()],
    }))
}

/// What one pass over the text gives.
enum Pass {
    Done(Box<Result<Priors>>),
    /// The items came before the attributes were known: read again with these.
    Again(Vec<Attribute>),
}

struct Top<'o> {
    origin: &'o str,
    limits: &'o Limits,
    /// The checked attributes, on the second pass.
    known: Option<Vec<Attribute>>,
    /// A limit that stopped the reading (the JSON error that stops serde says less).
    stop: &'o RefCell<Option<Error>>,
}

impl<'de> DeserializeSeed<'de> for Top<'_> {
    type Value = Pass;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<Pass, D::Error> {
        d.deserialize_map(self)
    }
}

/// Check the header's sizes against the limits: the number of attributes and values,
/// and the length of every id, label and provenance text.
fn header_limits(
    provenance: Option<&Provenance>,
    specs: &[AttributeSpec],
    origin: &str,
    limits: &Limits,
) -> Result<()> {
    let over = |what: String, name: LimitName| Error::Limit {
        file: origin.to_string(),
        what,
        name,
        limit: limits.get(name),
    };
    let long_by = |field: &str, text: &str, max: u64| {
        (text.len() as u64 > max).then(|| Error::Limit {
            file: origin.to_string(),
            what: format!("{field} is {} bytes long", thousands(text.len() as u64)),
            name: LimitName::NameBytes,
            limit: max,
        })
    };
    let long = |field: &str, text: &str| long_by(field, text, limits.name_bytes);
    // Provenance texts are sentences, not names: 16 times the name limit (the
    // message gives the figure that applies).
    let prose = limits.name_bytes.saturating_mul(16);
    if specs.len() as u64 > limits.attributes {
        return Err(over(
            format!("the file has {} attributes", thousands(specs.len() as u64)),
            LimitName::Attributes,
        ));
    }
    if let Some(p) = provenance {
        let fields = [
            ("source", &p.source),
            ("licence", &p.licence),
            ("created", &p.created),
            ("method", &p.method),
        ];
        for (field, text) in fields {
            if let Some(e) = long_by(&format!("provenance.{field}"), text, prose) {
                return Err(e);
            }
        }
        if let Some(e) = p.privacy.as_ref().and_then(|x| {
            long(
                "provenance.privacy",
                &format!("{}{}", x.mechanism, x.budget_split),
            )
        }) {
            return Err(e);
        }
    }
    for (ai, a) in specs.iter().enumerate() {
        let at = format!("attributes[{ai}] ({})", short(&a.id));
        if a.values.len() as u64 > limits.values {
            return Err(over(
                format!("{at} has {} values", thousands(a.values.len() as u64)),
                LimitName::Values,
            ));
        }
        for (field, text) in [("id", &a.id), ("label", &a.label)] {
            if let Some(e) = long(&format!("attributes[{ai}].{field}"), text) {
                return Err(e);
            }
        }
        if let Some(e) = a
            .special_category
            .as_deref()
            .and_then(|c| long(&format!("{at}.special_category"), c))
        {
            return Err(e);
        }
        for (vi, v) in a.values.iter().enumerate() {
            for (field, text) in [("id", &v.id), ("label", &v.label)] {
                if let Some(e) = long(&format!("{at}.values[{vi}].{field}"), text) {
                    return Err(e);
                }
            }
        }
    }
    Ok(())
}

impl<'de> Visitor<'de> for Top<'_> {
    type Value = Pass;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a priors file (an object with format, provenance, attributes, items)")
    }

    fn visit_map<A: MapAccess<'de>>(mut self, mut map: A) -> std::result::Result<Pass, A::Error> {
        let origin = self.origin;
        let limits = self.limits;
        let mut format: Option<u32> = None;
        let mut provenance: Option<Provenance> = None;
        let mut attributes: Option<Vec<AttributeSpec>> = None;
        let mut seen_attributes = false;
        // The checked attributes and the items read against them.
        let mut items: Option<Result<_>> = None;
        let mut skipped_items = false;
        let mut key = String::new();
        while map
            .next_key_seed(StrInto {
                buf: &mut key,
                max: 64,
            })?
            .is_some()
        {
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
                    if seen_attributes {
                        return Err(de::Error::duplicate_field("attributes"));
                    }
                    seen_attributes = true;
                    if self.known.is_some() {
                        map.next_value::<IgnoredAny>()?;
                    } else {
                        attributes = Some(map.next_value()?);
                    }
                }
                "items" => {
                    if items.is_some() || skipped_items {
                        return Err(de::Error::duplicate_field("items"));
                    }
                    let ready = match (self.known.take(), &attributes, format) {
                        (Some(known), _, _) => Some(known),
                        (None, Some(specs), Some(FORMAT)) => {
                            header_limits(provenance.as_ref(), specs, origin, limits)
                                .and_then(|()| check_attributes(specs, origin))
                                .ok()
                        }
                        _ => None,
                    };
                    match ready {
                        Some(attrs) => {
                            let mut builder = ItemBuilder::new(&attrs, 0, limits);
                            map.next_value_seed(ItemsSeed {
                                builder: &mut builder,
                                scratch: &mut Scratch::default(),
                                limits,
                                stop: self.stop,
                                origin,
                            })?;
                            let done = builder.finish(origin);
                            items = Some(done.map(|d| (attrs, d)));
                        }
                        None => {
                            map.next_value::<IgnoredAny>()?;
                            skipped_items = true;
                        }
                    }
                }
                other => return Err(de::Error::unknown_field(other, TOP_FIELDS)),
            }
        }
        let format = format.ok_or_else(|| de::Error::missing_field("format"))?;
        let provenance = provenance.ok_or_else(|| de::Error::missing_field("provenance"))?;
        if !seen_attributes {
            return Err(de::Error::missing_field("attributes"));
        }
        let checked = (|| {
            if format != FORMAT {
                return Err(Error::Version {
                    file: origin.to_string(),
                    found: format.to_string(),
                    expected: FORMAT,
                });
            }
            if let Some(specs) = &attributes {
                header_limits(Some(&provenance), specs, origin, limits)?;
            }
            let attrs = match (items, self.known.take(), &attributes) {
                (Some(done), _, _) => return done.map(|(a, d)| (a, Some(d))),
                (None, Some(known), _) => known,
                (None, None, Some(specs)) => check_attributes(specs, origin)?,
                (None, None, None) => Vec::new(),
            };
            if skipped_items {
                return Ok((attrs, None));
            }
            let builder = ItemBuilder::new(&attrs, 0, limits);
            let done = builder.finish(origin)?;
            Ok((attrs, Some(done)))
        })();
        Ok(match checked {
            Err(e) => Pass::Done(Box::new(Err(e))),
            Ok((attrs, None)) => Pass::Again(attrs),
            Ok((attributes, Some((store, index, warnings)))) => Pass::Done(Box::new(Ok(Priors {
                provenance,
                attributes,
                warnings,
                origin: origin.to_string(),
                cache_notes: Vec::new(),
                rarity: crate::alert::Rarity::default(),
                store,
                index,
                file_attributes: None,
            }))),
        })
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
    /// How many counts each member list had (lists longer than the values limit are
    /// not kept whole).
    lens: Vec<usize>,
    order: Vec<usize>,
}

struct ItemsSeed<'b, 'a> {
    builder: &'b mut ItemBuilder<'a>,
    scratch: &'b mut Scratch,
    limits: &'b Limits,
    stop: &'b RefCell<Option<Error>>,
    origin: &'b str,
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
        loop {
            if ii as u64 >= self.limits.priors_items {
                // One more item than the limit allows stops the reading.
                if seq.next_element::<IgnoredAny>()?.is_none() {
                    return Ok(());
                }
                *self.stop.borrow_mut() = Some(Error::Limit {
                    file: self.origin.to_string(),
                    what: format!(
                        "the file lists more than {} reference items",
                        thousands(self.limits.priors_items)
                    ),
                    name: LimitName::PriorsItems,
                    limit: self.limits.priors_items,
                });
                return Err(de::Error::custom("over the priors-items limit"));
            }
            let read = seq.next_element_seed(ItemSeed {
                ii,
                builder: &mut *self.builder,
                scratch: &mut *self.scratch,
                limits: self.limits,
            })?;
            if read.is_none() {
                return Ok(());
            }
            ii += 1;
        }
    }
}

struct ItemSeed<'b, 'a> {
    ii: usize,
    builder: &'b mut ItemBuilder<'a>,
    scratch: &'b mut Scratch,
    limits: &'b Limits,
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
        let limits = self.limits;
        let max = usize::try_from(limits.name_bytes).unwrap_or(usize::MAX);
        let (mut id, mut name, mut kind, mut aliases, mut members) = (
            None::<Option<usize>>,
            None::<usize>,
            None::<Option<ItemKind>>,
            None::<(usize, usize)>,
            None::<(usize, usize)>,
        );
        let mut key = String::new();
        while map
            .next_key_seed(StrInto {
                buf: &mut key,
                max: 64,
            })?
            .is_some()
        {
            match key.as_str() {
                "id" => {
                    if id.is_some() {
                        return Err(de::Error::duplicate_field("id"));
                    }
                    id = Some(map.next_value_seed(OptStrInto(StrInto {
                        buf: &mut s.id,
                        max,
                    }))?);
                }
                "name" => {
                    if name.is_some() {
                        return Err(de::Error::duplicate_field("name"));
                    }
                    name = Some(map.next_value_seed(StrInto {
                        buf: &mut s.name,
                        max,
                    })?);
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
                    aliases = Some(map.next_value_seed(StringsInto {
                        out: &mut s.aliases,
                        max_len: max,
                        max_count: usize::try_from(limits.aliases).unwrap_or(usize::MAX),
                    })?);
                }
                "members" => {
                    if members.is_some() {
                        return Err(de::Error::duplicate_field("members"));
                    }
                    members = Some(map.next_value_seed(MembersInto {
                        keys: &mut s.keys,
                        counts: &mut s.counts,
                        lens: &mut s.lens,
                        max_entries: usize::try_from(limits.attributes).unwrap_or(usize::MAX),
                        max_counts: usize::try_from(limits.values).unwrap_or(usize::MAX),
                        max_key: max.saturating_add(1),
                    })?);
                }
                other => return Err(de::Error::unknown_field(other, ITEM_FIELDS)),
            }
        }
        let name_len = name.ok_or_else(|| de::Error::missing_field("name"))?;
        let (n_members, all_members) =
            members.ok_or_else(|| de::Error::missing_field("members"))?;
        let b = self.builder;
        let ii = self.ii;
        // A name or id over the limit: the item is skipped (only the start of the name
        // was kept, enough to say which item it was).
        for (field, len) in [("name", Some(name_len)), ("id", id.flatten())] {
            if let Some(len) = len.filter(|&l| l > max) {
                b.note(format!(
                    "items[{ii}] ('{}'): the {field} is {} bytes long, over the limit of {} (name-bytes); item skipped ({})",
                    short(&s.name),
                    thousands(len as u64),
                    LimitName::NameBytes.show(limits.name_bytes),
                    LimitName::NameBytes.raise_hint()
                ));
                return Ok(());
            }
        }
        let (n_aliases, all_aliases) = aliases.unwrap_or((0, 0));
        if all_aliases > n_aliases {
            b.note(format!(
                "items[{ii}] ('{}'): {} aliases, over the limit of {} (aliases); the first {} kept",
                short(&s.name),
                thousands(all_aliases as u64),
                thousands(limits.aliases),
                thousands(n_aliases as u64),
            ));
        }
        if all_members > n_members {
            b.note(format!(
                "items[{ii}] ('{}'): members for {} attributes, over the limit of {} (attributes); the rest ignored",
                short(&s.name),
                thousands(all_members as u64),
                thousands(limits.attributes),
            ));
        }
        let mut kept_aliases = Vec::with_capacity(n_aliases);
        for (k, alias) in s.aliases[..n_aliases].iter().enumerate() {
            if alias.len() > max {
                b.note(format!(
                    "items[{ii}] ('{}'): alias {k} is over the limit of {} (name-bytes); ignored",
                    short(&s.name),
                    LimitName::NameBytes.show(limits.name_bytes),
                ));
            } else {
                kept_aliases.push(alias.as_str());
            }
        }
        // Attribute ids in sorted order, the last of equal ids winning: what reading
        // into a sorted map gives.
        s.order.clear();
        s.order.extend(0..n_members);
        s.order
            .sort_by(|&a, &b| s.keys[a].cmp(&s.keys[b]).then(b.cmp(&a)));
        s.order.dedup_by(|b, a| s.keys[*a] == s.keys[*b]);
        let (keys, counts, lens) = (&s.keys, &s.counts, &s.lens);
        let id = match id {
            Some(Some(_)) => Some(s.id.as_str()),
            _ => None,
        };
        b.push(
            ii,
            id,
            &s.name,
            kind.flatten(),
            kept_aliases.into_iter(),
            s.order
                .iter()
                .map(|&m| (keys[m].as_str(), counts[m].as_slice(), lens[m])),
        );
        Ok(())
    }
}
