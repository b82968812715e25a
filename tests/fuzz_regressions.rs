//! Replays every input the fuzzers found to crash (tests/fuzz-regressions/TARGET/, kept
//! after fixing) and every seed (fuzz/seeds/TARGET/) through the same entry points the
//! fuzz targets use; none may panic. scripts/fuzz runs the fuzzers themselves.

use std::path::Path;

fn inputs(dirs: &[&str]) -> Vec<(String, Vec<u8>)> {
    let mut out = Vec::new();
    for dir in dirs {
        let Ok(rd) = std::fs::read_dir(dir) else {
            continue;
        };
        for e in rd.filter_map(Result::ok) {
            if e.path().is_file() && e.file_name() != ".gitkeep" {
                out.push((
                    e.path().display().to_string(),
                    std::fs::read(e.path()).expect("read"),
                ));
            }
        }
    }
    out.sort();
    out
}

fn replay(target: &str, run: fn(&[u8])) {
    let found = inputs(&[
        &format!("tests/fuzz-regressions/{target}"),
        &format!("fuzz/seeds/{target}"),
    ]);
    assert!(
        Path::new(&format!("fuzz/seeds/{target}")).exists() && !found.is_empty(),
        "no inputs for {target}"
    );
    for (name, data) in &found {
        let result = std::panic::catch_unwind(|| run(data));
        assert!(result.is_ok(), "{target}: {name} panicked");
    }
}

#[test]
fn mapping_inputs_never_panic() {
    replay("mapping", telltale::fuzzing::mapping);
}

#[test]
fn record_inputs_never_panic() {
    replay("records", telltale::fuzzing::records);
    // Hand-made edge cases (common practice, no source): empty, lone selector, NUL bytes,
    // deep nesting, a huge number, invalid UTF-8.
    for data in [
        &b""[..],
        b"$",
        b"$..*\n{\"a\":[[[[[[]]]]]]}",
        b"$[*]\n\0\0\0",
        b"$\n[1e999999, -0, 12345678901234567890123]",
        b"$[?@.x > 1]\n\xff\xfe\xfd",
    ] {
        telltale::fuzzing::records(data);
    }
}

#[test]
fn zip_inputs_never_panic() {
    replay("zip", telltale::fuzzing::zip);
    // A truncated copy of every seed, cut at several points.
    for (_, data) in inputs(&["fuzz/seeds/zip"]) {
        for cut in [
            1,
            data.len() / 3,
            data.len() / 2,
            data.len().saturating_sub(1),
        ] {
            telltale::fuzzing::zip(&data[..cut.min(data.len())]);
        }
    }
}

#[test]
fn priors_json_inputs_never_panic() {
    replay("priors_json", telltale::fuzzing::priors_json);
}

#[test]
fn priors_cache_inputs_never_panic() {
    replay("priors_cache", telltale::fuzzing::priors_cache);
    // Every single-byte flip of the first 600 payload bytes, and every cut of a short
    // prefix, with the checksum made to match (so the reader's own checks are tested).
    for at in 0..600u16 {
        let [lo, hi] = at.to_le_bytes();
        telltale::fuzzing::priors_cache(&[0, lo, hi, 0xff]);
        telltale::fuzzing::priors_cache(&[0, lo, hi, 0x01]);
    }
    for cut in 0..=255u8 {
        telltale::fuzzing::priors_cache(&[0, cut]);
    }
}

#[test]
fn friends_csv_inputs_never_panic() {
    replay("friends_csv", telltale::fuzzing::friends_csv);
}
