//! The multi-country persona set (tests/personas/*.toml): invented people in more than
//! twenty countries whose items are written in their own languages and scripts. Each
//! person is written out as an archive in one of four invented layouts (none is the
//! demo's, none is a real platform's) with a mapping of its own, scanned with every
//! evidence source against the bundled demo priors, and the guesses are checked
//! against the truths in the data file.
//!
//! The bars are data too ([`Bars`]): religion right wherever belief words appear, the
//! age band right for a share of the people, no wrong guess at or above 90%, and the
//! country (the home place's country level, `--home-levels`) right for a share of them.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use serde::Deserialize;
use telltale::evidence::Sources;
use telltale::scan::{Scan, ScanInput, load_priors};

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct PersonaFile {
    format: i64,
    person: Vec<Persona>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Persona {
    slug: String,
    name: String,
    lives: String,
    country: String,
    age: u32,
    age_band: String,
    religion: Option<String>,
    languages: Vec<String>,
    layout: String,
    items: Vec<[String; 3]>,
}

/// What a set must reach. Shares are of the people in the file.
struct Bars {
    /// Age band right for at least this share (the issue's bar: 16 of 24).
    age: f64,
    /// Country right for at least this share (20 of 24), read from the home place's
    /// country level (`--home-levels`); `None` skips the bar.
    country: Option<f64>,
    /// No guess at or above this probability may be wrong.
    sure: f64,
    /// People whose sure and wrong guess is a known defect still being fixed.
    known_sure_wrong: &'static [&'static str],
}

/// The issue's bars, written as shares of a set of 24 people.
const BARS: Bars = Bars {
    age: 16.0 / 24.0,
    country: Some(20.0 / 24.0),
    sure: 0.9,
    known_sure_wrong: &[],
};

/// The bars each set is held to. Before the life-stage lexicon read the world's
/// languages the age band was right for 17 of 28 (world.toml) and 7 of 16
/// (holdout.toml), and one wrong guess was sure; with it, 28 of 28 and 13 of 16, none.
fn bars_today(_file: &str) -> Bars {
    BARS
}

fn load(file: &str) -> Vec<Persona> {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/personas")
        .join(file);
    let text = std::fs::read_to_string(&path).unwrap();
    let f: PersonaFile = toml::from_str(&text).unwrap();
    assert_eq!(f.format, 1);
    f.person
}

fn unix(date: &str) -> i64 {
    let d = time::Date::parse(
        date,
        time::macros::format_description!("[year]-[month]-[day]"),
    )
    .unwrap_or_else(|e| panic!("date '{date}': {e}"));
    d.midnight().assume_utc().unix_timestamp() + 12 * 3600
}

fn of_kind<'a>(p: &'a Persona, kind: &'a str) -> impl Iterator<Item = (&'a str, &'a str)> {
    p.items
        .iter()
        .filter(move |i| i[0] == kind)
        .map(|i| (i[1].as_str(), i[2].as_str()))
}

/// Write a persona's archive in its layout; returns the mapping file's path.
fn write_archive(p: &Persona, root: &Path) -> PathBuf {
    let dir = root.join(&p.slug);
    let mapping = root.join(format!("{}.mapping.toml", p.slug));
    let json = |v: serde_json::Value| serde_json::to_string_pretty(&v).unwrap();
    let (files, map): (Vec<(&str, String)>, &str) = match p.layout.as_str() {
        // Likes in a file of "appreciations" whose records say what they are, groups
        // as a top-level array, follows as CSV, events with Unix times.
        "satchel" => {
            let likes: Vec<_> = of_kind(p, "like")
                .map(|(n, d)| serde_json::json!({"kind": "page", "title": n, "at": format!("{d}T09:30:00+00:00")}))
                .collect();
            let groups: Vec<_> = of_kind(p, "group")
                .map(|(n, d)| serde_json::json!({"circle": {"title": n}, "joined_on": d}))
                .collect();
            let mut follows = String::from("handle,display,since\n");
            for (i, (n, d)) in of_kind(p, "follow").enumerate() {
                follows.push_str(&format!("acct{i},\"{}\",{d}\n", n.replace('"', "\"\"")));
            }
            let events: Vec<_> = of_kind(p, "event")
                .map(|(n, d)| serde_json::json!({"title": n, "when": unix(d)}))
                .collect();
            (
                vec![
                    (
                        "satchel/appreciations.json",
                        json(serde_json::json!({ "appreciations": likes })),
                    ),
                    ("satchel/circles.json", json(serde_json::json!(groups))),
                    ("satchel/watching.csv", follows),
                    (
                        "satchel/gatherings.json",
                        json(serde_json::json!({ "gatherings": events })),
                    ),
                ],
                r#"format = 1
label = "invented test layout: satchel"
[[source]]
kind = "like"
files = ["satchel/appreciations.json"]
records = "$.appreciations[?@.kind == 'page']"
name = "$.title"
date = "$.at"
[[source]]
kind = "group"
files = ["satchel/circles.json"]
name = "$.circle.title"
date = "$.joined_on"
[[source]]
kind = "follow"
files = ["satchel/watching.csv"]
name = "display"
id = "handle"
date = "since"
[[source]]
kind = "event"
files = ["satchel/gatherings.json"]
records = "$.gatherings[*]"
name = "$.title"
date = "$.when"
"#,
            )
        }
        // One NDJSON file per kind, Unix times.
        "logbook" => {
            let lines = |kind: &str| -> String {
                of_kind(p, kind)
                    .map(|(n, d)| {
                        serde_json::to_string(&serde_json::json!({"label": n, "t": unix(d)}))
                            .unwrap()
                            + "\n"
                    })
                    .collect()
            };
            (
                vec![
                    ("logbook/liked.ndjson", lines("like")),
                    ("logbook/joined.ndjson", lines("group")),
                    ("logbook/followed.ndjson", lines("follow")),
                    ("logbook/went.ndjson", lines("event")),
                ],
                r#"format = 1
label = "invented test layout: logbook"
[[source]]
kind = "like"
files = ["logbook/liked.ndjson"]
name = "$.label"
date = "$.t"
[[source]]
kind = "group"
files = ["logbook/joined.ndjson"]
name = "$.label"
date = "$.t"
[[source]]
kind = "follow"
files = ["logbook/followed.ndjson"]
name = "$.label"
date = "$.t"
[[source]]
kind = "event"
files = ["logbook/went.ndjson"]
name = "$.label"
date = "$.t"
"#,
            )
        }
        // Semicolon CSV, one file per kind.
        "sheets" => {
            let rows = |kind: &str| -> String {
                let mut s = String::from("Title;Day\n");
                for (n, d) in of_kind(p, kind) {
                    s.push_str(&format!("\"{}\";{d}\n", n.replace('"', "\"\"")));
                }
                s
            };
            (
                vec![
                    ("sheets/marks.csv", rows("like")),
                    ("sheets/clubs.csv", rows("group")),
                    ("sheets/subscriptions.csv", rows("follow")),
                    ("sheets/outings.csv", rows("event")),
                ],
                r#"format = 1
label = "invented test layout: sheets"
[[source]]
kind = "like"
files = ["sheets/marks.csv"]
delimiter = ";"
name = "Title"
date = "Day"
[[source]]
kind = "group"
files = ["sheets/clubs.csv"]
delimiter = ";"
name = "Title"
date = "Day"
[[source]]
kind = "follow"
files = ["sheets/subscriptions.csv"]
delimiter = ";"
name = "Title"
date = "Day"
[[source]]
kind = "event"
files = ["sheets/outings.csv"]
delimiter = ";"
name = "Title"
date = "Day"
"#,
            )
        }
        // Everything in one nested JSON document.
        "bundle" => {
            let rows = |kind: &str| -> Vec<serde_json::Value> {
                of_kind(p, kind)
                    .map(|(n, d)| serde_json::json!({"n": n, "d": d}))
                    .collect()
            };
            let doc = serde_json::json!({"profile": {
                "pages": rows("like"),
                "memberships": rows("group"),
                "followed": rows("follow"),
                "attended": rows("event"),
            }});
            (
                vec![("bundle/everything.json", json(doc))],
                r#"format = 1
label = "invented test layout: bundle"
[[source]]
kind = "like"
files = ["bundle/everything.json"]
records = "$.profile.pages[*]"
name = "$.n"
date = "$.d"
[[source]]
kind = "group"
files = ["bundle/everything.json"]
records = "$.profile.memberships[*]"
name = "$.n"
date = "$.d"
[[source]]
kind = "follow"
files = ["bundle/everything.json"]
records = "$.profile.followed[*]"
name = "$.n"
date = "$.d"
[[source]]
kind = "event"
files = ["bundle/everything.json"]
records = "$.profile.attended[*]"
name = "$.n"
date = "$.d"
"#,
            )
        }
        other => panic!("{}: unknown layout '{other}'", p.slug),
    };
    for (rel, text) in files {
        let path = dir.join(rel);
        std::fs::create_dir_all(path.parent().unwrap()).unwrap();
        std::fs::write(path, text).unwrap();
    }
    std::fs::write(&mapping, map).unwrap();
    mapping
}

/// One person's guesses: per attribute id, the value id and its probability.
struct Guesses {
    by_attr: BTreeMap<String, (String, f64)>,
}

fn scan(p: &Persona, root: &Path) -> (Scan, Guesses) {
    // Home levels are fitted to each footprint, into the priors: fresh ones per person.
    let priors = &mut load_priors(None).unwrap();
    let mapping = write_archive(p, root);
    let input = ScanInput {
        archive: root.join(&p.slug),
        mapping: Some(mapping),
        sources: Sources {
            home_levels: true,
            ..Sources::all()
        },
        ..ScanInput::default()
    };
    let s = Scan::run(&input, priors).unwrap_or_else(|e| panic!("{}: {e}", p.slug));
    // A kind the person has none of leaves its file or section empty; nothing else
    // may be wrong with the archive.
    let warnings: Vec<_> = s
        .footprint
        .warnings
        .iter()
        .filter(|w| !w.message.contains("found nothing"))
        .collect();
    assert!(warnings.is_empty(), "{}: {warnings:?}", p.slug);
    assert_eq!(s.footprint.items.len(), p.items.len(), "{}", p.slug);
    // The levels agree: the regions of a country add up to no more than the country,
    // the towns of a region to no more than the region (the law of total
    // probability: a town lies in its region and its country).
    let nested = &s.exposure.evidence().nested;
    assert_eq!(nested.len(), 3, "{}: country > region > town", p.slug);
    for n in nested {
        let (fine, coarse) = (
            s.exposure.posterior(n.child),
            s.exposure.posterior(n.parent),
        );
        let mut sums = vec![0.0; coarse.probs.len()];
        for (q, u) in fine.probs.iter().zip(&n.parent_of) {
            if let Some(u) = u {
                sums[*u] += q;
            }
        }
        for (u, (sum, cap)) in sums.iter().zip(&coarse.probs).enumerate() {
            assert!(
                sum <= &(cap + 1e-9),
                "{}: {} values inside {} value {u} add up to {sum}, over its {cap}",
                p.slug,
                priors.attributes[n.child].id,
                priors.attributes[n.parent].id
            );
        }
    }
    let ids: Vec<&str> = priors.attributes.iter().map(|a| a.id.as_str()).collect();
    let at = ids
        .iter()
        .position(|&i| i == "home_country")
        .expect("country level");
    assert_eq!(
        &ids[at..at + 3],
        ["home_country", "home_region", "home_town"],
        "{}: the levels sit together",
        p.slug
    );
    let mut by_attr = BTreeMap::new();
    for (a, attr) in priors.attributes.iter().enumerate() {
        let post = s.exposure.posterior(a);
        by_attr.insert(
            attr.id.clone(),
            (attr.values[post.best].id.clone(), post.probability),
        );
    }
    (s, Guesses { by_attr })
}

/// The country a location value names: the ISO 3166-1 part of an ISO 3166-2 code
/// ("US-OR" → "US") or a bare country code.
fn country_of(value: &str) -> String {
    value
        .split('-')
        .next()
        .unwrap_or(value)
        .to_ascii_uppercase()
}

struct Tally {
    people: usize,
    age_right: usize,
    country_right: usize,
    religion_right: usize,
    religion_shown: usize,
    sure_and_wrong: Vec<String>,
    lines: Vec<String>,
}

fn run_set(file: &str) -> Tally {
    let people = load(file);
    let dir = tempfile::tempdir().unwrap();
    let mut t = Tally {
        people: people.len(),
        age_right: 0,
        country_right: 0,
        religion_right: 0,
        religion_shown: 0,
        sure_and_wrong: Vec::new(),
        lines: Vec::new(),
    };
    for p in &people {
        assert!(!p.name.is_empty() && !p.lives.is_empty() && p.age > 0);
        assert!(!p.languages.is_empty(), "{}", p.slug);
        let (_, g) = scan(p, dir.path());
        let (age, age_p) = g.by_attr["age_band"].clone();
        // The country level of the home place (ISO 3166-1 alpha-2 value ids); the
        // priors' own location values (US states) become its region level.
        let (loc, loc_p) = g.by_attr["home_country"].clone();
        let (rel, rel_p) = g.by_attr["religion"].clone();
        let age_ok = age == p.age_band;
        let country_ok = country_of(&loc) == p.country;
        t.age_right += usize::from(age_ok);
        t.country_right += usize::from(country_ok);
        if !age_ok && age_p >= BARS.sure {
            t.sure_and_wrong
                .push(format!("{}: age {age} at {age_p:.2}", p.slug));
        }
        if !country_ok && loc_p >= BARS.sure && BARS.country.is_some() {
            t.sure_and_wrong
                .push(format!("{}: location {loc} at {loc_p:.2}", p.slug));
        }
        let rel_note = match &p.religion {
            Some(truth) => {
                t.religion_shown += 1;
                let ok = &rel == truth;
                t.religion_right += usize::from(ok);
                if !ok && rel_p >= BARS.sure {
                    t.sure_and_wrong
                        .push(format!("{}: religion {rel} at {rel_p:.2}", p.slug));
                }
                format!("religion {rel} {rel_p:.2} (truth {truth})")
            }
            None => format!("religion {rel} {rel_p:.2} (no belief words)"),
        };
        t.lines.push(format!(
            "{:<22} age {age} {age_p:.2} (truth {}){} | place {loc} {loc_p:.2} (truth {}){} | {rel_note}",
            p.slug,
            p.age_band,
            if age_ok { "" } else { " WRONG" },
            p.country,
            if country_ok { "" } else { " WRONG" },
        ));
    }
    println!("{file}:\n{}", t.lines.join("\n"));
    t
}

fn check(file: &str, min_people: usize, min_countries: usize) {
    let people = load(file);
    assert!(
        people.len() >= min_people,
        "{file}: {} people",
        people.len()
    );
    let countries: std::collections::BTreeSet<_> =
        people.iter().map(|p| p.country.as_str()).collect();
    assert!(countries.len() >= min_countries, "{file}: {countries:?}");
    let bars = bars_today(file);
    let mut t = run_set(file);
    let summary = t.lines.join("\n");
    assert_eq!(
        t.religion_right, t.religion_shown,
        "{file}: religion where belief words appear\n{summary}"
    );
    let need = (bars.age * t.people as f64 - 1e-9).ceil() as usize;
    assert!(
        t.age_right >= need,
        "{file}: age band right for {} of {} (need {need})\n{summary}",
        t.age_right,
        t.people
    );
    if let Some(share) = bars.country {
        let need = (share * t.people as f64 - 1e-9).ceil() as usize;
        assert!(
            t.country_right >= need,
            "{file}: country right for {} of {} (need {need})\n{summary}",
            t.country_right,
            t.people
        );
    }
    t.sure_and_wrong
        .retain(|w| !bars.known_sure_wrong.iter().any(|k| w.starts_with(k)));
    assert!(
        t.sure_and_wrong.is_empty(),
        "{file}: wrong guesses at {} or more: {:?}\n{summary}",
        BARS.sure,
        t.sure_and_wrong
    );
}

/// The set is what it says: enough people, countries, languages and scripts, every
/// layout used, every date readable, truths that are values of the demo priors.
#[test]
fn the_persona_set_is_broad() {
    let people = load("world.toml");
    let priors = load_priors(None).unwrap();
    let values = |id: &str| -> Vec<String> {
        priors
            .attributes
            .iter()
            .find(|a| a.id == id)
            .unwrap()
            .values
            .iter()
            .map(|v| v.id.clone())
            .collect()
    };
    let (ages, religions) = (values("age_band"), values("religion"));
    let mut languages = std::collections::BTreeSet::new();
    let mut scripts = std::collections::BTreeSet::new();
    let mut layouts = std::collections::BTreeSet::new();
    for p in &people {
        assert!(ages.contains(&p.age_band), "{}", p.slug);
        let band = telltale::evidence::parse_age_range(&p.age_band).unwrap();
        assert!(
            (band.0..band.1).contains(&(p.age as f64)),
            "{}: age {} outside {}",
            p.slug,
            p.age,
            p.age_band
        );
        if let Some(r) = &p.religion {
            assert!(religions.contains(r), "{}", p.slug);
        }
        assert_eq!(p.country.len(), 2, "{}", p.slug);
        languages.extend(p.languages.iter().cloned());
        layouts.insert(p.layout.clone());
        for i in &p.items {
            assert!(["like", "group", "follow", "event"].contains(&i[0].as_str()));
            unix(&i[2]);
            // The script of each letter, by Unicode block (coarse).
            for c in i[1].chars().filter(|c| c.is_alphabetic()) {
                let block = match c as u32 {
                    0..=0x024F => "Latin",
                    0x0370..=0x03FF => "Greek",
                    0x0400..=0x04FF => "Cyrillic",
                    0x0600..=0x06FF => "Arabic",
                    0x0900..=0x097F => "Devanagari",
                    0x0980..=0x09FF => "Bengali",
                    0x0B80..=0x0BFF => "Tamil",
                    0x0E00..=0x0E7F => "Thai",
                    0x1E00..=0x1EFF => "Latin",
                    0x3040..=0x30FF => "Kana",
                    0x4E00..=0x9FFF => "Han",
                    0xAC00..=0xD7AF => "Hangul",
                    _ => "other",
                };
                scripts.insert(block);
            }
        }
    }
    assert!(languages.len() >= 12, "{languages:?}");
    assert!(scripts.len() >= 10, "{scripts:?}");
    assert_eq!(layouts.len(), 4, "{layouts:?}");
}

#[test]
fn people_around_the_world_are_read() {
    check("world.toml", 24, 20);
}

/// The second set, worded differently and kept out of the lexicons' tuning.
#[test]
fn a_differently_worded_set_is_read_too() {
    check("holdout.toml", 16, 16);
}

/// The mapping drafter on every person's archive, in all four invented layouts: each
/// set of records it drafts gets the kind the hand-written mapping gives it, or is
/// left for the person to decide (commented out) when no word in its names or its
/// records' own kind field says what it is; never a wrong kind. The satchel layout's
/// likes sit in a file called "appreciations" whose records say `"kind": "page"`:
/// read from the record values, they are likes.
#[test]
fn drafts_of_every_layout_give_each_set_its_kind_or_leave_it_open() {
    use telltale::archive::Archive;
    use telltale::footprint::ItemKind;
    use telltale::limits::Limits;
    use telltale::mapping::{SourceKind, draft};
    // What each file (or, in the one-document layout, each list) holds; `None`: no
    // word in its names says so (the draft must leave it open).
    let truth = |file: &str, key: Option<&str>| -> Option<ItemKind> {
        let name = file.rsplit('/').next().unwrap_or(file);
        let stem = name.split('.').next().unwrap_or(name);
        match (stem, key) {
            ("everything", Some("pages")) => Some(ItemKind::Like),
            ("everything", Some("memberships")) => Some(ItemKind::Group),
            ("everything", Some("followed")) => Some(ItemKind::Follow),
            ("everything", Some("attended")) => Some(ItemKind::Event),
            ("appreciations" | "liked", _) => Some(ItemKind::Like),
            ("circles" | "joined" | "clubs", _) => Some(ItemKind::Group),
            ("followed" | "subscriptions", _) => Some(ItemKind::Follow),
            ("gatherings" | "outings", _) => Some(ItemKind::Event),
            ("watching" | "went" | "marks", _) => None,
            other => panic!("no truth for {other:?}"),
        }
    };
    let priors = load_priors(None).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let (mut right, mut open) = (0, 0);
    for file in ["world.toml", "holdout.toml"] {
        for p in load(file) {
            write_archive(&p, dir.path());
            let limits = Limits::default();
            let mut archive = Archive::open(&dir.path().join(&p.slug), &limits).unwrap();
            let d = draft(&mut archive, &priors, &limits);
            assert!(!d.sources.is_empty(), "{}: nothing drafted", p.slug);
            for s in &d.sources {
                let key = s.set.path_words().last().cloned();
                let want = truth(&s.set.file, key.as_deref());
                match (want, s.kind.sure) {
                    (Some(kind), true) => {
                        assert_eq!(
                            s.kind.kind,
                            SourceKind::Item(kind),
                            "{}: {} {key:?}: {:?}",
                            p.slug,
                            s.set.file,
                            s.kind.reasons
                        );
                        right += 1;
                    }
                    (None, false) => open += 1,
                    (want, sure) => panic!(
                        "{}: {} {key:?}: wanted {want:?}, drafted {:?} (sure: {sure}, {:?})",
                        p.slug, s.set.file, s.kind.kind, s.kind.reasons
                    ),
                }
            }
        }
    }
    assert!(right > 100 && open > 10, "{right} right, {open} left open");
}

/// The demo personas who live outside the USA (demo-exports/world-manifest.json,
/// layout C: file and field names in Turkish and Spanish, the mapping inside the
/// folder): scanned as the README in each folder says, with the home levels, each is
/// placed in the right country and region and the right age band, nothing wrong reads
/// 90% or more, every item and friend is imported, and a draft of each archive reads
/// every file's kind from its name in that language.
#[test]
fn the_demo_personas_outside_the_usa_are_read() {
    use telltale::archive::Archive;
    use telltale::limits::Limits;
    use telltale::mapping::draft;
    use telltale::synth::abroad::AbroadManifest;
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-exports");
    let text = std::fs::read_to_string(root.join("world-manifest.json")).unwrap();
    let people: Vec<AbroadManifest> = serde_json::from_str(&text).unwrap();
    assert_eq!(people.len(), 2);
    for p in &people {
        let priors = &mut load_priors(None).unwrap();
        let input = ScanInput {
            archive: root.join(&p.archive),
            sources: Sources {
                home_levels: true,
                ..Sources::all()
            },
            ..ScanInput::default()
        };
        let s = Scan::run(&input, priors).unwrap_or_else(|e| panic!("{}: {e}", p.slug));
        assert_eq!(s.footprint.items.len(), p.items, "{}", p.slug);
        assert_eq!(s.footprint.friends.len(), p.friends, "{}", p.slug);
        let guess = |id: &str| {
            let (a, attr) = priors.attribute(id).unwrap();
            let post = s.exposure.posterior(a);
            (attr.values[post.best].id.clone(), post.probability)
        };
        for (id, truth) in [
            ("age_band", &p.age_band),
            ("home_country", &p.country),
            ("home_region", &p.region),
        ] {
            let (g, prob) = guess(id);
            assert_eq!(&g, truth, "{}: {id} {g} at {prob:.2}", p.slug);
        }
        for attr in priors.attributes.clone() {
            let (g, prob) = guess(&attr.id);
            let truth = match attr.id.as_str() {
                "religion" => Some(&p.religion),
                "age_band" => Some(&p.age_band),
                "home_country" => Some(&p.country),
                "home_region" => Some(&p.region),
                _ => None,
            };
            if truth.is_some_and(|t| *t != g) {
                assert!(
                    prob < 0.9,
                    "{}: {} {g} at {prob:.2}, wrong",
                    p.slug,
                    attr.id
                );
            }
        }
        let limits = Limits::default();
        let mut archive = Archive::open(&root.join(&p.archive), &limits).unwrap();
        let d = draft(&mut archive, priors, &limits);
        assert_eq!(d.sources.len(), 5, "{}", p.slug);
        assert!(d.sources.iter().all(|s| s.kind.sure), "{}", d.to_toml());
    }
}
