//! `sprung`: the command-line checker for Sprung lumped vibration models.
//!
//! This binary only reads files, calls the engine and renders its results; it holds no physics
//! and no unit rules (see ARCHITECTURE.md).

mod args;
mod commands;
mod files;
mod render;

use std::process::ExitCode;

use clap::Parser;

fn main() -> ExitCode {
    let cli = args::Cli::parse();
    commands::run(cli).into()
}
