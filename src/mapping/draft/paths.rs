//! Writing locations for the draft: JSONPath queries (RFC 9535) for the records and
//! their fields, with member names quoted when they are not plain identifiers (names
//! in any script, with spaces or quotes), and globs that match a file name literally
//! even when it holds glob characters.

use super::inspect::{RecordSet, Step};

/// Glob metacharacters in a file name, made literal.
pub fn escape_glob(path: &str) -> String {
    let mut out = String::with_capacity(path.len());
    for c in path.chars() {
        match c {
            '*' | '?' | '[' | ']' | '{' | '}' => {
                out.push('[');
                out.push(c);
                out.push(']');
            }
            _ => out.push(c),
        }
    }
    out
}

fn is_identifier(k: &str) -> bool {
    let mut chars = k.chars();
    chars
        .next()
        .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
}

fn quote_key(k: &str) -> String {
    format!("['{}']", k.replace('\\', "\\\\").replace('\'', "\\'"))
}

fn member(k: &str) -> String {
    if is_identifier(k) {
        format!(".{k}")
    } else {
        quote_key(k)
    }
}

/// The JSONPath (RFC 9535) of a field inside a record.
pub fn field_path(keys: &[String]) -> String {
    let mut s = String::from("$");
    for k in keys {
        s.push_str(&member(k));
    }
    s
}

/// The JSONPath (RFC 9535) selecting the records.
pub fn records_path(steps: &[Step]) -> String {
    let mut s = String::from("$");
    for step in steps {
        match step {
            Step::Key(k) => s.push_str(&member(k)),
            Step::Each => s.push_str("[*]"),
            Step::Where { key, value } => {
                let at = if is_identifier(key) {
                    format!("@.{key}")
                } else {
                    format!("@{}", quote_key(key))
                };
                s.push_str(&format!(
                    "[?{at} == '{}']",
                    value.replace('\\', "\\\\").replace('\'', "\\'")
                ));
            }
        }
    }
    s
}

pub(super) fn describe_place(set: &RecordSet) -> String {
    match &set.steps {
        Some(steps) => format!("{} {}", set.file, records_path(steps)),
        None => set.file.clone(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn paths_are_valid_jsonpath_and_globs_are_literal() {
        let keys = vec!["meta".to_string(), "Liked item".to_string()];
        assert_eq!(field_path(&keys), "$.meta['Liked item']");
        let steps = vec![
            Step::Key("export".into()),
            Step::Key("sections".into()),
            Step::Where {
                key: "type".into(),
                value: "it's".into(),
            },
            Step::Key("entries".into()),
            Step::Each,
        ];
        let p = records_path(&steps);
        assert_eq!(p, "$.export.sections[?@.type == 'it\\'s'].entries[*]");
        assert!(serde_json_path::JsonPath::parse(&p).is_ok(), "{p}");
        assert_eq!(escape_glob("a[1]/b*.json"), "a[[]1[]]/b[*].json");
        let g = globset::Glob::new(&escape_glob("a[1]/b*.json"))
            .unwrap()
            .compile_matcher();
        assert!(g.is_match("a[1]/b*.json"));
        assert!(!g.is_match("a1/bx.json"));
    }
}
