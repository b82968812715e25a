//! Evidence from belief vocabulary, and the special-category flags. An item whose name
//! holds a belief or affiliation word ("mosque", "synagogue", "socialist",
//! "conservative", in several languages) leans toward the priors values the
//! vocabulary gives ratios for; the implied distribution is `D(v) ∝ π(v)·L(v)`. When
//! several words in one name speak to the same attribute only the strongest counts,
//! so "Muslim Professionals Quran Study" is not counted twice.
//!
//! Every item whose name (or archive category) holds a word in a special category of
//! personal data (GDPR Article 9(1): racial or ethnic origin, political opinions,
//! religious or philosophical beliefs, trade union membership, health, sex life or
//! sexual orientation) is flagged, whether or not it maps to a priors value and
//! whether or not the reference table knew it.

use std::collections::BTreeSet;

use super::model::{Evidence, EvidenceSet, Origin, SpecialFlag, Subject};
use super::places::normalise;
use super::sources::SourceKind;
use crate::footprint::Item;
use crate::lexicon::{SpecialCategory, TermMatch, Vocabulary};
use crate::priors::Priors;

/// Likelihood ratios one term gives an attribute's values (1 for values it does not
/// name); `None` when the term names no value of this attribute.
fn term_ratios(m: &TermMatch<'_>, priors: &Priors) -> Option<(usize, Vec<f64>)> {
    let attr_id = m.term.attribute.as_deref()?;
    let (ai, attr) = priors.attributes.iter().enumerate().find(|(_, a)| {
        a.id.eq_ignore_ascii_case(attr_id) || a.label.eq_ignore_ascii_case(attr_id)
    })?;
    let mut ratios = vec![1.0; attr.values.len()];
    let mut any = false;
    for (value, ratio) in &m.term.lean {
        if let Some(v) = attr.value_index(value) {
            ratios[v] = *ratio;
            any = true;
        }
    }
    any.then_some((ai, ratios))
}

/// The strength of a set of ratios: the largest |ln L|.
fn strength(ratios: &[f64]) -> f64 {
    ratios.iter().map(|r| r.ln().abs()).fold(0.0, f64::max)
}

/// Add the vocabulary evidence and special-category flag of item `i`, whose name has
/// the tokens `toks`.
pub(crate) fn vocabulary_item(
    priors: &Priors,
    vocabulary: &Vocabulary,
    i: usize,
    item: &Item,
    toks: &[String],
    covered: &dyn Fn(usize, usize) -> bool,
    set: &mut EvidenceSet,
) {
    {
        let matches = vocabulary.find_tokens(toks);
        let mut categories = BTreeSet::new();
        let mut terms = Vec::new();
        for m in &matches {
            if !m.term.special.is_empty() && !terms.contains(&m.text) {
                terms.push(m.text.clone());
            }
            categories.extend(m.term.special.iter().copied());
        }
        if let Some(cat) = &item.category {
            for m in vocabulary.find(cat) {
                if !m.term.special.is_empty() {
                    let t = format!("category '{cat}'");
                    if !terms.contains(&t) {
                        terms.push(t);
                    }
                }
                categories.extend(m.term.special.iter().copied());
            }
        }
        if !categories.is_empty() {
            set.special.push(SpecialFlag {
                item: i,
                categories: categories.into_iter().collect::<Vec<SpecialCategory>>(),
                terms,
            });
        }

        // The strongest term per attribute.
        let mut best: Vec<(usize, Vec<f64>, &TermMatch<'_>)> = Vec::new();
        for m in &matches {
            let Some((ai, ratios)) = term_ratios(m, priors) else {
                continue;
            };
            if covered(i, ai) {
                continue;
            }
            match best.iter_mut().find(|(a, _, _)| *a == ai) {
                Some(slot) if strength(&ratios) > strength(&slot.1) => *slot = (ai, ratios, m),
                Some(_) => {}
                None => best.push((ai, ratios, m)),
            }
        }
        for (ai, ratios, m) in best {
            let attr = &priors.attributes[ai];
            let dist = normalise(ratios.iter().zip(&attr.base_rates).map(|(l, b)| l * b));
            let leans: Vec<String> = m
                .term
                .lean
                .iter()
                .filter_map(|(v, r)| {
                    attr.value_index(v)
                        .map(|vi| format!("{} ×{r}", attr.values[vi].label))
                })
                .collect();
            set.push(Evidence::from_distribution(
                Subject::Item(i),
                ai,
                dist,
                &attr.base_rates,
                1.0,
                Origin::lexicon(
                    SourceKind::Vocabulary.id(),
                    format!("'{}' → {} (rule of thumb)", m.text, leans.join(", ")),
                ),
            ));
        }
    }
}
