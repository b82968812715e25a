//! The archive as telltale sees it: a list of entries (path inside the archive and
//! declared size) and a bounded read of one entry at a time.

use std::io::Read;
use std::path::{Path, PathBuf};

use super::error::{Error, Result};
use super::{folder::Folder, zipped::Zipped};
use crate::limits::{LimitName, Limits, human_bytes};

/// One file inside an archive.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Entry {
    /// Path inside the archive, with `/` separators and no leading `./`.
    pub path: String,
    /// Decompressed size as the archive declares it (a zip may lie; reads are bounded
    /// by what is actually produced).
    pub size: u64,
    pub(crate) index: usize,
}

/// Tracks the bytes read so far by one import against the total limit.
#[derive(Debug, Clone)]
pub struct ReadBudget {
    limits: Limits,
    used: u64,
}

impl ReadBudget {
    pub fn new(limits: &Limits) -> Self {
        ReadBudget {
            limits: limits.clone(),
            used: 0,
        }
    }

    /// Bytes read so far.
    pub fn used(&self) -> u64 {
        self.used
    }

    pub fn limits(&self) -> &Limits {
        &self.limits
    }
}

/// An opened archive.
pub enum Archive {
    Zip(Zipped),
    Folder(Folder),
}

impl Archive {
    /// Open a zip file or a folder. Only the listing is read here.
    pub fn open(path: &Path, limits: &Limits) -> Result<Archive> {
        let meta = std::fs::metadata(path).map_err(|source| Error::Open {
            path: path.to_path_buf(),
            cause: source,
        })?;
        if meta.is_dir() {
            return Ok(Archive::Folder(Folder::open(path, limits)?));
        }
        if meta.is_file() {
            return Ok(Archive::Zip(Zipped::open(path, limits)?));
        }
        Err(Error::NotAnArchive {
            path: path.to_path_buf(),
        })
    }

    /// A zip archive held in memory; `name` stands for it in messages.
    pub fn zip_from_bytes(bytes: Vec<u8>, name: &Path, limits: &Limits) -> Result<Archive> {
        Ok(Archive::Zip(Zipped::from_bytes(bytes, name, limits)?))
    }

    /// Where the archive is on disk.
    pub fn path(&self) -> &Path {
        match self {
            Archive::Zip(z) => z.path(),
            Archive::Folder(f) => f.path(),
        }
    }

    pub fn is_zip(&self) -> bool {
        matches!(self, Archive::Zip(_))
    }

    /// Every file entry, in archive order.
    pub fn entries(&self) -> &[Entry] {
        match self {
            Archive::Zip(z) => z.entries(),
            Archive::Folder(f) => f.entries(),
        }
    }

    /// Entries left out while listing (symbolic links, unreadable folders), for the
    /// import summary.
    pub fn skipped(&self) -> &[String] {
        match self {
            Archive::Zip(_) => &[],
            Archive::Folder(f) => &f.skipped,
        }
    }

    /// Find an entry by its exact path inside the archive.
    pub fn entry(&self, path: &str) -> Option<&Entry> {
        self.entries().iter().find(|e| e.path == path)
    }

    /// Read one entry whole, within the per-entry and total limits.
    pub fn read(&mut self, entry: &Entry, budget: &mut ReadBudget) -> Result<Vec<u8>> {
        let cap = Self::check_declared(entry, budget)?;
        let bytes = match self {
            Archive::Zip(z) => z.read(entry, cap, budget.limits.compression_ratio)?,
            Archive::Folder(f) => f.read(entry, cap)?,
        };
        Self::settle(entry, budget, cap, bytes.len() as u64)?;
        Ok(bytes)
    }

    /// Read one entry in pieces of at most `piece` bytes (at least 1; [`CHUNK`] is the
    /// usual size), handing each to `sink` as
    /// it comes out, within the same limits as [`Archive::read`] (which fail the same
    /// way, possibly after some pieces were handed over). `sink` returns false to stop
    /// early; the result then counts only what was read. Returns the entry's size.
    pub fn stream(
        &mut self,
        entry: &Entry,
        budget: &mut ReadBudget,
        piece: usize,
        sink: &mut dyn FnMut(&[u8]) -> bool,
    ) -> Result<u64> {
        let cap = Self::check_declared(entry, budget)?;
        let ratio = budget.limits.compression_ratio;
        let n = match self {
            Archive::Zip(z) => z.stream(entry, cap, ratio, piece, sink)?,
            Archive::Folder(f) => f.stream(entry, cap, piece, sink)?,
        };
        Self::settle(entry, budget, cap, n)?;
        Ok(n)
    }

    /// Refuse an entry whose declared size is over a limit; otherwise the most bytes
    /// it may produce.
    fn check_declared(entry: &Entry, budget: &ReadBudget) -> Result<u64> {
        let per_entry = budget.limits.entry_bytes;
        let remaining = budget.limits.total_bytes.saturating_sub(budget.used);
        if entry.size > per_entry {
            return Err(limit_error(&entry.path, LimitName::EntryBytes, per_entry));
        }
        if entry.size > remaining {
            return Err(limit_error(
                &entry.path,
                LimitName::TotalBytes,
                budget.limits.total_bytes,
            ));
        }
        Ok(per_entry.min(remaining))
    }

    /// Refuse an entry that produced more than `cap` bytes; otherwise count them.
    fn settle(entry: &Entry, budget: &mut ReadBudget, cap: u64, produced: u64) -> Result<()> {
        if produced > cap {
            let name = if cap == budget.limits.entry_bytes {
                LimitName::EntryBytes
            } else {
                LimitName::TotalBytes
            };
            return Err(limit_error(&entry.path, name, budget.limits.get(name)));
        }
        budget.used += produced;
        Ok(())
    }

    /// A name for messages: the archive's file or folder name.
    pub fn display_name(&self) -> String {
        display_name(self.path())
    }
}

pub(crate) fn display_name(path: &Path) -> String {
    path.file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string())
}

pub(crate) fn limit_error(context: &str, name: LimitName, limit: u64) -> Error {
    let limit = match name {
        LimitName::EntryBytes | LimitName::TotalBytes | LimitName::LineBytes => human_bytes(limit),
        _ => limit.to_string(),
    };
    Error::Limit {
        context: context.to_string(),
        name,
        limit,
    }
}

/// The size of the pieces [`Archive::stream`] hands over.
pub const CHUNK: usize = 64 * 1024;

/// Read at most `cap + 1` bytes, so that the caller can tell "exactly at the cap" from
/// "over it" without reading an unbounded stream. With `inflate_limit`, stop with an
/// error as soon as more than that many bytes come out (a compression bomb is refused
/// after reading at most that much, whatever sizes its headers claim).
///
/// `size_hint` is the size the file or zip header declares: that much is reserved up
/// front (never more than the limits allow), so a large entry is read into one buffer
/// of its own size rather than one that doubled its way there.
pub(crate) fn read_capped(
    reader: impl Read,
    cap: u64,
    entry: &str,
    inflate_limit: Option<(u64, u64)>,
    size_hint: u64,
) -> Result<Vec<u8>> {
    let allowed = inflate_limit.map_or(cap, |(allowed, _)| allowed.min(cap));
    let reserve = usize::try_from(size_hint.min(allowed)).unwrap_or(0);
    let mut out = Vec::with_capacity(reserve);
    stream_capped(reader, cap, entry, inflate_limit, CHUNK, &mut |piece| {
        out.extend_from_slice(piece);
        true
    })?;
    Ok(out)
}

/// As [`read_capped`], handing the bytes to `sink` a piece at a time instead of
/// collecting them (`sink` returns false to stop). Returns how many bytes came out.
pub(crate) fn stream_capped(
    mut reader: impl Read,
    cap: u64,
    entry: &str,
    inflate_limit: Option<(u64, u64)>,
    piece: usize,
    sink: &mut dyn FnMut(&[u8]) -> bool,
) -> Result<u64> {
    let io = |e: std::io::Error| Error::Read {
        entry: entry.to_string(),
        detail: e.to_string(),
    };
    let mut chunk = vec![0u8; piece.max(1)];
    let stop = cap.saturating_add(1);
    let mut total = 0u64;
    while total < stop {
        let want = chunk.len().min((stop - total) as usize);
        let n = match reader.read(&mut chunk[..want]) {
            Ok(0) => break,
            Ok(n) => n,
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => continue,
            Err(e) => return Err(io(e)),
        };
        total += n as u64;
        if let Some((allowed, ratio)) = inflate_limit
            && total > allowed
        {
            return Err(limit_error(entry, LimitName::CompressionRatio, ratio));
        }
        if !sink(&chunk[..n]) {
            break;
        }
    }
    Ok(total)
}

pub(crate) fn to_path_buf(p: &Path) -> PathBuf {
    p.to_path_buf()
}
