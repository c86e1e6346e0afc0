//! The root of the command line (clap derive): the program's name, version,
//! help text and exit codes. Each subcommand's options live beside its code in
//! `commands/`, and the report format belongs to `report/`, so the modules
//! depend one way: main -> cli -> commands -> report -> core.

use clap::Parser;

use crate::commands::Command;

/// The exit codes, shown at the foot of `--help` and in the man page.
pub const EXIT_CODES: &str = "Exit status:
  0  every figure within the limits (check, design, compare, fit, init, completions, man)
  1  bad input (the message names the file, field, value and what is allowed), or a design
     that cannot meet the limits, or a catalogue with a file that could not be checked
  2  bad usage (an unknown option or value; clap's own)
  3  a checked schedule (or any product of a catalogue) is over a limit or due an anneal";

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
