//! `coldpass design FILE`: lay out the passes, die angles and anneals that
//! meet the mill's limits, report the designed schedule as `check` would,
//! and optionally write it as a schedule file.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};
use clap::Args;
use coldpass::design::{design_on, schedule_yaml, Design, DesignOptions};
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
    /// Design for this machine file (YAML), overriding the file's `machine:`:
    /// one die per block, and the attainable speed reported.
    #[arg(long, value_name = "FILE")]
    pub machine: Option<PathBuf>,
    /// Also write the designed schedule to this file, for `coldpass check`
    /// (diameters at full precision; written whole or not at all). The name
    /// must end in .yaml or .yml.
    #[arg(long, value_name = "FILE.yaml", value_parser = super::options::schedule_yaml_path)]
    pub emit_schedule: Option<PathBuf>,
}

/// Runs `coldpass design`: exit 0 when a design meets every limit, 1 when
/// none can (the message names the binding constraint) or the file is bad.
pub fn run(args: &DesignArgs) -> Result<u8> {
    let name = args.file.display().to_string();
    let text = super::check::read_schedule_text(&args.file, super::check::Reader::Design)?;
    let file = schedule::parse(&text).with_context(|| format!("reading design '{name}'"))?;
    let machine = super::check::machine_of(&args.file, args.machine.as_deref(), &file)?;
    let mut d = design_on(
        &file,
        &DesignOptions {
            method: args.method,
        },
        machine.as_ref().map(|(_, m)| m),
    )
    .with_context(|| format!("designing '{name}'"))?;
    if let (Some(out), Some((path, _))) = (&args.emit_schedule, &machine) {
        point_at_machine(&mut d, path, out);
    }
    // Render everything before writing anything, so a failure leaves no partial output.
    output::ensure_finite("design's report", &d.report)?;
    let body = report::design::render(&d, args.report.format, &args.view.look())?;
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg::schedule_in(
            &d.report,
            &d.schedule,
            args.view.units,
        )?),
        None => None,
    };
    let emitted = match &args.emit_schedule {
        Some(_) => Some(schedule_yaml(
            &d,
            &report::design::emitted_header(&d, &name),
        )?),
        None => None,
    };
    let mut inputs: Vec<&std::path::Path> = vec![&args.file];
    if let Some((path, _)) = &machine {
        inputs.push(path);
    }
    let mut outputs = output::Outputs::new(&inputs);
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

/// The emitted schedule names the machine by a path `check` finds from the
/// emitted file's folder: the machine file (found from the design file's
/// folder, or given by `--machine`) relative to where the schedule is
/// written, or absolute when no relative path reaches it.
fn point_at_machine(d: &mut Design, machine: &Path, emitted: &Path) {
    // Both exist by now (the machine was read; the emitted file's folder is
    // where it will be written), so both resolve to their real paths.
    let real = |p: &Path| {
        std::fs::canonicalize(p)
            .or_else(|_| std::path::absolute(p))
            .unwrap_or_else(|_| p.to_path_buf())
    };
    let m = real(machine);
    let parent = emitted
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let dir = real(parent);
    let named = relative_to(&m, &dir).unwrap_or(m);
    d.schedule.machine = Some(named.to_string_lossy().replace('\\', "/"));
}

/// `target` as a path from the folder `base` (both absolute), by their
/// shared leading components; `None` when they share none (other drives).
fn relative_to(target: &Path, base: &Path) -> Option<PathBuf> {
    let (t, b): (Vec<_>, Vec<_>) = (target.components().collect(), base.components().collect());
    let shared = t.iter().zip(&b).take_while(|(x, y)| x == y).count();
    if shared == 0 {
        return None;
    }
    let mut out = PathBuf::new();
    for _ in shared..b.len() {
        out.push("..");
    }
    for c in &t[shared..] {
        out.push(c);
    }
    Some(out)
}
