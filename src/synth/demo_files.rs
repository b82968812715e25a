//! Writing the demo where a person asked, and nowhere else: the demo is generated into
//! a fresh temporary folder, compared file by file with what is already under the
//! chosen folder, and only then copied in. A file that would change is replaced only
//! when the caller says so (`force`); a file whose bytes are already right is not
//! touched at all, so regenerating the bundled demo in a checkout leaves the files
//! compiled into the binary (and their modification times) alone unless they changed.

use std::collections::BTreeSet;
use std::fs;
use std::io;
use std::path::{Path, PathBuf};

use super::demo::{DemoConfig, DemoOutput, generate_demo};

/// Where the priors file goes, relative to the chosen folder (as in the repository).
pub const DEMO_PRIORS: &str = "reference-priors/demo-priors.json";
/// Where the persona archives, their mappings and the manifest go.
pub const DEMO_EXPORTS: &str = "demo-exports";

/// What writing the demo did, each path relative to the chosen folder.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct DemoFiles {
    /// Files that were not there and were written.
    pub created: Vec<PathBuf>,
    /// Files that were there with other contents and were replaced (`force`).
    pub replaced: Vec<PathBuf>,
    /// Files that were there with exactly the generated contents: left untouched.
    pub unchanged: Vec<PathBuf>,
    /// Files under the exports folder that the generator does not make: left alone.
    pub foreign: Vec<PathBuf>,
}

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error(
        "{} under {dir} would be replaced ({}); nothing was written. Add --force to replace {}, or choose an empty folder",
        crate::reading::count(.files.len(), "file", "files"),
        list(.files),
        if .files.len() == 1 { "it" } else { "them" }
    )]
    WouldReplace { dir: PathBuf, files: Vec<PathBuf> },
    #[error("{}: {cause}", .path.display())]
    Io { path: PathBuf, cause: io::Error },
}

fn list(files: &[PathBuf]) -> String {
    const SHOWN: usize = 5;
    let mut names: Vec<String> = files
        .iter()
        .take(SHOWN)
        .map(|f| f.display().to_string())
        .collect();
    if files.len() > SHOWN {
        names.push(format!(
            "and {}",
            crate::reading::count(files.len() - SHOWN, "other", "others")
        ));
    }
    names.join(", ")
}

fn io_at(path: &Path) -> impl FnOnce(io::Error) -> Error + '_ {
    move |cause| Error::Io {
        path: path.to_path_buf(),
        cause,
    }
}

/// A temporary folder removed when dropped.
struct Staging(PathBuf);

impl Staging {
    fn new() -> io::Result<Staging> {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map(|d| d.as_nanos())
            .unwrap_or(0);
        let dir =
            std::env::temp_dir().join(format!("telltale-demo-{}-{nanos}", std::process::id()));
        fs::create_dir_all(&dir)?;
        Ok(Staging(dir))
    }
}

impl Drop for Staging {
    fn drop(&mut self) {
        let _ = fs::remove_dir_all(&self.0);
    }
}

/// Every file under `root`, relative to it, sorted.
fn files_under(root: &Path) -> io::Result<Vec<PathBuf>> {
    let mut out = Vec::new();
    if !root.exists() {
        return Ok(out);
    }
    for entry in walkdir::WalkDir::new(root).sort_by_file_name() {
        let entry = entry.map_err(io::Error::other)?;
        if entry.file_type().is_file()
            && let Ok(rel) = entry.path().strip_prefix(root)
        {
            out.push(rel.to_path_buf());
        }
    }
    Ok(out)
}

/// Generate the demo and write it under `out` (`out/reference-priors/demo-priors.json`
/// and `out/demo-exports/`). Refuses, writing nothing, when a file there would change
/// and `force` is false. The returned output's `priors_path` is the final one.
pub fn write_demo(
    cfg: &DemoConfig,
    out: &Path,
    force: bool,
) -> Result<(DemoOutput, DemoFiles), Error> {
    let staging = Staging::new().map_err(io_at(&std::env::temp_dir()))?;
    let mut generated = generate_demo(
        cfg,
        &staging.0.join(DEMO_PRIORS),
        &staging.0.join(DEMO_EXPORTS),
    )
    .map_err(io_at(&staging.0))?;

    let mut files = DemoFiles::default();
    let made = files_under(&staging.0).map_err(io_at(&staging.0))?;
    for rel in &made {
        let target = out.join(rel);
        match fs::read(&target) {
            Ok(old) => {
                let new = fs::read(staging.0.join(rel)).map_err(io_at(&staging.0))?;
                if old == new {
                    files.unchanged.push(rel.clone());
                } else {
                    files.replaced.push(rel.clone());
                }
            }
            Err(e) if e.kind() == io::ErrorKind::NotFound => files.created.push(rel.clone()),
            Err(e) => return Err(io_at(&target)(e)),
        }
    }
    if !files.replaced.is_empty() && !force {
        return Err(Error::WouldReplace {
            dir: out.to_path_buf(),
            files: files.replaced,
        });
    }
    for rel in files.created.iter().chain(&files.replaced) {
        let target = out.join(rel);
        if let Some(parent) = target.parent() {
            fs::create_dir_all(parent).map_err(io_at(parent))?;
        }
        // The demo is invented and meant to be shared: ordinary permissions.
        fs::copy(staging.0.join(rel), &target).map_err(io_at(&target))?;
    }
    let made: BTreeSet<&PathBuf> = made.iter().collect();
    let exports = Path::new(DEMO_EXPORTS);
    files.foreign = files_under(&out.join(exports))
        .map_err(io_at(&out.join(exports)))?
        .into_iter()
        .map(|rel| exports.join(rel))
        .filter(|rel| !made.contains(rel))
        .collect();
    generated.priors_path = out.join(DEMO_PRIORS);
    Ok((generated, files))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn small() -> DemoConfig {
        DemoConfig {
            members: 400,
            held_out: 100,
            items: 120,
            ..DemoConfig::default()
        }
    }

    #[test]
    fn writes_into_an_empty_folder_then_leaves_equal_files_alone() {
        let dir = std::env::temp_dir().join(format!("telltale-demo-test-{}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        let (_, first) = write_demo(&small(), &dir, false).expect("first run");
        assert!(first.created.contains(&PathBuf::from(DEMO_PRIORS)));
        assert!(first.replaced.is_empty() && first.unchanged.is_empty());
        let modified = fs::metadata(dir.join(DEMO_PRIORS))
            .and_then(|m| m.modified())
            .expect("mtime");

        // The same seed again: every file is already right, none is rewritten.
        let (_, again) = write_demo(&small(), &dir, false).expect("second run");
        assert!(again.created.is_empty() && again.replaced.is_empty());
        assert_eq!(again.unchanged.len(), first.created.len());
        let after = fs::metadata(dir.join(DEMO_PRIORS))
            .and_then(|m| m.modified())
            .expect("mtime");
        assert_eq!(modified, after, "an unchanged file is not rewritten");

        // Another seed would change files: refused without force, nothing written.
        let other = DemoConfig { seed: 8, ..small() };
        let before = fs::read(dir.join(DEMO_PRIORS)).expect("priors");
        let err = write_demo(&other, &dir, false).expect_err("refused");
        assert!(err.to_string().contains("--force"), "{err}");
        assert_eq!(fs::read(dir.join(DEMO_PRIORS)).expect("priors"), before);
        // A file of the person's own in the exports folder is named, never removed.
        fs::write(dir.join(DEMO_EXPORTS).join("notes.txt"), "mine").expect("write");
        let (_, forced) = write_demo(&other, &dir, true).expect("forced");
        assert!(forced.replaced.contains(&PathBuf::from(DEMO_PRIORS)));
        assert_eq!(
            forced.foreign,
            vec![Path::new(DEMO_EXPORTS).join("notes.txt")]
        );
        assert!(dir.join(DEMO_EXPORTS).join("notes.txt").exists());
        let _ = fs::remove_dir_all(&dir);
    }
}
