//! The checked priors: attributes with normalised base rates, reference items with
//! their members per attribute, and the match index.

use std::path::Path;

use super::check::{ItemBuilder, check_attributes};
use super::error::{Error, Result};
use super::file::{Calibration, FORMAT, ItemSpec, MemberSpec, PriorsFile, Provenance};
use super::index::{Index, MatchedBy};
use super::store::{Items, PriorItem};
use crate::footprint::Item;
use crate::limits::{LimitName, Limits};

/// The error for a priors file of `len` bytes, over the size limit.
pub(crate) fn too_big(origin: &str, len: u64, limits: &Limits) -> Error {
    Error::Limit {
        file: origin.to_string(),
        what: format!("the file is {}", LimitName::PriorsBytes.show(len)),
        name: LimitName::PriorsBytes,
        limit: limits.priors_bytes,
    }
}

/// A priors file's text, refused before it is read when it is over the size limit.
pub(crate) fn read_within(path: &Path, origin: &str, limits: &Limits) -> Result<String> {
    let read_err = |source| Error::Read {
        file: origin.to_string(),
        cause: source,
    };
    let len = std::fs::metadata(path).map_err(read_err)?.len();
    if len > limits.priors_bytes {
        return Err(too_big(origin, len, limits));
    }
    std::fs::read_to_string(path).map_err(read_err)
}

/// Default Dirichlet prior strength α (common practice, no source: a handful of
/// pseudo-members keeps tiny items close to the population).
pub const DEFAULT_SMOOTHING: f64 = 4.0;

#[derive(Debug, Clone, PartialEq)]
pub struct AttrValue {
    pub id: String,
    pub label: String,
}

/// A protected attribute, ready for inference.
#[derive(Debug, Clone, PartialEq)]
pub struct Attribute {
    pub id: String,
    pub label: String,
    pub values: Vec<AttrValue>,
    /// Population base rates π(v), summing to 1.
    pub base_rates: Vec<f64>,
    /// ln π(v).
    pub log_base: Vec<f64>,
    /// Share of item memberships per value, μ(v), summing to 1: the reference an
    /// item's members are compared with (equals the base rates when the file gives
    /// none).
    pub member_rates: Vec<f64>,
    pub threshold: f64,
    pub smoothing: f64,
    pub pseudocount: f64,
    pub special_category: Option<String>,
    pub calibration: Calibration,
}

/// Id of a remainder value ("none of the values named", such as the home levels'
/// "elsewhere"): guessing it discloses nothing, so the alert rule never flags it, the
/// planner never constrains it and its reading says the footprint does not narrow the
/// attribute down.
pub const REMAINDER_ID: &str = "elsewhere";

impl Attribute {
    /// The remainder value's index, if the attribute has one ([`REMAINDER_ID`]).
    pub fn remainder(&self) -> Option<usize> {
        self.values.iter().position(|v| v.id == REMAINDER_ID)
    }

    /// Find a value by id or label (case-insensitive).
    pub fn value_index(&self, s: &str) -> Option<usize> {
        let s = s.trim();
        self.values.iter().position(|v| v.id == s).or_else(|| {
            self.values
                .iter()
                .position(|v| v.id.eq_ignore_ascii_case(s) || v.label.eq_ignore_ascii_case(s))
        })
    }

    /// The uniform-guess rate 1/|V|.
    pub fn uniform_rate(&self) -> f64 {
        1.0 / self.values.len() as f64
    }
}

/// Loaded, checked priors.
#[derive(Debug, Clone)]
pub struct Priors {
    pub provenance: Provenance,
    pub attributes: Vec<Attribute>,
    /// Problems with single items that were skipped or repaired.
    pub warnings: Vec<String>,
    /// Where the priors came from, for messages.
    pub origin: String,
    /// What happened with the binary cache (used, written, refused and why); empty
    /// when no cache was involved. For a note on standard error, never a report.
    pub cache_notes: Vec<String>,
    /// The rarity part of the alert rule ([`crate::alert`]): a run-time setting (flags,
    /// the explorer, saved decisions), not read from the file. With the attributes'
    /// thresholds it is the one set of alert levels every report, screen and plan uses.
    pub rarity: crate::alert::Rarity,
    pub(crate) store: Items,
    pub(crate) index: Index,
    /// The attributes as the file gives them, kept while a scan has replaced them with
    /// home levels fitted to one footprint (see [`Priors::restore_file_attributes`]).
    pub(crate) file_attributes: Option<Vec<Attribute>>,
}

impl Priors {
    /// Load a priors file within the default reading limits.
    pub fn load(path: &Path) -> Result<Priors> {
        Priors::load_within(path, &Limits::default())
    }

    /// Load a priors file within `limits` (the file's size first, then everything
    /// [`Priors::parse_within`] bounds).
    pub fn load_within(path: &Path, limits: &Limits) -> Result<Priors> {
        let origin = path.display().to_string();
        let text = read_within(path, &origin, limits)?;
        Priors::parse_within(&text, &origin, limits)
    }

    /// Parse priors text within the default reading limits.
    pub fn parse(text: &str, origin: &str) -> Result<Priors> {
        Priors::parse_within(text, origin, &Limits::default())
    }

    /// Parse priors text within `limits`: the number of items, attributes, values and
    /// aliases and the length of every name (see docs/priors.md, "Limits").
    pub fn parse_within(text: &str, origin: &str, limits: &Limits) -> Result<Priors> {
        if text.len() as u64 > limits.priors_bytes {
            return Err(too_big(origin, text.len() as u64, limits));
        }
        match super::stream::parse(text, origin, limits) {
            Ok(checked) => checked,
            Err(e) => {
                // A file of another version gets a version message rather than a list
                // of unknown fields (the version is looked at only when the full read
                // fails, so a good file is parsed once).
                #[derive(serde::Deserialize)]
                struct Head {
                    format: Option<serde_json::Value>,
                }
                if let Ok(head) = serde_json::from_str::<Head>(text) {
                    match head.format {
                        Some(f) if f.as_u64() == Some(FORMAT as u64) => {}
                        Some(f) => {
                            return Err(Error::Version {
                                file: origin.to_string(),
                                found: f.to_string(),
                                expected: FORMAT,
                            });
                        }
                        None => {
                            return Err(Error::Version {
                                file: origin.to_string(),
                                found: "missing".into(),
                                expected: FORMAT,
                            });
                        }
                    }
                }
                Err(Error::Syntax {
                    file: origin.to_string(),
                    line: e.line(),
                    column: e.column(),
                    message: crate::records::json_reason(&e),
                })
            }
        }
    }

    /// Check a priors structure (as read, or as built in memory).
    pub fn from_file(file: PriorsFile, origin: &str) -> Result<Priors> {
        if file.format != FORMAT {
            return Err(Error::Version {
                file: origin.to_string(),
                found: file.format.to_string(),
                expected: FORMAT,
            });
        }
        let attributes = check_attributes(&file.attributes, origin)?;
        let (items, index, warnings) = check_items(&attributes, &file.items, origin)?;
        Ok(Priors {
            provenance: file.provenance,
            attributes,
            warnings,
            origin: origin.to_string(),
            cache_notes: Vec::new(),
            rarity: crate::alert::Rarity::default(),
            store: items,
            index,
            file_attributes: None,
        })
    }

    /// Put back the attributes as the file gives them, undoing the home levels a scan
    /// fitted to its footprint (a no-op when there are none).
    pub fn restore_file_attributes(&mut self) {
        if let Some(a) = self.file_attributes.take() {
            self.attributes = a;
        }
    }

    /// Set attributes fitted to one footprint, keeping the file's to restore.
    pub(crate) fn set_fitted_attributes(&mut self, attributes: Vec<Attribute>) {
        let file = std::mem::replace(&mut self.attributes, attributes);
        if self.file_attributes.is_none() {
            self.file_attributes = Some(file);
        }
    }

    /// The attributes as the file gives them (before any home levels were fitted).
    pub fn file_attributes(&self) -> &[Attribute] {
        self.file_attributes.as_deref().unwrap_or(&self.attributes)
    }

    /// Number of reference items.
    pub fn len_items(&self) -> usize {
        self.store.len()
    }

    /// Reference item `i` (`i < len_items()`).
    pub fn item(&self, i: usize) -> PriorItem<'_> {
        self.store.item(i)
    }

    /// Every reference item, in file order (skipped items left out).
    pub fn items(&self) -> impl ExactSizeIterator<Item = PriorItem<'_>> + '_ {
        (0..self.store.len()).map(|i| self.store.item(i))
    }

    /// Attribute by id.
    pub fn attribute(&self, id: &str) -> Option<(usize, &Attribute)> {
        self.attributes.iter().enumerate().find(|(_, a)| a.id == id)
    }

    /// The reference item an archive item matches, if any.
    pub fn find(&self, item: &Item) -> Option<(usize, MatchedBy)> {
        self.index.find(&self.store, item)
    }
}

/// Check the items of a file read whole (or built in memory).
pub(crate) fn check_items(
    attributes: &[Attribute],
    specs: &[ItemSpec],
    origin: &str,
) -> Result<(Items, Index, Vec<String>)> {
    let mut builder = ItemBuilder::new(attributes, specs.len(), &Limits::default());
    let mut counts: Vec<Vec<f64>> = Vec::new();
    for (ii, spec) in specs.iter().enumerate() {
        counts.clear();
        counts.extend(spec.members.values().map(MemberSpec::counts));
        builder.push(
            ii,
            spec.id.as_deref(),
            &spec.name,
            spec.kind,
            spec.aliases.iter().map(String::as_str),
            spec.members
                .keys()
                .zip(&counts)
                .map(|(k, c)| (k.as_str(), c.as_slice(), c.len())),
        );
    }
    builder.finish(origin)
}
