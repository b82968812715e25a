//! `telltale mapping draft` and `telltale mapping check`: print a draft mapping for an
//! archive, or what each source of a mapping finds in it. The library does the work;
//! this file only prints.

use std::io::Write;
use std::path::Path;
use std::process::ExitCode;

use anyhow::{Context, Result};
use telltale::archive::Archive;
use telltale::limits::Limits;
use telltale::mapping::{self, Mapping, MappingCheck, SourceKind, check_against, draft};
use telltale::reading::count;
use telltale::scan::load_priors_within;

use super::args::{MappingCheckArgs, MappingCommand, MappingDraftArgs};
use super::output::emit;

/// Warnings shown per source before the rest are counted.
const WARNINGS_SHOWN: usize = 5;

pub fn run(cmd: MappingCommand) -> Result<ExitCode> {
    match cmd {
        MappingCommand::Draft(args) => run_draft(&args),
        MappingCommand::Check(args) => run_check(&args),
    }
}

fn limits(settings: &[String]) -> Result<Limits> {
    let mut limits = Limits::default();
    for setting in settings {
        limits
            .apply(setting)
            .map_err(|e| anyhow::anyhow!("--limit {setting}: {e}"))?;
    }
    Ok(limits)
}

fn run_draft(args: &MappingDraftArgs) -> Result<ExitCode> {
    let limits = limits(&args.limits)?;
    let priors =
        load_priors_within(args.priors.as_deref(), &limits).context("cannot use the priors")?;
    let mut archive = Archive::open(&args.archive, &limits)?;
    let drafted = draft(&mut archive, &priors, &limits);
    for w in drafted.warnings() {
        eprintln!("warning: {w}");
    }
    emit(None, |out| out.write_all(drafted.to_toml().as_bytes()))?;
    let save_as = mapping::beside_mapping(&args.archive)
        .map(|p| p.display().to_string())
        .unwrap_or_else(|| "YOUR-FILE.toml".into());
    eprintln!(
        "Drafted {} from {} of {}. Save it, check every guess, then try it:\n  telltale mapping draft {} > {save_as}\n  telltale mapping check {} --mapping {save_as}\nSaved as {save_as} (beside the archive, with its name) it is found without --mapping.",
        count(drafted.sources.len(), "source", "sources"),
        count(drafted.data_files(), "data file", "data files"),
        drafted.archive,
        args.archive.display(),
        args.archive.display()
    );
    Ok(ExitCode::SUCCESS)
}

fn run_check(args: &MappingCheckArgs) -> Result<ExitCode> {
    let limits = limits(&args.limits)?;
    let mapping = match &args.mapping {
        Some(p) => Mapping::load_within(p, &limits)?,
        None => {
            let mut archive = Archive::open(&args.archive, &limits)?;
            let found = mapping::locate_within(&mut archive, &limits)?;
            Mapping::parse(&found.text, &found.origin)?
        }
    };
    let check = check_against(&mapping, &args.archive, &limits)?;
    let archive = args.archive.display().to_string();
    emit(None, |out| {
        write_checks(out, &archive, args.mapping.as_deref(), &mapping, &check)
    })?;
    let empty = check.sources.iter().filter(|c| c.kept == 0).count();
    Ok(if empty == 0 {
        ExitCode::SUCCESS
    } else {
        // Scripts can tell "some source found nothing" from success.
        ExitCode::from(3)
    })
}

fn write_checks(
    out: &mut dyn Write,
    archive: &str,
    given: Option<&Path>,
    mapping: &Mapping,
    check: &MappingCheck,
) -> std::io::Result<()> {
    let checks = &check.sources;
    writeln!(
        out,
        "{} with the mapping {} ({}):",
        archive,
        mapping.origin,
        count(checks.len(), "source", "sources")
    )?;
    for w in &check.archive_warnings {
        writeln!(out, "warning: {w}")?;
    }
    for c in checks {
        writeln!(out)?;
        writeln!(out, "{}. {}", c.number, c.title())?;
        match c.files.len() {
            0 => writeln!(out, "   files:   none match")?,
            1..=3 => writeln!(out, "   files:   {}", c.files.join(", "))?,
            n => writeln!(
                out,
                "   files:   {}, … ({n} in all)",
                c.files[..2].join(", ")
            )?,
        }
        let dated = if c.kind == SourceKind::SelfDeclared {
            String::new()
        } else {
            format!(", {} with a date", c.dated)
        };
        writeln!(
            out,
            "   records: {} read, {} skipped; {} kept{dated}",
            c.records_seen,
            c.records_skipped,
            c.kept_words(),
        )?;
        for w in c.warnings.iter().take(WARNINGS_SHOWN) {
            writeln!(out, "   warning: {w}")?;
        }
        if c.warnings.len() > WARNINGS_SHOWN {
            writeln!(
                out,
                "   … and {}",
                count(
                    c.warnings.len() - WARNINGS_SHOWN,
                    "more warning",
                    "more warnings"
                )
            )?;
        }
    }
    let empty = checks.iter().filter(|c| c.kept == 0).count();
    writeln!(out)?;
    if empty == 0 {
        let with = match given {
            Some(p) => format!(" --mapping {}", p.display()),
            None => String::new(),
        };
        writeln!(
            out,
            "Every source found something. See what it gives away: telltale scan {archive}{with}"
        )
    } else {
        writeln!(
            out,
            "{} nothing: fix their files, records or name settings (docs/mapping.md).",
            count(empty, "source found", "sources found")
        )
    }
}
