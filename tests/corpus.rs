//! The malformed-archive corpus (tests/corpus/, made by tests/corpus/make_corpus.py):
//! every case runs the real binary and must exit as stated, never panic, and say what
//! its case.toml expects (file, record, line and field where there is one).
//!
//! A case with `cache = MODE` runs with its own cache and data folders: the real cache
//! of its priors file is made first, then spoiled as MODE says (truncated, one bit
//! flipped, another version, absurd values under a checksum that matches, the cache of
//! another file under this file's key, not a cache at all). The run must name the
//! cache and the file, read the JSON instead and give the same report, rebuild the
//! cache, and leave a saved decisions file as it was.

use std::path::{Path, PathBuf};
use std::process::Command;

#[derive(serde::Deserialize)]
struct Case {
    args: Vec<String>,
    exit: i32,
    expect: Vec<String>,
    #[serde(default)]
    cache: Option<String>,
}

/// The cache header: magic (8), version (4), JSON hash (32), payload length (8),
/// payload checksum (32); see src/priors/cache.rs.
const HEADER: usize = 84;

/// Run telltale with `args` and these folders; its exit code and everything it said.
fn telltale(args: &[String], cache: &Path, data: &Path) -> Result<(Option<i32>, String), String> {
    let out = Command::new(env!("CARGO_BIN_EXE_telltale"))
        .args(args)
        .env("NO_COLOR", "1")
        .env("TELLTALE_CACHE_DIR", cache)
        .env("TELLTALE_DATA_DIR", data)
        .output()
        .map_err(|e| e.to_string())?;
    Ok((
        out.status.code(),
        format!(
            "{}{}",
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr)
        ),
    ))
}

/// The one cache file under `dir`.
fn only_cache(dir: &Path) -> Result<PathBuf, String> {
    let files: Vec<PathBuf> = std::fs::read_dir(dir.join("priors"))
        .map_err(|e| format!("no cache written: {e}"))?
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "bin"))
        .collect();
    match files.as_slice() {
        [one] => Ok(one.clone()),
        other => Err(format!("expected one cache file, found {other:?}")),
    }
}

/// Put the checksum of the payload back in the header, as a careful editor would.
fn reseal(bytes: &mut [u8]) {
    let sum = blake3::hash(&bytes[HEADER..]);
    bytes[52..84].copy_from_slice(sum.as_bytes());
}

/// Spoil the cache at `path` as `mode` says; `args` runs the case (for the
/// other-file mode, which makes the cache of a changed copy of the priors file).
fn spoil(
    mode: &str,
    path: &Path,
    priors: &Path,
    args: &[String],
    folders: (&Path, &Path),
) -> Result<(), String> {
    let mut bytes = std::fs::read(path).map_err(|e| e.to_string())?;
    match mode {
        "truncated" => bytes.truncate(bytes.len() * 2 / 3),
        "bit-flipped" => {
            let at = HEADER + (bytes.len() - HEADER) / 2;
            bytes[at] ^= 0x10;
        }
        "wrong-version" => bytes[8..12].copy_from_slice(&99u32.to_le_bytes()),
        "absurd-values" => {
            // The alert threshold 0.4375 (stored once) becomes 7: no probability.
            let from = 0.4375f64.to_le_bytes();
            let found: Vec<usize> = bytes
                .windows(8)
                .enumerate()
                .filter(|(_, w)| *w == from)
                .map(|(i, _)| i)
                .collect();
            let [at] = found.as_slice() else {
                return Err(format!("threshold found {} times", found.len()));
            };
            bytes[*at..at + 8].copy_from_slice(&7.0f64.to_le_bytes());
            reseal(&mut bytes);
        }
        "other-file" => {
            // The cache of another priors file (one count changed), put under this
            // file's key.
            let other_dir = tempfile::tempdir().map_err(|e| e.to_string())?;
            let other = other_dir.path().join("other-priors.json");
            let text = std::fs::read_to_string(priors).map_err(|e| e.to_string())?;
            std::fs::write(&other, text.replacen("[10, 30]", "[11, 30]", 1))
                .map_err(|e| e.to_string())?;
            let other_cache = other_dir.path().join("cache");
            let other_args: Vec<String> = args
                .iter()
                .map(|a| {
                    if Path::new(a) == priors {
                        other.to_string_lossy().into_owned()
                    } else {
                        a.clone()
                    }
                })
                .collect();
            telltale(&other_args, &other_cache, folders.1)?;
            bytes = std::fs::read(only_cache(&other_cache)?).map_err(|e| e.to_string())?;
        }
        "not-a-cache" => bytes = b"{\"format\": 1, \"items\": []}".to_vec(),
        other => return Err(format!("unknown cache mode {other}")),
    }
    std::fs::write(path, bytes).map_err(|e| e.to_string())
}

/// A case run with its own cache and data folders (see the module notes); the
/// output of the run over the spoiled cache.
fn run_with_cache(
    mode: &str,
    args: &[String],
    dir: &Path,
) -> Result<(Option<i32>, String), String> {
    let folders = tempfile::tempdir().map_err(|e| e.to_string())?;
    let (cache, data) = (folders.path().join("cache"), folders.path().join("data"));
    std::fs::create_dir_all(data.join("decisions")).map_err(|e| e.to_string())?;
    let saved = data.join("decisions").join("saved.json");
    let decisions = b"{\"format\": 1, \"note\": \"a person's saved decisions\"}";
    std::fs::write(&saved, decisions).map_err(|e| e.to_string())?;
    let priors = args
        .iter()
        .map(PathBuf::from)
        .find(|p| p.extension().is_some_and(|x| x == "json"))
        .ok_or("no priors file in the arguments")?;
    let (_, clean) = telltale(args, &cache, &data)?;
    let path = only_cache(&cache)?;
    let good = std::fs::read(&path).map_err(|e| e.to_string())?;
    spoil(mode, &path, &priors, args, (&cache, &data))?;
    let (code, text) = telltale(args, &cache, &data)?;
    let report = |t: &str| {
        t.lines()
            .filter(|l| !l.starts_with("priors: "))
            .collect::<Vec<_>>()
            .join("\n")
    };
    if report(&text) != report(&clean) {
        return Err(format!(
            "report differs from the one made with a good cache:\n{text}"
        ));
    }
    if std::fs::read(&path).ok().as_deref() != Some(&good[..]) {
        return Err(format!("{}: the cache was not rebuilt", dir.display()));
    }
    if std::fs::read(&saved).ok().as_deref() != Some(&decisions[..]) {
        return Err("the saved decisions changed".into());
    }
    Ok((code, text))
}

fn run_case(dir: &Path) -> Result<(), String> {
    let spec: Case =
        toml::from_str(&std::fs::read_to_string(dir.join("case.toml")).map_err(|e| e.to_string())?)
            .map_err(|e| e.to_string())?;
    let shared = dir.parent().unwrap_or(dir).join("shared");
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
                .replace("{friends}", &dir.join("friends.csv").to_string_lossy())
                .replace("{shared}", &shared.to_string_lossy())
        })
        .collect();
    let (code, text) = match &spec.cache {
        Some(mode) => run_with_cache(mode, &args, dir)?,
        None => {
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
            (out.status.code(), text)
        }
    };
    if text.contains("panicked") {
        return Err(format!("panicked:\n{text}"));
    }
    if code != Some(spec.exit) {
        return Err(format!("exit {code:?}, expected {}:\n{text}", spec.exit));
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
