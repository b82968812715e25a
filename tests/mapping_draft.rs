//! The mapping drafter (`telltale mapping draft`): on both invented demo layouts its
//! drafts import exactly what the hand-written mappings import and what the generator
//! wrote (demo-exports/manifest.json); on odd archives (empty, names in other scripts
//! or not valid UTF-8, CSV without dates, deep nesting, huge arrays, broken files,
//! symbolic links) it stays within the reading limits, warns by file and never writes
//! into the archive. The archives built here are invented.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use telltale::archive::Archive;
use telltale::footprint::{Footprint, ItemKind};
use telltale::import::import;
use telltale::limits::Limits;
use telltale::mapping::{Draft, Mapping, SourceKind, check_against, draft};
use telltale::priors::Priors;
use telltale::scan::load_priors;
use telltale::synth::PersonaManifest;

fn priors() -> Priors {
    load_priors(None).expect("bundled priors")
}

fn draft_of(path: &Path, limits: &Limits) -> Draft {
    let mut archive = Archive::open(path, limits).expect("archive opens");
    draft(&mut archive, &priors(), limits)
}

fn import_with(path: &Path, mapping: &Mapping) -> Footprint {
    let limits = Limits::default();
    let mut archive = Archive::open(path, &limits).expect("archive opens");
    import(&mut archive, mapping, &limits).expect("import")
}

/// Items per kind, friends, and declared values: what a mapping brings in.
fn counts(fp: &Footprint) -> BTreeMap<&'static str, usize> {
    let mut m = BTreeMap::new();
    for k in [
        ItemKind::Like,
        ItemKind::Group,
        ItemKind::Follow,
        ItemKind::Event,
    ] {
        m.insert(k.as_str(), fp.count(k));
    }
    m.insert("friend", fp.friends.len());
    m.insert("declared", fp.declared.len());
    m.insert(
        "friend attributes",
        fp.friends.iter().map(|f| f.attributes.len()).sum(),
    );
    m.insert(
        "dated",
        fp.items.iter().filter(|i| i.date.is_some()).count()
            + fp.friends.iter().filter(|f| f.date.is_some()).count(),
    );
    m
}

fn write(dir: &Path, rel: &str, bytes: impl AsRef<[u8]>) {
    let p = dir.join(rel);
    std::fs::create_dir_all(p.parent().expect("parent")).expect("mkdir");
    std::fs::write(p, bytes).expect("write");
}

/// Follow the draft's instruction for an undecided source: remove the leading '# '
/// from its setting lines and set its kind.
fn decide(toml: &str, kind: &str) -> String {
    let mut out = String::new();
    for line in toml.lines() {
        let setting = line.strip_prefix("# ").filter(|rest| {
            rest.starts_with("[[source]]")
                || rest.starts_with("[source.")
                || rest
                    .split_once(" = ")
                    .is_some_and(|(k, _)| k.chars().all(|c| c.is_ascii_lowercase() || c == '_'))
        });
        match setting {
            Some(rest) if rest.starts_with("kind = ") => {
                out.push_str(&format!("kind = \"{kind}\""))
            }
            Some(rest) => out.push_str(rest),
            None => out.push_str(line),
        }
        out.push('\n');
    }
    out
}

#[test]
fn drafts_of_both_demo_layouts_import_what_the_hand_written_mappings_do() {
    let dir = PathBuf::from("demo-exports");
    let text = std::fs::read_to_string(dir.join("manifest.json")).expect("manifest");
    let personas: Vec<PersonaManifest> = serde_json::from_str(&text).expect("manifest parses");
    let layouts: std::collections::BTreeSet<&str> =
        personas.iter().map(|p| p.layout.as_str()).collect();
    assert_eq!(layouts.len(), 2, "both layouts are covered");
    for p in &personas {
        let archive = dir.join(&p.archive);
        let d = draft_of(&archive, &Limits::default());
        assert!(d.warnings().is_empty(), "{}: {:?}", p.slug, d.warnings());
        assert_eq!(d.undecided().count(), 0, "{}: every kind guessed", p.slug);
        let drafted = Mapping::parse(&d.to_toml(), "draft")
            .unwrap_or_else(|e| panic!("{}: the draft parses: {e}\n{}", p.slug, d.to_toml()));
        let hand = Mapping::load(&dir.join(&p.mapping)).expect("hand-written mapping");
        let ours = import_with(&archive, &drafted);
        let theirs = import_with(&archive, &hand);
        assert!(ours.warnings.is_empty(), "{}: {:?}", p.slug, ours.warnings);
        // Against the hand-written mapping: the same counts per kind, friends,
        // friends' attributes, declared values and dates.
        assert_eq!(counts(&ours), counts(&theirs), "{}", p.slug);
        // Against what the generator wrote (demo-exports/manifest.json).
        let fp = &ours;
        assert_eq!(fp.count(ItemKind::Like), p.likes, "{} likes", p.slug);
        assert_eq!(fp.count(ItemKind::Group), p.groups, "{} groups", p.slug);
        assert_eq!(fp.count(ItemKind::Follow), p.follows, "{} follows", p.slug);
        assert_eq!(fp.count(ItemKind::Event), p.events, "{} events", p.slug);
        assert_eq!(fp.friends.len(), p.friends, "{} friends", p.slug);
        let declared: Vec<&str> = ["age_band", "location", "politics", "religion"]
            .iter()
            .map(|a| fp.declared.get(*a).map(String::as_str).unwrap_or("?"))
            .collect();
        assert_eq!(declared, p.truth, "{} declared values", p.slug);
        // The same items, not just as many: names and ids agree.
        let key = |fp: &Footprint| {
            let mut v: Vec<(Box<str>, Option<Box<str>>, String)> = fp
                .items
                .iter()
                .map(|i| (i.name.clone(), i.id.clone(), i.kind.as_str().to_string()))
                .collect();
            v.sort();
            v
        };
        assert_eq!(key(&ours), key(&theirs), "{}", p.slug);
    }
}

#[test]
fn a_draft_of_layout_b_matches_its_top_folder_with_a_star() {
    let d = draft_of(Path::new("demo-exports/student.zip"), &Limits::default());
    assert_eq!(d.top_folder.as_deref(), Some("export"));
    assert!(d.sources.iter().all(|s| s.files[0].starts_with("*/")));
    let mapping = Mapping::parse(&d.to_toml(), "draft").expect("parses");
    assert!(mapping.sources[0].matches("another-name/Likes.csv"));
}

#[test]
fn an_empty_archive_gives_an_empty_draft_that_says_so() {
    let tmp = tempfile::tempdir().expect("tmp");
    let d = draft_of(tmp.path(), &Limits::default());
    assert!(d.sources.is_empty());
    assert!(d.warnings().is_empty());
    let text = d.to_toml();
    assert!(
        text.contains("No set of records with names was found"),
        "{text}"
    );
    // Not a usable mapping yet, and the parser says why.
    let err = Mapping::parse(&text, "draft").expect_err("no source");
    assert!(err.to_string().contains("source"), "{err}");

    // An empty zip too (written by the zip crate).
    let zip_path = tmp.path().join("empty.zip");
    let file = std::fs::File::create(&zip_path).expect("create");
    zip::ZipWriter::new(file).finish().expect("empty zip");
    let d = draft_of(&zip_path, &Limits::default());
    assert!(d.sources.is_empty() && d.warnings().is_empty());
}

#[test]
fn names_in_other_scripts_are_read_as_words() {
    let tmp = tempfile::tempdir().expect("tmp");
    let root = tmp.path();
    // Russian "liked", Japanese "group", Korean "friend" (translations from memory).
    write(
        root,
        "мои данные/понравилось.json",
        r#"[{"название": "Клуб любителей чая", "когда": "2020-05-01T10:00:00+03:00"},
            {"название": "Городской хор", "когда": "2021-06-02T11:30:00+03:00"}]"#,
    );
    write(
        root,
        "データ/グループ.csv",
        "名前,参加日\nお茶の会 東京,1600000000\n山歩き 仲間,1610000000\n写真 同好会,1620000000\n",
    );
    write(
        root,
        "친구.ndjson",
        "{\"이름\": \"가 나\", \"id\": \"a1\"}\n{\"이름\": \"다 라\", \"id\": \"a2\"}\n",
    );
    let d = draft_of(root, &Limits::default());
    let kind_of = |file: &str| {
        d.sources
            .iter()
            .find(|s| s.paths.iter().any(|p| p.ends_with(file)))
            .map(|s| (s.kind.kind, s.kind.sure, s.records))
    };
    assert_eq!(
        kind_of("понравилось.json"),
        Some((SourceKind::Item(ItemKind::Like), true, 2))
    );
    assert_eq!(
        kind_of("グループ.csv"),
        Some((SourceKind::Item(ItemKind::Group), true, 3))
    );
    assert_eq!(kind_of("친구.ndjson"), Some((SourceKind::Friend, true, 2)));
    let mapping = Mapping::parse(&d.to_toml(), "draft").expect("parses");
    let fp = import_with(root, &mapping);
    assert!(fp.warnings.is_empty(), "{:?}", fp.warnings);
    assert_eq!(fp.count(ItemKind::Like), 2);
    assert_eq!(fp.count(ItemKind::Group), 3);
    assert_eq!(fp.friends.len(), 2);
    // RFC 3339 with an offset and Unix seconds are both read as dates:
    // 2020-05-01T10:00:00+03:00 is 1588316400 (RFC 3339 §5.6; checked with
    // `date -u -d @1588316400`, from memory).
    let dates: Vec<i64> = fp.items.iter().filter_map(|i| i.date).collect();
    assert!(dates.contains(&1_588_316_400), "{dates:?}");
    assert!(dates.contains(&1_600_000_000), "{dates:?}");
}

#[cfg(unix)]
#[test]
fn a_file_name_that_is_not_utf8_is_drafted_and_read() {
    use std::os::unix::ffi::OsStrExt;
    let tmp = tempfile::tempdir().expect("tmp");
    // "grüppen" with ü in Latin-1 (0xFC), which is not valid UTF-8 on its own
    // (Unicode Standard ch. 3, well-formed UTF-8; from memory).
    let name = std::ffi::OsStr::from_bytes(b"gr\xfcppen.json");
    std::fs::write(
        tmp.path().join(name),
        r#"{"rows": [{"label": "North Choir", "n": "x1"}, {"label": "River Walkers", "n": "x2"}]}"#,
    )
    .expect("write");
    let d = draft_of(tmp.path(), &Limits::default());
    assert!(d.warnings().is_empty(), "{:?}", d.warnings());
    assert_eq!(d.sources.len(), 1);
    let s = &d.sources[0];
    // Shown with U+FFFD, the replacement character, in place of the bad byte.
    assert_eq!(s.paths, vec!["gr\u{FFFD}ppen.json".to_string()]);
    assert_eq!(s.records, 2);
    // Nothing says what the rows are: the source is left for the user to decide.
    assert!(!s.kind.sure);
    let text = d.to_toml();
    assert!(text.contains("LEFT FOR YOU TO DECIDE"), "{text}");
    let decided = decide(&text, "group");
    let mapping = Mapping::parse(&decided, "decided").expect("decided draft parses");
    let fp = import_with(tmp.path(), &mapping);
    assert!(fp.warnings.is_empty(), "{:?}", fp.warnings);
    assert_eq!(fp.count(ItemKind::Group), 2);
}

#[test]
fn a_csv_without_dates_gets_no_date_and_says_so() {
    let tmp = tempfile::tempdir().expect("tmp");
    write(
        tmp.path(),
        "exports/followed accounts.csv",
        "Account name,Handle\nMoss Valley Birders,mvb\nThe Quiet Loom,tql\nHarbour Chess Club,hcc\n",
    );
    let d = draft_of(tmp.path(), &Limits::default());
    assert_eq!(d.sources.len(), 1);
    let s = &d.sources[0];
    assert_eq!(s.kind.kind, SourceKind::Item(ItemKind::Follow));
    assert_eq!(s.roles.date, None);
    let text = d.to_toml();
    assert!(text.contains("# date: no field reads as dates"), "{text}");
    let mapping = Mapping::parse(&text, "draft").expect("parses");
    let fp = import_with(tmp.path(), &mapping);
    assert_eq!(fp.count(ItemKind::Follow), 3);
    assert!(fp.items.iter().all(|i| i.date.is_none()));
    let names: Vec<&str> = fp.items.iter().map(|i| i.name.as_ref()).collect();
    assert!(names.contains(&"Moss Valley Birders"), "{names:?}");
    assert!(fp.items.iter().any(|i| i.id.as_deref() == Some("mvb")));
}

#[test]
fn records_deep_inside_json_are_found_and_too_deep_files_are_warned_about() {
    let tmp = tempfile::tempdir().expect("tmp");
    // Ten levels of wrapping around the list of liked things.
    let mut doc = String::from(
        r#"[{"title": "Lantern Makers", "when": 1500000000}, {"title": "Salt Marsh Walks", "when": 1500000100}, {"title": "Old Maps Circle", "when": 1500000200}]"#,
    );
    for level in (0..10).rev() {
        doc = format!("{{\"level{level}\": {doc}}}");
    }
    write(tmp.path(), "likes.json", &doc);
    // Nested past the JSON depth limit: refused with a warning naming the file.
    let deep = format!("{}1{}", "[".repeat(300), "]".repeat(300));
    write(tmp.path(), "deep/too-deep.json", &deep);
    let d = draft_of(tmp.path(), &Limits::default());
    let warnings = d.warnings();
    assert_eq!(warnings.len(), 1, "{warnings:?}");
    assert!(
        warnings[0].starts_with("deep/too-deep.json: ") && warnings[0].contains("128"),
        "{warnings:?}"
    );
    assert_eq!(d.sources.len(), 1);
    let mapping = Mapping::parse(&d.to_toml(), "draft").expect("parses");
    assert_eq!(
        mapping.sources[0].records.as_ref().map(|f| f.describe()),
        Some("$.level0.level1.level2.level3.level4.level5.level6.level7.level8.level9[*]")
    );
    let fp = import_with(tmp.path(), &mapping);
    assert_eq!(fp.count(ItemKind::Like), 3);
}

#[test]
fn a_huge_array_is_counted_whole_but_bounded_by_the_limits() {
    let tmp = tempfile::tempdir().expect("tmp");
    let n = 150_000;
    let mut text = String::with_capacity(n * 60);
    for i in 0..n {
        text.push_str(&format!(
            "{{\"event title\": \"Open evening number {i}\", \"ref\": \"e{i}\"}}\n"
        ));
    }
    write(tmp.path(), "events.ndjson", &text);
    write(tmp.path(), "z/other.csv", "a,b\n1,2\n");
    let d = draft_of(tmp.path(), &Limits::default());
    // Numbers alone are not names: the small CSV is not drafted.
    assert_eq!(d.sources.len(), 1, "{}", d.to_toml());
    let s = &d.sources[0];
    assert_eq!(s.kind.kind, SourceKind::Item(ItemKind::Event));
    assert_eq!(s.records, n);
    assert!(s.set.profiled < n, "only a sample is profiled");
    assert!(d.to_toml().contains("fields judged on the first"));

    // A file over the per-file byte limit is not read: a warning names the file and
    // the limit.
    let small = Limits {
        entry_bytes: 1 << 20,
        ..Limits::default()
    };
    let d = draft_of(tmp.path(), &small);
    assert!(d.sources.is_empty());
    let w = d.warnings();
    assert!(
        w.iter()
            .any(|w| w.starts_with("events.ndjson: ") && w.contains("entry-bytes")),
        "{w:?}"
    );

    // Past the records limit, the remaining files are not inspected.
    let few = Limits {
        records: 1_000,
        ..Limits::default()
    };
    let d = draft_of(tmp.path(), &few);
    assert!(
        d.warnings()
            .iter()
            .any(|w| w.starts_with("z/other.csv: ") && w.contains("records")),
        "{:?}",
        d.warnings()
    );
}

#[test]
fn broken_files_are_warnings_and_the_rest_is_drafted() {
    let tmp = tempfile::tempdir().expect("tmp");
    write(tmp.path(), "broken.json", "{\"groups\": [ {\"name\": ");
    write(tmp.path(), "binary.csv", [0xff_u8, 0xfe, 0x00, 0x01, 0x80]);
    write(
        tmp.path(),
        "groups.json",
        r#"{"groups": [{"name": "Tide Watchers"}, {"name": "Fern Society"}]}"#,
    );
    let d = draft_of(tmp.path(), &Limits::default());
    let w = d.warnings();
    assert!(w.iter().any(|w| w.starts_with("broken.json: ")), "{w:?}");
    assert_eq!(d.sources.len(), 1);
    assert_eq!(d.sources[0].kind.kind, SourceKind::Item(ItemKind::Group));
    assert!(d.to_toml().contains("# Could not use broken.json: "));
}

#[cfg(unix)]
#[test]
fn symbolic_links_are_not_followed_and_the_archive_is_not_written_to() {
    let outside = tempfile::tempdir().expect("tmp");
    write(
        outside.path(),
        "secret-likes.json",
        r#"[{"title": "Should Not Be Read"}, {"title": "Nor This"}]"#,
    );
    let tmp = tempfile::tempdir().expect("tmp");
    write(
        tmp.path(),
        "likes.json",
        r#"[{"title": "Sea Glass Finders"}, {"title": "Night Trains"}]"#,
    );
    std::os::unix::fs::symlink(
        outside.path().join("secret-likes.json"),
        tmp.path().join("linked-likes.json"),
    )
    .expect("symlink");
    let listing = |p: &Path| {
        let mut v: Vec<(PathBuf, u64, std::time::SystemTime)> = walkdir::WalkDir::new(p)
            .into_iter()
            .filter_map(Result::ok)
            .map(|e| {
                let m = e.path().symlink_metadata().expect("meta");
                (
                    e.path().to_path_buf(),
                    m.len(),
                    m.modified().expect("mtime"),
                )
            })
            .collect();
        v.sort();
        v
    };
    let before = listing(tmp.path());
    let d = draft_of(tmp.path(), &Limits::default());
    assert_eq!(
        listing(tmp.path()),
        before,
        "nothing written into the archive"
    );
    assert!(
        d.warnings()
            .iter()
            .any(|w| w.contains("linked-likes.json") && w.contains("symbolic link")),
        "{:?}",
        d.warnings()
    );
    assert_eq!(d.sources.len(), 1);
    assert_eq!(d.sources[0].paths, vec!["likes.json".to_string()]);
    assert!(!d.to_toml().contains("Should Not Be Read"));
}

#[test]
fn same_shaped_files_in_one_folder_share_a_glob() {
    let tmp = tempfile::tempdir().expect("tmp");
    for (i, names) in [
        ["Brook Runners", "Kiln Club"],
        ["Moth Counters", "Reed Weavers"],
    ]
    .iter()
    .enumerate()
    {
        write(
            tmp.path(),
            &format!("groups [part {i}]/page_{i}.json"),
            format!(
                r#"{{"entries": [{{"name": "{}"}}, {{"name": "{}"}}]}}"#,
                names[0], names[1]
            ),
        );
    }
    // Files in two folders stay separate; put them in one folder, with a file
    // beside it so the folder is not the archive's one top folder.
    write(tmp.path(), "notes.txt", "invented");
    let one = tmp.path().join("groups [part 1]/page_1.json");
    std::fs::rename(&one, tmp.path().join("groups [part 0]/page_1.json")).expect("move");
    let d = draft_of(tmp.path(), &Limits::default());
    assert_eq!(d.sources.len(), 1, "{}", d.to_toml());
    assert_eq!(
        d.sources[0].files,
        vec!["groups [[]part 0[]]/*.json".to_string()]
    );
    assert_eq!(d.sources[0].records, 4);
    let mapping = Mapping::parse(&d.to_toml(), "draft").expect("parses");
    let fp = import_with(tmp.path(), &mapping);
    assert_eq!(fp.count(ItemKind::Group), 4);
}

#[test]
fn check_counts_what_each_source_of_a_mapping_finds() {
    let archive = Path::new("demo-exports/reporter");
    let mapping = Mapping::load(Path::new("demo-exports/telltale-mapping.toml")).expect("map");
    let checks = check_against(&mapping, archive, &Limits::default())
        .expect("check")
        .sources;
    // Against what the generator wrote (demo-exports/manifest.json).
    let text = std::fs::read_to_string("demo-exports/manifest.json").expect("manifest");
    let personas: Vec<PersonaManifest> = serde_json::from_str(&text).expect("parses");
    let p = personas
        .iter()
        .find(|p| p.archive == "reporter")
        .expect("reporter");
    let by_kind: BTreeMap<String, usize> = checks
        .iter()
        .map(|c| (c.kind.to_string(), c.kept))
        .collect();
    let expected: BTreeMap<String, usize> = [
        ("like", p.likes),
        ("group", p.groups),
        ("follow", p.follows),
        ("event", p.events),
        ("friend", p.friends),
        ("self", p.truth.len()),
    ]
    .into_iter()
    .map(|(k, n)| (k.to_string(), n))
    .collect();
    assert_eq!(by_kind, expected);
    let likes = &checks[0];
    assert_eq!(likes.files, vec!["activity/likes.json".to_string()]);
    assert_eq!((likes.records_seen, likes.dated), (p.likes, p.likes));
}

/// The values of a record's own kind field say what a set is when no name does
/// (words in several languages; translations from memory, as the word lists' are):
/// `"kind": "page"` in a file named "bits" is likes, `"tipo": "grupo"` groups; a
/// kind value no list knows leaves the set for the person to decide.
#[test]
fn record_kind_values_say_what_a_set_is() {
    let tmp = tempfile::tempdir().expect("tmp");
    let records = |field: &str, value: &str, names: &[&str]| -> String {
        let rows: Vec<String> = names
            .iter()
            .map(|n| format!(r#"{{"{field}": "{value}", "title": "{n}"}}"#))
            .collect();
        format!("[{}]", rows.join(","))
    };
    write(
        tmp.path(),
        "a/bits.json",
        records(
            "kind",
            "page",
            &["Harbour Kite Fliers", "Slow Bread Bakers"],
        ),
    );
    write(
        tmp.path(),
        "b/lote.json",
        records(
            "tipo",
            "grupo",
            &["Corredores del Río", "Huerta Comunitaria"],
        ),
    );
    write(
        tmp.path(),
        "c/eintraege.json",
        records(
            "art",
            "Veranstaltung",
            &["Sommerfest am See", "Lesung im Park"],
        ),
    );
    write(
        tmp.path(),
        "d/misc.json",
        records("kind", "widget", &["Blue Lantern", "Quiet Harbour"]),
    );
    let d = draft_of(tmp.path(), &Limits::default());
    let kind_of = |file: &str| {
        let s = d
            .sources
            .iter()
            .find(|s| s.set.file == file)
            .unwrap_or_else(|| panic!("{file} not drafted: {}", d.to_toml()));
        (s.kind.kind, s.kind.sure, s.kind.reasons.join("; "))
    };
    let (k, sure, why) = kind_of("a/bits.json");
    assert_eq!((k, sure), (SourceKind::Item(ItemKind::Like), true), "{why}");
    assert!(why.contains("kind field"), "{why}");
    let (k, sure, why) = kind_of("b/lote.json");
    assert_eq!(
        (k, sure),
        (SourceKind::Item(ItemKind::Group), true),
        "{why}"
    );
    let (k, sure, why) = kind_of("c/eintraege.json");
    assert_eq!(
        (k, sure),
        (SourceKind::Item(ItemKind::Event), true),
        "{why}"
    );
    let (_, sure, why) = kind_of("d/misc.json");
    assert!(!sure, "{why}");
}
