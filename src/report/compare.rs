//! `coldpass compare`: two schedules side by side. Per step (matched by step
//! number) the figures that matter: exit size, reduction, draw ratio, flags,
//! power and wire temperature of each, with the difference (second minus
//! first); then the two summaries side by side and the caution.
//!
//! JSON and YAML: `{first, second, passes: [{step, first: {...}, second:
//! {...}, difference: {...}}], summary: {first, second}, caution}` with the
//! check JSON's keys.

use anyhow::{anyhow, Result};
use coldpass::evaluation::{ScheduleReport, StepReport, Summary};
use serde::Serialize;
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Span, Style, Width};

use super::columns::{self, Column};
use super::units::Units;
use super::{Format, Look};

/// The columns compared per pass, by JSON key.
const COMPARED: [&str; 5] = [
    "exit_diameter_mm",
    "area_reduction",
    "draw_ratio",
    "power_kw",
    "wire_temperature_c",
];

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

fn table(a: &ScheduleReport, b: &ScheduleReport, names: &[String; 2], look: &Look) -> String {
    let units = look.table.units;
    let cols = columns::fixed_set(&COMPARED);
    // Two header rows: the quantity (spanning its A and B columns), then A, B
    // and, for the draw ratio, the change B - A.
    let mut top = vec![String::new()];
    let mut sub = vec!["step".to_string()];
    let mut spans = Vec::new();
    for c in &cols {
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
    top.push("flags".into());
    sub.push("A / B".into());
    let mut bld = Builder::default();
    bld.push_record(top);
    bld.push_record(sub);
    for i in 0..a.passes.len().max(b.passes.len()) {
        let (x, y) = (a.passes.get(i), b.passes.get(i));
        let mut row = vec![(i + 1).to_string()];
        for c in &cols {
            row.push(x.map(|r| c.cell(r, units)).unwrap_or_default());
            row.push(y.map(|r| c.cell(r, units)).unwrap_or_default());
            if c.key == "draw_ratio" {
                let v = |r: Option<&StepReport>| r.and_then(|r| r.draw_ratio);
                row.push(signed(diff(v(x), v(y)), c, units));
            }
        }
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
        row.push(flags.join("\n"));
        bld.push_record(row);
    }
    let mut t = bld.build();
    t.with(Style::sharp());
    t.modify(Columns::new(1..), Alignment::right());
    for (col, n) in spans {
        t.modify((0, col), Span::column(n));
    }
    t.with(
        Width::wrap(look.table.width)
            .keep_words(true)
            .priority(PriorityMax::right()),
    );

    let mut s = Builder::default();
    s.push_record(["", "A", "B"].map(String::from));
    for ((k, va), (_, vb)) in super::table::summary_rows(a, units)
        .into_iter()
        .zip(super::table::summary_rows(b, units))
    {
        s.push_record([k, va, vb]);
    }
    let mut st = s.build();
    st.with(Style::sharp());
    st.with(
        Width::wrap(look.table.width)
            .keep_words(true)
            .priority(PriorityMax::right()),
    );

    let mut out = String::new();
    for (tag, name, rep) in [("A", &names[0], a), ("B", &names[1], b)] {
        out.push_str(&format!("{tag}: {name}"));
        if !rep.title.is_empty() {
            out.push_str(&format!(" ({})", rep.title));
        }
        out.push('\n');
    }
    out.push_str(&format!(
        "\nPasses (change = B - A)\n{t}\n\nSummary\n{st}\n\n{}\n",
        super::table::wrap(&format!("Caution: {}", a.caution), look.table.width, "")
    ));
    out
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
        Format::Table => table(a, b, names, look).into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&whole())?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(&whole())?.into_bytes(),
        Format::Csv | Format::Html => {
            return Err(anyhow!(
                "compare writes table, json or yaml; for CSV or a page, check each file with --format csv or html"
            ))
        }
    })
}
