//! Phrase matching over item names. Names and patterns are both reduced to the tokens
//! of their name key ([`crate::text::name_key`]: case, diacritics, punctuation and
//! compatibility forms folded), so "Café-Society" and "cafe society" are the same two
//! tokens. A pattern is a run of tokens; its last token may end in `*` (a prefix:
//! `atheis*` matches "atheist", "atheists", "atheism"), and a `{year}` token matches a
//! year written with four digits (or two, as in "class of 04"). Words in scripts
//! written without spaces (Chinese, Japanese, Thai …) are also looked for inside a
//! token. Among overlapping matches the longest wins, so "new york city" is not also
//! read as "york".

use foldhash::{HashMap, HashMapExt};
use unicode_normalization::char::is_combining_mark;

use super::keys::KeyTable;

use crate::text::name_key;

/// The tokens of a name key.
pub fn tokens(s: &str) -> Vec<String> {
    name_key(s)
        .split(' ')
        .filter(|t| !t.is_empty())
        .map(str::to_string)
        .collect()
}

/// Characters of scripts usually written without spaces between words.
pub fn is_unspaced(c: char) -> bool {
    matches!(c as u32,
        0x0E00..=0x0EFF      // Thai, Lao
        | 0x1000..=0x109F    // Myanmar
        | 0x1780..=0x17FF    // Khmer
        | 0x3040..=0x30FF    // Hiragana, Katakana
        | 0x3400..=0x4DBF    // CJK extension A
        | 0x4E00..=0x9FFF    // CJK unified ideographs
        | 0xF900..=0xFAFF    // CJK compatibility ideographs
        | 0x20000..=0x2FFFF) // CJK extensions B–F
}

/// A year found by a `{year}` slot: its value as written and how many digits it had.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct YearToken {
    pub value: i32,
    pub digits: u8,
}

#[derive(Debug, Clone, PartialEq, Eq)]
enum Part {
    Word(String),
    Prefix(String),
    Year,
}

/// One pattern, parsed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Pattern {
    parts: Vec<Part>,
    /// The pattern as written, for messages and reports.
    pub text: String,
}

impl Pattern {
    /// Parse a pattern; `None` when it has no tokens.
    pub fn parse(text: &str) -> Option<Pattern> {
        let mut parts = Vec::new();
        for raw in text.split_whitespace() {
            if raw == "{year}" {
                parts.push(Part::Year);
                continue;
            }
            let prefix = raw.ends_with('*');
            let toks = tokens(raw.trim_end_matches('*'));
            let n = toks.len();
            for (i, t) in toks.into_iter().enumerate() {
                if prefix && i + 1 == n {
                    parts.push(Part::Prefix(t));
                } else {
                    parts.push(Part::Word(t));
                }
            }
        }
        if parts.is_empty() {
            return None;
        }
        Some(Pattern {
            parts,
            text: text.trim().to_string(),
        })
    }

    fn is_plain(&self) -> bool {
        self.parts.iter().all(|p| matches!(p, Part::Word(_)))
    }

    fn key(&self) -> String {
        self.parts
            .iter()
            .filter_map(|p| match p {
                Part::Word(w) => Some(w.as_str()),
                _ => None,
            })
            .collect::<Vec<_>>()
            .join(" ")
    }

    fn len(&self) -> usize {
        self.parts.len()
    }

    /// Match at token `start`: the year, if the pattern has a slot.
    fn match_at(&self, toks: &[String], start: usize) -> Option<Option<YearToken>> {
        if start + self.parts.len() > toks.len() {
            return None;
        }
        let mut year = None;
        for (part, tok) in self.parts.iter().zip(&toks[start..]) {
            match part {
                Part::Word(w) if w == tok => {}
                Part::Prefix(p) if tok.starts_with(p.as_str()) => {}
                Part::Year => year = Some(parse_year(tok)?),
                _ => return None,
            }
        }
        Some(year)
    }
}

/// The value of a decimal digit in any of the scripts whose digits people write years
/// in (ASCII, Arabic-Indic, Persian and Urdu, Devanagari, Bengali, Gurmukhi, Gujarati,
/// Oriya, Tamil, Telugu, Kannada, Malayalam, Thai, Lao, Tibetan, Myanmar, Khmer).
/// Full-width digits are folded to ASCII by the name key already.
pub fn digit_value(c: char) -> Option<u32> {
    const ZEROS: [u32; 17] = [
        0x30, 0x660, 0x6F0, 0x966, 0x9E6, 0xA66, 0xAE6, 0xB66, 0xBE6, 0xC66, 0xCE6, 0xD66, 0xE50,
        0xED0, 0xF20, 0x1040, 0x17E0,
    ];
    let u = c as u32;
    ZEROS
        .iter()
        .find(|&&z| (z..z + 10).contains(&u))
        .map(|&z| u - z)
}

/// A year slot's token: two or four digits of one script. Four-digit years run from
/// 1300 (Solar Hijri and Hijri years of the last century) to 2700 (Buddhist-era years
/// of this one); which calendar a year is in is the caller's to say.
fn parse_year(tok: &str) -> Option<YearToken> {
    let mut value: u32 = 0;
    let mut digits = 0u8;
    for c in tok.chars() {
        value = value * 10 + digit_value(c)?;
        digits += 1;
        if digits > 4 {
            return None;
        }
    }
    if !(digits == 4 || digits == 2) {
        return None;
    }
    if digits == 4 && !(1300..=2700).contains(&value) {
        return None;
    }
    Some(YearToken {
        value: value as i32,
        digits,
    })
}

/// A match in a name: tokens `start..end`, the values the pattern carries, and the
/// year its slot read.
#[derive(Debug, Clone, PartialEq)]
pub struct Hit<'a, T> {
    pub start: usize,
    pub end: usize,
    /// Character offset inside the token, for matches inside unspaced script.
    pub offset: usize,
    /// The matched text (tokens of the name key, joined by spaces).
    pub text: String,
    pub values: &'a [T],
    pub year: Option<YearToken>,
}

/// Patterns with values attached, indexed for matching names.
#[derive(Debug, Clone)]
pub struct PhraseIndex<T> {
    /// Plain phrases by key, with the proper prefixes of the keys, whole tokens at a
    /// time ("new", "new york" for "new york city"): a run of tokens is extended only
    /// while it can still become a key.
    exact: KeyTable<T>,
    other: Vec<(Pattern, Vec<T>)>,
    /// Positions in `other` of the patterns whose first part is a given word, so a
    /// name is tried only against patterns that can start at each token.
    other_by_word: HashMap<String, Vec<usize>>,
    /// Positions in `other` of the patterns that start with a given prefix.
    other_by_prefix: HashMap<String, Vec<usize>>,
    /// Positions in `other` of the patterns that start with a year slot.
    other_year: Vec<usize>,
    max_tokens: usize,
    /// Longest key (in characters) among keys made of unspaced script.
    max_unspaced_chars: usize,
}

impl<T> Default for PhraseIndex<T> {
    fn default() -> Self {
        PhraseIndex {
            exact: KeyTable::default(),
            other: Vec::new(),
            other_by_word: HashMap::new(),
            other_by_prefix: HashMap::new(),
            other_year: Vec::new(),
            max_tokens: 0,
            max_unspaced_chars: 0,
        }
    }
}

impl<T> PhraseIndex<T> {
    pub fn new() -> Self {
        Self::default()
    }

    /// Number of distinct keys and patterns.
    pub fn len(&self) -> usize {
        self.exact.len() + self.other.len()
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Add a pattern with a value.
    pub fn insert(&mut self, pattern: &Pattern, value: T) {
        self.max_tokens = self.max_tokens.max(pattern.len());
        if pattern.is_plain() {
            let key = pattern.key();
            if key.chars().any(is_unspaced) {
                self.max_unspaced_chars = self.max_unspaced_chars.max(key.chars().count());
            }
            self.exact.insert(&key, value);
        } else if let Some((_, values)) = self.other.iter_mut().find(|(p, _)| p == pattern) {
            values.push(value);
        } else {
            let at = self.other.len();
            match pattern.parts.first() {
                Some(Part::Word(w)) => self.other_by_word.entry(w.clone()).or_default().push(at),
                Some(Part::Prefix(p)) => {
                    self.other_by_prefix.entry(p.clone()).or_default().push(at)
                }
                _ => self.other_year.push(at),
            }
            self.other.push((pattern.clone(), vec![value]));
        }
    }

    /// Add a plain phrase given as its key (tokens joined by single spaces), the fast
    /// path for large lists such as the gazetteer.
    pub fn insert_key(&mut self, key: &str, value: T) {
        if key.is_empty() {
            return;
        }
        self.max_tokens = self.max_tokens.max(key.split(' ').count());
        if key.chars().any(is_unspaced) {
            self.max_unspaced_chars = self.max_unspaced_chars.max(key.chars().count());
        }
        self.exact.insert(key, value);
    }

    /// A read-only index of plain phrases over a key table laid out at build time
    /// ([`super::key_image`]); `None` when the bytes are not such a table.
    pub fn from_image(bytes: &'static [u8], decode: impl Fn(u32) -> Option<T>) -> Option<Self> {
        let exact = KeyTable::from_image(bytes, decode)?;
        let (max_tokens, max_unspaced_chars) = exact.image_limits()?;
        Some(PhraseIndex {
            exact,
            max_tokens,
            max_unspaced_chars,
            ..PhraseIndex::default()
        })
    }

    /// Release the room kept for growth (after the last insert).
    pub fn shrink_to_fit(&mut self) {
        self.exact.shrink_to_fit();
    }

    /// Values stored under an exact key (tokens joined by single spaces).
    pub fn get(&self, key: &str) -> &[T] {
        self.exact.get(key)
    }

    /// Every non-overlapping match in a name, longest first, then leftmost; returned in
    /// reading order.
    pub fn find(&self, name: &str) -> Vec<Hit<'_, T>> {
        self.find_tokens(&tokens(name))
    }

    /// As [`PhraseIndex::find`], on tokens already made.
    pub fn find_tokens(&self, toks: &[String]) -> Vec<Hit<'_, T>> {
        let mut hits: Vec<Hit<'_, T>> = Vec::new();
        for start in 0..toks.len() {
            // Exact keys starting here, shortest first, extended while the run of
            // tokens is still the start of some key.
            let longest = self.max_tokens.min(toks.len() - start);
            let mut key = toks[start].clone();
            for n in 1..=longest {
                if n > 1 {
                    key.push(' ');
                    key.push_str(&toks[start + n - 1]);
                }
                let Some(found) = self.exact.lookup(&key) else {
                    break;
                };
                if !found.values.is_empty() {
                    hits.push(Hit {
                        start,
                        end: start + n,
                        offset: 0,
                        text: key.clone(),
                        values: found.values,
                        year: None,
                    });
                }
                if !found.prefix {
                    break;
                }
            }
            // The patterns that can start here, in insertion order (ties between hits
            // are settled by that order).
            let by_word = self
                .other_by_word
                .get(&toks[start])
                .map(Vec::as_slice)
                .unwrap_or(&[]);
            let tok = &toks[start];
            let mut candidates: Vec<usize> = by_word.to_vec();
            if !self.other_by_prefix.is_empty() {
                for (i, c) in tok.char_indices() {
                    if let Some(list) = self.other_by_prefix.get(&tok[..i + c.len_utf8()]) {
                        candidates.extend_from_slice(list);
                    }
                }
            }
            if !self.other_year.is_empty() && parse_year(tok).is_some() {
                candidates.extend_from_slice(&self.other_year);
            }
            candidates.sort_unstable();
            for (pattern, values) in candidates.into_iter().map(|i| &self.other[i]) {
                if let Some(year) = pattern.match_at(toks, start) {
                    let end = start + pattern.len();
                    hits.push(Hit {
                        start,
                        end,
                        offset: 0,
                        text: toks[start..end].join(" "),
                        values,
                        year,
                    });
                }
            }
        }
        if self.max_unspaced_chars > 0 {
            for (i, tok) in toks.iter().enumerate() {
                if tok.chars().any(is_unspaced) {
                    self.find_inside(tok, i, &mut hits);
                }
            }
        }
        select_longest(hits)
    }

    /// Look for keys of unspaced script inside one token (every substring of up to
    /// the longest key's length that is not the whole token, which was looked up
    /// already). A substring neither starts nor ends inside a letter: not on a
    /// combining mark, nor just before one (a Thai vowel sign or tone mark is kept in
    /// the key and belongs to the letter before it, so "กร" is not read inside "กรุง").
    fn find_inside<'a>(&'a self, tok: &str, index: usize, hits: &mut Vec<Hit<'a, T>>) {
        let chars: Vec<char> = tok.chars().collect();
        let mut from = 0;
        while from < chars.len() {
            if is_combining_mark(chars[from]) {
                from += 1;
                continue;
            }
            let longest = self.max_unspaced_chars.min(chars.len() - from);
            let mut step = 1;
            for n in (2..=longest).rev() {
                if n == chars.len() || chars.get(from + n).is_some_and(|&c| is_combining_mark(c)) {
                    continue;
                }
                let sub: String = chars[from..from + n].iter().collect();
                if !sub.chars().any(is_unspaced) {
                    continue;
                }
                let values = self.exact.get(&sub);
                if !values.is_empty() {
                    hits.push(Hit {
                        start: index,
                        end: index + 1,
                        offset: from,
                        text: sub,
                        values,
                        year: None,
                    });
                    step = n;
                    break;
                }
            }
            from += step;
        }
    }
}

/// Keep the longest of overlapping hits (then the leftmost); hits inside one token of
/// unspaced script may sit side by side.
fn select_longest<T>(mut hits: Vec<Hit<'_, T>>) -> Vec<Hit<'_, T>> {
    hits.sort_by(|a, b| {
        (b.end - b.start)
            .cmp(&(a.end - a.start))
            .then(b.text.chars().count().cmp(&a.text.chars().count()))
            .then(a.start.cmp(&b.start))
    });
    let mut kept: Vec<Hit<'_, T>> = Vec::new();
    for h in hits {
        let overlaps = kept.iter().any(|k| {
            let same_token_inside = k.end - k.start == 1
                && h.end - h.start == 1
                && k.start == h.start
                && !k.text.contains(&h.text)
                && !h.text.contains(&k.text);
            h.start < k.end && k.start < h.end && !same_token_inside
        });
        if !overlaps {
            kept.push(h);
        }
    }
    kept.sort_by_key(|h| (h.start, h.offset));
    kept
}

#[cfg(test)]
mod tests {
    use super::*;

    proptest::proptest! {
        /// The gazetteer indexes names by their name key directly: it must equal the
        /// tokens joined by single spaces.
        #[test]
        fn a_name_key_is_its_tokens_joined(s in "\\PC{0,40}") {
            proptest::prop_assert_eq!(name_key(&s), tokens(&s).join(" "));
        }
    }

    fn index(patterns: &[(&str, u32)]) -> PhraseIndex<u32> {
        let mut ix = PhraseIndex::new();
        for (p, v) in patterns {
            ix.insert(&Pattern::parse(p).unwrap(), *v);
        }
        ix
    }

    #[test]
    fn longest_match_wins_and_keys_fold() {
        let ix = index(&[
            ("new york", 1),
            ("new york city", 2),
            ("york", 3),
            ("café", 4),
        ]);
        let hits = ix.find("NEW-YORK City Cafe Lovers");
        let found: Vec<(&str, u32)> = hits
            .iter()
            .map(|h| (h.text.as_str(), h.values[0]))
            .collect();
        assert_eq!(found, vec![("new york city", 2), ("cafe", 4)]);
        let hits = ix.find("Old York and New York");
        let found: Vec<u32> = hits.iter().map(|h| h.values[0]).collect();
        assert_eq!(found, vec![3, 1]);
    }

    #[test]
    fn prefixes_and_years() {
        let ix = index(&[
            ("atheis*", 1),
            ("class of {year}", 2),
            ("{year} reunion", 3),
        ]);
        let hits = ix.find("Atheists United");
        assert_eq!(hits.len(), 1);
        assert_eq!(hits[0].text, "atheists");
        let hits = ix.find("Class of 2004 Reunion");
        assert_eq!(hits.len(), 1, "{hits:?}");
        assert_eq!(hits[0].values[0], 2);
        assert_eq!(
            hits[0].year,
            Some(YearToken {
                value: 2004,
                digits: 4
            })
        );
        // "Class of '04": the apostrophe folds away, two digits remain.
        let hits = ix.find("Class of '04");
        assert_eq!(hits[0].year.unwrap().digits, 2);
        assert!(ix.find("Class of 1250").is_empty());
        assert!(ix.find("Class of 20045").is_empty());
        // Digits of other scripts: Persian "۹۲", Bengali "২০২৩", Devanagari "२०११".
        let year = |name: &str| ix.find(name).first().and_then(|h| h.year);
        assert_eq!(
            year("class of ۹۲").map(|y| (y.value, y.digits)),
            Some((92, 2))
        );
        assert_eq!(year("class of ২০২৩").map(|y| y.value), Some(2023));
        assert_eq!(year("class of २०११").map(|y| y.value), Some(2011));
        assert_eq!(digit_value('٧'), Some(7));
        assert_eq!(digit_value('x'), None);
    }

    #[test]
    fn unspaced_scripts_are_searched_inside_tokens() {
        let ix = index(&[("東京", 1), ("清真寺", 2)]);
        let hits = ix.find("東京ラーメン部");
        assert_eq!(hits.len(), 1);
        assert_eq!(hits[0].values[0], 1);
        let hits = ix.find("東京清真寺");
        let found: Vec<u32> = hits.iter().map(|h| h.values[0]).collect();
        assert_eq!(found, vec![1, 2]);
        // Whole-token matches still work.
        assert_eq!(ix.find("東京 Ramen Walks")[0].values[0], 1);
    }

    #[test]
    fn a_word_inside_an_unspaced_run_keeps_its_marks() {
        // "กรุงเทพ" (Bangkok, from memory): ก ร, then U+0E38 THAI CHARACTER SARA U
        // (general category Mn in the Unicode Character Database), then ง เ ท พ. "กร"
        // stops before the vowel sign, so it is not a word of this run; "เทพ" is.
        let ix = index(&[("กร", 1), ("เทพ", 2)]);
        let found: Vec<u32> = ix.find("กรุงเทพ").iter().map(|h| h.values[0]).collect();
        assert_eq!(found, vec![2]);
        // With the mark, the word is found ("กรุ" as a key, made up for the check).
        let ix = index(&[("กรุ", 4)]);
        assert_eq!(ix.find("กรุงเทพ")[0].values[0], 4);
    }
}
