//! The name key against the Unicode Character Database, read through Python's
//! unicodedata by tests/python/gen_name_key.py into tests/data/name_key.json: the
//! combining marks of the abugidas (vowel signs, viramas, nuktas, tone marks) and the
//! kana voicing marks are kept, so words that differ in them keep different keys; the
//! optional diacritics (accents, Hebrew and Arabic vowel points, variation selectors)
//! are dropped, so words that differ only in them share a key.

use serde_json::Value;
use telltale::text::name_key;

fn fixture() -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/name_key.json"
    ))
    .expect("tests/data/name_key.json is checked in");
    serde_json::from_str(&text).expect("valid JSON")
}

fn str_of<'a>(v: &'a Value, field: &str) -> &'a str {
    v[field]
        .as_str()
        .unwrap_or_else(|| panic!("{field} in {v}"))
}

fn mark_of(case: &Value) -> char {
    let hex = str_of(case, "mark").trim_start_matches("U+");
    char::from_u32(u32::from_str_radix(hex, 16).expect("hex")).expect("a character")
}

#[test]
fn the_marks_of_the_abugidas_and_the_kana_voicing_marks_are_kept() {
    let f = fixture();
    let blocks = f["kept"].as_array().expect("kept");
    assert_eq!(blocks.len(), 16);
    let mut checked = 0;
    for block in blocks {
        let name = str_of(block, "block");
        let base = str_of(block, "base");
        for case in block["cases"].as_array().expect("cases") {
            let text = format!("{base}{}", mark_of(case));
            let key = name_key(&text);
            // Source: unicodedata, NFKC of consonant + mark (general category Mn, Mc
            // or Me in the Unicode Character Database).
            assert_eq!(
                key,
                str_of(case, "key"),
                "{name}: {} {} ({})",
                str_of(case, "mark"),
                str_of(case, "name"),
                str_of(case, "category")
            );
            assert_ne!(key, name_key(base), "{name}: {}", str_of(case, "name"));
            checked += 1;
        }
    }
    // Devanagari alone has some 30 vowel signs and other marks.
    assert!(checked > 300, "{checked} marks");
}

#[test]
fn optional_diacritics_are_dropped() {
    let f = fixture();
    let mut checked = 0;
    for block in f["dropped"].as_array().expect("dropped") {
        let name = str_of(block, "block");
        let base = str_of(block, "base");
        for case in block["cases"].as_array().expect("cases") {
            let text = format!("{base}{}", mark_of(case));
            // Source: unicodedata (the mark's category M and name; the block's range
            // from the Unicode Standard's Blocks.txt).
            assert_eq!(
                name_key(&text),
                str_of(block, "key"),
                "{name}: {} {}",
                str_of(case, "mark"),
                str_of(case, "name")
            );
            checked += 1;
        }
    }
    assert!(checked > 500, "{checked} marks");
}

#[test]
fn words_that_differ_in_vowel_signs_keep_their_own_keys() {
    let f = fixture();
    let pairs = f["different"].as_array().expect("different");
    let mut languages: Vec<&str> = pairs.iter().map(|p| str_of(p, "language")).collect();
    languages.dedup();
    assert_eq!(
        languages,
        ["Hindi", "Bengali", "Tamil", "Thai", "Japanese"],
        "every script is checked"
    );
    for p in pairs {
        let (a, b) = (str_of(p, "a"), str_of(p, "b"));
        // Words from memory; that they differ only in the marks listed, and each
        // one's NFKC form: unicodedata.
        let (ka, kb) = (name_key(a), name_key(b));
        assert_eq!(ka, str_of(p, "a_key"), "{a} ({})", str_of(p, "a_meaning"));
        assert_eq!(kb, str_of(p, "b_key"), "{b} ({})", str_of(p, "b_meaning"));
        assert_ne!(ka, kb, "{a} and {b} differ in {}", p["marks"]);
    }
}

#[test]
fn words_that_differ_in_accents_or_vowel_points_share_a_key() {
    let f = fixture();
    let pairs = f["same"].as_array().expect("same");
    assert!(pairs.len() >= 10);
    for p in pairs {
        let (a, b) = (str_of(p, "a"), str_of(p, "b"));
        // Words from memory; the marks they differ in: unicodedata.
        assert_eq!(name_key(a), str_of(p, "key"), "{a}: {}", p["marks"]);
        assert_eq!(name_key(b), str_of(p, "key"), "{b}");
    }
}

#[test]
fn kana_voicing_survives_every_way_of_writing_it() {
    // ガ precomposed (U+30AC), カ + U+3099 COMBINING KATAKANA-HIRAGANA VOICED SOUND MARK,
    // and half-width ｶﾞ (U+FF76 U+FF9E, whose compatibility mappings are カ and U+3099
    // in the Unicode Character Database) are one key; カ alone is another.
    let ga = name_key("ガ");
    assert_eq!(ga, "ガ");
    assert_eq!(name_key("カ\u{3099}"), ga);
    assert_eq!(name_key("ｶﾞ"), ga);
    assert_ne!(name_key("カ"), ga);
    // Hiragana too: ぱ (U+3071) is は + U+309A SEMI-VOICED SOUND MARK, not は.
    assert_eq!(name_key("は\u{309A}"), "ぱ");
    assert_ne!(name_key("は"), name_key("ぱ"));
}

#[test]
fn a_kept_mark_joins_its_letter_and_a_stray_one_is_dropped() {
    // U+094D DEVANAGARI SIGN VIRAMA is not alphabetic (the Unicode Character
    // Database's Alphabetic property), yet it stays inside the word: "क्लब" ("club",
    // from memory) is one word, not "क" and "लब".
    assert_eq!(name_key("क्लब धावक"), "क्लब धावक");
    assert_eq!(name_key("क्लब").split(' ').count(), 1);
    // A mark after punctuation or a space has no letter to belong to.
    assert_eq!(name_key("क - \u{093E}ब"), "क ब");
    // An accent is still dropped next to an Indic word.
    assert_eq!(name_key("Café क्लब"), "cafe क्लब");
}
