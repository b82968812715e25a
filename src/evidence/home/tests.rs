//! Tests of the home levels on a small gazetteer, with values worked out by hand from
//! the formula in the module notes.

use super::*;
use crate::evidence::{EvidenceSet, Sources, gather};
use crate::footprint::{Footprint, Item, ItemKind, Origin as ItemOrigin};
use crate::lexicon::PlaceCues;

const SMALL: &str = "C\tUS\t300000000\tUnited States\n\
C\tNG\t200000000\tNigeria\n\
C\tCA\t40000000\tCanada\n\
C\tNO\t5000000\tNorway\n\
R\tUS-OR\t4000000\tOregon\n\
R\tUS-CO\t5000000\tColorado\n\
P\tUS\tUS-OR\t600000\tPortland\n\
P\tUS\tUS-CO\t380000\tAurora\n\
P\tCA\tCA.08\t60000\tAurora\n\
P\tNG\tNG.05\t9000000\tLagos\n\
P\tNG\tNG.05\t500000\tIkeja\n\
P\tNG\tNG.30\t3500000\tIbadan\n\
P\tNO\tNO.54\t77000\tTromsø|Tromso\n";

const PRIORS: &str = r#"{"format": 1,
"provenance": {"source": "test", "licence": "CC0-1.0", "created": "2026-12-04",
  "method": "invented", "synthetic": true, "contributors": 1},
"attributes": [
  {"id": "age_band", "label": "Age", "threshold": 0.5, "values": [
    {"id": "18-24", "label": "18-24", "base_rate": 0.5},
    {"id": "25-34", "label": "25-34", "base_rate": 0.5}]},
  {"id": "location", "label": "Home location", "threshold": 0.35, "values": [
    {"id": "US-OR", "label": "Oregon", "base_rate": 0.4},
    {"id": "US-CO", "label": "Colorado", "base_rate": 0.6}]}],
"items": [{"name": "Oregon Trail Fans", "kind": "group", "members": {"location": [40, 10]}}]}"#;

fn gaz() -> Gazetteer {
    Gazetteer::parse(SMALL, "", "small.tsv").unwrap()
}

fn cues() -> PlaceCues {
    PlaceCues::parse(
        include_str!("../../../reference-priors/lexicons/place-cues.toml"),
        "place-cues.toml",
    )
    .unwrap()
}

fn footprint(names: &[&str]) -> Footprint {
    Footprint {
        items: names
            .iter()
            .enumerate()
            .map(|(i, n)| Item {
                kind: ItemKind::Group,
                name: (*n).into(),
                id: None,
                category: None,
                date: None,
                origin: ItemOrigin {
                    file: "groups.json".into(),
                    record: i + 1,
                },
            })
            .collect(),
        ..Footprint::default()
    }
}

fn fit(names: &[&str]) -> (Priors, EvidenceSet) {
    let mut priors = Priors::parse(PRIORS, "p.json").unwrap();
    let g = Arc::new(gaz());
    let sources = Sources {
        places: Some(crate::evidence::Lexicon::Given(g.clone())),
        ..Sources::only(&[crate::evidence::SourceKind::Table])
    };
    let fp = footprint(names);
    let set = gather(&fp, &priors, &sources);
    let set = fit_home_levels(&mut priors, set, &g, &cues());
    (priors, set)
}

fn level<'a>(priors: &'a Priors, id: &str) -> (usize, &'a Attribute) {
    priors.attribute(id).unwrap()
}

#[test]
fn every_country_is_a_value_with_population_base_rates() {
    let (priors, _) = fit(&["Knitting"]);
    let (_, c) = level(&priors, HOME_COUNTRY);
    let ids: Vec<&str> = c.values.iter().map(|v| v.id.as_str()).collect();
    assert_eq!(ids, ["US", "NG", "CA", "NO"]);
    // 200 of 545 million.
    assert!((c.base_rates[1] - 200.0 / 545.0).abs() < 1e-12);
    // The location attribute became the region level, its values first; the three
    // levels sit together where it was: country, region, town.
    let (ri, r) = level(&priors, HOME_REGION);
    assert_eq!(ri, 2);
    assert_eq!(level(&priors, HOME_COUNTRY).0, 1);
    assert_eq!(level(&priors, HOME_TOWN).0, 3);
    assert_eq!(r.values[0].id, "US-OR");
    assert_eq!(r.values.last().unwrap().id, ELSEWHERE);
    // Oregon: 0.4 of the priors' mass times the US share of the world.
    assert!(
        (r.base_rates[0] - 0.4 * 300.0 / 545.0).abs() < 1e-9,
        "{:?}",
        r.base_rates
    );
    assert!(priors.attribute("location").is_none());
    assert_eq!(priors.file_attributes()[1].id, "location");
}

// "Ikeja Market": one place, local life (s = 0.5), one word (c = 0.7). At the country
// level q = 1 for Nigeria: L(NG) = 0.7·(0.5/π(NG) + 0.5) + 0.3, L(other) = 0.7·0.5 + 0.3.
#[test]
fn a_named_town_gives_evidence_at_all_three_levels() {
    let (priors, set) = fit(&["Ikeja Market"]);
    let (ci, c) = level(&priors, HOME_COUNTRY);
    let e = set.list.iter().find(|e| e.attribute() == ci).unwrap();
    let pi = c.base_rates[1];
    let l_ng = 0.7 * (0.5 / pi + 0.5) + 0.3;
    let l_us = 0.7 * 0.5 + 0.3;
    let got = (e.log_lr()[1] - e.log_lr()[0]).exp();
    assert!((got - l_ng / l_us).abs() < 1e-9, "{got} vs {}", l_ng / l_us);
    let (ri, r) = level(&priors, HOME_REGION);
    let er = set.list.iter().find(|e| e.attribute() == ri).unwrap();
    let ng05 = r.values.iter().position(|v| v.id == "NG.05").unwrap();
    assert_eq!(crate::stats::argmax(er.log_lr()).0, ng05);
    let (ti, t) = level(&priors, HOME_TOWN);
    assert_eq!(t.values.len(), 2, "Ikeja and elsewhere");
    assert!(set.list.iter().any(|e| e.attribute() == ti));
    // A town named in passing says nothing at the town level.
    let (priors, set) = fit(&["Ikeja Chess"]);
    let (ti, _) = level(&priors, HOME_TOWN);
    assert!(!set.list.iter().any(|e| e.attribute() == ti));
}

// "Aurora" is a town in Colorado (380,000) and in Canada (60,000): over the world it
// is 380/440 American, and with two items naming Canadian-only... none here; a Norway
// item settles nothing for it. The point: Canada gets its share.
#[test]
fn a_shared_name_is_weighed_over_the_whole_world() {
    let (priors, set) = fit(&["Aurora Chess Club"]);
    let (ci, c) = level(&priors, HOME_COUNTRY);
    let e = set.list.iter().find(|e| e.attribute() == ci).unwrap();
    let ca = c.values.iter().position(|v| v.id == "CA").unwrap();
    let no = c.values.iter().position(|v| v.id == "NO").unwrap();
    // Canada's ratio is above an unrelated country's: q(CA) = 60/440.
    assert!(e.log_lr()[ca] > e.log_lr()[no] + 0.1, "{:?}", e.log_lr());
}

#[test]
fn travel_counts_little_and_diaspora_splits_home_and_origin() {
    let (priors, set) = fit(&["Trip to Tromsø"]);
    let (ci, c) = level(&priors, HOME_COUNTRY);
    let no = c.values.iter().position(|v| v.id == "NO").unwrap();
    let e = set.list.iter().find(|e| e.attribute() == ci).unwrap();
    let travel = e.log_lr()[no];
    let (_, set2) = fit(&["Tromsø Runners"]);
    let e2 = set2.list.iter().find(|e| e.attribute() == ci).unwrap();
    assert!(
        e2.log_lr()[no] > travel + 1.0,
        "{} vs {travel}",
        e2.log_lr()[no]
    );
    // "Nigeria people in Tromsø": home Norway, origin Nigeria.
    let (_, set3) = fit(&["Nigeria people in Tromsø"]);
    let e3 = set3.list.iter().find(|e| e.attribute() == ci).unwrap();
    let ng = c.values.iter().position(|v| v.id == "NG").unwrap();
    assert!(e3.log_lr()[no] > e3.log_lr()[ng], "{:?}", e3.log_lr());
}

#[test]
fn table_evidence_for_the_location_values_is_carried_over() {
    let (priors, set) = fit(&["Oregon Trail Fans"]);
    let (ri, r) = level(&priors, HOME_REGION);
    let table: Vec<_> = set
        .list
        .iter()
        .filter(|e| e.attribute() == ri && matches!(e.origin, Origin::Table { .. }))
        .collect();
    assert_eq!(table.len(), 1);
    let e = table[0];
    assert_eq!(e.log_lr().len(), r.values.len());
    // Oregon above Colorado as the counts say; ratio 1 (log 0) for values beyond them.
    assert!(e.log_lr()[0] > e.log_lr()[1]);
    let last = *e.log_lr().last().unwrap();
    let first_two = e.log_lr()[0] * r.base_rates[0] + e.log_lr()[1] * r.base_rates[1];
    assert!(last.is_finite() && first_two.is_finite());
    // The name "Oregon" adds only its country at this level (the table spoke for the
    // item inside the priors' coverage): no preference between the two states.
    let places: Vec<_> = set
        .list
        .iter()
        .filter(|e| e.attribute() == ri && matches!(e.origin, Origin::Lexicon(_)))
        .collect();
    assert_eq!(places.len(), 1);
    let l = places[0].log_lr();
    assert!((l[0] - l[1]).abs() < 1e-12, "{l:?}");
    assert!(l[0] > *l.last().unwrap(), "the US above elsewhere: {l:?}");
    // Fitting again restores the file's attributes first.
    let mut p2 = priors.clone();
    p2.restore_file_attributes();
    assert_eq!(p2.attributes[1].id, "location");
}

// One item naming a small town once cannot make it the guess: its ratio is capped at
// HOME_MAX_RATIO times that of a value it does not point at.
#[test]
fn one_item_is_never_decisive_about_a_town() {
    let (priors, set) = fit(&["Tromsø Runners"]);
    let (ti, t) = level(&priors, HOME_TOWN);
    let e = set.list.iter().find(|e| e.attribute() == ti).unwrap();
    let tromso = t
        .values
        .iter()
        .position(|v| v.id.ends_with("Tromsø"))
        .unwrap();
    let elsewhere = t.values.iter().position(|v| v.id == ELSEWHERE).unwrap();
    let ratio = (e.log_lr()[tromso] - e.log_lr()[elsewhere]).exp();
    assert!((ratio - HOME_MAX_RATIO).abs() < 1e-9, "{ratio}");
}
