//! The lexicons compiled into telltale (reference-priors/lexicons/), parsed once on
//! first use and shared.

use std::sync::{Arc, OnceLock};

use super::gazetteer::Gazetteer;
use super::life_stages::LifeStages;
use super::vocabulary::Vocabulary;

pub const GAZETTEER_TSV: &str = include_str!("../../reference-priors/lexicons/gazetteer.tsv");
pub const COMMON_WORDS_TXT: &str = include_str!("../../reference-priors/lexicons/common-words.txt");
pub const LIFE_STAGES_TOML: &str = include_str!("../../reference-priors/lexicons/life-stages.toml");
pub const VOCABULARY_TOML: &str = include_str!("../../reference-priors/lexicons/vocabulary.toml");

/// The bundled gazetteer (GeoNames, CC BY 4.0).
pub fn gazetteer() -> Arc<Gazetteer> {
    static CELL: OnceLock<Arc<Gazetteer>> = OnceLock::new();
    CELL.get_or_init(|| {
        // The bundled file is checked by the tests below; it cannot fail at run time.
        Arc::new(
            Gazetteer::parse(GAZETTEER_TSV, COMMON_WORDS_TXT, "gazetteer.tsv (bundled)")
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
}
