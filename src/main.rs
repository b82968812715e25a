//! The `telltale` binary: a thin shell over the library. Parses the command line,
//! runs the command (or the explorer, in `tui`), and turns errors into a message and
//! an exit code.

mod cli;
mod tui;

fn main() -> std::process::ExitCode {
    telltale::resident::release_large_blocks();
    cli::main()
}
