//! Command-line interface: argument definitions and dispatch. Each command's work is in
//! its own file and calls the library; nothing here computes.

mod args;
mod cohort;
mod eval;
mod explore;
mod forget;
mod mapping;
mod output;
mod plan;
mod priors;
mod scan;
mod synth;

use std::io::Write;
use std::process::ExitCode;

use clap::Parser;

pub use args::{Cli, Command};

/// Exit code for errors the user can fix (bad input, missing files).
const EXIT_ERROR: u8 = 1;

pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let no_cache = match &cli.command {
        Some(Command::Scan(a)) => a.input.no_cache,
        Some(Command::Plan(a)) => a.input.no_cache,
        // The no-save mode leaves the priors cache alone too.
        Some(Command::Explore(a)) => a.input.no_cache || a.session.no_save,
        Some(_) => false,
        None => cli.input.no_cache || cli.session.no_save,
    };
    if no_cache {
        telltale::priors::disable_cache();
    }
    let result = match cli.command {
        Some(Command::Scan(args)) => scan::run(&args),
        Some(Command::Plan(args)) => plan::run(&args),
        Some(Command::Explore(args)) => explore::run(args.archive, args.input, args.session),
        Some(Command::Synth(cmd)) => synth::run(cmd),
        Some(Command::Priors(cmd)) => priors::run(cmd),
        Some(Command::Eval(args)) => eval::run(&args),
        Some(Command::Mapping(cmd)) => mapping::run(cmd),
        Some(Command::Forget(args)) => forget::run(&args),
        None => match cli.archive {
            Some(archive) => explore::run(archive, cli.input, cli.session),
            None => {
                use clap::CommandFactory;
                let _ = Cli::command().print_help();
                return ExitCode::from(2);
            }
        },
    };
    match result {
        Ok(code) => code,
        Err(e) => {
            // Not eprintln!: it panics when standard error is gone (a closed terminal).
            let _ = writeln!(std::io::stderr(), "telltale: {e:#}");
            ExitCode::from(EXIT_ERROR)
        }
    }
}
