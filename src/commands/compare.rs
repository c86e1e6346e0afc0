//! `coldpass compare A B`: two schedules (or a schedule and a design file,
//! which is designed first) side by side, pass by pass and in summary.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};
use clap::Args;
use coldpass::design::{design, DesignOptions};
use coldpass::evaluation::{evaluate_on, EvaluateOptions, ScheduleReport};
use coldpass::schedule;
use coldpass::Method;

use super::check::method_parser;
use super::options::{ReportArgs, ViewArgs};
use super::EXIT_OK;
use crate::{output, report};

/// Arguments of `coldpass compare`.
#[derive(Debug, Args)]
pub struct CompareArgs {
    /// The first schedule (or design) file.
    pub first: PathBuf,
    /// The second schedule (or design) file.
    pub second: PathBuf,
    /// Governing method for both, overriding the files' `limits.method`.
    #[arg(long, value_name = "NAME", value_parser = method_parser())]
    pub method: Option<Method>,
    #[command(flatten)]
    pub report: ReportArgs,
    #[command(flatten)]
    pub view: ViewArgs,
}

/// Checks a schedule file (on the machine its `machine:` key names), or designs a design file (one with `target` and
/// no `passes`) and returns the designed schedule's report.
fn report_of(path: &Path, method: Option<Method>) -> Result<ScheduleReport> {
    let name = path.display().to_string();
    let text = super::check::read_schedule_text(path, super::check::Reader::Compare)?;
    let file = schedule::parse(&text).with_context(|| format!("reading '{name}'"))?;
    if file.passes.is_empty() && file.target.is_some() {
        let d = design(&file, &DesignOptions { method })
            .with_context(|| format!("designing '{name}'"))?;
        return Ok(d.report);
    }
    // On the machine the file names, as `check` would.
    let machine = super::check::machine_of(path, None, &file)?.map(|(_, m)| m);
    evaluate_on(&file, &EvaluateOptions { method }, machine.as_ref())
        .with_context(|| format!("checking '{name}'"))
}

/// Runs `coldpass compare`: exit 0 when both files could be read and checked.
pub fn run(args: &CompareArgs) -> Result<u8> {
    let a = report_of(&args.first, args.method)?;
    let b = report_of(&args.second, args.method)?;
    let names = [
        args.first.display().to_string(),
        args.second.display().to_string(),
    ];
    let body = report::compare::render(&a, &b, &names, args.report.format, &args.view.look())?;
    let mut outputs = output::Outputs::new(&[&args.first, &args.second]);
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    Ok(EXIT_OK)
}
