//! The special categories of personal data of GDPR Article 9(1) that an item's name
//! can fall into. (Genetic and biometric data, also listed there, do not show in the
//! names of pages and groups.)

use std::fmt;

use serde::Serialize;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum SpecialCategory {
    RacialEthnic,
    Political,
    Religious,
    TradeUnion,
    Health,
    SexLife,
}

impl SpecialCategory {
    pub const ALL: [SpecialCategory; 6] = [
        SpecialCategory::RacialEthnic,
        SpecialCategory::Political,
        SpecialCategory::Religious,
        SpecialCategory::TradeUnion,
        SpecialCategory::Health,
        SpecialCategory::SexLife,
    ];

    /// Short id, as written in the vocabulary file.
    pub fn id(self) -> &'static str {
        match self {
            SpecialCategory::RacialEthnic => "racial-ethnic",
            SpecialCategory::Political => "political",
            SpecialCategory::Religious => "religious",
            SpecialCategory::TradeUnion => "trade-union",
            SpecialCategory::Health => "health",
            SpecialCategory::SexLife => "sex-life",
        }
    }

    /// The category in the words of Article 9(1).
    pub fn label(self) -> &'static str {
        match self {
            SpecialCategory::RacialEthnic => "racial or ethnic origin",
            SpecialCategory::Political => "political opinions",
            SpecialCategory::Religious => "religious or philosophical beliefs",
            SpecialCategory::TradeUnion => "trade union membership",
            SpecialCategory::Health => "health",
            SpecialCategory::SexLife => "sex life or sexual orientation",
        }
    }

    pub fn parse(s: &str) -> Option<SpecialCategory> {
        let s = s.trim();
        SpecialCategory::ALL
            .into_iter()
            .find(|c| c.id().eq_ignore_ascii_case(s) || c.label().eq_ignore_ascii_case(s))
    }
}

impl fmt::Display for SpecialCategory {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.label())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ids_and_labels_parse() {
        for c in SpecialCategory::ALL {
            assert_eq!(SpecialCategory::parse(c.id()), Some(c));
            assert_eq!(SpecialCategory::parse(c.label()), Some(c));
        }
        // The wording the priors files use for their attributes.
        assert_eq!(
            SpecialCategory::parse("political opinions"),
            Some(SpecialCategory::Political)
        );
        assert_eq!(SpecialCategory::parse("opinions"), None);
    }
}
