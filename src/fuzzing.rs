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

/// Look a few names up in `priors`, as matching an archive's items would.
fn match_some(priors: &crate::priors::Priors) {
    use crate::footprint::{Item, ItemKind, Origin};
    for (kind, name, id) in [
        (ItemKind::Group, "Quiet Chess Circle", Some("p1")),
        (ItemKind::Group, "chess circle", None),
        (ItemKind::Like, "Weekend Pottery Fans", None),
        (ItemKind::Follow, "", Some("")),
    ] {
        let item = Item {
            kind,
            name: name.into(),
            id: id.map(Into::into),
            category: None,
            date: None,
            origin: Origin {
                file: "fuzz".into(),
                record: 1,
            },
        };
        let _ = priors.find(&item);
    }
    for item in priors.items() {
        for (_, counts) in item.members() {
            let _ = counts.iter().sum::<f64>();
        }
    }
}

/// A small priors file the priors, cache and friends targets build on: two attributes,
/// two items (one with an alias), counts and shares.
const SMALL_PRIORS: &str = r#"{"format": 1,
 "provenance": {"source": "fuzz", "licence": "none", "created": "2026-12-04", "method": "invented", "synthetic": true},
 "attributes": [
  {"id": "politics", "label": "Political leaning", "threshold": 0.5,
   "values": [{"id": "left", "label": "Left", "base_rate": 0.5}, {"id": "right", "label": "Right", "base_rate": 0.5}]},
  {"id": "religion", "label": "Religion", "threshold": 0.5,
   "values": [{"id": "none", "label": "None", "base_rate": 0.6}, {"id": "christian", "label": "Christian", "base_rate": 0.3}, {"id": "jewish", "label": "Jewish", "base_rate": 0.1}]}
 ],
 "items": [
  {"id": "p1", "name": "Quiet Chess Circle", "kind": "group", "aliases": ["Chess Circle"],
   "members": {"politics": [10, 30], "religion": {"shares": [0.5, 0.3, 0.2], "n": 40}}},
  {"name": "Weekend Pottery Fans", "kind": "like", "members": {"politics": [5, 1]}}
 ]}"#;

/// The priors parser and its checks on arbitrary text; a file that passes is matched
/// against a few names, as a scan would.
pub fn priors_json(data: &[u8]) {
    let text = String::from_utf8_lossy(data);
    if let Ok(priors) = crate::priors::Priors::parse(&text, "fuzz.json") {
        match_some(&priors);
    }
    // Small limits, so the paths that stop at one (items, attributes, values,
    // aliases, name length, member lists) are reached by short inputs.
    let small = Limits {
        priors_items: 2,
        attributes: 2,
        values: 3,
        aliases: 1,
        name_bytes: 12,
        ..Limits::default()
    };
    if let Ok(priors) = crate::priors::Priors::parse_within(&text, "fuzz.json", &small) {
        match_some(&priors);
    }
}

/// The priors cache reader. The first byte picks how the rest is used: odd, as a whole
/// cache file (header and all: the checksum turns almost everything away); even, as
/// edits to the cache of [`SMALL_PRIORS`] — pairs of (offset, byte) XORed into its
/// payload, and a last byte that may cut it short — with the header's length and
/// checksum made to match, so the reader's own checks (lengths, offsets, UTF-8,
/// counts, index) are what stand between the bytes and a panic.
pub fn priors_cache(data: &[u8]) {
    use crate::priors::{CACHE_HEADER_LEN as HEADER_LEN, decode_cache, encode_cache};
    let Some((&mode, rest)) = data.split_first() else {
        return;
    };
    let json_hash = blake3::hash(SMALL_PRIORS.as_bytes());
    let bytes = if mode % 2 == 1 {
        rest.to_vec()
    } else {
        let Ok(priors) = crate::priors::Priors::parse(SMALL_PRIORS, "fuzz.json") else {
            return;
        };
        let mut cache = encode_cache(&priors, &json_hash);
        let mut payload = cache.split_off(HEADER_LEN);
        let pairs = rest.chunks_exact(3);
        let cut = pairs.remainder().first().copied();
        for p in pairs {
            let at = u16::from_le_bytes([p[0], p[1]]) as usize;
            let n = payload.len().max(1);
            if let Some(b) = payload.get_mut(at % n) {
                *b ^= p[2];
            }
        }
        if let Some(c) = cut {
            payload.truncate(payload.len() * c as usize / 255);
        }
        cache[44..52].copy_from_slice(&(payload.len() as u64).to_le_bytes());
        cache[52..84].copy_from_slice(blake3::hash(&payload).as_bytes());
        cache.extend_from_slice(&payload);
        cache
    };
    if let Ok(priors) = decode_cache(&bytes[..], bytes.len() as u64, &json_hash, "fuzz.json") {
        match_some(&priors);
    }
}

/// The friends CSV (`--friends FILE`) merged into a small footprint, against
/// [`SMALL_PRIORS`].
pub fn friends_csv(data: &[u8]) {
    let Ok(priors) = crate::priors::Priors::parse(SMALL_PRIORS, "fuzz.json") else {
        return;
    };
    let (text, _) = decode_text(data);
    // Default limits, then small ones, so the limit paths are reached too.
    let small = Limits {
        name_bytes: 8,
        friends_rows: 3,
        ..Limits::default()
    };
    for limits in [Limits::default(), small] {
        let mut footprint = crate::footprint::Footprint::default();
        let _ = crate::friends_file::merge_friends_csv(
            &mut footprint,
            &text,
            "fuzz.csv",
            &priors,
            &limits,
        );
    }
}
