//! Report formats. Each format renders a neutral result from the core into
//! bytes; only `crate::output` writes them anywhere.

pub mod csv;
pub mod design;
pub mod fit;
pub mod machine;
pub mod svg;
pub mod table;

use anyhow::Result;
use coldpass::evaluation::ScheduleReport;

use crate::cli::Format;

/// Renders a schedule report in `format` (JSON and YAML straight from serde).
pub fn render_schedule(report: &ScheduleReport, format: Format) -> Result<Vec<u8>> {
    Ok(match format {
        Format::Table => table::schedule(report).into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(report)?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(report)?.into_bytes(),
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
