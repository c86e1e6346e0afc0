//! A checked schedule's sections of the page: facts, verdict, summary, the
//! pass table, the drawing stress by method, the wire temperature and
//! strength, the machine's tables, the chart, notes and caution.

use anyhow::Result;
use coldpass::evaluation::{ScheduleReport, StepKind, StepReport};
use coldpass::schedule::ScheduleFile;

use super::{render, Chart, Page, Row, Status, Table};
use crate::report::columns::{self, Column};
use crate::report::units::{Quantity, Units};

/// The pass columns of the page: the figures read first plus the line figures,
/// so that the planner's speed and power are there too.
const PAGE_PASSES: &[&str] = &[
    "step",
    "die_size",
    "exit_diameter_mm",
    "area_reduction",
    "cumulative_reduction",
    "pass_strain",
    "strain_after",
    "flow_stress_exit_mpa",
    "delta",
    "semi_angle_deg",
    "optimum_semi_angle_deg",
    "governing_draw_stress_mpa",
    "draw_ratio",
    "force_kn",
    "exit_speed_m_s",
    "power_kw",
    "wire_temperature_c",
    "flags",
];

const PAGE_METHODS: &[&str] = &[
    "step",
    "mean_flow_stress_mpa",
    "draw_stress_mpa.ideal",
    "draw_stress_mpa.efficiency",
    "draw_stress_mpa.sachs",
    "draw_stress_mpa.siebel",
    "draw_stress_mpa.redundant",
    "draw_stress_mpa.upper_bound",
    "back_tension_mpa",
    "temperature_rise_c",
];

/// A step's standing: over when any flag is over a limit, warn when flagged.
pub fn step_status(r: &StepReport) -> Status {
    if r.kind == StepKind::Anneal {
        Status::None
    } else if r.flags.iter().any(|f| f.is_over()) {
        Status::Over
    } else if !r.flags.is_empty() {
        Status::Warn
    } else {
        Status::Ok
    }
}

fn step_table(
    heading: String,
    cols: &[&Column],
    steps: &[&StepReport],
    units: Units,
    status: bool,
) -> Table {
    Table {
        heading,
        header: cols.iter().map(|c| c.header(units)).collect(),
        rows: steps
            .iter()
            .map(|r| Row {
                cells: cols.iter().map(|c| c.cell(r, units)).collect(),
                status: if status { step_status(r) } else { Status::None },
            })
            .collect(),
        page_break_before: false,
    }
}

/// The parts of a checked schedule's page: facts, verdict, summary, the pass
/// table and the drawing-stress table, the chart, notes and caution.
pub fn schedule_sections(rep: &ScheduleReport, file: &ScheduleFile, units: Units) -> Result<Page> {
    let mut facts = Vec::new();
    if !rep.material.is_empty() {
        facts.push(("Material".to_string(), rep.material.clone()));
    }
    if let Some(m) = &rep.machine {
        let kind = serde_json::to_value(m.kind)
            .ok()
            .and_then(|v| v.as_str().map(str::to_string))
            .unwrap_or_default();
        let speed = |v: f64| {
            format!(
                "{} {}",
                crate::report::fixed(
                    Some(Quantity::Speed.convert(v, units)),
                    Quantity::Speed.decimals(2, units)
                ),
                Quantity::Speed.label(units)
            )
        };
        facts.push((
            "Machine".to_string(),
            format!(
                "{} ({kind}, {} blocks); attainable finish speed {}",
                m.name,
                m.blocks_available,
                m.attainable_speed_m_s
                    .map_or_else(|| "none (too hot at any speed)".to_string(), speed)
            ),
        ));
    }
    facts.push((
        "Governing method".to_string(),
        format!(
            "{} ({}); draw ratio warn {} / max {}",
            rep.method, rep.method_source, rep.draw_ratio_warn, rep.draw_ratio_max
        ),
    ));
    let all: Vec<&StepReport> = rep.passes.iter().collect();
    let draws: Vec<&StepReport> = rep
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    let mut methods = step_table(
        format!(
            "Drawing stress by method, {}",
            Quantity::Stress.label(units)
        ),
        &columns::fixed_set(PAGE_METHODS),
        &draws,
        units,
        false,
    );
    methods.page_break_before = false;
    let svg = String::from_utf8(crate::report::svg::schedule_in(rep, file, units)?)?;
    Ok(Page {
        title: if rep.title.is_empty() {
            "Schedule".to_string()
        } else {
            rep.title.clone()
        },
        kind: "Schedule check".to_string(),
        facts,
        verdict: Some((
            rep.summary.verdict.into(),
            format!("Verdict: {}", crate::report::table::verdict_words(rep.summary.verdict)),
        )),
        summary: crate::report::table::summary_rows(rep, units),
        tables: vec![
            step_table(
                "Passes".to_string(),
                &columns::fixed_set(PAGE_PASSES),
                &all,
                units,
                true,
            ),
            methods,
        ]
        .into_iter()
        // On a machine, the temperature and strength table too, before the
        // block table, as the check table has it. Off a machine it stays off
        // the page, so a 25-pass page prints on two sheets (the pass table
        // carries the wire temperature).
        .chain(rep.machine.is_some().then(|| temperature_table(rep, units)))
        .chain(crate::report::machine::html_tables(rep, units))
        .collect(),
        charts: vec![Chart {
            caption: "Draw ratio per pass against the warn and max lines; flow stress against the total strain drawn, with each pass and anneal marked.".to_string(),
            svg,
        }],
        notes: rep.notes.clone(),
        caution: rep.caution.clone(),
    })
}

/// The wire temperature and strength of every draw, as the check table shows
/// it (heading, headers and figures from `report::machine`, so the names are
/// the JSON keys' `wire_temperature_entry_c`, `wire_temperature_c`,
/// `wire_temperature_no_cooling_c`, `entry_yield_mpa`, `tensile_strength_mpa`
/// in `units`).
fn temperature_table(rep: &ScheduleReport, units: Units) -> Table {
    Table::plain(
        "Wire temperature and strength".to_string(),
        crate::report::machine::temperature_header(units),
        crate::report::machine::temperature_rows(rep, units),
    )
}

/// The page of a checked schedule.
pub fn schedule_page(rep: &ScheduleReport, file: &ScheduleFile, units: Units) -> Result<String> {
    Ok(render(&schedule_sections(rep, file, units)?))
}
