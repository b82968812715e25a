//! The command line, as clap derives it.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// See what your own social-network archive gives away about your age band, home
/// location, political leaning and religion, and what to hide. Runs offline.
#[derive(Debug, Parser)]
#[command(name = "telltale", version, args_conflicts_with_subcommands = true)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Option<Command>,

    /// Archive to look at (zip file or unpacked folder).
    pub archive: Option<std::path::PathBuf>,

    #[command(flatten)]
    pub input: SourceArgs,

    #[command(flatten)]
    pub session: SessionArgs,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Report what an observer could infer from an archive.
    Scan(ScanArgs),
    /// Find the smallest set of items to hide so no attribute is guessed above your
    /// alert levels, and compare it with the usual coarse advice.
    Plan(PlanArgs),
    /// Open the explorer: see what gives you away, try hiding it, save your decisions.
    Explore(ExploreArgs),
    /// Generate fictional data: the demo priors and persona archives.
    #[command(subcommand)]
    Synth(SynthCommand),
    /// Build reference priors from a consenting group's archives.
    #[command(subcommand)]
    Priors(PriorsCommand),
    /// Measure how well the observer model guesses a labelled cohort's attributes.
    Eval(EvalArgs),
    /// Write a first mapping for a new archive layout, or check one against an archive.
    #[command(subcommand)]
    Mapping(MappingCommand),
    /// Remove what the explorer saved on this computer for an archive (hidden and
    /// kept items, real values, alert levels, goal), or for every archive with --all.
    Forget(ForgetArgs),
    /// Print a completion script for your shell (bash, zsh, fish, powershell, elvish),
    /// e.g. `telltale completions bash > ~/.local/share/bash-completion/completions/telltale`.
    Completions(CompletionsArgs),
    /// Print the manual page (roff; `telltale man | man -l -`), or write one page per
    /// command into a folder with --dir.
    Man(ManArgs),
}

/// What the explorer keeps between runs.
#[derive(Debug, Args, Clone, Default)]
pub struct SessionArgs {
    /// Restore nothing and save nothing on this computer (a shared or workshop
    /// computer): the cautions open every run. Setting TELLTALE_NO_SAVE=1 does the same
    /// for every run.
    #[arg(long, visible_alias = "fresh")]
    pub no_save: bool,

    /// Save your real values with your other decisions, so they come back next time.
    /// RISK: anyone who can read your files on this computer can then read them.
    #[arg(long, conflicts_with = "no_save")]
    pub remember_real_values: bool,
}

#[derive(Debug, Args)]
pub struct ForgetArgs {
    /// The archive whose saved decisions to remove (zip file or unpacked folder).
    #[arg(required_unless_present = "all", conflicts_with = "all")]
    pub archive: Option<PathBuf>,

    /// Remove the saved decisions of every archive, and the note that the cautions
    /// were shown (so they open again).
    #[arg(long)]
    pub all: bool,

    #[command(flatten)]
    pub input: SourceArgs,
}

#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell to complete for.
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}

#[derive(Debug, Args)]
pub struct ManArgs {
    /// Write telltale.1 and a page for each command (telltale-scan.1, …) into this
    /// folder instead of printing telltale.1.
    #[arg(long, value_name = "DIR")]
    pub dir: Option<PathBuf>,
}

#[derive(Debug, Subcommand)]
pub enum MappingCommand {
    /// Inspect an archive's structure and print a commented draft mapping to check and
    /// edit: `telltale mapping draft me.zip > me.mapping.toml` (the name telltale looks
    /// for beside the archive).
    Draft(MappingDraftArgs),
    /// Show what each source of a mapping finds in an archive: files, records, items.
    Check(MappingCheckArgs),
}

#[derive(Debug, Args)]
pub struct MappingDraftArgs {
    /// Archive: a zip file or an unpacked folder. Nothing is written into it.
    pub archive: PathBuf,
    /// Reference priors whose attribute values mark friends' and your own attribute
    /// fields (default: the bundled demo priors).
    #[arg(long, value_name = "FILE")]
    pub priors: Option<PathBuf>,
    /// Raise or lower a reading limit, e.g. --limit entry-bytes=2G.
    #[arg(long = "limit", value_name = "NAME=VALUE")]
    pub limits: Vec<String>,
}

#[derive(Debug, Args)]
pub struct MappingCheckArgs {
    /// Archive: a zip file or an unpacked folder.
    pub archive: PathBuf,
    /// Mapping file to check (default: the one telltale finds inside or beside the
    /// archive).
    #[arg(long, value_name = "FILE")]
    pub mapping: Option<PathBuf>,
    /// Raise or lower a reading limit, e.g. --limit entry-bytes=2G.
    #[arg(long = "limit", value_name = "NAME=VALUE")]
    pub limits: Vec<String>,
}

#[derive(Debug, Subcommand)]
pub enum SynthCommand {
    /// Generate the demo into a folder you name: reference priors and persona archives
    /// of the fictional Lanternwick network (reproducible from the seed).
    Demo(SynthDemoArgs),
    /// Write a cohort of invented members' archives (layout A, with their declared
    /// attributes) and the mapping beside them, for `priors build` and `eval`.
    Cohort(SynthCohortArgs),
    /// Write the large benchmark archive (100,000 likes, 10,000 groups, 5,000
    /// friends, media padding) as a zip with its mapping inside.
    Large(SynthLargeArgs),
    /// Write the large benchmark priors file (1,000,000 items × 4 attributes) whose
    /// items the large archive is drawn from (use the same seed).
    PriorsLarge(SynthPriorsLargeArgs),
}

#[derive(Debug, Args)]
pub struct SynthLargeArgs {
    /// Zip file to write.
    pub out: PathBuf,
    /// Random seed; the same seed gives the same archive.
    #[arg(long, default_value_t = 11)]
    pub seed: u64,
    /// Media padding in MiB (never read by an import).
    #[arg(long, value_name = "MB", default_value_t = 2048)]
    pub media_mb: u64,
    /// Liked pages.
    #[arg(long, default_value_t = 100_000)]
    pub likes: usize,
    /// Group memberships.
    #[arg(long, default_value_t = 10_000)]
    pub groups: usize,
    /// Friends.
    #[arg(long, default_value_t = 5_000)]
    pub friends: usize,
    /// Approximate bytes of description text per page or group.
    #[arg(long, value_name = "BYTES", default_value_t = 2_000)]
    pub about_bytes: usize,
    /// Items of the reference table the archive's items come from (match
    /// `synth priors-large --items`).
    #[arg(long, default_value_t = 1_000_000)]
    pub table_items: u64,
}

#[derive(Debug, Args)]
pub struct SynthPriorsLargeArgs {
    /// Priors file to write.
    pub out: PathBuf,
    /// Random seed (the same as `synth large` for items that belong together).
    #[arg(long, default_value_t = 11)]
    pub seed: u64,
    /// Reference items.
    #[arg(long, default_value_t = 1_000_000)]
    pub items: u64,
}

#[derive(Debug, Args)]
pub struct SynthCohortArgs {
    /// How many members (archives).
    #[arg(long, default_value_t = 500)]
    pub members: usize,
    /// Folder to write the archives and mapping into.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Random seed; 7 with 1,600 items gives the demo network, whose items the bundled
    /// demo priors list.
    #[arg(long, default_value_t = 7)]
    pub seed: u64,
    /// Items in the fictional network.
    #[arg(long, default_value_t = 1_600)]
    pub items: usize,
}

#[derive(Debug, Subcommand)]
pub enum PriorsCommand {
    /// Count a cohort's memberships and write a priors file, released with the
    /// Laplace mechanism (differential privacy).
    Build(PriorsBuildArgs),
}

/// What a cohort is read with.
#[derive(Debug, Args, Clone)]
pub struct CohortArgs {
    /// Folder holding the archives (unpacked folders or zip files), each with its
    /// mapping inside or beside it and a `self` source for the declared attributes.
    pub cohort: PathBuf,
    /// Priors file giving the attributes (ids, values, labels, thresholds) and the
    /// candidate items to count (default: the bundled demo priors).
    #[arg(long, value_name = "FILE")]
    pub schema: Option<PathBuf>,
    /// Items counted per contributor at most (bounds one person's influence).
    #[arg(long, value_name = "M", default_value_t = 50)]
    pub max_items: usize,
    /// Items with fewer (noisy) members than this are left out.
    #[arg(long, value_name = "K", default_value_t = 10.0)]
    pub min_members: f64,
    /// Raise or lower a reading limit for every archive, e.g. --limit entries=20000.
    #[arg(long = "limit", value_name = "NAME=VALUE")]
    pub limits: Vec<String>,
}

#[derive(Debug, Args)]
pub struct PriorsBuildArgs {
    #[command(flatten)]
    pub cohort: CohortArgs,
    /// Privacy budget ε per contributor (smaller is more private and noisier).
    #[arg(long)]
    pub epsilon: f64,
    /// Where to write the priors file (created readable by you only).
    #[arg(long, short, value_name = "FILE", default_value = "cohort-priors.json")]
    pub output: PathBuf,
    /// Seed the noise, making the file reproducible. Anyone who knows the seed can
    /// remove the noise: use only for tests and demonstrations.
    #[arg(long)]
    pub seed: Option<u64>,
    /// Also fit smoothing and the logistic calibration on the cohort's declared
    /// attributes. Those fitted numbers are not covered by ε.
    #[arg(long)]
    pub calibrate: bool,
    /// Who produced the statistics (provenance).
    #[arg(long, default_value = "telltale priors build: a consenting cohort")]
    pub source: String,
    /// Licence of the statistics (provenance).
    #[arg(long, default_value = "CC-BY-4.0")]
    pub licence: String,
    /// Date recorded in the provenance, YYYY-MM-DD (default: today).
    #[arg(long, value_name = "DATE")]
    pub created: Option<String>,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum EvalFormat {
    Text,
    Json,
    Markdown,
    Html,
}

#[derive(Debug, Args)]
pub struct EvalArgs {
    #[command(flatten)]
    pub cohort: CohortArgs,
    /// Shares of members whose attributes are public (and feed the statistics): one
    /// value, a list (0.1,0.5), or a range FROM..TO[:STEP] (step 0.1 by default).
    #[arg(long, value_name = "SHARES", default_value = "0.1..0.9:0.2")]
    pub public_share: String,
    /// Cross-validation folds.
    #[arg(long, default_value_t = 5)]
    pub folds: usize,
    /// Release each fold's statistics with the Laplace mechanism at this ε, as
    /// `priors build` would (default: exact statistics, as an observer with full data
    /// has).
    #[arg(long)]
    pub epsilon: Option<f64>,
    /// Seed for the folds, the item choice and any noise.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Report format.
    #[arg(long, value_enum, default_value_t = EvalFormat::Text)]
    pub format: EvalFormat,
    /// Write the report to FILE (created readable by you only).
    #[arg(long, short, value_name = "FILE")]
    pub output: Option<PathBuf>,
}

#[derive(Debug, Args)]
pub struct SynthDemoArgs {
    /// Folder to write into: DIR/reference-priors/demo-priors.json and
    /// DIR/demo-exports/ (`--out . --force` in a checkout regenerates the bundled demo).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Replace files that are there with other contents (files already equal to what
    /// the generator makes are never rewritten).
    #[arg(long)]
    pub force: bool,
    /// Random seed; the same seed gives the same files.
    #[arg(long, default_value_t = 7)]
    pub seed: u64,
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
    /// json-depth, compression-ratio; for the priors file priors-bytes, priors-items,
    /// attributes, values, aliases, name-bytes; friends-bytes, friends-rows;
    /// mapping-bytes (docs/mapping.md, "Reading limits").
    #[arg(long = "limit", value_name = "NAME=VALUE")]
    pub limits: Vec<String>,

    /// Evidence sources to use, comma-separated: table, places, life-stages,
    /// vocabulary, friends, or all (the default). `--sources table` uses the reference
    /// table alone.
    #[arg(long, value_name = "LIST")]
    pub sources: Option<String>,

    /// Read home place at three levels for the whole world: home_country (every
    /// country), home_region and home_town, in place of the priors' location values
    /// (which then refine within their country). Preview: see docs/evidence.md.
    #[arg(long)]
    pub home_levels: bool,

    /// A CSV file of some friends' attributes (columns: name and/or id, then one per
    /// attribute, e.g. location, politics). Merged with the archive's friends; names
    /// are used for matching only and never reported.
    #[arg(long, value_name = "FILE")]
    pub friends: Option<PathBuf>,

    /// Neither read nor write the binary cache that makes a large priors file load
    /// fast (see docs/priors.md).
    #[arg(long)]
    pub no_cache: bool,

    /// Rare values count as exposed, whatever the alert level, when their probability
    /// is over this and over --rarity-lift times their population rate, e.g. 20% or
    /// 0.2 (default 20%; 100% turns the rule for rare values off).
    #[arg(long, value_name = "P")]
    pub rarity_floor: Option<String>,

    /// How many times its population rate a rare value must pass to count as exposed
    /// (default 5).
    #[arg(long, value_name = "X")]
    pub rarity_lift: Option<f64>,
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

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlanMethod {
    /// Branch and bound: proven smallest when it finishes in time.
    Exact,
    /// Quick, no guarantee.
    Greedy,
}

#[derive(Debug, Args)]
pub struct ExploreArgs {
    /// Archive: a zip file or an unpacked folder.
    pub archive: PathBuf,

    #[command(flatten)]
    pub input: SourceArgs,

    #[command(flatten)]
    pub session: SessionArgs,
}

#[derive(Debug, Args)]
pub struct PlanArgs {
    /// Archive: a zip file or an unpacked folder.
    pub archive: PathBuf,

    #[command(flatten)]
    pub input: SourceArgs,

    #[command(flatten)]
    pub output: OutputArgs,

    /// Alert level for an attribute, e.g. --threshold religion=0.4 or location=35%
    /// (default: the priors' own levels). Repeat for several attributes.
    #[arg(long = "threshold", value_name = "ATTR=P")]
    pub thresholds: Vec<String>,

    /// An item that must stay visible: its archive id, exact name or key; "friends"
    /// for the friend list. Repeat for several.
    #[arg(long = "keep", value_name = "ITEM")]
    pub keep: Vec<String>,

    /// Your true value for an attribute, e.g. --true politics=left: then only that
    /// value's probability must stay under the alert level. The report never names it
    /// or gives its probability, and starts with a warning that it was made knowing it.
    #[arg(long = "true", value_name = "ATTR=VALUE")]
    pub true_values: Vec<String>,

    /// Name your --true values and give their probabilities in the report. RISK: anyone
    /// who sees the report then reads your real values off it; use only for a report
    /// you keep to yourself.
    #[arg(long)]
    pub show_real_values: bool,

    /// How much you mind hiding an item (default 1 each), e.g. --cost "Night Owls=3".
    #[arg(long = "cost", value_name = "ITEM=W")]
    pub costs: Vec<String>,

    /// Search method.
    #[arg(long, value_enum, default_value_t = PlanMethod::Exact)]
    pub method: PlanMethod,

    /// Stop the exact search after this many seconds and report the best plan found.
    #[arg(long, value_name = "SECONDS", default_value_t = 10.0)]
    pub time_limit: f64,
}
