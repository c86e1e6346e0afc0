//! `coldpass design FILE`: lay out the passes, die angles and anneals that
//! meet the mill's limits, report the designed schedule as `check` would,
//! and optionally write it as a schedule file.

use std::path::PathBuf;

use anyhow::{Context, Result};
use clap::Args;
use coldpass::design::{design, schedule_yaml, DesignOptions};
use coldpass::schedule;
use coldpass::Method;

use super::check::method_parser;
use super::options::{ReportArgs, ViewArgs};
use super::{EXIT_OK, EXIT_OVER};
use crate::{output, report};

/// Arguments of `coldpass design`.
#[derive(Debug, Args)]
pub struct DesignArgs {
    /// The design file (YAML): a schedule file's blocks plus `target`, no `passes`.
    pub file: PathBuf,
    /// Governing method, overriding the file's `limits.method` (written into the emitted schedule).
    #[arg(long, value_name = "NAME", value_parser = method_parser())]
    pub method: Option<Method>,
    #[command(flatten)]
    pub report: ReportArgs,
    #[command(flatten)]
    pub view: ViewArgs,
    /// Also write the designed schedule to this file, for `coldpass check`
    /// (diameters at full precision; written whole or not at all).
    #[arg(long, value_name = "FILE.yaml")]
    pub emit_schedule: Option<PathBuf>,
}

/// Runs `coldpass design`: exit 0 when a design meets every limit, 1 when
/// none can (the message names the binding constraint) or the file is bad.
pub fn run(args: &DesignArgs) -> Result<u8> {
    let name = args.file.display().to_string();
    let text = super::check::read_schedule_text(&args.file)?;
    let file = schedule::parse(&text).with_context(|| format!("reading design '{name}'"))?;
    let d = design(
        &file,
        &DesignOptions {
            method: args.method,
        },
    )
    .with_context(|| format!("designing '{name}'"))?;
    // Render everything before writing anything, so a failure leaves no partial output.
    output::ensure_finite("design's report", &d.report)?;
    let body = report::design::render(&d, args.report.format, &args.view.look())?;
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg::schedule(&d.report, &d.schedule)?),
        None => None,
    };
    let emitted = match &args.emit_schedule {
        Some(_) => Some(schedule_yaml(
            &d,
            &report::design::emitted_header(&d, &name),
        )?),
        None => None,
    };
    let mut outputs = output::Outputs::new(&[&args.file]);
    if let (Some(path), Some(yaml)) = (&args.emit_schedule, emitted) {
        outputs.file("--emit-schedule", path, yaml.into_bytes());
    }
    if let (Some(path), Some(svg)) = (&args.report.plot, chart) {
        outputs.file("--plot", path, svg);
    }
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    // A design is checked before it is returned; an over-limit verdict would be a fault.
    Ok(if d.report.is_over() {
        EXIT_OVER
    } else {
        EXIT_OK
    })
}
