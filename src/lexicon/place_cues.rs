//! Place cues: words in an item's name that say how a place it names relates to the
//! person's home: local life (markets, schools, runners, local news, councils), travel
//! (trips, travel tips) and diaspora ("X people in Y": home Y, origin X), with the
//! strength of each kind of item. The file is TOML
//! (reference-priors/lexicons/place-cues.toml, format in its header and in
//! docs/evidence.md); every strength is a rule of thumb (common practice, no source)
//! and every word list is from memory.

use foldhash::{HashSet, HashSetExt};
use serde::Deserialize;

use super::error::{Result, checked, format_problems, parse_toml};
use super::phrase::{Pattern, PhraseIndex};

/// The file format version this build reads.
pub const FORMAT: i64 = 1;

/// What a cue says about the places an item names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum CueKind {
    Local,
    Travel,
    Diaspora,
}

/// The share `s` of items of each kind that name the member's home.
#[derive(Debug, Clone, Copy, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Strengths {
    pub plain: f64,
    pub local: f64,
    pub travel: f64,
    pub diaspora_home: f64,
    pub diaspora_origin: f64,
}

/// How one place named in an item counts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum PlaceRole {
    /// No cue.
    Plain,
    /// Named beside local-life words.
    Local,
    /// Named as a destination.
    Travel,
    /// Where a diaspora lives.
    DiasporaHome,
    /// Where a diaspora comes from.
    DiasporaOrigin,
}

impl PlaceRole {
    /// Short name for reports.
    pub fn as_str(self) -> &'static str {
        match self {
            PlaceRole::Plain => "plain",
            PlaceRole::Local => "local life",
            PlaceRole::Travel => "travel",
            PlaceRole::DiasporaHome => "diaspora: home",
            PlaceRole::DiasporaOrigin => "diaspora: origin",
        }
    }
}

/// The parsed cue lists.
#[derive(Debug, Clone)]
pub struct PlaceCues {
    pub strengths: Strengths,
    /// Languages covered (their codes, in file order).
    pub languages: Vec<String>,
    index: PhraseIndex<CueKind>,
    home_markers: HashSet<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: i64,
    strength: Strengths,
    #[serde(default)]
    language: Vec<RawLanguage>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLanguage {
    code: String,
    #[serde(default)]
    local: Vec<String>,
    #[serde(default)]
    travel: Vec<String>,
    #[serde(default)]
    diaspora: Vec<String>,
    #[serde(default)]
    home_marker: Vec<String>,
}

impl PlaceCues {
    pub fn parse(text: &str, origin: &str) -> Result<PlaceCues> {
        let raw: RawFile = parse_toml(text, origin)?;
        let mut problems = format_problems(raw.format, FORMAT);
        let s = raw.strength;
        for (name, v) in [
            ("plain", s.plain),
            ("local", s.local),
            ("travel", s.travel),
            ("diaspora_home", s.diaspora_home),
            ("diaspora_origin", s.diaspora_origin),
        ] {
            if !(v.is_finite() && (0.0..1.0).contains(&v)) {
                problems.push(format!(
                    "strength.{name}: {v} is not a share from 0 up to (not including) 1"
                ));
            }
        }
        let mut out = PlaceCues {
            strengths: s,
            languages: Vec::new(),
            index: PhraseIndex::new(),
            home_markers: HashSet::new(),
        };
        for lang in raw.language {
            for (kind, words) in [
                (CueKind::Local, &lang.local),
                (CueKind::Travel, &lang.travel),
                (CueKind::Diaspora, &lang.diaspora),
            ] {
                for w in words {
                    match Pattern::parse(w) {
                        Some(p) => out.index.insert(&p, kind),
                        None => {
                            problems.push(format!("language '{}': cue '{w}' is empty", lang.code))
                        }
                    }
                }
            }
            for m in &lang.home_marker {
                let toks = super::phrase::tokens(m);
                match toks.as_slice() {
                    [one] => {
                        out.home_markers.insert(one.clone());
                    }
                    _ => problems.push(format!(
                        "language '{}': home_marker '{m}' must be one word",
                        lang.code
                    )),
                }
            }
            out.languages.push(lang.code);
        }
        checked(out, problems, origin)
    }

    /// The kinds of cue found in a name's tokens (each at most once).
    pub fn kinds(&self, toks: &[String]) -> Vec<CueKind> {
        let mut out = Vec::new();
        for h in self.index.find_tokens(toks) {
            for &k in h.values {
                if !out.contains(&k) {
                    out.push(k);
                }
            }
        }
        out
    }

    /// Is this token a word that puts the next place as where a diaspora lives ("in",
    /// "en", "в")?
    pub fn is_home_marker(&self, token: &str) -> bool {
        self.home_markers.contains(token)
    }

    /// The role of each of an item's places, given where each starts among the tokens
    /// (`starts`, in reading order) and the cue kinds of the item. Diaspora wins over
    /// travel, travel over local life (see the file's header).
    pub fn roles(&self, toks: &[String], starts: &[usize], kinds: &[CueKind]) -> Vec<PlaceRole> {
        if kinds.contains(&CueKind::Diaspora) {
            let marked: Vec<bool> = starts
                .iter()
                .map(|&s| s > 0 && toks.get(s - 1).is_some_and(|t| self.is_home_marker(t)))
                .collect();
            let any_marked = marked.iter().any(|&m| m);
            let n = starts.len();
            return (0..n)
                .map(|i| {
                    let home = if any_marked {
                        marked[i]
                    } else {
                        n >= 2 && i + 1 == n
                    };
                    if home {
                        PlaceRole::DiasporaHome
                    } else {
                        PlaceRole::DiasporaOrigin
                    }
                })
                .collect();
        }
        let role = if kinds.contains(&CueKind::Travel) {
            PlaceRole::Travel
        } else if kinds.contains(&CueKind::Local) {
            PlaceRole::Local
        } else {
            PlaceRole::Plain
        };
        vec![role; starts.len()]
    }

    /// The share `s` of items that name the member's home, for a place's role.
    pub fn strength(&self, role: PlaceRole) -> f64 {
        let s = &self.strengths;
        match role {
            PlaceRole::Plain => s.plain,
            PlaceRole::Local => s.local,
            PlaceRole::Travel => s.travel,
            PlaceRole::DiasporaHome => s.diaspora_home,
            PlaceRole::DiasporaOrigin => s.diaspora_origin,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::tokens;

    const BUNDLED: &str = include_str!("../../reference-priors/lexicons/place-cues.toml");

    fn roles(c: &PlaceCues, name: &str, places: &[&str]) -> Vec<PlaceRole> {
        let toks = tokens(name);
        let starts: Vec<usize> = places
            .iter()
            .map(|p| toks.iter().position(|t| t == p).unwrap())
            .collect();
        c.roles(&toks, &starts, &c.kinds(&toks))
    }

    #[test]
    fn the_bundled_cues_cover_twenty_languages_and_read_each_kind() {
        let c = PlaceCues::parse(BUNDLED, "place-cues.toml").unwrap();
        assert!(c.languages.len() >= 20, "{:?}", c.languages);
        use PlaceRole::*;
        assert_eq!(roles(&c, "Lagos Farmers Market", &["lagos"]), vec![Local]);
        assert_eq!(roles(&c, "Trip to Izmir", &["izmir"]), vec![Travel]);
        assert_eq!(roles(&c, "Bogotá travel tips", &["bogota"]), vec![Travel]);
        assert_eq!(roles(&c, "Izmir Chess", &["izmir"]), vec![Plain]);
        // "X people in Y": home Y, origin X.
        assert_eq!(
            roles(&c, "Ghana people in Lagos", &["ghana", "lagos"]),
            vec![DiasporaOrigin, DiasporaHome]
        );
        assert_eq!(
            roles(&c, "Diáspora colombiana en Madrid", &["madrid"]),
            vec![DiasporaHome]
        );
        assert_eq!(
            roles(&c, "Diaspora of Turkey", &["turkey"]),
            vec![DiasporaOrigin]
        );
        assert_eq!(roles(&c, "Wochenmarkt Leipzig", &["leipzig"]), vec![Local]);
        assert_eq!(roles(&c, "Поездка в Казань", &["казань"]), vec![Travel]);
        assert!(c.strength(Local) > c.strength(Plain) && c.strength(Plain) > c.strength(Travel));
    }

    #[test]
    fn bad_strengths_and_markers_are_named() {
        let text = "format = 1\n[strength]\nplain = 0.25\nlocal = 1.5\ntravel = 0.1\n\
                    diaspora_home = 0.5\ndiaspora_origin = 0.1\n\
                    [[language]]\ncode = \"xx\"\nhome_marker = [\"in der\"]\n";
        let e = PlaceCues::parse(text, "cues.toml").unwrap_err().to_string();
        assert!(
            e.contains("cues.toml") && e.contains("strength.local"),
            "{e}"
        );
        assert!(e.contains("'in der' must be one word"), "{e}");
    }
}
