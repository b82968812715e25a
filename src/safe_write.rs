//! Owner-only, all-or-nothing file writes: the content goes to a temporary file in the
//! same folder (created readable and writable by the owner only), is flushed to disk,
//! and is then renamed over the target; the folder is synced so the rename itself
//! survives a power cut. A crash or kill at any moment leaves either the old file or
//! the new one, never half of either.

use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};

/// Prefix of the temporary files this module creates (so stale ones can be found).
pub const TEMP_PREFIX: &str = ".telltale-";

/// Suffix of the temporary files.
pub const TEMP_SUFFIX: &str = ".tmp";

/// Write `render`'s output to `path`, replacing any old file atomically. The new file
/// is readable and writable by its owner only (0600 on Unix). A path that exists and is
/// not a regular file (`/dev/null`, a named pipe, a terminal) is written into, never
/// replaced: renaming over it would swap a device for a plain file.
pub fn write_atomic(
    path: &Path,
    render: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> io::Result<()> {
    if fs::metadata(path).is_ok_and(|m| !m.is_file() && !m.is_dir()) {
        let mut w = io::BufWriter::new(fs::OpenOptions::new().write(true).open(path)?);
        render(&mut w)?;
        return w.flush();
    }
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let (tmp_path, mut file) = create_temp(dir)?;
    let result = (|| {
        {
            let mut w = io::BufWriter::new(&mut file);
            render(&mut w)?;
            w.flush()?;
        }
        file.sync_all()?;
        drop(file);
        fs::rename(&tmp_path, path)?;
        sync_dir(dir);
        Ok(())
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp_path);
    }
    result
}

/// Create a fresh owner-only temporary file in `dir`.
fn create_temp(dir: &Path) -> io::Result<(PathBuf, fs::File)> {
    let mut opts = fs::OpenOptions::new();
    opts.write(true).create_new(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        opts.mode(0o600);
    }
    let stamp = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.subsec_nanos())
        .unwrap_or(0);
    for n in 0..1000u32 {
        let candidate = dir.join(format!(
            "{TEMP_PREFIX}{}-{stamp}-{n}{TEMP_SUFFIX}",
            std::process::id()
        ));
        match opts.open(&candidate) {
            Ok(f) => return Ok((candidate, f)),
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => continue,
            Err(e) => return Err(e),
        }
    }
    Err(io::Error::other("no free temporary file name"))
}

/// Flush a folder's entries (the rename) to disk. Best effort: not every platform or
/// file system allows opening a folder.
fn sync_dir(dir: &Path) {
    #[cfg(unix)]
    if let Ok(d) = fs::File::open(dir) {
        let _ = d.sync_all();
    }
    #[cfg(not(unix))]
    let _ = dir;
}

/// Whether a file name is one of [`write_atomic`]'s temporary files.
pub fn is_temp_name(name: &str) -> bool {
    name.starts_with(TEMP_PREFIX) && name.ends_with(TEMP_SUFFIX)
}

/// Remove temporary files this module left behind in `dir` (after a crash) that are
/// older than `min_age`. Best effort; returns how many were removed.
pub fn remove_stale_temps(dir: &Path, min_age: std::time::Duration) -> usize {
    let Ok(entries) = fs::read_dir(dir) else {
        return 0;
    };
    let mut removed = 0;
    for entry in entries.flatten() {
        let name = entry.file_name();
        let name = name.to_string_lossy();
        if !(name.starts_with(TEMP_PREFIX) && name.ends_with(TEMP_SUFFIX)) {
            continue;
        }
        let old_enough = entry
            .metadata()
            .and_then(|m| m.modified())
            .ok()
            .and_then(|t| t.elapsed().ok())
            .is_some_and(|age| age >= min_age);
        if old_enough && fs::remove_file(entry.path()).is_ok() {
            removed += 1;
        }
    }
    removed
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn replaces_whole_file_owner_only() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("f.txt");
        write_atomic(&p, |w| w.write_all(b"first")).unwrap();
        write_atomic(&p, |w| w.write_all(b"second")).unwrap();
        assert_eq!(fs::read_to_string(&p).unwrap(), "second");
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = fs::metadata(&p).unwrap().permissions().mode() & 0o777;
            assert_eq!(mode, 0o600);
        }
    }

    #[test]
    fn failed_render_keeps_old_file_and_leaves_no_temp() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("f.txt");
        write_atomic(&p, |w| w.write_all(b"old")).unwrap();
        let err = write_atomic(&p, |w| {
            w.write_all(b"half of the new")?;
            Err(io::Error::other("disk full"))
        });
        assert!(err.is_err());
        assert_eq!(fs::read_to_string(&p).unwrap(), "old");
        let names: Vec<_> = fs::read_dir(dir.path()).unwrap().flatten().collect();
        assert_eq!(names.len(), 1, "temporary file left behind");
    }

    #[cfg(unix)]
    #[test]
    fn a_named_pipe_is_written_into_not_replaced() {
        use std::os::unix::fs::FileTypeExt;
        let dir = tempfile::tempdir().unwrap();
        let fifo = dir.path().join("pipe");
        let made = std::process::Command::new("mkfifo").arg(&fifo).status();
        if !made.is_ok_and(|s| s.success()) {
            eprintln!("skipped: mkfifo is not available");
            return;
        }
        let reader = {
            let fifo = fifo.clone();
            std::thread::spawn(move || std::fs::read(fifo).unwrap())
        };
        write_atomic(&fifo, |w| w.write_all(b"through the pipe")).unwrap();
        // Checked before joining: had the pipe been replaced, the reader would wait
        // forever.
        let kind = std::fs::symlink_metadata(&fifo).unwrap().file_type();
        assert!(kind.is_fifo(), "the pipe was replaced by a plain file");
        assert_eq!(reader.join().unwrap(), b"through the pipe");
    }
}
