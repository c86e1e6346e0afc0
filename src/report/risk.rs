//! The break-risk report: table, JSON, YAML, CSV (the same names in each),
//! and an SVG with a fan chart of the draw ratio per pass (median and the
//! 5-95 % band against the warn and max lines) above a bar of each pass's
//! break probability. The table and the page show lengths, stresses,
//! speeds and powers in `--units` (the unit in every header, or beside the
//! figure where a column mixes inputs); JSON, YAML and CSV stay SI, as their
//! keys say.

use anyhow::{anyhow, Result};
use coldpass::risk::{InputScatter, Law, PassRisk, RiskReport};
use plotters::prelude::*;

use super::fixed;
use super::units::{Quantity, Units};
use crate::report::Format;

/// Renders a risk report in `format` (JSON and YAML straight from serde, in
/// SI; the table and the page in `units`).
pub fn render(rep: &RiskReport, format: Format, units: Units) -> Result<Vec<u8>> {
    Ok(match format {
        Format::Table => table(rep, units).into_bytes(),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(rep)?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(rep)?.into_bytes(),
        Format::Csv => csv(rep)?,
        Format::Html => page(rep, units)?.into_bytes(),
    })
}

/// A table fitted to `width` with the check table's layout (first column
/// left, figures right), each header word on its own line when `stacked`.
fn build(header: &[&str], rows: Vec<Vec<String>>, width: usize, stacked: bool) -> String {
    let header = header
        .iter()
        .map(|h| {
            if stacked {
                super::table::stack(h)
            } else {
                h.to_string()
            }
        })
        .collect();
    super::table::build(header, rows, Some(width), &[])
}

/// A probability in percent with its standard error: `1.23 +- 0.11`.
fn pct_se(p: f64, se: f64) -> String {
    if p == 0.0 {
        "0".into()
    } else {
        format!("{:.2} +- {:.2}", 100.0 * p, 100.0 * se)
    }
}

fn ratio(x: Option<f64>) -> String {
    match x {
        Some(_) => fixed(x, 3),
        None => "> 2".into(),
    }
}

fn driver(p: &PassRisk) -> String {
    match p.drivers.first() {
        Some(d) => format!("{} (r {:+.2})", d.input, d.correlation),
        None => "-".into(),
    }
}

/// What an input that scatters measures, by the unit its file key names
/// (`die_diameter_mm`, `back_tension_mpa`, `flow.k_mpa`): its `sd` and
/// limits are in that unit.
fn input_quantity(input: &str) -> Quantity {
    if input.ends_with("_mm") {
        Quantity::Length
    } else if input.ends_with("_mpa") {
        Quantity::Stress
    } else {
        Quantity::Plain
    }
}

/// Rounds `x` to `digits` significant digits, so a converted figure reads
/// as short as the one written in the file.
fn significant(x: f64, digits: i32) -> f64 {
    if x == 0.0 || !x.is_finite() {
        return x;
    }
    let scale = 10f64.powi(digits - 1 - x.abs().log10().floor() as i32);
    (x * scale).round() / scale
}

/// An input's distribution in words, in `units`: in SI as the file gives
/// it; in US its `sd` and limits converted (4 significant digits) with the
/// unit after them, `normal, sd 0.001969 in`. A relative `cv` and a pure
/// number (friction, degrees) are never converted.
fn distribution_in(i: &InputScatter, units: Units) -> String {
    let q = input_quantity(&i.input);
    if units == Units::Si || q == Quantity::Plain || !i.law.has_figure_in_unit() {
        return i.distribution.clone();
    }
    let factor = q.convert(1.0, units);
    let round = |x: f64| significant(x, 4);
    let law = match i.law.in_unit(factor) {
        Law::Normal { sd, cv } => Law::Normal {
            sd: sd.map(round),
            cv,
        },
        Law::Lognormal { sd, cv } => Law::Lognormal {
            sd: sd.map(round),
            cv,
        },
        Law::Uniform { below, above } => Law::Uniform {
            below: round(below),
            above: round(above),
        },
        Law::Truncated {
            sd,
            cv,
            below,
            above,
        } => Law::Truncated {
            sd: sd.map(round),
            cv,
            below: round(below),
            above: round(above),
        },
    };
    format!("{} {}", law.describe(), q.label(units))
}

/// A note in `units`: the figures with a unit it quotes converted (the
/// machine's running speed; the line's `block_power_kw`, which keeps the
/// kW its key names with the converted figure beside it); in SI as it is.
fn note_in(rep: &RiskReport, note: &str, units: Units) -> String {
    if units == Units::Si {
        return note.to_string();
    }
    let mut out = note.to_string();
    if let Some(v) = rep.quoted.running_speed_m_s {
        out = out.replace(
            &format!("{v:.3} m/s"),
            &format!(
                "{:.1} {}",
                Quantity::Speed.convert(v, units),
                Quantity::Speed.label(units)
            ),
        );
    }
    if let Some(kw) = rep.quoted.block_power_kw {
        out = out.replace(
            &format!("{kw} kW"),
            &format!(
                "{kw} kW ({:.2} {})",
                Quantity::Power.convert(kw, units),
                Quantity::Power.label(units)
            ),
        );
    }
    out
}

/// The rows of the inputs that scatter, in `units`.
fn scatter_rows(rep: &RiskReport, units: Units) -> Vec<Vec<String>> {
    rep.scatter
        .iter()
        .map(|i| {
            vec![
                i.input.clone(),
                distribution_in(i, units),
                fixed(i.between_dies, 2),
                i.source.clone(),
            ]
        })
        .collect()
}

/// The human-readable report, fitted to the terminal's width: every line
/// of text wrapped to it, every table cut into panels that fit.
pub fn table(rep: &RiskReport, units: Units) -> String {
    let width = super::table::terminal_width();
    table_at(rep, units, width)
}

/// [`table`] at `width` columns.
pub fn table_at(rep: &RiskReport, units: Units, width: usize) -> String {
    let wrap = |text: &str, indent: &str| super::table::wrap(text, width, indent);
    let mut out = String::new();
    if !rep.title.is_empty() {
        out.push_str(&wrap(&rep.title, ""));
        out.push('\n');
    }
    if !rep.material.is_empty() {
        out.push_str(&wrap(&format!("Material: {}", rep.material), "  "));
        out.push('\n');
    }
    let s = &rep.summary;
    out.push_str(&wrap(&format!(
        "Break risk under scatter: {} samples ({}, seed {}); governing method {} ({}); draw ratio warn {} / max {}",
        s.samples,
        rep.sampling.name(),
        rep.seed,
        rep.method,
        rep.method_source,
        rep.draw_ratio_warn,
        rep.draw_ratio_max
    ), ""));
    out.push_str("\n\n");
    if !rep.scatter.is_empty() {
        let rows = scatter_rows(rep, units);
        out.push_str("Inputs that scatter\n");
        out.push_str(&build(
            &["input", "distribution", "between dies", "from"],
            rows,
            width,
            false,
        ));
        out.push_str("\n\n");
    }
    let (header, rows) = pass_rows(rep, units);
    let header: Vec<&str> = header.iter().map(String::as_str).collect();
    // The standard error under its figure keeps a probability column narrow.
    let rows = rows
        .into_iter()
        .map(|r| r.into_iter().map(|c| c.replace(" +- ", "\n+- ")).collect())
        .collect();
    out.push_str(&wrap(
        "Passes (probabilities in % +- one standard error)",
        "",
    ));
    out.push('\n');
    out.push_str(&build(&header, rows, width, true));
    out.push_str("\n\nSummary\n");
    let lines = summary_lines(rep);
    for l in lines {
        out.push_str(&wrap(&format!("  {l}"), "    "));
        out.push('\n');
    }
    if !rep.warnings.is_empty() {
        out.push_str("\nWarnings\n");
        for w in &rep.warnings {
            out.push_str(&wrap(&format!("  - {w}"), "    "));
            out.push('\n');
        }
    }
    out.push_str("\nNotes\n");
    for n in &rep.notes {
        out.push_str(&wrap(&format!("  - {}", note_in(rep, n, units)), "    "));
        out.push('\n');
    }
    out.push('\n');
    out.push_str(&wrap(&rep.scope, ""));
    out.push_str("\n\n");
    out.push_str(&wrap(&format!("Caution: {}", rep.caution), ""));
    out.push('\n');
    out
}

/// The per-pass table: header and rows, shared by the table and the page.
fn pass_rows(rep: &RiskReport, units: Units) -> (Vec<String>, Vec<Vec<String>>) {
    let exit = format!("exit {}", Quantity::Length.label(units));
    let power = rep
        .passes
        .iter()
        .any(|p| p.over_block_power_probability.is_some());
    let mut header = vec![
        "step",
        exit.as_str(),
        "draw ratio",
        "p5",
        "p50",
        "p95",
        "p99",
        "over warn %",
        "over max %",
        "break %",
    ];
    if power {
        header.push("over block power %");
    }
    header.push("main driver");
    let rows = rep
        .passes
        .iter()
        .map(|p| {
            let mut r = vec![
                p.step.to_string(),
                fixed(
                    Some(Quantity::Length.convert(p.exit_diameter_mm, units)),
                    Quantity::Length.decimals(3, units),
                ),
                fixed(Some(p.draw_ratio), 3),
                ratio(p.draw_ratio_p5),
                ratio(p.draw_ratio_p50),
                ratio(p.draw_ratio_p95),
                ratio(p.draw_ratio_p99),
                pct_se(p.over_warn_probability, p.over_warn_standard_error),
                pct_se(p.over_max_probability, p.over_max_standard_error),
                pct_se(p.break_probability, p.break_standard_error),
            ];
            if power {
                r.push(pct_se(
                    p.over_block_power_probability.unwrap_or(0.0),
                    p.over_block_power_standard_error.unwrap_or(0.0),
                ));
            }
            r.push(driver(p));
            r
        })
        .collect();
    (header.into_iter().map(String::from).collect(), rows)
}

/// The summary in sentences, shared by the table and the page.
fn summary_lines(rep: &RiskReport) -> Vec<String> {
    let s = &rep.summary;
    let mut lines = vec![
        format!(
            "any pass breaks: {} %{}",
            pct_se(s.any_break_probability, s.any_break_standard_error),
            s.any_break_upper_95
                .map(|u| format!(
                    " (below {} % at 95 %, rule of three)",
                    coldpass::risk::stats::percent_2sig(u)
                ))
                .unwrap_or_default()
        ),
        format!(
            "any pass over the max line: {} %",
            pct_se(s.any_over_max_probability, s.any_over_max_standard_error)
        ),
        if s.weakest_break_probability > 0.0 {
            format!(
                "weakest pass: step {} (break {:.2} %), driven most by {}",
                s.weakest_step,
                100.0 * s.weakest_break_probability,
                s.weakest_main_driver
                    .as_deref()
                    .unwrap_or("no input (none scatters)")
            )
        } else {
            format!(
                "weakest pass: step {} (no sample broke; the highest 99th-percentile draw ratio), driven most by {}",
                s.weakest_step,
                s.weakest_main_driver.as_deref().unwrap_or("no input (none scatters)")
            )
        },
        format!(
            "samples used: {} of {} ({} refused)",
            s.samples_used, s.samples, s.samples_refused
        ),
    ];
    if let Some(t) = s.target_probability {
        lines.push(match s.draw_ratio_scale_for_target {
            Some(k) if k < 1.0 => format!(
                "target {t}: over it; lower every pass's draw ratio by {:.1} % (x {k:.4}), or the weakest pass to {} , to reach it",
                100.0 * (1.0 - k),
                fixed(s.weakest_draw_ratio_for_target, 3)
            ),
            Some(k) => format!(
                "target {t}: within it, with room for every draw ratio to rise by {:.1} % (x {k:.4})",
                100.0 * (k - 1.0)
            ),
            None if s.verdict == "too-few-samples" => format!(
                "target {t}: too few samples reach it to place a margin (see the warnings)"
            ),
            None => format!("target {t}: the margin lies past a draw ratio of 2 and cannot be placed"),
        });
        lines.push(format!("verdict: {}", s.verdict));
    }
    lines
}

/// The report page (`--format html`): the summary first, the inputs that
/// scatter, the per-pass table with the passes whose break probability is
/// over the target marked in words, the charts inline, notes, the scope and
/// the caution.
pub fn page(rep: &RiskReport, units: Units) -> Result<String> {
    use super::html::{Chart, Page, Row, Status, Table};
    let target = rep.summary.target_probability;
    let (header, rows) = pass_rows(rep, units);
    let rows = rows
        .into_iter()
        .zip(&rep.passes)
        .map(|(cells, p)| Row {
            cells,
            status: match target {
                Some(t) if p.break_probability > t => Status::Over,
                Some(_) => Status::Ok,
                None => Status::None,
            },
        })
        .collect();
    let mut tables = Vec::new();
    if !rep.scatter.is_empty() {
        tables.push(Table::plain(
            "Inputs that scatter".into(),
            ["input", "distribution", "between dies", "from"]
                .map(String::from)
                .to_vec(),
            scatter_rows(rep, units),
        ));
    }
    tables.insert(
        0,
        Table {
            heading: "Passes (probabilities in % +- one standard error)".into(),
            header,
            rows,
            page_break_before: false,
        },
    );
    let svg = String::from_utf8(svg(rep)?).map_err(|e| anyhow!("chart text: {e}"))?;
    let s = &rep.summary;
    let mut notes: Vec<String> = rep
        .warnings
        .iter()
        .map(|w| format!("Warning: {w}"))
        .collect();
    notes.extend(rep.notes.iter().map(|n| note_in(rep, n, units)));
    notes.push(rep.scope.clone());
    let page = Page {
        title: if rep.title.is_empty() {
            "Break risk under scatter".into()
        } else {
            rep.title.clone()
        },
        kind: "Break risk under scatter".into(),
        facts: vec![
            ("Material".into(), rep.material.clone()),
            (
                "Governing method".into(),
                format!("{} ({})", rep.method, rep.method_source),
            ),
            (
                "Samples".into(),
                format!("{} ({}, seed {})", s.samples, rep.sampling.name(), rep.seed),
            ),
        ],
        verdict: target.map(|_| {
            let status = if rep.is_over_target() {
                Status::Over
            } else {
                Status::Ok
            };
            (status, s.verdict.clone())
        }),
        summary: summary_lines(rep)
            .into_iter()
            .map(|l| match l.split_once(": ") {
                Some((k, v)) => (k.to_string(), v.to_string()),
                None => (String::new(), l),
            })
            .collect(),
        tables,
        charts: vec![Chart {
            caption: "Draw ratio per pass (median and 5-95 % band against the warn and max lines) and each pass's break probability".into(),
            svg,
        }],
        notes,
        caution: rep.caution.clone(),
    };
    Ok(super::html::render(&page))
}

const CSV_HEADER: [&str; 32] = [
    "step",
    "exit_diameter_mm",
    "draw_ratio",
    "tensile_strength_mpa",
    "break_probability",
    "break_standard_error",
    "over_warn_probability",
    "over_warn_standard_error",
    "over_max_probability",
    "over_max_standard_error",
    "over_block_power_probability",
    "over_block_power_standard_error",
    "draw_ratio_p5",
    "draw_ratio_p50",
    "draw_ratio_p95",
    "draw_ratio_p99",
    "lowest_draw_ratio",
    "highest_draw_ratio",
    "main_driver",
    "main_driver_correlation",
    "method",
    "sampling",
    "seed",
    "samples",
    "samples_used",
    "any_break_probability",
    "any_break_standard_error",
    "weakest_step",
    "verdict",
    "title",
    "scope",
    "caution",
];

fn num(x: Option<f64>) -> String {
    x.map(|v| v.to_string()).unwrap_or_default()
}

/// CSV: one row per draw pass, the JSON names; the schedule's figures, the
/// scope and the caution on every row.
pub fn csv(rep: &RiskReport) -> Result<Vec<u8>> {
    let mut w = ::csv::Writer::from_writer(Vec::new());
    w.write_record(CSV_HEADER)?;
    let s = &rep.summary;
    for p in &rep.passes {
        let d = p.drivers.first();
        w.write_record([
            p.step.to_string(),
            p.exit_diameter_mm.to_string(),
            p.draw_ratio.to_string(),
            p.tensile_strength_mpa.to_string(),
            p.break_probability.to_string(),
            p.break_standard_error.to_string(),
            p.over_warn_probability.to_string(),
            p.over_warn_standard_error.to_string(),
            p.over_max_probability.to_string(),
            p.over_max_standard_error.to_string(),
            num(p.over_block_power_probability),
            num(p.over_block_power_standard_error),
            num(p.draw_ratio_p5),
            num(p.draw_ratio_p50),
            num(p.draw_ratio_p95),
            num(p.draw_ratio_p99),
            p.lowest_draw_ratio.to_string(),
            p.highest_draw_ratio.to_string(),
            d.map(|d| d.input.clone()).unwrap_or_default(),
            num(d.map(|d| d.correlation)),
            rep.method.to_string(),
            rep.sampling.name().to_string(),
            rep.seed.to_string(),
            s.samples.to_string(),
            s.samples_used.to_string(),
            s.any_break_probability.to_string(),
            s.any_break_standard_error.to_string(),
            s.weakest_step.to_string(),
            s.verdict.clone(),
            rep.title.clone(),
            rep.scope.clone(),
            rep.caution.clone(),
        ])?;
    }
    w.into_inner().map_err(|e| anyhow!("writing CSV: {e}"))
}

use super::chart::{
    bar, caution_foot, count_mesh, err, framed, legend, level_lines, limit_lines, page_title, Area,
    CAUTION_FOOT_PX, DARK_GREY, OK as BAND, OVER, WIDE,
};

/// The chart: draw-ratio fan per pass, and break probability per pass.
pub fn svg(rep: &RiskReport) -> Result<Vec<u8>> {
    let mut buf = String::new();
    {
        let root = SVGBackend::with_string(&mut buf, (960, 760)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let title = page_title(&rep.title);
        let root = root
            .titled(
                &format!(
                    "{title}  ({} samples, method {})",
                    rep.summary.samples, rep.method
                ),
                ("sans-serif", 18),
            )
            .map_err(err)?;
        let (body, foot) = root.split_vertically(root.dim_in_pixel().1 - CAUTION_FOOT_PX);
        let (upper, lower) = body.split_vertically(410);
        fan(rep, &upper)?;
        bars(rep, &lower)?;
        caution_foot(&foot, &rep.caution)?;
        root.present().map_err(err)?;
    }
    Ok(buf.into_bytes())
}

fn step_labels(rep: &RiskReport, x: f64) -> String {
    let k = x.round();
    if (x - k).abs() < 1e-6 && k >= 1.0 && k as usize <= rep.passes.len() {
        rep.passes[k as usize - 1].step.to_string()
    } else {
        String::new()
    }
}

fn fan(rep: &RiskReport, area: &Area<'_>) -> Result<()> {
    let n = rep.passes.len() as f64;
    let cap = |x: Option<f64>| x.unwrap_or(2.0);
    let top = rep
        .passes
        .iter()
        .map(|p| cap(p.draw_ratio_p95).max(p.draw_ratio))
        .fold(rep.draw_ratio_max.max(1.0), f64::max)
        * 1.1;
    // One slot per pass: the level lines are labelled over the last one.
    let mut chart = framed(
        area,
        "Draw ratio per pass: median and 5-95 % band under scatter",
        15,
        WIDE,
        0.5f64..n + 0.5,
        0f64..top,
    )?;
    count_mesh(
        &mut chart,
        "step",
        "draw ratio",
        rep.passes.len() + 1,
        &|x| step_labels(rep, *x),
    )?;
    let xs = |i: usize| (i + 1) as f64;
    let mut band: Vec<(f64, f64)> = rep
        .passes
        .iter()
        .enumerate()
        .map(|(i, p)| (xs(i), cap(p.draw_ratio_p95)))
        .collect();
    band.extend(
        rep.passes
            .iter()
            .enumerate()
            .rev()
            .map(|(i, p)| (xs(i), cap(p.draw_ratio_p5))),
    );
    chart
        .draw_series(std::iter::once(Polygon::new(band, BAND.mix(0.25).filled())))
        .map_err(err)?
        .label("5-95 % band")
        .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 12, y + 5)], BAND.mix(0.25).filled()));
    chart
        .draw_series(LineSeries::new(
            rep.passes
                .iter()
                .enumerate()
                .map(|(i, p)| (xs(i), cap(p.draw_ratio_p50))),
            BAND.stroke_width(2),
        ))
        .map_err(err)?
        .label("median")
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 12, y)], BAND.stroke_width(2)));
    chart
        .draw_series(
            rep.passes
                .iter()
                .enumerate()
                .map(|(i, p)| Circle::new((xs(i), p.draw_ratio), 3, BLACK.filled())),
        )
        .map_err(err)?
        .label("nominal (check)")
        .legend(|(x, y)| Circle::new((x + 6, y), 3, BLACK.filled()));
    level_lines(
        &mut chart,
        {
            let mut lines = limit_lines(rep.draw_ratio_warn, rep.draw_ratio_max);
            lines.push((1.0, DARK_GREY, "break 1".to_string()));
            lines
        },
        n + 0.5,
        n + 0.48,
        top * 0.01,
    )?;
    legend(&mut chart, SeriesLabelPosition::UpperLeft)
}

fn bars(rep: &RiskReport, area: &Area<'_>) -> Result<()> {
    let n = rep.passes.len() as f64;
    let top_pct = rep
        .passes
        .iter()
        .map(|p| 100.0 * (p.break_probability + 2.0 * p.break_standard_error))
        .fold(0.0, f64::max)
        .max(0.1)
        * 1.15;
    let mut chart = framed(
        area,
        "Break probability per pass (%, bar; whisker: +- 2 standard errors)",
        15,
        WIDE,
        0.5f64..n + 0.5,
        0f64..top_pct,
    )?;
    count_mesh(
        &mut chart,
        "step",
        "break probability, %",
        rep.passes.len() + 1,
        &|x| step_labels(rep, *x),
    )?;
    chart
        .draw_series(rep.passes.iter().enumerate().map(|(i, p)| {
            let x = (i + 1) as f64;
            bar(x, 100.0 * p.break_probability, OVER.mix(0.8).filled())
        }))
        .map_err(err)?;
    chart
        .draw_series(rep.passes.iter().enumerate().map(|(i, p)| {
            let x = (i + 1) as f64;
            let (lo, hi) = (
                (100.0 * (p.break_probability - 2.0 * p.break_standard_error)).max(0.0),
                100.0 * (p.break_probability + 2.0 * p.break_standard_error),
            );
            PathElement::new(vec![(x, lo), (x, hi)], BLACK.stroke_width(1))
        }))
        .map_err(err)?;
    Ok(())
}
