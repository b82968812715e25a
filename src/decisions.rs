//! The user's decisions about one archive: which items they have marked hidden or
//! kept, their private true values per attribute, and their alert levels. Saved as a
//! small JSON file under the user's data folder (the `directories` crate's data
//! directory, or `TELLTALE_DATA_DIR`), one file per archive fingerprint, never next to
//! the archive and never sent anywhere. Saving is atomic and owner-only
//! ([`crate::safe_write`]); a file that cannot be read is copied aside with a warning,
//! never silently replaced.

use std::collections::BTreeMap;
use std::fs;
use std::io;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::evidence::Subject;
use crate::footprint::Footprint;
use crate::safe_write::{remove_stale_temps, write_atomic};

/// Decisions file format version.
pub const FORMAT: u32 = 1;

/// Environment variable that overrides the data folder (tests, portable use).
pub const DATA_DIR_ENV: &str = "TELLTALE_DATA_DIR";

/// The key the friend list is saved under.
pub const FRIEND_LIST_KEY: &str = "friends:list";

/// What the user decided about one item.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Mark {
    /// Treat as hidden: the observer no longer sees it.
    Hide,
    /// Must stay visible: a plan never suggests hiding it.
    Keep,
}

/// Everything saved for one archive.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct Decisions {
    pub format: u32,
    /// The archive's fingerprint ([`Footprint::fingerprint`]).
    pub fingerprint: String,
    /// Item key ([`crate::footprint::Item::key`], or [`FRIEND_LIST_KEY`]) → mark.
    #[serde(default)]
    pub marks: BTreeMap<String, Mark>,
    /// Attribute id → the user's real value id. Private: never written to a report,
    /// and saved only when the person asks (`--remember-real-values`).
    #[serde(default)]
    pub real_values: BTreeMap<String, String>,
    /// Attribute id → the user's own alert level (probability, 0–1).
    #[serde(default)]
    pub targets: BTreeMap<String, f64>,
    /// The plan's goal in the explorer: [`GOAL_BEST_GUESS`] or [`GOAL_REAL_VALUE`]
    /// (absent: the default, no confident best guess).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub goal: Option<String>,
    /// The person asked for their real values to be saved (without it, none are).
    #[serde(default)]
    pub remember_real_values: bool,
}

/// The saved goal "no confident best guess".
pub const GOAL_BEST_GUESS: &str = "best-guess";
/// The saved goal "my real value not guessable".
pub const GOAL_REAL_VALUE: &str = "real-value";

/// Environment variable that turns on the no-save mode for every run (a shared
/// workshop computer): set to anything but empty or `0`.
pub const NO_SAVE_ENV: &str = "TELLTALE_NO_SAVE";

/// Whether [`NO_SAVE_ENV`] asks for the no-save mode.
pub fn no_save_from_env() -> bool {
    std::env::var_os(NO_SAVE_ENV).is_some_and(|v| !v.is_empty() && v != "0")
}

impl Decisions {
    pub fn new(fingerprint: &str) -> Decisions {
        Decisions {
            format: FORMAT,
            fingerprint: fingerprint.to_string(),
            ..Decisions::default()
        }
    }

    /// Subjects of `footprint` carrying `mark`, with the keys that matched nothing.
    pub fn subjects_marked(&self, footprint: &Footprint, mark: Mark) -> (Vec<Subject>, usize) {
        let mut by_key: BTreeMap<String, Subject> = footprint
            .items
            .iter()
            .enumerate()
            .map(|(i, it)| (it.key(), Subject::Item(i)))
            .collect();
        by_key.insert(FRIEND_LIST_KEY.to_string(), Subject::FriendList);
        let mut found = Vec::new();
        let mut missing = 0;
        for (key, m) in &self.marks {
            if *m != mark {
                continue;
            }
            match by_key.get(key) {
                Some(s) => found.push(*s),
                None => missing += 1,
            }
        }
        found.sort();
        (found, missing)
    }
}

/// The saved key of a subject.
pub fn subject_key(footprint: &Footprint, subject: Subject) -> String {
    match subject {
        Subject::Item(i) => footprint
            .items
            .get(i)
            .map(|it| it.key())
            .unwrap_or_else(|| format!("item:{i}")),
        Subject::FriendList => FRIEND_LIST_KEY.to_string(),
    }
}

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error(
        "cannot find a folder for your saved decisions (no home folder); set {DATA_DIR_ENV} to choose one"
    )]
    NoDataDir,
    #[error("cannot use the folder {dir} for saved decisions: {cause}")]
    // `cause` is said in the message and not also given as `source()` (said once).
    Dir { dir: PathBuf, cause: io::Error },
    #[error("cannot save your decisions to {file}: {cause}")]
    // `cause` is said in the message and not also given as `source()` (said once).
    Write { file: PathBuf, cause: io::Error },
    #[error("nothing is saved in the no-save mode")]
    NoSave,
    #[error("cannot remove {file}: {cause}")]
    // `cause` is said in the message and not also given as `source()` (said once).
    Remove { file: PathBuf, cause: io::Error },
}

/// What loading found.
#[derive(Debug, Clone, PartialEq)]
pub struct Loaded {
    pub decisions: Decisions,
    /// Set when an existing file could not be used (it was copied aside).
    pub warning: Option<String>,
    /// True when a file existed and was read.
    pub restored: bool,
}

/// The folder where decisions live.
#[derive(Debug, Clone)]
pub struct Store {
    dir: PathBuf,
}

impl Store {
    /// The user's data folder: `TELLTALE_DATA_DIR` when set, else the platform's data
    /// directory for telltale (e.g. `~/.local/share/telltale` on Linux).
    pub fn locate() -> Result<Store, Error> {
        if let Some(dir) = std::env::var_os(DATA_DIR_ENV).filter(|v| !v.is_empty()) {
            return Ok(Store::at(PathBuf::from(dir)));
        }
        directories::ProjectDirs::from("", "", "telltale")
            .map(|d| Store::at(d.data_dir().to_path_buf()))
            .ok_or(Error::NoDataDir)
    }

    pub fn at(dir: PathBuf) -> Store {
        Store { dir }
    }

    pub fn dir(&self) -> &Path {
        &self.dir
    }

    fn decisions_dir(&self) -> PathBuf {
        self.dir.join("decisions")
    }

    /// The file for one archive.
    pub fn path_for(&self, fingerprint: &str) -> PathBuf {
        self.decisions_dir()
            .join(format!("{}.json", safe_name(fingerprint)))
    }

    /// Load the decisions for an archive; a missing file gives empty decisions. A file
    /// that cannot be read or parsed is copied aside (`….unreadable-N.json`) and
    /// reported in `warning`; the rest goes on with empty decisions.
    pub fn load(&self, fingerprint: &str) -> Loaded {
        let path = self.path_for(fingerprint);
        remove_stale_temps(&self.decisions_dir(), std::time::Duration::from_secs(60));
        let text = match fs::read(&path) {
            Ok(t) => t,
            Err(e) if e.kind() == io::ErrorKind::NotFound => {
                return Loaded {
                    decisions: Decisions::new(fingerprint),
                    warning: None,
                    restored: false,
                };
            }
            Err(e) => {
                return Loaded {
                    decisions: Decisions::new(fingerprint),
                    warning: Some(format!(
                        "cannot read your saved decisions ({}): {e}; starting without them",
                        path.display()
                    )),
                    restored: false,
                };
            }
        };
        let problem = match serde_json::from_slice::<Decisions>(&text) {
            Ok(d) if d.format != FORMAT => format!(
                "it has format {}, this version reads format {FORMAT}",
                d.format
            ),
            Ok(d) if d.fingerprint != fingerprint => {
                "it belongs to a different archive".to_string()
            }
            Ok(d) => {
                return Loaded {
                    decisions: d,
                    warning: None,
                    restored: true,
                };
            }
            Err(e) => format!(
                "line {}, column {}: {}",
                e.line(),
                e.column(),
                crate::records::json_reason(&e)
            ),
        };
        let kept = set_aside(&path, &text);
        let warning = match kept {
            Ok(copy) => format!(
                "your saved decisions in {} could not be used ({problem}); a copy is kept at {}; starting without them",
                path.display(),
                copy.display()
            ),
            Err(e) => format!(
                "your saved decisions in {} could not be used ({problem}) and could not be copied aside ({e}); they will not be overwritten in this session",
                path.display()
            ),
        };
        Loaded {
            decisions: Decisions::new(fingerprint),
            warning: Some(warning),
            restored: false,
        }
    }

    /// Save decisions atomically, owner-only.
    pub fn save(&self, decisions: &Decisions) -> Result<PathBuf, Error> {
        let dir = self.decisions_dir();
        create_private_dir(&dir).map_err(|source| Error::Dir {
            dir: dir.clone(),
            cause: source,
        })?;
        let path = self.path_for(&decisions.fingerprint);
        write_atomic(&path, |w| {
            serde_json::to_writer_pretty(&mut *w, decisions).map_err(io::Error::other)?;
            w.write_all(b"\n")
        })
        .map_err(|source| Error::Write {
            file: path.clone(),
            cause: source,
        })?;
        Ok(path)
    }

    /// Remove everything saved for one archive: its decisions file, copies of it set
    /// aside as unreadable, and unfinished temporary files. Returns the files removed
    /// (none when nothing was saved).
    pub fn forget(&self, fingerprint: &str) -> Result<Vec<PathBuf>, Error> {
        let path = self.path_for(fingerprint);
        let stem = safe_name(fingerprint);
        let aside = format!("{stem}.unreadable-");
        self.remove_matching(|name| {
            name == format!("{stem}.json")
                || (name.starts_with(&aside) && name.ends_with(".json"))
                || crate::safe_write::is_temp_name(name)
        })
        .map(|mut removed| {
            removed.sort_by_key(|p| p != &path);
            removed
        })
    }

    /// Remove every archive's saved decisions, the copies set aside, and the note
    /// that the cautions were shown. Returns the files removed.
    pub fn forget_all(&self) -> Result<Vec<PathBuf>, Error> {
        let mut removed = self.remove_matching(|_| true)?;
        let seen = self.dir.join("cautions-seen");
        match fs::remove_file(&seen) {
            Ok(()) => removed.push(seen),
            Err(e) if e.kind() == io::ErrorKind::NotFound => {}
            Err(cause) => return Err(Error::Remove { file: seen, cause }),
        }
        // Empty folders go too (they say telltale was used here); a folder that still
        // holds something someone put there stays.
        let _ = fs::remove_dir(self.decisions_dir());
        let _ = fs::remove_dir(&self.dir);
        Ok(removed)
    }

    /// Remove the files of the decisions folder whose names pass `pick`.
    fn remove_matching(&self, pick: impl Fn(&str) -> bool) -> Result<Vec<PathBuf>, Error> {
        let dir = self.decisions_dir();
        let entries = match fs::read_dir(&dir) {
            Ok(e) => e,
            Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(Vec::new()),
            Err(cause) => return Err(Error::Dir { dir, cause }),
        };
        let mut removed = Vec::new();
        for entry in entries.flatten() {
            let name = entry.file_name();
            let name = name.to_string_lossy();
            let is_file = entry.file_type().is_ok_and(|t| t.is_file());
            if !is_file || !pick(&name) {
                continue;
            }
            let path = entry.path();
            fs::remove_file(&path).map_err(|cause| Error::Remove {
                file: path.clone(),
                cause,
            })?;
            removed.push(path);
        }
        removed.sort();
        Ok(removed)
    }

    /// Whether the cautions have been shown once on this computer.
    pub fn cautions_seen(&self) -> bool {
        self.dir.join("cautions-seen").exists()
    }

    /// Remember that the cautions were shown.
    pub fn mark_cautions_seen(&self) -> Result<(), Error> {
        create_private_dir(&self.dir).map_err(|source| Error::Dir {
            dir: self.dir.clone(),
            cause: source,
        })?;
        let path = self.dir.join("cautions-seen");
        write_atomic(&path, |w| w.write_all(b"shown\n")).map_err(|source| Error::Write {
            file: path.clone(),
            cause: source,
        })
    }
}

/// A fingerprint as a file name: hex digits pass; anything else is hashed.
fn safe_name(fingerprint: &str) -> String {
    if !fingerprint.is_empty()
        && fingerprint.len() <= 128
        && fingerprint.bytes().all(|b| b.is_ascii_hexdigit())
    {
        fingerprint.to_ascii_lowercase()
    } else {
        use sha2::{Digest, Sha256};
        let digest = Sha256::digest(fingerprint.as_bytes());
        digest.iter().map(|b| format!("{b:02x}")).collect()
    }
}

/// Copy an unusable file to the first free `NAME.unreadable-N.json` beside it.
fn set_aside(path: &Path, bytes: &[u8]) -> io::Result<PathBuf> {
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "decisions".into());
    let dir = path.parent().unwrap_or(Path::new("."));
    for n in 1..10_000u32 {
        let candidate = dir.join(format!("{stem}.unreadable-{n}.json"));
        if candidate.exists() {
            if fs::read(&candidate).is_ok_and(|old| old == bytes) {
                return Ok(candidate); // the same bytes were set aside before
            }
            continue;
        }
        write_atomic(&candidate, |w| w.write_all(bytes))?;
        return Ok(candidate);
    }
    Err(io::Error::other("no free name to set the file aside"))
}

fn create_private_dir(dir: &Path) -> io::Result<()> {
    if dir.is_dir() {
        return Ok(());
    }
    let mut b = fs::DirBuilder::new();
    b.recursive(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::DirBuilderExt;
        b.mode(0o700);
    }
    b.create(dir)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample(fp: &str) -> Decisions {
        let mut d = Decisions::new(fp);
        d.marks.insert("like:id:7".into(), Mark::Hide);
        d.marks.insert("group:name:chess club".into(), Mark::Keep);
        d.real_values.insert("age".into(), "35-44".into());
        d.remember_real_values = true;
        d.goal = Some(GOAL_REAL_VALUE.into());
        d.targets.insert("age".into(), 0.4);
        d
    }

    #[test]
    fn forget_removes_one_archive_and_says_what() {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::at(dir.path().join("data"));
        let a = store.save(&sample("aa11")).unwrap();
        let b = store.save(&sample("bb22")).unwrap();
        // A copy set aside as unreadable belongs to the same archive.
        fs::write(a.with_file_name("aa11.unreadable-1.json"), b"{").unwrap();
        let removed = store.forget("aa11").unwrap();
        assert_eq!(removed.len(), 2, "{removed:?}");
        assert_eq!(removed[0], a, "the decisions file first");
        assert!(!a.exists() && b.exists());
        assert!(!store.load("aa11").restored);
        assert!(store.forget("aa11").unwrap().is_empty(), "nothing left");
        store.mark_cautions_seen().unwrap();
        let all = store.forget_all().unwrap();
        assert_eq!(all.len(), 2, "{all:?}");
        assert!(!b.exists() && !store.cautions_seen());
        assert!(!store.dir().exists(), "empty folders go too");
    }

    #[test]
    fn round_trip_owner_only() {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::at(dir.path().join("data"));
        let fp = "00ff12ab";
        let first = store.load(fp);
        assert!(!first.restored && first.warning.is_none());
        let path = store.save(&sample(fp)).unwrap();
        let again = store.load(fp);
        assert!(again.restored);
        assert_eq!(again.decisions, sample(fp));
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = fs::metadata(&path).unwrap().permissions().mode() & 0o777;
            assert_eq!(mode, 0o600);
        }
    }

    #[test]
    fn corrupt_file_is_copied_aside_with_a_warning() {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::at(dir.path().to_path_buf());
        let fp = "abcdef";
        let path = store.path_for(fp);
        fs::create_dir_all(path.parent().unwrap()).unwrap();
        fs::write(&path, b"{\"format\": 1, \"fingerp").unwrap();
        let loaded = store.load(fp);
        let warning = loaded.warning.expect("a warning");
        assert!(warning.contains("copy is kept"), "{warning}");
        assert_eq!(loaded.decisions, Decisions::new(fp));
        let copy = path.with_file_name("abcdef.unreadable-1.json");
        assert_eq!(fs::read(&copy).unwrap(), b"{\"format\": 1, \"fingerp");
        // Loading again does not pile up copies of the same bytes.
        store.load(fp);
        assert!(!path.with_file_name("abcdef.unreadable-2.json").exists());
    }

    #[test]
    fn file_for_another_archive_is_not_used() {
        let dir = tempfile::tempdir().unwrap();
        let store = Store::at(dir.path().to_path_buf());
        let mut other = sample("aaaa");
        store.save(&other).unwrap();
        other.fingerprint = "bbbb".into();
        let text = serde_json::to_string(&other).unwrap();
        fs::write(store.path_for("aaaa"), text).unwrap();
        let loaded = store.load("aaaa");
        assert!(loaded.warning.unwrap().contains("different archive"));
    }

    #[test]
    fn odd_fingerprints_become_safe_names() {
        let store = Store::at(PathBuf::from("/x"));
        let p = store.path_for("../../etc/passwd");
        assert_eq!(p.parent().unwrap(), Path::new("/x/decisions"));
        assert_eq!(p.file_stem().unwrap().len(), 64);
    }
}
