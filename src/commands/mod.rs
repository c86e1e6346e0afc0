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
    #[command(after_help = EXIT_CODES_CHECK)]
    Check(check::CheckArgs),
    /// Lay out reductions, die angles and anneals that meet the mill's limits.
    #[command(after_help = EXIT_CODES_DESIGN)]
    Design(design::DesignArgs),
    /// Fit hardening laws to a tensile-test record.
    #[command(after_help = EXIT_CODES_FIT)]
    Fit(fit::FitArgs),
    /// Put two schedules (or a schedule and a design file) side by side.
    #[command(after_help = EXIT_CODES_COMPARE)]
    Compare(compare::CompareArgs),
    /// Write a commented starter schedule, design or machine file.
    #[command(after_help = EXIT_CODES_INIT)]
    Init(init::InitArgs),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    #[command(after_help = EXIT_CODES_PRINT)]
    Completions(shell::CompletionsArgs),
    /// Print the man page (roff) of coldpass.
    #[command(after_help = EXIT_CODES_PRINT)]
    Man(shell::ManArgs),
    /// How likely each pass is to break when friction, material and sizes scatter.
    #[command(after_help = EXIT_CODES_RISK)]
    Risk(risk::RiskArgs),
}

/// The exit codes of every command, shown at the foot of `coldpass --help`
/// and in the man page.
pub const EXIT_CODES: &str = "Exit status:
  0    every figure within the limits (check, design, compare), or the job done (fit, init,
       completions, man), or a break probability within --target-probability (risk)
  1    bad input (the message names the file, field, value and what is allowed), or a design
       that cannot meet the limits, or a catalogue with a file that could not be checked
  2    bad usage (an unknown option or value; clap's own)
  3    a checked schedule (or any product of a catalogue) is over a limit or due an anneal;
       risk: the break probability is over --target-probability
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `check` (one file, or a catalogue of several).
pub const EXIT_CODES_CHECK: &str = "Exit status:
  0    every pass within the limits (warnings only are still 0; the verdict says `warn`)
  1    bad input (the message names the file, field, value and what is allowed); with several
       files, any file that could not be checked
  2    bad usage (an unknown option or value; clap's own)
  3    a pass over a limit or an anneal due and not scheduled (with several files: any product)
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `design`.
pub const EXIT_CODES_DESIGN: &str = "Exit status:
  0    a design that meets the limits
  1    bad input, or no design meets the limits (the message names the binding constraint)
  2    bad usage (an unknown option or value; clap's own)
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `fit`.
pub const EXIT_CODES_FIT: &str = "Exit status:
  0    the record was fitted (warnings are in the report)
  1    bad input (the message names the file, line, column or option and what is allowed),
       or --emit-law of a fit that did not converge without --allow-unconverged
  2    bad usage (an unknown option or value; clap's own)
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `compare`.
pub const EXIT_CODES_COMPARE: &str = "Exit status:
  0    both files read and checked (their verdicts are in the output, whatever they are)
  1    bad input in either file
  2    bad usage (an unknown option or value; clap's own)
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `risk`.
pub const EXIT_CODES_RISK: &str = "Exit status:
  0    done, and the break probability within --target-probability when one is given
  1    bad input (the message names the file, field, value and what is allowed)
  2    bad usage (an unknown option or value; clap's own)
  3    the schedule's break probability is over --target-probability
  130  stopped by Ctrl-C or SIGTERM (nothing is written)";

/// The exit codes of `init`.
pub const EXIT_CODES_INIT: &str = "Exit status:
  0    written
  1    the file exists already (init never overwrites one) or could not be written; nothing written
  2    bad usage (an unknown option or value; clap's own)";

/// The exit codes of `completions` and `man`.
pub const EXIT_CODES_PRINT: &str = "Exit status:
  0    printed (or written with -o)
  1    the output could not be written (nothing is written)
  2    bad usage (an unknown option or value; clap's own)";

/// Exit status when every figure is within the limits.
pub const EXIT_OK: u8 = 0;
/// Exit status when a checked schedule is over a limit.
pub const EXIT_OVER: u8 = 3;

impl Command {
    /// The subcommand's name on the command line.
    pub fn name(&self) -> &'static str {
        match self {
            Command::Check(_) => "check",
            Command::Design(_) => "design",
            Command::Fit(_) => "fit",
            Command::Compare(_) => "compare",
            Command::Init(_) => "init",
            Command::Completions(_) => "completions",
            Command::Man(_) => "man",
            Command::Risk(_) => "risk",
        }
    }
}

/// A combination of options clap's definitions cannot refuse by themselves,
/// with the message that says what is allowed: `--summary` changes only the
/// CSV, so with another format it would be silently ignored; compare has two
/// schedules and no chart of its own, so `--plot` there is refused too.
pub fn usage_conflict(command: &Command) -> Option<String> {
    use crate::report::Format;
    let (name, report, view) = match command {
        Command::Check(a) => ("check", &a.report, &a.view),
        Command::Compare(a) => ("compare", &a.report, &a.view),
        Command::Design(a) => ("design", &a.report, &a.view),
        _ => return None,
    };
    if name == "compare" && report.plot.is_some() {
        return Some(
            "--plot draws one schedule's chart, and compare reads two: draw each with \
             coldpass check FILE --plot FILE.svg, or put their figures side by side on the page \
             (--format html)"
                .into(),
        );
    }
    if !view.summary {
        return None;
    }
    if name == "design" {
        return Some(
            "--summary: design has no summary CSV yet (its CSV is one row per step); \
             the design summary is in the table, JSON and YAML, or check the emitted schedule \
             (--emit-schedule FILE.yaml, then coldpass check FILE.yaml --format csv --summary)"
                .into(),
        );
    }
    if report.format != Format::Csv {
        return Some(format!(
            "--summary goes with --format csv (one row of the summary keys); the {} format \
             already carries the summary: drop --summary, or add --format csv",
            clap::ValueEnum::to_possible_value(&report.format)
                .map(|v| v.get_name().to_string())
                .unwrap_or_default()
        ));
    }
    None
}

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
