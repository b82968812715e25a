//! Where reports go: standard output, or a file created owner-only (0600 on Unix) and
//! written through a temporary file so a failed write never leaves half a report.
//! Also decides on colour (terminal, `NO_COLOR`, `--colour`).

use std::io::{self, IsTerminal, Write};
use std::path::Path;

use anyhow::{Context, Result};

use super::args::ColourChoice;

/// Whether text output should be coloured.
pub fn use_colour(choice: ColourChoice, to_file: bool) -> bool {
    match choice {
        ColourChoice::Always => true,
        ColourChoice::Never => false,
        ColourChoice::Auto => {
            !to_file
                && io::stdout().is_terminal()
                && std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
        }
    }
}

/// Write `render`'s output to `path` (owner-only) or to standard output.
pub fn emit(
    path: Option<&Path>,
    render: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> Result<()> {
    match path {
        None => {
            let stdout = io::stdout();
            let mut lock = stdout.lock();
            match render(&mut lock).and_then(|_| lock.flush()) {
                Ok(()) => Ok(()),
                // A closed pipe (`telltale scan … | head`) is not an error.
                Err(e) if e.kind() == io::ErrorKind::BrokenPipe => Ok(()),
                Err(e) => Err(e).context("cannot write the report"),
            }
        }
        Some(path) => write_private(path, render),
    }
}

/// Create or replace a file readable and writable by the owner only, atomically (see
/// `telltale::safe_write`: a device or pipe such as `/dev/null` is written into, never
/// replaced).
pub fn write_private(
    path: &Path,
    render: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> Result<()> {
    telltale::safe_write::write_atomic(path, render)
        .with_context(|| format!("cannot write {}", path.display()))
}
