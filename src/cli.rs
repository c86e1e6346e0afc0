//! Command-line types (clap derive) and nothing else.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// Plan the cold drawing of round wire and bar: strain, flow stress, drawing
/// stress, limits, anneals, speeds and power. Figures are planning estimates
/// to confirm by trial; the machine maker's limits, local codes and licensed
/// practice govern.
#[derive(Debug, Parser)]
#[command(name = "coldpass", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Evaluate a pass schedule pass by pass against the mill's limits.
    Check(crate::commands::check::CheckArgs),
    /// Lay out reductions, die angles and anneals that meet the mill's limits.
    Design(crate::commands::design::DesignArgs),
    /// Fit hardening laws to a tensile-test record.
    Fit(crate::commands::fit::FitArgs),
    /// How likely each pass is to break when friction, material and sizes scatter.
    Risk(crate::commands::risk::RiskArgs),
}

/// How a report is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Tables for people.
    Table,
    /// JSON for programs.
    Json,
    /// YAML for programs.
    Yaml,
    /// CSV, one row per step.
    Csv,
}

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
