//! Text handling shared by import, matching and every renderer: the name key used to
//! match an archive's items against a reference table (Unicode NFKC, case folding,
//! diacritics and punctuation folded), the repair of UTF-8 text that an exporter
//! decoded as Latin-1 and encoded again, and width-aware truncation that never cuts a
//! grapheme (CJK, emoji and combining marks included).

use unicode_segmentation::UnicodeSegmentation;
use unicode_width::UnicodeWidthStr;

pub use crate::name_key::name_key;

/// Repair text that was UTF-8, decoded as Latin-1 and re-encoded as UTF-8 (each byte
/// of a multi-byte character became its own character: "cafÃ©" for "café").
///
/// Returns the input unchanged when it does not look damaged: any character above
/// U+00FF, or bytes that are not valid UTF-8 once taken back to Latin-1, mean the text
/// was fine (or damaged some other way that this repair must not guess at).
pub fn repair_latin1_mojibake(s: &str) -> String {
    if s.is_ascii() {
        return s.to_string();
    }
    let mut bytes = Vec::with_capacity(s.len());
    for c in s.chars() {
        let u = c as u32;
        if u > 0xFF {
            return s.to_string();
        }
        bytes.push(u as u8);
    }
    match String::from_utf8(bytes) {
        Ok(fixed) => fixed,
        Err(_) => s.to_string(),
    }
}

/// Display width of a string in terminal cells.
pub fn display_width(s: &str) -> usize {
    UnicodeWidthStr::width(s)
}

/// Cut `s` to at most `max` terminal cells, ending in "…" when anything was cut.
/// Cuts only between grapheme clusters, so no character, emoji sequence or combining
/// mark is split.
pub fn truncate_to_width(s: &str, max: usize) -> String {
    if display_width(s) <= max {
        return s.to_string();
    }
    if max == 0 {
        return String::new();
    }
    let budget = max - 1; // room for the ellipsis
    let mut out = String::new();
    let mut used = 0;
    for g in s.graphemes(true) {
        let w = UnicodeWidthStr::width(g);
        if used + w > budget {
            break;
        }
        used += w;
        out.push_str(g);
    }
    out.push('…');
    out
}

/// Pad `s` with spaces on the right to exactly `width` cells (truncating first).
pub fn pad_to_width(s: &str, width: usize) -> String {
    let t = truncate_to_width(s, width);
    let w = display_width(&t);
    let mut out = t;
    out.extend(std::iter::repeat_n(' ', width.saturating_sub(w)));
    out
}

/// Wrap words into lines of at most `width` characters, each line starting with
/// `indent`; a word longer than the width gets a line of its own.
pub fn wrap_words(s: &str, width: usize, indent: &str) -> String {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in s.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
        .iter()
        .map(|l| format!("{indent}{l}"))
        .collect::<Vec<_>>()
        .join("\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn key_folds_case_diacritics_punctuation_and_width() {
        assert_eq!(name_key("Café  Society!"), "cafe society");
        assert_eq!(name_key("CAFÉ-society"), "cafe society");
        // Full-width Latin letters fold under NFKC (Unicode UAX #15).
        assert_eq!(name_key("ＣＡＦＥ society"), "cafe society");
        assert_eq!(name_key("Farmers' Market"), name_key("Farmers Market"));
        assert_eq!(name_key("  --  "), "");
        // Other scripts keep their letters.
        assert_eq!(name_key("Ελληνικά Νέα"), "ελληνικα νεα");
        assert_eq!(name_key("北京 读书会"), "北京 读书会");
    }

    #[test]
    fn mojibake_is_repaired_and_clean_text_left_alone() {
        // "café" encoded as UTF-8 (63 61 66 C3 A9) read back as Latin-1.
        assert_eq!(repair_latin1_mojibake("cafÃ©"), "café");
        assert_eq!(repair_latin1_mojibake("café"), "café");
        assert_eq!(repair_latin1_mojibake("Zürich"), "Zürich");
        assert_eq!(repair_latin1_mojibake("北京"), "北京");
        // "Łódź" damaged the same way.
        let damaged: String = "Łódź".bytes().map(|b| b as char).collect();
        assert_eq!(repair_latin1_mojibake(&damaged), "Łódź");
    }

    #[test]
    fn truncation_respects_graphemes_and_width() {
        assert_eq!(truncate_to_width("hello", 10), "hello");
        assert_eq!(truncate_to_width("hello world", 6), "hello…");
        // CJK characters are two cells wide (Unicode UAX #11).
        let t = truncate_to_width("北京读书会", 6);
        assert_eq!(t, "北京…");
        assert!(display_width(&t) <= 6);
        // A family emoji (ZWJ sequence) is never split.
        let fam = "👨‍👩‍👧 family";
        let t = truncate_to_width(fam, 4);
        assert!(t.starts_with("👨‍👩‍👧") || t == "…", "{t}");
        // Combining marks stay with their base letter.
        let t = truncate_to_width("e\u{301}e\u{301}e\u{301}e\u{301}", 3);
        assert_eq!(t, "e\u{301}e\u{301}…");
        assert_eq!(display_width(&pad_to_width("北京", 6)), 6);
    }
}
