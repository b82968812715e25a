//! `telltale explore ARCHIVE` and `telltale ARCHIVE`: the explorer on a terminal; off a
//! terminal (a pipe, a file, a script) the text report instead, so scripts never hang.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;

use super::args::SourceArgs;
use super::scan;
use crate::tui;

pub fn run(archive: PathBuf, src: SourceArgs) -> Result<ExitCode> {
    if !tui::interactive() {
        return scan::run_default(archive, src);
    }
    let input = scan::input(archive, &src)?;
    tui::run(tui::Options {
        input,
        priors: src.priors.clone(),
    })?;
    Ok(ExitCode::SUCCESS)
}
