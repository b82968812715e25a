//! The mapping file exactly as TOML gives it, before any checking. Spans are kept so
//! that problems can name their line.

use std::collections::BTreeMap;

use serde::Deserialize;
use toml::Spanned;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawMapping {
    pub format: Option<Spanned<i64>>,
    pub label: Option<String>,
    #[serde(rename = "source", default)]
    pub sources: Vec<Spanned<RawSource>>,
}

/// One `[[source]]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawSource {
    pub kind: Option<Spanned<String>>,
    pub label: Option<String>,
    pub files: Option<Spanned<OneOrMany>>,
    pub format: Option<Spanned<String>>,
    pub records: Option<Spanned<String>>,
    pub name: Option<Spanned<String>>,
    pub id: Option<Spanned<String>>,
    pub category: Option<Spanned<String>>,
    pub date: Option<Spanned<String>>,
    pub date_format: Option<Spanned<String>>,
    pub repair: Option<Spanned<String>>,
    pub delimiter: Option<Spanned<String>>,
    #[serde(default)]
    pub attributes: BTreeMap<String, Spanned<String>>,
}

#[derive(Debug, Deserialize)]
#[serde(untagged)]
pub enum OneOrMany {
    One(String),
    Many(Vec<String>),
}

impl OneOrMany {
    pub fn into_vec(self) -> Vec<String> {
        match self {
            OneOrMany::One(s) => vec![s],
            OneOrMany::Many(v) => v,
        }
    }
}
