//! Options every report command shares.

use std::path::PathBuf;

use clap::Args;

use crate::report::Format;

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
