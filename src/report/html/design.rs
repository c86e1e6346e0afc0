//! The design page: the checked schedule's page with the design's facts, its
//! runs between anneals, each anneal with its window, and the die list.

use anyhow::Result;
use coldpass::design::Design;

use super::{render, schedule_sections, Row, Status, Table};
use crate::report::units::{Quantity, Units};

/// The page of a design: the schedule's page with the design's facts, its
/// runs between anneals, the anneals (each with its window: the anneal
/// diameters that land the finished strength in the temper window) and why
/// each is there, and the die list the die room orders from. Headers are
/// the design table's, after the JSON keys (`anneals[]`: `step`,
/// `diameter_mm`, `reason`, `strain_before`, `window_mm.min_mm`,
/// `window_mm.max_mm`; `dies[]`: `size_mm`, `semi_angle_deg`,
/// `land_length_mm`, `count`); sizes in `units` as the table shows them.
pub fn design_page(d: &Design, units: Units) -> Result<String> {
    let mut page = schedule_sections(&d.report, &d.schedule, units)?;
    let s = &d.summary;
    page.kind = "Schedule design".to_string();
    page.facts.push((
        "Design".to_string(),
        crate::report::design::summary(d, units)
            .lines()
            .take_while(|l| !l.trim().is_empty())
            .collect::<Vec<_>>()
            .join("; ")
            .trim_start_matches("Design: ")
            .to_string(),
    ));
    let len = |mm: f64| {
        crate::report::fixed(
            Some(Quantity::Length.convert(mm, units)),
            Quantity::Length.decimals(3, units),
        )
    };
    let lu = Quantity::Length.label(units);
    let runs = Table {
        heading: "Runs between anneals".to_string(),
        header: [
            "run".to_string(),
            format!("from {lu}"),
            format!("to {lu}"),
            "run strain".into(),
            "strain at end".into(),
            "passes".into(),
            "draw ratio min".into(),
            "draw ratio max".into(),
        ]
        .to_vec(),
        rows: s
            .runs
            .iter()
            .map(|r| Row {
                cells: vec![
                    r.run.to_string(),
                    len(r.from_diameter_mm),
                    len(r.to_diameter_mm),
                    format!("{:.3}", r.strain),
                    format!("{:.3}", r.strain_after),
                    r.passes.to_string(),
                    format!("{:.3}", r.draw_ratio_min),
                    format!("{:.3}", r.draw_ratio_max),
                ],
                status: Status::None,
            })
            .collect(),
        page_break_before: false,
    };
    page.tables.push(runs);
    if s.anneals.is_empty() {
        page.notes.push("Anneals: none needed".to_string());
    } else {
        page.tables.push(anneal_table(d, units));
    }
    page.tables.push(die_table(d, units));
    for a in &s.anneals {
        page.notes.push(format!(
            "Anneal at step {} ({} {lu}, {}): {}",
            a.step,
            len(a.diameter_mm),
            a.reason.name(),
            a.why
        ));
    }
    page.notes.extend(s.notes.iter().cloned());
    Ok(render(&page))
}

/// A length in `units` to `decimals` SI decimals (one more in inches), as the
/// design table shows it.
fn length(mm: f64, decimals: usize, units: Units) -> String {
    crate::report::fixed(
        Some(Quantity::Length.convert(mm, units)),
        Quantity::Length.decimals(decimals, units),
    )
}

/// The anneals: step, diameter, reason, the strain each removes and its
/// window (`-` for an anneal without one, as a cold-work anneal is).
fn anneal_table(d: &Design, units: Units) -> Table {
    let lu = Quantity::Length.label(units);
    let rows = d
        .summary
        .anneals
        .iter()
        .map(|a| {
            let (min, max) = a.window_mm.map_or(("-".to_string(), "-".to_string()), |w| {
                (length(w.min_mm, 3, units), length(w.max_mm, 3, units))
            });
            vec![
                a.step.to_string(),
                length(a.diameter_mm, 3, units),
                a.reason.name().to_string(),
                crate::report::fixed(Some(a.strain_before), 3),
                min,
                max,
            ]
        })
        .collect();
    Table::plain(
        "Anneals".to_string(),
        vec![
            "step".to_string(),
            format!("diameter {lu}"),
            "reason".into(),
            "strain before".into(),
            format!("window min {lu}"),
            format!("window max {lu}"),
        ],
        rows,
    )
}

/// The die list, as the design table gives it: each distinct die (size to
/// the die room's decimals, semi-angle, land) and how many passes use it,
/// under the same heading (naming the rounding).
fn die_table(d: &Design, units: Units) -> Table {
    let s = &d.summary;
    let lu = Quantity::Length.label(units);
    let rows = s
        .dies
        .iter()
        .map(|die| {
            vec![
                length(die.size_mm, s.die_decimals, units),
                die.semi_angle_deg.to_string(),
                match units {
                    Units::Si => die.land_length_mm.to_string(),
                    Units::Us => length(die.land_length_mm, 3, units),
                },
                die.count.to_string(),
            ]
        })
        .collect();
    Table::plain(
        format!(
            "Die list ({})",
            s.die_rounding.as_deref().unwrap_or(
                "sizes to 3 decimals, in full in JSON: set target.die_step_mm or target.die_sizes_mm to round"
            )
        ),
        vec![
            format!("die {lu}"),
            "semi-angle deg".into(),
            format!("land {lu}"),
            "count".into(),
        ],
        rows,
    )
}
