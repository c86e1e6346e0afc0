//! `coldpass check FILE`: evaluate a pass schedule and report it.

use std::path::PathBuf;

use anyhow::{Context, Result};
use clap::Args;
use coldpass::evaluation::{evaluate_on, EvaluateOptions};
use coldpass::machine::{self, Machine};
use coldpass::schedule::{self, ScheduleFile};
use coldpass::Method;

use super::options::{ReportArgs, ViewArgs};
use super::{EXIT_OK, EXIT_OVER};
use crate::{output, report};

/// Arguments of `coldpass check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The schedule file (YAML), or a folder of them.
    pub file: PathBuf,
    /// More schedule files or folders: one summary row per product (the catalogue).
    #[arg(value_name = "MORE")]
    pub more: Vec<PathBuf>,
    /// Governing method, overriding the file's `limits.method`.
    #[arg(long, value_name = "NAME", value_parser = method_parser())]
    pub method: Option<Method>,
    /// Run the schedule on this machine file (YAML), overriding the file's `machine:`.
    #[arg(long, value_name = "FILE")]
    pub machine: Option<PathBuf>,
    #[command(flatten)]
    pub report: ReportArgs,
    #[command(flatten)]
    pub view: ViewArgs,
}

/// `--method`: one of the core's method names ([`Method::name`]), so that
/// `--help`, completions and a wrong name list them all.
pub fn method_parser() -> impl clap::builder::TypedValueParser<Value = Method> {
    use clap::builder::TypedValueParser;
    clap::builder::PossibleValuesParser::new(Method::ALL.map(Method::name))
        .try_map(|name| name.parse::<Method>().map_err(|e| e.allowed))
}

/// Runs `coldpass check`: exit 0 within limits, 3 over a limit.
pub fn run(args: &CheckArgs) -> Result<u8> {
    if !args.more.is_empty() || args.file.is_dir() {
        return super::catalogue::run(args);
    }
    let text = read_schedule_text(&args.file)?;
    let file = schedule::parse(&text)
        .with_context(|| format!("reading schedule '{}'", args.file.display()))?;
    let machine = read_machine(args, &file)?;
    let rep = evaluate_on(
        &file,
        &EvaluateOptions {
            method: args.method,
        },
        machine.as_ref().map(|(_, m)| m),
    )
    .with_context(|| format!("checking schedule '{}'", args.file.display()))?;
    output::ensure_finite("report", &rep)?;
    let body = report::render_schedule(&rep, &file, args.report.format, &args.view.look())?;
    // Render everything before writing anything, so a failure leaves no partial output.
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg::schedule(&rep, &file)?),
        None => None,
    };
    // Neither the schedule nor its machine file may be overwritten by an output.
    let mut inputs = vec![args.file.as_path()];
    if let Some((path, _)) = &machine {
        inputs.push(path.as_path());
    }
    let mut outputs = output::Outputs::new(&inputs);
    if let (Some(path), Some(svg)) = (&args.report.plot, chart) {
        outputs.file("--plot", path, svg);
    }
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    Ok(if rep.is_over() { EXIT_OVER } else { EXIT_OK })
}

/// The machine: `--machine FILE`, else the schedule's `machine:` path
/// (relative to the schedule file), else none.
pub fn read_machine(args: &CheckArgs, file: &ScheduleFile) -> Result<Option<(PathBuf, Machine)>> {
    machine_of(&args.file, args.machine.as_deref(), file)
}

/// The machine a schedule at `schedule_path` runs on: `given` (the
/// `--machine` option) when there is one, else the file's `machine:` path,
/// relative to the schedule file's folder, else none.
pub fn machine_of(
    schedule_path: &std::path::Path,
    given: Option<&std::path::Path>,
    file: &ScheduleFile,
) -> Result<Option<(PathBuf, Machine)>> {
    let path = match (given, &file.machine) {
        (Some(p), _) => p.to_path_buf(),
        (None, Some(rel)) => schedule_path
            .parent()
            .unwrap_or_else(|| std::path::Path::new(""))
            .join(rel),
        (None, None) => return Ok(None),
    };
    let text = crate::input::read_text(&path).with_context(|| {
        if given.is_some() {
            "reading the --machine file".to_string()
        } else {
            format!(
                "reading the machine file that '{}' names (machine: {})",
                schedule_path.display(),
                file.machine.as_deref().unwrap_or_default()
            )
        }
    })?;
    let m =
        machine::parse(&text).with_context(|| format!("reading machine '{}'", path.display()))?;
    Ok(Some((path, m)))
}

/// Reads a schedule (or design) file's text: a UTF-8 byte-order mark is
/// dropped, and a CSV file is refused in one line, pointing to `fit`.
pub fn read_schedule_text(path: &std::path::Path) -> Result<String> {
    let text = crate::input::read_text(path)?;
    let text = text
        .strip_prefix('\u{feff}')
        .map(str::to_string)
        .unwrap_or(text);
    let is_csv_name = path
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    let looks_csv = first.contains(',') && !first.contains(':');
    if is_csv_name || looks_csv {
        anyhow::bail!(
            "'{}' looks like a CSV table, not a schedule file: check and design read YAML (title:, material:, passes: ...); a tensile record goes to `coldpass fit`",
            path.display()
        );
    }
    Ok(text)
}
