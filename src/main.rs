//! The `coldpass` command: parse, run, map the outcome to an exit status.
//!
//! Exit status: 0 within limits, 3 when a checked schedule is over a limit,
//! 1 for bad input or a design that cannot meet the limits, 2 for bad usage
//! (clap's own), 130 when interrupted (SIGINT or SIGTERM), after removing any
//! temporary file a write had begun. A reader that closes the pipe early
//! (`| head`, `| true`) does not change the status.

mod cli;
mod commands;
mod input;
mod output;
mod report;

use std::process::ExitCode;

use clap::Parser;

/// Exit status after SIGINT or SIGTERM (128 + 2, the shell's convention for Ctrl-C).
const EXIT_INTERRUPTED: i32 = 130;

fn main() -> ExitCode {
    // A signal during a write would otherwise leave `.name.<pid>.<n>.tmp`
    // files behind: remove them, then end (the lock stays held, so no new
    // temporary file appears after the sweep).
    let _ = ctrlc::set_handler(|| {
        let _held = output::remove_temporaries();
        std::process::exit(EXIT_INTERRUPTED);
    });
    let cli = cli::Cli::parse();
    match commands::run(cli.command) {
        Ok(status) => ExitCode::from(status),
        Err(err) => {
            if output::is_broken_pipe(&err) {
                // Only an error message could still be lost here; the
                // report's own writes keep the verdict (see output.rs).
                return ExitCode::from(1);
            }
            eprintln!("Error: {err:#}");
            ExitCode::from(1)
        }
    }
}
