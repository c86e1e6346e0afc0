//! One file per subcommand: read the input, call the core, hand the neutral
//! result to a report format, and return the exit status.

pub mod check;
pub mod design;
pub mod fit;
pub mod options;
pub mod risk;

use anyhow::Result;
use clap::Subcommand;

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Evaluate a pass schedule pass by pass against the mill's limits.
    Check(check::CheckArgs),
    /// Lay out reductions, die angles and anneals that meet the mill's limits.
    Design(design::DesignArgs),
    /// Fit hardening laws to a tensile-test record.
    Fit(fit::FitArgs),
    /// How likely each pass is to break when friction, material and sizes scatter.
    Risk(risk::RiskArgs),
}

/// Exit status when every figure is within the limits.
pub const EXIT_OK: u8 = 0;
/// Exit status when a checked schedule is over a limit.
pub const EXIT_OVER: u8 = 3;

/// Runs the chosen subcommand and returns its exit status.
pub fn run(command: Command) -> Result<u8> {
    match command {
        Command::Check(args) => check::run(&args),
        Command::Design(args) => design::run(&args),
        Command::Fit(args) => fit::run(&args),
        Command::Risk(args) => risk::run(&args),
    }
}
