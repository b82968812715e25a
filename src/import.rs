//! Import: run a mapping over an archive and collect the person's footprint. Only the
//! entries some source matches are read. A file that cannot be read, or a record that
//! lacks a field, becomes a warning naming the file, record and field; the rest of the
//! import goes on. Breaking a reading limit stops the import with an error that names
//! the limit and how to raise it.

use std::collections::BTreeMap;
use std::sync::Arc;

use foldhash::{HashMap, HashMapExt};

use sha2::{Digest, Sha256};

use crate::archive::{self, Archive, ReadBudget};
use crate::footprint::{Footprint, Friend, Item, Origin, Warning};
use crate::limits::{LimitName, Limits};
use crate::mapping::{Field, Mapping, Repair, Source, SourceKind};
use crate::records::{
    FieldError, Record, RecordSink, decode_text, field_text, field_value, parse_date, read_records,
};
use crate::text::repair_latin1_mojibake;

/// Detailed warnings kept per file and field before they are summarised.
const DETAILED_WARNINGS: usize = 5;

#[derive(Debug, thiserror::Error)]
pub enum Error {
    #[error(transparent)]
    Archive(#[from] archive::Error),
    #[error(
        "{archive}: more than {limit} records (raise it with --limit records=N if the archive is trusted)"
    )]
    TooManyRecords { archive: String, limit: u64 },
}

/// Import an archive through a mapping.
pub fn import(
    archive: &mut Archive,
    mapping: &Mapping,
    limits: &Limits,
) -> Result<Footprint, Error> {
    import_with_progress(archive, mapping, limits, &mut |_, _| {})
}

/// As [`import`], telling `progress(done, total)` in declared bytes of the mapped
/// entries after each one is read (for a progress bar on long imports).
pub fn import_with_progress(
    archive: &mut Archive,
    mapping: &Mapping,
    limits: &Limits,
    progress: &mut dyn FnMut(u64, u64),
) -> Result<Footprint, Error> {
    let mut budget = ReadBudget::new(limits);
    let mut state = State::new(limits.records);
    if archive.entries().is_empty() {
        state.footprint.warnings.push(Warning::new(format!(
            "{}: the archive holds no files",
            archive.display_name()
        )));
    }
    for skipped in archive.skipped() {
        state
            .footprint
            .warnings
            .push(Warning::new(format!("{skipped}; left out")));
    }

    // Which entries each source reads, in archive order.
    let entries = archive.entries().to_vec();
    let mut wanted: Vec<(usize, Vec<usize>)> = Vec::new(); // entry index → sources
    for (s_idx, source) in mapping.sources.iter().enumerate() {
        let mut any = false;
        for (e_idx, entry) in entries.iter().enumerate() {
            if source.matches(&entry.path) {
                any = true;
                match wanted.iter_mut().find(|(e, _)| *e == e_idx) {
                    Some((_, list)) => list.push(s_idx),
                    None => wanted.push((e_idx, vec![s_idx])),
                }
            }
        }
        if !any {
            state.footprint.warnings.push(
                Warning::new(format!(
                    "{} matched no file in the archive (files = {:?})",
                    source.label, source.patterns
                ))
                .in_file(&mapping.origin),
            );
        }
    }
    wanted.sort_by_key(|(e, _)| entries[*e].path.clone());

    let total: u64 = wanted.iter().map(|(e, _)| entries[*e].size).sum();
    let mut done = 0u64;
    progress(done, total);
    let archive_name = archive.display_name();
    // The entries are read (and inflated) on a second thread while this one parses
    // the one before: a rendezvous channel hands each over, so at most two entries
    // are held at once.
    let digest = std::thread::scope(|scope| -> Result<_, Error> {
        let (send, received) = std::sync::mpsc::sync_channel(0);
        let (wanted, entries) = (&wanted, &entries);
        // The reading thread also takes the fingerprint, which covers the path and
        // bytes of every entry read, in order.
        let reader = scope.spawn(move || {
            let mut hasher = Sha256::new();
            for (e_idx, _) in wanted {
                let entry = &entries[*e_idx];
                let read = archive.read(entry, &mut budget);
                if let Ok(bytes) = &read {
                    hasher.update(entry.path.as_bytes());
                    hasher.update([0]);
                    hasher.update(bytes);
                    hasher.update([0]);
                }
                let stop = matches!(read, Err(archive::Error::Limit { .. }));
                if send.send(read).is_err() || stop {
                    break;
                }
            }
            hasher
        });
        for ((e_idx, sources), read) in wanted.iter().zip(received) {
            let entry = &entries[*e_idx];
            done += entry.size;
            let bytes = match read {
                Ok(b) => b,
                Err(e @ archive::Error::Limit { .. }) => return Err(e.into()),
                Err(e) => {
                    let text = e.to_string();
                    let prefix = format!("{}: ", entry.path);
                    let text = text.strip_prefix(&prefix).unwrap_or(&text);
                    state
                        .footprint
                        .warnings
                        .push(Warning::new(format!("{text}; file skipped")).in_file(&entry.path));
                    continue;
                }
            };
            state.footprint.stats.files_read += 1;
            state.footprint.stats.bytes_read += bytes.len() as u64;
            let (text, bad) = decode_text(&bytes);
            if bad > 0 {
                state.footprint.warnings.push(
                    Warning::new(format!(
                        "not valid UTF-8 text: {bad} invalid byte sequence(s) replaced with �"
                    ))
                    .in_file(&entry.path),
                );
            }
            let path: Arc<str> = entry.path.as_str().into();
            for s_idx in sources {
                let source = &mapping.sources[*s_idx];
                let mut sink = SourceSink {
                    state: &mut state,
                    source,
                    file: &path,
                };
                if let Err(w) = read_records(&text, &entry.path, source, limits, &mut sink) {
                    state.footprint.warnings.push(w);
                }
                if state.over_limit {
                    return Err(Error::TooManyRecords {
                        archive: archive_name,
                        limit: limits.get(LimitName::Records),
                    });
                }
            }
            progress(done, total);
        }
        let hasher = reader
            .join()
            .unwrap_or_else(|e| std::panic::resume_unwind(e));
        Ok(hasher.finalize())
    })?;
    state.footprint.fingerprint = digest[..16].iter().map(|b| format!("{b:02x}")).collect();
    Ok(state.finish())
}

struct State {
    footprint: Footprint,
    seen: HashMap<String, usize>,
    records: u64,
    record_limit: u64,
    over_limit: bool,
    /// (file, field, message) → how many times seen.
    repeats: BTreeMap<(String, String), usize>,
}

impl State {
    fn new(record_limit: u64) -> Self {
        State {
            footprint: Footprint::default(),
            seen: HashMap::new(),
            records: 0,
            record_limit,
            over_limit: false,
            repeats: BTreeMap::new(),
        }
    }

    fn warn_record(&mut self, w: Warning) {
        let key = (
            w.file.clone().unwrap_or_default(),
            w.field.clone().unwrap_or_default(),
        );
        let n = self.repeats.entry(key).or_insert(0);
        *n += 1;
        if *n <= DETAILED_WARNINGS {
            self.footprint.warnings.push(w);
        }
    }

    fn add_item(&mut self, item: Item) {
        let key = item.key();
        match self.seen.get(&key) {
            Some(&i) => {
                self.footprint.stats.duplicates_merged += 1;
                let kept = &mut self.footprint.items[i];
                if let (Some(new), Some(old)) = (item.date, kept.date) {
                    kept.date = Some(new.min(old));
                } else if kept.date.is_none() {
                    kept.date = item.date;
                }
                if kept.category.is_none() {
                    kept.category = item.category;
                }
            }
            None => {
                self.seen.insert(key, self.footprint.items.len());
                self.footprint.items.push(item);
            }
        }
    }

    fn finish(mut self) -> Footprint {
        for ((file, field), n) in &self.repeats {
            if *n > DETAILED_WARNINGS {
                let mut w = Warning::new(format!(
                    "{} more record(s) with the same problem",
                    n - DETAILED_WARNINGS
                ))
                .in_file(file.clone());
                if !field.is_empty() {
                    w = w.on_field(field.clone());
                }
                self.footprint.warnings.push(w);
            }
        }
        self.footprint
    }
}

struct SourceSink<'a> {
    state: &'a mut State,
    source: &'a Source,
    file: &'a Arc<str>,
}

impl SourceSink<'_> {
    fn problem(&mut self, record: &Record<'_>, field: &str, message: String) {
        let mut w = Warning::new(message)
            .in_file(&**self.file)
            .at_record(record.number())
            .on_field(field);
        if let Some(line) = record.line() {
            w = w.at_line(line);
        }
        self.state.warn_record(w);
    }

    fn text(&mut self, record: &Record<'_>, field: Option<&Field>, name: &str) -> Option<String> {
        let field = field?;
        match field_text(record, field) {
            Ok(Some(t)) => Some(match self.source.repair {
                Repair::None => t,
                Repair::Latin1Mojibake => repair_latin1_mojibake(&t),
            }),
            Ok(None) | Err(FieldError::Missing) => None,
            Err(FieldError::WrongType(m)) => {
                self.problem(record, name, m);
                None
            }
        }
    }

    fn date(&mut self, record: &Record<'_>) -> Option<i64> {
        let field = self.source.date.as_ref()?;
        match field_value(record, field) {
            Ok(Some(v)) => match parse_date(&v, self.source.date_format) {
                Ok(d) => Some(d),
                Err(m) => {
                    self.problem(record, "date", format!("{m}; date left out"));
                    None
                }
            },
            Ok(None) | Err(FieldError::Missing) => None,
            Err(FieldError::WrongType(m)) => {
                self.problem(record, "date", m);
                None
            }
        }
    }

    fn origin(&self, record: &Record<'_>) -> Origin {
        Origin {
            file: Arc::clone(self.file),
            record: record.number(),
        }
    }
}

impl RecordSink for SourceSink<'_> {
    fn record(&mut self, record: Record<'_>) -> bool {
        self.state.records += 1;
        self.state.footprint.stats.records_seen += 1;
        if self.state.records > self.state.record_limit {
            self.state.over_limit = true;
            return false;
        }
        match self.source.kind {
            SourceKind::SelfDeclared => {
                for (attr, field) in &self.source.attributes {
                    let name = format!("attributes.{attr}");
                    if let Some(v) = self.text(&record, Some(field), &name) {
                        self.state.footprint.declared.insert(attr.clone(), v);
                    }
                }
            }
            SourceKind::Friend => {
                let Some(name) = self.text(&record, self.source.name.as_ref(), "name") else {
                    self.problem(&record, "name", "no name; record skipped".into());
                    self.state.footprint.stats.records_skipped += 1;
                    return true;
                };
                let id = self.text(&record, self.source.id.as_ref(), "id");
                let date = self.date(&record);
                let mut attributes = BTreeMap::new();
                for (attr, field) in &self.source.attributes {
                    let fname = format!("attributes.{attr}");
                    if let Some(v) = self.text(&record, Some(field), &fname) {
                        attributes.insert(attr.clone(), v);
                    }
                }
                let origin = self.origin(&record);
                self.state.footprint.friends.push(Friend {
                    name,
                    id,
                    date,
                    attributes,
                    origin,
                });
            }
            SourceKind::Item(kind) => {
                let Some(name) = self.text(&record, self.source.name.as_ref(), "name") else {
                    self.problem(&record, "name", "no name; record skipped".into());
                    self.state.footprint.stats.records_skipped += 1;
                    return true;
                };
                let id = self.text(&record, self.source.id.as_ref(), "id");
                let category = self.text(&record, self.source.category.as_ref(), "category");
                let date = self.date(&record);
                let origin = self.origin(&record);
                self.state.add_item(Item {
                    kind,
                    name: name.into(),
                    id: id.map(Into::into),
                    category: category.map(Into::into),
                    date,
                    origin,
                });
            }
        }
        true
    }

    fn warn(&mut self, warning: Warning) {
        self.state.footprint.warnings.push(warning);
    }
}
