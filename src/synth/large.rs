//! The large benchmark workloads: one invented member's archive at the scale of a
//! long-time heavy user (100,000 liked pages, 10,000 groups, 5,000 friends, a few
//! hundred MB of JSON records and optional media padding that no mapping reads), in
//! "layout L", a layout of our own with its mapping inside; and a reference table of a
//! million items over the four attributes. Both are written as they are generated
//! (nothing is held whole in memory) and are reproducible from the seed; the archive's
//! items are drawn from the table's numbering so the two belong together.

use std::collections::HashSet;
use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::Path;

use rand::{Rng, RngCore};
use serde::Serialize;
use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, DateTime, ZipWriter};

use super::demo::stream;
use super::large_items::{ItemMaker, LargeItem, base_rates};
use super::layout_a::rfc3339;
use super::places::state_index;
use super::words::{ADJECTIVES, FIRST_NAMES, LAST_NAMES, TOPICS};
use super::world::{
    AGE, LOCATION, POLITICS, Profile, RELIGION, attribute_specs, cardinalities, value_id,
    value_label,
};
use crate::footprint::ItemKind;
use crate::priors::{FORMAT, ItemSpec, MemberSpec, PriorsFile, Provenance, write_priors_streaming};

/// The mapping for layout L, stored inside the archive as `telltale-mapping.toml`.
pub const MAPPING: &str = r#"# Mapping for "layout L", an archive layout invented for telltale's benchmarks
# (`telltale synth large`). Every setting is explained in docs/mapping.md.
format = 1
label = "Lanternwick benchmark export, layout L"

[[source]]
kind = "like"
files = ["activity/liked/*.json"]
records = "$.pages[*]"
name = "$.title"
id = "$.page_ref"
category = "$.topic"
date = "$.at"                # Unix seconds

[[source]]
kind = "group"
files = ["communities/memberships.json"]
records = "$.groups[*]"
name = "$.group_name"        # no ids: matched by name
category = "$.kind"
date = "$.since"             # RFC 3339

[[source]]
kind = "friend"
files = ["people/friends.json"]
records = "$.friends[*]"
name = "$.name"
id = "$.uid"
date = "$.since"
[source.attributes]
age_band = "$.public.age_range"
location = "$.public.lives_in"
politics = "$.public.leaning"
religion = "$.public.faith"

[[source]]
kind = "self"
files = ["account/about_me.json"]
[source.attributes]
age_band = "$.age_band"
location = "$.home"
politics = "$.leaning"
religion = "$.faith"
"#;

/// Items in the large reference table.
pub const PRIORS_ITEMS: u64 = 1_000_000;

/// Sizes of the large archive.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LargeConfig {
    pub seed: u64,
    pub likes: usize,
    pub groups: usize,
    pub friends: usize,
    /// Liked pages per file (the layout splits long lists).
    pub likes_per_file: usize,
    /// Approximate length of each page's or group's free-text description.
    pub about_bytes: usize,
    /// Media padding in MiB (photos no mapping reads; stored uncompressed).
    pub media_mb: u64,
    /// Items of the reference table the archive's items are drawn from.
    pub table_items: u64,
}

impl Default for LargeConfig {
    fn default() -> Self {
        LargeConfig {
            seed: 11,
            likes: 100_000,
            groups: 10_000,
            friends: 5_000,
            likes_per_file: 10_000,
            about_bytes: 2_000,
            media_mb: 2_048,
            table_items: PRIORS_ITEMS,
        }
    }
}

/// What was written.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LargeSummary {
    pub likes: usize,
    pub groups: usize,
    pub friends: usize,
    /// Items the reference table lists (the rest are the member's own).
    pub listed: usize,
    /// Decompressed bytes of the entries the mapping reads.
    pub mapped_bytes: u64,
    /// Bytes of media padding.
    pub media_bytes: u64,
    pub profile: [&'static str; 4],
}

/// The archive owner's true values (invented).
fn owner() -> Profile {
    [3, state_index("US-MN").unwrap_or(0), 1, 1]
}

/// Counts bytes going through to the zip.
struct Counted<'a, W: Write> {
    inner: &'a mut W,
    bytes: u64,
}

impl<W: Write> Write for Counted<'_, W> {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        let n = self.inner.write(buf)?;
        self.bytes += n as u64;
        Ok(n)
    }
    fn flush(&mut self) -> io::Result<()> {
        self.inner.flush()
    }
}

/// A paragraph of invented filler about a page or group, about `len` bytes.
fn about(rng: &mut impl Rng, name: &str, len: usize) -> String {
    let mut s = format!("{name}: ");
    while s.len() < len {
        let a = ADJECTIVES[rng.random_range(0..ADJECTIVES.len())];
        let t = TOPICS[rng.random_range(0..TOPICS.len())];
        let n = rng.random_range(2..400);
        s.push_str(&format!(
            "{a} notes on {} and {n} neighbours who share them. ",
            t.to_lowercase()
        ));
    }
    s
}

#[derive(Serialize)]
struct Page<'a> {
    title: &'a str,
    page_ref: &'a str,
    topic: &'a str,
    at: i64,
    audience: &'a str,
    about: String,
}

#[derive(Serialize)]
struct GroupRow<'a> {
    group_name: String,
    kind: &'a str,
    since: String,
    role: &'a str,
    about: String,
}

#[derive(Serialize)]
struct Public<'a> {
    #[serde(skip_serializing_if = "Option::is_none")]
    age_range: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    lives_in: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    leaning: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    faith: Option<&'a str>,
}

#[derive(Serialize)]
struct FriendRow<'a> {
    name: String,
    uid: String,
    since: i64,
    public: Public<'a>,
}

/// Choose the member's items: distinct table items of the wanted kind, leaning toward
/// the member's own values as real affiliations do, plus about 5% of the member's own
/// items that no table lists (numbers past the table).
fn choose(
    rng: &mut impl Rng,
    maker: &ItemMaker,
    kind: ItemKind,
    n: usize,
    table_items: u64,
    taken: &mut HashSet<u64>,
) -> Vec<(u64, LargeItem)> {
    let me = owner();
    let mut out = Vec::with_capacity(n);
    while out.len() < n {
        let own = rng.random_bool(0.05);
        let j = if own {
            table_items + rng.random_range(0..table_items.max(1))
        } else {
            rng.random_range(0..table_items.max(1))
        };
        if taken.contains(&j) {
            continue;
        }
        let item = maker.item(j);
        if item.kind != kind {
            continue;
        }
        let fits = match item.focus {
            None => true,
            Some((a, v)) => me[a] == v || rng.random_bool(0.15),
        };
        if fits || own {
            taken.insert(j);
            out.push((j, item));
        }
    }
    out
}

fn options(method: CompressionMethod) -> io::Result<SimpleFileOptions> {
    let stamp = DateTime::from_date_and_time(2026, 11, 30, 0, 0, 0).map_err(io::Error::other)?;
    Ok(SimpleFileOptions::default()
        .compression_method(method)
        .last_modified_time(stamp)
        .unix_permissions(0o644)
        .large_file(false))
}

/// Write a JSON document `{"KEY": [rows…]}` into the zip, one row at a time.
fn json_list<W: Write + io::Seek, T: Serialize>(
    zip: &mut ZipWriter<W>,
    path: &str,
    key: &str,
    rows: impl Iterator<Item = T>,
) -> io::Result<u64> {
    zip.start_file(path, options(CompressionMethod::Deflated)?)
        .map_err(io::Error::other)?;
    let mut counted = Counted {
        inner: zip,
        bytes: 0,
    };
    {
        let mut w = BufWriter::with_capacity(1 << 16, &mut counted);
        write!(w, "{{\n  \"{key}\": [")?;
        for (i, row) in rows.enumerate() {
            w.write_all(if i == 0 { b"\n    " } else { b",\n    " })?;
            serde_json::to_writer(&mut w, &row).map_err(io::Error::other)?;
        }
        w.write_all(b"\n  ]\n}\n")?;
        w.flush()?;
    }
    Ok(counted.bytes)
}

/// Write the large archive as a zip at `out`.
pub fn write_large_archive(cfg: &LargeConfig, out: &Path) -> io::Result<LargeSummary> {
    if let Some(parent) = out.parent() {
        std::fs::create_dir_all(parent)?;
    }
    let mut zip = ZipWriter::new(BufWriter::new(File::create(out)?));
    let maker = ItemMaker::new(cfg.seed);
    let me = owner();
    let now = super::personas::demo_now();
    let joined = now - 16 * 365 * 86_400;
    let mut mapped = 0u64;

    zip.start_file(
        "telltale-mapping.toml",
        options(CompressionMethod::Deflated)?,
    )
    .map_err(io::Error::other)?;
    zip.write_all(MAPPING.as_bytes())?;
    zip.start_file("README.txt", options(CompressionMethod::Deflated)?)
        .map_err(io::Error::other)?;
    zip.write_all(
        format!(
            "Lanternwick account export (layout L), made by `telltale synth large` for benchmarks.\n\n{}\n",
            super::layout_a::NOTE
        )
        .as_bytes(),
    )?;
    zip.start_file(
        "account/about_me.json",
        options(CompressionMethod::Deflated)?,
    )
    .map_err(io::Error::other)?;
    let about_me = serde_json::json!({
        "age_band": value_id(AGE, me[AGE]),
        "home": value_id(LOCATION, me[LOCATION]),
        "leaning": value_id(POLITICS, me[POLITICS]),
        "faith": value_id(RELIGION, me[RELIGION]),
    });
    let bytes = super::layout_a::json(&about_me)?;
    zip.write_all(&bytes)?;
    mapped += bytes.len() as u64;

    // Friends: invented people with a few public attributes (places often, beliefs
    // rarely), half of them sharing the member's state.
    let mut rng = stream(cfg.seed, 1);
    let k = cardinalities();
    let friends: Vec<FriendRow> = (0..cfg.friends)
        .map(|f| {
            let first = FIRST_NAMES[rng.random_range(0..FIRST_NAMES.len())];
            let last = LAST_NAMES[rng.random_range(0..LAST_NAMES.len())];
            let mut value = |a: usize, share: f64| {
                rng.random_bool(share).then(|| {
                    let v = if rng.random_bool(0.5) {
                        me[a]
                    } else {
                        rng.random_range(0..k[a])
                    };
                    value_label(a, v)
                })
            };
            let public = Public {
                age_range: value(AGE, 0.15),
                lives_in: value(LOCATION, 0.35),
                leaning: value(POLITICS, 0.05),
                faith: value(RELIGION, 0.05),
            };
            FriendRow {
                name: format!("{first} {last}"),
                uid: format!("lw-f{f:06}"),
                since: rng.random_range(joined..now),
                public,
            }
        })
        .collect();
    mapped += json_list(
        &mut zip,
        "people/friends.json",
        "friends",
        friends.into_iter(),
    )?;

    let mut taken = HashSet::new();
    let mut listed = 0usize;
    let mut rng = stream(cfg.seed, 2);
    let per_file = cfg.likes_per_file.max(1);
    let mut written = 0usize;
    let mut file_no = 1;
    while written < cfg.likes {
        let n = per_file.min(cfg.likes - written);
        let chosen = choose(
            &mut rng,
            &maker,
            ItemKind::Like,
            n,
            cfg.table_items,
            &mut taken,
        );
        listed += chosen.iter().filter(|(j, _)| *j < cfg.table_items).count();
        let mut text_rng = stream(cfg.seed, 1000 + file_no);
        let rows = chosen.iter().map(|(_, it)| Page {
            title: &it.name,
            page_ref: &it.id,
            topic: it.category,
            at: text_rng.random_range(joined..now),
            audience: "friends",
            about: about(&mut text_rng, &it.name, cfg.about_bytes),
        });
        mapped += json_list(
            &mut zip,
            &format!("activity/liked/pages_{file_no:03}.json"),
            "pages",
            rows,
        )?;
        written += n;
        file_no += 1;
    }

    let chosen = choose(
        &mut rng,
        &maker,
        ItemKind::Group,
        cfg.groups,
        cfg.table_items,
        &mut taken,
    );
    listed += chosen.iter().filter(|(j, _)| *j < cfg.table_items).count();
    let mut text_rng = stream(cfg.seed, 3);
    let rows = chosen.iter().enumerate().map(|(n, (_, it))| GroupRow {
        // Every fifth name is in capitals, as some exports write them: matching by
        // name must fold case.
        group_name: if n % 5 == 0 {
            it.name.to_uppercase()
        } else {
            it.name.clone()
        },
        kind: it.category,
        since: rfc3339(text_rng.random_range(joined..now)),
        role: "member",
        about: about(&mut text_rng, &it.name, cfg.about_bytes),
    });
    mapped += json_list(&mut zip, "communities/memberships.json", "groups", rows)?;

    // Media padding: incompressible bytes (like photos), stored, never mapped.
    let media = cfg.media_mb << 20;
    let mut left = media;
    let mut photo = 1;
    let mut block = vec![0u8; 1 << 20];
    let mut media_rng = stream(cfg.seed, 4);
    while left > 0 {
        let size = left.min(8 << 20);
        zip.start_file(
            format!("media/photos/IMG_{photo:05}.jpg"),
            options(CompressionMethod::Stored)?,
        )
        .map_err(io::Error::other)?;
        let mut done = 0;
        while done < size {
            media_rng.fill_bytes(&mut block);
            let n = (size - done).min(block.len() as u64) as usize;
            zip.write_all(&block[..n])?;
            done += n as u64;
        }
        left -= size;
        photo += 1;
    }
    let mut inner = zip.finish().map_err(io::Error::other)?;
    inner.flush()?;
    Ok(LargeSummary {
        likes: cfg.likes,
        groups: cfg.groups,
        friends: cfg.friends,
        listed,
        mapped_bytes: mapped,
        media_bytes: media,
        profile: std::array::from_fn(|a| value_id(a, me[a])),
    })
}

/// Write the large reference table (`items` items × 4 attributes) as a priors file.
pub fn write_large_priors(seed: u64, items: u64, out: &Path) -> io::Result<()> {
    if let Some(parent) = out.parent() {
        std::fs::create_dir_all(parent)?;
    }
    let rates = base_rates();
    // Population and membership shares taken as the base rates (scaled to counts);
    // smoothing 4, one pseudo-member and temperature 0.5 are set, not fitted (common
    // practice, no source).
    let scaled: [Vec<f64>; 4] = std::array::from_fn(|a| rates[a].iter().map(|r| r * 1e6).collect());
    let attributes = attribute_specs(&scaled, &scaled, [(4.0, 1.0, 0.5); 4]);
    let header = PriorsFile {
        format: FORMAT,
        provenance: Provenance {
            source: "telltale synth priors-large: the fictional Lanternwick network".into(),
            licence: "CC0-1.0".into(),
            created: "2026-11-30".into(),
            method: format!(
                "{items} invented items with member counts drawn from each item's own pull toward one attribute value (seed {seed}); for benchmarks. Describes no real people."
            ),
            synthetic: true,
            contributors: None,
            privacy: None,
        },
        attributes,
        items: Vec::new(),
    };
    let ids: Vec<String> = header.attributes.iter().map(|a| a.id.clone()).collect();
    let maker = ItemMaker::new(seed);
    let specs = (0..items).map(|j| {
        let it = maker.item(j);
        let members = ids
            .iter()
            .zip(it.counts)
            .map(|(id, c)| (id.clone(), MemberSpec::Counts(c)))
            .collect();
        Ok(ItemSpec {
            id: Some(it.id),
            name: it.name,
            kind: Some(it.kind),
            aliases: Vec::new(),
            members,
        })
    });
    let mut w = BufWriter::with_capacity(1 << 20, File::create(out)?);
    write_priors_streaming(&header, specs, &mut w)?;
    w.flush()
}
