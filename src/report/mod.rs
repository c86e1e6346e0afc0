//! Report formats. Each format renders a neutral result from the core into
//! bytes; only `crate::output` writes them anywhere.

pub mod catalogue;
pub mod chart;
pub mod columns;
pub mod compare;
pub mod csv;
pub mod design;
pub mod fit;
pub mod html;
pub mod machine;
pub mod risk;
pub mod svg;
pub mod table;
pub mod units;

use anyhow::anyhow;
use anyhow::Result;
use coldpass::evaluation::ScheduleReport;
use coldpass::schedule::ScheduleFile;

/// How a report is written; the report side owns it, so that `commands/`
/// and `cli.rs` depend on `report/` and never the other way round.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// Tables for people.
    Table,
    /// JSON for programs.
    Json,
    /// YAML for programs.
    Yaml,
    /// CSV, one row per step.
    Csv,
    /// One self-contained HTML page to print or send (charts inline).
    Html,
}

/// How a people's report is laid out (the table's columns and width, the
/// units of the table and the page); JSON, YAML and CSV stay in the SI units
/// their keys name.
#[derive(Debug, Clone, Default)]
pub struct Look {
    /// The table's view, units and width.
    pub table: table::TableOptions,
    /// CSV: the summary row instead of one row per step.
    pub csv_summary: bool,
}

/// Renders a schedule report in `format` (JSON and YAML straight from serde).
pub fn render_schedule(
    report: &ScheduleReport,
    file: &ScheduleFile,
    format: Format,
    look: &Look,
) -> Result<Vec<u8>> {
    Ok(match format {
        Format::Table => table::schedule(report, &look.table)
            .map_err(|e| anyhow!(e))?
            .into_bytes(),
        Format::Html => html::schedule_page(report, file, look.table.units)?.into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(report)?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(report)?.into_bytes(),
        Format::Csv if look.csv_summary => csv::summary(report)?,
        Format::Csv => csv::schedule(report)?,
    })
}

/// A number with `digits` decimals, or a dash when there is none.
pub fn fixed(x: Option<f64>, digits: usize) -> String {
    match x {
        Some(v) if v.is_finite() => format!("{v:.digits$}"),
        Some(v) => format!("{v}"),
        None => "-".to_string(),
    }
}
