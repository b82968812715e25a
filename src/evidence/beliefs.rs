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
    if !m.term.members.is_empty() {
        let named: Vec<(usize, f64)> = m
            .term
            .members
            .iter()
            .filter_map(|(value, s)| attr.value_index(value).map(|v| (v, *s)))
            .collect();
        any = !named.is_empty();
        ratios = members_ratios(&attr.base_rates, &named);
    }
    any.then_some((ai, ratios))
}

/// Ratios from members' shares: a named value `v` holds `D(v) = max(s_v, π(v))` of
/// the item's members (a group about a faith is never less of that faith than
/// everyone), the other values share the rest in their population proportions, and
/// `L(v) = D(v)/π(v)`. So one stated share gives a strong ratio for a value that is
/// rare in the loaded population and a mild one for a common value.
fn members_ratios(base: &[f64], named: &[(usize, f64)]) -> Vec<f64> {
    let mut dist = vec![0.0; base.len()];
    let mut is_named = vec![false; base.len()];
    for &(v, s) in named {
        dist[v] = s.max(base[v]);
        is_named[v] = true;
    }
    let taken: f64 = dist.iter().sum();
    if taken >= 1.0 {
        for d in &mut dist {
            *d /= taken;
        }
    } else {
        let rest: f64 = (0..base.len())
            .filter(|&u| !is_named[u])
            .map(|u| base[u])
            .sum();
        for u in (0..base.len()).filter(|&u| !is_named[u]) {
            dist[u] = if rest > 0.0 {
                (1.0 - taken) * base[u] / rest
            } else {
                0.0
            };
        }
    }
    dist.iter()
        .zip(base)
        .map(|(d, b)| if *b > 0.0 { d / b } else { 1.0 })
        .collect()
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
            let mut leans: Vec<String> = m
                .term
                .lean
                .iter()
                .filter_map(|(v, r)| {
                    attr.value_index(v)
                        .map(|vi| format!("{} ×{r}", attr.values[vi].label))
                })
                .collect();
            leans.extend(m.term.members.iter().filter_map(|(v, s)| {
                attr.value_index(v).map(|vi| {
                    format!(
                        "{} for {:.0}% of members (×{:.1} here)",
                        attr.values[vi].label,
                        100.0 * s,
                        ratios[vi]
                    )
                })
            }));
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

#[cfg(test)]
mod tests {
    use super::members_ratios;

    #[test]
    fn members_share_gives_rate_aware_ratios() {
        // A value at 3% of the population, stated at 75% of members:
        // L = 0.75/0.03 = 25 for it; the rest, 25% over 97%, gives 0.25/0.97 to each other.
        let base = [0.47, 0.03, 0.50];
        let r = members_ratios(&base, &[(1, 0.75)]);
        assert!((r[1] - 25.0).abs() < 1e-12, "{r:?}");
        assert!((r[0] - 0.25 / 0.97).abs() < 1e-12 && (r[2] - r[0]).abs() < 1e-12);
        // The implied members' distribution sums to 1.
        let d: f64 = r.iter().zip(&base).map(|(l, b)| l * b).sum();
        assert!((d - 1.0).abs() < 1e-12);
        // A common value is never pushed under its own rate.
        let r = members_ratios(&[0.9, 0.1], &[(0, 0.75)]);
        assert!(
            (r[0] - 1.0).abs() < 1e-12 && (r[1] - 1.0).abs() < 1e-12,
            "{r:?}"
        );
    }
}
