//! Cutting JSON files at their records as they are read must not change what an import
//! gives. For random JSON documents (RFC 8259 grammar: records arrays with nested
//! members, escapes including \uXXXX and surrogate pairs, non-ASCII text, strings
//! holding brackets and quotes, all four whitespace characters) — some of them broken
//! (truncated, a stray byte, trailing text, invalid UTF-8, the array's name twice,
//! nested past the depth limit) — the import that splits, with pieces of 1 to 64 bytes
//! so that cuts fall everywhere, gives exactly the footprint (items, friends, declared
//! values, warnings, statistics) and fingerprint of the import that reads every file
//! whole, or exactly its error.

use std::io::Write;
use std::path::Path;

use proptest::prelude::*;
use telltale::archive::Archive;
use telltale::footprint::Footprint;
use telltale::import::{Options, import_with_options};
use telltale::limits::Limits;
use telltale::mapping::Mapping;
use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, ZipWriter};

const MAPPING: &str = r#"
format = 1
[[source]]
kind = "like"
files = ["likes/*.json"]
records = "$.a.likes[*]"
name = "$.t"
id = "$['id']"
category = "$.c"
date = "$.d"

[[source]]
kind = "friend"
files = ["friends.json"]
records = "$[*]"
name = "$.t"
[source.attributes]
location = "$.p.home"

[[source]]
kind = "group"
files = ["groups.csv"]
name = "Group"
"#;

/// A JSON value to be written out in one of several equivalent ways.
#[derive(Debug, Clone)]
enum J {
    Null,
    Bool(bool),
    Int(i64),
    Float(f64),
    Str(String),
    Arr(Vec<J>),
    Obj(Vec<(String, J)>),
}

fn text() -> impl Strategy<Value = String> {
    prop_oneof![
        // Names from a small set, so that items merge across records and files.
        prop::sample::select(vec!["Alder", "Birch", "Cedar", "  Birch ", "", "É"])
            .prop_map(str::to_string),
        r#"[a-z "\\\[\]{}/,:\u{e9}\u{1F600}\n\t]{0,12}"#,
    ]
}

fn leaf() -> impl Strategy<Value = J> {
    prop_oneof![
        Just(J::Null),
        any::<bool>().prop_map(J::Bool),
        (-1_000_000_000i64..2_000_000_000).prop_map(J::Int),
        (-1e6f64..1e6).prop_map(J::Float),
        text().prop_map(J::Str),
    ]
}

fn value() -> impl Strategy<Value = J> {
    leaf().prop_recursive(4, 24, 5, |inner| {
        prop_oneof![
            prop::collection::vec(inner.clone(), 0..4).prop_map(J::Arr),
            prop::collection::vec(
                (
                    prop::sample::select(vec!["t", "id", "c", "d", "p", "home", "x", "likes"]),
                    inner
                ),
                0..5
            )
            .prop_map(|m| J::Obj(m.into_iter().map(|(k, v)| (k.to_string(), v)).collect())),
        ]
    })
}

/// A record: mostly the fields the mapping reads, with other members around them.
fn record() -> impl Strategy<Value = J> {
    (
        text(),
        prop::option::of(leaf()),
        prop::option::of(leaf()),
        prop::option::of(prop_oneof![
            (0i64..2_000_000_000).prop_map(J::Int),
            Just(J::Str("2021-03-04T05:06:07Z".into())),
            Just(J::Str("not a date".into()))
        ]),
        prop::option::of(value()),
        any::<bool>(),
    )
        .prop_map(|(t, id, c, d, extra, t_first)| {
            let mut m = Vec::new();
            if let Some(x) = extra {
                m.push(("about".to_string(), x));
            }
            let name = ("t".to_string(), J::Str(t));
            if t_first {
                m.insert(0, name);
            } else {
                m.push(name);
            }
            for (k, v) in [("id", id), ("c", c), ("d", d)] {
                if let Some(v) = v {
                    m.push((k.to_string(), v));
                }
            }
            J::Obj(m)
        })
}

/// Writes JSON with varied whitespace and string escapes, driven by a seed.
struct Writer {
    out: Vec<u8>,
    seed: u64,
}

impl Writer {
    fn roll(&mut self, n: u64) -> u64 {
        // 64-bit LCG (Knuth's MMIX constants), common practice, no source needed.
        self.seed = self
            .seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.seed >> 33) % n
    }

    fn ws(&mut self) {
        const WS: [&str; 6] = ["", "", " ", "\n  ", "\t", "\r\n"];
        let w = WS[self.roll(6) as usize];
        self.out.extend_from_slice(w.as_bytes());
    }

    fn string(&mut self, s: &str) {
        if self.roll(3) > 0 {
            self.out
                .extend_from_slice(serde_json::to_string(s).expect("string").as_bytes());
            return;
        }
        // Every character escaped as \uXXXX (astral ones as surrogate pairs), with
        // `\/` for slashes: RFC 8259 section 7.
        self.out.push(b'"');
        for ch in s.chars() {
            if ch == '/' {
                self.out.extend_from_slice(b"\\/");
                continue;
            }
            let mut units = [0u16; 2];
            for u in ch.encode_utf16(&mut units) {
                self.out
                    .extend_from_slice(format!("\\u{:04X}", *u).as_bytes());
            }
        }
        self.out.push(b'"');
    }

    fn value(&mut self, v: &J) {
        match v {
            J::Null => self.out.extend_from_slice(b"null"),
            J::Bool(b) => self.out.extend_from_slice(b.to_string().as_bytes()),
            J::Int(i) => self.out.extend_from_slice(i.to_string().as_bytes()),
            J::Float(f) => self
                .out
                .extend_from_slice(serde_json::to_string(f).expect("float").as_bytes()),
            J::Str(s) => self.string(s),
            J::Arr(items) => {
                self.out.push(b'[');
                for (i, item) in items.iter().enumerate() {
                    if i > 0 {
                        self.out.push(b',');
                    }
                    self.ws();
                    self.value(item);
                    self.ws();
                }
                self.out.push(b']');
            }
            J::Obj(members) => {
                self.out.push(b'{');
                for (i, (k, item)) in members.iter().enumerate() {
                    if i > 0 {
                        self.out.push(b',');
                    }
                    self.ws();
                    self.string(k);
                    self.ws();
                    self.out.push(b':');
                    self.ws();
                    self.value(item);
                    self.ws();
                }
                self.out.push(b'}');
            }
        }
    }
}

/// How a file is broken, if at all.
#[derive(Debug, Clone)]
enum Damage {
    None,
    Bom,
    Truncate(prop::sample::Index),
    Insert(prop::sample::Index, u8),
    Trailing,
    Deep(usize),
    NameTwice,
}

fn damage() -> impl Strategy<Value = Damage> {
    prop_oneof![
        6 => Just(Damage::None),
        1 => Just(Damage::Bom),
        1 => any::<prop::sample::Index>().prop_map(Damage::Truncate),
        2 => (
            any::<prop::sample::Index>(),
            prop::sample::select(vec![b',', b']', b'}', b'"', b'\\', b'x', 0xFF, b'[', 0x01])
        )
            .prop_map(|(i, b)| Damage::Insert(i, b)),
        1 => Just(Damage::Trailing),
        1 => (1usize..140).prop_map(Damage::Deep),
        1 => Just(Damage::NameTwice),
    ]
}

/// A likes file: `{"a": {"likes": [...]}}` with other members before and after.
fn likes_file(
    records: &[J],
    before: &[(String, J)],
    after: &[(String, J)],
    damage: &Damage,
    seed: u64,
) -> Vec<u8> {
    let mut inner: Vec<(String, J)> = before.to_vec();
    let mut records = records.to_vec();
    if let Damage::Deep(n) = damage {
        let mut deep = J::Int(1);
        for _ in 0..*n {
            deep = J::Arr(vec![deep]);
        }
        records.push(deep);
    }
    inner.push(("likes".into(), J::Arr(records)));
    inner.extend(after.iter().cloned());
    if let Damage::NameTwice = damage {
        inner.push(("likes".into(), J::Arr(vec![])));
    }
    let doc = J::Obj(vec![
        ("n".into(), J::Int(3)),
        ("a".into(), J::Obj(inner)),
        ("z".into(), J::Str("]}".into())),
    ]);
    let mut w = Writer {
        out: Vec::new(),
        seed,
    };
    w.ws();
    w.value(&doc);
    w.ws();
    let mut out = w.out;
    match damage {
        Damage::Bom => out.splice(0..0, [0xEF, 0xBB, 0xBF]).for_each(drop),
        Damage::Truncate(i) => out.truncate(i.index(out.len())),
        Damage::Insert(i, b) => out.insert(i.index(out.len() + 1), *b),
        Damage::Trailing => out.extend_from_slice(b" {}"),
        _ => {}
    }
    out
}

fn zip_of(files: &[(String, Vec<u8>)], deflate: bool) -> Vec<u8> {
    let mut zip = ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let method = if deflate {
        CompressionMethod::Deflated
    } else {
        CompressionMethod::Stored
    };
    let opts = SimpleFileOptions::default().compression_method(method);
    for (name, data) in files {
        zip.start_file(name.as_str(), opts).expect("start");
        zip.write_all(data).expect("write");
    }
    zip.finish().expect("finish").into_inner()
}

fn run(
    zip: &[u8],
    limits: &Limits,
    options: Options,
) -> (Result<Footprint, String>, Vec<(u64, u64)>) {
    let mut archive =
        Archive::zip_from_bytes(zip.to_vec(), Path::new("t.zip"), limits).expect("open zip");
    let mapping = Mapping::parse(MAPPING, "m.toml").expect("mapping");
    let mut ticks = Vec::new();
    let got = import_with_options(
        &mut archive,
        &mapping,
        limits,
        &mut |d, t| ticks.push((d, t)),
        options,
    )
    .map_err(|e| e.to_string());
    (got, ticks)
}

type Members = Vec<(String, J)>;

fn members() -> impl Strategy<Value = Members> {
    prop::collection::vec(
        (
            prop::sample::select(vec!["x", "y", "likes2", "lik"]),
            value(),
        )
            .prop_map(|(k, v)| (k.to_string(), v)),
        0..3,
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 192, ..ProptestConfig::default() })]

    #[test]
    fn split_import_equals_whole_file_import(
        files in prop::collection::vec(
            (prop::collection::vec(record(), 0..8), members(), members(), damage(), any::<u64>()),
            1..4,
        ),
        friends in prop::collection::vec(record(), 0..4),
        friends_damage in damage(),
        piece in 1usize..64,
        deflate in any::<bool>(),
        record_limit in prop_oneof![3 => Just(20_000_000u64), 1 => 0u64..12],
        depth_limit in prop_oneof![3 => Just(128u64), 1 => 2u64..8],
        seed in any::<u64>(),
    ) {
        let mut zipped: Vec<(String, Vec<u8>)> = Vec::new();
        zipped.push(("groups.csv".into(), b"Group\nAlder\nChoir\n".to_vec()));
        for (i, (records, before, after, damage, seed)) in files.iter().enumerate() {
            zipped.push((
                format!("likes/{i}.json"),
                likes_file(records, before, after, damage, *seed),
            ));
        }
        // A top-level array for `$[*]`.
        let mut friends = friends;
        if let Damage::Deep(n) = friends_damage {
            let mut deep = J::Int(1);
            for _ in 0..n {
                deep = J::Obj(vec![("p".into(), deep)]);
            }
            friends.push(deep);
        }
        let mut w = Writer { out: Vec::new(), seed };
        w.value(&J::Arr(friends));
        zipped.push(("friends.json".into(), w.out));
        let zip = zip_of(&zipped, deflate);
        let limits = Limits {
            records: record_limit,
            json_depth: depth_limit,
            ..Limits::default()
        };
        let whole = run(&zip, &limits, Options { split: false, ..Options::default() });
        let split = run(&zip, &limits, Options { split: true, piece });
        prop_assert_eq!(&split.0, &whole.0);
        prop_assert_eq!(&split.1, &whole.1);
    }
}

#[test]
fn the_generated_files_exercise_both_paths() {
    // A clean file and a broken one: both imports agree, the clean one has records.
    let records = vec![
        J::Obj(vec![("t".into(), J::Str("Alder \"[x]\"".into()))]),
        J::Obj(vec![
            ("t".into(), J::Str("Birch".into())),
            ("c".into(), J::Arr(vec![])),
        ]),
    ];
    let clean = likes_file(&records, &[], &[], &Damage::None, 7);
    let broken = likes_file(&records, &[], &[], &Damage::Trailing, 7);
    let zip = zip_of(
        &[
            ("likes/1.json".into(), clean),
            ("likes/2.json".into(), broken),
        ],
        true,
    );
    let limits = Limits::default();
    let whole = run(
        &zip,
        &limits,
        Options {
            split: false,
            ..Options::default()
        },
    );
    let split = run(
        &zip,
        &limits,
        Options {
            split: true,
            piece: 5,
        },
    );
    assert_eq!(split, whole);
    let fp = split.0.expect("import");
    let names: Vec<&str> = fp.items.iter().map(|i| &*i.name).collect();
    assert_eq!(names, ["Alder \"[x]\"", "Birch"]);
    // The broken file is skipped whole, with the whole-file reader's warning.
    assert!(
        fp.warnings
            .iter()
            .any(|w| w.file.as_deref() == Some("likes/2.json")
                && w.message.contains("not valid JSON")),
        "{:?}",
        fp.warnings
    );
}
