//! Where reports go: standard output, or a file created owner-only (0600 on Unix) and
//! written through a temporary file so a failed write never leaves half a report.
//! Also decides on colour (terminal, `NO_COLOR`, `--colour`).

use std::fs;
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

/// Create or replace a file readable and writable by the owner only.
pub fn write_private(
    path: &Path,
    render: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let mut tmp = tempfile_in(dir).with_context(|| format!("cannot write in {}", dir.display()))?;
    {
        let mut w = io::BufWriter::new(&mut tmp.1);
        render(&mut w).with_context(|| format!("cannot write {}", path.display()))?;
        w.flush()?;
    }
    tmp.1.sync_all()?;
    fs::rename(&tmp.0, path).with_context(|| format!("cannot write {}", path.display()))?;
    Ok(())
}

fn tempfile_in(dir: &Path) -> io::Result<(std::path::PathBuf, fs::File)> {
    let mut opts = fs::OpenOptions::new();
    opts.write(true).create_new(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        opts.mode(0o600);
    }
    for n in 0..1000u32 {
        let candidate = dir.join(format!(".telltale-{}-{n}.tmp", std::process::id()));
        match opts.open(&candidate) {
            Ok(f) => return Ok((candidate, f)),
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => continue,
            Err(e) => return Err(e),
        }
    }
    Err(io::Error::other("no free temporary file name"))
}
