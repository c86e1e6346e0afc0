//! The hardening-law fit page.

use anyhow::Result;
use coldpass::fit::FitReport;

use super::{render, Chart, Page, Row, Status, Table};
use crate::report::units::{Quantity, Units};

/// The page of a hardening-law fit: the record, the fits ranked, the chart,
/// warnings and the caution.
pub fn fit_page(r: &FitReport, src: &crate::report::fit::Source, units: Units) -> Result<String> {
    let opt = |v: Option<f64>, d: usize| crate::report::fixed(v.filter(|x| x.is_finite()), d);
    let su = Quantity::Stress.label(units);
    let stress = |v: Option<f64>, d: usize| {
        crate::report::fixed(
            v.filter(|x| x.is_finite())
                .map(|x| Quantity::Stress.convert(x, units)),
            Quantity::Stress.decimals(d, units),
        )
    };
    let facts = vec![
        ("Record".to_string(), src.file.clone()),
        ("Columns".to_string(), src.columns.clone()),
        (
            "Points".to_string(),
            format!("{} read, {} fitted", r.points_read, r.plastic_strain.len()),
        ),
    ];
    let summary = vec![
        (
            "Young's modulus".to_string(),
            match units {
                // 1 Msi = 1000 ksi.
                Units::Us => format!(
                    "{} Msi",
                    opt(
                        r.youngs_modulus_gpa
                            .map(|g| g * 1000.0 / crate::report::units::MPA_PER_KSI / 1000.0),
                        2
                    )
                ),
                Units::Si => format!("{} GPa", opt(r.youngs_modulus_gpa, 1)),
            },
        ),
        (
            "0.2 % offset yield".to_string(),
            format!("{} {su}", stress(r.yield_mpa, 0)),
        ),
        ("UTS".to_string(), format!("{} {su}", stress(r.uts_mpa, 0))),
        ("uniform strain".to_string(), opt(r.uniform_strain, 3)),
        (
            "best law by AIC".to_string(),
            r.best.map_or("none".to_string(), |b| b.name().to_string()),
        ),
    ];
    let rows = r
        .fits
        .iter()
        .map(|f| Row {
            cells: vec![
                format!(
                    "{}{}",
                    f.law.name(),
                    if Some(f.law) == r.best { " (best)" } else { "" }
                ),
                f.params
                    .iter()
                    .map(|p| {
                        crate::report::fit::param_text(p.name, p.value, p.std_error, " ± ", units)
                    })
                    .collect::<Vec<_>>()
                    .join("; "),
                stress(Some(f.rms_mpa), 2),
                opt(Some(f.r2), 5),
                opt(Some(f.aic), 1),
                stress(f.uts_mpa, 0),
                stress(f.stress_at_reach_mpa, 0),
                if f.converged { "yes" } else { "NO" }.to_string(),
            ],
            status: if f.converged {
                Status::None
            } else {
                Status::Warn
            },
        })
        .collect();
    let page = Page {
        title: format!("Hardening-law fit: {}", src.file),
        kind: "Hardening-law fit".to_string(),
        facts,
        verdict: None,
        summary,
        tables: vec![Table {
            heading: "Fits".to_string(),
            header: crate::report::fit::law_header(r.reach_strain, units),
            rows,
            page_break_before: false,
        }],
        charts: vec![Chart {
            caption: "The record and every fitted law.".to_string(),
            svg: crate::report::fit::svg(r, src, units)?,
        }],
        notes: r.warnings.iter().map(ToString::to_string).collect(),
        caution: crate::report::fit::CAUTION
            .trim_start_matches("Caution: ")
            .to_string(),
    };
    Ok(render(&page))
}
