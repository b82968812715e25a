//! The command line, as clap derives it.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// telltale: see what your own social-network archive gives away about your age band,
/// home location, political leaning and religion, and what to hide. Runs offline.
#[derive(Debug, Parser)]
#[command(name = "telltale", version, args_conflicts_with_subcommands = true)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Option<Command>,

    /// Archive to look at (zip file or unpacked folder).
    pub archive: Option<std::path::PathBuf>,

    #[command(flatten)]
    pub input: SourceArgs,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Report what an observer could infer from an archive.
    Scan(ScanArgs),
    /// Open the explorer: see what gives you away, try hiding it, save your decisions.
    Explore(ExploreArgs),
    /// Generate fictional data: the demo priors and persona archives.
    #[command(subcommand)]
    Synth(SynthCommand),
}

#[derive(Debug, Subcommand)]
pub enum SynthCommand {
    /// Regenerate the bundled demo: reference priors and persona archives of the
    /// fictional Lanternwick network (reproducible from the seed).
    Demo(SynthDemoArgs),
}

#[derive(Debug, Args)]
pub struct SynthDemoArgs {
    /// Random seed; the same seed gives the same files.
    #[arg(long, default_value_t = 7)]
    pub seed: u64,
    /// Where to write the priors file.
    #[arg(
        long,
        value_name = "FILE",
        default_value = "reference-priors/demo-priors.json"
    )]
    pub priors_out: PathBuf,
    /// Folder for the persona archives, their mappings and manifest.json.
    #[arg(long, value_name = "DIR", default_value = "demo-exports")]
    pub exports_out: PathBuf,
    /// Members counted into the priors.
    #[arg(long, default_value_t = 20_000)]
    pub members: usize,
    /// Items in the fictional network.
    #[arg(long, default_value_t = 1_600)]
    pub items: usize,
}

/// Where the mapping, priors and limits come from.
#[derive(Debug, Args, Clone, Default)]
pub struct SourceArgs {
    /// Mapping file describing the archive's layout (default: one inside or beside
    /// the archive).
    #[arg(long, value_name = "FILE")]
    pub mapping: Option<PathBuf>,

    /// Reference priors (default: the bundled demo priors, which describe a fictional
    /// population).
    #[arg(long, value_name = "FILE")]
    pub priors: Option<PathBuf>,

    /// Raise or lower a reading limit, e.g. --limit entry-bytes=2G. Limits:
    /// entry-bytes, total-bytes, entries, folder-depth, records, line-bytes,
    /// json-depth.
    #[arg(long = "limit", value_name = "NAME=VALUE")]
    pub limits: Vec<String>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ReportFormat {
    Text,
    Json,
    Markdown,
    /// A self-contained web page (inline styles and SVG charts, no scripts).
    Html,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ColourChoice {
    Auto,
    Always,
    Never,
}

/// How a report is written.
#[derive(Debug, Args, Clone)]
pub struct OutputArgs {
    /// Report format.
    #[arg(long, value_enum, default_value_t = ReportFormat::Text)]
    pub format: ReportFormat,

    /// Write the report to FILE (created readable by you only) instead of standard
    /// output.
    #[arg(long, short, value_name = "FILE")]
    pub output: Option<PathBuf>,

    /// Colour in text reports: auto uses colour on a terminal unless NO_COLOR is set.
    #[arg(long, value_enum, default_value_t = ColourChoice::Auto)]
    pub colour: ColourChoice,
}

#[derive(Debug, Args)]
pub struct ScanArgs {
    /// Archive: a zip file or an unpacked folder.
    pub archive: PathBuf,

    #[command(flatten)]
    pub input: SourceArgs,

    #[command(flatten)]
    pub output: OutputArgs,

    /// How many items to list in text and Markdown reports.
    #[arg(long, default_value_t = 15)]
    pub top: usize,
}

#[derive(Debug, Args)]
pub struct ExploreArgs {
    /// Archive: a zip file or an unpacked folder.
    pub archive: PathBuf,

    #[command(flatten)]
    pub input: SourceArgs,
}
