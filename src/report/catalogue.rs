//! The catalogue: one summary row per product (`coldpass check` given several
//! files or a folder), in every format. Keys are the check JSON's summary
//! keys where there is one (`verdict`, `draw_passes`, `anneals`,
//! `worst_draw_ratio`, `worst_step`, `throughput_t_per_shift`,
//! `attainable_speed_m_s`, `attainable_t_per_shift`, `total_power_kw`), plus `file`, `title`, `finish_speed_m_s` (the exit
//! speed of the last draw) and `error` (why a file could not be checked).
//! The table leaves the titles to JSON, YAML and CSV so that it stays narrow.

use anyhow::{anyhow, Result};
use coldpass::evaluation::{ScheduleReport, StepKind};
use serde::Serialize;

use super::units::{Quantity, Units};
use super::{fixed, Format, Look};

/// What the `*` on a speed means, and at which speed the power is.
const SPEED_NOTE: &str = "* at the speed the machine allows (attainable_speed_m_s); others at \
     line.finish_speed_m_s. Total power is at the speed the schedule is checked at: \
     line.finish_speed_m_s when the file gives one, else the attainable speed";

/// The caution on every catalogue: the check report's own, safety words
/// included (a catalogue is read on the shop floor as much as one check).
const CAUTION: &str = coldpass::evaluation::CAUTION;

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
    /// Highest finish speed the machine allows, m/s (with a machine).
    pub attainable_speed_m_s: Option<f64>,
    /// Tonnes per shift at that speed (with a machine).
    pub attainable_t_per_shift: Option<f64>,
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
            attainable_speed_m_s: s.attainable_speed_m_s,
            attainable_t_per_shift: s.attainable_t_per_shift,
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
            attainable_speed_m_s: None,
            attainable_t_per_shift: None,
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

const KEYS: [&str; 14] = [
    "file",
    "title",
    "verdict",
    "draw_passes",
    "anneals",
    "worst_draw_ratio",
    "worst_step",
    "finish_speed_m_s",
    "throughput_t_per_shift",
    "attainable_speed_m_s",
    "attainable_t_per_shift",
    "total_power_kw",
    "error",
    "caution",
];

fn n<T: ToString>(x: Option<T>) -> String {
    x.map(|v| v.to_string()).unwrap_or_default()
}

fn cells(p: &Product, units: Units) -> Vec<String> {
    // With a machine, the speed and tonnes it allows (marked *); else the line's.
    let on_machine = p.attainable_speed_m_s.is_some();
    let speed = p
        .attainable_speed_m_s
        .or(p.finish_speed_m_s)
        .map(|v| Quantity::Speed.convert(v, units));
    let tonnes = if on_machine {
        p.attainable_t_per_shift
    } else {
        p.throughput_t_per_shift
    };
    let mark = |s: String| if on_machine { format!("{s} *") } else { s };
    let power = p.total_power_kw.map(|v| Quantity::Power.convert(v, units));
    // The file's name only, to keep the table narrow (the path is in JSON and CSV).
    let name = std::path::Path::new(&p.file)
        .file_name()
        .map_or_else(|| p.file.clone(), |n| n.to_string_lossy().into_owned());
    vec![
        name,
        p.verdict.clone(),
        n(p.draw_passes),
        n(p.anneals),
        fixed(p.worst_draw_ratio, 3),
        n(p.worst_step),
        mark(fixed(speed, Quantity::Speed.decimals(2, units))),
        mark(fixed(tonnes, 1)),
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
        format!("speed {}", Quantity::Speed.label(units)),
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
                    n(p.attainable_speed_m_s.map(super::csv::sig)),
                    n(p.attainable_t_per_shift.map(super::csv::sig)),
                    n(p.total_power_kw.map(super::csv::sig)),
                    p.error.clone().unwrap_or_default(),
                    CAUTION.to_string(),
                ])?;
            }
            w.into_inner().map_err(|e| anyhow!("{e}"))?
        }
        Format::Table => {
            // Cut into panels led by the file's name when wider than the terminal.
            let t = super::table::build(
                headers(units)
                    .iter()
                    .map(|h| super::table::stack(h))
                    .collect(),
                products.iter().map(|p| cells(p, units)).collect(),
                Some(look.table.width),
                &[1],
            );
            let mut out = format!("Catalogue: {} products\n{t}\n", products.len());
            if products.iter().any(|p| p.attainable_speed_m_s.is_some()) {
                out.push_str(&super::table::wrap(SPEED_NOTE, look.table.width, "  "));
                out.push('\n');
            }
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
                notes: products
                    .iter()
                    .filter_map(|p| p.error.clone())
                    .chain(
                        products
                            .iter()
                            .any(|p| p.attainable_speed_m_s.is_some())
                            .then(|| SPEED_NOTE.to_string()),
                    )
                    .collect(),
                caution: CAUTION.into(),
            };
            super::html::render(&page).into_bytes()
        }
    })
}
