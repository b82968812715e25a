//! The name key: the form two names must share to count as the same (Unicode NFKC,
//! case, diacritics and punctuation folded). Kept free of the rest of the crate so
//! that the build script compiles this same file to work out the bundled gazetteer's
//! keys ahead of time (build.rs); a test checks those against this function.

use unicode_normalization::UnicodeNormalization;
use unicode_normalization::char::is_combining_mark;

/// The key two names must share to count as the same item.
///
/// NFKC first (so full-width and compatibility forms fold), then a canonical
/// decomposition with combining marks dropped (diacritics fold: "Café" → "cafe"), then
/// lower-casing, and every run of punctuation, symbols and white space becomes one
/// space. Letters and digits of every script are kept, so names in Greek, Arabic or
/// Chinese keep their identity.
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

/// Drop combining marks, lower-case letters and digits, turn every run of anything
/// else into one space (apostrophes join).
fn fold_chars(chars: impl Iterator<Item = char>) -> String {
    let mut out = String::new();
    let mut pending_space = false;
    for c in chars {
        if !c.is_ascii() && is_combining_mark(c) {
            continue;
        }
        if c.is_alphanumeric() {
            if pending_space && !out.is_empty() {
                out.push(' ');
            }
            pending_space = false;
            if c.is_ascii() {
                out.push(c.to_ascii_lowercase());
            } else {
                out.extend(c.to_lowercase());
            }
        } else if c == '\'' || c == '’' || c == 'ʼ' {
            // Apostrophes join: "Farmers' Market" and "Farmers Market" match.
        } else {
            pending_space = true;
        }
    }
    out
}
