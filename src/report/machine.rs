//! The machine and temperature figures in the table and the CSV, kept apart
//! from the pass tables: the wire temperature die to die (with its
//! no-cooling upper bound and the drawn wire's tensile strength), the
//! per-block table on a machine and its summary (attainable speed, binding
//! block and limit, tonnes per shift). Names match the JSON keys.

use coldpass::evaluation::{ScheduleReport, StepKind, StepReport};
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Style, Width};

use super::fixed;

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

/// The temperature and strength table of every draw, then the machine's
/// block table and summary when the schedule runs on one, fitted to `width`.
pub fn table(rep: &ScheduleReport, width: usize) -> String {
    let draws: Vec<&StepReport> = rep
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    let rows = draws
        .iter()
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
        .collect();
    let mut out = String::from("Wire temperature and strength\n");
    out.push_str(&build(
        &[
            "step",
            "wire temperature in C",
            "wire temperature out C",
            "no cooling C",
            "entry yield MPa",
            "tensile strength MPa",
        ],
        rows,
        width,
    ));
    out.push_str("\n\n");
    let Some(m) = &rep.machine else {
        return out;
    };
    let rows = m
        .blocks
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
        .collect();
    out.push_str(&format!(
        "Machine: {}; {}, {} blocks; figures at {:.2} m/s finish speed\n",
        if m.name.is_empty() { "-" } else { &m.name },
        m.kind.name(),
        m.blocks_available,
        m.running_speed_m_s
    ));
    out.push_str(&build(
        &[
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
        ],
        rows,
        width,
    ));
    out.push_str("\n\n");
    let s = &rep.summary;
    let mut b = Builder::default();
    b.push_record([
        "attainable speed".to_string(),
        match s.attainable_speed_m_s {
            Some(v) => format!("{v:.2} m/s ({:.0} m/min)", v * 60.0),
            None => format!(
                "- (too hot at any speed; motors and capstans alone: {:.2} m/s)",
                m.mechanical_speed_m_s
            ),
        },
    ]);
    b.push_record([
        "binding block and limit".to_string(),
        match (s.binding_block, s.binding_limit) {
            (Some(k), Some(l)) => format!("block {k}, {}", l.name()),
            _ => "-".into(),
        },
    ]);
    b.push_record([
        "tonnes per shift at it".to_string(),
        fixed(s.attainable_t_per_shift, 1),
    ]);
    b.push_record([
        "total motor load".to_string(),
        format!("{:.1} kW", m.total_motor_load_kw),
    ]);
    let mut t = b.build();
    t.with(Style::sharp());
    out.push_str("Machine summary\n");
    out.push_str(&t.to_string());
    out.push_str("\n\n");
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
