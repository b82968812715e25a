//! `telltale forget ARCHIVE` and `telltale forget --all`: remove what the explorer saved
//! on this computer (for one archive, found by its fingerprint, or for all) and say
//! exactly which files went.

use std::process::ExitCode;

use anyhow::{Context, Result};
use telltale::decisions::Store;

use super::args::ForgetArgs;
use super::scan::input;

pub fn run(args: &ForgetArgs) -> Result<ExitCode> {
    let store = Store::locate()?;
    let (removed, what) = if args.all {
        (store.forget_all()?, "for any archive".to_string())
    } else {
        let Some(archive) = &args.archive else {
            anyhow::bail!("give an archive, or --all");
        };
        // The decisions are filed under the archive's fingerprint, which reading it
        // gives (the same reading the explorer does, without scoring).
        let scan_input = input(archive.clone(), &args.input)?;
        let fingerprint = telltale::scan::fingerprint(&scan_input).with_context(|| {
            format!(
                "cannot read {} to find what was saved for it (telltale forget --all removes what was saved for every archive)",
                archive.display()
            )
        })?;
        (
            store.forget(&fingerprint)?,
            format!("for {}", archive.display()),
        )
    };
    if removed.is_empty() {
        println!(
            "Nothing to remove: nothing is saved {what} in {}.",
            store.dir().display()
        );
    } else {
        println!(
            "Removed what was saved {what} ({}):",
            telltale::reading::count(removed.len(), "file", "files")
        );
        for p in &removed {
            println!("  {}", p.display());
        }
    }
    Ok(ExitCode::SUCCESS)
}
