//! What a new user meets in the first hour, checked on the real binary and library: each
//! cause of an error said once, shell completions and the man page, `synth demo`
//! writing only where it is told, and every format a command's help offers working.

use std::path::Path;
use std::process::{Command, Output};

fn telltale_in(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .current_dir(dir)
        .env_remove("NO_COLOR")
        .output()
        .expect("run telltale")
}

fn telltale(args: &[&str]) -> Output {
    telltale_in(Path::new("."), args)
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// The operating system's words for a missing file, as Rust's std prints them
/// ("No such file or directory (os error 2)" on Linux).
fn missing_file_words() -> String {
    std::fs::metadata("no/such/file")
        .expect_err("missing")
        .to_string()
}

fn count(haystack: &str, needle: &str) -> usize {
    haystack.matches(needle).count()
}

/// The error printed as anyhow prints a chain (`{:#}`), as the command line did.
fn chain<E: std::error::Error + Send + Sync + 'static>(e: E) -> String {
    format!("{:#}", anyhow::Error::new(e))
}

#[test]
fn library_errors_say_their_cause_once_when_printed_as_a_chain() {
    let nowhere = Path::new("no/such/file");
    let os = std::fs::metadata(nowhere).expect_err("missing").to_string();
    let mut printed = Vec::new();
    let limits = telltale::limits::Limits::default();
    if let Err(e) = telltale::archive::Archive::open(nowhere, &limits) {
        printed.push(chain(e));
    }
    if let Err(e) = telltale::mapping::Mapping::load(nowhere) {
        printed.push(chain(e));
    }
    if let Err(e) = telltale::priors::Priors::load(nowhere) {
        printed.push(chain(e));
    }
    if let Err(e) = telltale::cohort::list_archives(nowhere) {
        printed.push(chain(e));
    }
    let priors = telltale::scan::load_priors(None).expect("bundled priors");
    let mut fp = telltale::footprint::Footprint::default();
    if let Err(e) = telltale::friends_file::merge_friends_file(
        &mut fp,
        nowhere,
        &priors,
        &telltale::limits::Limits::default(),
    ) {
        printed.push(chain(e));
    }
    // A file where the decisions folder should be: the folder cannot be made.
    let dir = tempfile::tempdir().expect("tempdir");
    let blocker = dir.path().join("blocker");
    std::fs::write(&blocker, "").expect("write");
    let store = telltale::decisions::Store::at(blocker.join("inside"));
    if let Err(e) = store.mark_cautions_seen() {
        printed.push(chain(e));
    }
    assert_eq!(printed.len(), 6, "every path failed: {printed:#?}");
    for (i, text) in printed.iter().enumerate() {
        let cause = if i == 5 { "Not a directory" } else { &os };
        assert_eq!(count(text, cause), 1, "said once: {text}");
    }
}

#[test]
fn the_command_line_says_each_cause_once() {
    let words = missing_file_words();
    let cases: &[&[&str]] = &[
        &["no-such-archive"],
        &["scan", "no-such-archive"],
        &["plan", "no-such-archive"],
        &["mapping", "draft", "no-such-archive"],
        &["mapping", "check", "no-such-archive"],
        &["scan", "demo-exports/reporter", "--priors", "no-such.json"],
        &["scan", "demo-exports/reporter", "--mapping", "no-such.toml"],
        &["scan", "demo-exports/reporter", "--friends", "no-such.csv"],
        &["eval", "no-such-cohort"],
        &["priors", "build", "no-such-cohort", "--epsilon", "1"],
        &[
            "scan",
            "demo-exports/reporter",
            "-o",
            "no/such/dir/report.txt",
        ],
    ];
    for args in cases {
        let o = telltale(args);
        assert_eq!(o.status.code(), Some(1), "{args:?}");
        let err = stderr(&o);
        assert_eq!(
            count(&err, &words),
            1,
            "{args:?} says the cause once: {err}"
        );
        assert!(err.starts_with("telltale: "), "{err}");
        assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
    }
}

#[test]
fn completions_for_the_usual_shells() {
    for (shell, marker) in [
        ("bash", "complete -F"),
        ("zsh", "#compdef telltale"),
        ("fish", "complete -c telltale"),
        ("powershell", "Register-ArgumentCompleter"),
    ] {
        let o = telltale(&["completions", shell]);
        assert!(o.status.success(), "{shell}: {}", stderr(&o));
        let script = String::from_utf8_lossy(&o.stdout);
        assert!(script.contains(marker), "{shell} script: {marker}");
        // The commands and their options are in it.
        for word in ["scan", "plan", "mapping", "--threshold"] {
            assert!(script.contains(word), "{shell} completes {word}");
        }
    }
    let o = telltale(&["completions", "no-such-shell"]);
    assert_eq!(o.status.code(), Some(2), "clap refuses an unknown shell");
}

#[test]
fn bash_accepts_its_completion_script() {
    let Ok(bash) = which("bash") else { return };
    let o = telltale(&["completions", "bash"]);
    let dir = tempfile::tempdir().expect("tempdir");
    let script = dir.path().join("telltale.bash");
    std::fs::write(&script, &o.stdout).expect("write");
    let check = Command::new(bash)
        .arg("-c")
        .arg(format!(
            "source {} && complete -p telltale",
            script.display()
        ))
        .output()
        .expect("run bash");
    assert!(
        check.status.success(),
        "{}",
        String::from_utf8_lossy(&check.stderr)
    );
}

fn which(name: &str) -> Result<std::path::PathBuf, ()> {
    std::env::var_os("PATH")
        .iter()
        .flat_map(std::env::split_paths)
        .map(|d| d.join(name))
        .find(|p| p.is_file())
        .ok_or(())
}

#[test]
fn the_manual_page_covers_every_command() {
    let o = telltale(&["man"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let page = String::from_utf8_lossy(&o.stdout);
    assert!(
        page.starts_with(".ie") || page.contains(".TH telltale 1"),
        "roff"
    );
    assert!(page.contains(".TH telltale 1"), "title line");
    // The NAME line says the name once ("telltale \- See what …").
    let name_line = page
        .lines()
        .skip_while(|l| !l.starts_with(".SH NAME"))
        .nth(1)
        .unwrap_or("");
    assert!(name_line.starts_with("telltale \\- "), "{name_line}");
    assert!(
        !name_line.to_lowercase().contains("\\- telltale"),
        "{name_line}"
    );
    // Every command, as the page's SUBCOMMANDS section names it (telltale-NAME(1)).
    for cmd in [
        "scan",
        "plan",
        "explore",
        "synth",
        "priors",
        "eval",
        "mapping",
        "forget",
        "completions",
        "man",
    ] {
        assert!(
            page.contains(&format!("telltale\\-{cmd}(1)")),
            "lists {cmd}"
        );
    }

    let dir = tempfile::tempdir().expect("tempdir");
    let pages = dir.path().join("man1");
    let o = telltale(&["man", "--dir", pages.to_str().expect("utf-8")]);
    assert!(o.status.success(), "{}", stderr(&o));
    for name in [
        "telltale.1",
        "telltale-scan.1",
        "telltale-plan.1",
        "telltale-mapping-draft.1",
    ] {
        let text = std::fs::read_to_string(pages.join(name)).expect(name);
        assert!(text.contains(".TH"), "{name} is a manual page");
    }
    assert!(String::from_utf8_lossy(&o.stdout).contains("manual pages"));
}

/// The values `-h` lists for `--format` ("[possible values: text, json, …]").
fn formats_in_help(command: &[&str]) -> Vec<String> {
    let mut args = command.to_vec();
    args.push("-h");
    let o = telltale(&args);
    let help = String::from_utf8_lossy(&o.stdout).replace('\n', " ");
    let at = help.find("--format").expect("--format in help");
    let rest = &help[at..];
    let start = rest.find("[possible values: ").expect("possible values") + 18;
    let end = rest[start..].find(']').expect("]") + start;
    rest[start..end]
        .split(',')
        .map(|s| s.trim().to_string())
        .collect()
}

#[test]
fn every_format_the_help_lists_works() {
    let dir = tempfile::tempdir().expect("tempdir");
    let cohort = dir.path().join("cohort");
    let o = telltale(&[
        "synth",
        "cohort",
        "--members",
        "40",
        "--out",
        cohort.to_str().expect("utf-8"),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let commands: [Vec<&str>; 3] = [
        vec!["scan", "demo-exports/reporter"],
        vec!["plan", "demo-exports/reporter"],
        vec![
            "eval",
            cohort.to_str().expect("utf-8"),
            "--folds",
            "2",
            "--public-share",
            "0.5",
        ],
    ];
    for cmd in &commands {
        let formats = formats_in_help(&cmd[..1]);
        assert!(formats.len() >= 4, "{cmd:?}: {formats:?}");
        for f in &formats {
            let mut args = cmd.clone();
            args.extend(["--format", f]);
            let o = telltale(&args);
            assert!(o.status.success(), "{cmd:?} --format {f}: {}", stderr(&o));
            let out = String::from_utf8_lossy(&o.stdout);
            match f.as_str() {
                "json" => {
                    serde_json::from_str::<serde_json::Value>(&out).expect("valid JSON");
                }
                "html" => assert!(
                    out.to_ascii_lowercase().starts_with("<!doctype html>"),
                    "{cmd:?}: a page"
                ),
                "markdown" => assert!(out.starts_with("# "), "{cmd:?}: a heading"),
                _ => assert!(!out.trim().is_empty(), "{cmd:?} {f}"),
            }
        }
    }
}

/// `plan --format html` makes the page the explorer exports: the scan report with the
/// plan's section after the item table.
#[test]
fn the_plan_page_from_the_command_line_is_the_explorers_page() {
    let o = telltale(&["plan", "demo-exports/reporter", "--format", "html"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let page = String::from_utf8_lossy(&o.stdout);
    let items = page.find("</table>").expect("the item table");
    let plan = page.find("<h2>Hiding plan</h2>").expect("the plan section");
    assert!(items < plan, "the plan comes after the item table");
    assert!(page.trim_end().ends_with("</html>"));
    assert!(!page.contains("<script"), "no scripts");
}

#[test]
fn synth_demo_writes_only_where_it_is_told() {
    let empty = tempfile::tempdir().expect("tempdir");
    // No folder named: clap refuses, and nothing appears in the current folder.
    let o = telltale_in(empty.path(), &["synth", "demo"]);
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    assert!(stderr(&o).contains("--out"), "{}", stderr(&o));
    let left: Vec<_> = std::fs::read_dir(empty.path()).expect("list").collect();
    assert!(
        left.is_empty(),
        "synth demo wrote nothing unasked: {left:?}"
    );
    // Told where: it writes there and says what it wrote.
    let small = ["--members", "300", "--items", "100"];
    let mut args = vec!["synth", "demo", "--out", "made"];
    args.extend(small);
    let o = telltale_in(empty.path(), &args);
    assert!(o.status.success(), "{}", stderr(&o));
    let said = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(
        said.contains("made/reference-priors/demo-priors.json"),
        "{said}"
    );
    assert!(said.contains("new"), "{said}");
    assert!(
        empty
            .path()
            .join("made/demo-exports/manifest.json")
            .is_file()
    );
    // Another seed would replace files: refused without --force, nothing changed.
    let before =
        std::fs::read(empty.path().join("made/reference-priors/demo-priors.json")).expect("priors");
    args.extend(["--seed", "8"]);
    let o = telltale_in(empty.path(), &args);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("--force"), "{}", stderr(&o));
    let after =
        std::fs::read(empty.path().join("made/reference-priors/demo-priors.json")).expect("priors");
    assert_eq!(before, after, "nothing replaced without --force");
    args.push("--force");
    let o = telltale_in(empty.path(), &args);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(String::from_utf8_lossy(&o.stdout).contains("replaced"));
}
