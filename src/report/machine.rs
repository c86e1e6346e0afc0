//! The machine and temperature figures in the table and the CSV, kept apart
//! from the pass tables: the wire temperature die to die (with its
//! no-cooling upper bound and the drawn wire's tensile strength), the
//! per-block table on a machine and its summary (attainable speed, binding
//! block and limit, tonnes per shift). Names match the JSON keys.

use coldpass::evaluation::{ScheduleReport, StepKind, StepReport};
use coldpass::machine::MachineRun;
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Style, Width};

use super::{fixed, html};

/// A table fitted to `width`, each header word on its own line so that a
/// column is as wide as its figures.
fn build(header: &[&str], rows: Vec<Vec<String>>, width: usize) -> String {
    let mut b = Builder::default();
    b.push_record(
        header
            .iter()
            .map(|s| s.split(' ').collect::<Vec<_>>().join("\n")),
    );
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.modify(Columns::new(1..), Alignment::right());
    t.with(
        Width::wrap(width)
            .keep_words(true)
            .priority(PriorityMax::right()),
    );
    t.to_string()
}

fn pct(x: f64) -> String {
    format!("{:.1}", 100.0 * x)
}

const TEMPERATURE_HEADER: [&str; 6] = [
    "step",
    "wire temperature in C",
    "wire temperature out C",
    "no cooling C",
    "entry yield MPa",
    "tensile strength MPa",
];

const BLOCK_HEADER: [&str; 10] = [
    "block",
    "step",
    "capstan rpm",
    "surface speed m/s",
    "slip %",
    "net pull kN",
    "net power kW",
    "load %",
    "wire temperature in C",
    "wire temperature out C",
];

fn temperature_rows(rep: &ScheduleReport) -> Vec<Vec<String>> {
    rep.passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .map(|r| {
            vec![
                r.step.to_string(),
                fixed(r.wire_temperature_entry_c, 0),
                fixed(r.wire_temperature_c, 0),
                fixed(r.wire_temperature_no_cooling_c, 0),
                fixed(r.entry_yield_mpa, 0),
                fixed(r.tensile_strength_mpa, 0),
            ]
        })
        .collect()
}

fn block_rows(m: &MachineRun) -> Vec<Vec<String>> {
    m.blocks
        .iter()
        .map(|b| {
            vec![
                b.block.to_string(),
                b.step.to_string(),
                format!("{:.0}", b.capstan_rpm),
                format!("{:.2}", b.surface_speed_m_s),
                pct(b.slip),
                format!("{:.2}", b.net_pull_kn),
                format!("{:.1}", b.net_power_kw),
                pct(b.motor_load),
                format!("{:.0}", b.wire_temperature_in_c),
                format!("{:.0}", b.wire_temperature_out_c),
            ]
        })
        .collect()
}

fn machine_heading(m: &MachineRun) -> String {
    format!(
        "Machine: {}; {}, {} blocks; figures at {:.2} m/s finish speed",
        if m.name.is_empty() { "-" } else { &m.name },
        m.kind.name(),
        m.blocks_available,
        m.running_speed_m_s
    )
}

fn machine_summary(rep: &ScheduleReport, m: &MachineRun) -> Vec<[String; 2]> {
    let s = &rep.summary;
    vec![
        [
            "attainable speed".to_string(),
            match s.attainable_speed_m_s {
                Some(v) => format!("{v:.2} m/s ({:.0} m/min)", v * 60.0),
                None => format!(
                    "- (too hot at any speed; motors and capstans alone: {:.2} m/s)",
                    m.mechanical_speed_m_s
                ),
            },
        ],
        [
            "binding block and limit".to_string(),
            match (s.binding_block, s.binding_limit) {
                (Some(k), Some(l)) => format!("block {k}, {}", l.name()),
                _ => "-".into(),
            },
        ],
        [
            "tonnes per shift at it".to_string(),
            fixed(s.attainable_t_per_shift, 1),
        ],
        [
            "total motor load".to_string(),
            format!("{:.1} kW", m.total_motor_load_kw),
        ],
    ]
}

/// The temperature and strength table of every draw, then the machine's
/// block table and summary when the schedule runs on one, fitted to `width`.
pub fn table(rep: &ScheduleReport, width: usize) -> String {
    let mut out = String::from("Wire temperature and strength\n");
    out.push_str(&build(&TEMPERATURE_HEADER, temperature_rows(rep), width));
    out.push_str("\n\n");
    let Some(m) = &rep.machine else {
        return out;
    };
    out.push_str(&machine_heading(m));
    out.push('\n');
    out.push_str(&build(&BLOCK_HEADER, block_rows(m), width));
    out.push_str("\n\n");
    let mut b = Builder::default();
    for r in machine_summary(rep, m) {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    out.push_str("Machine summary\n");
    out.push_str(&t.to_string());
    out.push_str("\n\n");
    out
}

/// The machine's tables for the printable page (none without a machine).
pub fn html_tables(rep: &ScheduleReport) -> Vec<html::Table> {
    let table = |heading: String, header: &[&str], rows: Vec<Vec<String>>| html::Table {
        heading,
        header: header.iter().map(|h| h.to_string()).collect(),
        rows: rows
            .into_iter()
            .map(|cells| html::Row {
                cells,
                status: html::Status::None,
            })
            .collect(),
        page_break_before: false,
    };
    // The per-pass temperature table stays off the page: a 25-pass page must
    // print on two sheets, and the block table carries the temperatures.
    let mut out = Vec::new();
    if let Some(m) = &rep.machine {
        out.push(table(machine_heading(m), &BLOCK_HEADER, block_rows(m)));
        out.push(table(
            "Machine summary".into(),
            &["figure", "value"],
            machine_summary(rep, m)
                .into_iter()
                .map(|r| r.to_vec())
                .collect(),
        ));
    }
    out
}

/// The machine and temperature CSV columns, inserted before the caution.
const CSV_COLUMNS: [&str; 14] = [
    "wire_temperature_entry_c",
    "wire_temperature_no_cooling_c",
    "entry_yield_mpa",
    "tensile_strength_mpa",
    "net_pull_kn",
    "block",
    "machine.capstan_rpm",
    "machine.surface_speed_m_s",
    "machine.slip",
    "machine.net_power_kw",
    "machine.motor_load",
    "summary.attainable_speed_m_s",
    "summary.binding_block",
    "summary.binding_limit",
];

/// The CSV header with the machine columns before the last (the caution).
pub fn csv_header(base: &[&str]) -> Vec<String> {
    let (last, rest) = base.split_last().expect("a header has columns");
    rest.iter()
        .chain(CSV_COLUMNS.iter())
        .chain(std::iter::once(last))
        .map(|s| s.to_string())
        .collect()
}

fn num(x: Option<f64>) -> String {
    x.map(|v| v.to_string()).unwrap_or_default()
}

/// Inserts one step's machine columns before the last field of `record`.
pub fn csv_record(rep: &ScheduleReport, r: &StepReport, mut record: Vec<String>) -> Vec<String> {
    let block = rep
        .machine
        .as_ref()
        .and_then(|m| m.blocks.iter().find(|b| b.step == r.step));
    let s = &rep.summary;
    let extra = [
        num(r.wire_temperature_entry_c),
        num(r.wire_temperature_no_cooling_c),
        num(r.entry_yield_mpa),
        num(r.tensile_strength_mpa),
        num(r.net_pull_kn),
        r.block.map(|b| b.to_string()).unwrap_or_default(),
        num(block.map(|b| b.capstan_rpm)),
        num(block.map(|b| b.surface_speed_m_s)),
        num(block.map(|b| b.slip)),
        num(block.map(|b| b.net_power_kw)),
        num(block.map(|b| b.motor_load)),
        num(s.attainable_speed_m_s),
        s.binding_block.map(|b| b.to_string()).unwrap_or_default(),
        s.binding_limit
            .map(|l| l.name().to_string())
            .unwrap_or_default(),
    ];
    let last = record.pop().unwrap_or_default();
    record.extend(extra);
    record.push(last);
    record
}
