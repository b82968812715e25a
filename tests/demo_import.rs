//! The bundled demo: both invented layouts import exactly what the generator wrote
//! (demo-exports/manifest.json), the generator reproduces the checked-in files from its
//! seed, and the personas' self-declared values come through.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use telltale::footprint::ItemKind;
use telltale::scan::{Scan, ScanInput, load_priors};
use telltale::synth::{DemoConfig, PersonaManifest, generate_demo};

fn manifest(dir: &Path) -> Vec<PersonaManifest> {
    let text = std::fs::read_to_string(dir.join("manifest.json")).expect("manifest");
    serde_json::from_str(&text).expect("manifest parses")
}

fn scan(dir: &Path, p: &PersonaManifest) -> Scan {
    let mut priors = load_priors(None).expect("bundled priors");
    let input = ScanInput {
        archive: dir.join(&p.archive),
        mapping: None, // found beside the archive, as a user would rely on
        ..ScanInput::default()
    };
    Scan::run(&input, &mut priors).unwrap_or_else(|e| panic!("{}: {e}", p.slug))
}

#[test]
fn both_layouts_import_exactly_what_was_written() {
    let dir = PathBuf::from("demo-exports");
    let personas = manifest(&dir);
    assert!(personas.len() >= 4);
    let layouts: std::collections::BTreeSet<&str> =
        personas.iter().map(|p| p.layout.as_str()).collect();
    assert_eq!(layouts.len(), 2, "both layouts are in the demo");
    for p in &personas {
        let s = scan(&dir, p);
        let fp = &s.footprint;
        assert_eq!(fp.count(ItemKind::Like), p.likes, "{} likes", p.slug);
        assert_eq!(fp.count(ItemKind::Group), p.groups, "{} groups", p.slug);
        assert_eq!(fp.count(ItemKind::Follow), p.follows, "{} follows", p.slug);
        assert_eq!(fp.count(ItemKind::Event), p.events, "{} events", p.slug);
        assert_eq!(fp.friends.len(), p.friends, "{} friends", p.slug);
        // One item count: the manifest's, the footprint's and every report's agree.
        assert_eq!(fp.items.len(), p.items, "{} items", p.slug);
        assert_eq!(
            p.items,
            p.likes + p.groups + p.follows + p.events,
            "{} items are likes, groups, follows and events",
            p.slug
        );
        assert_eq!(fp.stats.duplicates_merged, 0, "{}", p.slug);
        assert!(fp.warnings.is_empty(), "{}: {:?}", p.slug, fp.warnings);
        let declared: Vec<&str> = ["age_band", "location", "politics", "religion"]
            .iter()
            .map(|a| fp.declared.get(*a).map(String::as_str).unwrap_or("?"))
            .collect();
        assert_eq!(
            declared,
            p.truth.iter().map(String::as_str).collect::<Vec<_>>(),
            "{}",
            p.slug
        );
        // Every listed item is in the reference table: all of them match.
        assert_eq!(
            s.exposure.evidence().matched_items,
            p.listed_items,
            "{} matched",
            p.slug
        );
    }
}

#[test]
fn layout_b_repairs_damaged_text() {
    let dir = PathBuf::from("demo-exports");
    let student = manifest(&dir)
        .into_iter()
        .find(|p| p.layout == "B")
        .expect("a layout B persona");
    let s = scan(&dir, &student);
    let names: Vec<&str> = s.footprint.items.iter().map(|i| &*i.name).collect();
    assert!(
        names.iter().any(|n| n.contains("Café")),
        "accented names restored: {names:?}"
    );
    assert!(
        !names.iter().any(|n| n.contains("Ã")),
        "no damaged text left"
    );
}

/// Every file under `dir`, relative path → bytes.
fn tree(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    walkdir::WalkDir::new(dir)
        .into_iter()
        .filter_map(Result::ok)
        .filter(|e| e.file_type().is_file())
        .map(|e| {
            let rel = e
                .path()
                .strip_prefix(dir)
                .unwrap_or(e.path())
                .to_string_lossy()
                .into_owned();
            (rel, std::fs::read(e.path()).expect("read"))
        })
        .collect()
}

#[test]
fn the_generator_reproduces_the_checked_in_demo() {
    let tmp = tempfile::tempdir().expect("tempdir");
    let priors = tmp.path().join("demo-priors.json");
    let exports = tmp.path().join("demo-exports");
    generate_demo(&DemoConfig::default(), &priors, &exports).expect("generate");
    assert_eq!(
        std::fs::read(&priors).expect("priors"),
        std::fs::read("reference-priors/demo-priors.json").expect("checked-in priors"),
        "reference-priors/demo-priors.json is stale: run `cargo run --release -- synth demo --out . --force`"
    );
    let fresh = tree(&exports);
    let shipped = tree(Path::new("demo-exports"));
    assert_eq!(
        fresh.keys().collect::<Vec<_>>(),
        shipped.keys().collect::<Vec<_>>(),
        "demo-exports has different files than the generator writes"
    );
    for (path, bytes) in &fresh {
        assert!(
            shipped[path] == *bytes,
            "demo-exports/{path} is stale: run `cargo run --release -- synth demo --out . --force`"
        );
    }
}

/// Items with the same category share one string (a large archive repeats a few
/// topics over thousands of items), and sharing changes no item's category.
#[test]
fn equal_categories_share_one_string() {
    let dir = PathBuf::from("demo-exports");
    let mut repeats = 0;
    for p in &manifest(&dir) {
        let s = scan(&dir, p);
        let mut first: BTreeMap<&str, &std::sync::Arc<str>> = BTreeMap::new();
        for it in &s.footprint.items {
            let Some(c) = &it.category else { continue };
            match first.get(&**c) {
                Some(shared) => {
                    assert!(std::sync::Arc::ptr_eq(shared, c), "{}: '{c}'", p.slug);
                    repeats += 1;
                }
                None => {
                    first.insert(c, c);
                }
            }
        }
    }
    // Layout A maps categories (layout B has none): there are repeats to check.
    assert!(repeats > 0, "no repeated category to check");
}
