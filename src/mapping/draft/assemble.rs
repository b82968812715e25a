//! Turning guesses into draft sources: record sets with a usable name field (or, for
//! the person's own statement, attribute fields) become sources; sets of the same
//! shape and kind in the same folder share one glob; when every file sits in one top
//! folder (a zip that wraps its content in a folder named after the person or the
//! date), that folder is matched by `*` so the draft fits other archives of the layout.

use std::collections::BTreeMap;

use super::guess::{KindGuess, Roles, assign_roles, attribute_fields, guess_kind};
use super::inspect::inspect;
use super::inspect::{Inspection, RecordSet};
use super::paths::{describe_place, escape_glob};
use crate::archive::Archive;
use crate::footprint::ItemKind;
use crate::limits::Limits;
use crate::mapping::SourceKind;
use crate::priors::Priors;

/// One drafted source.
#[derive(Debug, Clone)]
pub struct DraftSource {
    pub kind: KindGuess,
    pub roles: Roles,
    /// Globs naming the files (exact paths, or one glob for a folder of same-shaped
    /// files), ready for the mapping.
    pub files: Vec<String>,
    /// The files' paths inside the archive.
    pub paths: Vec<String>,
    /// Records in all those files.
    pub records: usize,
    /// The record set the source was drafted from (the first, for grouped files).
    pub set: RecordSet,
}

/// A drafted mapping, before it is written out.
#[derive(Debug, Clone)]
pub struct Draft {
    /// The archive's file or folder name.
    pub archive: String,
    /// The archive's path as the person gave it, for the commands the draft suggests.
    pub path: std::path::PathBuf,
    pub sources: Vec<DraftSource>,
    /// Record sets left out, with the reason.
    pub unused: Vec<(String, String)>,
    /// The one top folder every file sits in, replaced by `*` in the globs.
    pub top_folder: Option<String>,
    pub inspection: Inspection,
}

impl Draft {
    /// Sources whose kind was guessed from something in the archive.
    pub fn guessed(&self) -> impl Iterator<Item = &DraftSource> {
        self.sources.iter().filter(|s| s.kind.sure)
    }

    /// Sources left for the user to decide (written commented out).
    pub fn undecided(&self) -> impl Iterator<Item = &DraftSource> {
        self.sources.iter().filter(|s| !s.kind.sure)
    }
}

fn kind_order(k: SourceKind) -> usize {
    match k {
        SourceKind::Item(ItemKind::Like) => 0,
        SourceKind::Item(ItemKind::Group) => 1,
        SourceKind::Item(ItemKind::Follow) => 2,
        SourceKind::Item(ItemKind::Event) => 3,
        SourceKind::Friend => 4,
        SourceKind::SelfDeclared => 5,
    }
}

/// The folder every entry sits in, when there is exactly one and nothing beside it.
fn top_folder(entries: &[String]) -> Option<String> {
    let first = entries.first()?.split_once('/')?.0;
    entries
        .iter()
        .all(|e| e.split_once('/').is_some_and(|(top, _)| top == first))
        .then(|| first.to_string())
}

/// A file's glob, with the top folder (when there is one) matched by `*`.
fn glob_for(path: &str, top: Option<&str>) -> String {
    match top.and_then(|t| path.strip_prefix(t)?.strip_prefix('/')) {
        Some(rest) => format!("*/{}", escape_glob(rest)),
        None => escape_glob(path),
    }
}

/// A folder's glob with its trailing `/` (empty for the archive's top).
fn folder_glob(folder: &str, top: Option<&str>) -> String {
    if folder.is_empty() {
        String::new()
    } else if Some(folder) == top {
        "*/".to_string()
    } else {
        glob_for(&format!("{folder}/"), top)
    }
}

/// Inspect an archive and draft a mapping for it. The priors tell which fields hold
/// attribute values (friends' public attributes, the person's own statement). Nothing
/// is written anywhere; problems with single files end up in [`Draft::warnings`].
pub fn draft(archive: &mut Archive, priors: &Priors, limits: &Limits) -> Draft {
    let entries: Vec<String> = archive.entries().iter().map(|e| e.path.clone()).collect();
    let mut inspection = inspect(archive, limits);
    inspection.skipped = archive.skipped().to_vec();
    let mut drafted = draft_from(&archive.display_name(), inspection, &entries, priors);
    drafted.path = archive.path().to_path_buf();
    drafted
}

/// Draft sources from an inspection; `entries` lists every file of the archive (to
/// know when a glob would match more than the files drafted from).
pub fn draft_from(
    archive: &str,
    inspection: Inspection,
    entries: &[String],
    priors: &Priors,
) -> Draft {
    let mut unused = Vec::new();
    // (folder, extension, shape, kind) → sources
    type Key = (String, String, String, usize);
    let mut groups: BTreeMap<Key, Vec<DraftSource>> = BTreeMap::new();
    for set in &inspection.sets {
        let attrs = attribute_fields(set, priors);
        if set.single && attrs.is_empty() {
            // Said only when nothing else in its file was found: a file holding just
            // one object (an account profile) is then neither used nor silently lost.
            if !inspection
                .sets
                .iter()
                .any(|o| o.file == set.file && !o.single)
            {
                unused.push((
                    describe_place(set),
                    "one object, not a list of records, and no field holds the priors' attribute values".into(),
                ));
            }
            continue;
        }
        let kind = guess_kind(set, attrs.len());
        let roles = assign_roles(set, kind.kind, &attrs);
        let place = describe_place(set);
        if kind.kind == SourceKind::SelfDeclared {
            if roles.attributes.is_empty() {
                unused.push((place, "no field holds the priors' attribute values".into()));
                continue;
            }
        } else if roles.name.is_none() {
            unused.push((
                place,
                format!(
                    "{}, but no field holds names (text with letters in most records)",
                    crate::reading::count(set.records, "record", "records")
                ),
            ));
            continue;
        }
        let (folder, file) = set.file.rsplit_once('/').unwrap_or(("", &set.file));
        let ext = file
            .rsplit_once('.')
            .map(|(_, e)| e)
            .unwrap_or("")
            .to_string();
        let shape = format!(
            "{:?}|{:?}|{:?}",
            set.format,
            set.steps,
            set.fields.iter().map(|f| &f.keys).collect::<Vec<_>>()
        );
        groups
            .entry((folder.to_string(), ext, shape, kind_order(kind.kind)))
            .or_default()
            .push(DraftSource {
                files: vec![set.file.clone()],
                paths: vec![set.file.clone()],
                records: set.records,
                kind,
                roles,
                set: set.clone(),
            });
    }
    let top = top_folder(entries);
    let mut sources = Vec::new();
    for ((folder, ext, _, _), mut members) in groups {
        let mut first = members.remove(0);
        let paths: Vec<String> = std::iter::once(&first)
            .chain(&members)
            .map(|m| m.files[0].clone())
            .collect();
        first.records += members.iter().map(|m| m.records).sum::<usize>();
        first.paths = paths.clone();
        let suffix = format!(".{}", ext.to_lowercase());
        let in_folder = entries
            .iter()
            .filter(|e| {
                e.rsplit_once('/').map(|(d, _)| d).unwrap_or("") == folder
                    && e.to_lowercase().ends_with(&suffix)
            })
            .count();
        first.files = if paths.len() > 1 && in_folder == paths.len() && !ext.is_empty() {
            vec![format!(
                "{}*.{}",
                folder_glob(&folder, top.as_deref()),
                escape_glob(&ext)
            )]
        } else {
            paths.iter().map(|p| glob_for(p, top.as_deref())).collect()
        };
        sources.push(first);
    }
    sources.sort_by(|a, b| {
        kind_order(a.kind.kind)
            .cmp(&kind_order(b.kind.kind))
            .then(a.files.cmp(&b.files))
    });
    Draft {
        archive: archive.to_string(),
        path: archive.into(),
        sources,
        unused,
        top_folder: top,
        inspection,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_top_folder_becomes_a_star() {
        let entries = vec!["wrap/a.json".to_string(), "wrap/b/c.csv".to_string()];
        assert_eq!(top_folder(&entries), Some("wrap".to_string()));
        assert_eq!(glob_for("wrap/b/c.csv", Some("wrap")), "*/b/c.csv");
        assert_eq!(folder_glob("wrap", Some("wrap")), "*/");
        assert_eq!(folder_glob("wrap/b[1]", Some("wrap")), "*/b[[]1[]]/");
        assert_eq!(folder_glob("x", None), "x/");
        let mixed = vec!["wrap/a.json".to_string(), "other.json".to_string()];
        assert_eq!(top_folder(&mixed), None);
        assert_eq!(top_folder(&[]), None);
    }
}
