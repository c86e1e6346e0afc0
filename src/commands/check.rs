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
    let text = read_schedule_text(&args.file, Reader::Check)?;
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
        Some(_) => Some(report::svg::schedule_in(&rep, &file, args.view.units)?),
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
    let text = crate::input::read_text(&path)
        .map(strip_bom)
        .with_context(|| {
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
    if looks_csv(&text, &path) {
        anyhow::bail!(
            "'{}' is not a machine file: it looks like a CSV table; a machine file is YAML with \
             `kind:` and `blocks:` (`coldpass init machine` writes one)",
            path.display()
        );
    }
    if let Some(kind) = other_kind(&text, Expected::Machine, &path) {
        anyhow::bail!(
            "'{}' is not a machine file: it looks like {kind}; a machine file has `kind:` and \
             `blocks:` (`coldpass init machine` writes one)",
            path.display()
        );
    }
    let m =
        machine::parse(&text).with_context(|| format!("reading machine '{}'", path.display()))?;
    // The wire enters die 1 at the schedule's ambient and only warms: a limit
    // at or below it flags every die, as the schedule's own limit would be
    // refused for.
    let ambient = file.limits.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C);
    if let Some(t) = m.wire_temperature_max_c.filter(|&t| t <= ambient) {
        anyhow::bail!(
            "reading machine '{}': `wire_temperature_max_c` = {t}: allowed above the ambient \
             {ambient} C at which the wire enters die 1 (the schedule's `limits.ambient_c`), \
             and at most {} C",
            path.display(),
            schedule::WIRE_TEMPERATURE_MAX_C
        );
    }
    Ok(Some((path, m)))
}

/// The command that reads a schedule or design file, for the messages that
/// say what it reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Reader {
    /// `coldpass check` (one file or a catalogue).
    Check,
    /// `coldpass design`.
    Design,
    /// `coldpass risk`.
    Risk,
    /// `coldpass compare`.
    Compare,
}

impl Reader {
    /// The kind of file the command reads.
    fn noun(self) -> &'static str {
        match self {
            Reader::Check => "a schedule file",
            Reader::Design => "a design file",
            Reader::Risk | Reader::Compare => "a schedule or design file",
        }
    }

    /// `coldpass NAME reads ...`: the command and what it reads, in words.
    fn reads(self) -> &'static str {
        match self {
            Reader::Check => "coldpass check reads a schedule file in YAML (title:, material:, start:, passes: ...)",
            Reader::Design => "coldpass design reads a design file in YAML (title:, material:, start:, target: ...)",
            Reader::Risk => "coldpass risk reads a schedule or design file in YAML with a `scatter:` block (title:, material:, passes: or target:, scatter: ...)",
            Reader::Compare => "coldpass compare reads two schedule or design files in YAML (title:, material:, passes: or target: ...)",
        }
    }
}

/// Reads a schedule (or design) file's text for `reader`: a UTF-8
/// byte-order mark is dropped, and a CSV file is refused in one line that
/// names the command, what it reads, and points to `fit`.
pub fn read_schedule_text(path: &std::path::Path, reader: Reader) -> Result<String> {
    let text = strip_bom(crate::input::read_text(path)?);
    if let Some(kind) = other_kind(&text, Expected::Schedule, path) {
        anyhow::bail!(
            "'{}' is not a schedule or design file: it looks like {kind}",
            path.display()
        );
    }
    if looks_csv(&text, path) {
        anyhow::bail!(
            "'{}' looks like a CSV table, not {}: {}; a tensile record goes to `coldpass fit`",
            path.display(),
            reader.noun(),
            reader.reads()
        );
    }
    Ok(text)
}

/// Whether a file is a CSV table: named `.csv`, or its first line that is
/// not a comment holds commas and no `key:`.
fn looks_csv(text: &str, path: &std::path::Path) -> bool {
    let is_csv_name = path
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"));
    let first = text
        .lines()
        .map(str::trim)
        .find(|l| !l.is_empty() && !l.starts_with('#'))
        .unwrap_or("");
    is_csv_name || (first.contains(',') && !first.contains(':'))
}

/// `text` without a leading UTF-8 byte-order mark.
fn strip_bom(text: String) -> String {
    text.strip_prefix('\u{feff}')
        .map(str::to_string)
        .unwrap_or(text)
}

/// Which kind of file a command expects.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Expected {
    Schedule,
    Machine,
}

/// The top-level keys of a YAML file: the lines that start at column 0 with
/// `key:` (comments and list items left out). A cheap look, taken only to
/// name a file given in the wrong place; the parser still has the last word.
fn top_keys(text: &str) -> Vec<&str> {
    text.lines()
        .filter(|l| !l.starts_with([' ', '\t', '#', '-']))
        .filter_map(|l| l.split_once(':').map(|(k, _)| k.trim()))
        .filter(|k| !k.is_empty() && !k.contains(' '))
        .collect()
}

/// What a YAML file given where a tensile record belongs looks like, and
/// where it goes instead: `(what, where)`, from its top-level keys; `None`
/// with fewer than two (a CSV header such as `strain: fraction,stress: MPa`
/// is one `key:` line, not a YAML file).
pub(crate) fn yaml_kind(text: &str) -> Option<(&'static str, &'static str)> {
    let keys = top_keys(text);
    if keys.len() < 2 {
        return None;
    }
    let has = |k: &str| keys.contains(&k);
    Some(if has("passes") {
        (
            "a schedule file (YAML, with `passes:`)",
            "a schedule goes to `coldpass check FILE`",
        )
    } else if has("target") {
        (
            "a design file (YAML, with `target:`)",
            "a design file goes to `coldpass design FILE`",
        )
    } else if has("blocks") && has("kind") {
        (
            "a machine file (YAML, with `kind:` and `blocks:`)",
            "a machine file goes to `coldpass check SCHEDULE --machine FILE`",
        )
    } else if has("flow") {
        (
            "a flow law (YAML, `flow:` as `--emit-law` writes it)",
            "a flow law goes under `material:` in a schedule",
        )
    } else if has("material") || has("start") || has("title") {
        (
            "a schedule or design file (YAML)",
            "a schedule goes to `coldpass check FILE`, a design file to `coldpass design FILE`",
        )
    } else {
        ("a YAML file", "give the tensile record's CSV file")
    })
}

/// What `text` is when it is plainly another kind of coldpass file than the
/// one expected, with where it goes (`None` when it may be the right one).
fn other_kind(text: &str, expected: Expected, path: &std::path::Path) -> Option<String> {
    let keys = top_keys(text);
    let has = |k: &str| keys.contains(&k);
    let schedule_like = has("passes") || has("material") || has("target") || has("start");
    match expected {
        Expected::Schedule if !schedule_like && has("blocks") && has("kind") => Some(format!(
            "a machine file (it has `kind:` and `blocks:`): give it with --machine {} or as \
             `machine: {}` in the schedule",
            path.display(),
            path.display()
        )),
        Expected::Schedule if !schedule_like && has("flow") => Some(
            "a flow law (`flow:` alone, as `coldpass fit --emit-law` writes it): paste its \
             blocks under `material:` in a schedule"
                .into(),
        ),
        Expected::Machine if schedule_like => Some(
            "a schedule or design file (it has `material:`, `start:`, `passes:` or `target:`): \
             give the schedule as check's FILE and its machine with --machine"
                .into(),
        ),
        _ => None,
    }
}
