//! Parsing only what a source can reach. When every JSONPath query of a source (the
//! records query and each field) is a plain chain of names, wildcards and indices, the
//! parts of a JSON document no query can reach are skipped while parsing instead of
//! being built into a tree and thrown away: a long description beside the fields a
//! mapping reads costs a scan of its bytes, not an allocation. Queries with anything
//! else (descendants, filters, slices, unions) parse the whole document, as before.
//! The values the queries select are the same either way (tested against the full
//! parse).

use std::collections::HashMap;
use std::fmt;

use serde::de::{DeserializeSeed, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};
use serde_json::{Map, Number, Value};

use crate::mapping::{Field, Source};

/// One step of a plain query.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(super) enum Step {
    Name(String),
    /// `*` or `[*]`: every member of an object, every element of an array.
    Any,
    /// `[n]`: an array element.
    Index,
}

/// Parse a query made only of `.name`, `['name']`, `.*`, `[*]` and `[n]` after `$`;
/// `None` for anything else.
pub(super) fn plain_steps(text: &str) -> Option<Vec<Step>> {
    let rest = text.trim().strip_prefix('$')?;
    let b = rest.as_bytes();
    let mut steps = Vec::new();
    let mut i = 0;
    while i < b.len() {
        match b[i] {
            b'.' => {
                i += 1;
                if b.get(i) == Some(&b'*') {
                    steps.push(Step::Any);
                    i += 1;
                    continue;
                }
                let start = i;
                while i < b.len() && (b[i].is_ascii_alphanumeric() || b[i] == b'_' || b[i] >= 0x80)
                {
                    i += 1;
                }
                if i == start || b[start].is_ascii_digit() {
                    return None;
                }
                steps.push(Step::Name(rest[start..i].to_string()));
            }
            b'[' => {
                let close = i + rest[i..].find(']')?;
                let inner = &rest[i + 1..close];
                if inner == "*" {
                    steps.push(Step::Any);
                } else if !inner.is_empty()
                    && inner
                        .strip_prefix('-')
                        .unwrap_or(inner)
                        .bytes()
                        .all(|c| c.is_ascii_digit())
                    && inner != "-"
                {
                    steps.push(Step::Index);
                } else {
                    let q = inner.as_bytes().first().copied()?;
                    if !(q == b'\'' || q == b'"') || inner.len() < 2 {
                        return None;
                    }
                    let name = inner.strip_prefix(q as char)?.strip_suffix(q as char)?;
                    if name.contains(['\\', '\'', '"']) {
                        return None;
                    }
                    steps.push(Step::Name(name.to_string()));
                }
                i = close + 1;
            }
            _ => return None,
        }
    }
    Some(steps)
}

/// What to keep of a JSON value: everything below (`whole`), or the members and
/// elements some query goes on into.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Keep {
    whole: bool,
    names: HashMap<String, Keep>,
    any: Option<Box<Keep>>,
    index: Option<Box<Keep>>,
}

impl Keep {
    fn add(&mut self, steps: &[Step], tail: &Keep) {
        match steps.split_first() {
            None => self.merge(tail),
            Some((Step::Name(n), rest)) => self.names.entry(n.clone()).or_default().add(rest, tail),
            Some((Step::Any, rest)) => self.any.get_or_insert_default().add(rest, tail),
            Some((Step::Index, rest)) => self.index.get_or_insert_default().add(rest, tail),
        }
    }

    fn merge(&mut self, other: &Keep) {
        self.whole |= other.whole;
        for (n, k) in &other.names {
            self.names.entry(n.clone()).or_default().merge(k);
        }
        if let Some(k) = &other.any {
            self.any.get_or_insert_default().merge(k);
        }
        if let Some(k) = &other.index {
            self.index.get_or_insert_default().merge(k);
        }
    }

    /// Fold wildcards into named members and indices, so one lookup decides each child.
    fn settle(&mut self) {
        if let Some(any) = &self.any {
            let any = (**any).clone();
            for k in self.names.values_mut() {
                k.merge(&any);
            }
            self.index.get_or_insert_default().merge(&any);
        }
        for k in self.names.values_mut() {
            k.settle();
        }
        if let Some(k) = &mut self.any {
            k.settle();
        }
        if let Some(k) = &mut self.index {
            k.settle();
        }
    }

    /// What a source's queries can reach, or `None` when some query is not plain (or
    /// the source reads CSV columns).
    pub fn for_source(source: &Source) -> Option<Keep> {
        let mut fields = Keep::default();
        let all = [&source.name, &source.id, &source.category, &source.date];
        let attrs = source.attributes.iter().map(|(_, f)| f);
        for field in all.into_iter().flatten().chain(attrs) {
            let Field::Path { text, .. } = field else {
                return None;
            };
            fields.add(
                &plain_steps(text)?,
                &Keep {
                    whole: true,
                    ..Keep::default()
                },
            );
        }
        let mut root = Keep::default();
        match &source.records {
            Some(Field::Path { text, .. }) => root.add(&plain_steps(text)?, &fields),
            Some(Field::Column(_)) => return None,
            None => {
                // The document itself, or each element of a top-level array.
                root.merge(&fields);
                root.index.get_or_insert_default().merge(&fields);
            }
        }
        root.settle();
        Some(root)
    }

    /// Parse JSON text, building only what this plan keeps.
    pub fn parse(&self, text: &str) -> serde_json::Result<Value> {
        let mut de = serde_json::Deserializer::from_str(text);
        let value = self.deserialize(&mut de)?;
        de.end()?;
        Ok(value)
    }

    /// What to keep of each element of the array reached by following `names` from
    /// here (`None` if no query goes there).
    pub(super) fn along(&self, names: &[String]) -> Option<&Keep> {
        let mut at = self;
        for name in names {
            at = at.member(name)?;
        }
        at.element()
    }

    fn element(&self) -> Option<&Keep> {
        self.index.as_deref()
    }

    fn member(&self, name: &str) -> Option<&Keep> {
        self.names.get(name).or(self.any.as_deref())
    }
}

impl<'de> DeserializeSeed<'de> for &Keep {
    type Value = Value;

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        if self.whole {
            return serde::Deserialize::deserialize(d);
        }
        d.deserialize_any(PrunedVisitor(self))
    }
}

struct PrunedVisitor<'k>(&'k Keep);

impl<'de> Visitor<'de> for PrunedVisitor<'_> {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any JSON value")
    }

    fn visit_bool<E>(self, v: bool) -> Result<Value, E> {
        Ok(Value::Bool(v))
    }
    fn visit_i64<E>(self, v: i64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_u64<E>(self, v: u64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_f64<E>(self, v: f64) -> Result<Value, E> {
        Ok(Number::from_f64(v).map_or(Value::Null, Value::Number))
    }
    fn visit_str<E>(self, v: &str) -> Result<Value, E> {
        Ok(Value::String(v.to_string()))
    }
    fn visit_string<E>(self, v: String) -> Result<Value, E> {
        Ok(Value::String(v))
    }
    fn visit_unit<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_none<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_some<D: Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        self.0.deserialize(d)
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Value, A::Error> {
        let mut out = Vec::new();
        match self.0.element() {
            Some(keep) => {
                while let Some(v) = seq.next_element_seed(keep)? {
                    out.push(v);
                }
            }
            None => while seq.next_element::<IgnoredAny>()?.is_some() {},
        }
        Ok(Value::Array(out))
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Value, A::Error> {
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            match self.0.member(&key) {
                Some(keep) => {
                    let v = map.next_value_seed(keep)?;
                    out.insert(key, v);
                }
                None => {
                    map.next_value::<IgnoredAny>()?;
                }
            }
        }
        Ok(Value::Object(out))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mapping::Mapping;

    #[test]
    fn plain_queries_are_recognised_and_others_refused() {
        assert_eq!(
            plain_steps("$.a['b c'][*][2].*"),
            Some(vec![
                Step::Name("a".into()),
                Step::Name("b c".into()),
                Step::Any,
                Step::Index,
                Step::Any
            ])
        );
        assert_eq!(plain_steps("$"), Some(vec![]));
        for q in [
            "$..a",
            "$.a[?@.b]",
            "$.a[1:3]",
            "$.a[0,1]",
            "$['a\\'b']",
            "a.b",
        ] {
            assert_eq!(plain_steps(q), None, "{q}");
        }
    }

    fn source(toml: &str) -> Source {
        let m = Mapping::parse(toml, "test.toml").unwrap_or_else(|e| panic!("{e}"));
        m.sources[0].clone()
    }

    /// What every query of the source selects, in order, as JSON text.
    fn selections(source: &Source, doc: &Value) -> Vec<String> {
        let mut out = Vec::new();
        let records: Vec<&Value> = match &source.records {
            Some(Field::Path { query, .. }) => query.query(doc).all(),
            _ => match doc {
                Value::Array(a) => a.iter().collect(),
                d => vec![d],
            },
        };
        for r in records {
            for f in [&source.name, &source.id, &source.category, &source.date]
                .into_iter()
                .flatten()
                .chain(source.attributes.iter().map(|(_, f)| f))
            {
                if let Field::Path { query, .. } = f {
                    out.push(format!("{:?}", query.query(r).all()));
                }
            }
        }
        out
    }

    #[test]
    fn pruned_parse_selects_what_the_full_parse_selects() {
        let src = source(
            r#"format = 1
[[source]]
kind = "group"
files = ["g.json"]
records = "$.m.items[*]"
name = "$.group.name"
id = "$['group'].gid"
category = "$.tags[1]"
date = "$.when"
"#,
        );
        let keep = Keep::for_source(&src).expect("plain queries");
        let text = r#"{"count": 3, "m": {"note": "x", "items": [
            {"group": {"name": "A", "gid": 7, "extra": [1,2,3]}, "tags": ["t0","t1"], "when": 5, "about": "long"},
            {"group": {"name": ["not", "a", "name"]}, "tags": "none", "when": null},
            {"group": "flat", "about": {"deep": [[[1]]]}}
        ]}, "tail": [1, {"a": 2}]}"#;
        let full: Value = serde_json::from_str(text).unwrap();
        let pruned = keep.parse(text).unwrap();
        assert_eq!(selections(&src, &pruned), selections(&src, &full));
        // And it really left things out.
        assert!(pruned.get("tail").is_none());
        assert!(pruned["m"]["items"][0].get("about").is_none());
    }

    #[test]
    fn wildcards_on_objects_keep_every_member() {
        let src = source(
            r#"format = 1
[[source]]
kind = "like"
files = ["l.json"]
records = "$.*"
name = "$.t"
"#,
        );
        let keep = Keep::for_source(&src).expect("plain");
        let text = r#"{"x": {"t": "one", "u": 1}, "y": {"t": "two"}, "z": [ {"t": "three"} ]}"#;
        let full: Value = serde_json::from_str(text).unwrap();
        assert_eq!(
            selections(&src, &keep.parse(text).unwrap()),
            selections(&src, &full)
        );
    }

    #[test]
    fn bad_json_is_still_an_error() {
        let keep = Keep::default();
        assert!(keep.parse(r#"{"a": [1, 2}"#).is_err());
        assert!(keep.parse(r#"{"a": 1} trailing"#).is_err());
    }
}
