//! Tests of the reading limits on a priors file (names, items, attributes, values,
//! aliases, member lists, the file's size) and of a cache whose checksum matches but
//! whose contents are absurd or over this run's limits. Each checks the message names
//! the file, the field and the limit, and that what is within the limits is kept.

use super::cache::{cache_path, decode, encode};
use super::{Error, Priors};
use crate::limits::{LimitName, Limits};

fn priors_text(items: &str) -> String {
    format!(
        r#"{{"format": 1,
  "provenance": {{"source": "test", "licence": "CC0-1.0", "created": "2026-12-04",
    "method": "invented", "synthetic": true}},
  "attributes": [{{"id": "politics", "label": "Political leaning", "threshold": 0.4375,
    "values": [{{"id": "left", "label": "Left", "base_rate": 0.5}},
               {{"id": "right", "label": "Right", "base_rate": 0.5}}]}}],
  "items": [{items}]}}"#
    )
}

const GOOD: &str =
    r#"{"id": "p1", "name": "Weekend Pottery Fans", "members": {"politics": [10, 30]}}"#;

fn limit_of(e: Error) -> (LimitName, String) {
    let text = e.to_string();
    match e {
        Error::Limit { name, .. } => (name, text),
        other => panic!("expected a limit error, got {other}"),
    }
}

#[test]
fn a_name_over_the_limit_skips_its_item_with_a_short_warning() {
    let long = "x".repeat(5000);
    let items = format!(r#"{GOOD}, {{"name": "{long}", "members": {{"politics": [1, 1]}}}}"#);
    {
        let p = Priors::parse(&priors_text(&items), "t.json").expect("parse");
        assert_eq!(p.len_items(), 1);
        assert_eq!(p.warnings.len(), 1, "{:?}", p.warnings);
        let w = &p.warnings[0];
        assert!(
            w.contains("items[1]") && w.contains("the name is 5,000 bytes long"),
            "{w}"
        );
        assert!(w.contains("over the limit of 4.0 KiB (name-bytes)"), "{w}");
        assert!(w.contains("--limit name-bytes=SIZE"), "{w}");
        // The warning quotes only the start of the name.
        assert!(w.len() < 400, "{} bytes", w.len());
    }
    // Raised, the item is kept.
    let raised = Limits {
        name_bytes: 8 << 10,
        ..Limits::default()
    };
    let p = Priors::parse_within(&priors_text(&items), "t.json", &raised).expect("parse");
    assert_eq!(p.len_items(), 2);
}

#[test]
fn an_id_or_alias_over_the_limit_is_caught_too() {
    let long = "y".repeat(100);
    let small = Limits {
        name_bytes: 50,
        aliases: 2,
        ..Limits::default()
    };
    let items = format!(
        r#"{GOOD}, {{"id": "{long}", "name": "B", "members": {{}}}},
           {{"name": "C", "aliases": ["c1", "{long}", "c3", "c4"], "members": {{}}}}"#
    );
    let p = Priors::parse_within(&priors_text(&items), "t.json", &small).expect("parse");
    assert_eq!(p.len_items(), 2, "{:?}", p.warnings);
    let all = p.warnings.join("\n");
    assert!(
        all.contains("items[1] ('B'): the id is 100 bytes long"),
        "{all}"
    );
    assert!(
        all.contains("items[2] ('C'): 4 aliases, over the limit of 2 (aliases); the first 2 kept"),
        "{all}"
    );
    assert!(
        all.contains("items[2] ('C'): alias 1 is over the limit of 50 bytes (name-bytes)"),
        "{all}"
    );
    // The kept alias matches; the dropped ones do not.
    let probe = |name: &str| crate::footprint::Item {
        name: name.into(),
        id: None,
        kind: crate::footprint::ItemKind::Like,
        category: None,
        date: None,
        origin: crate::footprint::Origin {
            file: "x".into(),
            record: 1,
        },
    };
    assert!(p.find(&probe("c1")).is_some());
    assert!(p.find(&probe("c3")).is_none());
}

#[test]
fn too_many_items_stop_the_file_whichever_comes_first() {
    let items = [
        GOOD.replace("p1", "a"),
        GOOD.replace("p1", "b"),
        GOOD.replace("p1", "c"),
    ]
    .join(", ");
    let text = priors_text(&items);
    let at = text.find("\"items\"").expect("items");
    let attrs = text.find("\"attributes\"").expect("attributes");
    let reordered = format!(
        "{}{}, {}}}",
        &text[..attrs],
        text[at..text.len() - 1].trim_end(),
        text[attrs..at].trim_end().trim_end_matches(',')
    );
    let small = Limits {
        priors_items: 2,
        ..Limits::default()
    };
    for t in [&text, &reordered] {
        let (name, msg) = limit_of(Priors::parse_within(t, "t.json", &small).expect_err("refused"));
        assert_eq!(name, LimitName::PriorsItems);
        assert!(
            msg.starts_with("t.json: the file lists more than 2 reference items"),
            "{msg}"
        );
        assert!(msg.contains("--limit priors-items=N"), "{msg}");
    }
    let ok = Limits {
        priors_items: 3,
        ..Limits::default()
    };
    assert_eq!(
        Priors::parse_within(&reordered, "t.json", &ok)
            .expect("parse")
            .len_items(),
        3
    );
}

#[test]
fn too_many_values_or_attributes_or_long_labels_refuse_the_file() {
    let text = priors_text(GOOD);
    let few_values = Limits {
        values: 1,
        ..Limits::default()
    };
    let (name, msg) =
        limit_of(Priors::parse_within(&text, "t.json", &few_values).expect_err("values"));
    assert_eq!(name, LimitName::Values);
    assert!(
        msg.contains("attributes[0] (politics) has 2 values, over the limit of 1"),
        "{msg}"
    );
    let no_attributes = Limits {
        attributes: 0,
        ..Limits::default()
    };
    let (name, _) =
        limit_of(Priors::parse_within(&text, "t.json", &no_attributes).expect_err("attributes"));
    assert_eq!(name, LimitName::Attributes);
    let short = Limits {
        name_bytes: 5,
        ..Limits::default()
    };
    let (name, msg) = limit_of(Priors::parse_within(&text, "t.json", &short).expect_err("label"));
    assert_eq!(name, LimitName::NameBytes);
    assert!(
        msg.contains("provenance.source") || msg.contains("attributes[0]"),
        "{msg}"
    );
    let tiny = Limits {
        priors_bytes: 100,
        ..Limits::default()
    };
    let (name, msg) = limit_of(Priors::parse_within(&text, "t.json", &tiny).expect_err("size"));
    assert_eq!(name, LimitName::PriorsBytes);
    assert!(
        msg.contains("over the limit of 100 bytes (priors-bytes"),
        "{msg}"
    );
}

#[test]
fn long_member_lists_are_not_kept_whole_but_counted() {
    let counts = vec!["1"; 50_000].join(",");
    let many_keys: Vec<String> = (0..400).map(|i| format!("\"k{i}\": [1, 2]")).collect();
    let items = format!(
        r#"{{"name": "A", "members": {{"politics": [{counts}]}}}},
           {{"name": "B", "members": {{"politics": {{"shares": [{counts}], "n": 3}}}}}},
           {{"name": "C", "members": {{{}}}}}"#,
        many_keys.join(", ")
    );
    let p = Priors::parse(&priors_text(&items), "t.json").expect("parse");
    let all = p.warnings.join("\n");
    assert!(
        all.contains("items[0] ('A'): 'politics' has 50000 counts for 2 values; ignored"),
        "{all}"
    );
    assert!(
        all.contains("items[1] ('B'): 'politics' has 50000 counts for 2 values; ignored"),
        "{all}"
    );
    assert!(
        all.contains(
            "items[2] ('C'): members for 400 attributes, over the limit of 256 (attributes)"
        ),
        "{all}"
    );
}

/// A cache whose checksum matches (as one edited with care, or written by a broken
/// build, would) but whose attributes are absurd is refused like a damaged one.
#[test]
fn a_cache_with_absurd_values_is_refused() {
    let text = priors_text(GOOD);
    let hash = blake3::hash(text.as_bytes());
    let good = Priors::parse(&text, "t").expect("parse");
    assert!(decode(&encode(&good, &hash), &hash, "t").is_ok());
    type Edit = (&'static str, fn(&mut Priors));
    let edits: Vec<Edit> = vec![
        ("threshold 7", |p| p.attributes[0].threshold = 7.0),
        ("threshold NaN", |p| p.attributes[0].threshold = f64::NAN),
        ("negative base rate", |p| {
            p.attributes[0].base_rates = vec![-0.5, 1.5]
        }),
        ("rates not summing to 1", |p| {
            p.attributes[0].member_rates = vec![0.9, 0.9]
        }),
        ("log base out of step", |p| {
            p.attributes[0].log_base[0] = 0.0
        }),
        ("zero smoothing and pseudocount", |p| {
            p.attributes[0].smoothing = 0.0;
            p.attributes[0].pseudocount = 0.0;
        }),
        ("temperature 0", |p| {
            p.attributes[0].calibration = super::Calibration::Temperature { lambda: 0.0 }
        }),
        ("a value twice", |p| {
            p.attributes[0].values[1].id = "left".into()
        }),
        ("an attribute twice", |p| {
            let a = p.attributes[0].clone();
            p.attributes.push(a);
            p.store.value_counts.push(2);
        }),
    ];
    for (what, edit) in edits {
        let mut p = good.clone();
        edit(&mut p);
        assert_eq!(
            decode(&encode(&p, &hash), &hash, "t").err(),
            Some("its contents are inconsistent"),
            "{what}"
        );
    }
}

/// A cache read under lower limits than it was made with is not used: the JSON is
/// read instead, and its own limit message stops the load.
#[test]
fn a_cache_over_this_runs_limits_is_not_used() {
    let dir = tempfile::tempdir().expect("tempdir");
    let json = dir.path().join("p.json");
    let items = format!(
        r#"{GOOD}, {{"name": "{}", "members": {{}}}}"#,
        "n".repeat(3000)
    );
    let text = priors_text(&items);
    std::fs::write(&json, &text).expect("write");
    let cache = dir.path().join("cache");
    std::fs::create_dir(&cache).expect("mkdir");
    let good = Priors::parse(&text, "t").expect("parse");
    let target = cache_path(&cache, &blake3::hash(text.as_bytes()));
    std::fs::write(&target, encode(&good, &blake3::hash(text.as_bytes()))).expect("cache");
    let p = Priors::load_cached(&json, Some(&cache)).expect("load");
    assert!(
        p.cache_notes[0].starts_with("read from the cache"),
        "{:?}",
        p.cache_notes
    );
    let lower = Limits {
        name_bytes: 1000,
        ..Limits::default()
    };
    let p = Priors::load_cached_within(&json, Some(&cache), &lower).expect("load");
    assert_eq!(p.len_items(), 1);
    assert!(
        p.cache_notes[0].contains("was not used (over one of this run's reading limits)"),
        "{:?}",
        p.cache_notes
    );
    assert!(super::is_cache_problem(&p.cache_notes[0]));
    assert!(p.warnings[0].contains("name-bytes"), "{:?}", p.warnings);
}
