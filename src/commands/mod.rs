//! One file per subcommand: read the input, call the core, hand the neutral
//! result to a report format, and return the exit status.

pub mod check;
pub mod design;
pub mod fit;
pub mod risk;

use anyhow::Result;

use crate::cli::{Cli, Command};

/// Exit status when every figure is within the limits.
pub const EXIT_OK: u8 = 0;
/// Exit status when a checked schedule is over a limit.
pub const EXIT_OVER: u8 = 3;

/// Runs the chosen subcommand and returns its exit status.
pub fn run(cli: Cli) -> Result<u8> {
    match cli.command {
        Command::Check(args) => check::run(&args),
        Command::Design(args) => design::run(&args),
        Command::Fit(args) => fit::run(&args),
        Command::Risk(args) => risk::run(&args),
    }
}
