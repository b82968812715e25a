//! Bounds on what one import may read, so that a huge, broken or hostile archive gets
//! an error naming the limit instead of exhausting the machine. Every limit has a
//! default sized for real personal archives and can be raised by the user.

use std::fmt;
use std::str::FromStr;

/// Reading limits for one import.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Limits {
    /// Largest decompressed size of one mapped entry, in bytes.
    pub entry_bytes: u64,
    /// Largest decompressed size of all mapped entries together, in bytes.
    pub total_bytes: u64,
    /// Most entries an archive (zip or folder) may list.
    pub entries: u64,
    /// Deepest folder nesting walked inside an unpacked archive.
    pub folder_depth: u64,
    /// Most records one import keeps (all sources together).
    pub records: u64,
    /// Longest CSV or NDJSON line, in bytes.
    pub line_bytes: u64,
    /// Deepest JSON nesting accepted in a mapped file.
    pub json_depth: u64,
    /// Largest ratio of decompressed to compressed size for a zip entry (a
    /// compression bomb inflates thousands of times).
    pub compression_ratio: u64,
}

impl Default for Limits {
    fn default() -> Self {
        Limits {
            entry_bytes: 1 << 30,    // 1 GiB
            total_bytes: 4 << 30,    // 4 GiB
            entries: 2_000_000,      // photo-heavy archives list many files
            folder_depth: 64,        // common practice, no source
            records: 20_000_000,     // far above any personal archive
            line_bytes: 16 << 20,    // 16 MiB
            json_depth: 128,         // serde_json's own recursion bound
            compression_ratio: 1000, // common practice, no source: text compresses ~5–50×
        }
    }
}

/// One named limit, for messages and for `--limit NAME=VALUE`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LimitName {
    EntryBytes,
    TotalBytes,
    Entries,
    FolderDepth,
    Records,
    LineBytes,
    JsonDepth,
    CompressionRatio,
}

impl LimitName {
    pub const ALL: [LimitName; 8] = [
        LimitName::EntryBytes,
        LimitName::TotalBytes,
        LimitName::Entries,
        LimitName::FolderDepth,
        LimitName::Records,
        LimitName::LineBytes,
        LimitName::JsonDepth,
        LimitName::CompressionRatio,
    ];

    pub fn key(self) -> &'static str {
        match self {
            LimitName::EntryBytes => "entry-bytes",
            LimitName::TotalBytes => "total-bytes",
            LimitName::Entries => "entries",
            LimitName::FolderDepth => "folder-depth",
            LimitName::Records => "records",
            LimitName::LineBytes => "line-bytes",
            LimitName::JsonDepth => "json-depth",
            LimitName::CompressionRatio => "compression-ratio",
        }
    }

    pub fn describe(self) -> &'static str {
        match self {
            LimitName::EntryBytes => "decompressed size of one mapped entry",
            LimitName::TotalBytes => "decompressed size of all mapped entries",
            LimitName::Entries => "number of entries in the archive",
            LimitName::FolderDepth => "folder nesting depth",
            LimitName::Records => "number of records",
            LimitName::LineBytes => "length of one line",
            LimitName::JsonDepth => "JSON nesting depth",
            LimitName::CompressionRatio => "compression ratio of a zip entry",
        }
    }
}

impl fmt::Display for LimitName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.key())
    }
}

impl Limits {
    pub fn get(&self, name: LimitName) -> u64 {
        match name {
            LimitName::EntryBytes => self.entry_bytes,
            LimitName::TotalBytes => self.total_bytes,
            LimitName::Entries => self.entries,
            LimitName::FolderDepth => self.folder_depth,
            LimitName::Records => self.records,
            LimitName::LineBytes => self.line_bytes,
            LimitName::JsonDepth => self.json_depth,
            LimitName::CompressionRatio => self.compression_ratio,
        }
    }

    pub fn set(&mut self, name: LimitName, value: u64) {
        match name {
            LimitName::EntryBytes => self.entry_bytes = value,
            LimitName::TotalBytes => self.total_bytes = value,
            LimitName::Entries => self.entries = value,
            LimitName::FolderDepth => self.folder_depth = value,
            LimitName::Records => self.records = value,
            LimitName::LineBytes => self.line_bytes = value,
            LimitName::JsonDepth => self.json_depth = value,
            LimitName::CompressionRatio => self.compression_ratio = value,
        }
    }

    /// Apply one `NAME=VALUE` setting; sizes accept K, M and G suffixes (powers of 1024).
    pub fn apply(&mut self, setting: &str) -> Result<(), String> {
        let (name, value) = setting
            .split_once('=')
            .ok_or_else(|| format!("expected NAME=VALUE, got '{setting}'"))?;
        let name = LimitName::from_str(name.trim())?;
        let value = parse_size(value.trim())?;
        self.set(name, value);
        Ok(())
    }
}

impl FromStr for LimitName {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        LimitName::ALL
            .into_iter()
            .find(|n| n.key() == s)
            .ok_or_else(|| {
                let names: Vec<&str> = LimitName::ALL.iter().map(|n| n.key()).collect();
                format!("unknown limit '{s}'; the limits are {}", names.join(", "))
            })
    }
}

/// Parse "123", "64K", "512M", "4G" (powers of 1024).
pub fn parse_size(s: &str) -> Result<u64, String> {
    let (digits, mult) = match s.chars().last() {
        Some('K' | 'k') => (&s[..s.len() - 1], 1u64 << 10),
        Some('M' | 'm') => (&s[..s.len() - 1], 1 << 20),
        Some('G' | 'g') => (&s[..s.len() - 1], 1 << 30),
        _ => (s, 1),
    };
    let n: u64 = digits
        .trim()
        .parse()
        .map_err(|_| format!("'{s}' is not a whole number (K, M, G suffixes allowed)"))?;
    n.checked_mul(mult)
        .ok_or_else(|| format!("'{s}' is too large"))
}

/// Human form of a byte count: "1.0 GiB", "512 KiB", "17 bytes".
pub fn human_bytes(n: u64) -> String {
    const UNITS: [(&str, u64); 3] = [("GiB", 1 << 30), ("MiB", 1 << 20), ("KiB", 1 << 10)];
    for (unit, size) in UNITS {
        if n >= size {
            return format!("{:.1} {unit}", n as f64 / size as f64);
        }
    }
    format!("{n} bytes")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn settings_parse_with_suffixes() {
        let mut l = Limits::default();
        l.apply("entry-bytes=64M").unwrap();
        assert_eq!(l.entry_bytes, 64 << 20);
        l.apply("records = 10").unwrap();
        assert_eq!(l.records, 10);
        assert!(l.apply("bogus=1").unwrap_err().contains("entry-bytes"));
        assert!(l.apply("entries").is_err());
        assert!(l.apply("entries=lots").is_err());
    }

    #[test]
    fn human_sizes() {
        assert_eq!(human_bytes(17), "17 bytes");
        assert_eq!(human_bytes(1 << 30), "1.0 GiB");
        assert_eq!(human_bytes(1536), "1.5 KiB");
    }
}
