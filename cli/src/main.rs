//! boreflux command-line entry point: parse, dispatch, map errors to exit codes.

use boreflux::args::Cli;
use boreflux::commands::{self, Failure};
use clap::Parser;
use std::process::ExitCode;

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    match commands::dispatch(cli.command) {
        Ok(()) => ExitCode::SUCCESS,
        Err(Failure::BrokenPipe) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("error: {f}");
            ExitCode::from(f.exit_code())
        }
    }
}
