//! The design summary of `coldpass design`, in every format.
//!
//! - table: a short design section (strategy, runs, anneals and why each is
//!   there) above the same tables `check` prints for the designed schedule;
//! - JSON and YAML: `{design: <summary>, schedule: <the check report>}`, the
//!   `schedule` part exactly what `check --format json` gives for the emitted file;
//! - CSV: the check CSV, one row per step, with four more columns: `strategy`,
//!   `run` (the run between anneals the step belongs to; an anneal ends its run),
//!   `anneal_reason` (`cold-work`, `temper` or `fewer-passes` on anneal rows); the caution column comes from the check CSV.

use anyhow::Result;
use coldpass::design::Design;
use coldpass::evaluation::StepKind;
use serde::Serialize;

use super::fixed;
use super::units::{Quantity, Units};
use super::{Format, Look};

#[derive(Serialize)]
struct Whole<'a> {
    design: &'a coldpass::design::DesignSummary,
    schedule: &'a coldpass::evaluation::ScheduleReport,
}

/// Renders a design in `format` (see the module documentation for the layout).
pub fn render(d: &Design, format: Format, look: &Look) -> Result<Vec<u8>> {
    let whole = Whole {
        design: &d.summary,
        schedule: &d.report,
    };
    Ok(match format {
        Format::Table => {
            let mut s = summary_to(d, Some(look.table.width), look.table.units);
            s.push('\n');
            s.push_str(
                &super::table::schedule(&d.report, &look.table).map_err(anyhow::Error::msg)?,
            );
            s.into_bytes()
        }
        Format::Html => super::html::design_page(d, look.table.units)?.into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&whole)?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(&whole)?.into_bytes(),
        Format::Csv => csv(d)?,
    })
}

fn strategy_name(d: &Design) -> String {
    serde_json::to_value(d.summary.strategy)
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default()
}

/// The short design section, unwrapped (the HTML page wraps it itself).
pub fn summary(d: &Design, units: Units) -> String {
    summary_to(d, None, units)
}

/// The short design section of the table output, its lines and notes wrapped
/// at words to `width` when given (as the check table's notes are); sizes,
/// stresses and speeds in `units` (the factors of [`Quantity::convert`],
/// NIST SP 811), the unit named beside each.
pub fn summary_to(d: &Design, width: Option<usize>, units: Units) -> String {
    let s = &d.summary;
    let (mm, mpa) = (Quantity::Length.label(units), Quantity::Stress.label(units));
    let len = |x: f64, dec: usize| {
        fixed(
            Some(Quantity::Length.convert(x, units)),
            Quantity::Length.decimals(dec, units),
        )
    };
    let stress = |x: Option<f64>| {
        fixed(
            x.map(|v| Quantity::Stress.convert(v, units)),
            Quantity::Stress.decimals(1, units),
        )
    };
    let mut out = String::new();
    let line = |out: &mut String, text: &str, indent: &str| {
        match width {
            Some(w) => out.push_str(&super::table::wrap(text, w, indent)),
            None => out.push_str(text),
        }
        out.push('\n');
    };
    let taper = s.taper.map(|t| format!(" (taper {t})")).unwrap_or_default();
    line(
        &mut out,
        &format!(
            "Design: {}{taper}, {} draw passes (at most {}), {} anneal{}; governing method {}",
            strategy_name(d),
            s.draw_passes,
            s.max_passes,
            s.anneals.len(),
            if s.anneals.len() == 1 { "" } else { "s" },
            s.method
        ),
        "",
    );
    let angles: Vec<String> = s.die_angles_deg.iter().map(|a| a.to_string()).collect();
    line(&mut out, &format!(
        "Die semi-angles chosen from: {} deg; draw-ratio spread {:.3} % within a run (largest), {:.3} % over the schedule; passes aimed at a draw ratio of at most {}",
        angles.join(", "),
        100.0 * s.run_draw_ratio_spread,
        100.0 * s.draw_ratio_spread,
        fixed(Some(s.draw_ratio_aimed), 4)
    ), "");
    if let Some(name) = &s.machine {
        let speed = match (s.attainable_speed_m_s, s.attainable_t_per_shift) {
            (Some(v), t) => {
                let shown = match units {
                    Units::Si => format!("{v:.2} m/s ({:.0} m/min)", 60.0 * v),
                    Units::Us => format!("{:.0} ft/min", Quantity::Speed.convert(v, units)),
                };
                let t = t
                    .map(|t| format!(", {t:.2} t per shift"))
                    .unwrap_or_default();
                format!("attainable finish speed {shown}{t}")
            }
            _ => "no attainable speed (see the notes)".into(),
        };
        line(
            &mut out,
            &format!("Machine {name}: one die per block; {speed}"),
            "",
        );
    }
    match (s.strength_window_mpa, s.aimed_flow_stress_mpa) {
        (Some(w), aim) => line(
            &mut out,
            &format!(
                "Temper window {}-{} {mpa}, aimed at {} {mpa}; finished flow stress {} {mpa}",
                stress(Some(w.min)),
                stress(Some(w.max)),
                stress(aim),
                stress(Some(s.finished_flow_stress_mpa))
            ),
            "",
        ),
        (None, _) => line(
            &mut out,
            &format!(
                "Finished flow stress {} {mpa} (no temper window given)",
                stress(Some(s.finished_flow_stress_mpa))
            ),
            "",
        ),
    }
    let header = [
        "run".to_string(),
        format!("from {mm}"),
        format!("to {mm}"),
        "run strain".into(),
        "strain at end".into(),
        "passes".into(),
        "draw ratio min".into(),
        "draw ratio max".into(),
    ]
    .to_vec();
    let rows = s
        .runs
        .iter()
        .map(|r| {
            vec![
                r.run.to_string(),
                len(r.from_diameter_mm, 3),
                len(r.to_diameter_mm, 3),
                fixed(Some(r.strain), 3),
                fixed(Some(r.strain_after), 3),
                r.passes.to_string(),
                fixed(Some(r.draw_ratio_min), 3),
                fixed(Some(r.draw_ratio_max), 3),
            ]
        })
        .collect();
    let t = super::table::build(header, rows, width, &[]);
    out.push_str(&format!("\nRuns between anneals\n{t}\n"));
    if s.anneals.is_empty() {
        out.push_str("\nAnneals: none needed\n");
    } else {
        out.push_str("\nAnneals\n");
        for a in &s.anneals {
            let window = a
                .window_mm
                .map(|w| format!(" [window {}-{} {mm}]", len(w.min_mm, 3), len(w.max_mm, 3)))
                .unwrap_or_default();
            line(
                &mut out,
                &format!(
                    "- step {} at {} {mm} ({}){window}: {}",
                    a.step,
                    len(a.diameter_mm, 3),
                    a.reason.name(),
                    a.why
                ),
                "  ",
            );
        }
    }
    let header = [
        format!("die {mm}"),
        "semi-angle deg".into(),
        format!("land {mm}"),
        "count".into(),
    ]
    .to_vec();
    let rows = s
        .dies
        .iter()
        .map(|d| {
            vec![
                len(d.size_mm, s.die_decimals),
                d.semi_angle_deg.to_string(),
                match units {
                    Units::Si => d.land_length_mm.to_string(),
                    Units::Us => len(d.land_length_mm, 3),
                },
                d.count.to_string(),
            ]
        })
        .collect();
    let t = super::table::build(header, rows, width, &[]);
    out.push('\n');
    line(
        &mut out,
        &format!(
            "Die list ({})",
            s.die_rounding.as_deref().unwrap_or(
                "sizes to 3 decimals, in full in JSON: set target.die_step_mm or target.die_sizes_mm to round"
            )
        ),
        "  ",
    );
    out.push_str(&format!("{t}\n"));
    if !s.notes.is_empty() {
        out.push_str("\nDesign notes\n");
        for n in &s.notes {
            line(&mut out, &format!("- {n}"), "  ");
        }
    }
    out
}

/// The check CSV with the design's columns added.
fn csv(d: &Design) -> Result<Vec<u8>> {
    let base = super::csv::schedule(&d.report)?;
    let mut r = ::csv::Reader::from_reader(base.as_slice());
    let mut w = ::csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = r.headers()?.iter().map(str::to_string).collect();
    // The design's columns go before `caution`, which stays the last column
    // as in check's CSV.
    let at = header
        .iter()
        .position(|h| h == "caution")
        .unwrap_or(header.len());
    header.splice(
        at..at,
        ["strategy", "run", "anneal_reason"].map(String::from),
    );
    w.write_record(&header)?;
    let strategy = strategy_name(d);
    let mut run = 1usize;
    for (rec, step) in r.records().zip(&d.report.passes) {
        let mut row: Vec<String> = rec?.iter().map(str::to_string).collect();
        let reason = match step.kind {
            StepKind::Anneal => d
                .summary
                .anneals
                .iter()
                .find(|a| a.step == step.step)
                .map(|a| a.reason.name().to_string())
                .unwrap_or_default(),
            StepKind::Draw => String::new(),
        };
        row.splice(at..at, [strategy.clone(), run.to_string(), reason]);
        if step.kind == StepKind::Anneal {
            run += 1;
        }
        w.write_record(&row)?;
    }
    Ok(w.into_inner()?)
}

/// Comment lines at the head of an emitted schedule: where it came from and
/// what it was designed for (the `target` block is not carried over).
pub fn emitted_header(d: &Design, source: &str) -> Vec<String> {
    let s = &d.summary;
    let mut h = vec![
        format!("Schedule designed by `coldpass design {source}`."),
        format!(
            "Strategy {}, {} draw passes, {} anneal(s), governing method {}; start {} mm, finish {} mm.",
            strategy_name(d),
            s.draw_passes,
            s.anneals.len(),
            s.method,
            s.start_diameter_mm,
            s.finish_diameter_mm
        ),
    ];
    if let Some(w) = s.strength_window_mpa {
        h.push(format!("Temper window {}-{} MPa.", w.min, w.max));
    }
    h.push("Diameters are written at full precision so that `coldpass check` reproduces the design's figures.".into());
    h.push(d.report.caution.clone());
    h
}
