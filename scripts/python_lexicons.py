"""The word lists as docs/evidence.md describes them, for scripts/python_sources.py:
name keys, patterns ("Name keys and patterns"), the lexicon TOML files, the gazetteer
and the common-word list ("The lexicon files"). Independent of telltale's code."""

import os
import re
import tomllib
import unicodedata

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
LEXICONS = os.path.join(ROOT, "reference-priors", "lexicons")
MIN_ASCII_CHARS, MIN_OTHER_CHARS = 3, 2  # shortest place name matched

# The combining marks a name key drops (docs/evidence.md, "Name keys and patterns").
OPTIONAL_MARKS = (
    (0x0300, 0x036F), (0x1AB0, 0x1AFF), (0x1DC0, 0x1DFF), (0x20D0, 0x20FF),
    (0xFE20, 0xFE2F), (0x0483, 0x0489), (0x0591, 0x05C7), (0x0610, 0x061A),
    (0x064B, 0x065F), (0x0670, 0x0670), (0x06D6, 0x06ED), (0x0730, 0x074A),
    (0xFE00, 0xFE0F), (0xE0100, 0xE01EF),
)


def name_key(s):
    """docs/evidence.md, "Name keys and patterns": compatibility forms folded, the
    optional diacritics dropped (accents, Hebrew and Arabic points), every other
    combining mark kept with the letter before it, lower case, apostrophes dropped,
    every other run of punctuation, symbols and spaces one space."""
    out, word = [], False
    for c in unicodedata.normalize("NFKD", s):
        if unicodedata.category(c).startswith("M"):
            if any(lo <= ord(c) <= hi for lo, hi in OPTIONAL_MARKS):
                continue
            if word:
                out.append(c)
        elif c.isalnum():
            out.append(c.lower())
            word = True
        elif c in "'\u2019\u02bc":
            word = False
        else:
            out.append(" ")
            word = False
    return unicodedata.normalize("NFC", " ".join("".join(out).split()))


def tokens(s):
    return [t for t in name_key(s).split(" ") if t]


def unspaced(text):
    """Scripts written without spaces (Thai, Lao, Myanmar, Khmer, kana, CJK)."""
    for c in text:
        u = ord(c)
        if (0x0E00 <= u <= 0x0EFF or 0x1000 <= u <= 0x109F or 0x1780 <= u <= 0x17FF
                or 0x3040 <= u <= 0x30FF or 0x3400 <= u <= 0x4DBF or 0x4E00 <= u <= 0x9FFF
                or 0xF900 <= u <= 0xFAFF or 0x20000 <= u <= 0x2FFFF):
            return True
    return False


def split_digits(toks):
    """For life stages: a year written against letters ("2014级", "21학번") is a word of
    its own, so every run of digits is cut from the letters around it."""
    out = []
    for t in toks:
        out.extend(m for m in re.findall(r"\d+|\D+", t) if m)
    return out


# ── Patterns ("Name keys and patterns") ──────────────────────────────────────────────

def parse_pattern(text):
    """A run of words; a trailing * makes the last one a prefix; {year} is a slot."""
    parts = []
    for raw in text.split():
        if raw == "{year}":
            parts.append(("year", None))
            continue
        toks = tokens(raw.rstrip("*"))
        for i, t in enumerate(toks):
            prefix = raw.endswith("*") and i == len(toks) - 1
            parts.append(("prefix" if prefix else "word", t))
    return parts


def parse_year(tok):
    """A `{year}` slot's word: two or four decimal digits (any script's); four-digit
    years from 1300 to 2700. (value, digits) or None."""
    if len(tok) not in (2, 4) or not all(unicodedata.decimal(c, None) is not None
                                         for c in tok):
        return None
    value = int("".join(str(unicodedata.decimal(c)) for c in tok))
    if len(tok) == 4 and not 1300 <= value <= 2700:
        return None
    return value, len(tok)


def match_at(parts, toks, start):
    """False when the pattern does not match at `start`; else the year its slot read
    (None without a slot)."""
    if start + len(parts) > len(toks):
        return False
    year = None
    for (kind, w), tok in zip(parts, toks[start:]):
        if kind == "word" and tok != w:
            return False
        if kind == "prefix" and not tok.startswith(w):
            return False
        if kind == "year":
            year = parse_year(tok)
            if year is None:
                return False
    return year


def longest(hits):
    """Among overlapping matches the longest (in words, then characters) wins, the
    earlier on a tie; matches inside one word of unspaced script may sit side by side
    unless one holds the other. The kept matches in reading order. A hit is
    (start, end, text, values, offset)."""
    order = sorted(hits, key=lambda h: (-(h[1] - h[0]), -len(h[2]), h[0]))
    kept = []
    for h in order:
        def overlaps(k):
            side_by_side = (k[1] - k[0] == 1 and h[1] - h[0] == 1 and k[0] == h[0]
                            and h[2] not in k[2] and k[2] not in h[2])
            return h[0] < k[1] and k[0] < h[1] and not side_by_side
        if not any(overlaps(k) for k in kept):
            kept.append(h)
    return sorted(kept, key=lambda h: (h[0], h[4]))


def find_inside(keys, max_chars, tok, index):
    """Words of unspaced script inside a longer word: from the left, the longest listed
    key (2+ characters, not the whole word, holding an unspaced character, neither
    starting on a combining mark nor ending just before one) at each place, then on
    after it."""
    def mark(c):
        return unicodedata.category(c).startswith("M")

    hits, at = [], 0
    while at < len(tok):
        if mark(tok[at]):
            at += 1
            continue
        step = 1
        for n in range(min(max_chars, len(tok) - at), 1, -1):
            sub = tok[at:at + n]
            if n == len(tok) or not unspaced(sub):
                continue
            if at + n < len(tok) and mark(tok[at + n]):
                continue
            if keys.get(sub):
                hits.append((index, index + 1, sub, keys[sub], at, None))
                step = n
                break
        at += step
    return hits


class Phrases:
    """Patterns with values: whole-word patterns by key (a key listed twice carries
    every value), the others (with `*` or `{year}`) in file order."""

    def __init__(self, patterns):
        self.keys, self.other, self.max_unspaced = {}, [], 0
        for parts, value in patterns:
            if all(kind == "word" for kind, _ in parts):
                key = " ".join(w for _, w in parts)
                self.keys.setdefault(key, []).append(value)
                if unspaced(key):
                    self.max_unspaced = max(self.max_unspaced, len(key))
            else:
                same = next((o for o in self.other if o[0] == parts), None)
                if same:
                    same[1].append(value)  # one pattern in several rules
                else:
                    self.other.append((parts, [value]))
        self.max_tokens = max([k.count(" ") + 1 for k in self.keys] +
                              [len(p) for p, _ in self.other] + [1])

    def values(self):
        """Every value, each once, in file order."""
        seen = {}
        for values in list(self.keys.values()) + [v for _, v in self.other]:
            for v in values:
                seen.setdefault(id(v), v)
        return list(seen.values())

    def find(self, toks):
        """(start, end, text, values, offset) of every match, the longest among overlaps."""
        hits = []
        for start in range(len(toks)):
            for n in range(1, min(self.max_tokens, len(toks) - start) + 1):
                key = " ".join(toks[start:start + n])
                if key in self.keys:
                    hits.append((start, start + n, key, self.keys[key], 0, None))
            for parts, values in self.other:
                year = match_at(parts, toks, start)
                if year is not False:
                    end = start + len(parts)
                    hits.append((start, end, " ".join(toks[start:end]), values, 0, year))
        for i, tok in enumerate(toks):
            if self.max_unspaced and unspaced(tok):
                hits += find_inside(self.keys, self.max_unspaced, tok, i)
        return longest(hits)


def find_patterns(phrases, toks):
    """(start, end, text, value, year) for every value of every match."""
    return [(h[0], h[1], h[2], v, h[5]) for h in phrases.find(toks) for v in h[3]]


# ── The data files ───────────────────────────────────────────────────────────────────

def load_vocabulary():
    with open(os.path.join(LEXICONS, "vocabulary.toml"), "rb") as f:
        doc = tomllib.load(f)
    patterns = []
    for term in doc["term"]:
        for w in term["words"]:
            patterns.append((parse_pattern(w), term))
    return Phrases(patterns)


def load_life_stages():
    with open(os.path.join(LEXICONS, "life-stages.toml"), "rb") as f:
        doc = tomllib.load(f)
    patterns = []
    for rule in doc["rule"]:
        pats = rule["patterns"]
        lists = pats.items() if isinstance(pats, dict) else [("", pats)]
        for language, lst in lists:
            calendar = CALENDARS.get(language, "gregorian")
            for p in lst:
                patterns.append((parse_pattern(p), (rule, calendar)))
    levels = []
    for level, words in doc.get("levels", {}).items():
        levels.extend((parse_pattern(w), level) for w in words)
    return Phrases(patterns), Phrases(levels)


# The calendar a pattern's years are read in, by its language (docs/evidence.md, "When").
CALENDARS = {"fa": "solar-hijri", "th": "buddhist", "ar": "hijri", "ur": "hijri"}


class Gazetteer:
    """gazetteer.tsv (docs/evidence.md, "`gazetteer.tsv` and `common-words.txt`"):
    C code population names; R code population names; P country region population
    names. Every name is indexed by its name key (ASCII keys of 3+ characters, others
    of 2+)."""

    def __init__(self):
        self.index = {}
        self.max_tokens, self.max_unspaced = 1, 0
        path = os.path.join(LEXICONS, "gazetteer.tsv")
        with open(path, encoding="utf-8") as f:
            for n, line in enumerate(f):
                if line.startswith("#") or not line.strip():
                    continue
                cols = line.rstrip("\n").split("\t")
                if cols[0] == "C":
                    place = (cols[1], None, int(cols[2]))
                    names = cols[3]
                elif cols[0] == "R":
                    place = (cols[1][:2], cols[1], int(cols[2]))
                    names = cols[3]
                elif cols[0] == "P":
                    place = (cols[1], cols[2] or None, int(cols[3]))
                    names = cols[4]
                else:
                    continue
                ref = (cols[0], n) + place
                for name in names.split("|"):
                    key = name_key(name)
                    short = MIN_ASCII_CHARS if key.isascii() else MIN_OTHER_CHARS
                    if len(key) < short:
                        continue
                    refs = self.index.setdefault(key, [])
                    if ref not in refs:
                        refs.append(ref)
                    self.max_tokens = max(self.max_tokens, key.count(" ") + 1)
                    if unspaced(key):
                        self.max_unspaced = max(self.max_unspaced, len(key))
        self.common = set()
        with open(os.path.join(LEXICONS, "common-words.txt"), encoding="utf-8") as f:
            for line in f:
                for w in line.split("#", 1)[0].split():
                    self.common.add(name_key(w))

    def mentions(self, toks):
        """(text, candidates, whether it is one common word) for every place name in the
        tokens."""
        hits = []
        for start in range(len(toks)):
            for n in range(1, min(self.max_tokens, len(toks) - start) + 1):
                key = " ".join(toks[start:start + n])
                if key in self.index:
                    hits.append((start, start + n, key, self.index[key], 0, None))
        for i, tok in enumerate(toks):
            if unspaced(tok):
                hits += find_inside(self.index, self.max_unspaced, tok, i)
        return [(text, refs, end - start == 1 and text in self.common)
                for start, end, text, refs, _offset, _year in longest(hits)]
