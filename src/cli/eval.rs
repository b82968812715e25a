//! `telltale eval`: cross-validated accuracy and calibration of the observer model on
//! a labelled cohort.

use std::process::ExitCode;

use anyhow::Result;
use telltale::eval::{
    BestGuess, EvalParams, evaluate_against, parse_shares, write_html, write_json, write_markdown,
    write_text,
};
use telltale::synth::oracle::{CohortOracle, GENERATOR_FILE, GeneratorRecord};

use super::args::{EvalArgs, EvalFormat};
use super::cohort::{bar, read, schema};
use super::output::emit;

pub fn run(args: &EvalArgs) -> Result<ExitCode> {
    let shares = parse_shares(&args.public_share)
        .map_err(|e| anyhow::anyhow!("--public-share {}: {e}", args.public_share))?;
    if let Some(e) = args.epsilon
        && !(e.is_finite() && e > 0.0)
    {
        anyhow::bail!("--epsilon must be a number above 0");
    }
    let schema = schema(&args.cohort)?;
    let cohort = read(&args.cohort, &schema)?;
    let params = EvalParams {
        folds: args.folds,
        shares,
        epsilon: args.epsilon,
        max_items: args.cohort.max_items,
        min_members: args.cohort.min_members,
        seed: args.seed,
    };
    let pb = bar(args.folds * (1 + params.shares.len()), "fitting models");
    let synthetic = schema.priors.provenance.synthetic;
    // A cohort made by `synth cohort` says how: its generator's model gives the best
    // possible guesses. A record that cannot be read is only a note.
    let record = args.cohort.cohort.join(GENERATOR_FILE);
    let oracle = match std::fs::read_to_string(&record) {
        Ok(text) => match serde_json::from_str::<GeneratorRecord>(&text) {
            Ok(r) => Some(CohortOracle::new(r, &schema.priors)),
            Err(e) => {
                eprintln!(
                    "note: {}: not used ({e}); no best possible figures",
                    record.display()
                );
                None
            }
        },
        Err(_) => None,
    };
    let report = evaluate_against(
        &schema,
        &cohort,
        &params,
        synthetic,
        oracle.as_ref().map(|o| o as &dyn BestGuess),
        &mut |done, _| pb.set_position(done as u64),
    );
    pb.finish_and_clear();
    let report = report?;
    emit(args.output.as_deref(), |out| match args.format {
        EvalFormat::Text => write_text(&report, out),
        EvalFormat::Json => write_json(&report, out),
        EvalFormat::Markdown => write_markdown(&report, out),
        EvalFormat::Html => write_html(&report, out),
    })?;
    Ok(ExitCode::SUCCESS)
}
