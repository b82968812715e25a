//! Tests of the columnar store, the streaming reader and the binary cache: a cache
//! gives back exactly what the JSON gives (every item, every count bit for bit, every
//! match), damaged caches are refused, and the streaming reader agrees with checking a
//! file read whole. These are invariants (round trips and agreement between two
//! paths), not reference values.

use proptest::prelude::*;

use super::cache::{HASH_STEP, cache_path, decode, decode_from, encode, hash_file};
use super::{MatchedBy, Priors, PriorsFile, write_priors};
use crate::footprint::{Item, ItemKind, Origin};

/// A table with every kind of item the checks and codings meet: whole counts of each
/// width, fractions, shares × n, -0.0 and negative or missing values, duplicate ids,
/// unknown attributes, wrong lengths, aliases, shared names, no id, no kind, names
/// outside ASCII.
fn sample_json() -> String {
    let mut items = Vec::new();
    for i in 0..400u32 {
        let name = match i % 7 {
            0 => format!("Café Société {}", i / 14),
            1 => format!("Ｆｕｌｌ Ｗｉｄｔｈ {}", i / 3),
            2 => "Shared Name".to_string(),
            _ => format!("Club number {i}"),
        };
        let id = match i % 5 {
            0 => "null".to_string(),
            1 => format!("\"dup-{}\"", i / 10),
            _ => format!("\"id-{i}\""),
        };
        let kind = ["\"like\"", "\"group\"", "\"follow\"", "\"event\"", "null"][i as usize % 5];
        let scale = [1.0, 300.0, 70_000.0, 5e9][i as usize % 4];
        let a: Vec<String> = (0..3)
            .map(|v| format!("{}", (i + v) as f64 * scale))
            .collect();
        let b = match i % 6 {
            0 => "{\"shares\": [0.2, 0.3, 0.5], \"n\": 17.3}".to_string(),
            1 => "[1.5, -0.0, 2.25]".to_string(),
            2 => "[-3, 1e300, 2]".to_string(),
            3 => "[1, 2]".to_string(),
            _ => format!("[{}, 0, {}]", i % 9, i % 4),
        };
        let extra = if i % 11 == 0 {
            ", \"nope\": [1, 2]"
        } else {
            ""
        };
        let aliases = if i % 4 == 0 {
            format!(
                ", \"aliases\": [\"Alias {}\", \"Shared Name\", \"  \"]",
                i / 8
            )
        } else {
            String::new()
        };
        items.push(format!(
            "{{\"id\": {id}, \"name\": \"{name}\", \"kind\": {kind}{aliases}, \"members\": {{\"b\": {b}, \"a\": [{}]{extra}}}}}",
            a.join(", ")
        ));
    }
    format!(
        r#"{{"format": 1,
  "provenance": {{"source": "test", "licence": "CC0-1.0", "created": "2026-12-02",
    "method": "invented", "synthetic": true, "contributors": 12}},
  "attributes": [
    {{"id": "a", "label": "A", "threshold": 0.5, "smoothing": 2.5, "values": [
      {{"id": "x", "label": "X", "base_rate": 0.2, "member_rate": 0.3}},
      {{"id": "y", "label": "Y", "base_rate": 0.3, "member_rate": 0.3}},
      {{"id": "z", "label": "Z", "base_rate": 0.5, "member_rate": 0.4}}]}},
    {{"id": "b", "label": "B", "threshold": 0.4, "pseudocount": 1.0,
      "calibration": {{"method": "logistic", "lambda": 0.7, "intercept": 0.1,
        "log_odds": 1.1, "log_base_rate": -0.2, "evidence_spread": 0.05}}, "values": [
      {{"id": "p", "label": "P", "base_rate": 0.1}},
      {{"id": "q", "label": "Q", "base_rate": 0.6}},
      {{"id": "r", "label": "R", "base_rate": 0.3}}]}}],
  "items": [
    {}
  ]}}"#,
        items.join(",\n    ")
    )
}

fn archive_item(name: &str, id: Option<&str>, kind: ItemKind) -> Item {
    Item {
        kind,
        name: name.into(),
        id: id.map(Into::into),
        category: None,
        date: None,
        origin: Origin {
            file: "t".into(),
            record: 1,
        },
    }
}

/// Every item, count and match of `b` equals `a`'s, bit for bit.
fn assert_same(a: &Priors, b: &Priors, probes: &[Item]) {
    assert_eq!(a.provenance, b.provenance);
    assert_eq!(a.attributes, b.attributes);
    assert_eq!(a.warnings, b.warnings);
    assert_eq!(a.len_items(), b.len_items());
    for (x, y) in a.items().zip(b.items()) {
        assert_eq!((x.name(), x.id(), x.kind()), (y.name(), y.id(), y.kind()));
        assert_eq!(x.support().to_bits(), y.support().to_bits());
        let xa: Vec<usize> = x.attributes().collect();
        assert_eq!(xa, y.attributes().collect::<Vec<_>>());
        for ai in xa {
            let bits = |c: Vec<f64>| c.iter().map(|v| v.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(x.counts(ai).unwrap()), bits(y.counts(ai).unwrap()));
        }
    }
    for p in probes {
        assert_eq!(a.find(p), b.find(p), "{p:?}");
    }
}

fn probes(p: &Priors) -> Vec<Item> {
    let mut out = Vec::new();
    for it in p.items() {
        for kind in [ItemKind::Like, ItemKind::Group] {
            out.push(archive_item(it.name(), None, kind));
            out.push(archive_item(&it.name().to_uppercase(), it.id(), kind));
        }
    }
    for i in 0..60 {
        out.push(archive_item(&format!("alias {i}"), None, ItemKind::Event));
        out.push(archive_item("x", Some(&format!("id-{i}")), ItemKind::Like));
    }
    out.push(archive_item("SHARED   name!", None, ItemKind::Follow));
    out.push(archive_item(
        "nobody at all",
        Some("nothing"),
        ItemKind::Like,
    ));
    out
}

fn hash_of(text: &str) -> blake3::Hash {
    blake3::hash(text.as_bytes())
}

#[test]
fn streaming_read_agrees_with_checking_the_whole_file() {
    let text = sample_json();
    let streamed = Priors::parse(&text, "t").expect("parse");
    let file: PriorsFile = serde_json::from_str(&text).expect("serde");
    let whole = Priors::from_file(file, "t").expect("check");
    assert_same(&streamed, &whole, &probes(&whole));
    // The checks fired: duplicates, unknown attributes, wrong lengths.
    assert!(streamed.warnings.iter().any(|w| w.contains("listed twice")));
    assert!(
        streamed
            .warnings
            .iter()
            .any(|w| w.contains("unknown attribute 'nope'"))
    );
    assert!(
        streamed
            .warnings
            .iter()
            .any(|w| w.contains("has 2 counts for 3 values"))
    );
    assert!(streamed.warnings.last().unwrap().starts_with("… and "));
}

#[test]
fn items_before_attributes_read_the_same() {
    let text = sample_json();
    let at = text.find("\"attributes\"").unwrap();
    let items_at = text.find("\"items\"").unwrap();
    let end = text.rfind('}').unwrap();
    let reordered = format!(
        "{}{}, {}}}",
        &text[..at],
        &text[items_at..end].trim_end(),
        text[at..items_at].trim_end().trim_end_matches(',')
    );
    let a = Priors::parse(&text, "t").expect("parse");
    let b = Priors::parse(&reordered, "t").expect("reordered parse");
    assert_same(&a, &b, &probes(&a));
}

#[test]
fn a_written_and_read_file_keeps_every_item() {
    // write_priors → parse keeps names, ids, kinds and counts.
    let text = sample_json();
    let file: PriorsFile = serde_json::from_str(&text).expect("serde");
    let mut out = Vec::new();
    write_priors(&file, &mut out).expect("write");
    let a = Priors::parse(&text, "t").expect("parse");
    let b = Priors::parse(std::str::from_utf8(&out).unwrap(), "t").expect("parse again");
    assert_same(&a, &b, &probes(&a));
}

#[test]
fn cache_round_trip_is_exact() {
    let text = sample_json();
    let a = Priors::parse(&text, "t").expect("parse");
    let bytes = encode(&a, &hash_of(&text));
    let b = decode(&bytes, &hash_of(&text), "t").expect("decode");
    assert_same(&a, &b, &probes(&a));
    // Each coding is used: u8, u16, u32 and raw f64.
    let tags: std::collections::BTreeSet<u8> = a.store.entry_tag.iter().copied().collect();
    assert_eq!(tags.into_iter().collect::<Vec<_>>(), vec![1, 2, 3, 4]);
    // Ties: a shared name goes to the same kind, then the best supported, then the
    // earliest; an alias only when no name matches.
    let shared = archive_item("shared name", None, ItemKind::Group);
    let (i, by) = b.find(&shared).expect("match");
    assert_eq!(by, MatchedBy::Name);
    assert_eq!(b.item(i).kind(), Some(ItemKind::Group));
    let best = b
        .items()
        .filter(|it| it.name() == "Shared Name" && it.kind() == Some(ItemKind::Group))
        .map(|it| it.support())
        .fold(0.0, f64::max);
    assert_eq!(b.item(i).support(), best);
    let alias = archive_item("ALIAS 3", None, ItemKind::Like);
    assert_eq!(b.find(&alias).map(|m| m.1), Some(MatchedBy::Alias));
}

#[test]
fn a_cache_of_another_file_or_version_is_refused() {
    let text = sample_json();
    let a = Priors::parse(&text, "t").expect("parse");
    let bytes = encode(&a, &hash_of(&text));
    let other = hash_of("another file");
    assert_eq!(
        decode(&bytes, &other, "t").err(),
        Some("made from another priors file")
    );
    let mut old = bytes.clone();
    old[8] ^= 0xff;
    assert_eq!(
        decode(&old, &hash_of(&text), "t").err(),
        Some("made by another version of telltale")
    );
    assert!(decode(b"not a cache at all", &hash_of(&text), "t").is_err());
    assert!(decode(&[], &hash_of(&text), "t").is_err());
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// Any flipped byte or cut is refused (never a panic, never wrong priors).
    #[test]
    fn damaged_caches_are_refused(
        flips in proptest::collection::vec((any::<prop::sample::Index>(), 1u8..=255), 0..4),
        cut in proptest::option::of(any::<prop::sample::Index>()),
    ) {
        let text = sample_json();
        let a = Priors::parse(&text, "t").expect("parse");
        let good = encode(&a, &hash_of(&text));
        let mut bytes = good.clone();
        for (at, x) in &flips {
            let i = at.index(bytes.len());
            bytes[i] ^= x;
        }
        if let Some(c) = cut {
            bytes.truncate(c.index(bytes.len()));
        }
        let decoded = decode(&bytes, &hash_of(&text), "t");
        if bytes == good {
            prop_assert!(decoded.is_ok());
        } else {
            prop_assert!(decoded.is_err());
        }
    }
}

/// A payload with a valid checksum but inconsistent contents (as a crafted file could
/// have) is refused by the structural checks alone.
#[test]
fn inconsistent_contents_are_refused_even_with_a_good_checksum() {
    let text = sample_json();
    let a = Priors::parse(&text, "t").expect("parse");
    let mut broken = a.clone();
    broken.store.spans[3] = u32::MAX;
    let mut bad_index = a.clone();
    bad_index.index.names.at[0] = 1_000_000;
    let mut bad_tag = a.clone();
    bad_tag.store.entry_tag[0] = 9;
    let mut bad_text = a.clone();
    // Cut a multi-byte character in two.
    let cafe = bad_text.store.text.find('é').expect("é");
    bad_text.store.spans[0] = 0;
    bad_text.store.spans[1] = cafe as u32 + 1;
    for p in [broken, bad_index, bad_tag, bad_text] {
        let bytes = encode(&p, &hash_of(&text));
        assert_eq!(
            decode(&bytes, &hash_of(&text), "t").err(),
            Some("its contents are inconsistent")
        );
    }
}

/// A reader that hands out at most 7 bytes per call, as a pipe or a slow disk may: the
/// section reader must still fill every column exactly.
struct Trickle<'a>(&'a [u8]);

impl std::io::Read for Trickle<'_> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = buf.len().min(7).min(self.0.len());
        buf[..n].copy_from_slice(&self.0[..n]);
        self.0 = &self.0[n..];
        Ok(n)
    }
}

#[test]
fn a_cache_read_in_small_pieces_is_the_same() {
    let text = sample_json();
    let a = Priors::parse(&text, "t").expect("parse");
    let bytes = encode(&a, &hash_of(&text));
    let b = decode_from(Trickle(&bytes), bytes.len() as u64, &hash_of(&text), "t")
        .expect("decode in pieces");
    assert_same(&a, &b, &probes(&a));
    assert_eq!(a.store, b.store);
    assert_eq!(a.index, b.index);
}

/// The file hash (`HASH_STEP` steps over all cores) is the plain BLAKE3 hash, at the
/// step edges too. Reference: the BLAKE3 test vectors (github.com/BLAKE3-team/BLAKE3,
/// test_vectors.json) give af1349b9… for the empty input; the rest are checked against
/// the crate's one-call single-core `blake3::hash`.
#[test]
fn the_file_hash_is_plain_blake3() {
    let dir = tempfile::tempdir().expect("tempdir");
    let empty = dir.path().join("empty");
    std::fs::write(&empty, b"").expect("write");
    assert_eq!(
        hash_file(&empty).expect("hash").to_hex().as_str(),
        "af1349b9f5f9a1a6a0404dea36dcc9499bcb25c9adc112b7cc9a93cae41f3262"
    );
    for len in [
        1,
        1024,
        HASH_STEP - 1,
        HASH_STEP,
        HASH_STEP + 1,
        2 * HASH_STEP + 4097,
    ] {
        let data: Vec<u8> = (0..len).map(|i| (i * 31 % 251) as u8).collect();
        let path = dir.path().join(format!("f{len}"));
        std::fs::write(&path, &data).expect("write");
        assert_eq!(
            hash_file(&path).expect("hash"),
            blake3::hash(&data),
            "{len}"
        );
    }
}

/// A cache on disk is used when it matches; the same cache with one byte changed is
/// not: the JSON is read instead and a note says why.
#[test]
fn a_damaged_cache_file_falls_back_to_the_json() {
    let dir = tempfile::tempdir().expect("tempdir");
    let text = sample_json();
    let json = dir.path().join("p.json");
    std::fs::write(&json, &text).expect("write");
    let cache = dir.path().join("cache");
    std::fs::create_dir(&cache).expect("mkdir");
    let a = Priors::parse(&text, "t").expect("parse");
    let mut bytes = encode(&a, &hash_of(&text));
    let target = cache_path(&cache, &hash_of(&text));
    // Load through a cache holding `bytes`: the priors are `a`; returns the notes.
    let load_with = |bytes: &[u8]| {
        std::fs::write(&target, bytes).expect("write cache");
        let b = Priors::load_cached(&json, Some(&cache)).expect("load");
        assert_same(&a, &b, &probes(&a));
        b.cache_notes
    };
    let notes = load_with(&bytes);
    assert!(notes[0].starts_with("read from the cache"), "{notes:?}");
    let last = bytes.len() - 1;
    bytes[last] ^= 1;
    let notes = load_with(&bytes);
    assert!(
        notes[0].contains("damaged: its checksum does not match"),
        "{notes:?}"
    );
}

/// Table evidence for items whose counts are equal shares one set of numbers; each
/// piece must still be, bit for bit, what that item's own counts give.
#[test]
fn shared_table_evidence_is_each_items_own() {
    use crate::evidence::{Evidence, EvidenceSet, Origin as From, Subject, from_table};
    use crate::footprint::Footprint;
    use crate::stats::smooth_against;

    let p = Priors::parse(&sample_json(), "t").expect("parse");
    let footprint = Footprint {
        items: probes(&p),
        ..Footprint::default()
    };
    let mut set = EvidenceSet::new(footprint.items.len());
    from_table(&footprint, &p, &mut set);
    let bits = |e: &Evidence| {
        let mut v: Vec<u64> = e.log_lr().iter().map(|x| x.to_bits()).collect();
        v.extend(e.distribution().iter().map(|x| x.to_bits()));
        v.extend([e.homogeneity(), e.info_bits(), e.support()].map(f64::to_bits));
        v
    };
    for e in &set.list {
        let Subject::Item(i) = e.subject() else {
            panic!("table evidence about the friend list: {e:?}");
        };
        let (ri, by) = p.find(&footprint.items[i]).expect("matched");
        let counts = p.item(ri).counts(e.attribute()).expect("counts");
        let attr = &p.attributes[e.attribute()];
        let (dist, q) = smooth_against(
            &counts,
            &attr.member_rates,
            attr.smoothing,
            attr.pseudocount,
        );
        let origin = From::Table {
            matched_by: by,
            reference: p.item(ri).name().into(),
        };
        let own = Evidence::from_distribution(
            e.subject(),
            e.attribute(),
            dist,
            &q,
            counts.iter().sum(),
            origin,
        );
        assert_eq!(bits(e), bits(&own), "{e:?}");
        assert_eq!(e.origin, own.origin);
    }
    let distinct: std::collections::HashSet<*const f64> =
        set.list.iter().map(|e| e.log_lr().as_ptr()).collect();
    assert!(
        distinct.len() * 2 < set.list.len(),
        "{} numbers for {} pieces",
        distinct.len(),
        set.list.len()
    );
}
