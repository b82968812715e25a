//! The lexicons compiled into telltale (reference-priors/lexicons/), parsed on first
//! use and shared until [`release`] lets them go (a one-archive command does once its
//! evidence is gathered: the parsed gazetteer is several megabytes).

use std::sync::{Arc, Mutex, PoisonError};

use super::gazetteer::Gazetteer;
use super::life_stages::LifeStages;
use super::place_cues::PlaceCues;
use super::record_kinds::RecordKinds;
use super::vocabulary::Vocabulary;

pub const GAZETTEER_TSV: &str = include_str!("../../reference-priors/lexicons/gazetteer.tsv");
/// The gazetteer's name keys, worked out by build.rs (one line per line of the file);
/// the tests check them, and the tables below, against the run-time name key.
#[cfg(test)]
pub const GAZETTEER_KEYS: &str = include_str!(concat!(env!("OUT_DIR"), "/gazetteer-keys.txt"));
/// The gazetteer's names as a phrase-key table, laid out by build.rs.
pub static GAZETTEER_NAMES: &[u8] =
    include_bytes!(concat!(env!("OUT_DIR"), "/gazetteer-names.bin"));
/// The gazetteer's towns, laid out by build.rs.
pub static GAZETTEER_TOWNS: &[u8] =
    include_bytes!(concat!(env!("OUT_DIR"), "/gazetteer-towns.bin"));
pub const COMMON_WORDS_TXT: &str = include_str!("../../reference-priors/lexicons/common-words.txt");
pub const LIFE_STAGES_TOML: &str = include_str!("../../reference-priors/lexicons/life-stages.toml");
pub const VOCABULARY_TOML: &str = include_str!("../../reference-priors/lexicons/vocabulary.toml");
pub const PLACE_CUES_TOML: &str = include_str!("../../reference-priors/lexicons/place-cues.toml");
pub const RECORD_KINDS_TOML: &str =
    include_str!("../../reference-priors/lexicons/record-kinds.toml");

/// One parsed lexicon, shared while anyone holds it or until [`release`].
struct Shared<T>(Mutex<Option<Arc<T>>>);

impl<T> Shared<T> {
    const fn new() -> Self {
        Shared(Mutex::new(None))
    }

    /// The shared copy, parsed by `make` if there is none (callers wait for one parse).
    fn get_or(&self, make: impl FnOnce() -> T) -> Arc<T> {
        let mut cell = self.0.lock().unwrap_or_else(PoisonError::into_inner);
        cell.get_or_insert_with(|| Arc::new(make())).clone()
    }

    fn release(&self) {
        self.0.lock().unwrap_or_else(PoisonError::into_inner).take();
    }
}

static GAZETTEER: Shared<Gazetteer> = Shared::new();
static LIFE_STAGES: Shared<LifeStages> = Shared::new();
static VOCABULARY: Shared<Vocabulary> = Shared::new();
static PLACE_CUES: Shared<PlaceCues> = Shared::new();
static RECORD_KINDS: Shared<RecordKinds> = Shared::new();

/// Let go of the shared parsed lexicons. Whoever still holds one keeps it; the next
/// use parses again. For a command that reads one archive, once its evidence is
/// gathered.
pub fn release() {
    GAZETTEER.release();
    LIFE_STAGES.release();
    VOCABULARY.release();
    PLACE_CUES.release();
    RECORD_KINDS.release();
}

/// The bundled gazetteer (GeoNames, CC BY 4.0).
pub fn gazetteer() -> Arc<Gazetteer> {
    GAZETTEER.get_or(|| {
        // The tables build.rs laid out are read in place; the tests below check them
        // against parsing the text, which is the fallback should they not fit.
        Gazetteer::from_tables(
            GAZETTEER_TSV,
            GAZETTEER_NAMES,
            GAZETTEER_TOWNS,
            COMMON_WORDS_TXT,
            "gazetteer.tsv (bundled)",
        )
        .unwrap_or_else(|| {
            // The bundled file is checked by the tests below; it cannot fail at run time.
            // (Folding the names here is slow, but only a broken build gets here.)
            Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "gazetteer.tsv (bundled)")
                .expect("the bundled gazetteer parses")
        })
    })
}

/// The bundled life-stage rules.
pub fn life_stages() -> Arc<LifeStages> {
    LIFE_STAGES.get_or(|| {
        LifeStages::parse(LIFE_STAGES_TOML, "life-stages.toml (bundled)")
            .expect("the bundled life-stage rules parse")
    })
}

/// The bundled belief and special-category vocabulary.
pub fn vocabulary() -> Arc<Vocabulary> {
    VOCABULARY.get_or(|| {
        Vocabulary::parse(VOCABULARY_TOML, "vocabulary.toml (bundled)")
            .expect("the bundled vocabulary parses")
    })
}

/// The bundled place cues (local life, travel, diaspora).
pub fn place_cues() -> Arc<PlaceCues> {
    PLACE_CUES.get_or(|| {
        PlaceCues::parse(PLACE_CUES_TOML, "place-cues.toml (bundled)")
            .expect("the bundled place cues parse")
    })
}

/// The bundled words for record kinds (the mapping drafter's).
pub fn record_kinds() -> Arc<RecordKinds> {
    RECORD_KINDS.get_or(|| {
        RecordKinds::parse(RECORD_KINDS_TOML, "record-kinds.toml (bundled)")
            .expect("the bundled record-kind words parse")
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// After `release`, the next use parses the bundled file again (a new copy with
    /// the same content), while a copy someone still holds stays whole.
    #[test]
    fn release_lets_go_and_the_next_use_parses_again() {
        let held = life_stages();
        assert!(
            Arc::ptr_eq(&held, &life_stages()),
            "shared while not released"
        );
        release();
        let again = life_stages();
        assert!(!Arc::ptr_eq(&held, &again), "parsed anew after release");
        assert!(held.rules == again.rules, "the same rules");
    }

    #[test]
    fn bundled_files_parse() {
        Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "g").unwrap();
        LifeStages::parse(LIFE_STAGES_TOML, "l").unwrap();
        Vocabulary::parse(VOCABULARY_TOML, "v").unwrap();
        PlaceCues::parse(PLACE_CUES_TOML, "p").unwrap();
        RecordKinds::parse(RECORD_KINDS_TOML, "k").unwrap();
    }

    /// The keys build.rs worked out are the ones the library's own name key gives,
    /// line by line and name by name, so the bundled gazetteer indexes exactly what
    /// parsing it here would.
    #[test]
    fn build_time_keys_are_the_name_keys() {
        let mut keys = GAZETTEER_KEYS.lines();
        let mut names_checked = 0;
        for line in GAZETTEER_TSV.lines() {
            let line_keys = keys.next().expect("a keys line for every gazetteer line");
            let fields: Vec<&str> = line.split('\t').collect();
            let names: Vec<&str> = match fields.as_slice() {
                ["C" | "R", _, _, names] | ["P", _, _, _, names] => names.split('|').collect(),
                _ => Vec::new(),
            };
            let expected: Vec<String> = names.iter().map(|n| crate::text::name_key(n)).collect();
            assert_eq!(line_keys, expected.join("|"), "{line}");
            names_checked += names.len();
        }
        assert!(keys.next().is_none());
        assert!(names_checked > 200_000, "{names_checked}");
        let keyed =
            Gazetteer::parse_keyed(GAZETTEER_TSV, GAZETTEER_KEYS, COMMON_WORDS_TXT, "g").unwrap();
        let folded = Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "g").unwrap();
        assert_eq!(keyed.names(), folded.names());
        for text in [
            "Friends of Portland, Oregon",
            "東京 cafe",
            "São Paulo runners",
        ] {
            assert_eq!(keyed.find_in(text), folded.find_in(text), "{text}");
        }
    }

    /// The tables build.rs laid out, read in place, hold what parsing the text gives:
    /// the same countries, regions, region codes and towns, and every name of every
    /// line finds the same places.
    #[test]
    fn build_time_tables_are_the_parsed_file() {
        let tables = Gazetteer::from_tables(
            GAZETTEER_TSV,
            GAZETTEER_NAMES,
            GAZETTEER_TOWNS,
            COMMON_WORDS_TXT,
            "g",
        )
        .expect("the laid-out tables fit the text");
        let parsed = Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "g").unwrap();
        assert_eq!(tables.countries, parsed.countries);
        assert_eq!(tables.regions, parsed.regions);
        assert_eq!(tables.region_codes, parsed.region_codes);
        assert_eq!(tables.city_count(), parsed.city_count());
        assert!(tables.city_count() > 100_000);
        for i in 0..tables.city_count() as u32 {
            assert_eq!(tables.city(i), parsed.city(i), "town {i}");
        }
        assert_eq!(tables.names(), parsed.names());
        let mut looked_up = 0;
        for line in GAZETTEER_TSV.lines().filter(|l| !l.starts_with('#')) {
            for name in line.rsplit('\t').next().unwrap_or("").split('|') {
                assert_eq!(tables.lookup(name), parsed.lookup(name), "{name}");
                looked_up += 1;
            }
        }
        assert!(looked_up > 200_000, "{looked_up}");
        for text in [
            "Friends of Portland, Oregon",
            "東京ラーメン部 and 大阪 walkers",
            "Lagos Island market women",
            "Bürgerverein Köln-Ehrenfeld",
            "نادي القاهرة للجري",
            "ชมรมวิ่งเชียงใหม่",
        ] {
            assert_eq!(tables.find_in(text), parsed.find_in(text), "{text}");
        }
    }
}
