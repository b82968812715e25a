//! Shared by `priors build` and `eval`: the schema, reading limits, and reading the
//! cohort with a progress bar (on a terminal only; silent in scripts).

use std::io::IsTerminal;

use anyhow::{Context, Result};
use indicatif::{HumanDuration, ProgressBar, ProgressDrawTarget, ProgressState, ProgressStyle};
use telltale::cohort::{Cohort, Schema, load_cohort};
use telltale::limits::Limits;
use telltale::priors::PriorsFile;
use telltale::scan::{DEMO_PRIORS_JSON, DEMO_PRIORS_NAME};

use super::args::CohortArgs;

/// A progress bar on standard error when it is a terminal; hidden otherwise.
pub fn bar(total: usize, what: &str) -> ProgressBar {
    if !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::new(total as u64);
    if let Ok(style) = ProgressStyle::with_template("{msg:>18} [{bar:40}] {pos}/{len}{left}") {
        pb.set_style(with_time_left(style));
    }
    pb.set_message(what.to_string());
    pb
}

/// Seconds of progress before the time left is shown: the first steps' rate says
/// little (one slow entry read first made the estimate "5h").
const SETTLE_SECS: u64 = 2;

/// The bar's fill, and `{left}`: " (… left)" once the rate has had time to settle.
fn with_time_left(style: ProgressStyle) -> ProgressStyle {
    style.progress_chars("=> ").with_key(
        "left",
        |state: &ProgressState, w: &mut dyn std::fmt::Write| {
            if state.elapsed().as_secs() >= SETTLE_SECS && state.pos() > 0 {
                let _ = write!(w, " ({} left)", HumanDuration(state.eta()));
            }
        },
    )
}

/// A progress bar counting bytes on standard error when it is a terminal; hidden
/// otherwise (scripts and redirected output stay silent). It stays out of sight until
/// the first [`byte_progress`] with a known total, so it never shows "0 B/0 B".
pub fn byte_bar(what: &str) -> ProgressBar {
    if !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::with_draw_target(Some(0), ProgressDrawTarget::hidden());
    if let Ok(style) =
        ProgressStyle::with_template("{msg:>12} [{bar:40}] {bytes}/{total_bytes}{left}")
    {
        pb.set_style(with_time_left(style));
    }
    pb.set_message(what.to_string());
    pb
}

/// Move a [`byte_bar`] to `done` of `total` bytes, drawing it from the first call
/// with a total (on a terminal).
pub fn byte_progress(pb: &ProgressBar, done: u64, total: u64) {
    if total == 0 {
        return;
    }
    if pb.length() == Some(0) && std::io::stderr().is_terminal() {
        pb.set_draw_target(ProgressDrawTarget::stderr());
    }
    pb.set_length(total);
    pb.set_position(done);
}

pub fn schema(args: &CohortArgs) -> Result<Schema> {
    let (text, origin) = match &args.schema {
        Some(p) => (
            std::fs::read_to_string(p).with_context(|| format!("cannot read {}", p.display()))?,
            p.display().to_string(),
        ),
        None => (DEMO_PRIORS_JSON.to_string(), DEMO_PRIORS_NAME.to_string()),
    };
    // Check it as priors first (version and field messages), then keep the raw form.
    telltale::priors::Priors::parse(&text, &origin).context("cannot use the schema")?;
    let file: PriorsFile =
        serde_json::from_str(&text).with_context(|| format!("cannot read {origin}"))?;
    Schema::new(file, &origin).context("cannot use the schema")
}

pub fn read(args: &CohortArgs, schema: &Schema) -> Result<Cohort> {
    let mut limits = Limits::default();
    for setting in &args.limits {
        limits
            .apply(setting)
            .map_err(|e| anyhow::anyhow!("--limit {setting}: {e}"))?;
    }
    if args.max_items == 0 {
        anyhow::bail!("--max-items must be at least 1");
    }
    let total = telltale::cohort::list_archives(&args.cohort)?.len();
    let pb = bar(total, "reading archives");
    let cohort = load_cohort(&args.cohort, schema, &limits, &mut |done, _| {
        pb.set_position(done as u64)
    });
    pb.finish_and_clear();
    let cohort = cohort?;
    for w in cohort.warnings.iter().take(20) {
        eprintln!("warning: {w}");
    }
    if cohort.warnings.len() > 20 {
        eprintln!("warning: … and {} more", cohort.warnings.len() - 20);
    }
    eprintln!(
        "Read {} from {} in {}.",
        telltale::reading::count(cohort.members.len(), "labelled member", "labelled members"),
        telltale::reading::count(cohort.archives, "archive", "archives"),
        args.cohort.display()
    );
    Ok(cohort)
}
