//! Where generated archives go: a folder, or a zip file written deterministically
//! (fixed timestamps and permissions, so the same seed gives the same bytes).

use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};

use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, DateTime, ZipWriter};

/// Receives the files of one archive.
pub trait ArchiveSink {
    fn file(&mut self, path: &str, bytes: &[u8]) -> io::Result<()>;
    fn finish(self: Box<Self>) -> io::Result<()>;
}

/// Writes files under a folder (replacing the folder's previous content).
pub struct FolderSink {
    root: PathBuf,
}

impl FolderSink {
    pub fn create(root: &Path) -> io::Result<FolderSink> {
        if root.exists() {
            fs::remove_dir_all(root)?;
        }
        fs::create_dir_all(root)?;
        Ok(FolderSink {
            root: root.to_path_buf(),
        })
    }
}

impl ArchiveSink for FolderSink {
    fn file(&mut self, path: &str, bytes: &[u8]) -> io::Result<()> {
        let full = self.root.join(path);
        if let Some(parent) = full.parent() {
            fs::create_dir_all(parent)?;
        }
        fs::write(full, bytes)
    }

    fn finish(self: Box<Self>) -> io::Result<()> {
        Ok(())
    }
}

/// Writes a zip file.
pub struct ZipSink {
    zip: ZipWriter<io::BufWriter<fs::File>>,
    options: SimpleFileOptions,
}

impl ZipSink {
    pub fn create(path: &Path, compression: CompressionMethod) -> io::Result<ZipSink> {
        if let Some(parent) = path.parent() {
            fs::create_dir_all(parent)?;
        }
        let file = fs::File::create(path)?;
        let stamp =
            DateTime::from_date_and_time(2026, 11, 30, 0, 0, 0).map_err(io::Error::other)?;
        Ok(ZipSink {
            zip: ZipWriter::new(io::BufWriter::new(file)),
            options: SimpleFileOptions::default()
                .compression_method(compression)
                .last_modified_time(stamp)
                .unix_permissions(0o644),
        })
    }
}

impl ArchiveSink for ZipSink {
    fn file(&mut self, path: &str, bytes: &[u8]) -> io::Result<()> {
        self.zip
            .start_file(path, self.options)
            .map_err(io::Error::other)?;
        self.zip.write_all(bytes)
    }

    fn finish(self: Box<Self>) -> io::Result<()> {
        let mut inner = self.zip.finish().map_err(io::Error::other)?;
        inner.flush()
    }
}
