//! `coldpass fit FILE.csv [FILE.csv ...]`: read tensile records, fit every
//! hardening law to each, then the set; write the report, the chart and the
//! chosen law.
//!
//! The record is read straight into two columns of numbers (no table of
//! strings is kept), with the separator (comma, semicolon, tab) found from
//! the header row and the units from the headers or the options.
//! Everything is built in memory first, so that on any error nothing is written.

use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};

use anyhow::{anyhow, bail, Context, Result};
use clap::builder::{PossibleValuesParser, TypedValueParser};
use clap::{Args, ValueEnum};

use coldpass::fit::{
    self, DataKind, DrawnPoint, FitError, FitLaw, FitOptions, FitReport, MaterialClass,
};

use crate::commands::options::ReportArgs;
use crate::commands::EXIT_OK;
use crate::output;
use crate::report::fit as report;
use crate::report::units::Units;
use crate::report::Format;

/// Largest record file `fit` reads, bytes (about 50 million points): a
/// regular file is streamed, so it may be larger than the 16 MiB other
/// inputs are held to; a pipe or device is refused.
pub const MAX_RECORD_BYTES: u64 = 1 << 30;

/// Arguments of `coldpass fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Tensile records: CSV (comma, semicolon or tab) with a header row;
    /// lines starting with `#` are notes. Several files are several
    /// specimens of one material: each is fitted, then the set.
    #[arg(value_name = "FILE.csv", required = true, num_args = 1..)]
    pub files: Vec<PathBuf>,
    /// What the record holds: engineering strain and stress (elastic part
    /// included), or true plastic strain and true stress already converted.
    #[arg(long, value_enum, default_value_t = DataArg::Engineering)]
    pub data: DataArg,
    /// Strain column (header name); default: the column whose header contains `strain`.
    #[arg(long, value_name = "NAME")]
    pub strain_col: Option<String>,
    /// Stress column (header name); default: the header containing `stress`.
    #[arg(long, value_name = "NAME")]
    pub stress_col: Option<String>,
    /// Force column (header name); default: the header containing `force` or `load`.
    #[arg(long, value_name = "NAME")]
    pub force_col: Option<String>,
    /// Extension column (header name); default: the header containing `extension`.
    #[arg(long, value_name = "NAME")]
    pub extension_col: Option<String>,
    /// Strain given as a fraction or in percent; default: percent when the
    /// strain header contains `%` or `percent`.
    #[arg(long, value_enum)]
    pub strain_unit: Option<StrainUnit>,
    /// Stress unit; default: from the header (`MPa`, `N/mm2`, `ksi`, `psi`), else MPa.
    #[arg(long, value_enum)]
    pub stress_unit: Option<StressUnit>,
    /// Force unit; default: from the header (`N`, `kN`, `lbf`), else N.
    #[arg(long, value_enum)]
    pub force_unit: Option<ForceUnit>,
    /// Extension unit; default: from the header (`mm`, `in`), else mm.
    #[arg(long, value_enum)]
    pub extension_unit: Option<ExtensionUnit>,
    /// Extensometer gauge length L0, mm (for force and extension records).
    #[arg(long, value_name = "MM")]
    pub gauge_length_mm: Option<f64>,
    /// Original specimen diameter d0, mm (area pi d0^2 / 4).
    #[arg(long, value_name = "MM", conflicts_with = "area_mm2")]
    pub diameter_mm: Option<f64>,
    /// Original cross-section A0, mm^2 (instead of --diameter-mm).
    #[arg(long, value_name = "MM2")]
    pub area_mm2: Option<f64>,
    /// Shear modulus G, GPa (1 to 300): warn when Hollomon K is outside G/1000 to G/100.
    #[arg(long, value_name = "GPA")]
    pub shear_modulus_gpa: Option<f64>,
    /// Material class: warn when Young's modulus is far from the class's.
    #[arg(long, value_enum)]
    pub material: Option<MaterialArg>,
    /// Accumulated true strain the schedule reaches (0 to 10; the demo copper
    /// schedules reach about 3 to 3.5): shows each law's stress there and how
    /// far past the tensile test that is.
    #[arg(long, value_name = "STRAIN")]
    pub reach_strain: Option<f64>,
    /// A drawn-wire point, `STRAIN:MPA`: the tensile strength (MPa) of wire
    /// drawn from the tested rod to that true strain; repeat for more.
    #[arg(long, value_name = "STRAIN:MPA")]
    pub drawn_point: Vec<String>,
    /// A drawn-wire point, `D0_MM:D_MM:MPA`: start and drawn diameters and
    /// the drawn wire's tensile strength; strain 2 ln(d0/d).
    #[arg(long, value_name = "D0:D:MPA")]
    pub drawn_wire: Vec<String>,
    /// Law for --emit-law; default: the best by AIC (with the drawn-wire
    /// points when given). The total-strain forms are written as
    /// `perfectly-plastic` and `linear`.
    #[arg(long, value_name = "NAME", value_parser = law_parser())]
    pub law: Option<FitLaw>,
    /// Write the chosen law as a `flow:` block (with `flow_valid_to_strain`
    /// and `flow_scatter`) for a schedule file.
    #[arg(long, value_name = "FILE.yaml")]
    pub emit_law: Option<PathBuf>,
    /// Let --emit-law write a law whose fit did not converge.
    #[arg(long)]
    pub allow_unconverged: bool,
    /// Units of the table and the HTML page: si (MPa, GPa) or us (ksi, Msi;
    /// a stress parameter such as `k_mpa` also shown in ksi). JSON, YAML, CSV
    /// and the emitted law stay SI, as their keys say.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    pub units: Units,
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

/// Unit of the stress column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StressUnit {
    /// Megapascal.
    Mpa,
    /// Newton per square millimetre (= MPa).
    #[value(name = "n-mm2")]
    NMm2,
    /// Kilopound per square inch (6.894757 MPa).
    Ksi,
    /// Pound per square inch.
    Psi,
}

impl StressUnit {
    fn mpa(self) -> f64 {
        match self {
            StressUnit::Mpa | StressUnit::NMm2 => 1.0,
            StressUnit::Ksi => PSI_MPA * 1000.0,
            StressUnit::Psi => PSI_MPA,
        }
    }
    fn name(self) -> &'static str {
        match self {
            StressUnit::Mpa => "MPa",
            StressUnit::NMm2 => "N/mm2",
            StressUnit::Ksi => "ksi",
            StressUnit::Psi => "psi",
        }
    }
}

/// One psi in MPa: 4.4482216152605 N / (25.4 mm)^2 (exact by the
/// definitions of the pound-force and the inch).
const PSI_MPA: f64 = 4.448_221_615_260_5 / (25.4 * 25.4);

/// Unit of the force column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ForceUnit {
    /// Newtons.
    N,
    /// Kilonewtons.
    Kn,
    /// Pound-force (4.4482216152605 N).
    Lbf,
}

impl ForceUnit {
    fn newtons(self) -> f64 {
        match self {
            ForceUnit::N => 1.0,
            ForceUnit::Kn => 1000.0,
            ForceUnit::Lbf => 4.448_221_615_260_5,
        }
    }
    fn name(self) -> &'static str {
        match self {
            ForceUnit::N => "N",
            ForceUnit::Kn => "kN",
            ForceUnit::Lbf => "lbf",
        }
    }
}

/// Unit of the extension column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ExtensionUnit {
    /// Millimetres.
    Mm,
    /// Inches (25.4 mm).
    In,
}

/// Material classes for the modulus check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MaterialArg {
    /// Carbon and low-alloy steel (200-210 GPa).
    Steel,
    /// Austenitic stainless steel (190-200 GPa).
    Stainless,
    /// Copper (110-130 GPa).
    Copper,
    /// Brass (97-110 GPa).
    Brass,
    /// Aluminium (68-72 GPa).
    Aluminium,
    /// Titanium (105-120 GPa).
    Titanium,
    /// Nickel (200-210 GPa).
    Nickel,
}

impl MaterialArg {
    fn class(self) -> MaterialClass {
        match self {
            MaterialArg::Steel => MaterialClass::Steel,
            MaterialArg::Stainless => MaterialClass::Stainless,
            MaterialArg::Copper => MaterialClass::Copper,
            MaterialArg::Brass => MaterialClass::Brass,
            MaterialArg::Aluminium => MaterialClass::Aluminium,
            MaterialArg::Titanium => MaterialClass::Titanium,
            MaterialArg::Nickel => MaterialClass::Nickel,
        }
    }
}

/// `--law`: one of the core's law names ([`FitLaw::name`]), so the list lives
/// in one place; `--help` and a wrong name list them all.
fn law_parser() -> impl TypedValueParser<Value = FitLaw> {
    PossibleValuesParser::new(FitLaw::ALL.map(FitLaw::name))
        .try_map(|name| FitLaw::from_name(&name).ok_or_else(|| format!("no law is named '{name}'")))
}

/// The file line of each point: data rows are consecutive lines except
/// where notes or blank lines sit between them.
#[derive(Debug, Default)]
struct LineMap {
    /// `(first point, its line)` at each break.
    breaks: Vec<(usize, u64)>,
}

impl LineMap {
    fn note(&mut self, point: usize, line: u64) {
        let expected = self.breaks.last().map(|&(p, l)| l + (point - p) as u64);
        if expected != Some(line) {
            self.breaks.push((point, line));
        }
    }
    /// The line of the 1-based point.
    fn line(&self, point: usize) -> Option<u64> {
        let i = point.checked_sub(1)?;
        let k = self.breaks.partition_point(|b| b.0 <= i);
        let (p, l) = *self.breaks.get(k.checked_sub(1)?)?;
        Some(l + (i - p) as u64)
    }
}

/// Two columns read from a record.
struct Columns {
    headers: Vec<String>,
    first: Vec<f64>,
    second: Vec<f64>,
    lines: LineMap,
}

/// The separator of a header row: semicolon or tab when the row has one, else comma.
fn separator(header: &str) -> char {
    if header.contains(';') {
        ';'
    } else if header.contains('\t') {
        '\t'
    } else {
        ','
    }
}

fn unquote(s: &str) -> &str {
    let t = s.trim();
    t.strip_prefix('"')
        .and_then(|u| u.strip_suffix('"'))
        .unwrap_or(t)
        .trim()
}

fn open_record(path: &Path) -> Result<(Box<dyn BufRead>, u64)> {
    let meta = std::fs::metadata(path).with_context(|| format!("reading '{}'", path.display()))?;
    if meta.is_dir() {
        bail!(
            "'{}' is a folder: fit reads a tensile record file (CSV); name the files, e.g. '{}/*.csv'",
            path.display(),
            path.display()
        );
    }
    if !meta.is_file() {
        bail!(
            "'{}' is not a regular file: fit streams tensile records from files only",
            path.display()
        );
    }
    if meta.len() > MAX_RECORD_BYTES {
        bail!(
            "'{}' is {} bytes: a tensile record may be at most {MAX_RECORD_BYTES} bytes (1 GiB)",
            path.display(),
            meta.len()
        );
    }
    let f = std::fs::File::open(path).with_context(|| format!("reading '{}'", path.display()))?;
    Ok((Box::new(BufReader::with_capacity(1 << 16, f)), meta.len()))
}

/// Reads the header row and chooses the two columns with `pick`, then
/// reads those two columns as numbers, line by line as bytes (no table of
/// strings is kept: 16 bytes a point).
fn read_columns(
    path: &Path,
    pick: impl FnOnce(&[String]) -> Result<(usize, usize)>,
) -> Result<Columns> {
    let (mut reader, size) = open_record(path)?;
    let mut buf: Vec<u8> = Vec::with_capacity(256);
    let mut line_no = 0u64;
    let read_line = |reader: &mut Box<dyn BufRead>, buf: &mut Vec<u8>| -> Result<usize> {
        buf.clear();
        reader
            .read_until(b'\n', buf)
            .with_context(|| format!("reading '{}'", path.display()))
    };
    // The header: the first line that is not a note or blank.
    let header = loop {
        if read_line(&mut reader, &mut buf)? == 0 {
            bail!("'{}' has no header row", path.display());
        }
        line_no += 1;
        let t = String::from_utf8_lossy(&buf).trim().to_string();
        if !t.is_empty() && !t.starts_with('#') {
            break t;
        }
    };
    let sep = separator(&header);
    let headers: Vec<String> = header.split(sep).map(|h| unquote(h).to_string()).collect();
    let (a, b) = pick(&headers)?;
    let decimal_comma = sep != ',';
    let sep = sep as u8;
    let mut first = Vec::new();
    let mut second = Vec::new();
    let mut lines = LineMap::default();
    let mut bytes_seen = 0usize;
    let cell_value = |cell: &[u8], line: u64, col: usize| -> Result<f64> {
        let mut c = cell.trim_ascii();
        if c.len() >= 2 && c[0] == b'"' && c[c.len() - 1] == b'"' {
            c = c[1..c.len() - 1].trim_ascii();
        }
        let text = std::str::from_utf8(c).unwrap_or("\u{fffd}");
        let parsed = if decimal_comma && c.contains(&b',') {
            text.replace(',', ".").parse::<f64>()
        } else {
            text.parse::<f64>()
        };
        parsed.map_err(|_| {
            if c.is_empty() {
                anyhow!(
                    "'{}' line {line}, column '{}': the cell is empty; a number is needed",
                    path.display(),
                    headers[col]
                )
            } else {
                anyhow!(
                    "'{}' line {line}, column '{}': '{}' is not a number",
                    path.display(),
                    headers[col],
                    String::from_utf8_lossy(c)
                        .chars()
                        .take(40)
                        .collect::<String>()
                )
            }
        })
    };
    loop {
        let n = read_line(&mut reader, &mut buf)?;
        if n == 0 {
            break;
        }
        line_no += 1;
        let t = buf.trim_ascii();
        if t.is_empty() || t[0] == b'#' {
            continue;
        }
        // Room for the whole record once the line length is known.
        bytes_seen += n;
        if first.len() == 63 {
            let per_line = (bytes_seen / 64).max(1) as u64;
            let expect = (size / per_line + 64) as usize;
            first.reserve(expect.saturating_sub(first.len()));
            second.reserve(expect.saturating_sub(second.len()));
        }
        let (mut va, mut vb) = (None, None);
        for (i, cell) in t.split(|&ch| ch == sep).enumerate() {
            if i == a {
                va = Some(cell_value(cell, line_no, a)?);
            } else if i == b {
                vb = Some(cell_value(cell, line_no, b)?);
            }
            if va.is_some() && vb.is_some() {
                break;
            }
        }
        let va = match va {
            Some(v) => v,
            None => cell_value(b"", line_no, a)?,
        };
        let vb = match vb {
            Some(v) => v,
            None => cell_value(b"", line_no, b)?,
        };
        lines.note(first.len(), line_no);
        first.push(va);
        second.push(vb);
    }
    Ok(Columns {
        headers,
        first,
        second,
        lines,
    })
}

/// The index of a column: the one named by the option, else the one whose
/// header contains one of `words`.
fn find(
    headers: &[String],
    path: &Path,
    words: &[&str],
    named: Option<&str>,
    flag: &str,
) -> Result<usize> {
    let present = || {
        headers
            .iter()
            .map(|h| format!("'{h}'"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    if let Some(name) = named {
        return headers
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
    for word in words {
        let hits: Vec<usize> = headers
            .iter()
            .enumerate()
            .filter(|(_, h)| h.to_lowercase().contains(word))
            .map(|(i, _)| i)
            .collect();
        match hits.as_slice() {
            [i] => return Ok(*i),
            [] => continue,
            _ => bail!(
                "'{}': several column headers contain '{word}' ({}); choose one with {flag}",
                path.display(),
                hits.iter()
                    .map(|&i| format!("'{}'", headers[i]))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        }
    }
    bail!(
        "'{}': no column header contains '{}'; the columns are {}; name one with {flag}",
        path.display(),
        words.join("' or '"),
        present()
    )
}

fn has(headers: &[String], word: &str) -> bool {
    headers.iter().any(|h| h.to_lowercase().contains(word))
}

/// The unit written in a header: the text in its last brackets, `(...)` or
/// `[...]`, lower case; or its last word.
fn unit_of(header: &str) -> String {
    let h = header.trim();
    for (open, close) in [('(', ')'), ('[', ']')] {
        if let (Some(i), Some(j)) = (h.rfind(open), h.rfind(close)) {
            if i < j {
                return h[i + 1..j].trim().to_lowercase();
            }
        }
    }
    h.rsplit([' ', '_', '/'])
        .next()
        .unwrap_or("")
        .to_lowercase()
}

fn stress_unit_of(header: &str) -> Option<StressUnit> {
    let u = unit_of(header);
    let h = header.to_lowercase();
    if u == "ksi" || h.contains("ksi") {
        Some(StressUnit::Ksi)
    } else if u == "psi" || h.contains("(psi") || h.contains("[psi") {
        Some(StressUnit::Psi)
    } else if u.starts_with("n/mm") {
        Some(StressUnit::NMm2)
    } else if u == "mpa" || h.contains("mpa") {
        Some(StressUnit::Mpa)
    } else {
        None
    }
}

fn force_unit_of(header: &str) -> Option<ForceUnit> {
    let u = unit_of(header);
    let h = header.to_lowercase();
    if u == "lbf" || u == "lb" || h.contains("lbf") {
        Some(ForceUnit::Lbf)
    } else if u == "kn" || h.contains("kn") {
        Some(ForceUnit::Kn)
    } else if u == "n" {
        Some(ForceUnit::N)
    } else {
        None
    }
}

fn extension_unit_of(header: &str) -> Option<ExtensionUnit> {
    match unit_of(header).as_str() {
        "in" | "inch" | "inches" | "\"" => Some(ExtensionUnit::In),
        "mm" => Some(ExtensionUnit::Mm),
        _ => None,
    }
}

/// Engineering (or true) strain and stress (MPa), with a note on how they were read.
struct Record {
    strain: Vec<f64>,
    stress_mpa: Vec<f64>,
    columns: String,
    lines: LineMap,
}

fn force_mode(args: &FitArgs, headers: &[String]) -> bool {
    args.force_col.is_some()
        || args.extension_col.is_some()
        || args.gauge_length_mm.is_some()
        || (args.strain_col.is_none()
            && args.stress_col.is_none()
            && !(has(headers, "strain") && has(headers, "stress"))
            && (has(headers, "force") || has(headers, "load") || has(headers, "extension")))
}

fn read_record(args: &FitArgs, path: &Path) -> Result<Record> {
    let mut force = false;
    let cols = read_columns(path, |h| {
        force = force_mode(args, h);
        if force {
            Ok((
                find(
                    h,
                    path,
                    &["force", "load"],
                    args.force_col.as_deref(),
                    "--force-col",
                )?,
                find(
                    h,
                    path,
                    &["extension"],
                    args.extension_col.as_deref(),
                    "--extension-col",
                )?,
            ))
        } else {
            Ok((
                find(
                    h,
                    path,
                    &["strain"],
                    args.strain_col.as_deref(),
                    "--strain-col",
                )?,
                find(
                    h,
                    path,
                    &["stress"],
                    args.stress_col.as_deref(),
                    "--stress-col",
                )?,
            ))
        }
    })?;
    if !force {
        return strain_stress_record(args, path, cols);
    }
    if args.data == DataArg::True {
        bail!("--data true takes strain and stress columns, not force and extension");
    }
    let (fi, xi) = (
        find(
            &cols.headers,
            path,
            &["force", "load"],
            args.force_col.as_deref(),
            "",
        )?,
        find(
            &cols.headers,
            path,
            &["extension"],
            args.extension_col.as_deref(),
            "",
        )?,
    );
    let (fh, xh) = (cols.headers[fi].clone(), cols.headers[xi].clone());
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
    let funit = args
        .force_unit
        .or_else(|| force_unit_of(&fh))
        .unwrap_or(ForceUnit::N);
    let xunit = args
        .extension_unit
        .or_else(|| extension_unit_of(&xh))
        .unwrap_or(ExtensionUnit::Mm);
    let (mut f, mut x) = (cols.first, cols.second);
    let (fs, xs) = (
        funit.newtons(),
        if xunit == ExtensionUnit::In {
            25.4
        } else {
            1.0
        },
    );
    if fs != 1.0 {
        f.iter_mut().for_each(|v| *v *= fs);
    }
    if xs != 1.0 {
        x.iter_mut().for_each(|v| *v *= xs);
    }
    fit::engineering_in_place(&mut f, &mut x, gauge, area)?;
    Ok(Record {
        strain: x,
        stress_mpa: f,
        columns: format!(
            "force '{fh}' ({}), extension '{xh}' ({}), gauge length {gauge} mm, area {area:.4} mm^2",
            funit.name(),
            if xs == 1.0 { "mm" } else { "in" },
        ),
        lines: cols.lines,
    })
}

fn strain_stress_record(args: &FitArgs, path: &Path, cols: Columns) -> Result<Record> {
    let si = find(
        &cols.headers,
        path,
        &["strain"],
        args.strain_col.as_deref(),
        "",
    )?;
    let ti = find(
        &cols.headers,
        path,
        &["stress"],
        args.stress_col.as_deref(),
        "",
    )?;
    let (sh, th) = (cols.headers[si].clone(), cols.headers[ti].clone());
    let h = sh.to_lowercase();
    let unit = args
        .strain_unit
        .unwrap_or(if h.contains('%') || h.contains("percent") {
            StrainUnit::Percent
        } else {
            StrainUnit::Fraction
        });
    let from_header = stress_unit_of(&th);
    let sunit = args.stress_unit.or(from_header).unwrap_or(StressUnit::Mpa);
    let (mut strain, mut stress) = (cols.first, cols.second);
    if unit == StrainUnit::Percent {
        strain.iter_mut().for_each(|v| *v *= 0.01);
    }
    let k = sunit.mpa();
    if k != 1.0 {
        stress.iter_mut().for_each(|v| *v *= k);
    }
    let assumed = if args.stress_unit.is_none() && from_header.is_none() {
        ", assumed: no unit in the header"
    } else {
        ""
    };
    Ok(Record {
        strain,
        stress_mpa: stress,
        columns: format!(
            "strain '{sh}' ({}), stress '{th}' ({}{assumed})",
            if unit == StrainUnit::Fraction {
                "fraction"
            } else {
                "percent"
            },
            sunit.name()
        ),
        lines: cols.lines,
    })
}

fn drawn_points(args: &FitArgs) -> Result<Vec<DrawnPoint>> {
    let num = |s: &str, what: &str, opt: &str| -> Result<f64> {
        s.trim()
            .parse::<f64>()
            .map_err(|_| anyhow!("{opt} '{s}': the {what} is not a number"))
    };
    let mut out = Vec::new();
    for p in &args.drawn_point {
        let parts: Vec<&str> = p.split(':').collect();
        let [e, s] = parts.as_slice() else {
            bail!("--drawn-point '{p}': give STRAIN:MPA, e.g. 1.5:380 (true strain, tensile strength in MPa)");
        };
        let pt = DrawnPoint::new(
            num(e, "strain", "--drawn-point")?,
            num(s, "tensile strength", "--drawn-point")?,
        )
        .with_context(|| format!("--drawn-point '{p}'"))?;
        out.push(pt);
    }
    for p in &args.drawn_wire {
        let parts: Vec<&str> = p.split(':').collect();
        let [d0, d, s] = parts.as_slice() else {
            bail!("--drawn-wire '{p}': give D0_MM:D_MM:MPA, e.g. 8.0:2.5:390 (start and drawn diameter in mm, tensile strength in MPa)");
        };
        let pt = DrawnPoint::from_diameters(
            num(d0, "start diameter", "--drawn-wire")?,
            num(d, "drawn diameter", "--drawn-wire")?,
            num(s, "tensile strength", "--drawn-wire")?,
        )
        .with_context(|| format!("--drawn-wire '{p}'"))?;
        out.push(pt);
    }
    Ok(out)
}

/// Runs `coldpass fit`.
pub fn run(args: &FitArgs) -> Result<u8> {
    // Refused before the fit costs time (the shared writer checks again).
    let canon = |p: &Path| std::fs::canonicalize(p).unwrap_or_else(|_| p.to_path_buf());
    for (name, out) in [
        ("-o", args.report.output.as_deref()),
        ("--plot", args.report.plot.as_deref()),
        ("--emit-law", args.emit_law.as_deref()),
    ] {
        if let Some(out) = out.filter(|p| *p != Path::new("-")) {
            if let Some(input) = args.files.iter().find(|f| canon(f) == canon(out)) {
                bail!(
                    "{name} '{}' is the input file '{}'; writing it would destroy the input: choose another name",
                    out.display(),
                    input.display()
                );
            }
        }
    }
    let options = FitOptions {
        data: match args.data {
            DataArg::Engineering => DataKind::Engineering,
            DataArg::True => DataKind::True,
        },
        shear_modulus_gpa: args.shear_modulus_gpa,
        reach_strain: args.reach_strain,
        material: args.material.map(MaterialArg::class),
        drawn: drawn_points(args)?,
    };
    options.validate().map_err(|e| {
        let flag = match e.name.as_str() {
            "reach_strain" => "--reach-strain",
            "shear_modulus_gpa" => "--shear-modulus-gpa",
            _ => "option",
        };
        anyhow!("{flag}: {e}")
    })?;
    let mut results = Vec::with_capacity(args.files.len());
    let mut sources = Vec::with_capacity(args.files.len());
    for path in &args.files {
        let record = read_record(args, path)?;
        let result = fit::fit_record_owned(record.strain, record.stress_mpa, &options)
            .map_err(|e| locate(e, path, &record.lines))?;
        results.push(result);
        sources.push(report::Source {
            file: path.display().to_string(),
            columns: record.columns,
        });
    }
    let set = report::Set::of(&results, args.law)?;
    let body = match args.report.format {
        Format::Table => report::table_all(&results, &sources, set.as_ref(), args.units),
        Format::Json => report::json_all(&results, &sources, set.as_ref())?,
        Format::Yaml => report::yaml_all(&results, &sources, set.as_ref())?,
        Format::Csv => report::csv_all(&results, &sources)?,
        Format::Html => match (&results[..], &sources[..]) {
            ([r], [src]) => crate::report::html::fit_page(r, src, args.units)?,
            _ => bail!(
                "--format html: the report page holds one record, and {} were given; give one file, or use --format table, json, yaml or csv for the set",
                results.len()
            ),
        },
    };
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg(&results[0], &sources[0])?),
        None => None,
    };
    let law_file = match &args.emit_law {
        Some(_) => Some(emitted_law(args, &results, &sources, set.as_ref())?),
        None => None,
    };
    if let Some(text) = &law_file {
        // The law file feeds a schedule: no figure in it may be inf or NaN.
        let tree: serde_yaml::Value = serde_yaml::from_str(text)?;
        output::ensure_finite("law file", &tree)?;
    }
    // Everything is built: now write.
    let inputs: Vec<&Path> = args.files.iter().map(PathBuf::as_path).collect();
    let mut outputs = output::Outputs::new(&inputs);
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

fn emitted_law(
    args: &FitArgs,
    results: &[FitReport],
    sources: &[report::Source],
    set: Option<&report::Set>,
) -> Result<String> {
    if let Some(set) = set {
        return report::set_law_yaml(set, results, sources);
    }
    let r = &results[0];
    let with_drawn = !r.drawn_fits.is_empty();
    let best = if with_drawn {
        r.best_with_drawn
    } else {
        r.best
    };
    let chosen = args.law.or(best).context(
        "no fitted law converged to a valid law for a schedule, so there is none to write",
    )?;
    let fit = if with_drawn && !chosen.is_total_strain_form() {
        r.drawn_fit(chosen)
    } else {
        r.fit(chosen)
    }
    .with_context(|| format!("the law '{chosen}' was not fitted to this record"))?;
    if !fit.converged && !args.allow_unconverged {
        bail!(
            "the fit of '{chosen}' did not converge ({} iterations): --emit-law does not write it; choose another --law, or give --allow-unconverged to write it anyway",
            fit.iterations
        );
    }
    report::law_yaml(r, fit, &sources[0])
}

/// Names the file and line of a core error about one data point.
fn locate(err: FitError, path: &Path, lines: &LineMap) -> anyhow::Error {
    let at = err.point().and_then(|p| {
        lines
            .line(p)
            .map(|line| format!(" (point {p} is line {line})"))
    });
    anyhow::Error::new(err).context(format!(
        "fitting '{}'{}",
        path.display(),
        at.unwrap_or_default()
    ))
}
