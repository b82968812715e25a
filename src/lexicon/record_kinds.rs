//! Record kinds: generic words, in many languages and scripts, that say what a set of
//! records in an archive is (likes, groups, follows, events, friends, the person's own
//! profile), for the mapping drafter. The file is TOML
//! (reference-priors/lexicons/record-kinds.toml, format in its header); every list is
//! from memory.

use serde::Deserialize;

use super::error::{Result, checked, format_problems, parse_toml};
use crate::text::name_key;

/// The file format version this build reads.
pub const FORMAT: i64 = 1;

/// What a set of records is, as the words say.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum RecordKind {
    Like,
    Group,
    Follow,
    Event,
    Friend,
    Profile,
}

impl RecordKind {
    pub const ALL: [RecordKind; 6] = [
        RecordKind::Like,
        RecordKind::Group,
        RecordKind::Follow,
        RecordKind::Event,
        RecordKind::Friend,
        RecordKind::Profile,
    ];
}

/// One word of a list, folded as name keys are.
#[derive(Debug, Clone, PartialEq, Eq)]
struct Stem {
    /// The folded words (one, or several to be found in a row).
    words: Vec<String>,
    /// Matches anywhere inside a word, not only at its start.
    anywhere: bool,
    /// Counts only in a record's own kind value (`"kind": "page"`), not in file or
    /// field names, where the word means something else ("page_2.json").
    value_only: bool,
}

impl Stem {
    fn parse(raw: &str) -> Option<Stem> {
        let (value_only, raw) = match raw.strip_prefix('=') {
            Some(r) => (true, r),
            None => (false, raw),
        };
        let (anywhere, rest) = match raw.strip_prefix('*') {
            Some(r) => (true, r),
            None => (false, raw),
        };
        let words: Vec<String> = name_key(rest)
            .split(' ')
            .filter(|w| !w.is_empty())
            .map(str::to_string)
            .collect();
        if words.is_empty() {
            return None;
        }
        // Words outside ASCII match anywhere: prefixes are common there
        // (по-нрав-илось), and scripts written without spaces run words together.
        let anywhere = anywhere || words.iter().any(|w| !w.is_ascii());
        Some(Stem {
            words,
            anywhere,
            value_only,
        })
    }

    /// Does one word match one of the stem's words?
    fn word_matches(&self, stem: &str, word: &str) -> bool {
        if self.anywhere {
            word.contains(stem)
        } else {
            word.starts_with(stem)
        }
    }

    /// Do the stem's words appear in a row in `words` (each word folded)?
    fn matches(&self, words: &[String]) -> bool {
        let n = self.words.len();
        if n == 1 {
            return words.iter().any(|w| self.word_matches(&self.words[0], w));
        }
        words.windows(n).any(|run| {
            // Inner words of a phrase must be whole; the first and last may be
            // longer (a prefix match at the end: "member of" in "members of").
            run.iter().zip(&self.words).enumerate().all(|(i, (w, s))| {
                if i == n - 1 {
                    self.word_matches(s, w)
                } else {
                    w == s
                }
            })
        })
    }
}

/// The parsed lists.
#[derive(Debug, Clone)]
pub struct RecordKinds {
    /// Languages covered (their codes, in file order).
    pub languages: Vec<String>,
    kinds: Vec<(RecordKind, Vec<Stem>)>,
    not_follow: Vec<Stem>,
    type_fields: Vec<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    format: i64,
    #[serde(default)]
    language: Vec<RawLanguage>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLanguage {
    code: String,
    #[serde(default)]
    like: Vec<String>,
    #[serde(default)]
    group: Vec<String>,
    #[serde(default)]
    follow: Vec<String>,
    #[serde(default)]
    event: Vec<String>,
    #[serde(default)]
    friend: Vec<String>,
    #[serde(default)]
    profile: Vec<String>,
    #[serde(default)]
    not_follow: Vec<String>,
    #[serde(default)]
    type_field: Vec<String>,
}

impl RecordKinds {
    pub fn parse(text: &str, origin: &str) -> Result<RecordKinds> {
        let raw: RawFile = parse_toml(text, origin)?;
        let mut problems = format_problems(raw.format, FORMAT);
        let mut out = RecordKinds {
            languages: Vec::new(),
            kinds: RecordKind::ALL.iter().map(|&k| (k, Vec::new())).collect(),
            not_follow: Vec::new(),
            type_fields: Vec::new(),
        };
        for lang in raw.language {
            let lists = [
                (RecordKind::Like, "like", &lang.like),
                (RecordKind::Group, "group", &lang.group),
                (RecordKind::Follow, "follow", &lang.follow),
                (RecordKind::Event, "event", &lang.event),
                (RecordKind::Friend, "friend", &lang.friend),
                (RecordKind::Profile, "profile", &lang.profile),
            ];
            for (kind, list, words) in lists {
                let at = RecordKind::ALL.iter().position(|&k| k == kind).unwrap_or(0);
                add_stems(&lang.code, list, words, &mut out.kinds[at].1, &mut problems);
            }
            add_stems(
                &lang.code,
                "not_follow",
                &lang.not_follow,
                &mut out.not_follow,
                &mut problems,
            );
            for f in &lang.type_field {
                let key = name_key(f);
                if key.is_empty() {
                    problems.push(format!(
                        "language '{}': type_field '{f}' is empty",
                        lang.code
                    ));
                } else if !out.type_fields.contains(&key) {
                    out.type_fields.push(key);
                }
            }
            if out.languages.contains(&lang.code) {
                problems.push(format!("language '{}' is listed twice", lang.code));
            }
            out.languages.push(lang.code);
        }
        checked(out, problems, origin)
    }

    /// The kinds whose words appear in `words` (the folded words of one name, in
    /// order), with the first word that matched each. Words naming followers are
    /// skipped. `value` says the words are a record's own kind value, where the
    /// value-only words count too.
    pub fn kinds_in(&self, words: &[String], value: bool) -> Vec<(RecordKind, String)> {
        let kept: Vec<String> = words
            .iter()
            .filter(|w| !self.names_followers(w))
            .cloned()
            .collect();
        // A phrase naming followers ("nguoi theo doi") hides its words too.
        let phrase_followers = self
            .not_follow
            .iter()
            .any(|s| s.words.len() > 1 && s.matches(words));
        let mut out = Vec::new();
        for (kind, stems) in &self.kinds {
            if phrase_followers && *kind == RecordKind::Follow {
                continue;
            }
            if let Some(s) = stems
                .iter()
                .find(|s| (value || !s.value_only) && s.matches(&kept))
            {
                let word = kept
                    .iter()
                    .find(|w| s.words.iter().any(|x| s.word_matches(x, w)))
                    .cloned()
                    .unwrap_or_else(|| s.words.join(" "));
                out.push((*kind, word));
            }
        }
        out
    }

    /// Is this one folded word a word for the person's followers?
    fn names_followers(&self, word: &str) -> bool {
        self.not_follow
            .iter()
            .any(|s| s.words.len() == 1 && s.word_matches(&s.words[0], word))
    }

    /// Is this field name (folded words of its last key) a word for "the kind of this
    /// record" (a whole word: "type", not "typeface")?
    pub fn is_type_field(&self, words: &[String]) -> bool {
        let joined = words.join(" ");
        self.type_fields.contains(&joined) || words.iter().any(|w| self.type_fields.contains(w))
    }
}

/// Parse one list's words into `into` (each once), naming empty ones in `problems`.
fn add_stems(
    lang: &str,
    list: &str,
    words: &[String],
    into: &mut Vec<Stem>,
    problems: &mut Vec<String>,
) {
    for w in words {
        match Stem::parse(w) {
            Some(s) if !into.contains(&s) => into.push(s),
            Some(_) => {}
            None => problems.push(format!("language '{lang}': {list} word '{w}' is empty")),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::lexicon::bundled::{LIFE_STAGES_TOML, PLACE_CUES_TOML, RECORD_KINDS_TOML};
    use crate::lexicon::tokens;

    fn kinds(r: &RecordKinds, text: &str) -> Vec<RecordKind> {
        r.kinds_in(&tokens(text), false)
            .into_iter()
            .map(|(k, _)| k)
            .collect()
    }

    /// The drafter's words cover the same languages as the life-stage rules and the
    /// place cues (the project's rule: every word list covers the same languages), and
    /// every language has words for likes, groups, follows, events and friends.
    #[test]
    fn the_bundled_words_cover_the_languages_of_the_other_word_lists() {
        let r = RecordKinds::parse(RECORD_KINDS_TOML, "record-kinds.toml").unwrap();
        let life: toml::Table = toml::from_str(LIFE_STAGES_TOML).unwrap();
        let mut life_langs = std::collections::BTreeSet::new();
        for rule in life["rule"].as_array().unwrap() {
            if let Some(p) = rule.get("patterns").and_then(|p| p.as_table()) {
                life_langs.extend(p.keys().cloned());
            }
        }
        let cues: toml::Table = toml::from_str(PLACE_CUES_TOML).unwrap();
        let cue_langs: Vec<String> = cues["language"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| l["code"].as_str().unwrap().to_string())
            .collect();
        for code in life_langs.iter().chain(&cue_langs) {
            assert!(
                r.languages.contains(code),
                "record-kinds.toml has no words in '{code}'"
            );
        }
        assert!(r.languages.len() >= 24, "{:?}", r.languages);
        let raw: toml::Table = toml::from_str(RECORD_KINDS_TOML).unwrap();
        for lang in raw["language"].as_array().unwrap() {
            for list in ["like", "group", "follow", "event", "friend"] {
                assert!(
                    lang.get(list)
                        .and_then(|l| l.as_array())
                        .is_some_and(|l| !l.is_empty()),
                    "{}: no {list} words",
                    lang["code"]
                );
            }
        }
    }

    /// Words in several scripts, whole phrases, prefixes and followers (translations
    /// from memory, as the file's are).
    #[test]
    fn words_are_found_in_names_in_many_scripts() {
        use RecordKind::*;
        let r = RecordKinds::parse(RECORD_KINDS_TOML, "record-kinds.toml").unwrap();
        assert_eq!(kinds(&r, "liked_pages"), vec![Like]);
        // "page" says "like" as a record's kind, not in a numbered file's name.
        assert_eq!(kinds(&r, "page_2"), Vec::<RecordKind>::new());
        let value = |t: &str| -> Vec<RecordKind> {
            r.kinds_in(&tokens(t), true)
                .into_iter()
                .map(|(k, _)| k)
                .collect()
        };
        assert_eq!(value("page"), vec![Like]);
        assert_eq!(value("página"), vec![Like]);
        assert_eq!(kinds(&r, "Appreciations"), vec![Like]);
        assert_eq!(kinds(&r, "circles"), vec![Group]);
        assert_eq!(kinds(&r, "gefällt mir"), vec![Like]);
        assert_eq!(kinds(&r, "понравившиеся"), vec![Like]);
        assert_eq!(kinds(&r, "グループ一覧"), vec![Group]);
        assert_eq!(kinds(&r, "关注的人"), vec![Follow]);
        assert_eq!(kinds(&r, "zilizopendwa"), vec![Like]);
        assert_eq!(kinds(&r, "theo dõi"), vec![Follow]);
        assert_eq!(kinds(&r, "người theo dõi"), Vec::<RecordKind>::new());
        assert_eq!(kinds(&r, "followers"), Vec::<RecordKind>::new());
        assert_eq!(kinds(&r, "takipçiler"), Vec::<RecordKind>::new());
        assert_eq!(kinds(&r, "takip edilenler"), vec![Follow]);
        assert_eq!(kinds(&r, "مجموعات"), vec![Group]);
        assert_eq!(kinds(&r, "กิจกรรม"), vec![Event]);
        assert_eq!(kinds(&r, "marafiki"), vec![Friend]);
        assert!(r.is_type_field(&tokens("kind")));
        assert!(r.is_type_field(&tokens("tipo")));
        assert!(!r.is_type_field(&tokens("typeface")));
        assert!(!r.is_type_field(&tokens("artist")));
    }

    #[test]
    fn empty_words_and_a_wrong_format_are_named() {
        let err = RecordKinds::parse(
            "format = 2\n[[language]]\ncode = \"xx\"\nlike = [\"  \"]\n",
            "k.toml",
        )
        .unwrap_err()
        .to_string();
        assert!(err.contains("k.toml"), "{err}");
        assert!(err.contains("format 2"), "{err}");
        assert!(err.contains("like word '  ' is empty"), "{err}");
    }
}
