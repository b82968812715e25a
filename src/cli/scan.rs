//! `telltale scan`: import, score and report.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result};
use telltale::evidence::Sources;
use telltale::limits::Limits;
use telltale::report::{RowCount, TextOptions, write_html, write_markdown, write_text};
use telltale::scan::{Scan, ScanInput, load_priors_within};

use super::args::{ColourChoice, OutputArgs, ReportFormat, ScanArgs, SourceArgs};
use super::output::{emit, use_colour};

/// Build the scan input from the shared arguments.
pub fn input(archive: PathBuf, src: &SourceArgs) -> Result<ScanInput> {
    let limits = limits(src)?;
    let mut sources = match &src.sources {
        Some(list) => Sources::parse_list(list).map_err(|e| anyhow::anyhow!("--sources: {e}"))?,
        None => Sources::all(),
    };
    sources.home_levels = src.home_levels;
    Ok(ScanInput {
        archive,
        mapping: src.mapping.clone(),
        limits,
        sources,
        friends_file: src.friends.clone(),
    })
}

/// The reading limits: the defaults with the --limit settings applied.
pub fn limits(src: &SourceArgs) -> Result<Limits> {
    let mut limits = Limits::default();
    for setting in &src.limits {
        limits
            .apply(setting)
            .map_err(|e| anyhow::anyhow!("--limit {setting}: {e}"))?;
    }
    Ok(limits)
}

/// Load the priors the flags name (or the bundled ones), note what the cache did, and
/// apply the rarity settings of the alert rule.
pub fn priors(src: &SourceArgs) -> Result<telltale::priors::Priors> {
    let mut priors = load_priors_within(src.priors.as_deref(), &limits(src)?)
        .context("cannot use the priors")?;
    note_cache(&priors);
    priors.rarity = rarity(src)?;
    Ok(priors)
}

/// The rarity settings from --rarity-floor and --rarity-lift (defaults where not
/// given), checked.
pub fn rarity(src: &SourceArgs) -> Result<telltale::alert::Rarity> {
    let default = telltale::alert::Rarity::default();
    let floor = match &src.rarity_floor {
        Some(s) => super::plan::probability("--rarity-floor", s)?,
        None => default.floor,
    };
    let lift = src.rarity_lift.unwrap_or(default.lift);
    telltale::alert::Rarity::new(floor, lift).map_err(|e| anyhow::anyhow!("{e}"))
}

/// What the priors cache did: its problems (a cache refused or unwritable) always,
/// the rest on a terminal only (scripts stay quiet).
pub fn note_cache(priors: &telltale::priors::Priors) {
    use std::io::IsTerminal;
    let terminal = std::io::stderr().is_terminal();
    for n in &priors.cache_notes {
        if terminal || telltale::priors::is_cache_problem(n) {
            eprintln!("priors: {n}");
        }
    }
}

pub fn run(args: &ScanArgs) -> Result<ExitCode> {
    let mut priors = priors(&args.input)?;
    let input = input(args.archive.clone(), &args.input)?;
    let pb = super::cohort::byte_bar("importing");
    let scan = Scan::run_with_progress(&input, &mut priors, &mut |done, total| {
        super::cohort::byte_progress(&pb, done, total)
    });
    pb.finish_and_clear();
    let scan = scan?;
    // The evidence is gathered: the parsed lexicons are not needed again.
    telltale::lexicon::release_bundled();
    let to_file = args.output.output.is_some();
    let colour = use_colour(args.output.colour, to_file);
    let top = args.top;
    // The JSON report streams every row; the others show only the first `top`.
    let shown = || scan.report_with(&priors, RowCount::First(top));
    emit(args.output.output.as_deref(), |out| {
        match args.output.format {
            ReportFormat::Text => write_text(&shown(), TextOptions { colour, top }, out),
            ReportFormat::Json => scan.write_json(&priors, out),
            ReportFormat::Markdown => write_markdown(&shown(), top, out),
            ReportFormat::Html => write_html(&shown(), top, out),
        }
    })?;
    Ok(ExitCode::SUCCESS)
}

/// `telltale ARCHIVE` with no command.
pub fn run_default(archive: PathBuf, src: SourceArgs) -> Result<ExitCode> {
    run(&ScanArgs {
        archive,
        input: src,
        output: OutputArgs {
            format: ReportFormat::Text,
            output: None,
            colour: ColourChoice::Auto,
        },
        top: 15,
    })
}
