//! The subcommands. Each takes its parsed arguments and returns `Result<(), Failure>`;
//! `main` prints the failure and maps it to the exit code.

mod calibrate;
mod check;
mod interrupt;
mod merge;
mod new;
mod outputs;
mod report;
mod run;
mod steptest;
mod sweep;
mod verify;

use crate::args::Command;
use std::fmt;

/// Why a command failed, which decides the exit code.
#[derive(Debug)]
pub enum Failure {
    /// Bad input: usage or case file (exit 2).
    Input(anyhow::Error),
    /// Something went wrong while running (exit 1).
    Runtime(anyhow::Error),
    /// stdout was closed by the reader (`| head`); not an error.
    BrokenPipe,
}

impl Failure {
    /// Process exit code.
    pub fn exit_code(&self) -> u8 {
        match self {
            Failure::Input(_) => 2,
            Failure::Runtime(_) => 1,
            Failure::BrokenPipe => 0,
        }
    }
}

impl Failure {
    /// The failure of the exit code `code` (2 bad input, otherwise a runtime failure) for
    /// an error that knows its own code. The message is the error's own text, which already
    /// holds its causes (printing the chain again would repeat them).
    pub fn with_code(code: u8, e: impl std::fmt::Display) -> Failure {
        let e = anyhow::anyhow!("{e}");
        if code == 2 {
            Failure::Input(e)
        } else {
            Failure::Runtime(e)
        }
    }
}

impl fmt::Display for Failure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Failure::Input(e) | Failure::Runtime(e) => write!(f, "{e:#}"),
            Failure::BrokenPipe => write!(f, "broken pipe"),
        }
    }
}

/// Writes to stdout, treating a closed pipe as a quiet stop.
pub(crate) fn print_out(text: &str) -> Result<(), Failure> {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Err(Failure::BrokenPipe),
        Err(e) => Err(Failure::Runtime(e.into())),
    }
}

/// Runs one subcommand.
pub fn dispatch(command: Command) -> Result<(), Failure> {
    match command {
        Command::Run(a) => run::run(&a),
        Command::Sweep(a) => sweep::sweep(&a),
        Command::Merge(a) => merge::merge(&a),
        Command::Check(a) => check::check(&a),
        Command::Report(a) => report::report(&a),
        Command::Verify(a) => verify::verify(&a),
        Command::Steptest(a) => steptest::steptest(&a),
        Command::Calibrate(a) => calibrate::calibrate(&a),
        Command::New(a) => new::new(&a),
        Command::Schema(a) if a.outputs => print_out(&crate::output::schema::markdown()),
        Command::Schema(_) => {
            let text = serde_json::to_string_pretty(&crate::case::schema())
                .map_err(|e| Failure::Runtime(e.into()))?;
            print_out(&(text + "\n"))
        }
        Command::Completions { shell } => {
            use clap::CommandFactory;
            let mut buf = Vec::new();
            clap_complete::generate(
                shell,
                &mut crate::args::Cli::command(),
                "boreflux",
                &mut buf,
            );
            print_out(&String::from_utf8_lossy(&buf))
        }
    }
}
