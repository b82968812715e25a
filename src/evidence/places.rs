//! Evidence from place names: an item whose name mentions a place ("Tigard Farmers
//! Market", "Мечеть в Казани") points at the region that place lies in.
//!
//! The priors' location values are matched to ISO codes by their ids or labels: an
//! ISO 3166-2 subdivision code (`US-OR`), an ISO 3166-1 alpha-2 country code, or the
//! name of a country or region the gazetteer knows. A mention's candidate places are
//! weighted by population (a name shared by several places counts for each in
//! proportion), and each candidate lands on the value of its region or country. A
//! name that is also a common word counts only weakly.
//!
//! The likelihood ratio follows from one assumption: a place-named item names the
//! person's home region with probability `s` ([`LOCALITY_SHARE`]), and otherwise a
//! place drawn like everyone's homes. For a mention landing on value `w` with
//! confidence `c` that it is a place at all,
//! `L(v) = c·(s·[v=w]/π(w) + 1 − s) + (1 − c)`; with the candidates spread over
//! several values (shares `q(w)`, `q_out` outside the priors' values) the terms are
//! averaged. One item alone is modest evidence, but the ratios of many items naming
//! places in the same region add up (naive Bayes), which is why a footprint full of
//! one town's groups gives the town away.

use std::collections::HashMap;

use super::model::{Evidence, EvidenceSet, Origin, Subject};
use super::sources::SourceKind;
use crate::lexicon::{Candidate, Gazetteer, Mention, PlaceCues, PlaceRef, PlaceRole};
use crate::priors::{Attribute, Priors};

/// Share of place-named items that name the person's home region (common practice,
/// no source).
pub const LOCALITY_SHARE: f64 = 0.25;
/// Confidence that a match is a place: a name of two words or more (common practice,
/// no source).
pub const CONFIDENCE_PHRASE: f64 = 0.9;
/// … a single word (common practice, no source).
pub const CONFIDENCE_WORD: f64 = 0.7;
/// … a single word that is also a common word (common practice, no source).
pub const CONFIDENCE_COMMON_WORD: f64 = 0.1;

/// What a location value stands for.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum PlaceCode {
    /// ISO 3166-1 alpha-2.
    Country(String),
    /// ISO 3166-2.
    Region(String),
}

impl PlaceCode {
    fn country(&self) -> &str {
        self.country_code()
    }

    /// The ISO 3166-1 alpha-2 code of the country the place lies in.
    pub fn country_code(&self) -> &str {
        match self {
            PlaceCode::Country(c) => c,
            PlaceCode::Region(r) => r.split('-').next().unwrap_or(r),
        }
    }

    /// Does the gazetteer know this code (a region code well formed but unknown,
    /// such as `US-XX`, is not known)?
    pub fn known_to(&self, gazetteer: &Gazetteer) -> bool {
        match self {
            PlaceCode::Country(c) => gazetteer.country(c).is_some(),
            PlaceCode::Region(r) => gazetteer
                .region_codes
                .iter()
                .any(|k| k.eq_ignore_ascii_case(r)),
        }
    }
}

/// A priors attribute whose values are places.
#[derive(Debug, Clone, PartialEq)]
pub struct LocationValues {
    pub attribute: usize,
    /// The code of each value (same order as the attribute's values), if it has one.
    pub codes: Vec<Option<PlaceCode>>,
}

/// The code a location value stands for, from its id or its label.
pub fn value_code(id: &str, label: &str, gazetteer: &Gazetteer) -> Option<PlaceCode> {
    let upper = id.trim().to_ascii_uppercase();
    let bytes = upper.as_bytes();
    if bytes.len() >= 4
        && bytes.len() <= 6
        && bytes[2] == b'-'
        && bytes[..2].iter().all(u8::is_ascii_uppercase)
        && bytes[3..].iter().all(u8::is_ascii_alphanumeric)
        && gazetteer.country(&upper[..2]).is_some()
    {
        return Some(PlaceCode::Region(upper));
    }
    if bytes.len() == 2 && gazetteer.country(&upper).is_some() {
        return Some(PlaceCode::Country(upper));
    }
    for name in [label, id] {
        for c in gazetteer.lookup(name) {
            if !c.name.eq_ignore_ascii_case(name.trim()) {
                continue;
            }
            match c.place {
                PlaceRef::Region(_) => return c.region.map(|r| PlaceCode::Region(r.into())),
                PlaceRef::Country(_) => return Some(PlaceCode::Country(c.country.into())),
                PlaceRef::City(_) => {}
            }
        }
    }
    None
}

/// Attributes of the priors whose values are places: at least half of their values
/// have a code.
pub fn location_attributes(priors: &Priors, gazetteer: &Gazetteer) -> Vec<LocationValues> {
    priors
        .attributes
        .iter()
        .enumerate()
        .filter_map(|(ai, attr)| {
            let codes: Vec<Option<PlaceCode>> = attr
                .values
                .iter()
                .map(|v| value_code(&v.id, &v.label, gazetteer))
                .collect();
            let coded = codes.iter().filter(|c| c.is_some()).count();
            (coded * 2 >= codes.len() && coded > 0).then_some(LocationValues {
                attribute: ai,
                codes,
            })
        })
        .collect()
}

impl LocationValues {
    /// How one candidate place spreads over the values: its region's value, else its
    /// country's value, else (a country, or a region the values do not name) the
    /// values inside its country in proportion to their base rates; empty when the
    /// place lies outside every value.
    fn spread(&self, c: &Candidate<'_>, base: &[f64]) -> Vec<(usize, f64)> {
        if let Some(region) = c.region
            && let Some(v) = self
                .codes
                .iter()
                .position(|code| matches!(code, Some(PlaceCode::Region(r)) if r == region))
        {
            return vec![(v, 1.0)];
        }
        if let Some(v) = self
            .codes
            .iter()
            .position(|code| matches!(code, Some(PlaceCode::Country(cc)) if cc == c.country))
        {
            return vec![(v, 1.0)];
        }
        let inside: Vec<usize> = self
            .codes
            .iter()
            .enumerate()
            .filter(|(_, code)| code.as_ref().is_some_and(|k| k.country() == c.country))
            .map(|(v, _)| v)
            .collect();
        let total: f64 = inside.iter().map(|&v| base[v]).sum();
        if total <= 0.0 {
            return Vec::new();
        }
        inside.into_iter().map(|v| (v, base[v] / total)).collect()
    }

    /// A mention's shares per value (population-weighted over its candidates) and the
    /// share landing outside every value.
    fn shares(&self, m: &Mention<'_>, base: &[f64]) -> (Vec<f64>, f64) {
        let mut q = vec![0.0; self.codes.len()];
        let total: f64 = m
            .candidates
            .iter()
            .map(|c| (c.population as f64).max(1.0))
            .sum();
        let mut outside = 0.0;
        for c in &m.candidates {
            let w = (c.population as f64).max(1.0) / total;
            let spread = self.spread(c, base);
            if spread.is_empty() {
                outside += w;
            }
            for (v, share) in spread {
                q[v] += w * share;
            }
        }
        (q, outside)
    }
}

/// Confidence that a mention is a place at all.
pub fn mention_confidence(m: &Mention<'_>) -> f64 {
    if m.common_word {
        CONFIDENCE_COMMON_WORD
    } else if m.text.contains(' ') {
        CONFIDENCE_PHRASE
    } else {
        CONFIDENCE_WORD
    }
}

/// Likelihood ratios for one item's mentions (see the module notes), or `None` when
/// every mention lies outside the values.
pub fn place_likelihoods(
    mentions: &[Mention<'_>],
    values: &LocationValues,
    base: &[f64],
) -> Option<Vec<f64>> {
    let k = values.codes.len();
    let mut q = vec![0.0; k];
    let mut outside = 0.0;
    let mut weight = 0.0;
    let mut confidence: f64 = 0.0;
    for m in mentions {
        let c = mention_confidence(m);
        let (qm, out) = values.shares(m, base);
        for (a, b) in q.iter_mut().zip(&qm) {
            *a += c * b;
        }
        outside += c * out;
        weight += c;
        confidence = confidence.max(c);
    }
    if weight <= 0.0 {
        return None;
    }
    q.iter_mut().for_each(|x| *x /= weight);
    outside /= weight;
    if q.iter().sum::<f64>() <= 1e-12 {
        return None;
    }
    let s = LOCALITY_SHARE;
    Some(
        (0..k)
            .map(|v| {
                confidence * (s * q[v] / base[v] + (1.0 - s) * (1.0 - outside) + outside)
                    + (1.0 - confidence)
            })
            .collect(),
    )
}

/// One place name an item mentions, with every place it may stand for and how it
/// counts (its role from the place cues).
#[derive(Debug, Clone, PartialEq)]
pub struct NamedPlace {
    /// The matched words (name key).
    pub text: String,
    /// Every place of that name, most populous first.
    pub places: Vec<PlaceRef>,
    /// Confidence that the words are a place at all ([`mention_confidence`]).
    pub confidence: f64,
    pub role: PlaceRole,
}

/// The places one item's name mentions.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct NamedPlaces {
    pub mentions: Vec<NamedPlace>,
}

/// The place source set up for one priors file, run item by item.
pub(crate) struct PlaceSource<'a> {
    priors: &'a Priors,
    gazetteer: &'a Gazetteer,
    cues: std::sync::Arc<PlaceCues>,
    locations: Vec<LocationValues>,
}

impl<'a> PlaceSource<'a> {
    pub(crate) fn new(priors: &'a Priors, gazetteer: &'a Gazetteer) -> Self {
        PlaceSource {
            priors,
            gazetteer,
            cues: crate::lexicon::bundled_place_cues(),
            locations: location_attributes(priors, gazetteer),
        }
    }

    /// Add the evidence of item `i`, whose name has the tokens `toks`, and note the
    /// places it names (for the home levels). Names that mention the same places the
    /// same way get the same evidence, so it is worked out once per run of items
    /// (`memo`) and shared.
    pub(crate) fn item(
        &self,
        i: usize,
        toks: &[String],
        covered: &dyn Fn(usize, usize) -> bool,
        memo: &mut PlaceMemo,
        set: &mut EvidenceSet,
    ) {
        let mentions = self.gazetteer.find_in_tokens(toks);
        if mentions.is_empty() {
            return;
        }
        let starts = mention_starts(toks, &mentions);
        let kinds = self.cues.kinds(toks);
        let roles = self.cues.roles(toks, &starts, &kinds);
        let mut key = String::new();
        for (m, r) in mentions.iter().zip(&roles) {
            key.push_str(&m.text);
            key.push('\u{1f}');
            key.push_str(r.as_str());
            key.push('\u{1f}');
        }
        let (known, named) = memo.0.entry(key).or_insert_with(|| {
            let named = NamedPlaces {
                mentions: mentions
                    .iter()
                    .zip(&roles)
                    .map(|(m, &role)| NamedPlace {
                        text: m.text.clone(),
                        places: m.candidates.iter().map(|c| c.place).collect(),
                        confidence: mention_confidence(m),
                        role,
                    })
                    .collect(),
            };
            (self.work_out(&mentions), std::sync::Arc::new(named))
        });
        set.places.push((i, std::sync::Arc::clone(named)));
        for (lv, evidence) in self.locations.iter().zip(known.iter()) {
            if let Some(e) = evidence
                && !covered(i, lv.attribute)
            {
                set.push(e.about(Subject::Item(i)));
            }
        }
    }

    /// The evidence a set of mentions gives each location attribute.
    fn work_out(&self, mentions: &[Mention<'_>]) -> Vec<Option<Evidence>> {
        self.locations
            .iter()
            .map(|lv| {
                let attr = &self.priors.attributes[lv.attribute];
                let lr = place_likelihoods(mentions, lv, &attr.base_rates)?;
                let dist = normalise(lr.iter().zip(&attr.base_rates).map(|(l, b)| l * b));
                let detail = describe(mentions, &lr, attr);
                Some(Evidence::from_distribution(
                    Subject::Item(0),
                    lv.attribute,
                    dist,
                    &attr.base_rates,
                    mentions.len() as f64,
                    Origin::lexicon(SourceKind::Places.id(), detail),
                ))
            })
            .collect()
    }
}

/// Where each mention starts among the tokens (mentions come in reading order and
/// do not overlap); a mention found inside a token of unspaced script starts there.
fn mention_starts(toks: &[String], mentions: &[Mention<'_>]) -> Vec<usize> {
    let mut at = 0;
    mentions
        .iter()
        .map(|m| {
            let first = m.text.split(' ').next().unwrap_or("");
            let found = (at..toks.len())
                .find(|&t| toks[t] == first || toks[t].contains(first))
                .unwrap_or(at.min(toks.len().saturating_sub(1)));
            at = found + 1;
            found
        })
        .collect()
}

/// Place evidence and named places already worked out, by the mentions that gave them.
#[derive(Default)]
pub(crate) struct PlaceMemo(HashMap<String, (Vec<Option<Evidence>>, std::sync::Arc<NamedPlaces>)>);

pub(crate) fn normalise(x: impl Iterator<Item = f64>) -> Vec<f64> {
    let v: Vec<f64> = x.collect();
    let total: f64 = v.iter().sum();
    if total > 0.0 {
        v.into_iter().map(|p| p / total).collect()
    } else {
        v
    }
}

/// "'portland' (3 places of that name) → Oregon": the value the ratios favour most.
fn describe(mentions: &[Mention<'_>], ratios: &[f64], attr: &Attribute) -> String {
    let words: Vec<String> = mentions
        .iter()
        .map(|m| {
            let n = m.candidates.len();
            let mut s = format!("'{}'", m.text);
            if n > 1 {
                s.push_str(&format!(" ({n} places of that name)"));
            }
            if m.common_word {
                s.push_str(" (also a common word)");
            }
            s
        })
        .collect();
    let (best, _) = crate::stats::argmax(ratios);
    format!(
        "{} → {} (GeoNames, weighted by population)",
        words.join(", "),
        attr.values[best].label
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    const SMALL: &str = "C\tUS\t327000000\tUnited States\n\
C\tGB\t66000000\tUnited Kingdom\n\
R\tUS-OR\t1000000\tOregon\n\
R\tUS-ME\t300000\tMaine\n\
R\tUS-TX\t900000\tTexas\n\
P\tUS\tUS-OR\t600000\tPortland\n\
P\tUS\tUS-ME\t200000\tPortland\n\
P\tUS\tUS-OR\t50000\tTigard\n\
P\tGB\tGB.ENG\t160000\tReading\n\
P\tGB\tGB.ENG\t9000000\tLondon\n";

    fn gaz() -> Gazetteer {
        Gazetteer::parse(SMALL, "reading", "t").unwrap()
    }

    fn values(g: &Gazetteer) -> LocationValues {
        LocationValues {
            attribute: 0,
            codes: vec![
                value_code("US-OR", "Oregon", g),
                value_code("maine", "Maine", g),
                value_code("tx", "Texas", g),
            ],
        }
    }

    #[test]
    fn values_map_to_codes_by_id_or_label() {
        let g = gaz();
        assert_eq!(
            value_code("US-OR", "x", &g),
            Some(PlaceCode::Region("US-OR".into()))
        );
        assert_eq!(
            value_code("me", "Maine", &g),
            Some(PlaceCode::Region("US-ME".into()))
        );
        assert_eq!(
            value_code("gb", "Britain", &g),
            Some(PlaceCode::Country("GB".into()))
        );
        assert_eq!(
            value_code("uk", "United Kingdom", &g),
            Some(PlaceCode::Country("GB".into()))
        );
        assert_eq!(value_code("elsewhere", "Elsewhere", &g), None);
    }

    // By the formula in the module notes with s = 0.25, c = 0.7 (one word), base
    // (0.5, 0.2, 0.3): "Tigard" lies only in Oregon, q = (1, 0, 0):
    // L = 0.7·(0.25/0.5 + 0.75) + 0.3 = 1.175 for Oregon, 0.7·0.75 + 0.3 = 0.825 others.
    #[test]
    fn a_unique_name_points_at_its_region() {
        let g = gaz();
        let lv = values(&g);
        let base = [0.5, 0.2, 0.3];
        let m = g.find_in("Tigard Chess");
        let l = place_likelihoods(&m, &lv, &base).unwrap();
        assert!((l[0] - 1.175).abs() < 1e-12, "{l:?}");
        assert!((l[1] - 0.825).abs() < 1e-12 && (l[2] - 0.825).abs() < 1e-12);
    }

    // "Portland" is in Oregon (600,000) and Maine (200,000): q = (0.75, 0.25, 0).
    #[test]
    fn a_shared_name_is_split_by_population() {
        let g = gaz();
        let lv = values(&g);
        let base = [0.5, 0.2, 0.3];
        let l = place_likelihoods(&g.find_in("Portland Runners"), &lv, &base).unwrap();
        let expect_or = 0.7 * (0.25 * 0.75 / 0.5 + 0.75) + 0.3;
        let expect_me = 0.7 * (0.25 * 0.25 / 0.2 + 0.75) + 0.3;
        assert!((l[0] - expect_or).abs() < 1e-12);
        assert!((l[1] - expect_me).abs() < 1e-12);
        assert!(l[0] > l[1] && l[1] > l[2]);
    }

    #[test]
    fn places_abroad_and_common_words_say_little() {
        let g = gaz();
        let lv = values(&g);
        let base = [0.5, 0.2, 0.3];
        assert!(place_likelihoods(&g.find_in("London Calling"), &lv, &base).is_none());
        // "Reading" is a common word and lies abroad anyway.
        assert!(place_likelihoods(&g.find_in("Reading Circle"), &lv, &base).is_none());
        // A country spreads over its regions by base rate: no evidence between them.
        let l = place_likelihoods(&g.find_in("United States Chess"), &lv, &base).unwrap();
        assert!((l[0] - l[1]).abs() < 1e-12 && (l[1] - l[2]).abs() < 1e-12);
    }
}
