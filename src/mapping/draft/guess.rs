//! Guessing what a record set is and which fields hold what. The kind comes from
//! generic words for likes, groups, follows, events, friends and the person's own
//! profile, in the languages of reference-priors/lexicons/record-kinds.toml, found in
//! the file and folder names, the keys on the way to the records, a section's type,
//! the field names and the values of a field that says what each record is (`"kind":
//! "page"`; no file name of any real platform is known here), and from the values:
//! fields whose values are the priors' attribute values make a list of people
//! (friends) or, in a single object, the person's own statement. Within a set, the date is the field that reads as dates, the
//! id the unique compact field, the name the text field that is present, varied and
//! has spaces, the category a text field with few distinct values.

use super::inspect::{FieldProfile, RecordSet};
use crate::footprint::ItemKind;
use crate::lexicon::{RecordKind, bundled_record_kinds, tokens};
use crate::mapping::SourceKind;
use crate::priors::Priors;
use crate::text::name_key;

/// The drafter's kind for a kind the word lists name.
fn source_kind(k: RecordKind) -> SourceKind {
    match k {
        RecordKind::Like => SourceKind::Item(ItemKind::Like),
        RecordKind::Group => SourceKind::Item(ItemKind::Group),
        RecordKind::Follow => SourceKind::Item(ItemKind::Follow),
        RecordKind::Event => SourceKind::Item(ItemKind::Event),
        RecordKind::Friend => SourceKind::Friend,
        RecordKind::Profile => SourceKind::SelfDeclared,
    }
}

/// A field says what each record is when its name is a word for "kind" or "type" and
/// it holds at most this many different values.
const TYPE_FIELD_VALUES: usize = 4;

/// Where the kind's words were seen, and how much each place counts.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Place {
    FileName,
    Folder,
    RecordKey,
    Section,
    FieldName,
    /// The values of a field that says what each record is (`"kind": "page"`).
    FieldValue,
}

impl Place {
    fn weight(self) -> f64 {
        match self {
            Place::Section => 6.0,
            Place::FieldValue => 4.0,
            Place::FileName | Place::RecordKey => 3.0,
            Place::Folder | Place::FieldName => 1.0,
        }
    }

    fn describe(self) -> &'static str {
        match self {
            Place::FileName => "the file name",
            Place::Folder => "a folder name",
            Place::RecordKey => "the key holding the records",
            Place::Section => "the section type",
            Place::FieldName => "a field name",
            Place::FieldValue => "the records' own kind field",
        }
    }
}

/// A guessed kind with the reasons for it.
#[derive(Debug, Clone, PartialEq)]
pub struct KindGuess {
    pub kind: SourceKind,
    pub reasons: Vec<String>,
    /// False when nothing pointed to a kind and the guess is a default.
    pub sure: bool,
}

/// Does a word (folded as name keys are) start with a stem, or, for a stem outside
/// ASCII, hold it anywhere (prefixes are common there: по-нрав-илось)? The stem is
/// folded the same way first (kana lose their voicing marks, accents go).
fn stem_matches(word: &str, stem: &str) -> bool {
    let stem = name_key(stem);
    if stem.is_empty() {
        false
    } else if stem.is_ascii() {
        word.starts_with(&stem)
    } else {
        word.contains(&stem)
    }
}

fn words_of(text: &str) -> Vec<String> {
    // camelCase joins: "likedPages" → "liked pages".
    let mut spaced = String::with_capacity(text.len() + 8);
    let mut prev_lower = false;
    for c in text.chars() {
        if c.is_uppercase() && prev_lower {
            spaced.push(' ');
        }
        prev_lower = c.is_lowercase();
        spaced.push(c);
    }
    tokens(&spaced)
}

/// Which priors attribute each field's values belong to: `(field, attribute id,
/// share of the field's values that are the attribute's values)`, best field per
/// attribute, at least half of its values matching.
pub fn attribute_fields(set: &RecordSet, priors: &Priors) -> Vec<(usize, String, f64)> {
    let mut best: Vec<(usize, String, f64)> = Vec::new();
    for attr in &priors.attributes {
        let mut top: Option<(usize, f64)> = None;
        for (fi, f) in set.fields.iter().enumerate() {
            if f.present == 0 {
                continue;
            }
            let hits: usize = f
                .values
                .iter()
                .filter(|(v, _)| attr.value_index(v).is_some())
                .map(|(_, n)| n)
                .sum();
            let share = hits as f64 / f.present as f64;
            if share >= 0.5 && top.is_none_or(|(_, s)| share > s) {
                top = Some((fi, share));
            }
        }
        if let Some((fi, share)) = top
            && !best.iter().any(|(f, _, _)| *f == fi)
        {
            best.push((fi, attr.id.clone(), share));
        }
    }
    best
}

/// Guess the kind of a record set.
pub fn guess_kind(set: &RecordSet, attribute_fields: usize) -> KindGuess {
    let words = bundled_record_kinds();
    // Each name is read whole (so phrases of several words are found), with its
    // place and how much of the set it speaks for (1 but for field values).
    let mut seen: Vec<(Vec<String>, Place, f64)> = Vec::new();
    let parts: Vec<&str> = set.file.split('/').collect();
    if let Some((name, folders)) = parts.split_last() {
        let stem = name.rsplit_once('.').map(|(s, _)| s).unwrap_or(name);
        seen.push((words_of(stem), Place::FileName, 1.0));
        for f in folders {
            seen.push((words_of(f), Place::Folder, 1.0));
        }
    }
    let section = set.section().map(str::to_string);
    for w in set.path_words() {
        let place = if Some(&w) == section.as_ref() {
            Place::Section
        } else {
            Place::RecordKey
        };
        seen.push((words_of(&w), place, 1.0));
    }
    for f in &set.fields {
        for k in &f.keys {
            seen.push((words_of(k), Place::FieldName, 1.0));
        }
        // The values of a "kind" or "type" field with few values: each speaks for
        // the share of records that hold it.
        let typed = f
            .keys
            .last()
            .is_some_and(|k| words.is_type_field(&words_of(k)));
        if typed && !f.overflow && f.distinct() <= TYPE_FIELD_VALUES && f.present > 0 {
            for (value, n) in &f.values {
                let share = *n as f64 / set.profiled.max(f.present) as f64;
                seen.push((words_of(value), Place::FieldValue, share));
            }
        }
    }

    let mut scores: Vec<(SourceKind, f64, Vec<String>)> = RecordKind::ALL
        .iter()
        .map(|&k| source_kind(k))
        .filter(|k| (*k == SourceKind::SelfDeclared) == set.single)
        .map(|k| (k, 0.0, Vec::new()))
        .collect();
    for (name, place, share) in &seen {
        for (kind, word) in words.kinds_in(name, *place == Place::FieldValue) {
            let kind = source_kind(kind);
            if let Some(slot) = scores.iter_mut().find(|(k, _, _)| *k == kind) {
                slot.1 += place.weight() * share;
                let why = format!("'{word}' in {}", place.describe());
                if !slot.2.contains(&why) {
                    slot.2.push(why);
                }
            }
        }
    }
    if attribute_fields > 0 {
        let target = if set.single {
            SourceKind::SelfDeclared
        } else {
            SourceKind::Friend
        };
        if let Some(slot) = scores.iter_mut().find(|(k, _, _)| *k == target) {
            slot.1 += 4.0 + attribute_fields as f64;
            slot.2.push(if attribute_fields == 1 {
                "a field holding attribute values the reference priors know".to_string()
            } else {
                format!(
                    "{attribute_fields} fields holding attribute values the reference priors know"
                )
            });
        }
    }
    scores.sort_by(|a, b| b.1.total_cmp(&a.1));
    match scores.into_iter().next() {
        Some((kind, score, reasons)) if score > 0.0 => KindGuess {
            kind,
            reasons,
            sure: true,
        },
        _ => KindGuess {
            kind: if set.single {
                SourceKind::SelfDeclared
            } else {
                SourceKind::Item(ItemKind::Like)
            },
            reasons: vec!["nothing in the names said what these records are".into()],
            sure: false,
        },
    }
}

/// Field-name stems that suggest an identifier.
const ID_WORDS: &[&str] = &["id", "ref", "uid", "key", "handle", "code"];

/// Field-name stems that suggest a category (several languages; from memory).
const CATEGORY_WORDS: &[&str] = &[
    "categor",
    "topic",
    "type",
    "kind",
    "genre",
    "tema",
    "thema",
    "sujet",
    "tipo",
    "typ",
    "катег",
    "тема",
    "カテゴリ",
    "类别",
    "類別",
    "분류",
];

/// Which field holds what.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Roles {
    pub name: Option<usize>,
    pub id: Option<usize>,
    pub category: Option<usize>,
    pub date: Option<usize>,
    /// (attribute id, field).
    pub attributes: Vec<(String, usize)>,
}

fn share(n: usize, of: usize) -> f64 {
    if of == 0 { 0.0 } else { n as f64 / of as f64 }
}

fn key_has(f: &FieldProfile, stems: &[&str]) -> bool {
    f.keys
        .last()
        .map(|k| {
            words_of(k)
                .iter()
                .any(|w| stems.iter().any(|s| stem_matches(w, s)))
        })
        .unwrap_or(false)
}

/// Assign roles to the fields of a record set of a given kind.
pub fn assign_roles(set: &RecordSet, kind: SourceKind, attrs: &[(usize, String, f64)]) -> Roles {
    let n = set.profiled.max(1);
    let mut roles = Roles::default();
    let taken_by_attr: Vec<usize> = attrs.iter().map(|(f, _, _)| *f).collect();
    if matches!(kind, SourceKind::Friend | SourceKind::SelfDeclared) {
        roles.attributes = attrs.iter().map(|(f, a, _)| (a.clone(), *f)).collect();
    }
    if kind == SourceKind::SelfDeclared {
        return roles;
    }
    let usable = |i: usize, f: &FieldProfile, roles: &Roles| {
        f.present > 0
            && !taken_by_attr.contains(&i)
            && roles.date != Some(i)
            && roles.id != Some(i)
            && roles.name != Some(i)
    };
    // Date: most values read as dates.
    roles.date = set
        .fields
        .iter()
        .enumerate()
        .filter(|(_, f)| share(f.dates, f.present) >= 0.8 && share(f.present, n) >= 0.5)
        .max_by_key(|(_, f)| f.dates)
        .map(|(i, _)| i);
    // Id: unique, compact, nearly always present.
    roles.id = set
        .fields
        .iter()
        .enumerate()
        .filter(|(i, f)| {
            usable(*i, f, &roles)
                && f.unique()
                // One record is unique whatever it holds: only an id-like name counts.
                && (n > 1 || key_has(f, ID_WORDS))
                && share(f.compact, f.present) >= 0.95
                && share(f.present, n) >= 0.9
        })
        .max_by(|(_, a), (_, b)| {
            let sa = key_has(a, ID_WORDS) as u8;
            let sb = key_has(b, ID_WORDS) as u8;
            sa.cmp(&sb).then(a.present.cmp(&b.present))
        })
        .map(|(i, _)| i);
    // Name: text, present, varied, with spaces.
    let name_score = |f: &FieldProfile| {
        share(f.present, n) * 2.0
            + share(f.distinct(), f.present)
            + share(f.spaced, f.present)
            + share(f.texts, f.present)
            + if key_has(
                f,
                &[
                    "name", "title", "display", "label", "nom", "nombre", "titel", "titulo",
                    "nome", "имя", "назв",
                ],
            ) {
                1.0
            } else {
                0.0
            }
    };
    roles.name = set
        .fields
        .iter()
        .enumerate()
        .filter(|(i, f)| {
            usable(*i, f, &roles)
                && share(f.texts, f.present) >= 0.8
                && share(f.lettered, f.present) >= 0.5
                && share(f.present, n) >= 0.5
        })
        .max_by(|(_, a), (_, b)| name_score(a).total_cmp(&name_score(b)))
        .map(|(i, _)| i);
    // Category: text with few distinct values (items only).
    if matches!(kind, SourceKind::Item(_)) {
        roles.category = set
            .fields
            .iter()
            .enumerate()
            .filter(|(i, f)| {
                usable(*i, f, &roles)
                    && share(f.texts, f.present) >= 0.8
                    && share(f.present, n) >= 0.5
                    && f.distinct() >= 2
                    && f.distinct() <= 60
                    && (f.distinct() * 3 <= f.present
                        || (key_has(f, CATEGORY_WORDS) && f.distinct() * 3 <= f.present * 2))
            })
            .max_by_key(|(_, f)| f.present)
            .map(|(i, _)| i);
    }
    roles
}
