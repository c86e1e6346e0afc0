//! The report page (`--format html`): one self-contained HTML file to print and
//! pin beside the machine or send to a customer. It opens with the title and
//! what was planned (material, machine, method), then the summary, the pass
//! table (a flagged pass says so in words as well as colour), the charts inline
//! as SVG, the notes and the caution. A print stylesheet puts a 25-pass
//! schedule on at most two A4 or Letter landscape pages (checked in a real
//! browser by `tests/html_browser.rs`).
//!
//! Every text from a file (titles, labels, notes) goes through maud, which
//! escapes it; only the SVG charts, drawn by plotters (which escapes its own
//! text), are inserted as markup.
//!
//! Any report can use the page: build a [`Page`] (the neutral model: facts,
//! summary, tables with a [`Status`] per row, charts, notes, caution) and call
//! [`render`]. [`schedule_page`] fills one from a checked schedule, and
//! [`schedule_sections`] gives its parts for a report that adds its own
//! (as the design and fit pages do).

use anyhow::Result;
use coldpass::design::Design;
use coldpass::evaluation::{ScheduleReport, StepKind, StepReport, Verdict};
use coldpass::fit::FitReport;
use coldpass::schedule::ScheduleFile;
use maud::{html, Markup, PreEscaped, DOCTYPE};

use super::columns::{self, Column};
use super::units::{Quantity, Units};

/// How a row stands against the limits; shown by colour and by a word.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Status {
    /// Within every limit.
    Ok,
    /// Within the limits, with a warning.
    Warn,
    /// Over a limit.
    Over,
    /// Not a pass (an anneal, a heading row): no verdict.
    None,
}

impl Status {
    fn class(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::Warn => "warn",
            Status::Over => "over",
            Status::None => "none",
        }
    }

    /// The word printed in the row, so the page reads the same in black and white.
    pub fn word(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::Warn => "WARN",
            Status::Over => "OVER",
            Status::None => "",
        }
    }
}

impl From<Verdict> for Status {
    fn from(v: Verdict) -> Self {
        match v {
            Verdict::Ok => Status::Ok,
            Verdict::Warn => Status::Warn,
            Verdict::Over => Status::Over,
        }
    }
}

/// One table row.
#[derive(Debug, Clone)]
pub struct Row {
    /// The cells, as text (escaped when rendered).
    pub cells: Vec<String>,
    /// The row's standing; a status column is added when any row has one.
    pub status: Status,
}

/// A table with a heading.
#[derive(Debug, Clone)]
pub struct Table {
    /// Heading above the table.
    pub heading: String,
    /// Column headers (with their units).
    pub header: Vec<String>,
    /// Rows.
    pub rows: Vec<Row>,
    /// Whether the table starts a new printed page.
    pub page_break_before: bool,
}

/// A chart: an SVG document drawn by plotters, and a caption.
#[derive(Debug, Clone)]
pub struct Chart {
    /// Caption under the chart.
    pub caption: String,
    /// The SVG text (`<svg ...>...</svg>`).
    pub svg: String,
}

/// The neutral page: what any report shows, in the order it is shown.
#[derive(Debug, Clone)]
pub struct Page {
    /// Title (the schedule's, or what the page is).
    pub title: String,
    /// What the page is (`Schedule check`, `Schedule design`, `Hardening-law fit`).
    pub kind: String,
    /// Facts under the title: material, machine, method, source file.
    pub facts: Vec<(String, String)>,
    /// The overall verdict, shown as a banner, if the report has one.
    pub verdict: Option<(Status, String)>,
    /// The summary, first.
    pub summary: Vec<(String, String)>,
    /// Tables, the pass table first.
    pub tables: Vec<Table>,
    /// Charts.
    pub charts: Vec<Chart>,
    /// Notes.
    pub notes: Vec<String>,
    /// The caution, last and always.
    pub caution: String,
}

const STYLE: &str = r#"
:root { --ok:#1f77b4; --warn:#b36b00; --over:#c81e1e; --line:#bbb; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", Arial, sans-serif; font-size: 14px; margin: 16px; color: #111; max-width: 100%; }
header h1 { font-size: 1.5em; margin: 0 0 4px 0; }
header .kind { color: #555; font-size: .9em; margin: 0; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0 12px; margin: 6px 0; }
dl.facts dt { font-weight: bold; }
dl.facts dd { margin: 0; }
.verdict { padding: 6px 10px; margin: 8px 0; font-weight: bold; border-left: 6px solid; }
.verdict.ok { border-color: var(--ok); background: #eef5fb; }
.verdict.warn { border-color: var(--warn); background: #fff4e0; }
.verdict.over { border-color: var(--over); background: #fde8e8; }
h2 { font-size: 1.1em; margin: 14px 0 4px 0; }
table { border-collapse: collapse; margin: 4px 0; }
th, td { border: 1px solid var(--line); padding: 2px 5px; }
th { background: #eee; font-weight: bold; text-align: center; }
table.passes { font-size: 12.5px; }
table.passes th, table.passes td { padding: 1px 3px; }
@media (max-width: 1150px) { table.passes { font-size: 11px; } }
td.n { text-align: right; font-variant-numeric: tabular-nums; }
table.summary td:first-child { font-weight: bold; }
div.summary { display: flex; flex-wrap: wrap; gap: 0 16px; align-items: start; }
.wrap { max-width: 100%; overflow-x: auto; }
tr.warn td { background: #fff4e0; }
tr.over td { background: #fde8e8; }
tr.none td { color: #555; font-style: italic; }
td.status { font-weight: bold; }
tr.warn td.status { color: var(--warn); }
tr.over td.status { color: var(--over); }
.charts { display: flex; flex-wrap: wrap; gap: 8px; }
figure { margin: 0; max-width: 100%; }
figure svg { width: 100%; max-width: 720px; height: auto; display: block; }
figcaption { font-size: .85em; color: #444; }
ul.notes { margin: 2px 0; padding-left: 20px; }
footer.caution { margin-top: 12px; padding: 6px 10px; border: 2px solid #333; font-weight: bold; }
@page { size: landscape; margin: 9mm; }
@media print {
  body { margin: 0; font-size: 8pt; }
  header h1 { font-size: 12pt; }
  h2 { font-size: 9pt; margin: 5px 0 2px 0; }
  dl.facts { margin: 2px 0; }
  .verdict { padding: 2px 6px; margin: 3px 0; }
  table, table.passes { font-size: 7pt; }
  th, td, table.passes th, table.passes td { padding: 0 3px; }
  .wrap { overflow: visible; }
  .pagebreak { break-before: page; }
  table.summary { float: none; }
  tr { break-inside: avoid; }
  .second { display: grid; grid-template-columns: auto 1fr; gap: 4mm; align-items: start; }
  .charts { flex-direction: column; flex-wrap: nowrap; }
  figure svg { width: auto; max-width: 100%; height: 100mm; }
  footer.caution { margin-top: 4px; padding: 2px 6px; }
  .verdict, tr.warn td, tr.over td { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
"#;

fn facts(facts: &[(String, String)]) -> Markup {
    html! {
        @if !facts.is_empty() {
            dl.facts {
                @for (k, v) in facts { dt { (k) } dd { (v) } }
            }
        }
    }
}

/// Whether a cell holds a figure: a number, `-`, or a number marked ` *`
/// (the catalogue's speed the machine allows).
fn is_figure(s: &str) -> bool {
    let t = s.trim();
    let t = t.strip_suffix(" *").unwrap_or(t);
    t == "-" || (!t.is_empty() && t.parse::<f64>().is_ok())
}

/// Per column, whether it is right-aligned: every cell that is not empty is
/// a figure. A column of words with a figure here and there (a summary's
/// values) stays left-aligned, so it reads as one column.
fn figure_columns(t: &Table) -> Vec<bool> {
    let n = t.rows.iter().map(|r| r.cells.len()).max().unwrap_or(0);
    (0..n)
        .map(|i| {
            let mut cells = t
                .rows
                .iter()
                .filter_map(|r| r.cells.get(i))
                .filter(|c| !c.trim().is_empty())
                .peekable();
            cells.peek().is_some() && cells.all(|c| is_figure(c))
        })
        .collect()
}

fn table(t: &Table) -> Markup {
    let with_status = t.rows.iter().any(|r| r.status != Status::None);
    let figures = figure_columns(t);
    html! {
        section class=[t.page_break_before.then_some("pagebreak")] {
            h2 { (t.heading) }
            div.wrap {
                table.passes {
                    thead { tr {
                        @for h in &t.header { th { (h) } }
                        @if with_status { th { "status" } }
                    } }
                    tbody {
                        @for r in &t.rows {
                            tr class=[with_status.then_some(r.status.class())] {
                                @for (i, c) in r.cells.iter().enumerate() {
                                    td class=[figures.get(i).copied().unwrap_or(false).then_some("n")] { (c) }
                                }
                                @if with_status { td.status { (r.status.word()) } }
                            }
                        }
                    }
                }
            }
        }
    }
}

/// Renders a page as one self-contained HTML document (no outside file, font
/// or script).
pub fn render(p: &Page) -> String {
    let doc = html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                meta name="generator" content=(concat!("coldpass ", env!("CARGO_PKG_VERSION")));
                title { (p.title) " - " (p.kind) }
                style { (PreEscaped(STYLE)) }
            }
            body {
                header {
                    h1 { (p.title) }
                    p.kind { (p.kind) }
                    (facts(&p.facts))
                }
                @if let Some((status, words)) = &p.verdict {
                    div class={ "verdict " (status.class()) } { (words) }
                }
                @if !p.summary.is_empty() {
                    section {
                        h2 { "Summary" }
                        // Two halves side by side, to keep the first page for the passes.
                        div.summary {
                            @for half in p.summary.chunks(p.summary.len().div_ceil(2)) {
                                table.summary { tbody {
                                    @for (k, v) in half { tr { td { (k) } td { (v) } } }
                                } }
                            }
                        }
                    }
                }
                @if let Some(first) = p.tables.first() {
                    (table(first))
                }
                @if !p.charts.is_empty() || p.tables.len() > 1 {
                    div.second.pagebreak[!p.tables.is_empty()] {
                        @if !p.charts.is_empty() { (charts(&p.charts)) }
                        div.rest {
                            @for t in p.tables.iter().skip(1) { (table(t)) }
                        }
                    }
                }
                @if !p.notes.is_empty() {
                    section {
                        h2 { "Notes" }
                        ul.notes { @for n in &p.notes { li { (n) } } }
                    }
                }
                footer.caution { "Caution: " (p.caution) }
            }
        }
    };
    doc.into_string()
}

fn charts(charts: &[Chart]) -> Markup {
    html! {
        section.charts {
            @for c in charts {
                figure {
                    (PreEscaped(c.svg.as_str()))
                    figcaption { (c.caption) }
                }
            }
        }
    }
}

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
                super::fixed(
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
    let svg = String::from_utf8(super::svg::schedule_in(rep, file, units)?)?;
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
            format!("Verdict: {}", super::table::verdict_words(rep.summary.verdict)),
        )),
        summary: super::table::summary_rows(rep, units),
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
        .chain(super::machine::html_tables(rep, units))
        .collect(),
        charts: vec![Chart {
            caption: "Draw ratio per pass against the warn and max lines; flow stress against the total strain drawn, with each pass and anneal marked.".to_string(),
            svg,
        }],
        notes: rep.notes.clone(),
        caution: rep.caution.clone(),
    })
}

/// The page of a checked schedule.
pub fn schedule_page(rep: &ScheduleReport, file: &ScheduleFile, units: Units) -> Result<String> {
    Ok(render(&schedule_sections(rep, file, units)?))
}

/// The page of a design: the schedule's page with the design's facts, its
/// runs between anneals and why each anneal is there.
pub fn design_page(d: &Design, units: Units) -> Result<String> {
    let mut page = schedule_sections(&d.report, &d.schedule, units)?;
    let s = &d.summary;
    page.kind = "Schedule design".to_string();
    page.facts.push((
        "Design".to_string(),
        super::design::summary(d, units)
            .lines()
            .take_while(|l| !l.trim().is_empty())
            .collect::<Vec<_>>()
            .join("; ")
            .trim_start_matches("Design: ")
            .to_string(),
    ));
    let len = |mm: f64| {
        super::fixed(
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

/// The page of a hardening-law fit: the record, the fits ranked, the chart,
/// warnings and the caution.
pub fn fit_page(r: &FitReport, src: &super::fit::Source, units: Units) -> Result<String> {
    let opt = |v: Option<f64>, d: usize| super::fixed(v.filter(|x| x.is_finite()), d);
    let su = Quantity::Stress.label(units);
    let stress = |v: Option<f64>, d: usize| {
        super::fixed(
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
                            .map(|g| g * 1000.0 / super::units::MPA_PER_KSI / 1000.0),
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
                    .map(|p| super::fit::param_text(p.name, p.value, p.std_error, " ± ", units))
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
            header: super::fit::law_header(r.reach_strain, units),
            rows,
            page_break_before: false,
        }],
        charts: vec![Chart {
            caption: "The record and every fitted law.".to_string(),
            svg: super::fit::svg(r, src, units)?,
        }],
        notes: r.warnings.iter().map(ToString::to_string).collect(),
        caution: super::fit::CAUTION
            .trim_start_matches("Caution: ")
            .to_string(),
    };
    Ok(render(&page))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn page(title: &str) -> Page {
        Page {
            title: title.to_string(),
            kind: "test".into(),
            facts: vec![("Material".into(), "<b>bold</b> & co".into())],
            verdict: Some((Status::Over, "over".into())),
            summary: vec![("k".into(), "v".into())],
            tables: vec![Table {
                heading: "Passes".into(),
                header: vec!["step".into()],
                rows: vec![Row {
                    cells: vec!["1".into()],
                    status: Status::Over,
                }],
                page_break_before: false,
            }],
            charts: vec![],
            notes: vec!["<script>alert(2)</script>".into()],
            caution: "take care".into(),
        }
    }

    #[test]
    fn user_text_is_escaped() {
        let html = render(&page("<script>alert(1)</script>"));
        assert!(!html.contains("<script>"), "{html}");
        assert!(html.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
        assert!(html.contains("&lt;b&gt;bold&lt;/b&gt; &amp; co"));
    }

    #[test]
    fn flagged_rows_carry_a_word_and_the_caution_is_last() {
        let html = render(&page("t"));
        assert!(html.contains(r#"<tr class="over">"#), "{html}");
        assert!(html.contains(r#"<td class="status">OVER</td>"#), "{html}");
        let caution = html.find("Caution: take care").expect("caution");
        assert!(caution > html.find("Passes").unwrap());
    }
}
