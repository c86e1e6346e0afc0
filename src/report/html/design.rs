//! The design page: the checked schedule's page with the design's facts, its
//! runs between anneals, each anneal with its window, and the die list.

use anyhow::Result;
use coldpass::design::Design;

use super::{render, schedule_sections, Row, Status, Table};
use crate::report::units::{Quantity, Units};

/// The page of a design: the schedule's page with the design's facts, its
/// runs between anneals and why each anneal is there.
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
