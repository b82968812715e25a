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
mod shell;
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
        Some(Command::Completions(args)) => shell::completions(args.shell),
        Some(Command::Man(args)) => shell::man(args.dir.as_deref()),
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
            let _ = writeln!(std::io::stderr(), "telltale: {}", said_once(&e));
            ExitCode::from(EXIT_ERROR)
        }
    }
}

/// The error and its causes, joined with ": ", each cause said once: a cause whose
/// text the message so far already ends with (an error that puts its source in its
/// own message and also returns it from `source()`) is not said again.
fn said_once(e: &anyhow::Error) -> String {
    let mut text = String::new();
    for cause in e.chain() {
        let part = cause.to_string();
        if text.ends_with(&part) {
            continue;
        }
        if !text.is_empty() {
            text.push_str(": ");
        }
        text.push_str(&part);
    }
    text
}

#[cfg(test)]
mod tests {
    use super::said_once;

    /// An error that says its source in its message and also returns it.
    #[derive(Debug, thiserror::Error)]
    #[error("data.json: cannot open: {source}")]
    struct Doubled {
        source: std::io::Error,
    }

    fn missing() -> std::io::Error {
        std::io::Error::new(std::io::ErrorKind::NotFound, "no such file")
    }

    #[test]
    fn a_cause_already_in_the_message_is_said_once() {
        let e = anyhow::Error::new(Doubled { source: missing() }).context("cannot use it");
        assert_eq!(
            said_once(&e),
            "cannot use it: data.json: cannot open: no such file"
        );
    }

    #[test]
    fn distinct_causes_are_all_said() {
        let e = anyhow::Error::new(missing()).context("cannot write out.txt");
        assert_eq!(said_once(&e), "cannot write out.txt: no such file");
    }
}
