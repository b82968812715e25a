//! The binary cache of checked priors, so a large priors file is parsed once: after a
//! JSON load of a file of at least [`MIN_CACHED_BYTES`] or [`MIN_CACHED_ITEMS`] items,
//! the checked attributes, item columns, warnings and match index are written to
//! `<cache folder>/priors/<BLAKE3 of the JSON>.bin` (owner-only, through a temporary
//! file and a rename). Every later load reads and hashes the JSON file, and uses a
//! cache only when its name and header carry that same hash. The cache holds nothing
//! the priors file does not: derived reference statistics, never archive data.
//!
//! Nothing in a cache is trusted: the magic, [`CACHE_VERSION`], the JSON hash, a
//! BLAKE3 checksum of the whole payload (so a flipped or lost byte is caught), every
//! length, offset and span (in bounds, in order, on UTF-8 character boundaries), every
//! count coding and its byte length, raw counts (finite, not below 0), the index
//! (sorted, every entry pointing at an item or alias that exists) are checked before
//! use, so no cache can make telltale read out of bounds or panic. Any problem means the JSON is read instead, with a note; a cache
//! that cannot be written is also only a note.

use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

use super::bin::{Reader, Stream, Writer};
use super::check::MAX_COUNT;
use super::error::{Error, Result};
use super::index::{Index, Keyed};
use super::model::Priors;
use super::store::{HAS_ID, Items, KIND_MASK, TAG_F64, width};
use crate::footprint::ItemKind;
use crate::limits::Limits;

/// Bumped whenever the layout below changes; a cache of another version is refused.
pub const CACHE_VERSION: u32 = 3;

/// Environment variable naming telltale's cache folder (the priors caches go in its
/// `priors/` folder). Empty or unset: the platform's cache folder.
pub const CACHE_DIR_ENV: &str = "TELLTALE_CACHE_DIR";

/// Priors files at least this big are cached (8 MiB; the bundled demo priors are
/// about 0.5 MB). Below it a JSON load takes well under a tenth of a second.
pub const MIN_CACHED_BYTES: usize = 8 << 20;

/// …or with at least this many reference items.
pub const MIN_CACHED_ITEMS: usize = 20_000;

const MAGIC: &[u8; 8] = b"TTPRIORC";
pub(crate) const HEADER_LEN: usize = 8 + 4 + 32 + 8 + 32;

static DISABLED: AtomicBool = AtomicBool::new(false);

/// Turn the cache off for this process (`--no-cache`): nothing is read or written.
pub fn disable_cache() {
    DISABLED.store(true, Ordering::Relaxed);
}

/// The folder priors caches go in, unless caching is off: `$TELLTALE_CACHE_DIR/priors`
/// when set, else the platform's cache folder for telltale (e.g.
/// `~/.cache/telltale/priors` on Linux).
pub fn cache_dir() -> Option<PathBuf> {
    if DISABLED.load(Ordering::Relaxed) {
        return None;
    }
    let base = match std::env::var_os(CACHE_DIR_ENV).filter(|v| !v.is_empty()) {
        Some(dir) => PathBuf::from(dir),
        None => directories::ProjectDirs::from("", "", "telltale")?
            .cache_dir()
            .to_path_buf(),
    };
    Some(base.join("priors"))
}

/// Where the cache of a JSON text with this hash lives.
pub fn cache_path(dir: &Path, hash: &blake3::Hash) -> PathBuf {
    dir.join(format!("{}.bin", hash.to_hex()))
}

impl Priors {
    /// Load a priors file, through the cache in `cache` when given (see the module
    /// notes), within the default reading limits; `Priors::cache_notes` says what
    /// happened.
    pub fn load_cached(path: &Path, cache: Option<&Path>) -> Result<Priors> {
        Priors::load_cached_within(path, cache, &Limits::default())
    }

    /// [`Priors::load_cached`] within `limits`: a file over the size limit is refused
    /// before it is hashed, and a cache whose contents break a limit is not used (the
    /// JSON is read instead, and says which limit).
    pub fn load_cached_within(
        path: &Path,
        cache: Option<&Path>,
        limits: &Limits,
    ) -> Result<Priors> {
        let Some(dir) = cache else {
            return Priors::load_within(path, limits);
        };
        let origin = path.display().to_string();
        let read_err = |source| Error::Read {
            file: origin.clone(),
            cause: source,
        };
        let len = std::fs::metadata(path).map_err(read_err)?.len();
        if len > limits.priors_bytes {
            return Err(super::model::too_big(&origin, len, limits));
        }
        let mut notes = Vec::new();
        let hash = hash_file(path).map_err(read_err)?;
        let cached = cache_path(dir, &hash);
        match open_cache(&cached) {
            Ok((file, len)) => match decode_from(file, len, &hash, &origin)
                .and_then(|p| within(&p, limits).map(|()| p))
            {
                Ok(mut priors) => {
                    priors
                        .cache_notes
                        .push(format!("read from the cache {}", cached.display()));
                    return Ok(priors);
                }
                Err(why) => notes.push(format!(
                    "the cache {} of {origin} was not used ({why}); read {origin} itself instead",
                    cached.display()
                )),
            },
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {}
            Err(e) => notes.push(format!("cannot read the cache {}: {e}", cached.display())),
        }
        let text = super::model::read_within(path, &origin, limits)?;
        let mut priors = Priors::parse_within(&text, &origin, limits)?;
        if text.len() >= MIN_CACHED_BYTES || priors.len_items() >= MIN_CACHED_ITEMS {
            // The key is the hash of the text actually parsed (the file may have
            // changed since it was hashed above).
            let hash = blake3::Hasher::new()
                .update_rayon(text.as_bytes())
                .finalize();
            drop(text);
            let target = cache_path(dir, &hash);
            match write(&priors, &hash, dir, &target) {
                Ok(()) => notes.push(format!("wrote the cache {}", target.display())),
                Err(e) => notes.push(format!("cannot write the cache {}: {e}", target.display())),
            }
        }
        priors.cache_notes = notes;
        Ok(priors)
    }
}

/// True for a cache note that reports a problem (a cache refused, unreadable or not
/// written), which a person should see even when telltale's output goes to a script;
/// the others say only that a cache was read or written.
pub fn is_cache_problem(note: &str) -> bool {
    !(note.starts_with("read from the cache") || note.starts_with("wrote the cache"))
}

/// A cache that reads and checks is still not used when its contents break one of
/// this run's reading limits (it may have been made with raised ones): the JSON is
/// read instead and names the limit.
fn within(p: &Priors, limits: &Limits) -> std::result::Result<(), &'static str> {
    let s = &p.store;
    let name_max = limits.name_bytes as usize;
    let too_long = |t: &str| t.len() > name_max;
    let over = p.attributes.len() as u64 > limits.attributes
        || p.attributes.iter().any(|a| {
            a.values.len() as u64 > limits.values
                || too_long(&a.id)
                || too_long(&a.label)
                || a.values
                    .iter()
                    .any(|v| too_long(&v.id) || too_long(&v.label))
        })
        || s.len() as u64 > limits.priors_items
        || s.spans
            .windows(2)
            .any(|w| (w[1] - w[0]) as usize > name_max);
    if over {
        Err("over one of this run's reading limits")
    } else {
        Ok(())
    }
}

/// A cache file, buffered for its few small fields (the columns are read past the
/// buffer, straight into their own), and its length.
fn open_cache(path: &Path) -> std::io::Result<(std::io::BufReader<std::fs::File>, u64)> {
    let file = std::fs::File::open(path)?;
    let len = file.metadata()?.len();
    Ok((std::io::BufReader::with_capacity(64 << 10, file), len))
}

/// The step [`hash_file`] reads and hashes in: large, because every call over all cores
/// wakes the other threads.
pub(crate) const HASH_STEP: usize = 16 << 20;

/// BLAKE3 of a file, read in [`HASH_STEP`] steps, each hashed over all cores (BLAKE3's
/// tree mode: the same hash as hashing it in one go on one core). The file is never
/// held whole.
pub fn hash_file(path: &Path) -> std::io::Result<blake3::Hash> {
    let mut f = std::fs::File::open(path)?;
    let mut hasher = blake3::Hasher::new();
    let mut buf = vec![0u8; HASH_STEP];
    loop {
        // Fill the buffer (a read may return less), so every step but the last is whole.
        let mut got = 0;
        while got < buf.len() {
            match f.read(&mut buf[got..]) {
                Ok(0) => break,
                Ok(n) => got += n,
                Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
                Err(e) => return Err(e),
            }
        }
        hasher.update_rayon(&buf[..got]);
        if got < buf.len() {
            return Ok(hasher.finalize());
        }
    }
}

fn write(priors: &Priors, hash: &blake3::Hash, dir: &Path, target: &Path) -> std::io::Result<()> {
    let mut builder = std::fs::DirBuilder::new();
    builder.recursive(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::DirBuilderExt;
        builder.mode(0o700);
    }
    builder.create(dir)?;
    let bytes = encode(priors, hash);
    crate::safe_write::write_atomic(target, |w| w.write_all(&bytes))
}

/// The cache bytes of `priors` read from a JSON text with hash `json_hash`.
///
/// Layout: the header (magic, [`CACHE_VERSION`], the JSON hash, the payload length,
/// the BLAKE3 checksum of the payload), then the payload: the length-prefixed head
/// (provenance, attributes, warnings) and the item and index columns, each a count
/// and its little-endian values. The counts' item offsets are not stored: the check
/// of every entry's coding rebuilds them.
pub(crate) fn encode(priors: &Priors, json_hash: &blake3::Hash) -> Vec<u8> {
    let mut head = Writer::default();
    head.provenance(&priors.provenance);
    head.u64(priors.attributes.len() as u64);
    priors.attributes.iter().for_each(|a| head.attribute(a));
    head.u64(priors.warnings.len() as u64);
    priors.warnings.iter().for_each(|s| head.str(s));
    let mut w = Writer::default();
    w.bytes(&head.buf);
    let s = &priors.store;
    w.bytes(s.text.as_bytes());
    w.u32s(&s.spans);
    w.bytes(&s.flags);
    w.u32s(&s.entry_start);
    w.u16s(&s.entry_attr);
    w.bytes(&s.entry_tag);
    w.bytes(&s.counts);
    w.f64s(&s.support);
    let x = &priors.index;
    for k in [&x.ids, &x.names, &x.aliases] {
        w.u64s(&k.hash);
        w.u32s(&k.at);
    }
    w.bytes(x.alias_text.as_bytes());
    w.u32s(&x.alias_spans);
    w.u32s(&x.alias_item);
    let payload = w.buf;
    let mut out = Vec::with_capacity(HEADER_LEN + payload.len());
    out.extend_from_slice(MAGIC);
    out.extend_from_slice(&CACHE_VERSION.to_le_bytes());
    out.extend_from_slice(json_hash.as_bytes());
    out.extend_from_slice(&(payload.len() as u64).to_le_bytes());
    out.extend_from_slice(
        blake3::Hasher::new()
            .update_rayon(&payload)
            .finalize()
            .as_bytes(),
    );
    out.extend_from_slice(&payload);
    out
}

/// Read and check cache bytes; the reason when they cannot be used.
#[cfg(test)]
pub(crate) fn decode(
    bytes: &[u8],
    json_hash: &blake3::Hash,
    origin: &str,
) -> std::result::Result<Priors, &'static str> {
    decode_from(bytes, bytes.len() as u64, json_hash, origin)
}

/// Read and check a cache of `len` bytes from `from`, section by section into the
/// buffers that are kept; the reason when it cannot be used.
pub(crate) fn decode_from(
    mut from: impl Read,
    len: u64,
    json_hash: &blake3::Hash,
    origin: &str,
) -> std::result::Result<Priors, &'static str> {
    let mut header = [0u8; HEADER_LEN];
    if from.read_exact(&mut header).is_err() || &header[..8] != MAGIC {
        return Err("not a telltale priors cache");
    }
    if header[8..12] != CACHE_VERSION.to_le_bytes() {
        return Err("made by another version of telltale");
    }
    if &header[12..44] != json_hash.as_bytes() {
        return Err("made from another priors file");
    }
    let payload_len = u64::from_le_bytes(header[44..52].try_into().unwrap_or([0xff; 8]));
    if len.checked_sub(HEADER_LEN as u64) != Some(payload_len) {
        return Err("cut short or padded");
    }
    let mut stream = Stream::new(from, payload_len);
    let read = read_payload(&mut stream, origin);
    // What could not be read is still hashed, so a damaged cache is told from an
    // inconsistent one.
    let complete = read.is_some() && stream.at_end();
    match stream.finish() {
        None => return Err("cut short or padded"),
        Some(sum) if sum.as_bytes() != &header[52..84] => {
            return Err("damaged: its checksum does not match");
        }
        Some(_) => {}
    }
    let priors = read
        .filter(|_| complete)
        .ok_or("its contents are inconsistent")?;
    Ok(priors)
}

fn read_payload<R: Read>(r: &mut Stream<R>, origin: &str) -> Option<Priors> {
    let head = r.array::<u8>()?;
    let mut h = Reader::new(&head);
    let provenance = h.provenance()?;
    let n_attr = usize::try_from(h.u64()?).ok()?;
    if n_attr == 0 || n_attr > head.len() / 64 || n_attr > u16::MAX as usize + 1 {
        return None;
    }
    let attributes = (0..n_attr)
        .map(|_| h.attribute())
        .collect::<Option<Vec<_>>>()?;
    if !attributes_ok(&attributes) {
        return None;
    }
    let n_warn = usize::try_from(h.u64()?).ok()?;
    if n_warn > head.len() / 8 {
        return None;
    }
    let warnings = (0..n_warn)
        .map(|_| h.string())
        .collect::<Option<Vec<_>>>()?;
    if !h.at_end() {
        return None;
    }
    let mut store = Items {
        text: r.string()?,
        spans: r.array()?,
        flags: r.array()?,
        entry_start: r.array()?,
        entry_attr: r.array()?,
        entry_tag: r.array()?,
        counts_start: Vec::new(),
        counts: r.array()?,
        support: r.array()?,
        value_counts: attributes.iter().map(|a| a.values.len() as u32).collect(),
    };
    let mut keyed = || -> Option<Keyed> {
        Some(Keyed {
            hash: r.array()?,
            at: r.array()?,
        })
    };
    let (ids, names, aliases) = (keyed()?, keyed()?, keyed()?);
    let index = Index {
        ids,
        names,
        aliases,
        alias_text: r.string()?,
        alias_spans: r.array()?,
        alias_item: r.array()?,
    };
    if !r.at_end() || !items_ok(&mut store) || !index_ok(&index, store.len()) {
        return None;
    }
    Some(Priors {
        provenance,
        attributes,
        warnings,
        origin: origin.to_string(),
        cache_notes: Vec::new(),
        rarity: crate::alert::Rarity::default(),
        store,
        index,
        file_attributes: None,
    })
}

/// The attributes are what the JSON checks leave: ids and value ids each used once,
/// base and member rates above 0 summing to 1 (and the logs of the base rates beside
/// them), a threshold above 0 and at most 1, smoothing and pseudocount 0 or more and
/// not both 0, a temperature above 0 and finite logistic weights. A cache whose
/// checksum matches but whose numbers are absurd (edited, or written by a broken
/// build) is refused like a damaged one.
fn attributes_ok(attributes: &[super::model::Attribute]) -> bool {
    let sums_to_one = |v: &[f64]| {
        v.iter().all(|x| x.is_finite() && *x > 0.0) && (v.iter().sum::<f64>() - 1.0).abs() < 1e-6
    };
    let mut ids = std::collections::HashSet::new();
    attributes.iter().all(|a| {
        let mut values = std::collections::HashSet::new();
        let weights_ok = match &a.calibration {
            super::file::Calibration::Temperature { lambda } => lambda.is_finite() && *lambda > 0.0,
            super::file::Calibration::Logistic {
                lambda,
                intercept,
                log_odds,
                log_base_rate,
                evidence_spread,
            } => {
                lambda.is_finite()
                    && *lambda > 0.0
                    && [intercept, log_odds, log_base_rate, evidence_spread]
                        .iter()
                        .all(|w| w.is_finite())
            }
        };
        ids.insert(a.id.as_str())
            && a.values.iter().all(|v| values.insert(v.id.as_str()))
            && sums_to_one(&a.base_rates)
            && sums_to_one(&a.member_rates)
            && a.base_rates
                .iter()
                .zip(&a.log_base)
                .all(|(p, l)| (p.ln() - l).abs() <= 1e-9 * (1.0 + l.abs()))
            && a.threshold > 0.0
            && a.threshold <= 1.0
            && a.smoothing.is_finite()
            && a.smoothing >= 0.0
            && a.pseudocount.is_finite()
            && a.pseudocount >= 0.0
            && a.smoothing + a.pseudocount > 0.0
            && weights_ok
    })
}

/// Offsets start at 0, never go down, end at `len`, and (for text) fall on character
/// boundaries.
fn spans_ok(spans: &[u32], len: usize, text: Option<&str>) -> bool {
    spans.first() == Some(&0)
        && spans.last().is_some_and(|&e| e as usize == len)
        && spans.windows(2).all(|w| w[0] <= w[1])
        && text.is_none_or(|t| spans.iter().all(|&s| t.is_char_boundary(s as usize)))
}

/// Check the item columns and rebuild `counts_start` (every entry's coding and byte
/// length, in order, must account for the count bytes exactly).
fn items_ok(s: &mut Items) -> bool {
    let n = s.flags.len();
    let n_attr = s.value_counts.len();
    let kinds = ItemKind::ALL.len() as u8;
    if s.spans.len() != 2 * n + 1
        || !spans_ok(&s.spans, s.text.len(), Some(&s.text))
        || s.flags
            .iter()
            .any(|&f| f & !(HAS_ID | KIND_MASK) != 0 || f & KIND_MASK > kinds)
        || s.entry_start.len() != n + 1
        || !spans_ok(&s.entry_start, s.entry_attr.len(), None)
        || s.entry_tag.len() != s.entry_attr.len()
        || s.support.len() != n
    {
        return false;
    }
    let mut counts_start = Vec::with_capacity(n + 1);
    counts_start.push(0u64);
    let mut at = 0u64;
    for i in 0..n {
        let mut last = None;
        for e in s.entry_start[i] as usize..s.entry_start[i + 1] as usize {
            let a = s.entry_attr[e] as usize;
            if a >= n_attr || last.is_some_and(|l| l >= a) || width(s.entry_tag[e]) == 0 {
                return false;
            }
            last = Some(a);
            let len = s.entry_bytes(e);
            let Some(end) = at
                .checked_add(len as u64)
                .filter(|&e| e <= s.counts.len() as u64)
            else {
                return false;
            };
            // Raw counts are what the checks leave: finite, not below 0, not over
            // MAX_COUNT.
            if s.entry_tag[e] == TAG_F64
                && !s.counts[at as usize..end as usize]
                    .chunks_exact(8)
                    .all(|c| {
                        let v =
                            f64::from_le_bytes([c[0], c[1], c[2], c[3], c[4], c[5], c[6], c[7]]);
                        v.is_finite() && (0.0..=MAX_COUNT).contains(&v)
                    })
            {
                return false;
            }
            at = end;
        }
        if !(s.support[i].is_finite() && s.support[i] >= 0.0) {
            return false;
        }
        counts_start.push(at);
    }
    if at != s.counts.len() as u64 {
        return false;
    }
    s.counts_start = counts_start;
    true
}

fn index_ok(x: &Index, n: usize) -> bool {
    let m = x.alias_item.len();
    [&x.ids, &x.names, &x.aliases].iter().all(|k| k.is_sorted())
        && x.ids.at.iter().all(|&i| (i as usize) < n)
        && x.names.at.iter().all(|&i| (i as usize) < n)
        && x.aliases.at.iter().all(|&a| (a as usize) < m)
        && x.alias_item.iter().all(|&i| (i as usize) < n)
        && x.alias_spans.len() == m + 1
        && spans_ok(&x.alias_spans, x.alias_text.len(), Some(&x.alias_text))
}
