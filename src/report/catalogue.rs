//! The catalogue: one summary row per product (`coldpass check` given several
//! files or a folder), in every format. Keys are the check JSON's summary
//! keys where there is one (`verdict`, `draw_passes`, `anneals`,
//! `worst_draw_ratio`, `worst_step`, `throughput_t_per_shift`,
//! `total_power_kw`), plus `file`, `title`, `finish_speed_m_s` (the exit
//! speed of the last draw) and `error` (why a file could not be checked).
//! The table leaves the titles to JSON, YAML and CSV so that it stays narrow.

use anyhow::{anyhow, Result};
use coldpass::evaluation::{ScheduleReport, StepKind};
use serde::Serialize;
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Style, Width};

use super::units::{Quantity, Units};
use super::{fixed, Format, Look};

/// The caution on every catalogue.
const CAUTION: &str = "Planning estimates only: confirm every figure by trial; the machine maker's limits, local codes and licensed practice govern.";

/// One product's row.
#[derive(Debug, Clone, Serialize)]
pub struct Product {
    /// The file as given.
    pub file: String,
    /// The schedule's title.
    pub title: String,
    /// `ok`, `warn`, `over`, or `error` when the file could not be checked.
    pub verdict: String,
    /// Draw passes.
    pub draw_passes: Option<usize>,
    /// Anneals.
    pub anneals: Option<usize>,
    /// Largest draw ratio.
    pub worst_draw_ratio: Option<f64>,
    /// Its step.
    pub worst_step: Option<usize>,
    /// Exit speed of the last draw, m/s (none without a `line` block).
    pub finish_speed_m_s: Option<f64>,
    /// Tonnes per shift (none without a `line` block).
    pub throughput_t_per_shift: Option<f64>,
    /// Sum of the pass powers, kW.
    pub total_power_kw: Option<f64>,
    /// Why the file could not be checked.
    pub error: Option<String>,
    /// Whether the product is over a limit (exit status 3).
    #[serde(skip)]
    pub over: bool,
}

impl Product {
    /// The row of a checked schedule.
    pub fn checked(file: String, rep: &ScheduleReport) -> Self {
        let s = &rep.summary;
        Product {
            file,
            title: rep.title.clone(),
            verdict: serde_json::to_value(s.verdict)
                .ok()
                .and_then(|v| v.as_str().map(str::to_string))
                .unwrap_or_default(),
            draw_passes: Some(s.draw_passes),
            anneals: Some(s.anneals),
            worst_draw_ratio: s.worst_draw_ratio,
            worst_step: s.worst_step,
            finish_speed_m_s: rep
                .passes
                .iter()
                .rev()
                .find(|r| r.kind == StepKind::Draw)
                .and_then(|r| r.exit_speed_m_s),
            throughput_t_per_shift: s.throughput_t_per_shift,
            total_power_kw: s.total_power_kw,
            error: None,
            over: rep.is_over(),
        }
    }

    /// The row of a file that could not be checked.
    pub fn failed(file: String, error: String) -> Self {
        Product {
            file,
            title: String::new(),
            verdict: "error".into(),
            draw_passes: None,
            anneals: None,
            worst_draw_ratio: None,
            worst_step: None,
            finish_speed_m_s: None,
            throughput_t_per_shift: None,
            total_power_kw: None,
            error: Some(error),
            over: false,
        }
    }
}

#[derive(Serialize)]
struct Whole<'a> {
    products: &'a [Product],
    caution: &'static str,
}

const KEYS: [&str; 12] = [
    "file",
    "title",
    "verdict",
    "draw_passes",
    "anneals",
    "worst_draw_ratio",
    "worst_step",
    "finish_speed_m_s",
    "throughput_t_per_shift",
    "total_power_kw",
    "error",
    "caution",
];

fn n<T: ToString>(x: Option<T>) -> String {
    x.map(|v| v.to_string()).unwrap_or_default()
}

fn cells(p: &Product, units: Units) -> Vec<String> {
    let speed = p
        .finish_speed_m_s
        .map(|v| Quantity::Speed.convert(v, units));
    let power = p.total_power_kw.map(|v| Quantity::Power.convert(v, units));
    vec![
        p.file.clone(),
        p.verdict.clone(),
        n(p.draw_passes),
        n(p.anneals),
        fixed(p.worst_draw_ratio, 3),
        n(p.worst_step),
        fixed(speed, Quantity::Speed.decimals(2, units)),
        fixed(p.throughput_t_per_shift, 1),
        fixed(power, 1),
    ]
}

fn headers(units: Units) -> Vec<String> {
    vec![
        "file".into(),
        "verdict".into(),
        "draw passes".into(),
        "anneals".into(),
        "worst draw ratio".into(),
        "worst step".into(),
        format!("finish speed {}", Quantity::Speed.label(units)),
        "t per shift".into(),
        format!("total power {}", Quantity::Power.label(units)),
    ]
}

/// Renders the catalogue in `format`.
pub fn render(products: &[Product], format: Format, look: &Look) -> Result<Vec<u8>> {
    let units = look.table.units;
    Ok(match format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&Whole {
                products,
                caution: CAUTION,
            })?;
            s.push('\n');
            s.into_bytes()
        }
        Format::Yaml => serde_yaml::to_string(&Whole {
            products,
            caution: CAUTION,
        })?
        .into_bytes(),
        Format::Csv => {
            let mut w = csv::Writer::from_writer(Vec::new());
            w.write_record(KEYS)?;
            for p in products {
                w.write_record([
                    p.file.clone(),
                    p.title.clone(),
                    p.verdict.clone(),
                    n(p.draw_passes),
                    n(p.anneals),
                    n(p.worst_draw_ratio.map(super::csv::sig)),
                    n(p.worst_step),
                    n(p.finish_speed_m_s.map(super::csv::sig)),
                    n(p.throughput_t_per_shift.map(super::csv::sig)),
                    n(p.total_power_kw.map(super::csv::sig)),
                    p.error.clone().unwrap_or_default(),
                    CAUTION.to_string(),
                ])?;
            }
            w.into_inner().map_err(|e| anyhow!("{e}"))?
        }
        Format::Table => {
            let mut b = Builder::default();
            b.push_record(headers(units).into_iter().map(|h| h.replace(' ', "\n")));
            for p in products {
                b.push_record(cells(p, units));
            }
            let mut t = b.build();
            t.with(Style::sharp());
            t.modify(Columns::new(2..), Alignment::right());
            t.with(
                Width::wrap(look.table.width)
                    .keep_words(true)
                    .priority(PriorityMax::right()),
            );
            let mut out = format!("Catalogue: {} products\n{t}\n", products.len());
            let errors: Vec<&Product> = products.iter().filter(|p| p.error.is_some()).collect();
            if !errors.is_empty() {
                out.push_str("\nCould not be checked\n");
                for p in errors {
                    out.push_str(&super::table::wrap(
                        &format!("- {}", p.error.as_deref().unwrap_or_default()),
                        look.table.width,
                        "  ",
                    ));
                    out.push('\n');
                }
            }
            out.push('\n');
            out.push_str(&super::table::wrap(
                &format!("Caution: {CAUTION}"),
                look.table.width,
                "",
            ));
            out.push('\n');
            out.into_bytes()
        }
        Format::Html => {
            use super::html::{Page, Row, Status, Table};
            let page = Page {
                title: format!("Catalogue of {} products", products.len()),
                kind: "Catalogue".into(),
                facts: vec![],
                verdict: None,
                summary: vec![],
                tables: vec![Table {
                    heading: "Products".into(),
                    header: headers(units),
                    rows: products
                        .iter()
                        .map(|p| Row {
                            cells: cells(p, units),
                            status: match p.verdict.as_str() {
                                "ok" => Status::Ok,
                                "warn" => Status::Warn,
                                _ => Status::Over,
                            },
                        })
                        .collect(),
                    page_break_before: false,
                }],
                charts: vec![],
                notes: products.iter().filter_map(|p| p.error.clone()).collect(),
                caution: CAUTION.into(),
            };
            super::html::render(&page).into_bytes()
        }
    })
}
