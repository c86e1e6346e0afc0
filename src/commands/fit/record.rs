//! Reading a tensile record: the header row, the two columns as numbers, their units, and the line of each point for messages; the drawn-wire points given as options.

use super::*;

/// The file line of each point: data rows are consecutive lines except
/// where notes or blank lines sit between them.
#[derive(Debug, Default)]
pub(super) struct LineMap {
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
pub(super) struct Columns {
    headers: Vec<String>,
    first: Vec<f64>,
    second: Vec<f64>,
    lines: LineMap,
}

/// The separator of a header row: semicolon or tab when the row has one, else comma.
pub(super) fn separator(header: &str) -> char {
    if header.contains(';') {
        ';'
    } else if header.contains('\t') {
        '\t'
    } else {
        ','
    }
}

pub(super) fn unquote(s: &str) -> &str {
    let t = s.trim();
    t.strip_prefix('"')
        .and_then(|u| u.strip_suffix('"'))
        .unwrap_or(t)
        .trim()
}

pub(super) fn open_record(path: &Path) -> Result<(Box<dyn BufRead>, u64)> {
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

/// Whether a first line reads as a YAML `key: value` line (`title: Demo
/// mill`, `passes:`) rather than a header row: a bare name, a colon, then a
/// space or the end (a header such as `Time:s,Strain` has no space).
fn looks_keyed(line: &str) -> bool {
    match line.split_once(':') {
        Some((key, rest)) => {
            !key.is_empty()
                && key
                    .chars()
                    .all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '-')
                && (rest.is_empty() || rest.starts_with([' ', '\t']))
        }
        None => false,
    }
}

/// Whether `path` is named `.yaml` or `.yml`.
fn named_yaml(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("yaml") || e.eq_ignore_ascii_case("yml"))
}

/// The message for a YAML file given as a tensile record: what it looks
/// like (from its top-level keys) and where it goes instead; `None` when
/// the file is not YAML after all.
fn yaml_instead(path: &Path) -> Option<anyhow::Error> {
    let text = crate::input::read_text(path).ok()?;
    let (what, goes) = crate::commands::check::yaml_kind(&text)?;
    Some(anyhow!(
        "'{}' looks like {what}, not a tensile record: coldpass fit reads a tensile record as CSV \
         (a header row naming the strain and stress, or force and extension, columns, then one row a point); {goes}",
        path.display()
    ))
}

/// Reads the header row and chooses the two columns with `pick`, then
/// reads those two columns as numbers, line by line as bytes (no table of
/// strings is kept: 16 bytes a point).
pub(super) fn read_columns(
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
    if looks_keyed(&header) {
        if let Some(e) = yaml_instead(path) {
            return Err(e);
        }
    }
    let sep = separator(&header);
    let headers: Vec<String> = header.split(sep).map(|h| unquote(h).to_string()).collect();
    let (a, b) = pick(&headers).map_err(|e| {
        if named_yaml(path) {
            e.context(format!(
                "'{}' is named as a YAML file: coldpass fit reads a tensile record as CSV",
                path.display()
            ))
        } else {
            e
        }
    })?;
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
pub(super) fn find(
    headers: &[String],
    path: &Path,
    words: &[&str],
    named: Option<&str>,
    flag: &str,
) -> Result<usize> {
    let present = || {
        let mut v: Vec<String> = headers
            .iter()
            .take(SHOWN_COLUMNS)
            .map(|h| shown(h))
            .collect();
        if headers.len() > SHOWN_COLUMNS {
            v.push(format!("and {} more", headers.len() - SHOWN_COLUMNS));
        }
        v.join(", ")
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
                    .take(SHOWN_COLUMNS)
                    .map(|&i| shown(&headers[i]))
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

/// Most column headers a message lists.
const SHOWN_COLUMNS: usize = 12;
/// Most characters of one header a message shows.
const SHOWN_CHARS: usize = 40;

/// A header as a message quotes it: at most [`SHOWN_CHARS`] characters
/// (a line of binary read as text must not make the message a page long).
fn shown(h: &str) -> String {
    if h.chars().count() > SHOWN_CHARS {
        let cut: String = h.chars().take(SHOWN_CHARS).collect();
        format!("'{cut}...'")
    } else {
        format!("'{h}'")
    }
}

pub(super) fn has(headers: &[String], word: &str) -> bool {
    headers.iter().any(|h| h.to_lowercase().contains(word))
}

/// The unit written in a header: the text in its last brackets, `(...)` or
/// `[...]`, lower case; or its last word.
pub(super) fn unit_of(header: &str) -> String {
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

pub(super) fn stress_unit_of(header: &str) -> Option<StressUnit> {
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

pub(super) fn force_unit_of(header: &str) -> Option<ForceUnit> {
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

pub(super) fn extension_unit_of(header: &str) -> Option<ExtensionUnit> {
    match unit_of(header).as_str() {
        "in" | "inch" | "inches" | "\"" => Some(ExtensionUnit::In),
        "mm" => Some(ExtensionUnit::Mm),
        _ => None,
    }
}

/// Engineering (or true) strain and stress (MPa), with a note on how they were read.
pub(super) struct Record {
    pub(super) strain: Vec<f64>,
    pub(super) stress_mpa: Vec<f64>,
    pub(super) columns: String,
    pub(super) lines: LineMap,
}

pub(super) fn force_mode(args: &FitArgs, headers: &[String]) -> bool {
    args.force_col.is_some()
        || args.extension_col.is_some()
        || args.gauge_length_mm.is_some()
        || (args.strain_col.is_none()
            && args.stress_col.is_none()
            && !(has(headers, "strain") && has(headers, "stress"))
            && (has(headers, "force") || has(headers, "load") || has(headers, "extension")))
}

pub(super) fn read_record(args: &FitArgs, path: &Path) -> Result<Record> {
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

pub(super) fn strain_stress_record(args: &FitArgs, path: &Path, cols: Columns) -> Result<Record> {
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

pub(super) fn drawn_points(args: &FitArgs) -> Result<Vec<DrawnPoint>> {
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

/// Names the file and line of a core error about one data point.
pub(super) fn locate(err: FitError, path: &Path, lines: &LineMap) -> anyhow::Error {
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
