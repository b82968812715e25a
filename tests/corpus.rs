//! The malformed-archive corpus (tests/corpus/, made by tests/corpus/make_corpus.py):
//! every case runs the real binary and must exit as stated, never panic, and say what
//! its case.toml expects (file, record, line and field where there is one).

use std::path::Path;
use std::process::Command;

#[derive(serde::Deserialize)]
struct Case {
    args: Vec<String>,
    exit: i32,
    expect: Vec<String>,
}

fn run_case(dir: &Path) -> Result<(), String> {
    let spec: Case =
        toml::from_str(&std::fs::read_to_string(dir.join("case.toml")).map_err(|e| e.to_string())?)
            .map_err(|e| e.to_string())?;
    let archive = if dir.join("archive.zip").exists() {
        dir.join("archive.zip")
    } else {
        dir.join("archive")
    };
    let args: Vec<String> = spec
        .args
        .iter()
        .map(|a| {
            a.replace("{archive}", &archive.to_string_lossy())
                .replace("{mapping}", &dir.join("mapping.toml").to_string_lossy())
                .replace("{priors}", &dir.join("priors.json").to_string_lossy())
        })
        .collect();
    let out = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(&args)
        .env("NO_COLOR", "1")
        .output()
        .map_err(|e| e.to_string())?;
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    if text.contains("panicked") {
        return Err(format!("panicked:\n{text}"));
    }
    if out.status.code() != Some(spec.exit) {
        return Err(format!(
            "exit {:?}, expected {}:\n{text}",
            out.status.code(),
            spec.exit
        ));
    }
    for e in &spec.expect {
        if !text.contains(e.as_str()) {
            return Err(format!("output lacks {e:?}:\n{text}"));
        }
    }
    Ok(())
}

#[test]
fn every_malformed_archive_gets_its_message() {
    let root = Path::new("tests/corpus");
    let mut dirs: Vec<_> = std::fs::read_dir(root)
        .expect("corpus")
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.join("case.toml").exists())
        .collect();
    dirs.sort();
    assert!(dirs.len() >= 40, "corpus has {} cases", dirs.len());
    let failures: Vec<String> = dirs
        .iter()
        .filter_map(|d| run_case(d).err().map(|e| format!("{}: {e}", d.display())))
        .collect();
    assert!(
        failures.is_empty(),
        "{} case(s) failed:\n{}",
        failures.len(),
        failures.join("\n\n")
    );
}
