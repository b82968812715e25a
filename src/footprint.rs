//! What an import yields: the person's visible items (likes, groups, follows, events),
//! their friends, any attributes they declared about themselves (kept local), where
//! each record came from, and the warnings met on the way.

use std::collections::BTreeMap;
use std::fmt;
use std::sync::Arc;

use serde::{Deserialize, Serialize};

/// The kinds of affiliation an archive lists.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ItemKind {
    Like,
    Group,
    Follow,
    Event,
}

impl ItemKind {
    pub const ALL: [ItemKind; 4] = [
        ItemKind::Like,
        ItemKind::Group,
        ItemKind::Follow,
        ItemKind::Event,
    ];

    pub fn as_str(self) -> &'static str {
        match self {
            ItemKind::Like => "like",
            ItemKind::Group => "group",
            ItemKind::Follow => "follow",
            ItemKind::Event => "event",
        }
    }

    /// Plural noun for summaries ("12 groups").
    pub fn plural(self) -> &'static str {
        match self {
            ItemKind::Like => "likes",
            ItemKind::Group => "groups",
            ItemKind::Follow => "follows",
            ItemKind::Event => "events",
        }
    }

    pub fn parse(s: &str) -> Option<ItemKind> {
        ItemKind::ALL.into_iter().find(|k| k.as_str() == s)
    }
}

impl fmt::Display for ItemKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Where a record came from inside the archive.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Origin {
    /// Entry path inside the archive: one string shared by every record of the entry
    /// (a large archive lists tens of thousands of items per entry).
    pub file: Arc<str>,
    /// 1-based record number within that file.
    pub record: usize,
}

impl fmt::Display for Origin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}, record {}", self.file, self.record)
    }
}

/// One visible affiliation: a liked page, a group, a followed account, an event.
/// Its strings are boxed (no spare capacity): a large archive holds over 100,000 items
/// for the whole session. Categories repeat (a few topics over thousands of items), so
/// an import shares one string per distinct category.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Item {
    pub kind: ItemKind,
    pub name: Box<str>,
    /// The archive's own identifier for the item, when it has one.
    pub id: Option<Box<str>>,
    /// The archive's category or topic label, when it has one.
    pub category: Option<Arc<str>>,
    /// When the person liked, joined, followed or attended, in Unix seconds.
    pub date: Option<i64>,
    pub origin: Origin,
}

impl Item {
    /// A key that stays the same for the same item across imports of the same archive
    /// (used for saved decisions): kind plus id, or kind plus normalised name.
    pub fn key(&self) -> String {
        match &self.id {
            Some(id) => format!("{}:id:{}", self.kind, id),
            None => format!("{}:name:{}", self.kind, crate::text::name_key(&self.name)),
        }
    }
}

/// A friend as the archive lists them. Their names are third parties' personal data:
/// reports leave them out unless asked.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Friend {
    pub name: String,
    pub id: Option<String>,
    pub date: Option<i64>,
    /// Attributes of this friend that are known (public on their profile, or supplied
    /// by the user), by attribute id.
    pub attributes: BTreeMap<String, String>,
    pub origin: Origin,
}

/// A problem met during import that did not stop it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Warning {
    /// The archive entry (or mapping file) concerned.
    pub file: Option<String>,
    /// 1-based record number.
    pub record: Option<usize>,
    /// 1-based line number, where the format has lines.
    pub line: Option<usize>,
    /// The mapping field concerned (name, id, category, date, …).
    pub field: Option<String>,
    pub message: String,
}

impl Warning {
    pub fn new(message: impl Into<String>) -> Self {
        Warning {
            file: None,
            record: None,
            line: None,
            field: None,
            message: message.into(),
        }
    }

    pub fn in_file(mut self, file: impl Into<String>) -> Self {
        self.file = Some(file.into());
        self
    }

    pub fn at_record(mut self, record: usize) -> Self {
        self.record = Some(record);
        self
    }

    pub fn at_line(mut self, line: usize) -> Self {
        self.line = Some(line);
        self
    }

    pub fn on_field(mut self, field: impl Into<String>) -> Self {
        self.field = Some(field.into());
        self
    }
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut place = Vec::new();
        if let Some(file) = &self.file {
            place.push(file.clone());
        }
        if let Some(line) = self.line {
            place.push(format!("line {line}"));
        }
        if let Some(record) = self.record {
            place.push(format!("record {record}"));
        }
        if let Some(field) = &self.field {
            place.push(format!("field '{field}'"));
        }
        if place.is_empty() {
            f.write_str(&self.message)
        } else {
            write!(f, "{}: {}", place.join(", "), self.message)
        }
    }
}

/// Counts for the import summary.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct ImportStats {
    /// Archive entries read (mapped files).
    pub files_read: usize,
    /// Decompressed bytes read.
    pub bytes_read: u64,
    /// Records seen, kept or not.
    pub records_seen: usize,
    /// Records skipped because of an error.
    pub records_skipped: usize,
    /// Items seen more than once (same kind and key) and merged.
    pub duplicates_merged: usize,
}

/// Everything an import found.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct Footprint {
    pub items: Vec<Item>,
    pub friends: Vec<Friend>,
    /// What the person declared about themselves (attribute id → value id). Stays on
    /// this machine: never written to a shareable report.
    pub declared: BTreeMap<String, String>,
    pub warnings: Vec<Warning>,
    /// Stable identity of the archive's mapped content (hex), for saved decisions.
    pub fingerprint: String,
    pub stats: ImportStats,
}

impl Footprint {
    /// Number of items of one kind.
    pub fn count(&self, kind: ItemKind) -> usize {
        self.items.iter().filter(|i| i.kind == kind).count()
    }
}
