//! Reading a cohort folder: every archive in it (an unpacked folder or a zip file at the
//! top level), each through its own mapping found the usual way, becomes a [`Member`]:
//! the candidate items they show (matched against the schema's items by id, then
//! normalised name) and the values they declared through a `self` source. Nothing
//! else is kept: not the archive's name, the person's name or any friend.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

use super::error::{Error, Result};
use crate::archive::Archive;
use crate::import;
use crate::limits::Limits;
use crate::mapping::{self, Mapping};
use crate::priors::{Priors, PriorsFile};

/// The attribute schema and the candidate items a cohort is counted against.
#[derive(Debug, Clone)]
pub struct Schema {
    /// As read (attributes are copied into the output; items are the candidates).
    pub file: PriorsFile,
    /// Checked, with the match index; `priors.items()` are the candidates.
    pub priors: Priors,
}

impl Schema {
    pub fn new(file: PriorsFile, origin: &str) -> crate::priors::Result<Schema> {
        let priors = Priors::from_file(file.clone(), origin)?;
        Ok(Schema { file, priors })
    }

    pub fn n_attributes(&self) -> usize {
        self.priors.attributes.len()
    }

    pub fn n_items(&self) -> usize {
        self.priors.len_items()
    }
}

/// One contributor, as far as the statistics need: which candidate items they show
/// and what they declared.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Member {
    /// Indices into the schema's candidate items, sorted and distinct.
    pub items: Vec<u32>,
    /// Declared value index per schema attribute (`None`: not declared, or a value the
    /// schema does not know).
    pub values: Vec<Option<usize>>,
}

impl Member {
    /// Whether the member declared at least one attribute.
    pub fn is_labelled(&self) -> bool {
        self.values.iter().any(Option::is_some)
    }
}

/// A read cohort.
#[derive(Debug, Clone, Default)]
pub struct Cohort {
    pub members: Vec<Member>,
    /// Archives found in the folder (read or not).
    pub archives: usize,
    /// Problems met; an archive that could not be read is left out.
    pub warnings: Vec<String>,
}

fn is_archive(path: &Path) -> bool {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    if name.starts_with('.') {
        return false;
    }
    if path.is_dir() {
        return true;
    }
    path.extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("zip"))
}

/// The archives directly inside `dir`, sorted by name.
pub fn list_archives(dir: &Path) -> Result<Vec<PathBuf>> {
    let rd = std::fs::read_dir(dir).map_err(|source| Error::ReadDir {
        dir: dir.to_path_buf(),
        cause: source,
    })?;
    let mut out: Vec<PathBuf> = rd
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| is_archive(p))
        .collect();
    out.sort();
    Ok(out)
}

/// Read one archive into a member.
pub fn read_member(
    path: &Path,
    schema: &Schema,
    limits: &Limits,
) -> std::result::Result<(Member, Vec<String>), String> {
    let mut archive = Archive::open(path, limits).map_err(|e| e.to_string())?;
    let found = mapping::locate(&mut archive).map_err(|e| e.to_string())?;
    let mapping = Mapping::parse(&found.text, &found.origin).map_err(|e| e.to_string())?;
    let footprint = import::import(&mut archive, &mapping, limits).map_err(|e| e.to_string())?;
    let mut items = BTreeSet::new();
    for item in &footprint.items {
        if let Some((i, _)) = schema.priors.find(item) {
            items.insert(i as u32);
        }
    }
    let mut notes = Vec::new();
    let values = schema
        .priors
        .attributes
        .iter()
        .map(|a| {
            let v = footprint.declared.get(&a.id)?;
            let idx = a.value_index(v);
            if idx.is_none() {
                notes.push(format!(
                    "declares {} = '{v}', which the schema does not list; left out for that attribute",
                    a.id
                ));
            }
            idx
        })
        .collect();
    Ok((
        Member {
            items: items.into_iter().collect(),
            values,
        },
        notes,
    ))
}

/// Read every archive in `dir`. `progress(done, total)` is called after each archive.
/// Archives that cannot be read, or that declare nothing, are left out with a warning
/// naming their position (the folder's own listing tells which one it is).
pub fn load_cohort(
    dir: &Path,
    schema: &Schema,
    limits: &Limits,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<Cohort> {
    let archives = list_archives(dir)?;
    let total = archives.len();
    let mut cohort = Cohort {
        archives: total,
        ..Cohort::default()
    };
    for (n, path) in archives.iter().enumerate() {
        let name = path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| path.display().to_string());
        match read_member(path, schema, limits) {
            Ok((member, notes)) => {
                for note in notes {
                    cohort.warnings.push(format!("{name}: {note}"));
                }
                if member.is_labelled() {
                    cohort.members.push(member);
                } else {
                    cohort.warnings.push(format!(
                        "{name}: declares no attribute the schema knows (no `self` source, or an empty one); left out"
                    ));
                }
            }
            Err(e) => cohort.warnings.push(format!("{name}: {e}; left out")),
        }
        progress(n + 1, total);
    }
    if cohort.members.is_empty() {
        return Err(Error::Empty {
            dir: dir.to_path_buf(),
            warnings: cohort.warnings.len(),
        });
    }
    Ok(cohort)
}
