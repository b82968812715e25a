//! The evidence sources end to end on the demo personas: lexicon sources only speak
//! where the reference table is silent, every source shows up in the reports with its
//! provenance, special-category items are flagged in every format, and friends' names
//! never reach a report.

use std::collections::HashSet;
use std::path::PathBuf;

use telltale::evidence::{Origin, Sources, Subject};
use telltale::report::{TextOptions, write_json, write_markdown, write_text};
use telltale::scan::{Scan, ScanInput, load_priors};

fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("demo-exports")
        .join(name)
}

fn scan(name: &str, sources: Sources) -> (Scan, telltale::priors::Priors) {
    let mut priors = load_priors(None).unwrap();
    let input = ScanInput {
        archive: demo(name),
        sources,
        ..ScanInput::default()
    };
    (Scan::run(&input, &mut priors).unwrap(), priors)
}

fn render_all(scan: &Scan, priors: &telltale::priors::Priors) -> Vec<String> {
    let r = scan.report(priors);
    let mut out = Vec::new();
    let mut buf = Vec::new();
    write_json(&r, &mut buf).unwrap();
    out.push(String::from_utf8(buf).unwrap());
    let mut buf = Vec::new();
    write_text(
        &r,
        TextOptions {
            colour: false,
            top: 1000,
        },
        &mut buf,
    )
    .unwrap();
    out.push(String::from_utf8(buf).unwrap());
    let mut buf = Vec::new();
    write_markdown(&r, 1000, &mut buf).unwrap();
    out.push(String::from_utf8(buf).unwrap());
    out
}

#[test]
fn lexicons_only_speak_where_the_table_is_silent() {
    let (s, _) = scan("reporter", Sources::all());
    let ev = s.exposure.evidence();
    let table: HashSet<(Subject, usize)> = ev
        .list
        .iter()
        .filter(|e| matches!(e.origin, Origin::Table { .. }))
        .map(|e| (e.subject(), e.attribute()))
        .collect();
    let lexicon: Vec<_> = ev
        .list
        .iter()
        .filter(|e| matches!(e.origin, Origin::Lexicon { .. }))
        .collect();
    assert!(
        !lexicon.is_empty(),
        "the unlisted items carry lexicon evidence"
    );
    for e in lexicon {
        assert!(!table.contains(&(e.subject(), e.attribute())), "{e:?}");
    }
    // Table only: nothing else.
    let (t, _) = scan("reporter", Sources::table_only());
    assert!(
        t.exposure
            .evidence()
            .list
            .iter()
            .all(|e| matches!(e.origin, Origin::Table { .. }))
    );
    assert!(t.exposure.evidence().special.is_empty());
}

#[test]
fn every_format_shows_sources_and_special_categories_but_no_friend_names() {
    let (s, priors) = scan("reporter", Sources::all());
    // Friends' names, except any that also name one of the person's own items (the
    // invented demo names can coincide with a followed account's name).
    let names: Vec<String> = s
        .footprint
        .friends
        .iter()
        .map(|f| f.name.clone())
        .filter(|n| {
            !s.footprint
                .items
                .iter()
                .any(|i| i.name.contains(n.as_str()))
        })
        .collect();
    assert!(names.len() > 100);
    for text in render_all(&s, &priors) {
        for n in &names {
            assert!(!text.contains(n.as_str()), "friend name '{n}' in a report");
        }
        assert!(text.contains("GeoNames"), "provenance of the place source");
        assert!(text.contains("religious or philosophical beliefs"));
        assert!(text.contains("political opinions"));
    }
    let r = s.report(&priors);
    let ids: Vec<&str> = r.sources.iter().map(|s| s.id.as_str()).collect();
    assert_eq!(
        ids,
        ["table", "places", "life-stages", "vocabulary", "friends"]
    );
    let friends = r.friends.expect("friends section");
    assert_eq!(friends.total, 320);
    assert!(friends.attributes.iter().any(|a| a.known > 0));
}

#[test]
fn a_friends_file_adds_what_the_archive_lacks() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("friends.csv");
    // Invented rows: the first matches an archive friend by id, the others are new.
    std::fs::write(
        &csv,
        "id,name,location,religion\nlw-u010951,,US-OR,\n,Pat Example,Oregon,No religion\n,Lee Example,US-OR,none\n",
    )
    .unwrap();
    let mut priors = load_priors(None).unwrap();
    let base = ScanInput {
        archive: demo("reporter"),
        sources: Sources::only(&[telltale::evidence::SourceKind::Friends]),
        ..ScanInput::default()
    };
    let without = Scan::run(&base, &mut priors).unwrap();
    let with = Scan::run(
        &ScanInput {
            friends_file: Some(csv),
            ..base.clone()
        },
        &mut priors,
    )
    .unwrap();
    assert_eq!(
        with.footprint.friends.len(),
        without.footprint.friends.len() + 2
    );
    let loc = priors.attribute("location").unwrap().0;
    let known = |s: &Scan| s.exposure.evidence().friends.as_ref().unwrap().known[loc];
    assert_eq!(
        known(&with),
        known(&without) + 2,
        "one row replaced a known value"
    );
    let or = priors.attributes[loc].value_index("US-OR").unwrap();
    assert!(with.exposure.posterior(loc).probs[or] > without.exposure.posterior(loc).probs[or]);
}
