//! Looking at an archive's structure: every JSON, NDJSON and CSV file is read (within
//! the reading limits) and searched for sets of records — arrays of objects in JSON
//! (including arrays split into typed sections, such as a list of `{type, entries}`
//! wrappers), one object per line in NDJSON, one row per line in CSV — and for single
//! objects that may hold the person's own statement of their attributes. Each set's
//! fields are profiled: how often present, how many different values, whether they
//! read as dates, identifiers or names. Nothing here knows any real platform's files:
//! only shapes and values are looked at.

use std::collections::HashMap;

use serde_json::{Map, Value};

use crate::archive::{Archive, ReadBudget};
use crate::limits::Limits;
use crate::mapping::{DateFormat, Format};
use crate::records::{decode_text, json_depth, parse_date};
use crate::text::repair_latin1_mojibake;

/// Distinct values remembered per field (enough to judge uniqueness and to match
/// attribute values).
const DISTINCT_CAP: usize = 5_000;
/// Records profiled per set: enough to judge every field, while a huge array is
/// still only counted past this (common practice, no source).
const PROFILED: usize = 100_000;
/// Nested objects inside a record are flattened this deep.
const FIELD_DEPTH: usize = 3;
/// Unix seconds counted as plausible dates: 1973-03-03 to 2099-12-31.
const DATE_RANGE: std::ops::RangeInclusive<i64> = 100_000_000..=4_102_444_800;

/// One step of a path from a JSON document to its records.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub enum Step {
    Key(String),
    /// Every element of an array.
    Each,
    /// The elements of an array whose `key` holds `value`.
    Where {
        key: String,
        value: String,
    },
}

/// What one field of a record set looks like.
#[derive(Debug, Clone, Default)]
pub struct FieldProfile {
    /// Keys from the record to the value (one column name for CSV).
    pub keys: Vec<String>,
    /// Records where the field holds a single non-empty value.
    pub present: usize,
    /// … of which text.
    pub texts: usize,
    /// … that read as dates.
    pub dates: usize,
    /// … text with white space in it.
    pub spaced: usize,
    /// … text or numbers without white space, under 65 characters.
    pub compact: usize,
    /// … text with a letter in it (names have letters; counts and codes may not).
    pub lettered: usize,
    /// … text that the Latin-1 repair would change.
    pub mojibake: usize,
    /// Distinct values and how often each was seen (capped).
    pub values: HashMap<String, usize>,
    /// More distinct values were seen than were kept.
    pub overflow: bool,
}

impl FieldProfile {
    pub fn distinct(&self) -> usize {
        self.values.len()
    }

    /// Every value different (as far as they were kept).
    pub fn unique(&self) -> bool {
        self.present > 0 && (self.overflow || self.values.len() == self.present)
    }

    fn add(&mut self, v: &Value) {
        let text = match v {
            Value::String(s) => {
                let t = s.trim();
                if t.is_empty() {
                    return;
                }
                self.texts += 1;
                if t.chars().any(char::is_alphabetic) {
                    self.lettered += 1;
                }
                if t.chars().any(char::is_whitespace) {
                    self.spaced += 1;
                }
                if !t.is_ascii() && repair_latin1_mojibake(t) != t {
                    self.mojibake += 1;
                }
                t.to_string()
            }
            Value::Number(n) => n.to_string(),
            Value::Bool(b) => b.to_string(),
            _ => return,
        };
        self.present += 1;
        if parse_date(v, DateFormat::Auto).is_ok_and(|d| DATE_RANGE.contains(&d)) {
            self.dates += 1;
        }
        if text.len() < 65 && !text.chars().any(char::is_whitespace) {
            self.compact += 1;
        }
        if let Some(n) = self.values.get_mut(&text) {
            *n += 1;
        } else if self.values.len() < DISTINCT_CAP {
            self.values.insert(text, 1);
        } else {
            self.overflow = true;
        }
    }
}

/// A set of records found in one file.
#[derive(Debug, Clone)]
pub struct RecordSet {
    pub file: String,
    pub format: Format,
    /// Path to the records (JSON); `None` for NDJSON lines, CSV rows, or a whole
    /// document that is itself the record.
    pub steps: Option<Vec<Step>>,
    pub delimiter: u8,
    pub records: usize,
    /// Records whose fields were profiled (the first [`PROFILED`] of them); the field
    /// counts are out of this.
    pub profiled: usize,
    /// One object rather than a list of them.
    pub single: bool,
    pub fields: Vec<FieldProfile>,
}

impl RecordSet {
    /// The keys along the path to the records (and the section type), for guessing.
    pub fn path_words(&self) -> Vec<String> {
        self.steps
            .iter()
            .flatten()
            .filter_map(|s| match s {
                Step::Key(k) => Some(k.clone()),
                Step::Where { value, .. } => Some(value.clone()),
                Step::Each => None,
            })
            .collect()
    }

    /// The section type, for records split into typed sections.
    pub fn section(&self) -> Option<&str> {
        self.steps.iter().flatten().find_map(|s| match s {
            Step::Where { value, .. } => Some(value.as_str()),
            _ => None,
        })
    }
}

/// What inspecting an archive found.
#[derive(Debug, Clone, Default)]
pub struct Inspection {
    pub sets: Vec<RecordSet>,
    /// Files not read as data (not JSON, NDJSON or CSV), by path.
    pub other_files: Vec<String>,
    /// Data files that could not be used, with the reason.
    pub unreadable: Vec<(String, String)>,
    /// Entries left out while listing the archive (symbolic links, unreadable
    /// folders), as the archive reported them.
    pub skipped: Vec<String>,
    /// Data files read.
    pub data_files: usize,
}

/// Inspect every data file of an archive, within the reading limits: bytes per file
/// and in all, JSON depth, NDJSON line length, and records (past the records limit the
/// remaining files are not inspected).
pub fn inspect(archive: &mut Archive, limits: &Limits) -> Inspection {
    let mut out = Inspection::default();
    let mut budget = ReadBudget::new(limits);
    let mut records: u64 = 0;
    for entry in archive.entries().to_vec() {
        let lower = entry.path.to_lowercase();
        let ext = lower.rsplit('.').next().unwrap_or("");
        let format = match ext {
            "json" => Format::Json,
            "ndjson" | "jsonl" => Format::Ndjson,
            "csv" | "tsv" => Format::Csv,
            _ => {
                out.other_files.push(entry.path.clone());
                continue;
            }
        };
        if records > limits.records {
            out.unreadable.push((
                entry.path.clone(),
                format!(
                    "not inspected: the archive already holds more than {} records (raise it with --limit records=N if the archive is trusted)",
                    limits.records
                ),
            ));
            continue;
        }
        let bytes = match archive.read(&entry, &mut budget) {
            Ok(b) => b,
            Err(e) => {
                let text = e.to_string();
                let prefix = format!("{}: ", entry.path);
                let text = text.strip_prefix(&prefix).unwrap_or(&text).to_string();
                out.unreadable.push((entry.path.clone(), text));
                continue;
            }
        };
        out.data_files += 1;
        let (text, _) = decode_text(&bytes);
        let found = match format {
            Format::Json => match json_sets(&text, &entry.path, limits) {
                Ok(sets) => Ok(sets),
                // A .json file that is really one object per line.
                Err(e) => ndjson_set(&text, &entry.path, limits)
                    .map(|s| vec![s])
                    .ok_or(e),
            }
            .map_err(|e| (entry.path.clone(), e)),
            Format::Ndjson => ndjson_set(&text, &entry.path, limits)
                .map(|s| vec![s])
                .ok_or_else(|| (entry.path.clone(), "no line holds a JSON object".into())),
            Format::Csv => csv_set(&text, &entry.path, ext == "tsv")
                .map(|s| vec![s])
                .map_err(|e| (entry.path.clone(), e)),
        };
        match found {
            Ok(sets) => {
                records += sets.iter().map(|s| s.records as u64).sum::<u64>();
                out.sets.extend(sets);
            }
            Err(problem) => out.unreadable.push(problem),
        }
    }
    out
}

fn json_sets(text: &str, file: &str, limits: &Limits) -> Result<Vec<RecordSet>, String> {
    if json_depth(text) as u64 > limits.json_depth {
        return Err(format!(
            "nested deeper than the limit of {}",
            limits.json_depth
        ));
    }
    let doc: Value = serde_json::from_str(text).map_err(|e| format!("not valid JSON: {e}"))?;
    let mut sets = Vec::new();
    let mut steps = Vec::new();
    walk(&doc, &mut steps, file, &mut sets);
    Ok(sets)
}

fn walk(v: &Value, steps: &mut Vec<Step>, file: &str, out: &mut Vec<RecordSet>) {
    match v {
        Value::Object(map) => {
            let scalars = map
                .values()
                .filter(|x| matches!(x, Value::String(_) | Value::Number(_)))
                .count();
            if scalars >= 2 {
                out.push(record_set(file, steps, true, &[map]));
            }
            for (k, child) in map {
                steps.push(Step::Key(k.clone()));
                walk(child, steps, file, out);
                steps.pop();
            }
        }
        Value::Array(items) => walk_elements(&items.iter().collect::<Vec<_>>(), steps, file, out),
        _ => {}
    }
}

/// The elements of one array (or of several, for typed sections).
fn walk_elements(items: &[&Value], steps: &mut Vec<Step>, file: &str, out: &mut Vec<RecordSet>) {
    let objects: Vec<&Map<String, Value>> = items.iter().filter_map(|v| v.as_object()).collect();
    if objects.is_empty() || objects.len() * 5 < items.len() * 4 {
        return;
    }
    if let Some((type_key, list_key, types)) = sections(&objects) {
        for t in types {
            let mut children = Vec::new();
            for o in &objects {
                if o.get(&type_key).and_then(Value::as_str) == Some(t.as_str())
                    && let Some(Value::Array(a)) = o.get(&list_key)
                {
                    children.extend(a.iter());
                }
            }
            steps.push(Step::Where {
                key: type_key.clone(),
                value: t,
            });
            steps.push(Step::Key(list_key.clone()));
            walk_elements(&children, steps, file, out);
            steps.pop();
            steps.pop();
        }
        return;
    }
    steps.push(Step::Each);
    out.push(record_set(file, steps, false, &objects));
    steps.pop();
}

/// Thin wrappers that split records into typed sections: every object has at most
/// four keys, one of them a short text with few distinct values (the type) and one a
/// list of objects (the entries).
fn sections(objects: &[&Map<String, Value>]) -> Option<(String, String, Vec<String>)> {
    if objects.iter().any(|o| o.len() > 4) {
        return None;
    }
    let first = objects[0];
    let list_key = first.iter().find_map(|(k, v)| {
        let is_list = |v: &Value| {
            v.as_array()
                .is_some_and(|a| !a.is_empty() && a.iter().all(Value::is_object))
        };
        (is_list(v) && objects.iter().all(|o| o.get(k).is_some_and(is_list))).then(|| k.clone())
    })?;
    let type_key = first.iter().find_map(|(k, v)| {
        (v.is_string()
            && objects
                .iter()
                .all(|o| o.get(k).is_some_and(Value::is_string)))
        .then(|| k.clone())
    })?;
    let mut types: Vec<String> = Vec::new();
    for o in objects {
        if let Some(t) = o.get(&type_key).and_then(Value::as_str)
            && !types.iter().any(|x| x == t)
        {
            types.push(t.to_string());
        }
    }
    (types.len() <= 20 && types.iter().all(|t| t.chars().count() <= 40))
        .then_some((type_key, list_key, types))
}

fn record_set(
    file: &str,
    steps: &[Step],
    single: bool,
    records: &[&Map<String, Value>],
) -> RecordSet {
    let mut fields: Vec<FieldProfile> = Vec::new();
    let mut index: HashMap<Vec<String>, usize> = HashMap::new();
    let profiled = records.len().min(PROFILED);
    for r in &records[..profiled] {
        let mut keys = Vec::new();
        flatten(r, &mut keys, &mut fields, &mut index);
    }
    RecordSet {
        file: file.to_string(),
        format: Format::Json,
        steps: if steps.is_empty() {
            None
        } else {
            Some(steps.to_vec())
        },
        delimiter: b',',
        records: records.len(),
        profiled,
        single,
        fields,
    }
}

fn flatten(
    map: &Map<String, Value>,
    keys: &mut Vec<String>,
    fields: &mut Vec<FieldProfile>,
    index: &mut HashMap<Vec<String>, usize>,
) {
    for (k, v) in map {
        keys.push(k.clone());
        match v {
            Value::Object(inner) if keys.len() < FIELD_DEPTH => flatten(inner, keys, fields, index),
            Value::Object(_) | Value::Array(_) | Value::Null => {}
            scalar => {
                let i = *index.entry(keys.clone()).or_insert_with(|| {
                    fields.push(FieldProfile {
                        keys: keys.clone(),
                        ..FieldProfile::default()
                    });
                    fields.len() - 1
                });
                fields[i].add(scalar);
            }
        }
        keys.pop();
    }
}

/// One object per line. Only the first [`PROFILED`] objects are kept for profiling;
/// the rest are counted. Lines over the line limit or too deep are left out, as the
/// import would.
fn ndjson_set(text: &str, file: &str, limits: &Limits) -> Option<RecordSet> {
    let mut objects = Vec::new();
    let mut records = 0;
    for line in text.lines().filter(|l| !l.trim().is_empty()) {
        if line.len() as u64 > limits.line_bytes || json_depth(line) as u64 > limits.json_depth {
            continue;
        }
        if let Ok(Value::Object(o)) = serde_json::from_str::<Value>(line) {
            records += 1;
            if objects.len() < PROFILED {
                objects.push(o);
            }
        }
    }
    if objects.is_empty() {
        return None;
    }
    let refs: Vec<&Map<String, Value>> = objects.iter().collect();
    let mut set = record_set(file, &[], false, &refs);
    set.format = Format::Ndjson;
    set.records = records;
    Some(set)
}

fn csv_set(text: &str, file: &str, tab: bool) -> Result<RecordSet, String> {
    let header = text.lines().next().unwrap_or("");
    let delimiter = if tab {
        b'\t'
    } else {
        [b',', b';', b'\t', b'|']
            .into_iter()
            .max_by_key(|d| header.bytes().filter(|b| b == d).count())
            .unwrap_or(b',')
    };
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .flexible(true)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = reader
        .headers()
        .map_err(|e| format!("cannot read the CSV header: {e}"))?
        .iter()
        .map(|h| h.trim().to_string())
        .collect();
    if headers.iter().all(String::is_empty) {
        return Err("the CSV file has no header row".into());
    }
    let mut fields: Vec<FieldProfile> = headers
        .iter()
        .map(|h| FieldProfile {
            keys: vec![h.clone()],
            ..FieldProfile::default()
        })
        .collect();
    let mut records = 0;
    for row in reader.records().flatten() {
        records += 1;
        if records > PROFILED {
            continue;
        }
        for (f, cell) in fields.iter_mut().zip(row.iter()) {
            f.add(&Value::String(cell.to_string()));
        }
    }
    Ok(RecordSet {
        file: file.to_string(),
        format: Format::Csv,
        steps: None,
        delimiter,
        records,
        profiled: records.min(PROFILED),
        single: false,
        fields,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn arrays_of_objects_and_typed_sections_are_found() {
        let doc = r#"{"box": {"count": 2, "rows": [
            {"who": {"label": "A b", "ref": "x1"}, "at": 1600000000},
            {"who": {"label": "C d", "ref": "x2"}, "at": "2021-01-02"}]},
          "parts": [
            {"kind": "alpha", "list": [{"t": "one"}, {"t": "two"}]},
            {"kind": "beta", "list": [{"t": "three"}]},
            {"kind": "alpha", "list": [{"t": "four"}]}]}"#;
        let sets = json_sets(doc, "f.json", &Limits::default()).unwrap();
        let lists: Vec<_> = sets.iter().filter(|s| !s.single).collect();
        assert_eq!(lists.len(), 3);
        assert_eq!(lists[0].records, 2);
        let at = lists[0].fields.iter().find(|f| f.keys == ["at"]).unwrap();
        assert_eq!(at.dates, 2);
        let label = lists[0]
            .fields
            .iter()
            .find(|f| f.keys == ["who", "label"])
            .unwrap();
        assert_eq!((label.spaced, label.unique()), (2, true));
        assert_eq!(lists[1].section(), Some("alpha"));
        assert_eq!(lists[1].records, 3);
        assert_eq!(lists[2].records, 1);
    }

    #[test]
    fn csv_delimiters_are_sniffed() {
        let s = csv_set("a;b\n1;x y\n2;z\n", "f.csv", false).unwrap();
        assert_eq!(s.delimiter, b';');
        assert_eq!(s.records, 2);
        assert_eq!(s.fields[1].spaced, 1);
    }
}
