//! Cutting a JSON file at the elements of its records array, so that a large file is
//! read a piece at a time and never held whole. It applies when the records query is a
//! plain chain of names ending in one wildcard (`$[*]`, `$.likes[*]`, `$.a.b[*]`): a
//! small structural scanner (strings with their escapes, bracket depth) walks from the
//! root to the array along the names, then finds where each element ends; each element
//! is parsed from its own slice with the same pruned seed the whole-file parse uses
//! for it, and everything else in the file is checked with the same kind of parse the
//! whole-file reader would give it. The bytes consumed are dropped, so the buffer holds
//! about one element plus one piece.
//!
//! The scanner does not try to explain problems: anything it does not expect (invalid
//! JSON anywhere, invalid UTF-8, a truncated file, trailing text, another shape, the
//! array's name given twice, nesting deeper than allowed) is an [`Unsplit`], and the
//! caller reads the file whole instead, so its warnings are exactly the whole-file
//! reader's. The JSON grammar followed is RFC 8259's.

use serde::Deserialize;
use serde::de::IgnoredAny;
use serde_json::Value;

use super::prune::{Keep, Step, plain_steps};
use crate::mapping::{Field, Format, Source};

/// Nesting beyond which a file is never split: serde_json refuses documents nested
/// 128 levels deep, and a slice starts deeper than the document did, so past this
/// the whole-file parse decides.
const MAX_SPLIT_DEPTH: usize = 100;

/// Why a file was not split; the caller then reads it whole.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum Unsplit {
    #[error("not valid UTF-8")]
    Utf8,
    #[error("ends before the document does")]
    Truncated,
    #[error("unexpected byte at offset {0}")]
    Syntax(u64),
    #[error("a value did not parse")]
    Value,
    #[error("not the shape the records query walks")]
    Shape,
    #[error("the records array's name appears twice in one object")]
    Duplicate,
    #[error("nested deeper than {0}")]
    Depth(usize),
}

/// How to split a source's files: the names from the root to the records array, and
/// what to keep of each element (`None`: the whole value, as the full parse does).
#[derive(Debug, Clone)]
pub struct SplitPlan {
    names: Vec<String>,
    element: Option<Keep>,
}

impl SplitPlan {
    /// The plan for a JSON source whose records query is a plain chain of names ending
    /// in `[*]`; `None` for every other source.
    pub fn for_source(source: &Source) -> Option<SplitPlan> {
        if source.format != Format::Json {
            return None;
        }
        let Some(Field::Path { text, .. }) = &source.records else {
            return None;
        };
        let mut steps = plain_steps(text)?;
        if steps.pop()? != Step::Any {
            return None;
        }
        let mut names = Vec::with_capacity(steps.len());
        for step in steps {
            match step {
                Step::Name(n) => names.push(n),
                _ => return None,
            }
        }
        let element = match Keep::for_source(source) {
            Some(root) => Some(root.along(&names)?.clone()),
            None => None,
        };
        Some(SplitPlan { names, element })
    }

    /// Parse one element as the whole-file parse would have built it.
    fn element(&self, text: &str) -> serde_json::Result<Value> {
        match &self.element {
            Some(k) => k.parse(text),
            None => serde_json::from_str(text),
        }
    }

    /// Check a value outside the records array as the whole-file parse would have
    /// (skipped when pruning, built otherwise).
    fn check_other(&self, text: &str) -> bool {
        let mut de = serde_json::Deserializer::from_str(text);
        let ok = match &self.element {
            Some(_) => IgnoredAny::deserialize(&mut de).is_ok(),
            None => Value::deserialize(&mut de).is_ok(),
        };
        ok && de.end().is_ok()
    }
}

/// What a split file gave.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Split {
    /// Elements in the records array.
    pub records: usize,
    /// Deepest nesting of the whole file (as [`json_depth`](super::json_depth) counts).
    pub depth: usize,
}

/// Split a JSON file handed over in pieces: `fill` appends the next piece to the
/// buffer it is given and returns false at the end of the file; `each` receives every
/// element of the records array in order and returns false to be given no more (the
/// rest of the file is still checked). `max_depth` is the nesting limit the whole-file
/// reader applies.
pub fn split_records(
    plan: &SplitPlan,
    max_depth: u64,
    fill: &mut dyn FnMut(&mut Vec<u8>) -> bool,
    each: &mut dyn FnMut(Value) -> bool,
) -> Result<Split, Unsplit> {
    let cap = usize::try_from(max_depth)
        .unwrap_or(usize::MAX)
        .min(MAX_SPLIT_DEPTH);
    let mut s = Scanner {
        data: Vec::new(),
        pos: 0,
        checked: 0,
        dropped: 0,
        ended: false,
        fill,
        depth: 0,
        max_depth: 0,
        cap,
    };
    s.skip_bom()?;
    // Down to the array, one object per name.
    for name in &plan.names {
        s.open(b'{')?;
        s.find_member(name, plan)?;
    }
    s.open(b'[')?;
    let mut records = 0;
    let mut wanted = true;
    s.skip_ws()?;
    if s.peek()? == Some(b']') {
        s.pos += 1;
    } else {
        loop {
            let len = s.value_len()?;
            let text = s.text(len)?;
            let value = plan.element(text).map_err(|_| Unsplit::Value)?;
            records += 1;
            if wanted {
                wanted = each(value);
            }
            s.pos += len;
            s.skip_ws()?;
            match s.next_byte()? {
                b',' => s.skip_ws()?,
                b']' => break,
                _ => return Err(s.syntax()),
            }
        }
    }
    s.depth -= 1;
    // Back up: the rest of each object, where the name must not come again.
    for name in plan.names.iter().rev() {
        s.rest_of_object(name, plan)?;
        s.depth -= 1;
    }
    s.skip_ws()?;
    if s.peek()?.is_some() {
        return Err(s.syntax());
    }
    Ok(Split {
        records,
        depth: s.max_depth,
    })
}

struct Scanner<'f> {
    data: Vec<u8>,
    /// Where the next unread byte is in `data`.
    pos: usize,
    /// `data[..checked]` is known to be valid UTF-8.
    checked: usize,
    /// Bytes dropped from the front of the buffer so far (for offsets in errors).
    dropped: u64,
    ended: bool,
    fill: &'f mut dyn FnMut(&mut Vec<u8>) -> bool,
    /// Nesting at `pos`.
    depth: usize,
    max_depth: usize,
    cap: usize,
}

impl Scanner<'_> {
    /// Get another piece, dropping what was consumed first. False at the end.
    fn more(&mut self) -> Result<bool, Unsplit> {
        if self.ended {
            return Ok(false);
        }
        let drop = self.pos.min(self.checked);
        if drop > 0 {
            self.data.drain(..drop);
            self.pos -= drop;
            self.checked -= drop;
            self.dropped += drop as u64;
        }
        let before = self.data.len();
        if !(self.fill)(&mut self.data) {
            self.ended = true;
        }
        // Check the new bytes; a character cut by the piece's end waits for the next.
        match std::str::from_utf8(&self.data[self.checked..]) {
            Ok(_) => self.checked = self.data.len(),
            Err(e) if e.error_len().is_none() && !self.ended => self.checked += e.valid_up_to(),
            Err(_) => return Err(Unsplit::Utf8),
        }
        Ok(self.data.len() > before || !self.ended)
    }

    /// The byte `k` past `pos`, reading more as needed; `None` at the end of the file.
    fn at(&mut self, k: usize) -> Result<Option<u8>, Unsplit> {
        while self.pos + k >= self.data.len() {
            if !self.more()? {
                return Ok(None);
            }
        }
        Ok(Some(self.data[self.pos + k]))
    }

    fn peek(&mut self) -> Result<Option<u8>, Unsplit> {
        self.at(0)
    }

    fn next_byte(&mut self) -> Result<u8, Unsplit> {
        let b = self.peek()?.ok_or(Unsplit::Truncated)?;
        self.pos += 1;
        Ok(b)
    }

    fn syntax(&self) -> Unsplit {
        Unsplit::Syntax(self.dropped + self.pos as u64)
    }

    fn skip_bom(&mut self) -> Result<(), Unsplit> {
        if self.at(0)? == Some(0xEF) && self.at(1)? == Some(0xBB) && self.at(2)? == Some(0xBF) {
            self.pos += 3;
        }
        Ok(())
    }

    /// Whitespace as RFC 8259 defines it.
    fn skip_ws(&mut self) -> Result<(), Unsplit> {
        while let Some(b) = self.peek()? {
            if !matches!(b, b' ' | b'\n' | b'\r' | b'\t') {
                break;
            }
            self.pos += 1;
        }
        Ok(())
    }

    fn deeper(&mut self, by: usize) -> Result<(), Unsplit> {
        let d = self.depth + by;
        self.max_depth = self.max_depth.max(d);
        if d > self.cap {
            return Err(Unsplit::Depth(self.cap));
        }
        Ok(())
    }

    /// Expect `[` or `{` (after whitespace) and go into it.
    fn open(&mut self, bracket: u8) -> Result<(), Unsplit> {
        self.skip_ws()?;
        match self.peek()? {
            Some(b) if b == bracket => {}
            Some(b'[' | b'{' | b'"' | b'-' | b'0'..=b'9' | b't' | b'f' | b'n') => {
                return Err(Unsplit::Shape);
            }
            Some(_) => return Err(self.syntax()),
            None => return Err(Unsplit::Truncated),
        }
        self.pos += 1;
        self.deeper(1)?;
        self.depth += 1;
        Ok(())
    }

    /// The `len` bytes at `pos` as text (already checked to be UTF-8).
    fn text(&self, len: usize) -> Result<&str, Unsplit> {
        std::str::from_utf8(&self.data[self.pos..self.pos + len]).map_err(|_| Unsplit::Utf8)
    }

    /// The length of the string starting at `pos + k` (its opening quote).
    fn string_len(&mut self, k: usize) -> Result<usize, Unsplit> {
        let mut i = k + 1;
        loop {
            let from = self.pos + i;
            if from >= self.data.len() {
                if !self.more()? {
                    return Err(Unsplit::Truncated);
                }
                continue;
            }
            match memchr::memchr2(b'"', b'\\', &self.data[from..]) {
                None => {
                    i = self.data.len() - self.pos;
                    if !self.more()? {
                        return Err(Unsplit::Truncated);
                    }
                }
                Some(off) => {
                    i += off;
                    if self.data[self.pos + i] == b'"' {
                        return Ok(i + 1 - k);
                    }
                    i += 2; // the backslash and the character it escapes
                }
            }
        }
    }

    /// The length of the value starting at `pos`, which is not whitespace. Nesting is
    /// counted (and refused past the cap) on the way.
    fn value_len(&mut self) -> Result<usize, Unsplit> {
        match self.peek()?.ok_or(Unsplit::Truncated)? {
            b'"' => self.string_len(0),
            b'[' | b'{' => {
                let mut nest = 0usize;
                let mut i = 0;
                loop {
                    let Some(b) = self.at(i)? else {
                        return Err(Unsplit::Truncated);
                    };
                    match b {
                        b'"' => {
                            i += self.string_len(i)?;
                            continue;
                        }
                        b'[' | b'{' => {
                            nest += 1;
                            self.deeper(nest)?;
                        }
                        b']' | b'}' => {
                            nest -= 1;
                            if nest == 0 {
                                return Ok(i + 1);
                            }
                        }
                        _ => {}
                    }
                    i += 1;
                }
            }
            b']' | b'}' | b',' | b':' => Err(self.syntax()),
            _ => {
                // A number or a literal: up to the next delimiter; the parse checks it.
                let mut i = 0;
                while let Some(b) = self.at(i)? {
                    if matches!(b, b' ' | b'\n' | b'\r' | b'\t' | b',' | b']' | b'}') {
                        break;
                    }
                    i += 1;
                }
                Ok(i)
            }
        }
    }

    /// Read `"key"` and the colon after it; the key, unescaped.
    fn key(&mut self) -> Result<String, Unsplit> {
        if self.peek()? != Some(b'"') {
            return Err(self.syntax());
        }
        let len = self.string_len(0)?;
        let key: String = serde_json::from_str(self.text(len)?).map_err(|_| Unsplit::Value)?;
        self.pos += len;
        self.skip_ws()?;
        if self.next_byte()? != b':' {
            return Err(self.syntax());
        }
        self.skip_ws()?;
        Ok(key)
    }

    /// Check and pass over a value that is not on the way to the records.
    fn skip_value(&mut self, plan: &SplitPlan) -> Result<(), Unsplit> {
        let len = self.value_len()?;
        if !plan.check_other(self.text(len)?) {
            return Err(Unsplit::Value);
        }
        self.pos += len;
        Ok(())
    }

    /// Inside an object: pass over members until `name`, and stop at its value.
    fn find_member(&mut self, name: &str, plan: &SplitPlan) -> Result<(), Unsplit> {
        self.skip_ws()?;
        if self.peek()? == Some(b'}') {
            return Err(Unsplit::Shape);
        }
        loop {
            if self.key()? == name {
                return Ok(());
            }
            self.skip_value(plan)?;
            self.skip_ws()?;
            match self.next_byte()? {
                b',' => self.skip_ws()?,
                b'}' => return Err(Unsplit::Shape),
                _ => return Err(self.syntax()),
            }
        }
    }

    /// After the member on the way down: the object's other members, up to its `}`.
    fn rest_of_object(&mut self, name: &str, plan: &SplitPlan) -> Result<(), Unsplit> {
        loop {
            self.skip_ws()?;
            match self.next_byte()? {
                b'}' => return Ok(()),
                b',' => {}
                _ => return Err(self.syntax()),
            }
            self.skip_ws()?;
            if self.key()? == name {
                return Err(Unsplit::Duplicate);
            }
            self.skip_value(plan)?;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mapping::Mapping;

    fn plan(records: &str) -> Option<SplitPlan> {
        let toml = format!(
            "format = 1\n[[source]]\nkind = \"like\"\nfiles = [\"l.json\"]\nrecords = \"{records}\"\nname = \"$.t\"\n"
        );
        let m = Mapping::parse(&toml, "t.toml").unwrap_or_else(|e| panic!("{e}"));
        SplitPlan::for_source(&m.sources[0])
    }

    fn run(p: &SplitPlan, text: &str, piece: usize) -> Result<(Vec<Value>, usize), Unsplit> {
        let mut rest = text.as_bytes();
        let mut fill = |buf: &mut Vec<u8>| {
            let n = piece.min(rest.len());
            buf.extend_from_slice(&rest[..n]);
            rest = &rest[n..];
            !rest.is_empty() || n > 0
        };
        let mut got = Vec::new();
        let split = split_records(p, 128, &mut fill, &mut |v| {
            got.push(v);
            true
        })?;
        assert_eq!(split.records, got.len());
        Ok((got, split.depth))
    }

    #[test]
    fn only_plain_names_ending_in_a_wildcard_are_split() {
        assert!(plan("$[*]").is_some());
        assert!(plan("$.likes[*]").is_some());
        assert!(plan("$.a['b c'][*]").is_some());
        for q in [
            "$.likes",
            "$.likes[0]",
            "$.*[*]",
            "$..likes[*]",
            "$.a[*].b[*]",
        ] {
            assert!(plan(q).is_none(), "{q}");
        }
    }

    #[test]
    fn elements_come_out_pruned_and_in_order() {
        let p = plan("$.a.likes[*]").expect("plan");
        let text = r#"{"x": [1, {"y": "]}"}], "a": {"likes": [ {"t": "one", "about": "[{\"" }, {"t": "two"}, 3 ], "z": null}, "w": "\u00e9"}"#;
        for piece in [1, 2, 3, 7, 64] {
            let (got, depth) = run(&p, text, piece).expect("split");
            assert_eq!(
                got,
                vec![
                    serde_json::json!({"t": "one"}),
                    serde_json::json!({"t": "two"}),
                    serde_json::json!(3)
                ]
            );
            // The same count as the whole-text scan.
            assert_eq!(depth, super::super::json_depth(text));
        }
    }

    #[test]
    fn anything_unexpected_is_refused() {
        let p = plan("$.likes[*]").expect("plan");
        let cases = [
            (r#"{"likes": [1, 2]"#, Unsplit::Truncated),
            (r#"{"likes": [1, 2]} x"#, Unsplit::Syntax(18)),
            (r#"{"likes": [1, 2,]}"#, Unsplit::Syntax(16)),
            (r#"{"likes": {"a": 1}}"#, Unsplit::Shape),
            (r#"{"other": [1]}"#, Unsplit::Shape),
            (r#"{"likes": [1], "likes": [2]}"#, Unsplit::Duplicate),
            (r#"{"likes": [1 2]}"#, Unsplit::Syntax(14)),
            (r#"{"likes": [{"t": 1 2}]}"#, Unsplit::Value),
            (r#"{"n": tru, "likes": []}"#, Unsplit::Value),
            (r#"[1]"#, Unsplit::Shape),
        ];
        for (text, want) in cases {
            assert_eq!(run(&p, text, 3).map(|_| ()), Err(want), "{text}");
        }
        let bad = b"{\"likes\": [\"caf\xE9\"]}";
        let mut given = false;
        let mut fill = |buf: &mut Vec<u8>| {
            if !given {
                buf.extend_from_slice(bad);
                given = true;
            }
            false
        };
        let r = split_records(&p, 128, &mut fill, &mut |_| true);
        assert_eq!(r, Err(Unsplit::Utf8));
    }

    #[test]
    fn nesting_over_the_limit_is_refused() {
        let p = plan("$[*]").expect("plan");
        let text = "[[[[1]]]]";
        let mut rest = text.as_bytes();
        let mut fill = |buf: &mut Vec<u8>| {
            buf.extend_from_slice(rest);
            rest = &[];
            false
        };
        let r = split_records(&p, 3, &mut fill, &mut |_| true);
        assert_eq!(r, Err(Unsplit::Depth(3)));
        assert_eq!(run(&p, text, 2).map(|r| r.1), Ok(4));
    }
}
