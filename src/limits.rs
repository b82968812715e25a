//! Bounds on what one import may read, so that a huge, broken or hostile archive,
//! priors file, friends file or mapping gets an error or a warning naming the file and
//! the limit instead of exhausting the machine. Every limit has a default sized for
//! real personal archives and real reference tables, and can be raised by the user.

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
    /// Largest priors file, in bytes.
    pub priors_bytes: u64,
    /// Most reference items one priors file may list.
    pub priors_items: u64,
    /// Most attributes one priors file may list (and member entries one item may have).
    pub attributes: u64,
    /// Most values one attribute may have (and counts one member list may hold).
    pub values: u64,
    /// Most aliases one reference item may have.
    pub aliases: u64,
    /// Longest name, id, alias, label or provenance text in a priors file, and longest
    /// field in a friends file, in bytes.
    pub name_bytes: u64,
    /// Largest friends file (`--friends`), in bytes.
    pub friends_bytes: u64,
    /// Most rows a friends file may have.
    pub friends_rows: u64,
    /// Largest mapping file, in bytes.
    pub mapping_bytes: u64,
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
            // The limits below are common practice, no source: each sits well above what
            // a real file needs (the one-million-item benchmark priors file is 301 MB; a
            // country's first-level regions number under 100) and well below what would
            // exhaust a laptop.
            priors_bytes: 512 << 20, // 512 MiB
            priors_items: 5_000_000,
            attributes: 256,
            values: 10_000,
            aliases: 1_000,
            name_bytes: 4 << 10, // 4 KiB: far past any page or group title
            friends_bytes: 64 << 20,
            friends_rows: 1_000_000,
            mapping_bytes: 4 << 20, // a mapping with 2,000 sources is about 150 KB
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
    PriorsBytes,
    PriorsItems,
    Attributes,
    Values,
    Aliases,
    NameBytes,
    FriendsBytes,
    FriendsRows,
    MappingBytes,
}

impl LimitName {
    pub const ALL: [LimitName; 17] = [
        LimitName::EntryBytes,
        LimitName::TotalBytes,
        LimitName::Entries,
        LimitName::FolderDepth,
        LimitName::Records,
        LimitName::LineBytes,
        LimitName::JsonDepth,
        LimitName::CompressionRatio,
        LimitName::PriorsBytes,
        LimitName::PriorsItems,
        LimitName::Attributes,
        LimitName::Values,
        LimitName::Aliases,
        LimitName::NameBytes,
        LimitName::FriendsBytes,
        LimitName::FriendsRows,
        LimitName::MappingBytes,
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
            LimitName::PriorsBytes => "priors-bytes",
            LimitName::PriorsItems => "priors-items",
            LimitName::Attributes => "attributes",
            LimitName::Values => "values",
            LimitName::Aliases => "aliases",
            LimitName::NameBytes => "name-bytes",
            LimitName::FriendsBytes => "friends-bytes",
            LimitName::FriendsRows => "friends-rows",
            LimitName::MappingBytes => "mapping-bytes",
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
            LimitName::PriorsBytes => "size of a priors file",
            LimitName::PriorsItems => "number of reference items in a priors file",
            LimitName::Attributes => "number of attributes",
            LimitName::Values => "number of values of one attribute",
            LimitName::Aliases => "number of aliases of one item",
            LimitName::NameBytes => "length of one name, id, label or field",
            LimitName::FriendsBytes => "size of a friends file",
            LimitName::FriendsRows => "number of rows in a friends file",
            LimitName::MappingBytes => "size of a mapping file",
        }
    }

    /// True for limits on a number of bytes.
    pub fn is_bytes(self) -> bool {
        matches!(
            self,
            LimitName::EntryBytes
                | LimitName::TotalBytes
                | LimitName::LineBytes
                | LimitName::PriorsBytes
                | LimitName::NameBytes
                | LimitName::FriendsBytes
                | LimitName::MappingBytes
        )
    }

    /// A value of this limit in words: "4.0 KiB" for sizes, "10,000" for counts.
    pub fn show(self, value: u64) -> String {
        if self.is_bytes() {
            human_bytes(value)
        } else {
            thousands(value)
        }
    }

    /// The hint that ends every message about this limit.
    pub fn raise_hint(self) -> String {
        let what = if self.is_bytes() { "SIZE" } else { "N" };
        format!(
            "raise it with --limit {}={what} if you trust the file",
            self.key()
        )
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
            LimitName::PriorsBytes => self.priors_bytes,
            LimitName::PriorsItems => self.priors_items,
            LimitName::Attributes => self.attributes,
            LimitName::Values => self.values,
            LimitName::Aliases => self.aliases,
            LimitName::NameBytes => self.name_bytes,
            LimitName::FriendsBytes => self.friends_bytes,
            LimitName::FriendsRows => self.friends_rows,
            LimitName::MappingBytes => self.mapping_bytes,
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
            LimitName::PriorsBytes => self.priors_bytes = value,
            LimitName::PriorsItems => self.priors_items = value,
            LimitName::Attributes => self.attributes = value,
            LimitName::Values => self.values = value,
            LimitName::Aliases => self.aliases = value,
            LimitName::NameBytes => self.name_bytes = value,
            LimitName::FriendsBytes => self.friends_bytes = value,
            LimitName::FriendsRows => self.friends_rows = value,
            LimitName::MappingBytes => self.mapping_bytes = value,
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

/// A whole number with thousands separators: "52,428,800".
pub fn thousands(n: u64) -> String {
    let digits = n.to_string();
    let mut out = String::with_capacity(digits.len() + digits.len() / 3);
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
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
        assert_eq!(thousands(52_428_800), "52,428,800");
        assert_eq!(thousands(999), "999");
        assert_eq!(thousands(1000), "1,000");
        assert_eq!(LimitName::NameBytes.show(4096), "4.0 KiB");
        assert_eq!(LimitName::Values.show(10_000), "10,000");
    }

    #[test]
    fn every_limit_has_a_key_a_value_and_a_setter() {
        let mut l = Limits::default();
        for name in LimitName::ALL {
            assert_eq!(LimitName::from_str(name.key()), Ok(name));
            l.set(name, 7);
            assert_eq!(l.get(name), 7, "{name}");
        }
    }
}
