//! The checked priors: attributes with normalised base rates, reference items with
//! their members per attribute, and the match index.

use std::collections::{HashMap, HashSet};
use std::path::Path;

use super::error::{Error, Result};
use super::file::{Calibration, FORMAT, PriorsFile, Provenance};
use super::index::{Index, MatchedBy};
use crate::footprint::{Item, ItemKind};

/// Default Dirichlet prior strength α (common practice, no source: a handful of
/// pseudo-members keeps tiny items close to the population).
pub const DEFAULT_SMOOTHING: f64 = 4.0;

/// Item-level problems listed in detail before they are only counted.
const DETAILED_PROBLEMS: usize = 10;

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

impl Attribute {
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

/// A reference item.
#[derive(Debug, Clone, PartialEq)]
pub struct PriorItem {
    pub id: Option<String>,
    pub name: String,
    pub kind: Option<ItemKind>,
    /// (attribute index, member counts per value).
    pub members: Vec<(usize, Vec<f64>)>,
}

impl PriorItem {
    /// Members counted for the attribute, if the item has statistics for it.
    pub fn counts(&self, attribute: usize) -> Option<&[f64]> {
        self.members
            .iter()
            .find(|(a, _)| *a == attribute)
            .map(|(_, c)| c.as_slice())
    }

    /// The largest member total over attributes.
    pub fn support(&self) -> f64 {
        self.members
            .iter()
            .map(|(_, c)| c.iter().sum::<f64>())
            .fold(0.0, f64::max)
    }
}

/// Loaded, checked priors.
#[derive(Debug, Clone)]
pub struct Priors {
    pub provenance: Provenance,
    pub attributes: Vec<Attribute>,
    pub items: Vec<PriorItem>,
    /// Problems with single items that were skipped or repaired.
    pub warnings: Vec<String>,
    /// Where the priors came from, for messages.
    pub origin: String,
    index: Index,
}

impl Priors {
    pub fn load(path: &Path) -> Result<Priors> {
        let text = std::fs::read_to_string(path).map_err(|source| Error::Read {
            file: path.display().to_string(),
            source,
        })?;
        Priors::parse(&text, &path.display().to_string())
    }

    pub fn parse(text: &str, origin: &str) -> Result<Priors> {
        match serde_json::from_str::<PriorsFile>(text) {
            Ok(file) => Priors::from_file(file, origin),
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
                    message: e.to_string(),
                })
            }
        }
    }

    /// Check a priors structure (as read, or as built in memory).
    pub fn from_file(file: PriorsFile, origin: &str) -> Result<Priors> {
        let mut problems = Vec::new();
        if file.format != FORMAT {
            return Err(Error::Version {
                file: origin.to_string(),
                found: file.format.to_string(),
                expected: FORMAT,
            });
        }
        let mut attributes = Vec::new();
        let mut seen_ids = HashSet::new();
        for (ai, spec) in file.attributes.iter().enumerate() {
            let at = format!("attributes[{ai}] ({})", spec.id);
            if !seen_ids.insert(spec.id.clone()) {
                problems.push(format!("{at}: the id '{}' is used twice", spec.id));
            }
            if spec.values.len() < 2 {
                problems.push(format!("{at}: needs at least two values"));
                continue;
            }
            let mut value_ids = HashSet::new();
            for v in &spec.values {
                if !value_ids.insert(v.id.as_str()) {
                    problems.push(format!("{at}: the value '{}' is listed twice", v.id));
                }
                if !(v.base_rate.is_finite() && v.base_rate > 0.0) {
                    problems.push(format!(
                        "{at}: value '{}' has base_rate {}; base rates must be above 0",
                        v.id, v.base_rate
                    ));
                }
            }
            let total: f64 = spec.values.iter().map(|v| v.base_rate).sum();
            if (total - 1.0).abs() > 0.01 {
                problems.push(format!(
                    "{at}: base rates add up to {total:.4}; they must add up to 1"
                ));
            }
            if !(spec.threshold > 0.0 && spec.threshold <= 1.0) {
                problems.push(format!(
                    "{at}: threshold {} must be above 0 and at most 1",
                    spec.threshold
                ));
            }
            let smoothing = spec.smoothing.unwrap_or(DEFAULT_SMOOTHING);
            if !(smoothing.is_finite() && smoothing >= 0.0) {
                problems.push(format!("{at}: smoothing must be 0 or more"));
            }
            let pseudocount = spec.pseudocount.unwrap_or(0.0);
            if !(pseudocount.is_finite() && pseudocount >= 0.0) {
                problems.push(format!("{at}: pseudocount must be 0 or more"));
            }
            if smoothing + pseudocount <= 0.0 {
                problems.push(format!(
                    "{at}: smoothing and pseudocount cannot both be 0 (items with one member would be certain)"
                ));
            }
            let calibration = spec.calibration.clone().unwrap_or_default();
            let lambda = crate::calibration::lambda(&calibration);
            if !(lambda.is_finite() && lambda > 0.0) {
                problems.push(format!("{at}: calibration lambda must be above 0"));
            }
            if let Calibration::Logistic {
                intercept,
                log_odds,
                log_base_rate,
                evidence_spread,
                ..
            } = calibration
                && ![intercept, log_odds, log_base_rate, evidence_spread]
                    .iter()
                    .all(|w| w.is_finite())
            {
                problems.push(format!(
                    "{at}: logistic calibration weights must be finite numbers"
                ));
            }
            let mut member_rates = Vec::with_capacity(spec.values.len());
            let given = spec
                .values
                .iter()
                .filter(|v| v.member_rate.is_some())
                .count();
            if given != 0 && given != spec.values.len() {
                problems.push(format!(
                    "{at}: member_rate is given for {given} of {} values; give it for all or none",
                    spec.values.len()
                ));
            }
            for v in &spec.values {
                let m = v.member_rate.unwrap_or(v.base_rate);
                if !(m.is_finite() && m > 0.0) {
                    problems.push(format!(
                        "{at}: value '{}' has member_rate {m}; it must be above 0",
                        v.id
                    ));
                }
                member_rates.push(m.max(f64::MIN_POSITIVE));
            }
            let member_total: f64 = member_rates.iter().sum();
            member_rates.iter_mut().for_each(|m| *m /= member_total);
            let base_rates: Vec<f64> = spec
                .values
                .iter()
                .map(|v| v.base_rate.max(f64::MIN_POSITIVE) / total)
                .collect();
            attributes.push(Attribute {
                id: spec.id.clone(),
                label: spec.label.clone(),
                values: spec
                    .values
                    .iter()
                    .map(|v| AttrValue {
                        id: v.id.clone(),
                        label: v.label.clone(),
                    })
                    .collect(),
                log_base: base_rates.iter().map(|p| p.ln()).collect(),
                base_rates,
                member_rates,
                threshold: spec.threshold,
                smoothing,
                pseudocount,
                special_category: spec.special_category.clone(),
                calibration,
            });
        }
        if attributes.is_empty() && problems.is_empty() {
            problems.push("no attributes: the file must list at least one".into());
        }
        if !problems.is_empty() {
            return Err(Error::Invalid {
                file: origin.to_string(),
                problems,
            });
        }

        let attr_index: HashMap<&str, usize> = attributes
            .iter()
            .enumerate()
            .map(|(i, a)| (a.id.as_str(), i))
            .collect();
        let mut warnings = Vec::new();
        let note = |w: String, warnings: &mut Vec<String>, count: &mut usize| {
            *count += 1;
            if *count <= DETAILED_PROBLEMS {
                warnings.push(w);
            }
        };
        let mut n_problems = 0usize;
        let mut items = Vec::with_capacity(file.items.len());
        let mut aliases = Vec::with_capacity(file.items.len());
        let mut seen_items: HashSet<String> = HashSet::new();
        for (ii, spec) in file.items.into_iter().enumerate() {
            let at = format!("items[{ii}] ('{}')", spec.name);
            if let Some(id) = &spec.id
                && !seen_items.insert(id.clone())
            {
                note(
                    format!("{at}: the id '{id}' is listed twice; the later entry is ignored"),
                    &mut warnings,
                    &mut n_problems,
                );
                continue;
            }
            let mut members = Vec::new();
            for (attr_id, m) in &spec.members {
                let Some(&ai) = attr_index.get(attr_id.as_str()) else {
                    note(
                        format!("{at}: unknown attribute '{attr_id}'; its counts are ignored"),
                        &mut warnings,
                        &mut n_problems,
                    );
                    continue;
                };
                let k = attributes[ai].values.len();
                if m.len() != k {
                    note(
                        format!(
                            "{at}: '{attr_id}' has {} counts for {k} values; ignored",
                            m.len()
                        ),
                        &mut warnings,
                        &mut n_problems,
                    );
                    continue;
                }
                let counts: Vec<f64> = m
                    .counts()
                    .into_iter()
                    .map(|c| if c.is_finite() { c.max(0.0) } else { 0.0 })
                    .collect();
                members.push((ai, counts));
            }
            members.sort_by_key(|(a, _)| *a);
            aliases.push(spec.aliases);
            items.push(PriorItem {
                id: spec.id,
                name: spec.name,
                kind: spec.kind,
                members,
            });
        }
        if n_problems > DETAILED_PROBLEMS {
            warnings.push(format!(
                "… and {} more item problem(s)",
                n_problems - DETAILED_PROBLEMS
            ));
        }
        let index = Index::build(&items, &aliases);
        Ok(Priors {
            provenance: file.provenance,
            attributes,
            items,
            warnings,
            origin: origin.to_string(),
            index,
        })
    }

    /// Attribute by id.
    pub fn attribute(&self, id: &str) -> Option<(usize, &Attribute)> {
        self.attributes.iter().enumerate().find(|(_, a)| a.id == id)
    }

    /// The reference item an archive item matches, if any.
    pub fn find(&self, item: &Item) -> Option<(usize, MatchedBy)> {
        self.index.find(&self.items, item)
    }
}
