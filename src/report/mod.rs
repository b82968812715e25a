//! Reports of one scan: a stable, versioned data structure (the JSON document, format
//! version one) and renderers for text (with or without colour), Markdown and a
//! self-contained HTML page.
//! Renderers write to any `io::Write`, so they are tested in memory. Friends' names
//! never appear unless the caller asks for them.

mod build;
mod cut;
mod html;
mod html_sections;
mod json;
mod markdown;
mod rows;
mod sources;
mod text;

pub use build::{
    ArchiveInfo, AttributeReport, ItemReport, PriorsInfo, REPORT_FORMAT, ScanReport, UnmatchedItem,
    ValueShare, build, build_with,
};
pub use cut::cut as cut_list;
pub use html::{CONTENT_SECURITY_POLICY, escape as escape_html, write_html, write_html_with};
pub use json::{write_json, write_json_streamed};
pub use markdown::write_markdown;
pub use rows::{RowCount, Rows};
pub use sources::{
    FriendAttributeReport, FriendsReport, SourceReport, SpecialCategoryCount, SpecialItemReport,
    SpecialReport,
};
pub use text::{TextOptions, write_text};
