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
    /// Print the natural frequencies, damping ratios, regimes and mode shapes of a model.
    ///
    /// Exit status: 0 when every system was analyzed, 1 when the model has errors, 2 usage or
    /// I/O error.
    Modes(ModesArgs),
    /// Sweep the steady-state response of one mass or inertia to a harmonic drive.
    Response(ResponseArgs),
    /// Simulate the response of one mass or inertia to the step and impulse drives and the
    /// initial conditions.
    Simulate(SimulateArgs),
    /// Format model files in place, in the one canonical layout (comments kept).
    ///
    /// Folders are searched recursively for `*.sprung` files; `-` formats standard input to
    /// standard output. A file with syntax errors is reported and left untouched.
    /// Exit status: 0 all formatted (with `--check`: nothing would change), 1 a file would
    /// change (`--check`) or has syntax errors, 2 usage or I/O error.
    Fmt(FmtArgs),
    /// Print the long explanation of a diagnostic code (e.g. `sprung explain SP301`).
    Explain(ExplainArgs),
    /// Run the language server over stdin and stdout (for editors).
    Lsp,
}

#[derive(Debug, clap::Args)]
pub struct ResponseArgs {
    /// The model file.
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    /// The system (may be left out when the file has one).
    #[arg(long, value_name = "NAME")]
    pub system: Option<String>,
    /// The mass or inertia whose response is swept.
    #[arg(long, value_name = "NODE")]
    pub at: String,
    /// The harmonic drive (default: the first one).
    #[arg(long, value_name = "DRIVE")]
    pub drive: Option<String>,
    /// Lower end of the sweep, Hz.
    #[arg(long, value_name = "HZ", requires = "to")]
    pub from: Option<f64>,
    /// Upper end of the sweep, Hz.
    #[arg(long, value_name = "HZ", requires = "from")]
    pub to: Option<f64>,
    /// Number of log-spaced frequencies.
    #[arg(long, default_value_t = 400)]
    pub points: usize,
    /// Show transmissibility instead of amplitude.
    #[arg(long)]
    pub transmitted: bool,
    /// Output format: `csv`, `json` or `svg` (a plot of magnitude and phase).
    #[arg(long, value_enum, default_value_t = DataFormat::Csv)]
    pub format: DataFormat,
    /// The magnitude axis of the SVG plot: `db` (20·log10, re 1 m, 1 rad or a ratio of 1)
    /// shows the resonance peaks and the isolation region together; `linear` in the
    /// quantity's own unit.
    #[arg(long, value_enum, default_value_t = Scale::Db)]
    pub scale: Scale,
    /// Write to this file instead of stdout.
    #[arg(long, short, value_name = "FILE")]
    pub output: Option<PathBuf>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Scale {
    Db,
    Linear,
}

#[derive(Debug, clap::Args)]
pub struct SimulateArgs {
    /// The model file.
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    /// The system (may be left out when the file has one).
    #[arg(long, value_name = "NAME")]
    pub system: Option<String>,
    /// The mass or inertia whose motion is reported.
    #[arg(long, value_name = "NODE")]
    pub at: String,
    /// Duration, seconds.
    #[arg(long = "for", value_name = "SECONDS")]
    pub duration: f64,
    /// The settling band, percent of the final value (default: the tightest `settling of
    /// NODE within P%` requirement on the node, else 2%). Used by `json` and `svg`.
    #[arg(long, value_name = "PERCENT")]
    pub within: Option<f64>,
    /// Output format: `csv`, `json` (with the final value, peak and settling time) or `svg`
    /// (a plot with those marked).
    #[arg(long, value_enum, default_value_t = DataFormat::Csv)]
    pub format: DataFormat,
    /// Write to this file instead of stdout.
    #[arg(long, short, value_name = "FILE")]
    pub output: Option<PathBuf>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum DataFormat {
    Csv,
    Json,
    Svg,
}

#[derive(Debug, clap::Args)]
pub struct ModesArgs {
    /// The model file.
    #[arg(value_name = "FILE")]
    pub file: PathBuf,
    /// Show only this system.
    #[arg(long, value_name = "NAME")]
    pub system: Option<String>,
    /// Output format: `table` (terminal), `json` (the stable contract of the README) or
    /// `markdown` (for reports and pull requests).
    #[arg(long, value_enum, default_value_t = ModesFormat::Table)]
    pub format: ModesFormat,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ModesFormat {
    Table,
    Json,
    Markdown,
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
pub struct FmtArgs {
    /// Model files or folders to format, or `-` for standard input.
    #[arg(required = true, value_name = "PATHS")]
    pub paths: Vec<PathBuf>,
    /// Write nothing: list the files that would change, each with a diff, and exit 1 if any
    /// would.
    #[arg(long)]
    pub check: bool,
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
