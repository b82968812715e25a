//! The lexicons compiled into telltale (reference-priors/lexicons/), parsed once on
//! first use and shared.

use std::sync::{Arc, OnceLock};

use super::gazetteer::Gazetteer;
use super::life_stages::LifeStages;
use super::vocabulary::Vocabulary;

pub const GAZETTEER_TSV: &str = include_str!("../../reference-priors/lexicons/gazetteer.tsv");
/// The gazetteer's name keys, worked out by build.rs (one line per line of the file).
pub const GAZETTEER_KEYS: &str = include_str!(concat!(env!("OUT_DIR"), "/gazetteer-keys.txt"));
pub const COMMON_WORDS_TXT: &str = include_str!("../../reference-priors/lexicons/common-words.txt");
pub const LIFE_STAGES_TOML: &str = include_str!("../../reference-priors/lexicons/life-stages.toml");
pub const VOCABULARY_TOML: &str = include_str!("../../reference-priors/lexicons/vocabulary.toml");

/// The bundled gazetteer (GeoNames, CC BY 4.0).
pub fn gazetteer() -> Arc<Gazetteer> {
    static CELL: OnceLock<Arc<Gazetteer>> = OnceLock::new();
    CELL.get_or_init(|| {
        // The bundled file is checked by the tests below; it cannot fail at run time.
        Arc::new(
            Gazetteer::parse_keyed(
                GAZETTEER_TSV,
                GAZETTEER_KEYS,
                COMMON_WORDS_TXT,
                "gazetteer.tsv (bundled)",
            )
            .expect("the bundled gazetteer parses"),
        )
    })
    .clone()
}

/// The bundled life-stage rules.
pub fn life_stages() -> Arc<LifeStages> {
    static CELL: OnceLock<Arc<LifeStages>> = OnceLock::new();
    CELL.get_or_init(|| {
        Arc::new(
            LifeStages::parse(LIFE_STAGES_TOML, "life-stages.toml (bundled)")
                .expect("the bundled life-stage rules parse"),
        )
    })
    .clone()
}

/// The bundled belief and special-category vocabulary.
pub fn vocabulary() -> Arc<Vocabulary> {
    static CELL: OnceLock<Arc<Vocabulary>> = OnceLock::new();
    CELL.get_or_init(|| {
        Arc::new(
            Vocabulary::parse(VOCABULARY_TOML, "vocabulary.toml (bundled)")
                .expect("the bundled vocabulary parses"),
        )
    })
    .clone()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bundled_files_parse() {
        Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "g").unwrap();
        LifeStages::parse(LIFE_STAGES_TOML, "l").unwrap();
        Vocabulary::parse(VOCABULARY_TOML, "v").unwrap();
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
                ["C" | "R", _, _, name] => vec![name],
                ["P", _, _, _, names] => names.split('|').collect(),
                _ => Vec::new(),
            };
            let expected: Vec<String> = names.iter().map(|n| crate::text::name_key(n)).collect();
            assert_eq!(line_keys, expected.join("|"), "{line}");
            names_checked += names.len();
        }
        assert!(keys.next().is_none());
        assert!(names_checked > 80_000, "{names_checked}");
        let keyed = gazetteer();
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
}
