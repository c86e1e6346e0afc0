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
    // A long computation may ask to be told instead (output::stop_on_interrupt).
    let _ = ctrlc::set_handler(|| output::on_interrupt(EXIT_INTERRUPTED));
    let cli = cli::Cli::parse();
    if let Some(msg) = commands::usage_conflict(&cli.command) {
        // Bad usage, told as clap tells it (exit status 2), before any work.
        let mut root = <cli::Cli as clap::CommandFactory>::command();
        root.build();
        let name = cli.command.name();
        let mut sub = root.find_subcommand_mut(name).cloned().unwrap_or(root);
        sub.error(clap::error::ErrorKind::ArgumentConflict, msg)
            .exit();
    }
    match commands::run(cli.command, <cli::Cli as clap::CommandFactory>::command) {
        Ok(status) => ExitCode::from(status),
        Err(err) => {
            if output::is_broken_pipe(&err) {
                // Only an error message could still be lost here; the
                // report's own writes keep the verdict (see output.rs).
                return ExitCode::from(1);
            }
            eprintln!("Error: {}", bounded(&format!("{err:#}")));
            ExitCode::from(1)
        }
    }
}

/// Longest error message printed, characters; a value echoed from a hostile
/// file (a 50 MB cell) is cut to its head and tail.
const MESSAGE_CHARS: usize = 1500;

/// `msg` whole when short, else its head and tail around a note of the cut.
fn bounded(msg: &str) -> String {
    let n = msg.chars().count();
    if n <= MESSAGE_CHARS {
        return msg.to_string();
    }
    let head: String = msg.chars().take(MESSAGE_CHARS - 300).collect();
    let tail: String = msg.chars().skip(n - 200).collect();
    format!(
        "{head} ... ({} characters cut) ... {tail}",
        n - MESSAGE_CHARS + 100
    )
}
