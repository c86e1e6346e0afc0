//! `coldpass fit FILE.csv`: read a tensile record, fit every hardening law,
//! write the report, the chart and the chosen law.
//!
//! Everything is built in memory first, so that on any error nothing is written.

use std::path::{Path, PathBuf};

use anyhow::{anyhow, bail, Context, Result};
use clap::builder::{PossibleValuesParser, TypedValueParser};
use clap::{Args, ValueEnum};

use coldpass::fit::{self, DataKind, FitError, FitLaw, FitOptions};

use crate::commands::options::ReportArgs;
use crate::commands::EXIT_OK;
use crate::output;
use crate::report::fit as report;
use crate::report::Format;

/// Arguments of `coldpass fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Tensile record: CSV with a header row; lines starting with `#` are notes.
    #[arg(value_name = "FILE.csv")]
    pub file: PathBuf,
    /// What the record holds: engineering strain and stress (elastic part
    /// included), or true plastic strain and true stress already converted.
    #[arg(long, value_enum, default_value_t = DataArg::Engineering)]
    pub data: DataArg,
    /// Strain column (header name); default: the column whose header contains `strain`.
    #[arg(long, value_name = "NAME")]
    pub strain_col: Option<String>,
    /// Stress column (header name, MPa); default: the header containing `stress`.
    #[arg(long, value_name = "NAME")]
    pub stress_col: Option<String>,
    /// Force column (header name); default: the header containing `force`.
    #[arg(long, value_name = "NAME")]
    pub force_col: Option<String>,
    /// Extension column (header name, mm); default: the header containing `extension`.
    #[arg(long, value_name = "NAME")]
    pub extension_col: Option<String>,
    /// Strain given as a fraction or in percent; default: percent when the
    /// strain header contains `%` or `percent`.
    #[arg(long, value_enum)]
    pub strain_unit: Option<StrainUnit>,
    /// Force in N or kN; default: kN when the force header contains `kN`.
    #[arg(long, value_enum)]
    pub force_unit: Option<ForceUnit>,
    /// Extensometer gauge length L0, mm (for force and extension records).
    #[arg(long, value_name = "MM")]
    pub gauge_length_mm: Option<f64>,
    /// Original specimen diameter d0, mm (area pi d0^2 / 4).
    #[arg(long, value_name = "MM", conflicts_with = "area_mm2")]
    pub diameter_mm: Option<f64>,
    /// Original cross-section A0, mm^2 (instead of --diameter-mm).
    #[arg(long, value_name = "MM2")]
    pub area_mm2: Option<f64>,
    /// Shear modulus G, GPa: warn when Hollomon K is outside G/1000 to G/100.
    #[arg(long, value_name = "GPA")]
    pub shear_modulus_gpa: Option<f64>,
    /// Accumulated true strain the schedule reaches (the demo copper schedules
    /// reach about 3 to 3.5): shows each law's stress there and how far past
    /// the tensile test that is.
    #[arg(long, value_name = "STRAIN")]
    pub reach_strain: Option<f64>,
    /// Law for --emit-law; default: the best by AIC. The total-strain forms
    /// are written as `perfectly-plastic` and `linear`.
    #[arg(long, value_name = "NAME", value_parser = law_parser())]
    pub law: Option<FitLaw>,
    /// Write the chosen law as a `flow:` block for a schedule file.
    #[arg(long, value_name = "FILE.yaml")]
    pub emit_law: Option<PathBuf>,
    #[command(flatten)]
    pub report: ReportArgs,
}

/// What the two columns hold.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum DataArg {
    /// Engineering strain and stress.
    Engineering,
    /// True plastic strain and true stress.
    True,
}

/// Unit of the strain column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StrainUnit {
    /// 0.25 means 25 %.
    Fraction,
    /// 25 means 25 %.
    Percent,
}

/// Unit of the force column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ForceUnit {
    /// Newtons.
    N,
    /// Kilonewtons.
    Kn,
}

/// `--law`: one of the core's law names ([`FitLaw::name`]), so the list lives
/// in one place; `--help` and a wrong name list them all.
fn law_parser() -> impl TypedValueParser<Value = FitLaw> {
    PossibleValuesParser::new(FitLaw::ALL.map(FitLaw::name))
        .try_map(|name| FitLaw::from_name(&name).ok_or_else(|| format!("no law is named '{name}'")))
}

/// A numeric column read from the file, with the line of each value.
struct Column {
    header: String,
    values: Vec<f64>,
}

/// The table as read: headers, and the file line of each data row.
struct Table {
    headers: Vec<String>,
    rows: Vec<csv::StringRecord>,
    lines: Vec<u64>,
}

fn read_table(path: &Path) -> Result<Table> {
    let text = crate::input::read_text(path)?;
    let mut reader = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = reader
        .headers()
        .with_context(|| format!("reading the header row of '{}'", path.display()))?
        .iter()
        .map(str::to_string)
        .collect();
    if headers.iter().all(String::is_empty) {
        bail!("'{}' has no header row", path.display());
    }
    let mut rows = Vec::new();
    let mut lines = Vec::new();
    for rec in reader.records() {
        let rec = rec.with_context(|| format!("reading '{}'", path.display()))?;
        if rec.iter().all(str::is_empty) {
            continue;
        }
        lines.push(rec.position().map_or(0, |p| p.line()));
        rows.push(rec);
    }
    Ok(Table {
        headers,
        rows,
        lines,
    })
}

impl Table {
    /// The index of a column: the one named by the option, else the one whose
    /// header contains `word`.
    fn find(&self, path: &Path, word: &str, named: Option<&str>, flag: &str) -> Result<usize> {
        let present = || {
            self.headers
                .iter()
                .map(|h| format!("'{h}'"))
                .collect::<Vec<_>>()
                .join(", ")
        };
        if let Some(name) = named {
            return self
                .headers
                .iter()
                .position(|h| h.eq_ignore_ascii_case(name.trim()))
                .ok_or_else(|| {
                    anyhow!(
                        "'{}': no column named '{name}' (from {flag}); the columns are {}",
                        path.display(),
                        present()
                    )
                });
        }
        let hits: Vec<usize> = self
            .headers
            .iter()
            .enumerate()
            .filter(|(_, h)| h.to_lowercase().contains(word))
            .map(|(i, _)| i)
            .collect();
        match hits.as_slice() {
            [i] => Ok(*i),
            [] => bail!(
                "'{}': no column header contains '{word}'; the columns are {}; name one with {flag}",
                path.display(),
                present()
            ),
            _ => bail!(
                "'{}': several column headers contain '{word}' ({}); choose one with {flag}",
                path.display(),
                hits.iter()
                    .map(|&i| format!("'{}'", self.headers[i]))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        }
    }

    fn has(&self, word: &str) -> bool {
        self.headers.iter().any(|h| h.to_lowercase().contains(word))
    }

    fn column(&self, path: &Path, index: usize) -> Result<Column> {
        let header = self.headers[index].clone();
        let mut values = Vec::with_capacity(self.rows.len());
        for (rec, line) in self.rows.iter().zip(&self.lines) {
            let cell = rec.get(index).unwrap_or("");
            let v: f64 = cell.parse().map_err(|_| {
                if cell.is_empty() {
                    anyhow!(
                        "'{}' line {line}, column '{header}': the cell is empty; a number is needed",
                        path.display()
                    )
                } else {
                    anyhow!(
                        "'{}' line {line}, column '{header}': '{cell}' is not a number",
                        path.display()
                    )
                }
            })?;
            values.push(v);
        }
        Ok(Column { header, values })
    }
}

/// Engineering (or true) strain and stress (MPa), with a note on how they were read.
struct Record {
    strain: Vec<f64>,
    stress_mpa: Vec<f64>,
    columns: String,
}

fn read_record(args: &FitArgs, table: &Table) -> Result<Record> {
    let path = args.file.as_path();
    let force_mode = args.force_col.is_some()
        || args.extension_col.is_some()
        || args.gauge_length_mm.is_some()
        || (args.strain_col.is_none()
            && args.stress_col.is_none()
            && !(table.has("strain") && table.has("stress"))
            && (table.has("force") || table.has("extension")));
    if !force_mode {
        let si = table.find(path, "strain", args.strain_col.as_deref(), "--strain-col")?;
        let ti = table.find(path, "stress", args.stress_col.as_deref(), "--stress-col")?;
        let strain = table.column(path, si)?;
        let stress = table.column(path, ti)?;
        let h = strain.header.to_lowercase();
        let unit = args
            .strain_unit
            .unwrap_or(if h.contains('%') || h.contains("percent") {
                StrainUnit::Percent
            } else {
                StrainUnit::Fraction
            });
        let scale = if unit == StrainUnit::Percent {
            0.01
        } else {
            1.0
        };
        return Ok(Record {
            strain: strain.values.iter().map(|v| v * scale).collect(),
            stress_mpa: stress.values,
            columns: format!(
                "strain '{}' ({}), stress '{}' (MPa)",
                strain.header,
                if scale == 1.0 { "fraction" } else { "percent" },
                stress.header
            ),
        });
    }
    if args.data == DataArg::True {
        bail!("--data true takes strain and stress columns, not force and extension");
    }
    let fi = table.find(path, "force", args.force_col.as_deref(), "--force-col")?;
    let xi = table.find(
        path,
        "extension",
        args.extension_col.as_deref(),
        "--extension-col",
    )?;
    let gauge = args.gauge_length_mm.with_context(|| {
        format!(
            "'{}' gives force and extension: --gauge-length-mm is needed to turn extension into strain",
            path.display()
        )
    })?;
    let area = match (args.area_mm2, args.diameter_mm) {
        (Some(a), _) => a,
        (None, Some(d)) => fit::round_area_mm2(d)?,
        (None, None) => bail!(
            "'{}' gives force and extension: --diameter-mm or --area-mm2 is needed to turn force into stress",
            path.display()
        ),
    };
    let force = table.column(path, fi)?;
    let ext = table.column(path, xi)?;
    let unit = args
        .force_unit
        .unwrap_or(if force.header.to_lowercase().contains("kn") {
            ForceUnit::Kn
        } else {
            ForceUnit::N
        });
    let scale = if unit == ForceUnit::Kn { 1000.0 } else { 1.0 };
    let force_n: Vec<f64> = force.values.iter().map(|v| v * scale).collect();
    let (strain, stress_mpa) = fit::engineering_from_force(&force_n, &ext.values, gauge, area)?;
    Ok(Record {
        strain,
        stress_mpa,
        columns: format!(
            "force '{}' ({}), extension '{}' (mm), gauge length {gauge} mm, area {area:.4} mm^2",
            force.header,
            if scale == 1.0 { "N" } else { "kN" },
            ext.header
        ),
    })
}

/// Runs `coldpass fit`.
pub fn run(args: &FitArgs) -> Result<u8> {
    let path = args.file.as_path();
    let table = read_table(path)?;
    let record = read_record(args, &table)?;
    let options = FitOptions {
        data: match args.data {
            DataArg::Engineering => DataKind::Engineering,
            DataArg::True => DataKind::True,
        },
        shear_modulus_gpa: args.shear_modulus_gpa,
        reach_strain: args.reach_strain,
    };
    let result = fit::fit_record(&record.strain, &record.stress_mpa, &options)
        .map_err(|e| locate(e, path, &table.lines))?;

    let source = report::Source {
        file: path.display().to_string(),
        columns: record.columns,
    };
    let body = match args.report.format {
        Format::Table => report::table(&result, &source),
        Format::Json => report::json(&result, &source)?,
        Format::Yaml => report::yaml(&result, &source)?,
        Format::Csv => report::csv(&result, &source)?,
        Format::Html => crate::report::html::fit_page(&result, &source)?,
    };
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg(&result, &source)?),
        None => None,
    };
    let law_file = match &args.emit_law {
        Some(_) => {
            let chosen = args
                .law
                .or(result.best)
                .context("no fitted law is valid for a schedule, so there is none to write")?;
            Some(report::law_yaml(&result, chosen, &source)?)
        }
        None => None,
    };
    if let Some(text) = &law_file {
        // The law file feeds a schedule: no figure in it may be inf or NaN.
        let tree: serde_yaml::Value = serde_yaml::from_str(text)?;
        output::ensure_finite("law file", &tree)?;
    }
    // Everything is built: now write.
    let mut outputs = output::Outputs::new(&[path]);
    if let (Some(p), Some(bytes)) = (&args.report.plot, chart) {
        outputs.file("--plot", p, bytes.into_bytes());
    }
    if let (Some(p), Some(bytes)) = (&args.emit_law, law_file) {
        outputs.file("--emit-law", p, bytes.into_bytes());
    }
    outputs.report(args.report.output.as_deref(), body.into_bytes());
    outputs.write()?;
    Ok(EXIT_OK)
}

/// Names the file and line of a core error about one data point.
fn locate(err: FitError, path: &Path, lines: &[u64]) -> anyhow::Error {
    let at = err
        .point()
        .and_then(|p| lines.get(p.wrapping_sub(1)))
        .map(|line| format!(" (point {} is line {line})", err.point().unwrap_or(0)));
    anyhow::Error::new(err).context(format!(
        "fitting '{}'{}",
        path.display(),
        at.unwrap_or_default()
    ))
}
