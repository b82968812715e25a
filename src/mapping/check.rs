//! Checking a mapping against an archive (`telltale mapping check`): for each source,
//! which files it matches, how many records it reads and keeps, and what went wrong.
//! Each source is imported on its own, so the counts are exactly what that source
//! contributes. Friends are only counted, never named.

use super::model::{Mapping, SourceKind};
use crate::archive::Archive;
use crate::import;
use crate::limits::Limits;

/// What one source matched.
#[derive(Debug, Clone, PartialEq)]
pub struct SourceCheck {
    pub number: usize,
    pub label: String,
    pub kind: SourceKind,
    pub files: Vec<String>,
    pub records_seen: usize,
    pub records_skipped: usize,
    /// Items, friends, or declared attributes kept.
    pub kept: usize,
    /// Kept records with a date.
    pub dated: usize,
    pub warnings: Vec<String>,
}

impl SourceCheck {
    /// The source's kind, with its label when the mapping gave one.
    pub fn title(&self) -> String {
        if self.label == format!("source {} ({})", self.number, self.kind) {
            self.kind.to_string()
        } else {
            format!("{}: {}", self.kind, self.label)
        }
    }

    /// What `kept` counts, with its number: "12 items", "1 friend".
    pub fn kept_words(&self) -> String {
        let (one, many) = match self.kind {
            SourceKind::Item(_) => ("item", "items"),
            SourceKind::Friend => ("friend", "friends"),
            SourceKind::SelfDeclared => ("attribute value", "attribute values"),
        };
        crate::reading::count(self.kept, one, many)
    }
}

/// What a mapping finds in an archive.
#[derive(Debug, Clone, PartialEq)]
pub struct MappingCheck {
    pub sources: Vec<SourceCheck>,
    /// Warnings about the archive as a whole (entries left out while listing, an empty
    /// archive), given once rather than with every source.
    pub archive_warnings: Vec<String>,
}

/// Import each source of the mapping on its own and count what it yields.
pub fn check_against(
    mapping: &Mapping,
    archive_path: &std::path::Path,
    limits: &Limits,
) -> Result<MappingCheck, import::Error> {
    let mut out = Vec::new();
    let mut archive_warnings: Vec<String> = Vec::new();
    for source in &mapping.sources {
        let mut archive = Archive::open(archive_path, limits).map_err(import::Error::from)?;
        let files: Vec<String> = archive
            .entries()
            .iter()
            .filter(|e| source.matches(&e.path))
            .map(|e| e.path.clone())
            .collect();
        let one = Mapping {
            label: mapping.label.clone(),
            sources: vec![source.clone()],
            origin: mapping.origin.clone(),
        };
        let fp = import::import(&mut archive, &one, limits)?;
        let (kept, dated) = match source.kind {
            SourceKind::Item(_) => (
                fp.items.len(),
                fp.items.iter().filter(|i| i.date.is_some()).count(),
            ),
            SourceKind::Friend => (
                fp.friends.len(),
                fp.friends.iter().filter(|f| f.date.is_some()).count(),
            ),
            SourceKind::SelfDeclared => (fp.declared.len(), 0),
        };
        out.push(SourceCheck {
            number: source.number,
            label: source.label.clone(),
            kind: source.kind,
            files,
            records_seen: fp.stats.records_seen,
            records_skipped: fp.stats.records_skipped,
            kept,
            dated,
            warnings: fp
                .warnings
                .iter()
                .filter(|w| w.file.is_some())
                .map(|w| w.to_string())
                .collect(),
        });
        for w in fp.warnings.iter().filter(|w| w.file.is_none()) {
            let w = w.to_string();
            if !archive_warnings.contains(&w) {
                archive_warnings.push(w);
            }
        }
    }
    Ok(MappingCheck {
        sources: out,
        archive_warnings,
    })
}
