//! The real binary on the bundled demo: the report formats, colour rules, owner-only
//! output files and error messages a person sees.

use std::process::{Command, Output};

fn telltale(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .env_remove("NO_COLOR")
        .output()
        .expect("run telltale")
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

#[test]
fn text_report_off_a_terminal_is_plain() {
    let o = telltale(&["scan", "demo-exports/reporter"]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = stdout(&o);
    assert!(!text.contains('\x1b'), "no colour codes off a terminal");
    for section in [
        "WHAT AN OBSERVER COULD GUESS",
        "ITEMS THAT GIVE THE MOST AWAY",
        "BEFORE YOU ACT ON THIS",
    ] {
        assert!(text.contains(section), "missing {section}");
    }
    for attr in ["Age band", "Home location", "Political leaning", "Religion"] {
        assert!(text.contains(attr), "missing {attr}");
    }
    assert!(
        text.contains("synthetic"),
        "the demo priors are labelled synthetic"
    );
    // Friends are third parties: none of their names reach the report.
    let friends =
        std::fs::read_to_string("demo-exports/reporter/connections/friends.json").expect("friends");
    let v: serde_json::Value = serde_json::from_str(&friends).expect("json");
    let first = v["friends"][0]["name"].as_str().expect("a friend");
    assert!(!text.contains(first));
}

#[test]
fn colour_can_be_forced_and_is_never_used_with_colour_never() {
    let o = telltale(&["scan", "demo-exports/reporter", "--colour", "always"]);
    assert!(stdout(&o).contains("\x1b["));
    let o = telltale(&["scan", "demo-exports/reporter", "--colour", "never"]);
    assert!(!stdout(&o).contains('\x1b'));
}

#[test]
fn json_report_has_the_stable_fields() {
    let o = telltale(&["scan", "demo-exports/student.zip", "--format", "json"]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).expect("valid JSON");
    assert_eq!(v["format"], 1);
    let attrs = v["attributes"].as_array().expect("attributes");
    assert_eq!(attrs.len(), 4);
    for a in attrs {
        for key in ["id", "best_guess", "probability", "base_rate"] {
            assert!(a.get(key).is_some(), "attribute lacks {key}");
        }
        let p = a["probability"].as_f64().expect("number");
        assert!((0.0..=1.0).contains(&p));
    }
    let items = v["items"].as_array().expect("items");
    assert!(!items.is_empty());
    for key in [
        "name",
        "kind",
        "attribute",
        "bits",
        "homogeneity",
        "contribution_bits",
        "source",
    ] {
        assert!(items[0].get(key).is_some(), "item lacks {key}");
    }
    assert!(v["warnings"].is_array());
}

#[test]
fn markdown_report_to_a_private_file() {
    let dir = tempfile::tempdir().expect("tempdir");
    let out = dir.path().join("report.md");
    let o = telltale(&[
        "scan",
        "demo-exports/teacher",
        "--format",
        "markdown",
        "--output",
        out.to_str().expect("utf-8 path"),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let md = std::fs::read_to_string(&out).expect("report written");
    assert!(md.starts_with("# What teacher gives away"));
    assert!(md.contains("| Attribute | Best guess |"));
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = std::fs::metadata(&out).expect("meta").permissions().mode() & 0o777;
        assert_eq!(mode, 0o600, "reports are owner-only");
    }
}

#[test]
fn errors_name_the_problem_and_exit_nonzero() {
    let o = telltale(&["scan", "no/such/archive"]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("no/such/archive: cannot open"), "{err}");

    let dir = tempfile::tempdir().expect("tempdir");
    let bad = dir.path().join("bad.toml");
    std::fs::write(&bad, "format = 1\n[[source]]\nkind = \"like\"\n").expect("write");
    let o = telltale(&[
        "scan",
        "demo-exports/reporter",
        "--mapping",
        bad.to_str().expect("path"),
    ]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("bad.toml: the mapping has"), "{err}");
    assert!(err.contains("source[1].files"), "{err}");

    let o = telltale(&["scan", "demo-exports/reporter", "--limit", "nonsense=1"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("unknown limit 'nonsense'"));
}
