//! Zip archives: the central directory is listed once; an entry is decompressed only
//! when a mapping asks for it, and never past the read limits.

use std::fs::File;
use std::io::{BufReader, Cursor, Read, Seek};
use std::path::{Path, PathBuf};

use zip::ZipArchive;
use zip::result::ZipError;

use super::error::{Error, Result};
use super::reader::{Entry, limit_error, read_capped, stream_capped, to_path_buf};
use crate::limits::{LimitName, Limits};

/// What a zip can be read from: a file, or bytes in memory.
pub trait ZipSource: Read + Seek + Send {}
impl<T: Read + Seek + Send> ZipSource for T {}

pub struct Zipped {
    path: PathBuf,
    zip: ZipArchive<Box<dyn ZipSource>>,
    entries: Vec<Entry>,
}

impl Zipped {
    pub fn open(path: &Path, limits: &Limits) -> Result<Zipped> {
        let file = File::open(path).map_err(|source| Error::Open {
            path: to_path_buf(path),
            cause: source,
        })?;
        Zipped::from_source(Box::new(BufReader::new(file)), path, limits)
    }

    /// A zip held in memory (`name` is used in messages).
    pub fn from_bytes(bytes: Vec<u8>, name: &Path, limits: &Limits) -> Result<Zipped> {
        Zipped::from_source(Box::new(Cursor::new(bytes)), name, limits)
    }

    fn from_source(source: Box<dyn ZipSource>, path: &Path, limits: &Limits) -> Result<Zipped> {
        let zip = ZipArchive::new(source).map_err(|e| match e {
            ZipError::Io(io) => Error::BadZip {
                path: to_path_buf(path),
                detail: io.to_string(),
            },
            ZipError::InvalidArchive(_) | ZipError::UnsupportedArchive(_) => {
                if looks_like_zip(path) {
                    Error::BadZip {
                        path: to_path_buf(path),
                        detail: e.to_string(),
                    }
                } else {
                    Error::NotAnArchive {
                        path: to_path_buf(path),
                    }
                }
            }
            other => Error::BadZip {
                path: to_path_buf(path),
                detail: other.to_string(),
            },
        })?;
        if zip.len() as u64 > limits.entries {
            return Err(limit_error(
                &path.display().to_string(),
                LimitName::Entries,
                limits.entries,
            ));
        }
        let mut entries = Vec::with_capacity(zip.len());
        for index in 0..zip.len() {
            let data = zip.by_index_data(index).map_err(|e| Error::BadZip {
                path: to_path_buf(path),
                detail: e.to_string(),
            })?;
            if data.is_dir() {
                continue;
            }
            let name = match data.name() {
                Ok(n) => n.into_owned(),
                Err(_) => String::from_utf8_lossy(data.name_raw()).into_owned(),
            };
            entries.push(Entry {
                path: clean_entry_path(&name),
                size: data.size(),
                index,
            });
        }
        Ok(Zipped {
            path: to_path_buf(path),
            zip,
            entries,
        })
    }

    pub fn path(&self) -> &Path {
        &self.path
    }

    pub fn entries(&self) -> &[Entry] {
        &self.entries
    }

    pub fn read(&mut self, entry: &Entry, cap: u64, ratio: u64) -> Result<Vec<u8>> {
        self.with_entry(entry, ratio, |file, allowed| {
            let declared = file.size();
            read_capped(file, cap, &entry.path, Some((allowed, ratio)), declared)
        })
    }

    /// As [`Zipped::read`], a piece at a time (see `Archive::stream`).
    pub fn stream(
        &mut self,
        entry: &Entry,
        cap: u64,
        ratio: u64,
        piece: usize,
        sink: &mut dyn FnMut(&[u8]) -> bool,
    ) -> Result<u64> {
        self.with_entry(entry, ratio, |file, allowed| {
            stream_capped(file, cap, &entry.path, Some((allowed, ratio)), piece, sink)
        })
    }

    /// Open an entry for reading (refusing encrypted entries and methods telltale does
    /// not read) and run `read` on it with the most bytes it may inflate to.
    fn with_entry<T>(
        &mut self,
        entry: &Entry,
        ratio: u64,
        read: impl FnOnce(zip::read::ZipFile<'_, Box<dyn ZipSource>>, u64) -> Result<T>,
    ) -> Result<T> {
        {
            let data = self
                .zip
                .by_index_data(entry.index)
                .map_err(|e| Error::Read {
                    entry: entry.path.clone(),
                    detail: e.to_string(),
                })?;
            if data.encrypted() {
                return Err(Error::Encrypted {
                    entry: entry.path.clone(),
                });
            }
            let method = data.compression();
            if !matches!(
                method,
                zip::CompressionMethod::Stored | zip::CompressionMethod::Deflated
            ) {
                #[allow(deprecated)] // the numeric code is what names the method
                let name = zip::CompressionMethod::name_from_u16(method.to_u16());
                return Err(Error::Unsupported {
                    entry: entry.path.clone(),
                    detail: name.to_string(),
                });
            }
        }
        let file = self.zip.by_index(entry.index).map_err(|e| match e {
            ZipError::UnsupportedArchive(msg) if msg.to_lowercase().contains("password") => {
                Error::Encrypted {
                    entry: entry.path.clone(),
                }
            }
            ZipError::UnsupportedArchive(msg) => Error::Unsupported {
                entry: entry.path.clone(),
                detail: msg.to_string(),
            },
            ZipError::CompressionMethodNotSupported(m) => Error::Unsupported {
                entry: entry.path.clone(),
                detail: format!("method {m}"),
            },
            other => Error::Read {
                entry: entry.path.clone(),
                detail: other.to_string(),
            },
        })?;
        // Small entries may compress very well by chance; only refuse past 1 MiB.
        let allowed = file.compressed_size().saturating_mul(ratio).max(1 << 20);
        read(file, allowed)
    }
}

/// Zip names use `/`; some hand-made zips use `\` or start with `./`.
fn clean_entry_path(name: &str) -> String {
    let name = name.replace('\\', "/");
    let name = name.trim_start_matches("./").trim_start_matches('/');
    name.to_string()
}

fn looks_like_zip(path: &Path) -> bool {
    use std::io::Read;
    let mut magic = [0u8; 4];
    File::open(path)
        .and_then(|mut f| f.read_exact(&mut magic))
        .map(|_| &magic == b"PK\x03\x04" || &magic == b"PK\x05\x06")
        .unwrap_or(false)
        || path
            .extension()
            .is_some_and(|e| e.eq_ignore_ascii_case("zip"))
}
