//! Bytes to text: strip a UTF-8 byte-order mark, and replace invalid UTF-8 with U+FFFD
//! rather than dropping the file (the caller warns).

use std::borrow::Cow;

/// Decode a file's bytes. Returns the text and the number of invalid byte sequences
/// that were replaced (0 for clean UTF-8).
pub fn decode_text(bytes: &[u8]) -> (Cow<'_, str>, usize) {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    match std::str::from_utf8(bytes) {
        Ok(s) => (Cow::Borrowed(s), 0),
        Err(_) => {
            let mut bad = 0;
            for chunk in bytes.utf8_chunks() {
                if !chunk.invalid().is_empty() {
                    bad += 1;
                }
            }
            (String::from_utf8_lossy(bytes), bad)
        }
    }
}

/// Deepest nesting of arrays and objects in JSON text, found without parsing it (so a
/// hostile file cannot make the parser recurse before the limit is checked). Brackets
/// inside strings are ignored.
pub fn json_depth(text: &str) -> usize {
    let b = text.as_bytes();
    let mut depth = 0usize;
    let mut max = 0usize;
    let mut i = 0;
    while i < b.len() {
        match b[i] {
            b'"' => {
                // Jump over the string: to its closing quote, past escaped characters.
                i += 1;
                loop {
                    let Some(off) = memchr::memchr2(b'"', b'\\', &b[i..]) else {
                        return max;
                    };
                    i += off;
                    if b[i] == b'\\' {
                        i += 2;
                        if i >= b.len() {
                            return max;
                        }
                    } else {
                        break;
                    }
                }
            }
            b'[' | b'{' => {
                depth += 1;
                max = max.max(depth);
            }
            b']' | b'}' => depth = depth.saturating_sub(1),
            _ => {}
        }
        i += 1;
    }
    max
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bom_is_stripped_and_bad_bytes_counted() {
        let (t, bad) = decode_text(b"\xEF\xBB\xBF{\"a\":1}");
        assert_eq!(t, "{\"a\":1}");
        assert_eq!(bad, 0);
        let (t, bad) = decode_text(b"caf\xE9 ok");
        assert_eq!(t, "caf\u{FFFD} ok");
        assert_eq!(bad, 1);
    }

    /// The byte-at-a-time scan the fast one replaced, kept as the oracle.
    fn depth_by_bytes(text: &str) -> usize {
        let (mut depth, mut max, mut in_string, mut escaped) = (0usize, 0usize, false, false);
        for b in text.bytes() {
            if in_string {
                if escaped {
                    escaped = false;
                } else if b == b'\\' {
                    escaped = true;
                } else if b == b'"' {
                    in_string = false;
                }
                continue;
            }
            match b {
                b'"' => in_string = true,
                b'[' | b'{' => {
                    depth += 1;
                    max = max.max(depth);
                }
                b']' | b'}' => depth = depth.saturating_sub(1),
                _ => {}
            }
        }
        max
    }

    proptest::proptest! {
        #[test]
        fn fast_depth_equals_the_byte_scan(s in r#"[\[\]{}"\\a ]{0,40}"#) {
            proptest::prop_assert_eq!(json_depth(&s), depth_by_bytes(&s));
        }
    }

    #[test]
    fn depth_ignores_brackets_in_strings() {
        assert_eq!(json_depth(r#"{"a":[1,[2]]}"#), 3);
        assert_eq!(json_depth(r#"{"a":"[[[[["}"#), 1);
        assert_eq!(json_depth(r#"["\"[["]"#), 1);
        assert_eq!(json_depth("42"), 0);
    }
}
