//! The checked mapping: every glob compiled, every JSONPath parsed, every field present
//! for its kind. Built from the raw TOML with all problems gathered before failing.

use std::fmt;
use std::path::Path;

use globset::{GlobBuilder, GlobSet, GlobSetBuilder};
use serde_json_path::JsonPath;

use super::error::{Error, Problem, Result};
use super::raw::{RawMapping, RawSource};
use crate::footprint::ItemKind;

/// The mapping format version this build reads.
pub const FORMAT: i64 = 1;

/// What a source's records are.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SourceKind {
    Item(ItemKind),
    Friend,
    /// The person's own statement of their attributes; stays local.
    SelfDeclared,
}

impl SourceKind {
    fn parse(s: &str) -> Option<SourceKind> {
        match s {
            "friend" => Some(SourceKind::Friend),
            "self" => Some(SourceKind::SelfDeclared),
            other => ItemKind::parse(other).map(SourceKind::Item),
        }
    }

    pub fn as_str(self) -> &'static str {
        match self {
            SourceKind::Item(k) => k.as_str(),
            SourceKind::Friend => "friend",
            SourceKind::SelfDeclared => "self",
        }
    }
}

impl fmt::Display for SourceKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// File formats a source can have.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    Json,
    Ndjson,
    Csv,
}

impl Format {
    fn parse(s: &str) -> Option<Format> {
        match s.to_ascii_lowercase().as_str() {
            "json" => Some(Format::Json),
            "ndjson" | "jsonl" | "json-lines" => Some(Format::Ndjson),
            "csv" => Some(Format::Csv),
            _ => None,
        }
    }

    fn from_extension(pattern: &str) -> Option<Format> {
        let ext = pattern.rsplit('.').next()?.to_ascii_lowercase();
        match ext.as_str() {
            "json" => Some(Format::Json),
            "ndjson" | "jsonl" => Some(Format::Ndjson),
            "csv" => Some(Format::Csv),
            _ => None,
        }
    }

    pub fn as_str(self) -> &'static str {
        match self {
            Format::Json => "json",
            Format::Ndjson => "ndjson",
            Format::Csv => "csv",
        }
    }
}

/// How dates are written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DateFormat {
    /// Unix seconds (number or digits), RFC 3339, or a plain `YYYY-MM-DD`.
    Auto,
    Unix,
    Rfc3339,
}

/// Text repairs.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Repair {
    None,
    /// UTF-8 text that was decoded as Latin-1 and encoded again.
    Latin1Mojibake,
}

/// Where one value sits in a record.
#[derive(Debug, Clone)]
pub enum Field {
    /// A JSONPath query (RFC 9535) run on the record; the first node is used.
    Path { query: JsonPath, text: String },
    /// A CSV column, by header name.
    Column(String),
}

impl Field {
    pub fn describe(&self) -> &str {
        match self {
            Field::Path { text, .. } => text,
            Field::Column(c) => c,
        }
    }
}

/// One checked source.
#[derive(Debug, Clone)]
pub struct Source {
    /// 1-based position in the mapping file, for messages.
    pub number: usize,
    pub label: String,
    pub kind: SourceKind,
    pub patterns: Vec<String>,
    globs: GlobSet,
    pub format: Format,
    /// Query selecting one node per record (JSON and NDJSON).
    pub records: Option<Field>,
    pub name: Option<Field>,
    pub id: Option<Field>,
    pub category: Option<Field>,
    pub date: Option<Field>,
    pub date_format: DateFormat,
    pub repair: Repair,
    pub delimiter: u8,
    /// Attribute id → field: a friend's known attributes, or the person's own.
    pub attributes: Vec<(String, Field)>,
}

impl Source {
    /// Does this source read the archive entry at `path`?
    pub fn matches(&self, path: &str) -> bool {
        self.globs.is_match(path)
    }
}

/// A checked mapping file.
#[derive(Debug, Clone)]
pub struct Mapping {
    pub label: Option<String>,
    pub sources: Vec<Source>,
    /// Where the mapping came from, for messages.
    pub origin: String,
}

impl Mapping {
    /// Read and check a mapping file within the default reading limits.
    pub fn load(path: &Path) -> Result<Mapping> {
        Mapping::load_within(path, &crate::limits::Limits::default())
    }

    /// Read and check a mapping file; one over the `mapping-bytes` limit is refused
    /// before it is read.
    pub fn load_within(path: &Path, limits: &crate::limits::Limits) -> Result<Mapping> {
        let text = super::locate::read_mapping(path, limits)?;
        Mapping::parse(&text, &path.display().to_string())
    }

    /// Check mapping text; `origin` names it in messages.
    pub fn parse(text: &str, origin: &str) -> Result<Mapping> {
        let raw: RawMapping = toml::from_str(text).map_err(|e| {
            let (line, column) = e.span().map(|s| line_col(text, s.start)).unwrap_or((1, 1));
            Error::Syntax {
                file: origin.to_string(),
                line,
                column,
                message: e.message().to_string(),
            }
        })?;
        let mut problems = Vec::new();
        let line_of = |span: std::ops::Range<usize>| Some(line_col(text, span.start).0);

        match &raw.format {
            Some(f) if *f.get_ref() == FORMAT => {}
            Some(f) => problems.push(Problem {
                line: line_of(f.span()),
                field: "format".into(),
                message: format!(
                    "this mapping is format {}, and this telltale reads format {FORMAT}",
                    f.get_ref()
                ),
            }),
            None => problems.push(Problem {
                line: None,
                field: "format".into(),
                message: format!("missing; add `format = {FORMAT}` at the top"),
            }),
        }
        if raw.sources.is_empty() {
            problems.push(Problem {
                line: None,
                field: "source".into(),
                message: "no [[source]] tables: the mapping reads nothing".into(),
            });
        }

        let mut sources = Vec::new();
        for (i, spanned) in raw.sources.into_iter().enumerate() {
            let start = spanned.span();
            let raw_source = spanned.into_inner();
            let mut check = SourceCheck {
                number: i + 1,
                text,
                problems: &mut problems,
                table_line: line_of(start),
            };
            if let Some(s) = check.source(raw_source) {
                sources.push(s);
            }
        }
        if !problems.is_empty() {
            return Err(Error::Invalid {
                file: origin.to_string(),
                problems,
            });
        }
        Ok(Mapping {
            label: raw.label,
            sources,
            origin: origin.to_string(),
        })
    }
}

struct SourceCheck<'a> {
    number: usize,
    text: &'a str,
    problems: &'a mut Vec<Problem>,
    table_line: Option<usize>,
}

type SpannedStr = toml::Spanned<String>;

impl SourceCheck<'_> {
    fn problem(&mut self, span: Option<std::ops::Range<usize>>, field: &str, message: String) {
        let line = span
            .map(|s| line_col(self.text, s.start).0)
            .or(self.table_line);
        self.problems.push(Problem {
            line,
            field: format!("source[{}].{field}", self.number),
            message,
        });
    }

    fn source(&mut self, raw: RawSource) -> Option<Source> {
        let before = self.problems.len();
        let kind = match &raw.kind {
            Some(k) => match SourceKind::parse(k.get_ref()) {
                Some(kind) => Some(kind),
                None => {
                    self.problem(
                        Some(k.span()),
                        "kind",
                        format!(
                            "'{}' is not a kind; use like, group, follow, event, friend or self",
                            k.get_ref()
                        ),
                    );
                    None
                }
            },
            None => {
                self.problem(
                    None,
                    "kind",
                    "missing; say what the records are (like, group, follow, event, friend or self)"
                        .into(),
                );
                None
            }
        };

        let patterns = match raw.files {
            Some(f) => {
                let span = f.span();
                let v = f.into_inner().into_vec();
                if v.is_empty() {
                    self.problem(
                        Some(span.clone()),
                        "files",
                        "empty: list at least one glob".into(),
                    );
                }
                Some((span, v))
            }
            None => {
                self.problem(
                    None,
                    "files",
                    "missing; give the files inside the archive, e.g. files = [\"likes/*.json\"]"
                        .into(),
                );
                None
            }
        };
        let mut globs = GlobSetBuilder::new();
        if let Some((span, pats)) = &patterns {
            for p in pats {
                match GlobBuilder::new(p)
                    .literal_separator(true)
                    .case_insensitive(true)
                    .build()
                {
                    Ok(g) => {
                        globs.add(g);
                    }
                    Err(e) => self.problem(
                        Some(span.clone()),
                        "files",
                        format!("'{p}' is not a valid glob: {}", e.kind()),
                    ),
                }
            }
        }
        let globs = globs.build().ok();

        let format = match &raw.format {
            Some(f) => match Format::parse(f.get_ref()) {
                Some(fmt) => Some(fmt),
                None => {
                    self.problem(
                        Some(f.span()),
                        "format",
                        format!("'{}' is not a format; use json, ndjson or csv", f.get_ref()),
                    );
                    None
                }
            },
            None => {
                let guessed = patterns
                    .as_ref()
                    .and_then(|(_, p)| p.first())
                    .and_then(|p| Format::from_extension(p));
                if guessed.is_none() {
                    self.problem(
                        None,
                        "format",
                        "missing and not clear from the file names; say json, ndjson or csv".into(),
                    );
                }
                guessed
            }
        };

        let fmt = format.unwrap_or(Format::Json);
        let records = match (&raw.records, fmt) {
            (Some(r), Format::Csv) => {
                self.problem(
                    Some(r.span()),
                    "records",
                    "CSV files have one record per row; remove 'records'".into(),
                );
                None
            }
            (Some(r), _) => self.json_path(r, "records"),
            (None, _) => None,
        };
        let name = self.field(&raw.name, "name", fmt);
        let id = self.field(&raw.id, "id", fmt);
        let category = self.field(&raw.category, "category", fmt);
        let date = self.field(&raw.date, "date", fmt);

        match kind {
            Some(SourceKind::SelfDeclared) if raw.attributes.is_empty() => {
                self.problem(
                    None,
                    "attributes",
                    "a 'self' source needs [source.attributes] naming the field of each attribute"
                        .into(),
                );
            }
            Some(SourceKind::SelfDeclared) => {}
            Some(_) if raw.name.is_none() => self.problem(
                None,
                "name",
                "missing; say which field holds the name (e.g. name = \"$.title\")".into(),
            ),
            _ => {}
        }
        if !matches!(kind, Some(SourceKind::Friend | SourceKind::SelfDeclared))
            && !raw.attributes.is_empty()
        {
            self.problem(
                None,
                "attributes",
                "only 'friend' and 'self' sources carry attributes".into(),
            );
        }
        let mut attributes = Vec::new();
        for (attr, path) in &raw.attributes {
            if let Some(f) = self.field(&Some(path.clone()), &format!("attributes.{attr}"), fmt) {
                attributes.push((attr.clone(), f));
            }
        }

        let date_format = match &raw.date_format {
            None => DateFormat::Auto,
            Some(d) => match d.get_ref().as_str() {
                "auto" => DateFormat::Auto,
                "unix" | "unix-seconds" => DateFormat::Unix,
                "rfc3339" => DateFormat::Rfc3339,
                other => {
                    self.problem(
                        Some(d.span()),
                        "date_format",
                        format!("'{other}' is not a date format; use auto, unix or rfc3339"),
                    );
                    DateFormat::Auto
                }
            },
        };
        let repair = match &raw.repair {
            None => Repair::None,
            Some(r) => match r.get_ref().as_str() {
                "none" => Repair::None,
                "latin1-mojibake" => Repair::Latin1Mojibake,
                other => {
                    self.problem(
                        Some(r.span()),
                        "repair",
                        format!("'{other}' is not a repair; use none or latin1-mojibake"),
                    );
                    Repair::None
                }
            },
        };
        let delimiter = match &raw.delimiter {
            None => b',',
            Some(d) => match d.get_ref().as_bytes() {
                [b] if b.is_ascii() => *b,
                _ if d.get_ref() == "\\t" => b'\t',
                _ => {
                    self.problem(
                        Some(d.span()),
                        "delimiter",
                        "must be one ASCII character, e.g. \",\" or \";\" or \"\\t\"".into(),
                    );
                    b','
                }
            },
        };

        if self.problems.len() > before {
            return None;
        }
        let kind = kind?;
        let (_, patterns) = patterns?;
        Some(Source {
            number: self.number,
            label: raw
                .label
                .unwrap_or_else(|| format!("source {} ({kind})", self.number)),
            kind,
            patterns,
            globs: globs?,
            format: format?,
            records,
            name,
            id,
            category,
            date,
            date_format,
            repair,
            delimiter,
            attributes,
        })
    }

    fn json_path(&mut self, s: &SpannedStr, field: &str) -> Option<Field> {
        let text = normalise_path(s.get_ref());
        match JsonPath::parse(&text) {
            Ok(query) => Some(Field::Path { query, text }),
            Err(e) => {
                self.problem(
                    Some(s.span()),
                    field,
                    format!("'{}' is not a JSONPath query (RFC 9535): {e}", s.get_ref()),
                );
                None
            }
        }
    }

    fn field(&mut self, s: &Option<SpannedStr>, field: &str, format: Format) -> Option<Field> {
        let s = s.as_ref()?;
        if s.get_ref().trim().is_empty() {
            self.problem(Some(s.span()), field, "empty".into());
            return None;
        }
        match format {
            Format::Csv => Some(Field::Column(s.get_ref().clone())),
            Format::Json | Format::Ndjson => self.json_path(s, field),
        }
    }
}

/// A bare member name ("title") is shorthand for `$['title']`.
fn normalise_path(s: &str) -> String {
    let t = s.trim();
    if t.starts_with('$') {
        t.to_string()
    } else {
        format!("$['{}']", t.replace('\\', "\\\\").replace('\'', "\\'"))
    }
}

/// 1-based line and column of a byte offset.
fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text.as_bytes()[..offset];
    let line = before.iter().filter(|&&b| b == b'\n').count() + 1;
    let col = before.iter().rev().take_while(|&&b| b != b'\n').count() + 1;
    (line, col)
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
format = 1
label = "test layout"

[[source]]
kind = "like"
files = ["likes/*.json"]
records = "$.liked[*]"
name = "$.title"
id = "ref"
date = "$.at"

[[source]]
kind = "group"
files = "groups.csv"
name = "Group name"
delimiter = ";"

[[source]]
kind = "self"
files = ["me.json"]
[source.attributes]
age_band = "$.age"
"#;

    #[test]
    fn a_good_mapping_checks() {
        let m = Mapping::parse(GOOD, "good.toml").unwrap();
        assert_eq!(m.sources.len(), 3);
        let likes = &m.sources[0];
        assert_eq!(likes.kind, SourceKind::Item(ItemKind::Like));
        assert_eq!(likes.format, Format::Json);
        assert!(likes.matches("likes/page_1.json"));
        assert!(likes.matches("LIKES/Page_1.JSON"));
        assert!(!likes.matches("likes/deeper/page_1.json"));
        assert_eq!(likes.id.as_ref().unwrap().describe(), "$['ref']");
        let groups = &m.sources[1];
        assert_eq!(groups.format, Format::Csv);
        assert_eq!(groups.delimiter, b';');
        assert_eq!(m.sources[2].attributes.len(), 1);
    }

    #[test]
    fn every_problem_is_reported_with_its_line() {
        let bad = r#"format = 1
[[source]]
kind = "poke"
files = ["a.json"]
name = "$.["

[[source]]
kind = "like"
files = ["b.txt"]
"#;
        let err = Mapping::parse(bad, "bad.toml").unwrap_err();
        let Error::Invalid { problems, file } = &err else {
            panic!("expected Invalid, got {err}");
        };
        assert_eq!(file, "bad.toml");
        let text = err.to_string();
        assert!(text.contains("line 3, source[1].kind"), "{text}");
        assert!(text.contains("line 5, source[1].name"), "{text}");
        assert!(text.contains("source[2].format"), "{text}");
        assert!(text.contains("source[2].name"), "{text}");
        assert_eq!(problems.len(), 4, "{text}");
    }

    #[test]
    fn syntax_errors_name_line_and_column() {
        let err = Mapping::parse("format = 1\n[[source]\n", "x.toml").unwrap_err();
        match err {
            Error::Syntax { line, .. } => assert_eq!(line, 2),
            other => panic!("expected Syntax, got {other}"),
        }
        let err = Mapping::parse("format = 1\ncolour = 3\n", "x.toml").unwrap_err();
        assert!(err.to_string().contains("line 2"), "{err}");
    }

    #[test]
    fn wrong_version_is_named() {
        let err = Mapping::parse("format = 7\n", "v.toml").unwrap_err();
        assert!(err.to_string().contains("format 7"), "{err}");
    }
}
