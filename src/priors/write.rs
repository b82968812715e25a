//! Writing a priors file: readable header, one reference item per line (so a table of
//! thousands of items stays diff-friendly), whole-number counts written without ".0".

use std::io::{self, Write};

use serde_json::Value;

use super::file::{ItemSpec, PriorsFile};

fn integral(v: &mut Value) {
    match v {
        Value::Number(n) => {
            if let Some(f) = n.as_f64()
                && f.fract() == 0.0
                && f.abs() < 9.0e15
                && !n.is_i64()
                && !n.is_u64()
            {
                *v = Value::from(f as i64);
            }
        }
        Value::Array(a) => a.iter_mut().for_each(integral),
        Value::Object(o) => o.values_mut().for_each(integral),
        _ => {}
    }
}

/// Write `file` as JSON.
pub fn write_priors(file: &PriorsFile, out: &mut dyn Write) -> io::Result<()> {
    write_priors_streaming(file, file.items.iter().cloned().map(Ok), out)
}

/// Write the header of `header` (its own `items` are ignored) followed by `items` as
/// they come, so a table of millions of items is never held in memory whole.
pub fn write_priors_streaming(
    header: &PriorsFile,
    items: impl Iterator<Item = io::Result<ItemSpec>>,
    out: &mut dyn Write,
) -> io::Result<()> {
    let to_io = |e: serde_json::Error| io::Error::other(e.to_string());
    writeln!(out, "{{")?;
    writeln!(out, "  \"format\": {},", header.format)?;
    let prov = serde_json::to_string_pretty(&header.provenance).map_err(to_io)?;
    writeln!(out, "  \"provenance\": {},", prov.replace('\n', "\n  "))?;
    let attrs = serde_json::to_string_pretty(&header.attributes).map_err(to_io)?;
    writeln!(out, "  \"attributes\": {},", attrs.replace('\n', "\n  "))?;
    write!(out, "  \"items\": [")?;
    let mut first = true;
    for item in items {
        let mut v = serde_json::to_value(item?).map_err(to_io)?;
        integral(&mut v);
        let line = serde_json::to_string(&v).map_err(to_io)?;
        let comma = if first { "" } else { "," };
        first = false;
        write!(out, "{comma}\n    {line}")?;
    }
    writeln!(out, "\n  ]")?;
    writeln!(out, "}}")
}
