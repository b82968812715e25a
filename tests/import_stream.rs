//! The import reads mapped entries in pieces on a second thread and parses JSON as it
//! comes. What it produces must not depend on that: the fingerprint is SHA-256 over
//! path, 0, bytes, 0 of each entry read, in path order (recomputed here with the sha2
//! crate, FIPS 180-4), an entry that fails part-way through gives a warning naming it
//! and nothing else, and the rest of the import goes on.

use std::io::Write;
use std::path::Path;

use sha2::{Digest, Sha256};
use telltale::archive::Archive;
use telltale::import::import;
use telltale::limits::Limits;
use telltale::mapping::Mapping;
use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, ZipWriter};

const MAPPING: &str = r#"
format = 1
[[source]]
kind = "like"
files = ["likes/*.json"]
records = "$.likes[*]"
name = "$.title"

[[source]]
kind = "group"
files = ["groups.csv"]
name = "Group"
"#;

/// A likes file of `n` records, each with a long member no query reads, so that the
/// file spans many of the reading thread's 64 KiB pieces.
fn likes(prefix: &str, n: usize) -> Vec<u8> {
    let rows: Vec<String> = (0..n)
        .map(|i| {
            format!(
                r#"{{"title": "{prefix} page {i}", "about": "{}"}}"#,
                "z".repeat(300)
            )
        })
        .collect();
    format!("{{\"likes\": [\n{}\n]}}", rows.join(",\n")).into_bytes()
}

fn zip_of(files: &[(&str, &[u8])]) -> Vec<u8> {
    let mut zip = ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let stored = SimpleFileOptions::default().compression_method(CompressionMethod::Stored);
    for (name, data) in files {
        zip.start_file(*name, stored).expect("start");
        zip.write_all(data).expect("write");
    }
    zip.finish().expect("finish").into_inner()
}

/// The fingerprint as documented: the first 16 bytes of SHA-256 over each entry read.
fn fingerprint(entries: &[(&str, &[u8])]) -> String {
    let mut h = Sha256::new();
    for (path, bytes) in entries {
        h.update(path.as_bytes());
        h.update([0]);
        h.update(bytes);
        h.update([0]);
    }
    h.finalize()[..16]
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

#[test]
fn streamed_import_reads_every_record_and_fingerprints_every_byte() {
    let a = likes("alpha", 1000); // about 330 KB: six pieces
    let b = likes("beta", 3);
    let csv = b"Group\nChess club\nChoir\n".as_slice();
    let bytes = zip_of(&[
        ("likes/b.json", &b),
        ("groups.csv", csv),
        ("likes/a.json", &a),
    ]);
    let limits = Limits::default();
    let mut archive =
        Archive::zip_from_bytes(bytes, Path::new("t.zip"), &limits).expect("open zip");
    let mapping = Mapping::parse(MAPPING, "m.toml").expect("mapping");
    let fp = import(&mut archive, &mapping, &limits).expect("import");
    assert!(fp.warnings.is_empty(), "{:?}", fp.warnings);
    assert_eq!(fp.items.len(), 1000 + 3 + 2);
    // Entries are read in path order: groups.csv, likes/a.json, likes/b.json.
    assert_eq!(&*fp.items[0].name, "Chess club");
    assert_eq!(&*fp.items[2].name, "alpha page 0");
    assert_eq!(&*fp.items[1001].name, "alpha page 999");
    assert_eq!(&*fp.items[1002].name, "beta page 0");
    assert_eq!(fp.stats.files_read, 3);
    assert_eq!(fp.stats.bytes_read, (a.len() + b.len() + csv.len()) as u64);
    assert_eq!(
        fp.fingerprint,
        fingerprint(&[
            ("groups.csv", csv),
            ("likes/a.json", &a),
            ("likes/b.json", &b)
        ])
    );
}

#[test]
fn an_entry_failing_part_way_is_a_warning_and_left_out() {
    let a = likes("alpha", 1000);
    let b = likes("beta", 3);
    let mut bytes = zip_of(&[("likes/a.json", &a), ("likes/b.json", &b)]);
    // Change one byte near the end of a.json's stored data: its CRC-32 no longer
    // matches, which the zip reader finds only after handing over every piece.
    let at = bytes
        .windows(15)
        .position(|w| w == b"alpha page 999\"")
        .expect("found");
    bytes[at] = b'A';
    let limits = Limits::default();
    let mut archive =
        Archive::zip_from_bytes(bytes, Path::new("t.zip"), &limits).expect("open zip");
    let mapping = Mapping::parse(MAPPING, "m.toml").expect("mapping");
    let fp = import(&mut archive, &mapping, &limits).expect("import");
    let names: Vec<&str> = fp.items.iter().map(|i| &*i.name).collect();
    assert_eq!(names, ["beta page 0", "beta page 1", "beta page 2"]);
    let skipped: Vec<_> = fp
        .warnings
        .iter()
        .filter(|w| w.message.ends_with("file skipped"))
        .collect();
    assert_eq!(skipped.len(), 1, "{:?}", fp.warnings);
    assert_eq!(skipped[0].file.as_deref(), Some("likes/a.json"));
    assert_eq!(fp.stats.files_read, 1);
    assert_eq!(fp.fingerprint, fingerprint(&[("likes/b.json", &b)]));
}

#[test]
fn a_read_limit_met_part_way_still_stops_the_import() {
    // Compression ratio: a file of one repeated byte deflates about 1000:1; past
    // 1 MiB it is refused as a bomb whatever its header says.
    let mut zip = ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let deflated = SimpleFileOptions::default().compression_method(CompressionMethod::Deflated);
    zip.start_file("likes/bomb.json", deflated).expect("start");
    zip.write_all(b"{\"likes\": [\"").expect("write");
    zip.write_all(&vec![b'z'; 4 << 20]).expect("write");
    zip.write_all(b"\"]}").expect("write");
    let bytes = zip.finish().expect("finish").into_inner();
    let limits = Limits {
        compression_ratio: 20,
        ..Limits::default()
    };
    let mut archive =
        Archive::zip_from_bytes(bytes, Path::new("t.zip"), &limits).expect("open zip");
    let mapping = Mapping::parse(MAPPING, "m.toml").expect("mapping");
    let err = import(&mut archive, &mapping, &limits)
        .expect_err("refused")
        .to_string();
    assert!(
        err.starts_with("likes/bomb.json: over the limit on"),
        "{err}"
    );
    assert!(err.contains("--limit compression-ratio="), "{err}");
}
