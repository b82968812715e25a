//! Works out the name keys of the bundled gazetteer's names at build time, with the
//! same source file the library uses (src/name_key.rs), so that a run does not fold
//! some 90,000 names in many scripts before it can look for places. The output has
//! one line per line of the gazetteer: the keys of that line's names, in order,
//! joined by `|` (a key never holds `|`, a tab or a line break); lines without names
//! are empty. The library checks the counts as it reads them and folds a line itself
//! if they disagree.

#[path = "src/name_key.rs"]
#[allow(dead_code)]
mod name_key;

use std::path::PathBuf;

const GAZETTEER: &str = "reference-priors/lexicons/gazetteer.tsv";

fn main() {
    println!("cargo::rerun-if-changed=build.rs");
    println!("cargo::rerun-if-changed=src/name_key.rs");
    println!("cargo::rerun-if-changed={GAZETTEER}");
    let text = std::fs::read_to_string(GAZETTEER).unwrap_or_default();
    let mut out = String::with_capacity(text.len());
    for line in text.lines() {
        let fields: Vec<&str> = line.split('\t').collect();
        let names: Vec<&str> = match fields.as_slice() {
            ["C" | "R", _, _, name] => vec![name],
            ["P", _, _, _, names] => names.split('|').collect(),
            _ => Vec::new(),
        };
        let keys: Vec<String> = names.iter().map(|n| name_key::name_key(n)).collect();
        out.push_str(&keys.join("|"));
        out.push('\n');
    }
    let dir = PathBuf::from(std::env::var_os("OUT_DIR").unwrap_or_default());
    if let Err(e) = std::fs::write(dir.join("gazetteer-keys.txt"), out) {
        panic!("cannot write the gazetteer keys: {e}");
    }
}
