//! The three readers. Each hands records to a [`RecordSink`] one at a time and turns a
//! bad record into a warning; only a file that cannot be read at all (invalid JSON,
//! over a limit) is skipped whole.

use serde_json::Value;

use super::decode::json_depth;
use super::prune::Keep;
use crate::footprint::Warning;
use crate::limits::{Limits, human_bytes};
use crate::mapping::{Field, Format, Source};

/// One record, borrowed from the file being read.
#[derive(Debug, Clone, Copy)]
pub enum Record<'a> {
    Json {
        /// 1-based record number in the file.
        number: usize,
        /// 1-based line, for NDJSON.
        line: Option<usize>,
        value: &'a Value,
    },
    Csv {
        number: usize,
        line: usize,
        row: &'a csv::StringRecord,
        headers: &'a [String],
    },
}

impl Record<'_> {
    pub fn number(&self) -> usize {
        match self {
            Record::Json { number, .. } | Record::Csv { number, .. } => *number,
        }
    }

    pub fn line(&self) -> Option<usize> {
        match self {
            Record::Json { line, .. } => *line,
            Record::Csv { line, .. } => Some(*line),
        }
    }
}

/// Receives records and warnings. `record` returns false to stop reading (the record
/// limit was reached).
pub trait RecordSink {
    fn record(&mut self, record: Record<'_>) -> bool;
    fn warn(&mut self, warning: Warning);
}

/// Read every record of one file. `Err` means the file was skipped whole; the warning
/// says why.
pub fn read_records(
    text: &str,
    file: &str,
    source: &Source,
    limits: &Limits,
    sink: &mut impl RecordSink,
) -> Result<(), Warning> {
    match source.format {
        Format::Json => read_json(text, file, source, limits, sink),
        Format::Ndjson => read_ndjson(text, file, source, limits, sink),
        Format::Csv => read_csv(text, file, source, limits, sink),
    }
}

fn depth_check(text: &str, limits: &Limits) -> Result<(), String> {
    let depth = json_depth(text);
    if depth as u64 > limits.json_depth {
        return Err(format!(
            "JSON nested {depth} levels deep, over the limit of {} (raise it with --limit json-depth=N if the file is trusted)",
            limits.json_depth
        ));
    }
    Ok(())
}

fn parse_json(text: &str, keep: Option<&Keep>) -> Result<Value, (String, usize)> {
    let parsed = match keep {
        Some(k) => k.parse(text),
        None => serde_json::from_str(text),
    };
    parsed.map_err(|e| {
        let what = match e.classify() {
            serde_json::error::Category::Eof => "the file ends too early (truncated?)".to_string(),
            _ => format!(
                "not valid JSON (column {}): {}",
                e.column(),
                super::json_reason(&e)
            ),
        };
        (what, e.line())
    })
}

fn select<'a>(doc: &'a Value, selector: Option<&Field>) -> Vec<&'a Value> {
    match selector {
        Some(Field::Path { query, .. }) => query.query(doc).all(),
        Some(Field::Column(_)) => Vec::new(),
        None => match doc {
            Value::Array(items) => items.iter().collect(),
            other => vec![other],
        },
    }
}

fn read_json(
    text: &str,
    file: &str,
    source: &Source,
    limits: &Limits,
    sink: &mut impl RecordSink,
) -> Result<(), Warning> {
    depth_check(text, limits).map_err(|m| Warning::new(m).in_file(file))?;
    let keep = Keep::for_source(source);
    let doc = parse_json(text, keep.as_ref()).map_err(|(m, line)| {
        Warning::new(format!("{m}; file skipped"))
            .in_file(file)
            .at_line(line)
    })?;
    let records = select(&doc, source.records.as_ref());
    if records.is_empty()
        && let Some(sel) = &source.records
    {
        sink.warn(records_found_nothing(file, sel));
    }
    for (i, value) in records.into_iter().enumerate() {
        let keep_going = sink.record(Record::Json {
            number: i + 1,
            line: None,
            value,
        });
        if !keep_going {
            break;
        }
    }
    Ok(())
}

/// The warning for a JSON file whose records query selects nothing.
pub fn records_found_nothing(file: &str, query: &Field) -> Warning {
    Warning::new(format!(
        "the records query {} found nothing in this file",
        query.describe()
    ))
    .in_file(file)
    .on_field("records")
}

fn read_ndjson(
    text: &str,
    file: &str,
    source: &Source,
    limits: &Limits,
    sink: &mut impl RecordSink,
) -> Result<(), Warning> {
    let mut number = 0;
    let keep = Keep::for_source(source);
    for (i, line) in text.lines().enumerate() {
        let line_no = i + 1;
        if line.trim().is_empty() {
            continue;
        }
        if line.len() as u64 > limits.line_bytes {
            sink.warn(
                Warning::new(format!(
                    "line longer than the limit of {} (raise it with --limit line-bytes=SIZE); skipped",
                    human_bytes(limits.line_bytes)
                ))
                .in_file(file)
                .at_line(line_no),
            );
            continue;
        }
        if let Err(m) = depth_check(line, limits) {
            sink.warn(Warning::new(m).in_file(file).at_line(line_no));
            continue;
        }
        let doc = match parse_json(line, keep.as_ref()) {
            Ok(d) => d,
            Err((m, _)) => {
                sink.warn(
                    Warning::new(format!("{m}; line skipped"))
                        .in_file(file)
                        .at_line(line_no),
                );
                continue;
            }
        };
        let selected = match &source.records {
            Some(sel) => select(&doc, Some(sel)),
            None => vec![&doc],
        };
        for value in selected {
            number += 1;
            let keep_going = sink.record(Record::Json {
                number,
                line: Some(line_no),
                value,
            });
            if !keep_going {
                return Ok(());
            }
        }
    }
    Ok(())
}

fn read_csv(
    text: &str,
    file: &str,
    source: &Source,
    limits: &Limits,
    sink: &mut impl RecordSink,
) -> Result<(), Warning> {
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(source.delimiter)
        .flexible(true)
        .has_headers(true)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = match reader.headers() {
        Ok(h) => h.iter().map(|s| s.trim().to_string()).collect(),
        Err(e) => {
            return Err(
                Warning::new(format!("cannot read the CSV header: {e}; file skipped"))
                    .in_file(file)
                    .at_line(1),
            );
        }
    };
    if headers.iter().all(|h| h.is_empty()) {
        return Err(Warning::new("the CSV file has no header row; file skipped")
            .in_file(file)
            .at_line(1));
    }
    let mut ragged = 0usize;
    let mut first_ragged = None;
    let mut row = csv::StringRecord::new();
    let mut number = 0;
    loop {
        let line = reader.position().line() as usize;
        match reader.read_record(&mut row) {
            Ok(false) => break,
            Ok(true) => {}
            Err(e) => {
                let line = e.position().map(|p| p.line() as usize).unwrap_or(line);
                sink.warn(
                    Warning::new(format!("unreadable CSV row: {e}; skipped"))
                        .in_file(file)
                        .at_line(line),
                );
                continue;
            }
        }
        number += 1;
        let line = row.position().map(|p| p.line() as usize).unwrap_or(line);
        if row.as_byte_record().as_slice().len() as u64 > limits.line_bytes {
            sink.warn(
                Warning::new(format!(
                    "row longer than the limit of {} (raise it with --limit line-bytes=SIZE); skipped",
                    human_bytes(limits.line_bytes)
                ))
                .in_file(file)
                .at_line(line)
                .at_record(number),
            );
            continue;
        }
        if row.len() != headers.len() {
            ragged += 1;
            first_ragged.get_or_insert(line);
        }
        let keep_going = sink.record(Record::Csv {
            number,
            line,
            row: &row,
            headers: &headers,
        });
        if !keep_going {
            break;
        }
    }
    if ragged > 0 {
        sink.warn(
            Warning::new(format!(
                "{} a different number of fields than the header ({}); missing fields were left empty",
                if ragged == 1 {
                    "1 row has".to_string()
                } else {
                    format!("{ragged} rows have")
                },
                crate::reading::count(headers.len(), "column", "columns")
            ))
            .in_file(file)
            .at_line(first_ragged.unwrap_or(1)),
        );
    }
    Ok(())
}
