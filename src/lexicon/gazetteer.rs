//! The gazetteer: countries (ISO 3166-1 alpha-2), their first-level regions and towns
//! of about 1,000 people or more or seats of a division, with populations and names in many languages and
//! scripts (GeoNames, CC BY 4.0; ISO 3166-2 through pycountry; CLDR through babel);
//! `scripts/build_gazetteer.py` writes the file and reference-priors/lexicons/README.md
//! describes it. Names are indexed by their name key so that item names can be
//! searched for every place they mention, in any script the file carries.
//!
//! Region codes are ISO 3166-2 (`US-OR`, `DE-BY`) where GeoNames' first-level division
//! maps to one; otherwise GeoNames' own first-level code written `CC.code` (`DE.06`),
//! which is not an ISO code, so only its country part is matched against ISO codes.
//! [`Gazetteer::is_iso_region`] tells them apart.

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

/// A first-level region with a name (for every country: ISO 3166-2 subdivisions, or
/// GeoNames' first-level divisions where no ISO code maps).
#[derive(Debug, Clone, PartialEq)]
pub struct Region {
    /// ISO 3166-2 (`DE-BY`), or GeoNames' `CC.code` where none maps.
    pub code: String,
    /// The English name where there is one.
    pub name: String,
    /// Sum of the populations of the region's towns in the gazetteer (towns of about
    /// 1,000 or more, so it leaves out most rural people).
    pub population: u64,
    /// Index into the countries.
    pub country: u32,
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

/// A town as the gazetteer holds it, borrowed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CityRef<'a> {
    /// Index into the countries.
    pub country: u32,
    /// Index into the region codes (and into `regions` when below its length).
    pub region: Option<u32>,
    pub population: u64,
    /// The GeoNames main name.
    pub name: &'a str,
}

/// The towns of the bundled file as build.rs lays them out (`gazetteer-towns.bin`):
/// five little-endian u32 per town (country, region or u32::MAX, population, main
/// name's byte offset and length in the gazetteer text), checked when loaded.
#[derive(Debug, Clone, Copy)]
struct TownImage {
    text: &'static str,
    records: &'static [u8],
    count: usize,
}

const TOWN_WORDS: usize = 5;

fn word(bytes: &[u8], i: usize) -> Option<u32> {
    let b = bytes.get(4 * i..4 * i + 4)?;
    Some(u32::from_le_bytes([b[0], b[1], b[2], b[3]]))
}

impl TownImage {
    fn get(&self, i: usize) -> Option<CityRef<'static>> {
        if i >= self.count {
            return None;
        }
        let w = |k: usize| word(self.records, TOWN_WORDS * i + k).unwrap_or(0);
        let (at, len) = (w(3) as usize, w(4) as usize);
        Some(CityRef {
            country: w(0),
            region: (w(1) != u32::MAX).then_some(w(1)),
            population: u64::from(w(2)),
            name: self.text.get(at..at + len).unwrap_or(""),
        })
    }
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
    /// Countries and regions by upper-case code.
    country_by_code: foldhash::HashMap<String, u32>,
    region_by_code: foldhash::HashMap<String, u32>,
    pub countries: Vec<Country>,
    pub regions: Vec<Region>,
    /// Every region code seen (named regions first, in the same order as `regions`).
    pub region_codes: Vec<String>,
    /// The towns, when parsed from text ([`Gazetteer::city`] reads either kind).
    cities: Vec<City>,
    /// The towns laid out at build time (the bundled file), read in place.
    town_image: Option<TownImage>,
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
        Gazetteer::parse_lines(text, keys, common_words, origin, true)
    }

    /// The bundled file with the tables build.rs laid out: `names`, the phrase-key
    /// table of every name (src/lexicon/key_image.rs), and `towns`, the towns (see
    /// build.rs). Only the countries and regions are parsed from the text; the towns
    /// and names are read in place. `None` when a table does not fit the text (the
    /// caller parses the text instead).
    pub fn from_tables(
        text: &'static str,
        names: &'static [u8],
        towns: &'static [u8],
        common_words: &str,
        origin: &str,
    ) -> Option<Gazetteer> {
        let mut g = Gazetteer::parse_lines(text, "", common_words, origin, false).ok()?;
        let count = word(towns, 0)? as usize;
        let extra = word(towns, 1)? as usize;
        let records_at = 4 * (2 + 2 * extra);
        if towns.len() != records_at + 4 * TOWN_WORDS * count {
            return None;
        }
        for k in 0..extra {
            let (at, len) = (
                word(towns, 2 + 2 * k)? as usize,
                word(towns, 3 + 2 * k)? as usize,
            );
            g.region_codes.push(text.get(at..at + len)?.to_string());
        }
        let image = TownImage {
            text,
            records: &towns[records_at..],
            count,
        };
        for i in 0..count {
            let t = image.get(i)?;
            let (at, len) = (
                word(image.records, TOWN_WORDS * i + 3)? as usize,
                word(image.records, TOWN_WORDS * i + 4)? as usize,
            );
            if (t.country as usize) >= g.countries.len()
                || t.region.is_some_and(|r| r as usize >= g.region_codes.len())
                || text.get(at..at + len).is_none()
            {
                return None;
            }
        }
        let (nc, nr) = (g.countries.len() as u32, g.regions.len() as u32);
        g.index = PhraseIndex::from_image(names, |v| {
            let (kind, i) = (v >> 30, v & ((1 << 30) - 1));
            match kind {
                0 if i < nc => Some(PlaceRef::Country(i)),
                1 if i < nr => Some(PlaceRef::Region(i)),
                2 if (i as usize) < count => Some(PlaceRef::City(i)),
                _ => None,
            }
        })?;
        g.town_image = Some(image);
        Some(g)
    }

    /// Parse the lines; the towns too when `towns` (else stop at the first town).
    fn parse_lines(
        text: &str,
        keys: &str,
        common_words: &str,
        origin: &str,
        towns: bool,
    ) -> Result<Gazetteer> {
        let mut g = Gazetteer::default();
        let mut key_lines = keys.lines();
        let mut region_index = std::collections::HashMap::new();
        let mut country_index = std::collections::HashMap::new();
        let mut seen_town = false;
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
                ["C", code, pop, names] => {
                    let i = g.countries.len() as u32;
                    country_index.insert(code.to_string(), i);
                    let all: Vec<&str> = names.split('|').collect();
                    g.countries.push(Country {
                        code: code.to_string(),
                        name: all[0].to_string(),
                        population: population(pop)?,
                    });
                    g.add_names(&all, line_keys, PlaceRef::Country(i));
                }
                ["R", code, pop, names] => {
                    let country = code.split(['-', '.']).next().unwrap_or("");
                    let Some(&c) = country_index.get(country) else {
                        return Err(bad(line_no, format!("region '{code}': unknown country")));
                    };
                    if seen_town {
                        return Err(bad(
                            line_no,
                            "region lines (R) come before the towns (P)".into(),
                        ));
                    }
                    if region_index.contains_key(*code) {
                        return Err(bad(line_no, format!("region '{code}' listed twice")));
                    }
                    let i = g.regions.len() as u32;
                    region_index.insert(code.to_string(), i);
                    g.region_codes.push(code.to_string());
                    let all: Vec<&str> = names.split('|').collect();
                    g.regions.push(Region {
                        code: code.to_string(),
                        name: all[0].to_string(),
                        population: population(pop)?,
                        country: c,
                    });
                    g.add_names(&all, line_keys, PlaceRef::Region(i));
                }
                ["P", ..] if !towns => break,
                ["P", country, region, pop, names] => {
                    seen_town = true;
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
        g.country_by_code = country_index
            .into_iter()
            .map(|(code, i)| (code.to_ascii_uppercase(), i))
            .collect();
        g.region_by_code = g
            .regions
            .iter()
            .enumerate()
            .map(|(i, r)| (r.code.to_ascii_uppercase(), i as u32))
            .collect();
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
                    country: &self.countries[r.country as usize].code,
                    region: Some(&r.code),
                    population: r.population,
                }
            }
            PlaceRef::City(i) => {
                let c = self.city(i).unwrap_or(CityRef {
                    country: 0,
                    region: None,
                    population: 0,
                    name: "",
                });
                Candidate {
                    place,
                    name: c.name,
                    country: &self.countries[c.country as usize].code,
                    region: c.region.map(|r| self.region_codes[r as usize].as_str()),
                    population: c.population,
                }
            }
        }
    }

    /// A country by ISO 3166-1 alpha-2 code.
    pub fn country(&self, code: &str) -> Option<&Country> {
        self.country_index(code)
            .map(|i| &self.countries[i as usize])
    }

    /// The index of a country (into `countries`) by ISO 3166-1 alpha-2 code.
    pub fn country_index(&self, code: &str) -> Option<u32> {
        self.country_by_code
            .get(code.to_ascii_uppercase().as_str())
            .copied()
    }

    /// A named region by code: ISO 3166-2 (`DE-BY`), or GeoNames' `CC.code` for a
    /// division no ISO code maps to.
    pub fn region(&self, code: &str) -> Option<&Region> {
        self.region_index(code).map(|i| &self.regions[i as usize])
    }

    /// The index of a named region (into `regions`) by code.
    pub fn region_index(&self, code: &str) -> Option<u32> {
        self.region_by_code
            .get(code.to_ascii_uppercase().as_str())
            .copied()
    }

    /// Is this region code an ISO 3166-2 code (`CC-…`), rather than GeoNames' own
    /// first-level code (`CC.…`)?
    pub fn is_iso_region(code: &str) -> bool {
        code.as_bytes().get(2) == Some(&b'-')
    }

    /// The named regions of a country (ISO 3166-1 alpha-2), in the file's order (by
    /// code).
    pub fn regions_of<'a>(&'a self, country: &str) -> impl Iterator<Item = &'a Region> + 'a {
        let c = self.country_index(country);
        self.regions.iter().filter(move |r| Some(r.country) == c)
    }

    /// Number of towns.
    pub fn city_count(&self) -> usize {
        match &self.town_image {
            Some(image) => image.count,
            None => self.cities.len(),
        }
    }

    /// Town number `i` (as in [`PlaceRef::City`]).
    pub fn city(&self, i: u32) -> Option<CityRef<'_>> {
        match &self.town_image {
            Some(image) => image.get(i as usize),
            None => self.cities.get(i as usize).map(|c| CityRef {
                country: c.country,
                region: c.region,
                population: c.population,
                name: &c.name,
            }),
        }
    }

    /// The named region a town lies in, when GeoNames gives one and the gazetteer
    /// names it.
    pub fn region_of_city(&self, city: u32) -> Option<&Region> {
        let r = self.city(city)?.region? as usize;
        self.regions.get(r)
    }

    /// The country of a place.
    pub fn country_of(&self, place: PlaceRef) -> &Country {
        let i = match place {
            PlaceRef::Country(i) => i,
            PlaceRef::Region(i) => self.regions[i as usize].country,
            PlaceRef::City(i) => self.city(i).map_or(0, |c| c.country),
        };
        &self.countries[i as usize]
    }

    /// The population of a place: GeoNames' figure for a country or a town, the sum
    /// of its towns for a region.
    pub fn population(&self, place: PlaceRef) -> u64 {
        match place {
            PlaceRef::Country(i) => self.countries[i as usize].population,
            PlaceRef::Region(i) => self.regions[i as usize].population,
            PlaceRef::City(i) => self.city(i).map_or(0, |c| c.population),
        }
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
