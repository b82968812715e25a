//! The JSON document (format 1). [`write_json`] writes a report built with all its
//! rows; [`write_json_streamed`] writes the same bytes from a report built without
//! rows plus a [`Rows`] that makes each row as it is written, so a large archive's
//! hundreds of thousands of rows are never all held at once.

use std::io::{self, Write};

use serde::ser::{Serialize, SerializeStruct, Serializer};

use super::build::ScanReport;
use super::rows::Rows;

/// Write the JSON document (pretty-printed, newline-terminated).
pub fn write_json(report: &ScanReport, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, report)?;
    writeln!(out)
}

/// Write the JSON document of `head` (a report built with
/// [`RowCount::Nothing`](super::RowCount::Nothing)) with `rows` as its items: the same
/// bytes [`write_json`] writes for the report built with every row.
pub fn write_json_streamed(head: &ScanReport, rows: &Rows, out: &mut dyn Write) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, &WithRows { head, rows })?;
    writeln!(out)
}

struct WithRows<'r, 'a> {
    head: &'r ScanReport,
    rows: &'r Rows<'a>,
}

/// The fields of [`ScanReport`] in their declared order, with `items` taken from the
/// rows. The pattern below names every field, so a field added to the report fails to
/// compile here until it is written here too (and the test comparing both writers
/// checks the order and the skipping rules).
impl Serialize for WithRows<'_, '_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let ScanReport {
            warning,
            format,
            tool,
            archive,
            priors,
            rarity,
            attributes,
            items: _,
            unmatched,
            sources,
            special_categories,
            friends,
            warnings,
            cautions,
        } = self.head;
        let mut s = serializer.serialize_struct("ScanReport", 14)?;
        match warning {
            Some(w) => s.serialize_field("warning", w)?,
            None => s.skip_field("warning")?,
        }
        s.serialize_field("format", format)?;
        s.serialize_field("tool", tool)?;
        s.serialize_field("archive", archive)?;
        s.serialize_field("priors", priors)?;
        s.serialize_field("rarity", rarity)?;
        s.serialize_field("attributes", attributes)?;
        s.serialize_field("items", self.rows)?;
        s.serialize_field("unmatched", unmatched)?;
        s.serialize_field("sources", sources)?;
        match special_categories {
            Some(v) => s.serialize_field("special_categories", v)?,
            None => s.skip_field("special_categories")?,
        }
        match friends {
            Some(v) => s.serialize_field("friends", v)?,
            None => s.skip_field("friends")?,
        }
        s.serialize_field("warnings", warnings)?;
        s.serialize_field("cautions", cautions)?;
        s.end()
    }
}
