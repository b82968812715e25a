//! `telltale completions SHELL` and `telltale man`: shell completion scripts and manual
//! pages, made from the same clap definitions as `--help` so they cannot drift from it.

use std::io::Write;
use std::path::Path;
use std::process::ExitCode;

use anyhow::{Context, Result};
use clap::CommandFactory;
use clap_complete::Shell;

use super::args::Cli;

/// Print the completion script for `shell` on standard output.
pub fn completions(shell: Shell) -> Result<ExitCode> {
    let mut cmd = Cli::command();
    let mut out = Vec::new();
    clap_complete::generate(shell, &mut cmd, "telltale", &mut out);
    write_stdout(&out)?;
    Ok(ExitCode::SUCCESS)
}

/// Print telltale.1 on standard output, or write every command's page into `dir`.
pub fn man(dir: Option<&Path>) -> Result<ExitCode> {
    let cmd = Cli::command();
    match dir {
        None => {
            let mut out = Vec::new();
            clap_mangen::Man::new(cmd)
                .render(&mut out)
                .context("cannot make the manual page")?;
            write_stdout(&out)?;
        }
        Some(dir) => {
            std::fs::create_dir_all(dir)
                .with_context(|| format!("cannot make the folder {}", dir.display()))?;
            clap_mangen::generate_to(cmd, dir)
                .with_context(|| format!("cannot write the manual pages in {}", dir.display()))?;
            let mut pages: Vec<String> = std::fs::read_dir(dir)
                .with_context(|| format!("cannot list {}", dir.display()))?
                .filter_map(|e| e.ok())
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .filter(|n| n.starts_with("telltale") && n.ends_with(".1"))
                .collect();
            pages.sort();
            println!(
                "Wrote {} in {} (read one with `man -l {}`).",
                telltale::reading::count(pages.len(), "manual page", "manual pages"),
                dir.display(),
                dir.join("telltale.1").display()
            );
        }
    }
    Ok(ExitCode::SUCCESS)
}

/// Write to standard output; a closed pipe (`telltale man | head`) is not an error.
fn write_stdout(bytes: &[u8]) -> Result<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(bytes).and_then(|()| out.flush()) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
            Err(e).context("cannot write to standard output")
        }
        _ => Ok(()),
    }
}
