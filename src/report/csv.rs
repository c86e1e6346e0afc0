//! CSV: one row per step, with the JSON names (nested keys joined by a dot,
//! flags joined by `;`); every row carries the caution in its last column.
//! Figures are rounded to [`SIGNIFICANT_DIGITS`] significant digits (the JSON
//! keeps full precision). `--summary` gives the summary instead: one row of
//! the JSON's `summary` keys.

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

/// Significant digits of every CSV figure: finer than any input is measured
/// (a die to 1 um in 10 mm is 5 digits), short enough to read.
pub const SIGNIFICANT_DIGITS: usize = 6;

/// `v` rounded to [`SIGNIFICANT_DIGITS`] significant digits, written in the
/// shortest form that reads back as the rounded value (`7.1`, `0.123457`).
pub fn sig(v: f64) -> String {
    if !v.is_finite() || v == 0.0 {
        return v.to_string();
    }
    let rounded: f64 = format!("{:.*e}", SIGNIFICANT_DIGITS - 1, v)
        .parse()
        .unwrap_or(v);
    rounded.to_string()
}

/// A figure rounded by [`sig`], empty when there is none.
pub fn num(x: Option<f64>) -> String {
    x.map(sig).unwrap_or_default()
}

/// The summary CSV's columns: the JSON `summary` keys, then the method,
/// title and caution.
pub const SUMMARY_HEADER: [&str; 24] = [
    "start_diameter_mm",
    "finish_diameter_mm",
    "total_area_reduction",
    "total_strain",
    "final_strain",
    "draw_passes",
    "anneals",
    "worst_draw_ratio",
    "worst_step",
    "final_flow_stress_mpa",
    "throughput_kg_h",
    "throughput_t_per_shift",
    "coil_time_min",
    "total_power_kw",
    "tensile_strength_mpa",
    "considere_strain",
    "attainable_speed_m_s",
    "binding_block",
    "binding_limit",
    "attainable_t_per_shift",
    "verdict",
    "method",
    "title",
    "caution",
];

/// One report's row under [`SUMMARY_HEADER`].
pub fn summary_record(rep: &ScheduleReport) -> Result<Vec<String>> {
    let s = &rep.summary;
    Ok(vec![
        num(Some(s.start_diameter_mm)),
        num(Some(s.finish_diameter_mm)),
        num(Some(s.total_area_reduction)),
        num(Some(s.total_strain)),
        num(Some(s.final_strain)),
        s.draw_passes.to_string(),
        s.anneals.to_string(),
        num(s.worst_draw_ratio),
        s.worst_step.map(|n| n.to_string()).unwrap_or_default(),
        num(Some(s.final_flow_stress_mpa)),
        num(s.throughput_kg_h),
        num(s.throughput_t_per_shift),
        num(s.coil_time_min),
        num(s.total_power_kw),
        num(s.tensile_strength_mpa),
        num(s.considere_strain),
        num(s.attainable_speed_m_s),
        s.binding_block.map(|b| b.to_string()).unwrap_or_default(),
        s.binding_limit
            .map(|l| l.name().to_string())
            .unwrap_or_default(),
        num(s.attainable_t_per_shift),
        serde_json::to_value(s.verdict)?
            .as_str()
            .unwrap_or_default()
            .into(),
        rep.method.name().into(),
        rep.title.clone(),
        rep.caution.clone(),
    ])
}

/// The summary as one CSV row of the JSON `summary` keys, with the method,
/// title and caution.
pub fn summary(rep: &ScheduleReport) -> Result<Vec<u8>> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(SUMMARY_HEADER)?;
    w.write_record(summary_record(rep)?)?;
    Ok(w.into_inner()?)
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
    w.write_record(super::machine::csv_header(&HEADER))?;
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
        w.write_record(super::machine::csv_record(rep, r, record))?;
    }
    Ok(w.into_inner()?)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn six_significant_digits() {
        assert_eq!(sig(0.123_456_789), "0.123457");
        assert_eq!(sig(1234.5678), "1234.57");
        assert_eq!(sig(7.1), "7.1");
        assert_eq!(sig(8.001_000_000_000_001), "8.001");
        assert_eq!(sig(-0.000_012_345_678), "-0.0000123457");
        assert_eq!(sig(123_456_789.0), "123457000");
        assert_eq!(sig(0.0), "0");
    }
}
