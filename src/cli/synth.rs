//! `telltale synth`: generate the fictional demo data.

use std::process::ExitCode;

use anyhow::{Context, Result};
use telltale::reading::{count, percent};
use telltale::synth::DemoConfig;
use telltale::synth::cohort::{CohortConfig, generate_cohort};
use telltale::synth::demo_files::{DEMO_EXPORTS, write_demo};
use telltale::synth::large::{LargeConfig, write_large_archive, write_large_priors};

use super::args::SynthCommand;

pub fn run(cmd: SynthCommand) -> Result<ExitCode> {
    match cmd {
        SynthCommand::Large(args) => {
            let cfg = LargeConfig {
                seed: args.seed,
                likes: args.likes,
                groups: args.groups,
                friends: args.friends,
                about_bytes: args.about_bytes,
                media_mb: args.media_mb,
                table_items: args.table_items,
                ..LargeConfig::default()
            };
            let s = write_large_archive(&cfg, &args.out)
                .with_context(|| format!("cannot write {}", args.out.display()))?;
            println!(
                "Wrote {}: {} likes, {} groups, {} friends ({} items listed in the table of {}), {} MB of mapped records, {} MB of media padding. True values: {}.",
                args.out.display(),
                s.likes,
                s.groups,
                s.friends,
                s.listed,
                args.table_items,
                s.mapped_bytes >> 20,
                s.media_bytes >> 20,
                s.profile.join(", ")
            );
            Ok(ExitCode::SUCCESS)
        }
        SynthCommand::PriorsLarge(args) => {
            write_large_priors(args.seed, args.items, &args.out)
                .with_context(|| format!("cannot write {}", args.out.display()))?;
            println!(
                "Wrote {} ({} reference items × 4 attributes).",
                args.out.display(),
                args.items
            );
            Ok(ExitCode::SUCCESS)
        }
        SynthCommand::Cohort(args) => {
            let cfg = CohortConfig {
                seed: args.seed,
                members: args.members,
                items: args.items,
                ..CohortConfig::default()
            };
            let written = generate_cohort(&cfg, &args.out)
                .with_context(|| format!("cannot write the cohort in {}", args.out.display()))?;
            println!(
                "Wrote {} (layout A, with declared attributes) and telltale-mapping.toml in {}.",
                telltale::reading::count(
                    written.len(),
                    "invented member archive",
                    "invented member archives"
                ),
                args.out.display()
            );
            Ok(ExitCode::SUCCESS)
        }
        SynthCommand::Demo(args) => {
            let cfg = DemoConfig {
                seed: args.seed,
                members: args.members,
                items: args.items,
                ..DemoConfig::default()
            };
            let (out, files) = write_demo(&cfg, &args.out, args.force)
                .with_context(|| format!("cannot write the demo in {}", args.out.display()))?;
            let exports = args.out.join(DEMO_EXPORTS);
            println!(
                "Demo in {}: {} ({} reference items) and {} under {}.",
                args.out.display(),
                out.priors_path.display(),
                out.priors_items,
                count(out.personas.len(), "persona archive", "persona archives"),
                exports.display()
            );
            println!(
                "  {} new, {} replaced, {} left as they were (already the same).",
                count(files.created.len(), "file", "files"),
                files.replaced.len(),
                files.unchanged.len()
            );
            for f in &files.replaced {
                println!("  replaced {}", args.out.join(f).display());
            }
            if !files.foreign.is_empty() {
                println!(
                    "  Not made by the generator, left alone: {}.",
                    files
                        .foreign
                        .iter()
                        .map(|f| args.out.join(f).display().to_string())
                        .collect::<Vec<_>>()
                        .join(", ")
                );
            }
            println!(
                "\nCalibration on {} held-out invented members:",
                cfg.held_out
            );
            println!(
                "  {:<10} {:>6} {:>4} {:>7} {:>9} {:>9} {:>9} {:>11} {:>9}",
                "attribute",
                "alpha",
                "k",
                "lambda",
                "accuracy",
                "majority",
                "log loss",
                "ECE(before)",
                "ECE(fit)"
            );
            for f in &out.fits {
                println!(
                    "  {:<10} {:>6} {:>4} {:>7.3} {:>9} {:>9} {:>9.3} {:>11.3} {:>9.3}",
                    f.attribute,
                    f.smoothing,
                    f.pseudocount,
                    f.lambda,
                    percent(f.accuracy),
                    percent(f.majority_rate),
                    f.log_loss,
                    f.ece_uncalibrated,
                    f.ece_calibrated
                );
            }
            println!("\nPersonas:");
            for p in &out.personas {
                println!(
                    "  {:<10} layout {}  {:>3} likes {:>3} groups {:>3} follows {:>3} events {:>4} friends  ({})",
                    p.slug, p.layout, p.likes, p.groups, p.follows, p.events, p.friends, p.archive
                );
            }
            Ok(ExitCode::SUCCESS)
        }
    }
}
