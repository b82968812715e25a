//! Broken input gets clear messages naming the file, record and field, and the rest of
//! the import goes on.

use std::io::Write;
use std::path::Path;

use telltale::archive::Archive;
use telltale::footprint::ItemKind;
use telltale::import::import;
use telltale::limits::Limits;
use telltale::mapping::{Error as MappingError, Mapping};

fn write(dir: &Path, rel: &str, text: &str) {
    let p = dir.join(rel);
    std::fs::create_dir_all(p.parent().expect("parent")).expect("mkdir");
    std::fs::write(p, text).expect("write");
}

const MAPPING: &str = r#"
format = 1
[[source]]
kind = "like"
files = ["likes.json"]
records = "$.likes[*]"
name = "$.title"
date = "$.at"

[[source]]
kind = "group"
files = ["groups.csv"]
name = "Group"
date = "Joined"

[[source]]
kind = "follow"
files = ["follows.ndjson"]
name = "$.who"

[[source]]
kind = "event"
files = ["events/*.json"]
name = "$.title"
"#;

#[test]
fn bad_records_become_warnings_and_the_rest_is_imported() {
    let dir = tempfile::tempdir().expect("tempdir");
    write(
        dir.path(),
        "likes.json",
        r#"{"likes": [
            {"title": "Good page", "at": 1600000000},
            {"at": 1600000001},
            {"title": {"nested": "object"}},
            {"title": "Bad date page", "at": "yesterday"},
            {"title": "Another good page"}
        ]}"#,
    );
    write(
        dir.path(),
        "groups.csv",
        "Group,Joined\nChess Circle,2020-01-02\nRagged Row\nToo,Many,Fields\n",
    );
    write(
        dir.path(),
        "follows.ndjson",
        "{\"who\": \"A\"}\n{not json}\n\n{\"who\": \"B\"}\n",
    );
    write(dir.path(), "events/broken.json", "{\"title\": \"cut off");
    let mapping = Mapping::parse(MAPPING, "test-mapping.toml").expect("mapping");
    let mut archive = Archive::open(dir.path(), &Limits::default()).expect("archive");
    let fp = import(&mut archive, &mapping, &Limits::default()).expect("import goes on");

    assert_eq!(fp.count(ItemKind::Like), 3, "three likes have names");
    assert_eq!(fp.count(ItemKind::Group), 3, "ragged rows are still read");
    assert_eq!(fp.count(ItemKind::Follow), 2, "the bad line is skipped");
    assert_eq!(fp.count(ItemKind::Event), 0);
    let bad_date = fp
        .items
        .iter()
        .find(|i| &*i.name == "Bad date page")
        .expect("kept");
    assert_eq!(
        bad_date.date, None,
        "an unreadable date is left out, the item kept"
    );

    let msgs: Vec<String> = fp.warnings.iter().map(|w| w.to_string()).collect();
    let has = |needle: &str| msgs.iter().any(|m| m.contains(needle));
    assert!(
        has("likes.json, record 2, field 'name': no name"),
        "{msgs:#?}"
    );
    assert!(
        has("likes.json, record 3, field 'name': expected a single value, found an object"),
        "{msgs:#?}"
    );
    assert!(has("likes.json, record 4, field 'date'"), "{msgs:#?}");
    assert!(has("follows.ndjson, line 2: not valid JSON"), "{msgs:#?}");
    // The place is said once: serde_json's own " at line L column C" is left off.
    assert!(!has(" at line "), "{msgs:#?}");
    assert!(has("events/broken.json"), "{msgs:#?}");
    assert!(has("truncated"), "{msgs:#?}");
    assert!(
        has("groups.csv") && has("different number of fields"),
        "{msgs:#?}"
    );
    assert_eq!(fp.stats.records_skipped, 2);
}

#[test]
fn a_bad_mapping_lists_every_problem_with_its_line() {
    let text = "format = 1\n\n[[source]]\nkind = \"likes\"\nfiles = [\"a.json\"]\nname = \"$[\"\n";
    let err = Mapping::parse(text, "my-mapping.toml").unwrap_err();
    let msg = err.to_string();
    assert!(matches!(err, MappingError::Invalid { .. }));
    assert!(
        msg.starts_with("my-mapping.toml: the mapping has 2 problems"),
        "{msg}"
    );
    assert!(
        msg.contains("line 4, source[1].kind: 'likes' is not a kind"),
        "{msg}"
    );
    assert!(msg.contains("line 6, source[1].name"), "{msg}");
}

#[test]
fn a_mapping_that_matches_nothing_says_so() {
    let dir = tempfile::tempdir().expect("tempdir");
    write(dir.path(), "other.txt", "hello");
    let mapping = Mapping::parse(MAPPING, "test-mapping.toml").expect("mapping");
    let mut archive = Archive::open(dir.path(), &Limits::default()).expect("archive");
    let fp = import(&mut archive, &mapping, &Limits::default()).expect("import");
    assert!(fp.items.is_empty());
    assert_eq!(fp.warnings.len(), 4);
    assert!(
        fp.warnings[0]
            .to_string()
            .contains("matched no file in the archive")
    );
}

#[test]
fn an_oversized_zip_entry_is_refused_by_name() {
    let dir = tempfile::tempdir().expect("tempdir");
    let zip_path = dir.path().join("big.zip");
    {
        let f = std::fs::File::create(&zip_path).expect("create");
        let mut z = zip::ZipWriter::new(f);
        let opts = zip::write::SimpleFileOptions::default();
        z.start_file("likes.json", opts).expect("start");
        // 2 MiB of highly compressible JSON.
        write!(
            z,
            "{{\"likes\": [{}]}}",
            vec!["{\"title\":\"x\"}"; 150_000].join(",")
        )
        .expect("write");
        z.finish().expect("finish");
    }
    let limits = Limits {
        entry_bytes: 1 << 20,
        ..Limits::default()
    };
    let mapping = Mapping::parse(MAPPING, "test-mapping.toml").expect("mapping");
    let mut archive = Archive::open(&zip_path, &limits).expect("archive");
    let err = import(&mut archive, &mapping, &limits)
        .unwrap_err()
        .to_string();
    assert!(err.contains("likes.json"), "{err}");
    assert!(err.contains("--limit entry-bytes="), "{err}");
}

#[test]
fn a_missing_mapping_says_how_to_draft_one() {
    let dir = tempfile::tempdir().expect("tempdir");
    let archive_dir = dir.path().join("my-archive");
    write(&archive_dir, "x.json", "[]");
    let mut archive = Archive::open(&archive_dir, &Limits::default()).expect("archive");
    let err = telltale::mapping::locate(&mut archive)
        .unwrap_err()
        .to_string();
    assert!(err.contains("telltale mapping draft"), "{err}");
    assert!(err.contains("--mapping FILE"), "{err}");
    // The draft is suggested under a name telltale then finds by itself: the
    // archive's own, beside it.
    let beside = dir.path().join("my-archive.mapping.toml");
    assert!(err.contains(&format!("> {}", beside.display())), "{err}");
    std::fs::write(
        &beside,
        "format = 1\n[[source]]\nkind = \"like\"\nfiles = [\"x.json\"]\nname = \"$.n\"\n",
    )
    .expect("write");
    let found = telltale::mapping::locate(&mut archive).expect("found beside");
    assert_eq!(found.origin, beside.display().to_string());
}

#[test]
fn not_an_archive_and_damaged_zip_are_named() {
    let dir = tempfile::tempdir().expect("tempdir");
    let txt = dir.path().join("notes.txt");
    std::fs::write(&txt, "just text").expect("write");
    let err = Archive::open(&txt, &Limits::default())
        .err()
        .expect("refused")
        .to_string();
    assert!(
        err.contains("notes.txt: not a zip file or a folder"),
        "{err}"
    );
    let bad = dir.path().join("cut.zip");
    std::fs::write(&bad, b"PK\x03\x04 truncated").expect("write");
    let err = Archive::open(&bad, &Limits::default())
        .err()
        .expect("refused")
        .to_string();
    assert!(
        err.contains("cut.zip: the zip file is damaged or truncated"),
        "{err}"
    );
}

/// A friends file naming a home in a country the priors' location values do not
/// cover, and a priors file whose location values include codes no gazetteer knows:
/// each gets one message naming its file (and the friends file's row) and the value,
/// a real place named as a place in its country (GeoNames, through the bundled
/// gazetteer: Lagos is in Nigeria), and nothing is lost: the scan goes on, the friends
/// keep their values, the other location values still count.
#[test]
fn places_the_priors_do_not_cover_are_named_with_their_file() {
    use telltale::scan::{Scan, ScanInput, load_priors};
    let tmp = tempfile::tempdir().expect("tmp");
    let root = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let friends = tmp.path().join("my-friends.csv");
    std::fs::write(
        &friends,
        "name,location\nAda Quill,Lagos\nBo Reyes,Oregon\nCy New,Lemuria\nDee Fox,Lagos\n",
    )
    .expect("write");
    // Priors whose first two location values are no place: one code of no country,
    // one name of no place.
    let text = std::fs::read_to_string(root.join("reference-priors/demo-priors.json"))
        .expect("bundled priors");
    let mut doc: serde_json::Value = serde_json::from_str(&text).expect("json");
    let loc = doc["attributes"]
        .as_array_mut()
        .expect("attributes")
        .iter_mut()
        .find(|a| a["id"] == "location")
        .expect("location");
    loc["values"][0]["id"] = "ZZ-QQ".into();
    loc["values"][0]["label"] = "Nowhere Province".into();
    loc["values"][1]["id"] = "atlantis".into();
    loc["values"][1]["label"] = "Atlantis".into();
    let priors_path = tmp.path().join("odd-priors.json");
    std::fs::write(&priors_path, doc.to_string()).expect("write");
    let mut priors = load_priors(Some(&priors_path)).expect("the odd priors still load");
    let input = ScanInput {
        archive: root.join("demo-exports/reporter"),
        friends_file: Some(friends.clone()),
        ..ScanInput::default()
    };
    let scan = Scan::run(&input, &mut priors).expect("the scan goes on");
    let said: Vec<String> = scan
        .footprint
        .warnings
        .iter()
        .map(|w| w.to_string())
        .collect();
    let lagos = said
        .iter()
        .find(|w| w.contains("'Lagos'"))
        .unwrap_or_else(|| panic!("{said:#?}"));
    assert!(lagos.contains("my-friends.csv"), "{lagos}");
    assert!(lagos.contains("record 1"), "{lagos}");
    assert!(
        lagos.contains("Nigeria") && lagos.contains("United States"),
        "{lagos}"
    );
    assert!(lagos.contains("2 times"), "{lagos}");
    let nowhere = said
        .iter()
        .find(|w| w.contains("'Lemuria'"))
        .unwrap_or_else(|| panic!("{said:#?}"));
    assert!(
        nowhere.contains("record 3") && !nowhere.contains("a place in"),
        "{nowhere}"
    );
    let codes = said
        .iter()
        .find(|w| w.contains("'ZZ-QQ'"))
        .unwrap_or_else(|| panic!("{said:#?}"));
    assert!(codes.contains("odd-priors.json"), "{codes}");
    assert!(
        codes.contains("'atlantis'") && codes.contains("2 of location's values"),
        "{codes}"
    );
    // Nothing lost: every friend keeps the value the file gave.
    let lagos_friends = scan
        .footprint
        .friends
        .iter()
        .filter(|f| f.attributes.get("location").map(String::as_str) == Some("Lagos"))
        .count();
    assert_eq!(lagos_friends, 2);
    assert!(
        scan.exposure.posterior(1).probability > 0.5,
        "Oregon still read"
    );
}
