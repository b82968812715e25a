//! Dates in mapped fields: Unix seconds (a JSON number or a string of digits), RFC 3339
//! timestamps, or a plain calendar date `YYYY-MM-DD` (taken as midnight UTC).

use serde_json::Value;
use time::format_description::well_known::Rfc3339;
use time::{Date, OffsetDateTime, macros::format_description};

use crate::mapping::DateFormat;

/// Unix seconds from a field value, or a message saying why not.
pub fn parse_date(value: &Value, format: DateFormat) -> Result<i64, String> {
    match value {
        Value::Number(n) if format != DateFormat::Rfc3339 => {
            if let Some(i) = n.as_i64() {
                Ok(i)
            } else if let Some(f) = n.as_f64().filter(|f| f.is_finite()) {
                Ok(f.trunc() as i64)
            } else {
                Err(format!("'{n}' is not a usable Unix time"))
            }
        }
        Value::String(s) => parse_date_text(s, format),
        other => Err(format!("expected a date, found {}", describe(other))),
    }
}

fn parse_date_text(s: &str, format: DateFormat) -> Result<i64, String> {
    let t = s.trim();
    if format != DateFormat::Rfc3339
        && !t.is_empty()
        && t.bytes()
            .enumerate()
            .all(|(i, b)| b.is_ascii_digit() || (i == 0 && b == b'-'))
    {
        return t
            .parse::<i64>()
            .map_err(|_| format!("'{t}' is not a usable Unix time"));
    }
    if format == DateFormat::Unix {
        return Err(format!("'{t}' is not Unix seconds"));
    }
    if let Ok(dt) = OffsetDateTime::parse(t, &Rfc3339) {
        return Ok(dt.unix_timestamp());
    }
    if format == DateFormat::Auto {
        let plain = format_description!("[year]-[month]-[day]");
        if let Ok(d) = Date::parse(t, &plain) {
            return Ok(d.midnight().assume_utc().unix_timestamp());
        }
    }
    Err(format!(
        "'{}' is not a date telltale reads (Unix seconds, RFC 3339 such as 2021-04-30T18:00:00Z, or YYYY-MM-DD)",
        crate::text::truncate_to_width(t, 40)
    ))
}

fn describe(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "true/false",
        Value::Number(_) => "a number",
        Value::String(_) => "text",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    // Reference values: RFC 3339 §5.8 examples; Unix time of 1985-04-12T23:20:50.52Z is
    // 482196050 (computed by hand from the POSIX definition, checked with GNU date).
    #[test]
    fn formats_are_read() {
        let auto = DateFormat::Auto;
        assert_eq!(parse_date(&json!(1_600_000_000), auto), Ok(1_600_000_000));
        assert_eq!(parse_date(&json!("1600000000"), auto), Ok(1_600_000_000));
        assert_eq!(
            parse_date(&json!("1985-04-12T23:20:50.52Z"), auto),
            Ok(482_196_050)
        );
        assert_eq!(
            parse_date(&json!("1996-12-19T16:39:57-08:00"), auto),
            Ok(851_042_397)
        );
        assert_eq!(parse_date(&json!("1970-01-02"), auto), Ok(86_400));
        assert!(parse_date(&json!("last tuesday"), auto).is_err());
        assert!(parse_date(&json!([1]), auto).is_err());
        assert!(parse_date(&json!("1970-01-02"), DateFormat::Rfc3339).is_err());
        assert!(parse_date(&json!("2020-01-01T00:00:00Z"), DateFormat::Unix).is_err());
    }
}
