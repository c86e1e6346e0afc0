//! One file per subcommand: read the input, call the core, hand the neutral
//! result to a report format, and return the exit status.

pub mod catalogue;
pub mod check;
pub mod compare;
pub mod design;
pub mod fit;
pub mod init;
pub mod options;
pub mod risk;
pub mod shell;

use anyhow::Result;
use clap::Subcommand;

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Evaluate a pass schedule pass by pass against the mill's limits.
    #[command(after_help = EXIT_CODES)]
    Check(check::CheckArgs),
    /// Lay out reductions, die angles and anneals that meet the mill's limits.
    #[command(after_help = EXIT_CODES)]
    Design(design::DesignArgs),
    /// Fit hardening laws to a tensile-test record.
    #[command(after_help = EXIT_CODES)]
    Fit(fit::FitArgs),
    /// Put two schedules (or a schedule and a design file) side by side.
    #[command(after_help = EXIT_CODES)]
    Compare(compare::CompareArgs),
    /// Write a commented starter schedule, design or machine file.
    Init(init::InitArgs),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions(shell::CompletionsArgs),
    /// Print the man page (roff) of coldpass.
    Man(shell::ManArgs),
    /// How likely each pass is to break when friction, material and sizes scatter.
    Risk(risk::RiskArgs),
}

/// The exit codes, shown at the foot of `--help` and in the man page.
pub const EXIT_CODES: &str = "Exit status:
  0  every figure within the limits (check, design, compare, fit, init, completions, man)
  1  bad input (the message names the file, field, value and what is allowed), or a design
     that cannot meet the limits, or a catalogue with a file that could not be checked
  2  bad usage (an unknown option or value; clap's own)
  3  a checked schedule (or any product of a catalogue) is over a limit or due an anneal";

/// Exit status when every figure is within the limits.
pub const EXIT_OK: u8 = 0;
/// Exit status when a checked schedule is over a limit.
pub const EXIT_OVER: u8 = 3;

/// Runs the chosen subcommand and returns its exit status. `cli` builds the
/// whole command-line definition, for completions and the man page (passed
/// in, so that commands/ does not depend on cli.rs).
pub fn run(command: Command, cli: fn() -> clap::Command) -> Result<u8> {
    match command {
        Command::Check(args) => check::run(&args),
        Command::Design(args) => design::run(&args),
        Command::Fit(args) => fit::run(&args),
        Command::Compare(args) => compare::run(&args),
        Command::Init(args) => init::run(&args),
        Command::Completions(args) => shell::completions(&args, cli()),
        Command::Man(args) => shell::man(&args, cli()),
        Command::Risk(args) => risk::run(&args),
    }
}
