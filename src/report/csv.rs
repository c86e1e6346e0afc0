//! CSV: one row per step, with the JSON names (nested keys joined by a dot,
//! flags joined by `;`); every row carries the caution in its last column.

use anyhow::Result;
use coldpass::evaluation::{ScheduleReport, StepKind};

const HEADER: [&str; 38] = [
    "step",
    "kind",
    "die_size",
    "entry_diameter_mm",
    "exit_diameter_mm",
    "area_reduction",
    "elongation",
    "cumulative_reduction",
    "pass_strain",
    "strain_before",
    "strain_after",
    "flow_stress_entry_mpa",
    "mean_flow_stress_mpa",
    "flow_stress_exit_mpa",
    "delta",
    "semi_angle_deg",
    "friction",
    "friction_factor",
    "back_tension_mpa",
    "draw_stress_mpa.ideal",
    "draw_stress_mpa.efficiency",
    "draw_stress_mpa.sachs",
    "draw_stress_mpa.siebel",
    "draw_stress_mpa.redundant",
    "draw_stress_mpa.upper_bound",
    "governing_draw_stress_mpa",
    "draw_ratio",
    "optimum_semi_angle_deg",
    "force_kn",
    "exit_speed_m_s",
    "power_kw",
    "temperature_rise_c",
    "wire_temperature_c",
    "flags",
    "method",
    "verdict",
    "title",
    "caution",
];

fn num(x: Option<f64>) -> String {
    x.map(|v| v.to_string()).unwrap_or_default()
}

/// The steps as CSV.
pub fn schedule(rep: &ScheduleReport) -> Result<Vec<u8>> {
    // The writer scans a quoted field's whole remaining text for quotes on
    // every buffer refill, so a field longer than its buffer costs time
    // quadratic in its length (a 16 MB title: seconds per row). A buffer
    // that holds the longest field (quotes doubled) keeps it linear.
    let longest = rep.title.len().max(rep.caution.len());
    let mut w = csv::WriterBuilder::new()
        .buffer_capacity((2 * longest + 64).max(8 * 1024))
        .from_writer(Vec::new());
    w.write_record(HEADER)?;
    for r in &rep.passes {
        let d = r.draw_stress_mpa;
        let record: Vec<String> = vec![
            r.step.to_string(),
            match r.kind {
                StepKind::Draw => "draw".into(),
                StepKind::Anneal => "anneal".into(),
            },
            r.die_size.clone().unwrap_or_default(),
            num(Some(r.entry_diameter_mm)),
            num(Some(r.exit_diameter_mm)),
            num(r.area_reduction),
            num(r.elongation),
            num(Some(r.cumulative_reduction)),
            num(r.pass_strain),
            num(Some(r.strain_before)),
            num(Some(r.strain_after)),
            num(r.flow_stress_entry_mpa),
            num(r.mean_flow_stress_mpa),
            num(Some(r.flow_stress_exit_mpa)),
            num(r.delta),
            num(r.semi_angle_deg),
            num(r.friction),
            num(r.friction_factor),
            num(r.back_tension_mpa),
            num(d.map(|d| d.ideal)),
            num(d.and_then(|d| d.efficiency)),
            num(d.map(|d| d.sachs)),
            num(d.map(|d| d.siebel)),
            num(d.map(|d| d.redundant)),
            num(d.map(|d| d.upper_bound)),
            num(r.governing_draw_stress_mpa),
            num(r.draw_ratio),
            num(r.optimum_semi_angle_deg),
            num(r.force_kn),
            num(r.exit_speed_m_s),
            num(r.power_kw),
            num(r.temperature_rise_c),
            num(r.wire_temperature_c),
            r.flags
                .iter()
                .map(|f| f.name())
                .collect::<Vec<_>>()
                .join(";"),
            rep.method.name().into(),
            serde_json::to_value(rep.summary.verdict)?
                .as_str()
                .unwrap_or_default()
                .into(),
            rep.title.clone(),
            rep.caution.clone(),
        ];
        w.write_record(&record)?;
    }
    Ok(w.into_inner()?)
}
