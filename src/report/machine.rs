//! The machine and temperature figures in the table and the CSV, kept apart
//! from the pass tables: the wire temperature die to die (with its
//! no-cooling upper bound and the drawn wire's tensile strength), the
//! per-block table on a machine and its summary (attainable speed, binding
//! block and limit, tonnes per shift). Names match the JSON keys; the table
//! and the page show each figure in the `--units` system with its unit in
//! the header, the CSV keeps the SI units its keys name.

use coldpass::evaluation::{ScheduleReport, StepKind, StepReport};
use coldpass::machine::{BlockReport, MachineRun};
use tabled::builder::Builder;
use tabled::settings::Style;

use super::units::{Quantity, Units};
use super::{fixed, html};

/// A table fitted to `width` (cut into panels of whole columns when wider),
/// each header word on its own line so that a column is as wide as its
/// figures.
fn build(header: &[String], rows: Vec<Vec<String>>, width: usize) -> String {
    let header = header.iter().map(|h| super::table::stack(h)).collect();
    super::table::build(header, rows, Some(width), &[])
}

/// One figure of the temperature or block table: header words, what it
/// measures (the unit follows `--units`), its SI decimals and how to read it.
struct Figure<T> {
    /// The JSON key (of the pass, or of `machine.blocks[]`).
    key: &'static str,
    /// Header words before the unit: the key's words
    /// ([`super::columns::words_of_key`]).
    words: &'static str,
    quantity: Quantity,
    digits: usize,
    read: fn(&T) -> Option<f64>,
}

impl<T> Figure<T> {
    fn header(&self, units: Units) -> String {
        debug_assert!(
            super::columns::words_of_key(self.words, self.key),
            "header '{}' has words its key {} has not",
            self.words,
            self.key
        );
        match self.quantity.label(units) {
            "" => self.words.to_string(),
            unit => format!("{} {unit}", self.words),
        }
    }

    fn cell(&self, x: &T, units: Units) -> String {
        fixed(
            (self.read)(x).map(|v| self.quantity.convert(v, units)),
            self.quantity.decimals(self.digits, units),
        )
    }
}

const fn figure<T>(
    key: &'static str,
    words: &'static str,
    quantity: Quantity,
    digits: usize,
    read: fn(&T) -> Option<f64>,
) -> Figure<T> {
    Figure {
        key,
        words,
        quantity,
        digits,
        read,
    }
}

/// The temperature table after `step`: the same names as the JSON keys
/// `wire_temperature_entry_c`, `wire_temperature_c`,
/// `wire_temperature_no_cooling_c`, `entry_yield_mpa`, `tensile_strength_mpa`.
const TEMPERATURES: [Figure<StepReport>; 5] = [
    figure(
        "wire_temperature_entry_c",
        "wire temperature entry",
        Quantity::Temperature,
        0,
        |r| r.wire_temperature_entry_c,
    ),
    figure(
        "wire_temperature_c",
        "wire temperature",
        Quantity::Temperature,
        0,
        |r| r.wire_temperature_c,
    ),
    figure(
        "wire_temperature_no_cooling_c",
        "wire temperature no cooling",
        Quantity::Temperature,
        0,
        |r| r.wire_temperature_no_cooling_c,
    ),
    figure("entry_yield_mpa", "entry yield", Quantity::Stress, 0, |r| {
        r.entry_yield_mpa
    }),
    figure(
        "tensile_strength_mpa",
        "tensile strength",
        Quantity::Stress,
        0,
        |r| r.tensile_strength_mpa,
    ),
];

/// The block table after `block` and `step` (JSON `machine.blocks[]`).
const BLOCKS: [Figure<BlockReport>; 8] = [
    figure("capstan_rpm", "capstan rpm", Quantity::Plain, 0, |b| {
        Some(b.capstan_rpm)
    }),
    figure(
        "surface_speed_m_s",
        "surface speed",
        Quantity::Speed,
        2,
        |b| Some(b.surface_speed_m_s),
    ),
    figure("slip", "slip", Quantity::Percent, 1, |b| Some(b.slip)),
    figure("net_pull_kn", "net pull", Quantity::Force, 2, |b| {
        Some(b.net_pull_kn)
    }),
    figure("net_power_kw", "net power", Quantity::Power, 1, |b| {
        Some(b.net_power_kw)
    }),
    figure("motor_load", "motor load", Quantity::Percent, 1, |b| {
        Some(b.motor_load)
    }),
    figure(
        "wire_temperature_in_c",
        "wire temperature in",
        Quantity::Temperature,
        0,
        |b| Some(b.wire_temperature_in_c),
    ),
    figure(
        "wire_temperature_out_c",
        "wire temperature out",
        Quantity::Temperature,
        0,
        |b| Some(b.wire_temperature_out_c),
    ),
];

pub(super) fn temperature_header(units: Units) -> Vec<String> {
    std::iter::once("step".to_string())
        .chain(TEMPERATURES.iter().map(|f| f.header(units)))
        .collect()
}

fn block_header(units: Units) -> Vec<String> {
    ["block".to_string(), "step".to_string()]
        .into_iter()
        .chain(BLOCKS.iter().map(|f| f.header(units)))
        .collect()
}

pub(super) fn temperature_rows(rep: &ScheduleReport, units: Units) -> Vec<Vec<String>> {
    rep.passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .map(|r| {
            std::iter::once(r.step.to_string())
                .chain(TEMPERATURES.iter().map(|f| f.cell(r, units)))
                .collect()
        })
        .collect()
}

fn block_rows(m: &MachineRun, units: Units) -> Vec<Vec<String>> {
    m.blocks
        .iter()
        .map(|b| {
            [b.block.to_string(), b.step.to_string()]
                .into_iter()
                .chain(BLOCKS.iter().map(|f| f.cell(b, units)))
                .collect()
        })
        .collect()
}

/// A speed with its unit: `8.00 m/s`, or `1575 ft/min` in US units.
fn speed(v: f64, units: Units) -> String {
    format!(
        "{} {}",
        fixed(
            Some(Quantity::Speed.convert(v, units)),
            Quantity::Speed.decimals(2, units)
        ),
        Quantity::Speed.label(units)
    )
}

fn machine_heading(m: &MachineRun, units: Units) -> String {
    format!(
        "Machine: {}; {}, {} blocks; figures at {} finish speed",
        if m.name.is_empty() { "-" } else { &m.name },
        m.kind.name(),
        m.blocks_available,
        speed(m.running_speed_m_s, units)
    )
}

/// The machine summary's rows of `rep` for a side-by-side summary (compare):
/// the attainable speed, the block and limit that bind, tonnes per shift at
/// it and the motor load; `-` on every row for a schedule with no machine, so
/// that two reports' rows line up.
pub fn summary_rows(rep: &ScheduleReport, units: Units) -> Vec<(String, String)> {
    match &rep.machine {
        Some(m) => machine_summary(rep, m, units)
            .into_iter()
            .map(|[k, v]| (k, v))
            .collect(),
        None => [
            "attainable speed",
            "binding block and limit",
            match units {
                Units::Si => "tonnes per shift at it",
                Units::Us => "short tons per shift at it",
            },
            "total motor load",
        ]
        .into_iter()
        .map(|k| (k.to_string(), "- (no machine)".to_string()))
        .collect(),
    }
}

fn machine_summary(rep: &ScheduleReport, m: &MachineRun, units: Units) -> Vec<[String; 2]> {
    let s = &rep.summary;
    let attainable = match (s.attainable_speed_m_s, units) {
        (Some(v), Units::Si) => format!("{v:.2} m/s ({:.0} m/min)", v * 60.0),
        (Some(v), Units::Us) => format!("{} ({v:.2} m/s)", speed(v, units)),
        (None, _) => format!(
            "- (too hot at any speed; motors and capstans alone: {})",
            speed(m.mechanical_speed_m_s, units)
        ),
    };
    // Short tons of 2000 lb, the pound 0.453 592 37 kg (exact; NIST SP 811 B.9).
    let per_shift = match (s.attainable_t_per_shift, units) {
        (Some(t), Units::Us) => [
            "short tons per shift at it".to_string(),
            format!(
                "{:.1} ({t:.1} t)",
                t * 1000.0 / coldpass::size::quantity::KG_PER_POUND / 2000.0
            ),
        ],
        (t, _) => ["tonnes per shift at it".to_string(), fixed(t, 1)],
    };
    let load = Quantity::Power;
    vec![
        ["attainable speed".to_string(), attainable],
        [
            "binding block and limit".to_string(),
            match (s.binding_block, s.binding_limit) {
                (Some(k), Some(l)) => format!("block {k}, {}", l.name()),
                _ => "-".into(),
            },
        ],
        per_shift,
        [
            "total motor load".to_string(),
            format!(
                "{} {}",
                fixed(
                    Some(load.convert(m.total_motor_load_kw, units)),
                    load.decimals(1, units)
                ),
                load.label(units)
            ),
        ],
    ]
}

/// The temperature and strength table of every draw, then the machine's
/// block table and summary when the schedule runs on one, fitted to `width`,
/// every figure in `units` with its unit in the header.
pub fn table(rep: &ScheduleReport, width: usize, units: Units) -> String {
    let mut out = String::from("Wire temperature and strength\n");
    out.push_str(&build(
        &temperature_header(units),
        temperature_rows(rep, units),
        width,
    ));
    out.push_str("\n\n");
    let Some(m) = &rep.machine else {
        return out;
    };
    out.push_str(&super::table::wrap(&machine_heading(m, units), width, "  "));
    out.push('\n');
    out.push_str(&build(&block_header(units), block_rows(m, units), width));
    out.push_str("\n\n");
    let mut b = Builder::default();
    for r in machine_summary(rep, m, units) {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    out.push_str("Machine summary\n");
    out.push_str(&t.to_string());
    out.push_str("\n\n");
    out
}

/// The machine's tables for the printable page (none without a machine), in `units`.
pub fn html_tables(rep: &ScheduleReport, units: Units) -> Vec<html::Table> {
    let table = |heading: String, header: Vec<String>, rows: Vec<Vec<String>>| html::Table {
        heading,
        header,
        rows: rows
            .into_iter()
            .map(|cells| html::Row {
                cells,
                status: html::Status::None,
            })
            .collect(),
        page_break_before: false,
    };
    // The per-pass temperature table is added by the page itself, on a
    // machine only (html/schedule.rs), so a 25-pass page prints on two sheets.
    let mut out = Vec::new();
    if let Some(m) = &rep.machine {
        out.push(table(
            machine_heading(m, units),
            block_header(units),
            block_rows(m, units),
        ));
        out.push(table(
            "Machine summary".into(),
            vec!["figure".into(), "value".into()],
            machine_summary(rep, m, units)
                .into_iter()
                .map(|r| r.to_vec())
                .collect(),
        ));
    }
    out
}

/// The machine and temperature CSV columns, inserted before the caution:
/// every figure of `machine.blocks[]` as `machine.KEY` (the JSON path, so
/// the CSV mirrors the JSON; tests/ux_cli.rs). Some equal a pass figure on
/// a machine: `machine.net_pull_kn` is the pass's `net_pull_kn` (the same
/// front pull less the same back pull held, evaluation/line.rs and
/// machine.rs), kept under both names as the JSON has it.
const CSV_COLUMNS: [&str; 21] = [
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
    "machine.wire_speed_m_s",
    "machine.net_pull_kn",
    "machine.motor_load_kw",
    "machine.motor_kw",
    "machine.wire_temperature_in_c",
    "machine.wire_temperature_out_c",
    "summary.attainable_speed_m_s",
    "summary.binding_block",
    "summary.binding_limit",
    "summary.attainable_t_per_shift",
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

// Rounded as every CSV figure is (the JSON keeps full precision).
use super::csv::num;

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
        num(block.map(|b| b.wire_speed_m_s)),
        num(block.map(|b| b.net_pull_kn)),
        num(block.map(|b| b.motor_load_kw)),
        num(block.map(|b| b.motor_kw)),
        num(block.map(|b| b.wire_temperature_in_c)),
        num(block.map(|b| b.wire_temperature_out_c)),
        num(s.attainable_speed_m_s),
        s.binding_block.map(|b| b.to_string()).unwrap_or_default(),
        s.binding_limit
            .map(|l| l.name().to_string())
            .unwrap_or_default(),
        num(s.attainable_t_per_shift),
    ];
    let last = record.pop().unwrap_or_default();
    record.extend(extra);
    record.push(last);
    record
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headers_are_the_words_of_their_keys() {
        let keys = TEMPERATURES
            .iter()
            .map(|f| (f.key, f.words))
            .chain(BLOCKS.iter().map(|f| (f.key, f.words)));
        for (key, words) in keys {
            assert!(
                super::super::columns::words_of_key(words, key),
                "{key}: header '{words}'"
            );
        }
        // The three a reader met under other words (the JSON keys motor_load,
        // wire_temperature_no_cooling_c, wire_temperature_entry_c).
        assert!(block_header(Units::Si).contains(&"motor load %".to_string()));
        let t = temperature_header(Units::Si);
        for h in [
            "wire temperature entry C",
            "wire temperature C",
            "wire temperature no cooling C",
        ] {
            assert!(t.contains(&h.to_string()), "{h} in {t:?}");
        }
        assert!(
            temperature_header(Units::Us).contains(&"wire temperature no cooling F".to_string())
        );
    }
}
