//! Reading one field of one record as text (or as a JSON value, for dates).

use std::borrow::Cow;

use serde_json::Value;

use super::reader::Record;
use crate::mapping::Field;

/// Why a field could not be read from a record.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum FieldError {
    /// The record has no such field (or it is null or empty).
    Missing,
    /// The field holds something that is not a single value.
    WrongType(String),
}

/// The field's value: `Ok(None)` when absent, null or blank.
pub fn field_value<'a>(
    record: &Record<'a>,
    field: &Field,
) -> Result<Option<Cow<'a, Value>>, FieldError> {
    match (record, field) {
        (Record::Json { value, .. }, Field::Path { query, .. }) => {
            match query.query(value).first() {
                None | Some(Value::Null) => Ok(None),
                Some(v) => Ok(Some(Cow::Borrowed(v))),
            }
        }
        (Record::Csv { row, headers, .. }, Field::Column(name)) => {
            let idx = headers
                .iter()
                .position(|h| h == name)
                .or_else(|| headers.iter().position(|h| h.eq_ignore_ascii_case(name)));
            match idx.and_then(|i| row.get(i)) {
                Some(s) if !s.trim().is_empty() => {
                    Ok(Some(Cow::Owned(Value::String(s.to_string()))))
                }
                _ => Ok(None),
            }
        }
        _ => Err(FieldError::WrongType(
            "field does not fit the file format".into(),
        )),
    }
}

/// The field as text. Numbers and true/false are written out; lists and objects are an
/// error (the path should point deeper).
pub fn field_text(record: &Record<'_>, field: &Field) -> Result<Option<String>, FieldError> {
    let Some(v) = field_value(record, field)? else {
        return Ok(None);
    };
    match v.as_ref() {
        Value::String(s) => {
            let t = s.trim();
            Ok(if t.is_empty() {
                None
            } else {
                Some(t.to_string())
            })
        }
        Value::Number(n) => Ok(Some(n.to_string())),
        Value::Bool(b) => Ok(Some(b.to_string())),
        Value::Array(_) => Err(FieldError::WrongType(
            "expected a single value, found a list (point the path at one element)".into(),
        )),
        Value::Object(_) => Err(FieldError::WrongType(
            "expected a single value, found an object (point the path at one of its fields)".into(),
        )),
        Value::Null => Ok(None),
    }
}
