//! Finding the mapping for an archive when the user names none: a
//! `telltale-mapping.toml` inside the archive (at its top or in its one top folder),
//! then `<archive>.mapping.toml` beside it, then `telltale-mapping.toml` beside it.

use std::path::{Path, PathBuf};

use super::error::{Error, Result};
use crate::archive::{Archive, ReadBudget};
use crate::limits::Limits;

/// The file name telltale looks for inside or beside an archive.
pub const MAPPING_FILE_NAME: &str = "telltale-mapping.toml";

/// Mapping text found for an archive, and where it was.
#[derive(Debug, Clone)]
pub struct FoundMapping {
    pub text: String,
    /// Where it was found, for messages ("inside reporter.zip: telltale-mapping.toml").
    pub origin: String,
}

/// Look for a mapping inside or beside the archive, within the default limits.
pub fn locate(archive: &mut Archive) -> Result<FoundMapping> {
    locate_within(archive, &Limits::default())
}

/// A mapping file's text, refused before it is read when over the `mapping-bytes`
/// limit.
pub(crate) fn read_mapping(path: &Path, limits: &Limits) -> Result<String> {
    let file = path.display().to_string();
    let read_err = |source| Error::Read {
        file: file.clone(),
        cause: source,
    };
    let size = std::fs::metadata(path).map_err(read_err)?.len();
    if size > limits.mapping_bytes {
        return Err(Error::TooBig {
            file,
            size,
            limit: limits.mapping_bytes,
        });
    }
    std::fs::read_to_string(path).map_err(read_err)
}

/// Look for a mapping inside or beside the archive; one over the `mapping-bytes`
/// limit is refused with a message naming it.
pub fn locate_within(archive: &mut Archive, limits: &Limits) -> Result<FoundMapping> {
    let inside = archive
        .entries()
        .iter()
        .find(|e| {
            let depth = e.path.matches('/').count();
            depth <= 1 && e.path.rsplit('/').next() == Some(MAPPING_FILE_NAME)
        })
        .cloned();
    if let Some(entry) = inside {
        if entry.size > limits.mapping_bytes {
            return Err(Error::TooBig {
                file: format!("{} (inside {})", entry.path, archive.display_name()),
                size: entry.size,
                limit: limits.mapping_bytes,
            });
        }
        let limits = Limits {
            entry_bytes: limits.mapping_bytes,
            ..limits.clone()
        };
        let mut budget = ReadBudget::new(&limits);
        if let Ok(bytes) = archive.read(&entry, &mut budget) {
            let text = String::from_utf8_lossy(&bytes).into_owned();
            return Ok(FoundMapping {
                text,
                origin: format!("{} (inside {})", entry.path, archive.display_name()),
            });
        }
    }
    for candidate in beside(archive.path()) {
        if candidate.is_file() {
            let text = read_mapping(&candidate, limits)?;
            return Ok(FoundMapping {
                text,
                origin: candidate.display().to_string(),
            });
        }
    }
    Err(Error::NotFound {
        archive: archive.path().display().to_string(),
        draft_to: beside_mapping(archive.path())
            .unwrap_or_else(|| PathBuf::from(MAPPING_FILE_NAME))
            .display()
            .to_string(),
    })
}

/// The mapping file of an archive's own name beside it (`exports/reporter` →
/// `exports/reporter.mapping.toml`, `student.zip` → `student.mapping.toml`), the first
/// place telltale looks outside the archive; `None` for a path with no name (`/`).
pub fn beside_mapping(archive: &Path) -> Option<PathBuf> {
    let parent = archive.parent().unwrap_or(Path::new("."));
    let stem = if archive.is_dir() {
        archive.file_name()
    } else {
        archive.file_stem()
    }?;
    let mut name = stem.to_os_string();
    name.push(".mapping.toml");
    Some(parent.join(name))
}

fn beside(archive: &Path) -> Vec<PathBuf> {
    let parent = archive.parent().unwrap_or(Path::new("."));
    let mut out: Vec<PathBuf> = beside_mapping(archive).into_iter().collect();
    out.push(parent.join(MAPPING_FILE_NAME));
    out
}
