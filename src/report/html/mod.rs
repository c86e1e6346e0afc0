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

//!
//! Files: this one the neutral page and its stylesheet; `schedule.rs` a
//! checked schedule's sections (passes, methods, temperature and strength,
//! machine); `design.rs` the design page (runs, anneals with their windows,
//! die list); `fit.rs` the hardening-law fit page.

use coldpass::evaluation::Verdict;
use maud::{html, Markup, PreEscaped, DOCTYPE};

mod design;
mod fit;
mod schedule;

pub use design::design_page;
pub use fit::fit_page;
pub use schedule::{schedule_page, schedule_sections, step_status};

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

impl Table {
    /// A table of plain rows (no status tint) that does not start a page.
    pub fn plain(heading: String, header: Vec<String>, rows: Vec<Vec<String>>) -> Table {
        Table {
            heading,
            header,
            rows: rows
                .into_iter()
                .map(|cells| Row {
                    cells,
                    status: Status::None,
                })
                .collect(),
            page_break_before: false,
        }
    }
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
/* On screen the chart takes the page's width: drawn 960 px wide with its
   smallest text 9.7 px, it shows that text at 11 px or more from a 1100 px
   wide figure (a 1280-pixel window gives 12.6 px). */
.charts figure { width: 100%; }
figure { margin: 0; max-width: 100%; }
figure svg { width: 100%; max-width: 1400px; height: auto; display: block; }
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
  /* The tables beside the chart sit side by side where they fit; a caption
     or heading wraps to its chart's or table's width instead of widening it
     (width 0, then 100 % of what the figure or table makes it). */
  .rest { display: flex; flex-wrap: wrap; gap: 0 3mm; align-items: start; }
  .rest > section { width: fit-content; max-width: 100%; }
  .rest h2, figcaption { width: 0; min-width: 100%; }
  .charts figure { width: auto; }
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
