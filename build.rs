//! Prepares the bundled gazetteer at build time, with the same source files the
//! library uses (src/name_key.rs, src/lexicon/key_image.rs), so that a run neither
//! folds some 250,000 names in many scripts nor builds a hash table of them before it
//! can look for places. Three outputs in OUT_DIR:
//!
//! - `gazetteer-keys.txt`: one line per line of the gazetteer, the name keys of that
//!   line's names, in order, joined by `|` (a key never holds `|`, a tab or a line
//!   break); lines without names are empty. Used when the file is parsed as text.
//! - `gazetteer-names.bin`: the phrase-key table of every name (key_image.rs layout),
//!   each value a place: the kind in the top two bits (0 country, 1 region, 2 town)
//!   and its number below.
//! - `gazetteer-towns.bin`: the towns (little-endian u32s): town count, count of
//!   region codes that have no region line; each such code's byte offset and length in
//!   the gazetteer text; then per town its country number, region number (u32::MAX for
//!   none; numbered as the library numbers them: region lines first, then the other
//!   codes in order of first use), population, and its main name's byte offset and
//!   length in the gazetteer text.
//!
//! The library checks every table as it reads it and parses the text instead when one
//! does not fit; tests compare the two ways name by name.

#[path = "src/name_key.rs"]
#[allow(dead_code)]
mod name_key;

#[path = "src/lexicon/key_image.rs"]
#[allow(dead_code)]
mod key_image;

use std::collections::HashMap;
use std::path::PathBuf;

const GAZETTEER: &str = "reference-priors/lexicons/gazetteer.tsv";

/// Same rule as the library's `Gazetteer::add_key`: Latin-script (ASCII) keys need
/// three characters, others two.
fn indexed(key: &str) -> bool {
    let min = if key.is_ascii() { 3 } else { 2 };
    key.chars().count() >= min
}

/// Same ranges as the library's `phrase::is_unspaced`.
fn is_unspaced(c: char) -> bool {
    matches!(c as u32,
        0x0E00..=0x0EFF | 0x1000..=0x109F | 0x1780..=0x17FF | 0x3040..=0x30FF
        | 0x3400..=0x4DBF | 0x4E00..=0x9FFF | 0xF900..=0xFAFF | 0x20000..=0x2FFFF)
}

fn main() {
    println!("cargo::rerun-if-changed=build.rs");
    println!("cargo::rerun-if-changed=src/name_key.rs");
    println!("cargo::rerun-if-changed=src/lexicon/key_image.rs");
    println!("cargo::rerun-if-changed={GAZETTEER}");
    let text = std::fs::read_to_string(GAZETTEER).unwrap_or_default();
    let mut keys_out = String::with_capacity(text.len());
    let mut entries: Vec<(String, u32)> = Vec::new();
    let mut towns: Vec<u32> = Vec::new();
    let mut extra_codes: Vec<u32> = Vec::new();
    let (mut n_countries, mut n_regions, mut n_towns) = (0u32, 0u32, 0u32);
    let mut country_index: HashMap<&str, u32> = HashMap::new();
    let mut region_index: HashMap<&str, u32> = HashMap::new();
    let mut offset = 0usize;
    for raw in text.split_inclusive('\n') {
        let line_start = offset;
        offset += raw.len();
        let line = raw.trim_end_matches('\n');
        let fields: Vec<&str> = line.split('\t').collect();
        let (names, place) = match fields.as_slice() {
            ["C", code, _, names] => {
                country_index.insert(code, n_countries);
                n_countries += 1;
                (*names, n_countries - 1)
            }
            ["R", code, _, names] => {
                region_index.insert(code, n_regions);
                n_regions += 1;
                (*names, (1 << 30) | (n_regions - 1))
            }
            ["P", country, region, pop, names] => {
                let c = country_index.get(country).copied().unwrap_or(u32::MAX);
                let r = if region.is_empty() {
                    u32::MAX
                } else if let Some(&r) = region_index.get(region) {
                    r
                } else {
                    let r = n_regions + (extra_codes.len() / 2) as u32;
                    region_index.insert(region, r);
                    let at = line_start + fields[..2].iter().map(|f| f.len() + 1).sum::<usize>();
                    extra_codes.extend([at as u32, region.len() as u32]);
                    r
                };
                let main = names.split('|').next().unwrap_or("");
                let at = line_start + line.len() - names.len();
                towns.extend([
                    c,
                    r,
                    pop.parse().unwrap_or(u32::MAX),
                    at as u32,
                    main.len() as u32,
                ]);
                n_towns += 1;
                (*names, (2 << 30) | (n_towns - 1))
            }
            _ => ("", 0),
        };
        let keys: Vec<String> = if names.is_empty() {
            Vec::new()
        } else {
            names.split('|').map(name_key::name_key).collect()
        };
        for key in &keys {
            if indexed(key) {
                entries.push((key.clone(), place));
            }
        }
        keys_out.push_str(&keys.join("|"));
        keys_out.push('\n');
    }
    let image = key_image::build(&entries, |k| k.chars().any(is_unspaced));
    let mut town_bytes: Vec<u8> = Vec::with_capacity(4 * (2 + extra_codes.len() + towns.len()));
    for w in [n_towns, (extra_codes.len() / 2) as u32]
        .iter()
        .chain(&extra_codes)
        .chain(&towns)
    {
        town_bytes.extend_from_slice(&w.to_le_bytes());
    }
    let dir = PathBuf::from(std::env::var_os("OUT_DIR").unwrap_or_default());
    for (name, bytes) in [
        ("gazetteer-keys.txt", keys_out.into_bytes()),
        ("gazetteer-names.bin", image),
        ("gazetteer-towns.bin", town_bytes),
    ] {
        if let Err(e) = std::fs::write(dir.join(name), bytes) {
            panic!("cannot write {name}: {e}");
        }
    }
}
