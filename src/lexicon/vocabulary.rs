//! Belief and affiliation vocabulary: generic words (no party, church or organisation
//! names) that say something about an item's members' beliefs, with likelihood ratios
//! for the values of a priors attribute, and the special categories of personal data
//! (GDPR Article 9) they fall in. The file is TOML
//! (reference-priors/lexicons/vocabulary.toml, format in its header and in
//! docs/evidence.md).

use std::collections::BTreeMap;

use serde::Deserialize;

use super::error::{Result, checked, format_problems, parse_toml};
use super::phrase::{Pattern, PhraseIndex};
use super::special::SpecialCategory;

/// The file format version this build reads.
pub const FORMAT: i64 = 1;

/// One entry of the vocabulary.
#[derive(Debug, Clone, PartialEq)]
pub struct Term {
    /// The entry's first word, to name it in messages.
    pub name: String,
    pub special: Vec<SpecialCategory>,
    /// The priors attribute the words say something about.
    pub attribute: Option<String>,
    /// Likelihood ratio per value id (others 1).
    pub lean: Vec<(String, f64)>,
    /// Share of an item's members who hold each value named (a rule of thumb such as
    /// "most members of a mosque's group are Muslim"); the ratio then follows from the
    /// loaded priors' population rates ([`crate::evidence`]'s belief evidence).
    pub members: Vec<(String, f64)>,
}

/// A term found in a name.
#[derive(Debug, Clone, PartialEq)]
pub struct TermMatch<'a> {
    pub term: &'a Term,
    /// The matched words.
    pub text: String,
}

#[derive(Debug, Clone, Default)]
pub struct Vocabulary {
    pub terms: Vec<Term>,
    index: PhraseIndex<u32>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: i64,
    #[serde(default)]
    term: Vec<RawTerm>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTerm {
    words: Vec<String>,
    #[serde(default)]
    special: Vec<String>,
    attribute: Option<String>,
    #[serde(default)]
    lean: BTreeMap<String, f64>,
    #[serde(default)]
    members: BTreeMap<String, f64>,
}

impl Vocabulary {
    pub fn parse(text: &str, origin: &str) -> Result<Vocabulary> {
        let raw: RawFile = parse_toml(text, origin)?;
        let mut problems = format_problems(raw.format, FORMAT);
        let mut out = Vocabulary::default();
        for (i, t) in raw.term.into_iter().enumerate() {
            let name = t.words.first().cloned().unwrap_or_default();
            let at = format!("term[{}] ('{name}')", i + 1);
            let mut special = Vec::new();
            for s in &t.special {
                match SpecialCategory::parse(s) {
                    Some(c) => special.push(c),
                    None => problems.push(format!(
                        "{at}: '{s}' is not a special category; use racial-ethnic, political, religious, trade-union, health or sex-life"
                    )),
                }
            }
            if !(t.lean.is_empty() && t.members.is_empty()) && t.attribute.is_none() {
                problems.push(format!("{at}: 'lean' and 'members' need an 'attribute'"));
            }
            if !t.lean.is_empty() && !t.members.is_empty() {
                problems.push(format!("{at}: give 'lean' or 'members', not both"));
            }
            if t.lean.is_empty() && t.members.is_empty() && special.is_empty() {
                problems.push(format!(
                    "{at}: says nothing (no 'lean', 'members' or 'special')"
                ));
            }
            for (v, s) in &t.members {
                if !(s.is_finite() && *s > 0.0 && *s < 1.0) {
                    problems.push(format!(
                        "{at}: members share for '{v}' must be above 0 and under 1"
                    ));
                }
            }
            if t.members.values().sum::<f64>() >= 1.0 {
                problems.push(format!("{at}: members shares must add up to under 1"));
            }
            for (v, r) in &t.lean {
                if !(r.is_finite() && *r > 0.0) {
                    problems.push(format!("{at}: lean for '{v}' must be a ratio above 0"));
                }
            }
            let index = out.terms.len() as u32;
            for w in &t.words {
                match Pattern::parse(w) {
                    Some(p) => out.index.insert(&p, index),
                    None => problems.push(format!("{at}: word '{w}' is empty")),
                }
            }
            if t.words.is_empty() {
                problems.push(format!("{at}: no words"));
            }
            out.terms.push(Term {
                name,
                special,
                attribute: t.attribute,
                lean: t.lean.into_iter().collect(),
                members: t.members.into_iter().collect(),
            });
        }
        checked(out, problems, origin)
    }

    /// Every term found in a name, in reading order.
    pub fn find(&self, name: &str) -> Vec<TermMatch<'_>> {
        self.find_tokens(&super::phrase::tokens(name))
    }

    /// As [`Vocabulary::find`], on the name's tokens already made.
    pub fn find_tokens(&self, toks: &[String]) -> Vec<TermMatch<'_>> {
        self.index
            .find_tokens(toks)
            .into_iter()
            .flat_map(|h| {
                h.values.iter().map(move |&t| TermMatch {
                    term: &self.terms[t as usize],
                    text: h.text.clone(),
                })
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const VOCAB: &str = r#"
format = 1
[[term]]
words = ["mosque*", "мечеть"]
special = ["religious"]
attribute = "religion"
lean = { muslim = 10.0 }
[[term]]
words = ["trade union*"]
special = ["trade-union"]
[[term]]
words = ["diabet*"]
special = ["health"]
"#;

    #[test]
    fn terms_load_and_match_in_several_languages() {
        let v = Vocabulary::parse(VOCAB, "v.toml").unwrap();
        let m = v.find("Riverside Mosque Volunteers");
        assert_eq!(m.len(), 1);
        assert_eq!(m[0].term.lean, vec![("muslim".to_string(), 10.0)]);
        assert_eq!(v.find("Мечеть на Садовой")[0].term.name, "mosque*");
        let m = v.find("Trade Unionists for Diabetes Research");
        let cats: Vec<SpecialCategory> = m.iter().flat_map(|m| m.term.special.clone()).collect();
        assert_eq!(
            cats,
            vec![SpecialCategory::TradeUnion, SpecialCategory::Health]
        );
        assert!(v.find("Chess Club").is_empty());
    }

    #[test]
    fn problems_are_listed() {
        let bad =
            "format = 1\n[[term]]\nwords = [\"x\"]\nspecial = [\"hobbies\"]\nlean = { a = -1 }\n";
        let err = Vocabulary::parse(bad, "bad.toml").unwrap_err().to_string();
        assert!(err.contains("not a special category"), "{err}");
        assert!(err.contains("need an 'attribute'"), "{err}");
        assert!(err.contains("ratio above 0"), "{err}");
    }
}
