//! `coldpass check FILE`: evaluate a pass schedule and report it.

use std::path::PathBuf;

use anyhow::{Context, Result};
use clap::Args;
use coldpass::evaluation::{evaluate, EvaluateOptions};
use coldpass::schedule;
use coldpass::Method;

use super::options::{ReportArgs, ViewArgs};
use super::{EXIT_OK, EXIT_OVER};
use crate::{output, report};

/// Arguments of `coldpass check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The schedule file (YAML).
    pub file: PathBuf,
    /// Governing method, overriding the file's `limits.method`.
    #[arg(long, value_name = "NAME", value_parser = parse_method)]
    pub method: Option<Method>,
    #[command(flatten)]
    pub report: ReportArgs,
    #[command(flatten)]
    pub view: ViewArgs,
}

/// Parses a method name for clap, listing the allowed names on error.
pub fn parse_method(s: &str) -> Result<Method, String> {
    s.parse::<Method>().map_err(|e| e.allowed)
}

/// Runs `coldpass check`: exit 0 within limits, 3 over a limit.
pub fn run(args: &CheckArgs) -> Result<u8> {
    let text = crate::input::read_text(&args.file)?;
    let file = schedule::parse(&text)
        .with_context(|| format!("reading schedule '{}'", args.file.display()))?;
    let rep = evaluate(
        &file,
        &EvaluateOptions {
            method: args.method,
        },
    )
    .with_context(|| format!("checking schedule '{}'", args.file.display()))?;
    output::ensure_finite("report", &rep)?;
    let body = report::render_schedule(&rep, &file, args.report.format, &args.view.look())?;
    // Render everything before writing anything, so a failure leaves no partial output.
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg::schedule(&rep, &file)?),
        None => None,
    };
    let mut outputs = output::Outputs::new(&[&args.file]);
    if let (Some(path), Some(svg)) = (&args.report.plot, chart) {
        outputs.file("--plot", path, svg);
    }
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    Ok(if rep.is_over() { EXIT_OVER } else { EXIT_OK })
}
