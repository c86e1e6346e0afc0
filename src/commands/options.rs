//! Options every report command shares.

use std::path::PathBuf;

use clap::Args;

use crate::report::table::{terminal_width, TableOptions, View};
use crate::report::units::Units;
use crate::report::{Format, Look};

/// Options every report command shares.
#[derive(Debug, Clone, Args)]
pub struct ReportArgs {
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Write the report to this file instead of standard output (written whole or not at all).
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Also draw a chart to this SVG file (the name must end in .svg).
    #[arg(long, value_name = "FILE.svg", value_parser = svg_path)]
    pub plot: Option<PathBuf>,
}

/// Accepts a chart path only when it ends in `.svg`: the chart is SVG, and a
/// `.png` name would hold SVG text that image viewers refuse.
pub fn svg_path(s: &str) -> Result<PathBuf, String> {
    let p = PathBuf::from(s);
    match p.extension().and_then(|e| e.to_str()) {
        Some(e) if e.eq_ignore_ascii_case("svg") => Ok(p),
        _ => Err(format!(
            "'{s}': the chart is drawn as SVG, so its file name must end in .svg (convert it afterwards, e.g. rsvg-convert chart.svg -o chart.png)"
        )),
    }
}

/// Accepts `s` as the name of a file of one fixed kind when its extension is
/// one of `allowed` (any case); otherwise the message names the value, what
/// the file holds, the allowed extensions and `or` (another way out, may be
/// empty). Clap puts the option before it and exits 2 (bad usage) before
/// anything is read or written.
fn path_ending(s: &str, holds: &str, allowed: &[&str], or: &str) -> Result<PathBuf, String> {
    let p = PathBuf::from(s);
    let ext = p.extension().and_then(|e| e.to_str()).unwrap_or("");
    if allowed.iter().any(|a| a.eq_ignore_ascii_case(ext)) {
        return Ok(p);
    }
    let list: Vec<String> = allowed.iter().map(|a| format!(".{a}")).collect();
    let list = match list.split_last() {
        Some((last, [])) => last.clone(),
        Some((last, rest)) => format!("{} or {last}", rest.join(", ")),
        None => String::new(),
    };
    Err(format!(
        "'{s}': {holds}, so the file name must end in {list}{or}"
    ))
}

/// `--emit-schedule`: the designed schedule is a YAML file for `check`.
pub fn schedule_yaml_path(s: &str) -> Result<PathBuf, String> {
    path_ending(
        s,
        "the designed schedule is written as YAML",
        &["yaml", "yml"],
        "",
    )
}

/// `--emit-law`: the fitted law is a YAML `flow:` block for a schedule.
pub fn law_yaml_path(s: &str) -> Result<PathBuf, String> {
    path_ending(
        s,
        "the law is written as a YAML flow: block",
        &["yaml", "yml"],
        "",
    )
}

/// `--keep-samples`: the kept samples are a CSV table, one row a sample.
pub fn samples_csv_path(s: &str) -> Result<PathBuf, String> {
    path_ending(s, "the samples are written as a CSV table", &["csv"], "")
}

/// `init`'s FILE: a starter is a YAML file; an existing folder gets it
/// under its default name.
pub fn starter_path(s: &str) -> Result<PathBuf, String> {
    if std::path::Path::new(s).is_dir() {
        return Ok(PathBuf::from(s));
    }
    path_ending(
        s,
        "the starter is written as YAML",
        &["yaml", "yml"],
        ", or name an existing folder",
    )
}

/// How a people's report (table, HTML page) is laid out.
#[derive(Debug, Clone, Args)]
pub struct ViewArgs {
    /// Units of the table and the HTML page: si (mm, MPa, kN, m/s, kW, C) or
    /// us (in, ksi, lbf, ft/min, hp, F). JSON, YAML and CSV stay SI, as their keys say.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    pub units: Units,
    /// Table: every column (passes, drawing stress by method, line figures)
    /// instead of the figures read first.
    #[arg(long, conflicts_with = "columns")]
    pub wide: bool,
    /// Table: only these pass columns, by their JSON keys (e.g.
    /// step,exit_diameter_mm,draw_ratio,flags).
    #[arg(long, value_name = "KEY,KEY,...", value_delimiter = ',')]
    pub columns: Option<Vec<String>>,
    /// CSV: one row of the summary keys (passes, anneals, worst ratio,
    /// throughput, tonnes per shift, total power, verdict) instead of one row per step.
    #[arg(long)]
    pub summary: bool,
}

impl ViewArgs {
    /// The report look these options ask for, fitted to the terminal.
    pub fn look(&self) -> Look {
        Look {
            table: TableOptions {
                view: match (&self.columns, self.wide) {
                    (Some(keys), _) => View::Pick(keys.clone()),
                    (None, true) => View::Wide,
                    (None, false) => View::First,
                },
                units: self.units,
                width: terminal_width(),
            },
            csv_summary: self.summary,
        }
    }
}
