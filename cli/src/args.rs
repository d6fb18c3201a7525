//! The command line, as clap derives it. Usage errors exit with status 2 (clap's default).

use std::path::PathBuf;

use clap::{Parser, Subcommand, ValueEnum};

/// Check lumped vibration models (.sprung files): units, topology and requirements.
#[derive(Debug, Parser)]
#[command(name = "sprung", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Check model files and report diagnostics and requirement verdicts.
    ///
    /// Folders are searched recursively for `*.sprung` files, in sorted order.
    /// Exit status: 0 all passed (warnings allowed), 1 a requirement failed or a model has
    /// errors, 2 usage or I/O error.
    Check(CheckArgs),
    /// Print the long explanation of a diagnostic code (e.g. `sprung explain SP301`).
    Explain(ExplainArgs),
    /// Run the language server over stdin and stdout (for editors).
    Lsp,
}

#[derive(Debug, clap::Args)]
pub struct CheckArgs {
    /// Model files or folders to check.
    #[arg(required = true, value_name = "PATHS")]
    pub paths: Vec<PathBuf>,
    /// Output format: `human` (terminal report) or `json` (the stable contract of the README).
    #[arg(long, value_enum, default_value_t = Format::Human)]
    pub format: Format,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Format {
    Human,
    Json,
}

#[derive(Debug, clap::Args)]
pub struct ExplainArgs {
    /// A diagnostic code such as `SP301` (case does not matter).
    #[arg(required_unless_present = "list", conflicts_with = "list")]
    pub code: Option<String>,
    /// List every diagnostic code with its severity and title.
    #[arg(long)]
    pub list: bool,
}
