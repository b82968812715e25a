//! `telltale mapping draft` and `telltale mapping check` as a person runs them: the
//! draft goes to standard output and parses, warnings go to standard error naming the
//! file, check lists what each source finds, and a missing mapping points at the
//! drafter. The archives built here are invented.

use std::path::Path;
use std::process::{Command, Output};

use telltale::mapping::Mapping;

fn telltale(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .env_remove("NO_COLOR")
        .output()
        .expect("run telltale")
}

fn out(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn err(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn draft_prints_a_mapping_that_parses_and_a_summary_on_stderr() {
    let o = telltale(&["mapping", "draft", "demo-exports/student.zip"]);
    assert!(o.status.success(), "{}", err(&o));
    let text = out(&o);
    let m = Mapping::parse(&text, "draft").unwrap_or_else(|e| panic!("{e}\n{text}"));
    assert_eq!(m.sources.len(), 6);
    assert!(err(&o).contains("Drafted 6 sources"), "{}", err(&o));
    assert!(
        !text.contains("Drafted"),
        "the summary stays off standard output"
    );
    // The draft as a newcomer reads it (insta snapshot; review changes with
    // `cargo insta review`).
    insta::assert_snapshot!("student_draft", text);
}

#[test]
fn draft_warns_about_a_bad_file_by_name_and_goes_on() {
    let tmp = tempfile::tempdir().expect("tmp");
    std::fs::write(tmp.path().join("broken.json"), "[{\"title\": ").expect("write");
    std::fs::write(
        tmp.path().join("liked.csv"),
        "Title;When\nHarbour Swims;2022-03-04\nBell Ringers;2023-01-02\n",
    )
    .expect("write");
    let dir = tmp.path().to_string_lossy().into_owned();
    let o = telltale(&["mapping", "draft", &dir]);
    assert!(o.status.success(), "{}", err(&o));
    assert!(
        err(&o).contains("warning: broken.json: "),
        "stderr: {}",
        err(&o)
    );
    let m = Mapping::parse(&out(&o), "draft").expect("parses");
    assert_eq!(m.sources.len(), 1);
    assert_eq!(m.sources[0].delimiter, b';');
    // Nothing was written into the archive.
    let mut names: Vec<String> = std::fs::read_dir(tmp.path())
        .expect("list")
        .map(|e| e.expect("entry").file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    assert_eq!(names, ["broken.json", "liked.csv"]);
}

#[test]
fn draft_of_a_missing_archive_is_a_clear_error() {
    let o = telltale(&["mapping", "draft", "no/such/archive.zip"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(err(&o).contains("no/such/archive.zip"), "{}", err(&o));
}

#[test]
fn check_lists_each_source_with_its_files_and_counts() {
    let o = telltale(&["mapping", "check", "demo-exports/reporter"]);
    assert!(o.status.success(), "{}", err(&o));
    let text = out(&o);
    // Counts from what the generator wrote (demo-exports/manifest.json, reporter).
    let manifest: serde_json::Value = serde_json::from_str(
        &std::fs::read_to_string("demo-exports/manifest.json").expect("manifest"),
    )
    .expect("json");
    let reporter = manifest
        .as_array()
        .and_then(|a| a.iter().find(|p| p["archive"] == "reporter"))
        .expect("reporter");
    for (kind, key, noun) in [
        ("like", "likes", "items"),
        ("group", "groups", "items"),
        ("friend", "friends", "friends"),
    ] {
        let n = reporter[key].as_u64().expect("count");
        assert!(
            text.contains(&format!("{n} {noun} kept")),
            "{kind}: {n} in\n{text}"
        );
    }
    assert!(text.contains("activity/likes.json"));
    assert!(text.contains("Every source found something"), "{text}");
}

#[test]
fn check_exits_3_when_a_source_finds_nothing() {
    let tmp = tempfile::tempdir().expect("tmp");
    let mapping = tmp.path().join("m.toml");
    std::fs::write(
        &mapping,
        "format = 1\n[[source]]\nkind = \"like\"\nfiles = [\"nowhere/*.json\"]\nname = \"$.title\"\n",
    )
    .expect("write");
    let m = mapping.to_string_lossy().into_owned();
    let o = telltale(&["mapping", "check", "demo-exports/reporter", "--mapping", &m]);
    assert_eq!(o.status.code(), Some(3), "{}", err(&o));
    let text = out(&o);
    assert!(text.contains("files:   none match"), "{text}");
    assert!(text.contains("1 source found nothing"), "{text}");
}

#[test]
fn a_missing_mapping_points_at_the_drafter() {
    let tmp = tempfile::tempdir().expect("tmp");
    let archive = tmp.path().join("export");
    std::fs::create_dir(&archive).expect("mkdir");
    std::fs::write(archive.join("likes.json"), "[]").expect("write");
    let a = archive.to_string_lossy().into_owned();
    for cmd in [
        vec!["scan", a.as_str()],
        vec!["mapping", "check", a.as_str()],
    ] {
        let o = telltale(&cmd);
        assert_eq!(o.status.code(), Some(1));
        assert!(
            err(&o).contains("telltale mapping draft"),
            "{cmd:?}: {}",
            err(&o)
        );
    }
    assert!(Path::new(&a).join("likes.json").is_file());
}
