//! `telltale explore ARCHIVE` and `telltale ARCHIVE`: the explorer on a terminal; off a
//! terminal (a pipe, a file, a script) the text report instead, so scripts never hang.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;

use super::args::{SessionArgs, SourceArgs};
use super::scan;
use crate::tui;

pub fn run(archive: PathBuf, src: SourceArgs, session: SessionArgs) -> Result<ExitCode> {
    if !tui::interactive() {
        return scan::run_default(archive, src);
    }
    // Built on the explorer's loading thread: the bundled word lists take a noticeable
    // moment to read, and the loading screen should be up first. A bad option still
    // ends the explorer with the same message.
    let priors = src.priors.clone();
    let rarity = scan::rarity(&src)?;
    tui::run(tui::Options {
        archive: archive.clone(),
        rarity,
        input: Box::new(move || scan::input(archive, &src)),
        priors,
        no_save: session.no_save || telltale::decisions::no_save_from_env(),
        remember_real_values: session.remember_real_values,
    })?;
    Ok(ExitCode::SUCCESS)
}
