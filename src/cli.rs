//! The root of the command line (clap derive): the program's name, version,
//! help text and exit codes. Each subcommand's options live beside its code in
//! `commands/`, and the report format belongs to `report/`, so the modules
//! depend one way: main -> cli -> commands -> report -> core.

use clap::Parser;

use crate::commands::{Command, EXIT_CODES};

/// Plan the cold drawing of round wire and bar: strain, flow stress, drawing
/// stress, limits, anneals, speeds and power. Figures are planning estimates
/// to confirm by trial; the machine maker's limits, local codes and licensed
/// practice govern.
#[derive(Debug, Parser)]
#[command(name = "coldpass", version, about, long_about = None, after_help = EXIT_CODES)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}
