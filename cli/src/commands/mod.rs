//! One module per subcommand. Each returns a [`Status`]; `main` turns it into the exit code.

mod check;
mod explain;
mod fmt;
mod lsp;
mod modes;
mod response;

use std::io::{self, Write};
use std::process::ExitCode;

use crate::args::{Cli, Command};

/// The outcome of a command, as the exit status promises it (README, "Exit status").
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Status {
    /// Everything passed; warnings are allowed.
    Passed,
    /// A requirement failed or a model has errors.
    Failed,
    /// A usage or I/O error.
    Usage,
}

impl From<Status> for ExitCode {
    fn from(status: Status) -> ExitCode {
        ExitCode::from(match status {
            Status::Passed => 0,
            Status::Failed => 1,
            Status::Usage => 2,
        })
    }
}

pub fn run(cli: Cli) -> Status {
    let result = match cli.command {
        Command::Check(args) => check::run(&args),
        Command::Modes(args) => modes::run(&args),
        Command::Response(args) => response::run_response(&args),
        Command::Simulate(args) => response::run_simulate(&args),
        Command::Fmt(args) => fmt::run(&args),
        Command::Explain(args) => explain::run(&args),
        Command::Lsp => lsp::run(),
    };
    match result {
        Ok(status) => status,
        // A closed pipe (`sprung check . | head`) is the reader's choice, not our failure to
        // report; anything else on stdout is an I/O error.
        Err(err) if err.kind() == io::ErrorKind::BrokenPipe => Status::Usage,
        Err(err) => {
            report_error(&format!("cannot write the output: {err}"));
            Status::Usage
        }
    }
}

/// Writes `error: MESSAGE` to stderr. Failing to write to stderr is ignored: there is nowhere
/// left to report it, and the exit status still tells.
pub fn report_error(message: &str) {
    let _ = writeln!(io::stderr().lock(), "error: {message}");
}
