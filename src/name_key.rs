//! The name key: the form two names must share to count as the same (Unicode NFKC,
//! case, optional diacritics and punctuation folded). Kept free of the rest of the
//! crate so that the build script compiles this same file to work out the bundled
//! gazetteer's keys ahead of time (build.rs); a test checks those against this
//! function.

use unicode_normalization::UnicodeNormalization;
use unicode_normalization::char::is_combining_mark;

/// The key two names must share to count as the same item.
///
/// NFKC first (so full-width and compatibility forms fold), then a canonical
/// decomposition with the optional diacritics dropped (see `is_optional_mark`: "Café"
/// → "cafe", Arabic and Hebrew vowel points), then lower-casing, and every run of
/// punctuation, symbols and white space becomes one space. Letters and digits of every
/// script are kept, and so are the combining marks that spell a word: the vowel signs
/// and viramas of Indic and South-East Asian scripts ("पुराना" is not "परन") and the
/// kana voicing marks ("ガ" is not "カ"). Names in Greek, Arabic, Hindi or Chinese
/// keep their identity.
pub fn name_key(s: &str) -> String {
    // NFD(NFKC(s)) is NFKD(s), so one compatibility decomposition does both steps. ASCII
    // text is unchanged by every normal form and skips them (most names are ASCII).
    if s.is_ascii() {
        return fold_chars(s.chars());
    }
    let out = fold_chars(s.nfkd());
    if out.is_ascii() {
        return out;
    }
    // Recompose so keys compare equal whatever form the input had.
    out.nfc().collect()
}

/// Is `c` a combining mark that only decorates a letter, so that a name is the same
/// name with or without it? Decided block by block from the Unicode Standard's
/// descriptions of the blocks (the code charts' block headers and the script chapters):
///
/// - Combining Diacritical Marks (U+0300–036F), their Extended (U+1AB0–1AFF) and
///   Supplement (U+1DC0–1DFF) blocks, Combining Diacritical Marks for Symbols
///   (U+20D0–20FF) and Combining Half Marks (U+FE20–FE2F): the accents of Latin, Greek,
///   Cyrillic and Vietnamese ("é" is e with U+0301 after decomposition) and marks laid
///   over symbols;
/// - Cyrillic combining marks (U+0483–0489): titlo and the Church Slavonic accents;
/// - Hebrew cantillation marks and points (U+0591–05C7): vowel points (niqqud) and
///   the dagesh are written in teaching and liturgical texts and left out in everyday
///   writing;
/// - Arabic: the honorific and Quranic small signs (U+0610–061A), the harakat (short
///   vowels, tanween, shadda, sukun) and the hamza and madda written over or under a
///   letter (U+064B–065F), the superscript alef (U+0670) and the Quranic annotation
///   signs (U+06D6–06ED): all optional in ordinary writing, so "مُحَمَّد" is "محمد" and
///   "أحمد" is "احمد", as Arabic is commonly searched;
/// - Syriac points (U+0730–074A): vowel points, optional as in Hebrew;
/// - variation selectors (U+FE00–FE0F, U+E0100–E01EF): they choose a glyph, not a
///   character.
///
/// Every other combining mark is kept: in the abugidas (Devanagari, Bengali, Gurmukhi,
/// Gujarati, Oriya, Tamil, Telugu, Kannada, Malayalam, Sinhala, Thai, Lao, Tibetan,
/// Myanmar, Khmer …) the vowel signs, viramas, nuktas and tone marks are letters of the
/// word, and the kana voicing marks (U+3099, U+309A, which a decomposition splits off
/// "ガ" and "パ") make a different syllable.
fn is_optional_mark(c: char) -> bool {
    matches!(c as u32,
        0x0300..=0x036F
        | 0x0483..=0x0489
        | 0x0591..=0x05C7
        | 0x0610..=0x061A
        | 0x064B..=0x065F
        | 0x0670
        | 0x06D6..=0x06ED
        | 0x0730..=0x074A
        | 0x1AB0..=0x1AFF
        | 0x1DC0..=0x1DFF
        | 0x20D0..=0x20FF
        | 0xFE00..=0xFE0F
        | 0xFE20..=0xFE2F
        | 0xE0100..=0xE01EF)
        && is_combining_mark(c)
}

/// Drop optional diacritics, keep every other combining mark with the letter before
/// it, lower-case letters and digits, turn every run of anything else into one space
/// (apostrophes join).
fn fold_chars(chars: impl Iterator<Item = char>) -> String {
    let mut out = String::new();
    let mut pending_space = false;
    // Whether the last character read was kept as part of a word (a kept mark needs a
    // letter or digit, or another kept mark, before it).
    let mut in_word = false;
    for c in chars {
        if !c.is_ascii() && is_combining_mark(c) {
            if is_optional_mark(c) {
                continue;
            }
            // A vowel sign, virama or voicing mark belongs to the letter before it (most
            // viramas and tone marks are not alphabetic, so they must not split the
            // word); one with no letter before it is dropped with the punctuation
            // or space it follows.
            if in_word {
                out.push(c);
            }
            continue;
        }
        if c.is_alphanumeric() {
            if pending_space && !out.is_empty() {
                out.push(' ');
            }
            pending_space = false;
            in_word = true;
            if c.is_ascii() {
                out.push(c.to_ascii_lowercase());
            } else {
                out.extend(c.to_lowercase());
            }
        } else if c == '\'' || c == '’' || c == 'ʼ' {
            // Apostrophes join: "Farmers' Market" and "Farmers Market" match.
            in_word = false;
        } else {
            pending_space = true;
            in_word = false;
        }
    }
    out
}
