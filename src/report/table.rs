//! Tables for people (tabled): passes, drawing stress by method, line
//! figures, the summary, notes and the caution footer.

use coldpass::evaluation::{ScheduleReport, StepKind, StepReport, Verdict};
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::{Alignment, Style};

use super::fixed;

fn build(header: &[&str], rows: Vec<Vec<String>>) -> String {
    let mut b = Builder::default();
    b.push_record(header.iter().map(|s| s.to_string()));
    for r in rows {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.modify(Columns::new(1..), Alignment::right());
    t.to_string()
}

fn with_unit(x: Option<f64>, digits: usize, unit: &str, why_none: &str) -> String {
    match x {
        Some(_) => format!("{} {unit}", fixed(x, digits)),
        None => format!("- ({why_none})"),
    }
}

fn pct(x: Option<f64>) -> String {
    fixed(x.map(|v| 100.0 * v), 1)
}

fn flags(r: &StepReport) -> String {
    r.flags
        .iter()
        .map(|f| f.name())
        .collect::<Vec<_>>()
        .join(", ")
}

/// The whole human-readable report of a schedule.
pub fn schedule(rep: &ScheduleReport) -> String {
    let mut out = String::new();
    if !rep.title.is_empty() {
        out.push_str(&format!("{}\n", rep.title));
    }
    if !rep.material.is_empty() {
        out.push_str(&format!("Material: {}\n", rep.material));
    }
    out.push_str(&format!(
        "Governing method: {} ({}); draw ratio warn {} / max {}\n\n",
        rep.method, rep.method_source, rep.draw_ratio_warn, rep.draw_ratio_max
    ));

    let passes: Vec<Vec<String>> = rep
        .passes
        .iter()
        .map(|r| match r.kind {
            StepKind::Anneal => vec![
                r.step.to_string(),
                "anneal".into(),
                fixed(Some(r.exit_diameter_mm), 3),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                fixed(Some(0.0), 3),
                fixed(Some(r.flow_stress_exit_mpa), 0),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
                String::new(),
            ],
            StepKind::Draw => vec![
                r.step.to_string(),
                r.die_size.clone().unwrap_or_default(),
                fixed(Some(r.exit_diameter_mm), 3),
                pct(r.area_reduction),
                pct(Some(r.cumulative_reduction)),
                fixed(r.elongation, 3),
                fixed(r.pass_strain, 3),
                fixed(Some(r.strain_after), 3),
                fixed(Some(r.flow_stress_exit_mpa), 0),
                fixed(r.delta, 2),
                fixed(r.semi_angle_deg, 1),
                fixed(r.optimum_semi_angle_deg, 1),
                fixed(r.governing_draw_stress_mpa, 0),
                fixed(r.draw_ratio, 3),
                flags(r),
            ],
        })
        .collect();
    out.push_str("Passes\n");
    out.push_str(&build(
        &[
            "step",
            "die size",
            "exit mm",
            "reduction %",
            "cum. red. %",
            "elongation",
            "pass strain",
            "strain after",
            "exit flow MPa",
            "Delta",
            "semi-angle deg",
            "optimum deg",
            "draw stress MPa",
            "draw ratio",
            "flags",
        ],
        passes,
    ));
    out.push_str("\n\n");

    let draws: Vec<&StepReport> = rep
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    let methods: Vec<Vec<String>> = draws
        .iter()
        .map(|r| {
            let d = r.draw_stress_mpa.expect("draw rows carry stresses");
            vec![
                r.step.to_string(),
                fixed(r.mean_flow_stress_mpa, 0),
                fixed(Some(d.ideal), 0),
                fixed(d.efficiency, 0),
                fixed(Some(d.sachs), 0),
                fixed(Some(d.siebel), 0),
                fixed(Some(d.redundant), 0),
                fixed(Some(d.upper_bound), 0),
                fixed(r.back_tension_mpa, 0),
                fixed(r.friction, 3),
                fixed(r.friction_factor, 3),
            ]
        })
        .collect();
    out.push_str("Drawing stress by method, MPa\n");
    out.push_str(&build(
        &[
            "step",
            "mean flow MPa",
            "ideal",
            "efficiency",
            "sachs",
            "siebel",
            "redundant",
            "upper-bound",
            "back tension MPa",
            "friction mu",
            "shear factor m",
        ],
        methods,
    ));
    out.push_str("\n\n");

    let line: Vec<Vec<String>> = draws
        .iter()
        .map(|r| {
            vec![
                r.step.to_string(),
                fixed(r.force_kn, 2),
                fixed(r.exit_speed_m_s, 2),
                fixed(r.exit_speed_m_s.map(|v| v * 60.0), 0),
                fixed(r.power_kw, 1),
                fixed(r.temperature_rise_c, 0),
                fixed(r.wire_temperature_c, 0),
            ]
        })
        .collect();
    out.push_str("Line\n");
    out.push_str(&build(
        &[
            "step",
            "force kN",
            "exit speed m/s",
            "exit speed m/min",
            "power kW",
            "temperature rise C",
            "wire temperature C",
        ],
        line,
    ));
    out.push_str("\n\n");

    out.push_str(&super::machine::table(rep));
    let s = &rep.summary;
    let worst = match (s.worst_draw_ratio, s.worst_step) {
        (Some(r), Some(step)) => format!("{r:.3} at step {step}"),
        _ => "-".into(),
    };
    let verdict = match s.verdict {
        Verdict::Ok => "ok: every pass within the limits",
        Verdict::Warn => "warn: within the limits, with warnings (see flags)",
        Verdict::Over => "over: at least one pass over a limit (see flags)",
    };
    let summary = vec![
        vec![
            "start -> finish".into(),
            format!(
                "{:.3} mm -> {:.3} mm",
                s.start_diameter_mm, s.finish_diameter_mm
            ),
        ],
        vec![
            "total area reduction".into(),
            format!("{:.1} %", 100.0 * s.total_area_reduction),
        ],
        vec!["total strain".into(), format!("{:.3}", s.total_strain)],
        vec![
            "draw passes / anneals".into(),
            format!("{} / {}", s.draw_passes, s.anneals),
        ],
        vec!["worst draw ratio".into(), worst],
        vec![
            "finished flow stress".into(),
            format!(
                "{:.0} MPa at strain {:.3} since anneal",
                s.final_flow_stress_mpa, s.final_strain
            ),
        ],
        vec![
            "throughput".into(),
            match (s.throughput_kg_h, s.throughput_t_per_shift) {
                (Some(kg), Some(t)) => format!("{kg:.0} kg/h, {t:.1} t per shift"),
                _ => "- (no line block)".into(),
            },
        ],
        vec![
            "time per coil".into(),
            with_unit(s.coil_time_min, 1, "min", "no line.coil_mass_kg"),
        ],
        vec![
            "total power".into(),
            with_unit(s.total_power_kw, 1, "kW", "no line block"),
        ],
        vec!["verdict".into(), verdict.into()],
    ];
    let mut b = Builder::default();
    for r in summary {
        b.push_record(r);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    out.push_str("Summary\n");
    out.push_str(&t.to_string());
    out.push('\n');
    if !rep.notes.is_empty() {
        out.push_str("\nNotes\n");
        for n in &rep.notes {
            out.push_str(&format!("- {n}\n"));
        }
    }
    out.push_str(&format!("\nCaution: {}\n", rep.caution));
    out
}
