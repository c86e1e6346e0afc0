//! `coldpass compare`: two schedules side by side. Per step (matched by step
//! number) the figures that matter: exit size, reduction, draw ratio, flags,
//! power and wire temperature of each, with the difference (second minus
//! first); then the two summaries side by side and the caution.
//!
//! JSON and YAML: `{first, second, passes: [{step, first: {...}, second:
//! {...}, difference: {...}}], summary: {first, second}, caution}` with the
//! check JSON's keys. CSV: one row per step under the same names joined by
//! a dot (`first.draw_ratio`, `difference.power_kw`), or with `--summary`
//! one row per file of check's summary columns. HTML: the page with the
//! pass table (each row marked by the worse of its two steps, in words and
//! colour) and the two summaries side by side.

use anyhow::Result;
use coldpass::evaluation::{ScheduleReport, StepReport, Summary};
use serde::Serialize;
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Span, Style, Width};

use super::columns::{self, Column};
use super::table::View;
use super::units::Units;
use super::{html, Format, Look};

/// The columns compared per pass, by JSON key.
const COMPARED: [&str; 5] = [
    "exit_diameter_mm",
    "area_reduction",
    "draw_ratio",
    "power_kw",
    "wire_temperature_c",
];

/// The columns `--wide` compares per pass (the table only; JSON, YAML and
/// CSV keep [`COMPARED`]).
const COMPARED_WIDE: [&str; 13] = [
    "exit_diameter_mm",
    "area_reduction",
    "cumulative_reduction",
    "strain_after",
    "flow_stress_exit_mpa",
    "governing_draw_stress_mpa",
    "draw_ratio",
    "delta",
    "semi_angle_deg",
    "force_kn",
    "exit_speed_m_s",
    "power_kw",
    "wire_temperature_c",
];

/// The table's pass columns for `view`, and whether the flags are shown:
/// the default set, `--wide`'s, or `--columns`' (the step always leads, so
/// naming it is allowed and changes nothing).
fn compared_columns(view: &View) -> Result<(Vec<&'static Column>, bool)> {
    Ok(match view {
        View::First => (columns::fixed_set(&COMPARED), true),
        View::Wide => (columns::fixed_set(&COMPARED_WIDE), true),
        View::Pick(keys) => {
            let picked = columns::pick(keys).map_err(|e| anyhow::anyhow!(e))?;
            let flags = picked.iter().any(|c| c.key == "flags");
            let cols = picked
                .into_iter()
                .filter(|c| c.key != "step" && c.key != "flags")
                .collect();
            (cols, flags)
        }
    })
}

#[derive(Serialize)]
struct Side {
    exit_diameter_mm: Option<f64>,
    area_reduction: Option<f64>,
    draw_ratio: Option<f64>,
    power_kw: Option<f64>,
    wire_temperature_c: Option<f64>,
    flags: Vec<&'static str>,
}

#[derive(Serialize)]
struct Difference {
    area_reduction: Option<f64>,
    draw_ratio: Option<f64>,
    power_kw: Option<f64>,
    wire_temperature_c: Option<f64>,
    flags_differ: bool,
}

#[derive(Serialize)]
struct PassPair {
    step: usize,
    first: Option<Side>,
    second: Option<Side>,
    difference: Difference,
}

#[derive(Serialize)]
struct Summaries<'a> {
    first: &'a Summary,
    second: &'a Summary,
}

#[derive(Serialize)]
struct Whole<'a> {
    first: &'a str,
    second: &'a str,
    passes: Vec<PassPair>,
    summary: Summaries<'a>,
    caution: &'a str,
}

fn side(r: &StepReport) -> Side {
    Side {
        exit_diameter_mm: Some(r.exit_diameter_mm),
        area_reduction: r.area_reduction,
        draw_ratio: r.draw_ratio,
        power_kw: r.power_kw,
        wire_temperature_c: r.wire_temperature_c,
        flags: r.flags.iter().map(|f| f.name()).collect(),
    }
}

fn diff(a: Option<f64>, b: Option<f64>) -> Option<f64> {
    Some(b? - a?)
}

fn pairs(a: &ScheduleReport, b: &ScheduleReport) -> Vec<PassPair> {
    let n = a.passes.len().max(b.passes.len());
    (0..n)
        .map(|i| {
            let (x, y) = (a.passes.get(i), b.passes.get(i));
            let f = |g: fn(&StepReport) -> Option<f64>| diff(x.and_then(g), y.and_then(g));
            PassPair {
                step: i + 1,
                first: x.map(side),
                second: y.map(side),
                difference: Difference {
                    area_reduction: f(|r| r.area_reduction),
                    draw_ratio: f(|r| r.draw_ratio),
                    power_kw: f(|r| r.power_kw),
                    wire_temperature_c: f(|r| r.wire_temperature_c),
                    flags_differ: x.map(|r| &r.flags) != y.map(|r| &r.flags),
                },
            }
        })
        .collect()
}

fn signed(x: Option<f64>, c: &Column, units: Units) -> String {
    let q = c.quantity;
    let digits = match c.read {
        columns::Read::Num(_, d) => q.decimals(d, units),
        columns::Read::Text(_) => 0,
    };
    match x {
        // A difference converts by the factor alone (no offset for F).
        Some(v) => {
            let scaled = match q {
                super::units::Quantity::Temperature => {
                    super::units::Quantity::TemperatureRise.convert(v, units)
                }
                _ => q.convert(v, units),
            };
            format!("{scaled:+.digits$}")
        }
        None => String::new(),
    }
}

/// The pass table of the groups `groups` (0 the step, 1..=5 a compared
/// quantity with its A, B and, for the draw ratio, B - A; 6 the flags), at
/// its natural width: two header rows, the quantity spanning its columns.
fn pass_panel(
    a: &ScheduleReport,
    b: &ScheduleReport,
    cols: &[&Column],
    groups: &[usize],
    units: Units,
    wrap: Option<usize>,
) -> String {
    let mut top = vec![String::new()];
    let mut sub = vec!["step".to_string()];
    let mut spans = Vec::new();
    for &g in groups.iter().filter(|&&g| g >= 1 && g <= cols.len()) {
        let c = cols[g - 1];
        let with_change = c.key == "draw_ratio";
        spans.push((top.len(), if with_change { 3 } else { 2 }));
        top.push(c.header(units).replace(' ', "\n"));
        top.push(String::new());
        sub.push("A".into());
        sub.push("B".into());
        if with_change {
            top.push(String::new());
            sub.push("B - A".into());
        }
    }
    let with_flags = groups.contains(&(cols.len() + 1));
    if with_flags {
        top.push("flags".into());
        sub.push("A / B".into());
    }
    let mut bld = Builder::default();
    bld.push_record(top);
    bld.push_record(sub);
    for i in 0..a.passes.len().max(b.passes.len()) {
        let (x, y) = (a.passes.get(i), b.passes.get(i));
        let mut row = vec![(i + 1).to_string()];
        for &g in groups.iter().filter(|&&g| g >= 1 && g <= cols.len()) {
            let c = cols[g - 1];
            row.push(x.map(|r| c.cell(r, units)).unwrap_or_default());
            row.push(y.map(|r| c.cell(r, units)).unwrap_or_default());
            if c.key == "draw_ratio" {
                let v = |r: Option<&StepReport>| r.and_then(|r| r.draw_ratio);
                row.push(signed(diff(v(x), v(y)), c, units));
            }
        }
        if with_flags {
            row.push(ab_flags(x, y).join("\n"));
        }
        bld.push_record(row);
    }
    let mut t = bld.build();
    t.with(Style::sharp());
    t.modify(Columns::new(1..), Alignment::right());
    if with_flags {
        let last = t.count_columns() - 1;
        t.modify(Columns::new(last..=last), Alignment::left());
    }
    for (col, n) in spans {
        t.modify((0, col), Span::column(n));
    }
    // The border over a spanned header is one line, not split at A | B.
    t.with(tabled::settings::themes::BorderCorrection::span());
    if let Some(w) = wrap {
        t.with(
            Width::wrap(w)
                .keep_words(true)
                .priority(PriorityMax::right()),
        );
    }
    t.to_string()
}

/// A schedule's summary rows, then its machine's (the attainable speed, the
/// block and limit that bind, tonnes per shift at it) when either side runs
/// on a machine.
fn summary_rows(rep: &ScheduleReport, units: Units, machine: bool) -> Vec<(String, String)> {
    let mut rows = super::table::summary_rows(rep, units);
    if machine {
        rows.extend(super::machine::summary_rows(rep, units));
    }
    rows
}

fn table(
    a: &ScheduleReport,
    b: &ScheduleReport,
    names: &[String; 2],
    look: &Look,
) -> Result<String> {
    let units = look.table.units;
    let width = look.table.width;
    let (cols, with_flags) = compared_columns(&look.table.view)?;
    // Cut into panels of whole quantities, each led by the step, when wider
    // than the terminal: no header word or figure is broken.
    let natural = |g: &[usize]| super::table::widest(&pass_panel(a, b, &cols, g, units, None));
    let t = super::table::panels(cols.len() + 1 + usize::from(with_flags), width, natural)
        .iter()
        .map(|g| {
            let p = pass_panel(a, b, &cols, g, units, None);
            if super::table::widest(&p) <= width {
                p
            } else {
                pass_panel(a, b, &cols, g, units, Some(width))
            }
        })
        .collect::<Vec<_>>()
        .join("\n\n");

    // The two summaries side by side, a long value wrapped at words so that
    // A and B stay beside each other; one under the other only when even
    // wrapped they are wider than the terminal.
    let machine = a.machine.is_some() || b.machine.is_some();
    let pairs: Vec<(String, String, String)> = summary_rows(a, units, machine)
        .into_iter()
        .zip(summary_rows(b, units, machine))
        .map(|((k, va), (_, vb))| (k, va, vb))
        .collect();
    let key_width = pairs.iter().map(|p| p.0.chars().count()).max().unwrap_or(0);
    // Borders and padding of three columns: 4 bars and 2 spaces a column.
    let value_width = width.saturating_sub(key_width + 10) / 2;
    let fit = |v: String| {
        if value_width >= 20 && v.chars().count() > value_width {
            super::table::wrap(&v, value_width, "")
        } else {
            v
        }
    };
    let rows = pairs
        .into_iter()
        .map(|(k, va, vb)| vec![k, fit(va), fit(vb)])
        .collect();
    let st = super::table::build(
        ["", "A", "B"].map(String::from).to_vec(),
        rows,
        Some(width),
        &[1, 2],
    );

    let mut out = String::new();
    for (tag, name, rep) in [("A", &names[0], a), ("B", &names[1], b)] {
        let mut line = format!("{tag}: {name}");
        if !rep.title.is_empty() {
            line.push_str(&format!(" ({})", rep.title));
        }
        out.push_str(&super::table::wrap(&line, width, "   "));
        out.push('\n');
    }
    out.push_str(&format!(
        "\nPasses (change = B - A)\n{t}\n\nSummary\n{st}\n\n{}\n",
        super::table::wrap(&format!("Caution: {}", a.caution), look.table.width, "")
    ));
    Ok(out)
}

/// Renders the comparison of `a` and `b` (named by `names`) in `format`.
pub fn render(
    a: &ScheduleReport,
    b: &ScheduleReport,
    names: &[String; 2],
    format: Format,
    look: &Look,
) -> Result<Vec<u8>> {
    let whole = || Whole {
        first: &names[0],
        second: &names[1],
        passes: pairs(a, b),
        summary: Summaries {
            first: &a.summary,
            second: &b.summary,
        },
        caution: &a.caution,
    };
    Ok(match format {
        Format::Table => table(a, b, names, look)?.into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&whole())?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(&whole())?.into_bytes(),
        Format::Csv if look.csv_summary => csv_summary(a, b, names)?,
        Format::Csv => csv(a, b)?,
        Format::Html => page(a, b, names, look)?.into_bytes(),
    })
}

/// The per-step CSV columns, the JSON's names joined by a dot.
const CSV_HEADER: [&str; 19] = [
    "step",
    "first.exit_diameter_mm",
    "first.area_reduction",
    "first.draw_ratio",
    "first.power_kw",
    "first.wire_temperature_c",
    "first.flags",
    "second.exit_diameter_mm",
    "second.area_reduction",
    "second.draw_ratio",
    "second.power_kw",
    "second.wire_temperature_c",
    "second.flags",
    "difference.area_reduction",
    "difference.draw_ratio",
    "difference.power_kw",
    "difference.wire_temperature_c",
    "difference.flags_differ",
    "caution",
];

fn side_cells(s: Option<&Side>) -> Vec<String> {
    use super::csv::num;
    match s {
        Some(s) => vec![
            num(s.exit_diameter_mm),
            num(s.area_reduction),
            num(s.draw_ratio),
            num(s.power_kw),
            num(s.wire_temperature_c),
            s.flags.join(";"),
        ],
        None => vec![String::new(); 6],
    }
}

/// One row per step (steps past the shorter schedule have its side empty),
/// figures rounded as check's CSV rounds them, the caution in every row.
fn csv(a: &ScheduleReport, b: &ScheduleReport) -> Result<Vec<u8>> {
    use super::csv::num;
    let mut w = ::csv::Writer::from_writer(Vec::new());
    w.write_record(CSV_HEADER)?;
    for p in pairs(a, b) {
        let d = &p.difference;
        let mut row = vec![p.step.to_string()];
        row.extend(side_cells(p.first.as_ref()));
        row.extend(side_cells(p.second.as_ref()));
        row.extend([
            num(d.area_reduction),
            num(d.draw_ratio),
            num(d.power_kw),
            num(d.wire_temperature_c),
            d.flags_differ.to_string(),
            a.caution.clone(),
        ]);
        w.write_record(row)?;
    }
    Ok(w.into_inner()?)
}

/// `--summary`: one row per file (`first`, `second`) of check's summary CSV
/// columns, after the side and the file's name.
fn csv_summary(a: &ScheduleReport, b: &ScheduleReport, names: &[String; 2]) -> Result<Vec<u8>> {
    let mut w = ::csv::Writer::from_writer(Vec::new());
    w.write_record(
        ["side", "file"]
            .into_iter()
            .chain(super::csv::SUMMARY_HEADER),
    )?;
    for (side, name, rep) in [("first", &names[0], a), ("second", &names[1], b)] {
        let mut row = vec![side.to_string(), name.clone()];
        row.extend(super::csv::summary_record(rep)?);
        w.write_record(row)?;
    }
    Ok(w.into_inner()?)
}

/// The worse standing of two steps.
fn worse(x: Option<&StepReport>, y: Option<&StepReport>) -> html::Status {
    use html::Status;
    let rank = |s: Status| match s {
        Status::Over => 3,
        Status::Warn => 2,
        Status::Ok => 1,
        Status::None => 0,
    };
    [x, y]
        .into_iter()
        .flatten()
        .map(html::step_status)
        .max_by_key(|s| rank(*s))
        .unwrap_or(Status::None)
}

/// The comparison page: both files named, the pass table (the table's
/// columns, each quantity's header with its unit and `A` or `B`), the two
/// summaries side by side, the caution.
fn page(
    a: &ScheduleReport,
    b: &ScheduleReport,
    names: &[String; 2],
    look: &Look,
) -> Result<String> {
    let units = look.table.units;
    let (cols, with_flags) = compared_columns(&look.table.view)?;
    let mut header = vec!["step".to_string()];
    for c in &cols {
        let h = c.header(units);
        header.push(format!("{h} A"));
        header.push(format!("{h} B"));
        if c.key == "draw_ratio" {
            header.push(format!("{h} B - A"));
        }
    }
    if with_flags {
        header.push("flags A / B".into());
    }
    let rows = (0..a.passes.len().max(b.passes.len()))
        .map(|i| {
            let (x, y) = (a.passes.get(i), b.passes.get(i));
            let mut cells = vec![(i + 1).to_string()];
            for c in &cols {
                cells.push(x.map(|r| c.cell(r, units)).unwrap_or_default());
                cells.push(y.map(|r| c.cell(r, units)).unwrap_or_default());
                if c.key == "draw_ratio" {
                    let v = |r: Option<&StepReport>| r.and_then(|r| r.draw_ratio);
                    cells.push(signed(diff(v(x), v(y)), c, units));
                }
            }
            let flags = ab_flags(x, y);
            if with_flags {
                cells.push(flags.join(", "));
            }
            html::Row {
                cells,
                status: worse(x, y),
            }
        })
        .collect();
    let machine = a.machine.is_some() || b.machine.is_some();
    let summary_rows = summary_rows(a, units, machine)
        .into_iter()
        .zip(summary_rows(b, units, machine))
        .map(|((k, va), (_, vb))| html::Row {
            cells: vec![k, va, vb],
            status: html::Status::None,
        })
        .collect();
    let titled = |name: &str, rep: &ScheduleReport| {
        if rep.title.is_empty() {
            name.to_string()
        } else {
            format!("{name} ({})", rep.title)
        }
    };
    let p = html::Page {
        title: format!("{} against {}", names[0], names[1]),
        kind: "Schedule comparison".into(),
        facts: vec![
            ("A".into(), titled(&names[0], a)),
            ("B".into(), titled(&names[1], b)),
        ],
        verdict: None,
        summary: Vec::new(),
        tables: vec![
            html::Table {
                heading: "Passes (change = B - A)".into(),
                header,
                rows,
                page_break_before: false,
            },
            html::Table {
                heading: "Summary".into(),
                header: vec![String::new(), "A".into(), "B".into()],
                rows: summary_rows,
                page_break_before: false,
            },
        ],
        charts: Vec::new(),
        notes: Vec::new(),
        caution: a.caution.clone(),
    };
    Ok(html::render(&p))
}

/// The flags of step A then step B, each tagged with its side (`A near-draw-limit`).
fn ab_flags(x: Option<&StepReport>, y: Option<&StepReport>) -> Vec<String> {
    let tagged = |tag: &str, r: Option<&StepReport>| {
        r.map(|r| {
            r.flags
                .iter()
                .map(|f| format!("{tag} {}", f.name()))
                .collect::<Vec<_>>()
        })
        .unwrap_or_default()
    };
    let mut flags = tagged("A", x);
    flags.extend(tagged("B", y));
    flags
}
