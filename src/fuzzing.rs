//! Entry points for the fuzzers (fuzz/) and for the regression tests that replay what
//! they found (tests/fuzz_regressions.rs). Each takes arbitrary bytes and must return
//! without panicking, whatever the bytes are.

use std::path::Path;

use crate::archive::{Archive, ReadBudget};
use crate::footprint::Warning;
use crate::import::import;
use crate::limits::Limits;
use crate::mapping::Mapping;
use crate::records::{Record, RecordSink, decode_text, field_text, read_records};

/// Small limits so a fuzz run never spends its time inflating big inputs.
fn fuzz_limits() -> Limits {
    Limits {
        entry_bytes: 1 << 20,
        total_bytes: 4 << 20,
        entries: 10_000,
        records: 100_000,
        line_bytes: 64 << 10,
        ..Limits::default()
    }
}

struct Counting<'a> {
    fields: &'a [crate::mapping::Field],
    seen: usize,
}

impl RecordSink for Counting<'_> {
    fn record(&mut self, record: Record<'_>) -> bool {
        for f in self.fields {
            let _ = field_text(&record, f);
        }
        self.seen += 1;
        self.seen < 100_000
    }
    fn warn(&mut self, _warning: Warning) {}
}

/// The mapping-file parser on arbitrary text.
pub fn mapping(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    let _ = Mapping::parse(&text, "fuzz.toml");
}

/// The record selector and field extraction: the first line is a JSONPath query used
/// as the records selector, the rest is the file (JSON, NDJSON and CSV readers all run).
pub fn records(data: &[u8]) {
    let (head, body) = match data.iter().position(|&b| b == b'\n') {
        Some(i) => (&data[..i], &data[i + 1..]),
        None => (data, &[][..]),
    };
    let selector = String::from_utf8_lossy(head).replace(['\\', '"'], "");
    let limits = fuzz_limits();
    let (text, _) = decode_text(body);
    for (format, records) in [
        ("json", true),
        ("ndjson", true),
        ("json", false),
        ("csv", false),
    ] {
        let records_line = if records {
            format!("records = \"{selector}\"\n")
        } else {
            String::new()
        };
        let name = if format == "csv" { "name" } else { "$.name" };
        let date = if format == "csv" { "date" } else { "$.date" };
        let text_mapping = format!(
            "format = 1\n[[source]]\nkind = \"like\"\nfiles = [\"f\"]\nformat = \"{format}\"\n{records_line}name = \"{name}\"\ndate = \"{date}\"\n"
        );
        let Ok(mapping) = Mapping::parse(&text_mapping, "fuzz.toml") else {
            continue;
        };
        let source = &mapping.sources[0];
        let fields: Vec<_> = [&source.name, &source.date]
            .into_iter()
            .flatten()
            .cloned()
            .collect();
        let mut sink = Counting {
            fields: &fields,
            seen: 0,
        };
        let _ = read_records(&text, "f", source, &limits, &mut sink);
    }
}

/// Zip reading and a full import of whatever the zip holds.
pub fn zip(data: &[u8]) {
    const MAPPING: &str = "format = 1\n[[source]]\nkind = \"like\"\nfiles = [\"**/*.json\"]\nname = \"$.name\"\n[[source]]\nkind = \"group\"\nfiles = [\"**/*.csv\"]\nname = \"name\"\n";
    let limits = fuzz_limits();
    let Ok(mut archive) = Archive::zip_from_bytes(data.to_vec(), Path::new("fuzz.zip"), &limits)
    else {
        return;
    };
    let entries = archive.entries().to_vec();
    let mut budget = ReadBudget::new(&limits);
    for e in entries.iter().take(20) {
        let _ = archive.read(e, &mut budget);
    }
    if let Ok(mapping) = Mapping::parse(MAPPING, "fuzz.toml") {
        let _ = import(&mut archive, &mapping, &limits);
    }
}
