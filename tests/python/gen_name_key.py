"""Reference values for telltale's name key (src/name_key.rs), from Python's unicodedata
(the Unicode Character Database: general categories, character names, normalisation).

The name key drops the combining marks that are optional diacritics and keeps the ones
that spell a word. This script lists, from the character database:

- kept: every combining mark (general category Mn, Mc or Me) of the blocks of the
  abugidas and of the kana voicing marks, each after a consonant of its script; the key
  of consonant + mark must be that pair's NFKC form (nothing dropped, nothing to
  lower-case), which differs from the consonant's;
- dropped: every combining mark of the blocks whose marks are optional diacritics; the
  key of base + mark must be the base letter's key;
- pairs: words that differ only in combining marks (checked here: equal once every
  character of category M is removed). Those that differ in vowel signs, viramas or
  voicing marks must get different keys, each its NFKC form; those that differ in
  accents or vowel points must share a key. The words are from memory.

Block ranges are those of the Unicode Standard's Blocks.txt. The Rust test
tests/name_key.rs reads the output (checked in as tests/data/name_key.json).

Usage: python gen_name_key.py OUT.json
"""
import json
import sys
import unicodedata as ud

# Blocks whose combining marks spell the word (Blocks.txt), with a consonant to put
# them after (looked up by its character name).
KEPT_BLOCKS = [
    ("Devanagari", 0x0900, 0x097F, "DEVANAGARI LETTER KA"),
    ("Bengali", 0x0980, 0x09FF, "BENGALI LETTER KA"),
    ("Gurmukhi", 0x0A00, 0x0A7F, "GURMUKHI LETTER KA"),
    ("Gujarati", 0x0A80, 0x0AFF, "GUJARATI LETTER KA"),
    ("Oriya", 0x0B00, 0x0B7F, "ORIYA LETTER KA"),
    ("Tamil", 0x0B80, 0x0BFF, "TAMIL LETTER KA"),
    ("Telugu", 0x0C00, 0x0C7F, "TELUGU LETTER KA"),
    ("Kannada", 0x0C80, 0x0CFF, "KANNADA LETTER KA"),
    ("Malayalam", 0x0D00, 0x0D7F, "MALAYALAM LETTER KA"),
    ("Sinhala", 0x0D80, 0x0DFF, "SINHALA LETTER ALPAPRAANA KAYANNA"),
    ("Thai", 0x0E00, 0x0E7F, "THAI CHARACTER KO KAI"),
    ("Lao", 0x0E80, 0x0EFF, "LAO LETTER KO"),
    ("Tibetan", 0x0F00, 0x0FFF, "TIBETAN LETTER KA"),
    ("Myanmar", 0x1000, 0x109F, "MYANMAR LETTER KA"),
    ("Khmer", 0x1780, 0x17FF, "KHMER LETTER KA"),
    ("Hiragana", 0x3040, 0x309F, "HIRAGANA LETTER KA"),
]

# Blocks (or parts of blocks) whose combining marks are optional diacritics, with a
# letter to put them after.
DROPPED_RANGES = [
    ("Combining Diacritical Marks", 0x0300, 0x036F, "LATIN SMALL LETTER A"),
    ("Cyrillic: titlo and Church Slavonic marks", 0x0483, 0x0489, "CYRILLIC SMALL LETTER A"),
    ("Hebrew: cantillation marks and points", 0x0591, 0x05C7, "HEBREW LETTER BET"),
    ("Arabic: honorifics and Quranic small signs", 0x0610, 0x061A, "ARABIC LETTER BEH"),
    ("Arabic: harakat, hamza and madda", 0x064B, 0x065F, "ARABIC LETTER BEH"),
    ("Arabic: superscript alef", 0x0670, 0x0670, "ARABIC LETTER BEH"),
    ("Arabic: Quranic annotation signs", 0x06D6, 0x06ED, "ARABIC LETTER BEH"),
    ("Syriac: points", 0x0730, 0x074A, "SYRIAC LETTER BETH"),
    ("Combining Diacritical Marks Extended", 0x1AB0, 0x1AFF, "LATIN SMALL LETTER A"),
    ("Combining Diacritical Marks Supplement", 0x1DC0, 0x1DFF, "LATIN SMALL LETTER A"),
    ("Combining Diacritical Marks for Symbols", 0x20D0, 0x20FF, "LATIN SMALL LETTER A"),
    ("Variation Selectors", 0xFE00, 0xFE0F, "CJK UNIFIED IDEOGRAPH-845B"),
    ("Combining Half Marks", 0xFE20, 0xFE2F, "LATIN SMALL LETTER A"),
    ("Variation Selectors Supplement", 0xE0100, 0xE01EF, "CJK UNIFIED IDEOGRAPH-845B"),
]


def is_mark(c):
    return ud.category(c).startswith("M")


def marks(lo, hi):
    return [chr(u) for u in range(lo, hi + 1) if is_mark(chr(u))]


def without_marks(s):
    return "".join(c for c in ud.normalize("NFD", s) if not is_mark(c))


def lookup(name):
    if name.startswith("CJK UNIFIED IDEOGRAPH-"):
        return chr(int(name.rsplit("-", 1)[1], 16))
    return ud.lookup(name)


kept = []
for block, lo, hi, base_name in KEPT_BLOCKS:
    base = lookup(base_name)
    cases = []
    for m in marks(lo, hi):
        text = base + m
        key = ud.normalize("NFKC", text)
        # Every character of the expected key is a letter or a mark (nothing the key
        # would turn into a space), and it differs from the consonant alone.
        assert all(ud.category(c)[0] in "LM" for c in key), (block, hex(ord(m)))
        assert key != base, (block, hex(ord(m)))
        cases.append({
            "mark": f"U+{ord(m):04X}",
            "name": ud.name(m),
            "category": ud.category(m),
            "key": key,
        })
    kept.append({"block": block, "base": base, "cases": cases})

dropped = []
for block, lo, hi, base_name in DROPPED_RANGES:
    base = lookup(base_name)
    cases = [
        {
            "mark": f"U+{ord(m):04X}",
            "name": ud.name(m),
            "category": ud.category(m),
        }
        for m in marks(lo, hi)
    ]
    dropped.append({"block": block, "base": base, "key": base.lower(), "cases": cases})

# Words that differ only in vowel signs, viramas or voicing marks (from memory): each
# pair must keep two keys.
DIFFERENT = [
    ("Hindi", "पुराना", "old", "पराना", "Paraná (GeoNames' Hindi name)"),
    ("Hindi", "दिल", "heart", "दल", "party, group"),
    ("Hindi", "कम", "less", "काम", "work"),
    ("Hindi", "मिल", "mill", "मील", "mile"),
    ("Bengali", "কাল", "tomorrow, time", "কল", "tap, machine"),
    ("Bengali", "দিন", "day", "দান", "gift"),
    ("Bengali", "পুরনো", "old", "পারানা", "Paraná (GeoNames' Bengali name)"),
    ("Tamil", "தீவு", "island", "தேவா", "Dewa (GeoNames' Tamil name)"),
    ("Tamil", "பால்", "milk", "பல", "many"),
    ("Tamil", "கல்", "stone", "கால்", "leg"),
    ("Thai", "ไก่", "chicken", "ไก", "(without the tone mark)"),
    ("Thai", "ใกล้", "near", "ใกล", "(without the tone mark)"),
    ("Thai", "มา", "come", "ม้า", "horse"),
    ("Thai", "กรุง", "capital city", "กรง", "cage"),
    ("Japanese", "ガ", "ga", "カ", "ka"),
    ("Japanese", "バス", "bus", "パス", "pass"),
    ("Japanese", "ばら", "rose", "はら", "field, belly"),
]

# Words that differ only in accents or vowel points (from memory): each pair must
# share the key given.
SAME = [
    ("French", "Café", "Cafe", "cafe"),
    ("Spanish", "Bogotá", "Bogota", "bogota"),
    ("German", "Köln", "Koln", "koln"),
    ("Vietnamese", "Hà Nội", "Ha Noi", "ha noi"),
    ("Vietnamese", "Sông", "Song", "song"),
    ("Greek", "Αθήνα", "Αθηνα", "αθηνα"),
    ("Russian", "Ёлка", "Елка", "елка"),
    ("Arabic", "مُحَمَّد", "محمد", "محمد"),
    ("Arabic", "أحمد", "احمد", "احمد"),
    ("Arabic", "القُرْآن", "القران", "القران"),
    ("Hebrew", "שָׁלוֹם", "שלום", "שלום"),
]

pairs_different = []
for language, a, a_meaning, b, b_meaning in DIFFERENT:
    # The two differ only in combining marks.
    assert without_marks(a) == without_marks(b), (a, b)
    assert ud.normalize("NFKC", a) != ud.normalize("NFKC", b), (a, b)
    pairs_different.append({
        "language": language,
        "a": a,
        "a_meaning": a_meaning,
        "a_key": ud.normalize("NFKC", a),
        "b": b,
        "b_meaning": b_meaning,
        "b_key": ud.normalize("NFKC", b),
        "marks": sorted({
            f"U+{ord(c):04X} {ud.name(c)} ({ud.category(c)})"
            for c in ud.normalize("NFKD", a + b)
            if is_mark(c)
        }),
    })

pairs_same = []
for language, a, b, key in SAME:
    assert without_marks(a) == without_marks(b), (a, b)
    pairs_same.append({
        "language": language,
        "a": a,
        "b": b,
        "key": key,
        "marks": sorted({
            f"U+{ord(c):04X} {ud.name(c)} ({ud.category(c)})"
            for c in ud.normalize("NFKD", a + b)
            if is_mark(c)
        }),
    })

out = {
    "source": f"Python {sys.version_info[0]}.{sys.version_info[1]} unicodedata, "
    f"Unicode {ud.unidata_version}",
    "kept": kept,
    "dropped": dropped,
    "different": pairs_different,
    "same": pairs_same,
}
with open(sys.argv[1] if len(sys.argv) > 1 else "tests/data/name_key.json", "w",
          encoding="utf-8") as f:
    json.dump(out, f, indent=1, ensure_ascii=False)
    f.write("\n")
