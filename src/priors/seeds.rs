//! Bounded readers for the parts of a priors item: a string copied up to a length, a
//! list of strings up to a count, the members object up to a number of entries and
//! each count list up to a number of counts. Each reads the whole JSON value (so the
//! parse goes on) but keeps only what the limits allow, and says how much there was,
//! so the checks can warn with the real figures while memory follows the limits.

use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};

/// A string, copied into a reused buffer up to `max` bytes (cut at a character
/// boundary); its whole length.
pub(super) struct StrInto<'s> {
    pub buf: &'s mut String,
    pub max: usize,
}

impl<'de> DeserializeSeed<'de> for StrInto<'_> {
    type Value = usize;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<usize, D::Error> {
        d.deserialize_str(self)
    }
}

impl<'de> Visitor<'de> for StrInto<'_> {
    type Value = usize;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a string")
    }
    fn visit_str<E: de::Error>(self, v: &str) -> std::result::Result<usize, E> {
        self.buf.clear();
        let mut end = v.len().min(self.max);
        while !v.is_char_boundary(end) {
            end -= 1;
        }
        self.buf.push_str(&v[..end]);
        Ok(v.len())
    }
}

/// A string or null; the string's length, `None` for null.
pub(super) struct OptStrInto<'s>(pub StrInto<'s>);

impl<'de> DeserializeSeed<'de> for OptStrInto<'_> {
    type Value = Option<usize>;
    fn deserialize<D: Deserializer<'de>>(
        self,
        d: D,
    ) -> std::result::Result<Option<usize>, D::Error> {
        d.deserialize_option(self)
    }
}

impl<'de> Visitor<'de> for OptStrInto<'_> {
    type Value = Option<usize>;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a string or null")
    }
    fn visit_none<E: de::Error>(self) -> std::result::Result<Option<usize>, E> {
        Ok(None)
    }
    fn visit_unit<E: de::Error>(self) -> std::result::Result<Option<usize>, E> {
        Ok(None)
    }
    fn visit_some<D: Deserializer<'de>>(
        self,
        d: D,
    ) -> std::result::Result<Option<usize>, D::Error> {
        self.0.deserialize(d).map(Some)
    }
}

/// A list of strings into reused buffers: at most `max_count` kept, each cut at
/// `max_len` bytes (one byte past it, so an overlong one is told apart); the number
/// kept and the number in the list.
pub(super) struct StringsInto<'s> {
    pub out: &'s mut Vec<String>,
    pub max_len: usize,
    pub max_count: usize,
}

impl<'de> DeserializeSeed<'de> for StringsInto<'_> {
    type Value = (usize, usize);
    fn deserialize<D: Deserializer<'de>>(
        self,
        d: D,
    ) -> std::result::Result<(usize, usize), D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for StringsInto<'_> {
    type Value = (usize, usize);
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of strings")
    }
    fn visit_seq<A: SeqAccess<'de>>(
        self,
        mut seq: A,
    ) -> std::result::Result<(usize, usize), A::Error> {
        let mut n = 0;
        while n < self.max_count {
            if self.out.len() == n {
                self.out.push(String::new());
            }
            let seed = StrInto {
                buf: &mut self.out[n],
                max: self.max_len.saturating_add(1),
            };
            if seq.next_element_seed(seed)?.is_none() {
                return Ok((n, n));
            }
            n += 1;
        }
        let mut all = n;
        while seq.next_element::<IgnoredAny>()?.is_some() {
            all += 1;
        }
        Ok((n, all))
    }
}

/// The members object: attribute id → counts (a list, or shares with n), into reused
/// buffers; at most `max_entries` kept, each list kept up to `max_counts` + 1 counts.
/// The number of entries kept and the number in the object.
pub(super) struct MembersInto<'s> {
    pub keys: &'s mut Vec<String>,
    pub counts: &'s mut Vec<Vec<f64>>,
    pub lens: &'s mut Vec<usize>,
    pub max_entries: usize,
    pub max_counts: usize,
    pub max_key: usize,
}

impl<'de> DeserializeSeed<'de> for MembersInto<'_> {
    type Value = (usize, usize);
    fn deserialize<D: Deserializer<'de>>(
        self,
        d: D,
    ) -> std::result::Result<(usize, usize), D::Error> {
        d.deserialize_map(self)
    }
}

impl<'de> Visitor<'de> for MembersInto<'_> {
    type Value = (usize, usize);
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a map")
    }
    fn visit_map<A: MapAccess<'de>>(
        self,
        mut map: A,
    ) -> std::result::Result<(usize, usize), A::Error> {
        let mut n = 0;
        while n < self.max_entries {
            if self.keys.len() == n {
                self.keys.push(String::new());
                self.counts.push(Vec::new());
                self.lens.push(0);
            }
            // Attribute ids are no longer than the name limit, so a longer key,
            // kept only in part, matches none and is warned about as unknown.
            let key = StrInto {
                buf: &mut self.keys[n],
                max: self.max_key,
            };
            if map.next_key_seed(key)?.is_none() {
                return Ok((n, n));
            }
            self.lens[n] = map.next_value_seed(CountsInto {
                out: &mut self.counts[n],
                max: self.max_counts.saturating_add(1),
            })?;
            n += 1;
        }
        let mut all = n;
        while map.next_entry::<IgnoredAny, IgnoredAny>()?.is_some() {
            all += 1;
        }
        Ok((n, all))
    }
}

/// Numbers into `out`, at most `max` of them kept; how many there were.
fn numbers_into<'de, A: SeqAccess<'de>>(
    mut seq: A,
    out: &mut Vec<f64>,
    max: usize,
) -> std::result::Result<usize, A::Error> {
    out.clear();
    let mut n = 0usize;
    while let Some(c) = seq.next_element::<f64>()? {
        if n < max {
            out.push(c);
        }
        n += 1;
    }
    Ok(n)
}

/// A list of numbers, at most `max` kept; how many there were.
struct NumbersInto<'s> {
    out: &'s mut Vec<f64>,
    max: usize,
}

impl<'de> DeserializeSeed<'de> for NumbersInto<'_> {
    type Value = usize;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<usize, D::Error> {
        d.deserialize_seq(self)
    }
}

impl<'de> Visitor<'de> for NumbersInto<'_> {
    type Value = usize;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of numbers")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> std::result::Result<usize, A::Error> {
        numbers_into(seq, self.out, self.max)
    }
}

/// Member counts for one attribute: a list of counts, or `{"shares": [...], "n": x}`
/// (counts are shares × n), as [`super::file::MemberSpec`] reads them; at most `max`
/// kept, and how many there were.
struct CountsInto<'s> {
    out: &'s mut Vec<f64>,
    max: usize,
}

impl<'de> DeserializeSeed<'de> for CountsInto<'_> {
    type Value = usize;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> std::result::Result<usize, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for CountsInto<'_> {
    type Value = usize;
    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a list of member counts, or {\"shares\": [...], \"n\": number}")
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> std::result::Result<usize, A::Error> {
        numbers_into(seq, self.out, self.max)
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<usize, A::Error> {
        let (mut shares, mut n) = (None::<usize>, None::<f64>);
        let mut key = String::new();
        while map
            .next_key_seed(StrInto {
                buf: &mut key,
                max: 64,
            })?
            .is_some()
        {
            match key.as_str() {
                "shares" => {
                    shares = Some(map.next_value_seed(NumbersInto {
                        out: &mut *self.out,
                        max: self.max,
                    })?)
                }
                "n" => n = Some(map.next_value()?),
                other => return Err(de::Error::unknown_field(other, &["shares", "n"])),
            }
        }
        match (shares, n) {
            (Some(len), Some(n)) => {
                self.out.iter_mut().for_each(|s| *s *= n);
                Ok(len)
            }
            (None, _) => Err(de::Error::missing_field("shares")),
            (_, None) => Err(de::Error::missing_field("n")),
        }
    }
}
