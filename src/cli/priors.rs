//! `telltale priors build`: reference priors from a consenting cohort, with
//! differential privacy.

use std::process::ExitCode;

use anyhow::{Context, Result};
use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;
use telltale::cohort::fit::{fit_all, pseudo_members};
use telltale::cohort::privacy::{Budget, DEFAULT_PEOPLE_SHARE};
use telltale::cohort::{BuildParams, Table, bound_contributions, build_file, count, noisy_table};
use telltale::priors::write_priors;

use super::args::{PriorsBuildArgs, PriorsCommand};
use super::cohort::{read, schema};
use super::output::write_private;

pub fn run(cmd: PriorsCommand) -> Result<ExitCode> {
    match cmd {
        PriorsCommand::Build(args) => build(&args),
    }
}

fn today() -> String {
    let d = time::OffsetDateTime::now_utc().date();
    format!("{:04}-{:02}-{:02}", d.year(), u8::from(d.month()), d.day())
}

fn build(args: &PriorsBuildArgs) -> Result<ExitCode> {
    if !(args.epsilon.is_finite() && args.epsilon > 0.0) {
        anyhow::bail!("--epsilon must be a number above 0");
    }
    let schema = schema(&args.cohort)?;
    if schema.n_items() == 0 {
        return Err(telltale::cohort::Error::NoCandidates.into());
    }
    let cohort = read(&args.cohort, &schema)?;
    // Noise must be unpredictable: the operating system's generator seeds it unless
    // the user asks for a reproducible file.
    let mut rng = match args.seed {
        Some(s) => ChaCha20Rng::seed_from_u64(s),
        None => ChaCha20Rng::from_os_rng(),
    };
    let cards: Vec<usize> = schema
        .priors
        .attributes
        .iter()
        .map(|a| a.values.len())
        .collect();
    let budget = Budget {
        epsilon: args.epsilon,
        people_share: DEFAULT_PEOPLE_SHARE,
        n_attributes: cards.len(),
        max_items: args.cohort.max_items,
    };
    let counted = bound_contributions(&cohort.members, args.cohort.max_items, &mut rng);
    let counts = count(&cohort.members, &counted, schema.n_items(), &cards);
    let table = noisy_table(&counts, &budget, args.cohort.min_members, &mut rng)?;
    let (settings, note) = if args.calibrate {
        let attrs: Vec<(String, Vec<f64>)> = schema
            .priors
            .attributes
            .iter()
            .zip(&table.people)
            .map(|(a, p)| {
                (
                    a.id.clone(),
                    Table::rates(p).iter().map(|x| x.ln()).collect(),
                )
            })
            .collect();
        // Fitted on members drawn from the released (noisy) table, never on the
        // contributors themselves: post-processing, so ε covers it.
        let pseudo = pseudo_members(&table, &mut rng);
        let fits = fit_all(&table, &pseudo, None, &attrs);
        eprintln!(
            "\nCalibration fitted on {} members drawn from the released noisy counts (not on the contributors, so ε covers it):",
            pseudo.len()
        );
        eprintln!(
            "  {:<12} {:>7} {:>6} {:>4} {:>9} {:>10} {:>10} {:>10}",
            "attribute", "members", "alpha", "k", "accuracy", "ECE NB", "ECE temp", "ECE cal"
        );
        for f in &fits {
            eprintln!(
                "  {:<12} {:>7} {:>6} {:>4} {:>8.1}% {:>10.3} {:>10.3} {:>10.3}",
                f.attribute,
                f.members,
                f.smoothing,
                f.pseudocount,
                f.logistic.accuracy * 100.0,
                f.naive.ece,
                f.temperature.ece,
                f.logistic.ece
            );
        }
        (
            Some(
                fits.iter()
                    .map(|f| (f.smoothing, f.pseudocount, f.calibration.clone()))
                    .collect(),
            ),
            " Smoothing and the logistic calibration were fitted on members drawn from the released noisy counts (post-processing: ε covers them); the draw knows only those counts, not which items go together, so the calibration corrects less overconfidence than a fit on the contributors would.".to_string(),
        )
    } else {
        (
            None,
            " Smoothing and calibration are the schema's, not fitted on this cohort.".to_string(),
        )
    };
    let built = build_file(
        &schema,
        &table,
        &BuildParams {
            budget: Some(budget),
            min_members: args.cohort.min_members,
            source: args.source.clone(),
            licence: args.licence.clone(),
            created: args.created.clone().unwrap_or_else(today),
            settings,
            method_note: note,
            synthetic: false,
        },
    );
    write_private(&args.output, |out| write_priors(&built.file, out))
        .with_context(|| format!("cannot write {}", args.output.display()))?;
    eprintln!(
        "\nWrote {}: {} of {} candidate items kept (noisy size at least {}), about {} contributors.",
        args.output.display(),
        built.kept_items,
        built.kept_items + built.dropped_items,
        args.cohort.min_members,
        built.file.provenance.contributors.unwrap_or(0)
    );
    eprintln!(
        "Privacy: ε = {} per contributor; discrete Laplace scale {:.2} on each item count (at most {} items per contributor), {:.2} on each people count.",
        args.epsilon,
        budget.items_scale(),
        args.cohort.max_items,
        budget.people_scale()
    );
    if let Some(s) = args.seed {
        eprintln!(
            "warning: --seed {s} makes the noise reproducible; anyone who knows the seed can remove it. Do not share this file as private."
        );
    }
    Ok(ExitCode::SUCCESS)
}
