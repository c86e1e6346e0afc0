//! The `coldpass` command: parse, run, map the outcome to an exit status.
//!
//! Exit status: 0 within limits, 3 when a checked schedule is over a limit,
//! 1 for bad input or a design that cannot meet the limits, 2 for bad usage
//! (clap's own).

mod cli;
mod commands;
mod output;
mod report;

use std::process::ExitCode;

use clap::Parser;

fn main() -> ExitCode {
    let cli = cli::Cli::parse();
    match commands::run(cli.command, <cli::Cli as clap::CommandFactory>::command) {
        Ok(status) => ExitCode::from(status),
        Err(err) => {
            if output::is_broken_pipe(&err) {
                return ExitCode::SUCCESS;
            }
            eprintln!("Error: {err:#}");
            ExitCode::from(1)
        }
    }
}
