//! Unpacked archives: the folder is walked once, never following symbolic links (so
//! nothing outside the folder is read and link loops cannot trap the walk).

use std::fs::File;
use std::path::{Path, PathBuf};

use walkdir::WalkDir;

use super::error::{Error, Result};
use super::reader::{Entry, limit_error, read_capped, stream_capped, to_path_buf};
use crate::limits::{LimitName, Limits};

pub struct Folder {
    root: PathBuf,
    entries: Vec<Entry>,
    /// Each entry's path on disk (by entry index): names that are not valid UTF-8 are
    /// shown with U+FFFD in `entries` but still read from their real name.
    disk_paths: Vec<PathBuf>,
    /// Entries skipped while walking (symbolic links, unreadable folders).
    pub skipped: Vec<String>,
}

impl Folder {
    pub fn open(root: &Path, limits: &Limits) -> Result<Folder> {
        let mut entries = Vec::new();
        let mut skipped = Vec::new();
        let mut disk_paths = Vec::new();
        let walker = WalkDir::new(root)
            .follow_links(false)
            .max_depth(limits.folder_depth as usize)
            .sort_by_file_name();
        for item in walker {
            let item = match item {
                Ok(i) => i,
                Err(e) => {
                    let where_ = e
                        .path()
                        .and_then(|p| p.strip_prefix(root).ok())
                        .map(|p| p.display().to_string())
                        .unwrap_or_else(|| root.display().to_string());
                    skipped.push(format!("{where_}: {e}"));
                    continue;
                }
            };
            if item.path_is_symlink() {
                let rel = relative(root, item.path());
                skipped.push(format!("{rel}: symbolic link not followed"));
                continue;
            }
            if !item.file_type().is_file() {
                continue;
            }
            if entries.len() as u64 >= limits.entries {
                return Err(limit_error(
                    &root.display().to_string(),
                    LimitName::Entries,
                    limits.entries,
                ));
            }
            let size = item.metadata().map(|m| m.len()).unwrap_or(0);
            disk_paths.push(item.path().to_path_buf());
            entries.push(Entry {
                path: relative(root, item.path()),
                size,
                index: entries.len(),
            });
        }
        Ok(Folder {
            root: to_path_buf(root),
            entries,
            disk_paths,
            skipped,
        })
    }

    pub fn path(&self) -> &Path {
        &self.root
    }

    pub fn entries(&self) -> &[Entry] {
        &self.entries
    }

    pub fn read(&mut self, entry: &Entry, cap: u64) -> Result<Vec<u8>> {
        let file = self.open_entry(entry)?;
        let declared = file.metadata().map(|m| m.len()).unwrap_or(0);
        read_capped(file, cap, &entry.path, None, declared)
    }

    /// As [`Folder::read`], a piece at a time (see `Archive::stream`).
    pub fn stream(
        &mut self,
        entry: &Entry,
        cap: u64,
        piece: usize,
        sink: &mut dyn FnMut(&[u8]) -> bool,
    ) -> Result<u64> {
        let file = self.open_entry(entry)?;
        stream_capped(file, cap, &entry.path, None, piece, sink)
    }

    fn open_entry(&self, entry: &Entry) -> Result<File> {
        let full = match self.disk_paths.get(entry.index) {
            Some(p) => p.clone(),
            None => self.root.join(&entry.path),
        };
        File::open(&full).map_err(|e| Error::Read {
            entry: entry.path.clone(),
            detail: e.to_string(),
        })
    }
}

fn relative(root: &Path, path: &Path) -> String {
    let rel = path.strip_prefix(root).unwrap_or(path);
    rel.components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect::<Vec<_>>()
        .join("/")
}
