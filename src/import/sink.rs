//! Where an import's records go: [`State`] collects the footprint (items merged by
//! key, friends, declared values, warnings with repeats summarised, the record count
//! against its limit), and [`SourceSink`] turns one source's records into it. A
//! [`Staged`] list holds what one file's records would do, in order, so that a file
//! read a piece at a time changes the footprint only once all of it has been read
//! and checked; replayed into the state it does exactly what the records would have
//! done directly.

use std::collections::BTreeMap;
use std::sync::Arc;

use foldhash::{HashMap, HashMapExt, HashSet, HashSetExt};

use crate::footprint::{Footprint, Friend, Item, Origin, Warning};
use crate::mapping::{Field, Repair, Source, SourceKind};
use crate::records::{FieldError, Record, RecordSink, field_text, field_value, parse_date};
use crate::text::repair_latin1_mojibake;

/// Detailed warnings kept per file and field before they are summarised.
const DETAILED_WARNINGS: usize = 5;

/// What records do to the footprint, one change at a time.
pub(super) trait Effects {
    /// Count one record; false once over the record limit (the reading stops).
    fn count_record(&mut self) -> bool;
    /// A problem with one record's field (summarised past a few per file and field).
    fn warn_record(&mut self, w: Warning);
    /// A warning about the file.
    fn warn(&mut self, w: Warning);
    fn skipped(&mut self);
    fn friend(&mut self, f: Friend);
    fn item(&mut self, i: Item);
    fn declared(&mut self, attribute: String, value: String);
}

pub(super) struct State {
    pub(super) footprint: Footprint,
    seen: HashMap<String, usize>,
    /// One shared string per distinct category.
    categories: HashSet<Arc<str>>,
    records: u64,
    record_limit: u64,
    pub(super) over_limit: bool,
    /// (file, field, message) → how many times seen.
    repeats: BTreeMap<(String, String), usize>,
}

impl State {
    pub(super) fn new(record_limit: u64) -> Self {
        State {
            footprint: Footprint::default(),
            seen: HashMap::new(),
            categories: HashSet::new(),
            records: 0,
            record_limit,
            over_limit: false,
            repeats: BTreeMap::new(),
        }
    }

    pub(super) fn finish(mut self) -> Footprint {
        for ((file, field), n) in &self.repeats {
            if *n > DETAILED_WARNINGS {
                let mut w = Warning::new(format!(
                    "{} with the same problem",
                    crate::reading::count(n - DETAILED_WARNINGS, "more record", "more records")
                ))
                .in_file(file.clone());
                if !field.is_empty() {
                    w = w.on_field(field.clone());
                }
                self.footprint.warnings.push(w);
            }
        }
        // The item list grew by doubling; it is kept for the whole session.
        self.footprint.items.shrink_to_fit();
        self.footprint
    }

    /// The shared copy of a category string.
    fn share(&mut self, category: Arc<str>) -> Arc<str> {
        if let Some(c) = self.categories.get(&*category) {
            return c.clone();
        }
        self.categories.insert(category.clone());
        category
    }
}

impl Effects for State {
    fn count_record(&mut self) -> bool {
        self.records += 1;
        self.footprint.stats.records_seen += 1;
        if self.records > self.record_limit {
            self.over_limit = true;
            return false;
        }
        true
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

    fn item(&mut self, mut item: Item) {
        item.category = item.category.take().map(|c| self.share(c));
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

    fn warn(&mut self, w: Warning) {
        self.footprint.warnings.push(w);
    }

    fn skipped(&mut self) {
        self.footprint.stats.records_skipped += 1;
    }

    fn friend(&mut self, f: Friend) {
        self.footprint.friends.push(f);
    }

    fn declared(&mut self, attribute: String, value: String) {
        self.footprint.declared.insert(attribute, value);
    }
}

/// One source's records, into a state or a staged list.
pub(super) struct SourceSink<'a, E: Effects> {
    pub(super) state: &'a mut E,
    pub(super) source: &'a Source,
    pub(super) file: &'a Arc<str>,
}

impl<E: Effects> SourceSink<'_, E> {
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

impl<E: Effects> RecordSink for SourceSink<'_, E> {
    fn record(&mut self, record: Record<'_>) -> bool {
        if !self.state.count_record() {
            return false;
        }
        match self.source.kind {
            SourceKind::SelfDeclared => {
                for (attr, field) in &self.source.attributes {
                    let name = format!("attributes.{attr}");
                    if let Some(v) = self.text(&record, Some(field), &name) {
                        self.state.declared(attr.clone(), v);
                    }
                }
            }
            SourceKind::Friend => {
                let Some(name) = self.text(&record, self.source.name.as_ref(), "name") else {
                    self.problem(&record, "name", "no name; record skipped".into());
                    self.state.skipped();
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
                self.state.friend(Friend {
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
                    self.state.skipped();
                    return true;
                };
                let id = self.text(&record, self.source.id.as_ref(), "id");
                let category = self.text(&record, self.source.category.as_ref(), "category");
                let date = self.date(&record);
                let origin = self.origin(&record);
                self.state.item(Item {
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
        self.state.warn(warning);
    }
}

/// One change a record makes, kept to be replayed.
enum Op {
    Record,
    WarnRecord(Warning),
    Warn(Warning),
    Skipped,
    Friend(Friend),
    Item(Item),
    Declared(String, String),
}

/// What one file's records would do to a state, in order, not yet done.
pub(super) struct Staged {
    ops: Vec<Op>,
    /// Records counted so far, by the state and then here.
    records: u64,
    record_limit: u64,
}

impl Staged {
    /// Staging on top of `state` (for its record count).
    pub(super) fn on(state: &State) -> Self {
        Staged {
            ops: Vec::new(),
            records: state.records,
            record_limit: state.record_limit,
        }
    }

    /// Do it all to `state`, in order, stopping where the record limit stops reading.
    pub(super) fn replay(self, state: &mut State) {
        for op in self.ops {
            match op {
                Op::Record => {
                    if !state.count_record() {
                        return;
                    }
                }
                Op::WarnRecord(w) => state.warn_record(w),
                Op::Warn(w) => state.warn(w),
                Op::Skipped => state.skipped(),
                Op::Friend(f) => state.friend(f),
                Op::Item(i) => state.item(i),
                Op::Declared(a, v) => state.declared(a, v),
            }
        }
    }
}

impl Effects for Staged {
    fn count_record(&mut self) -> bool {
        self.ops.push(Op::Record);
        self.records += 1;
        self.records <= self.record_limit
    }
    fn warn_record(&mut self, w: Warning) {
        self.ops.push(Op::WarnRecord(w));
    }
    fn warn(&mut self, w: Warning) {
        self.ops.push(Op::Warn(w));
    }
    fn skipped(&mut self) {
        self.ops.push(Op::Skipped);
    }
    fn friend(&mut self, f: Friend) {
        self.ops.push(Op::Friend(f));
    }
    fn item(&mut self, i: Item) {
        self.ops.push(Op::Item(i));
    }
    fn declared(&mut self, attribute: String, value: String) {
        self.ops.push(Op::Declared(attribute, value));
    }
}
