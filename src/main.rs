//! The `telltale` binary: a thin shell over the library. Parses the command line,
//! runs the command, and turns errors into a message and an exit code.

mod cli;

fn main() -> std::process::ExitCode {
    cli::main()
}
