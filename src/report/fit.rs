//! Report formats for `coldpass fit`: a table for people, JSON / YAML / CSV
//! for programs, an SVG chart, and the `flow:` block for a schedule file.
//! Every format uses the same keys and carries the caution line.

use std::collections::BTreeMap;
use std::fmt::Write as _;

use anyhow::{Context, Result};
use plotters::prelude::*;
use serde::Serialize;
use tabled::builder::Builder;
use tabled::settings::Style;

use coldpass::fit::{DataKind, FitLaw, FitReport, LawFit};
use coldpass::FlowLaw;

/// The caution every report carries.
pub const CAUTION: &str = "Caution: fitted laws describe this record only; figures are planning estimates to confirm by trial; follow the machine maker's limits, local codes and licensed practice.";

/// Where the record came from, for headings.
pub struct Source {
    /// The file as given.
    pub file: String,
    /// How its columns were read.
    pub columns: String,
}

/// Parameter keys in the order of the CSV columns.
const PARAM_KEYS: [&str; 8] = [
    "yield_mpa",
    "hardening_modulus_mpa",
    "k_mpa",
    "n",
    "sigma0_mpa",
    "eps0",
    "saturation_mpa",
    "eps_c",
];

fn finite(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

fn data_name(d: DataKind) -> &'static str {
    match d {
        DataKind::Engineering => "engineering",
        DataKind::True => "true",
    }
}

#[derive(Serialize)]
struct FitOut {
    law: &'static str,
    strain: &'static str,
    params: BTreeMap<&'static str, Option<f64>>,
    std_errors: BTreeMap<&'static str, Option<f64>>,
    points: usize,
    rms_mpa: Option<f64>,
    r2: Option<f64>,
    aic: Option<f64>,
    converged: bool,
    iterations: usize,
    schedule_law: Option<&'static str>,
    uts_mpa: Option<f64>,
    stress_at_reach_mpa: Option<f64>,
}

#[derive(Serialize)]
struct ReportOut<'a> {
    file: &'a str,
    columns: &'a str,
    data: &'static str,
    points_read: usize,
    youngs_modulus_gpa: Option<f64>,
    toe_strain: Option<f64>,
    yield_mpa: Option<f64>,
    uts_mpa: Option<f64>,
    uniform_strain: Option<f64>,
    fitted_points: usize,
    strain_from: f64,
    strain_to: f64,
    reach_strain: Option<f64>,
    fits: Vec<FitOut>,
    best: Option<&'static str>,
    warnings: Vec<String>,
    caution: &'static str,
}

fn fit_out(f: &LawFit) -> FitOut {
    FitOut {
        law: f.law.name(),
        strain: if f.law.is_total_strain_form() {
            "total"
        } else {
            "plastic"
        },
        params: f.params.iter().map(|p| (p.name, finite(p.value))).collect(),
        std_errors: f
            .params
            .iter()
            .map(|p| (p.name, p.std_error.and_then(finite)))
            .collect(),
        points: f.points,
        rms_mpa: finite(f.rms_mpa),
        r2: finite(f.r2),
        aic: finite(f.aic),
        converged: f.converged,
        iterations: f.iterations,
        schedule_law: f.flow_law.as_ref().map(FlowLaw::name),
        uts_mpa: f.uts_mpa.and_then(finite),
        stress_at_reach_mpa: f.stress_at_reach_mpa.and_then(finite),
    }
}

fn report_out<'a>(r: &FitReport, src: &'a Source) -> ReportOut<'a> {
    ReportOut {
        file: &src.file,
        columns: &src.columns,
        data: data_name(r.data),
        points_read: r.points_read,
        youngs_modulus_gpa: r.youngs_modulus_gpa,
        toe_strain: r.toe_strain,
        yield_mpa: r.yield_mpa,
        uts_mpa: r.uts_mpa,
        uniform_strain: r.uniform_strain,
        fitted_points: r.plastic_strain.len(),
        strain_from: r.strain_from(),
        strain_to: r.strain_to(),
        reach_strain: r.reach_strain,
        fits: r.fits.iter().map(fit_out).collect(),
        best: r.best.map(FitLaw::name),
        warnings: r.warnings.iter().map(ToString::to_string).collect(),
        caution: CAUTION,
    }
}

/// JSON: `fits[]` with `law`, `params`, `std_errors`, `rms_mpa`, `r2`, `aic`,
/// `converged`, ...; `best`, `youngs_modulus_gpa`, `yield_mpa`, `uts_mpa`,
/// `uniform_strain`, `warnings`, `caution`.
pub fn json(r: &FitReport, src: &Source) -> Result<String> {
    let mut s = serde_json::to_string_pretty(&report_out(r, src))?;
    s.push('\n');
    Ok(s)
}

/// YAML with the same keys as the JSON.
pub fn yaml(r: &FitReport, src: &Source) -> Result<String> {
    Ok(serde_yaml::to_string(&report_out(r, src))?)
}

/// A number to `digits` significant figures, without exponent for everyday sizes.
fn sig(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return "-".into();
    }
    if v == 0.0 {
        return "0".into();
    }
    let mag = v.abs().log10().floor() as i32;
    let decimals = (digits as i32 - 1 - mag).max(0) as usize;
    format!("{v:.decimals$}")
}

fn opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| "-".into(), |x| sig(x, digits))
}

/// The table for people.
pub fn table(r: &FitReport, src: &Source) -> String {
    let mut out = String::new();
    let _ = writeln!(out, "coldpass fit: {}", src.file);
    let _ = writeln!(out, "  columns: {}", src.columns);
    let _ = writeln!(
        out,
        "  {} points read; {} fitted, true plastic strain {} to {} ({})",
        r.points_read,
        r.plastic_strain.len(),
        sig(r.strain_from(), 3),
        sig(r.strain_to(), 3),
        match r.data {
            DataKind::Engineering => "0.2 % offset yield to maximum load",
            DataKind::True => "true data as given",
        }
    );
    if r.data == DataKind::Engineering {
        let _ = writeln!(
            out,
            "  Young's modulus {} GPa | 0.2 % offset yield {} MPa | UTS {} MPa | uniform strain {} (true plastic, at maximum load)",
            opt(r.youngs_modulus_gpa, 4),
            opt(r.yield_mpa, 4),
            opt(r.uts_mpa, 4),
            opt(r.uniform_strain, 3),
        );
    }
    let _ = writeln!(out);
    let mut b = Builder::default();
    let reach = r
        .reach_strain
        .map_or("stress MPa at reach strain".to_string(), |x| {
            format!("stress MPa at strain {}", sig(x, 3))
        });
    b.push_record([
        "law".to_string(),
        "parameters ± std error".to_string(),
        "RMS MPa".to_string(),
        "R^2".to_string(),
        "AIC".to_string(),
        "UTS from law MPa".to_string(),
        reach,
        "converged".to_string(),
    ]);
    for f in &r.fits {
        let mut name = f.law.name().to_string();
        if Some(f.law) == r.best {
            name.push_str(" (best)");
        }
        if f.law.is_total_strain_form() {
            name.push_str("\n(total strain)");
        }
        let params = f
            .params
            .iter()
            .map(|p| match p.std_error {
                Some(se) => format!("{} = {} ± {}", p.name, sig(p.value, 5), sig(se, 2)),
                None => format!("{} = {}", p.name, sig(p.value, 5)),
            })
            .collect::<Vec<_>>()
            .join("\n");
        let conv = match (f.converged, f.iterations) {
            (true, 0) => "yes (direct)".to_string(),
            (true, i) => format!("yes ({i} it.)"),
            (false, i) => format!("NO ({i} it.)"),
        };
        b.push_record([
            name,
            params,
            sig(f.rms_mpa, 3),
            format!("{:.5}", f.r2),
            format!("{:.1}", f.aic),
            opt(f.uts_mpa, 4),
            opt(f.stress_at_reach_mpa, 4),
            conv,
        ]);
    }
    let _ = writeln!(out, "{}", b.build().with(Style::sharp()));
    match r.best {
        Some(best) => {
            let _ = writeln!(
                out,
                "Best by AIC: {best} (among the six plastic-strain laws; the total-strain forms are for the record and not ranked)."
            );
        }
        None => {
            let _ = writeln!(out, "Best by AIC: none of the fits is a valid law.");
        }
    }
    if !r.warnings.is_empty() {
        let _ = writeln!(out, "\nWarnings:");
        for w in &r.warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    let _ = writeln!(out, "\n{CAUTION}");
    out
}

/// CSV: one row per fit with every parameter key as a column (empty where a
/// law has none) and its `_std_error` beside it; like the check and design
/// CSVs, every row carries the caution in its last column, `caution` (a `#`
/// line is not CSV and many readers stop at it).
pub fn csv(r: &FitReport, _src: &Source) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut head: Vec<String> = [
        "law",
        "strain",
        "best",
        "points",
        "rms_mpa",
        "r2",
        "aic",
        "converged",
        "iterations",
        "uts_mpa",
        "stress_at_reach_mpa",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    for k in PARAM_KEYS {
        head.push(k.to_string());
        head.push(format!("{k}_std_error"));
    }
    head.push("caution".to_string());
    w.write_record(&head)?;
    let num = |v: Option<f64>| v.and_then(finite).map_or(String::new(), |x| x.to_string());
    for f in &r.fits {
        let o = fit_out(f);
        let mut row = vec![
            o.law.to_string(),
            o.strain.to_string(),
            (Some(f.law) == r.best).to_string(),
            o.points.to_string(),
            num(o.rms_mpa),
            num(o.r2),
            num(o.aic),
            o.converged.to_string(),
            o.iterations.to_string(),
            num(o.uts_mpa),
            num(o.stress_at_reach_mpa),
        ];
        for k in PARAM_KEYS {
            row.push(num(o.params.get(k).copied().flatten()));
            row.push(num(o.std_errors.get(k).copied().flatten()));
        }
        row.push(CAUTION.to_string());
        w.write_record(&row)?;
    }
    Ok(String::from_utf8(w.into_inner().context("writing CSV")?)?)
}

/// The chosen law as a `flow:` block a schedule file can paste under
/// `material:`, parameters to 6 significant figures, with comment lines
/// naming the record, the fitted range and the caution.
pub fn law_yaml(r: &FitReport, law: FitLaw, src: &Source) -> Result<String> {
    let fit = r
        .fit(law)
        .with_context(|| format!("the law '{law}' was not fitted to this record"))?;
    let flow = fit.flow_law.as_ref().with_context(|| {
        format!("the fitted '{law}' parameters are not a valid law for a schedule")
    })?;
    let rounded = round_law(flow)?;
    #[derive(Serialize)]
    struct Block<'a> {
        flow: &'a FlowLaw,
    }
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# coldpass fit: {law}{} fitted to '{}' ({} points).",
        if Some(law) == r.best {
            " (best by AIC)"
        } else {
            ""
        },
        src.file,
        fit.points
    );
    let _ = writeln!(
        out,
        "# True plastic strain {} to {}; RMS {} MPa; R^2 {:.5}.",
        sig(r.strain_from(), 3),
        sig(r.strain_to(), 3),
        sig(fit.rms_mpa, 3),
        fit.r2
    );
    match r.reach_strain {
        Some(x) if x > r.strain_to() => {
            let _ = writeln!(
                out,
                "# A schedule reaching strain {} uses this law {:.1} times past the test: check it against drawn-wire strength.",
                sig(x, 3),
                x / r.strain_to()
            );
        }
        _ => {
            let _ = writeln!(
                out,
                "# Beyond strain {} this law is extrapolated: check it against drawn-wire strength.",
                sig(r.strain_to(), 3)
            );
        }
    }
    if law.is_total_strain_form() {
        let _ = writeln!(
            out,
            "# Written as `{}`: drawing neglects the elastic strain.",
            flow.name()
        );
    }
    let _ = writeln!(out, "# {CAUTION}");
    out.push_str(&serde_yaml::to_string(&Block { flow: &rounded })?);
    Ok(out)
}

/// The law with every number to 6 significant figures, validated again.
fn round_law(law: &FlowLaw) -> Result<FlowLaw> {
    let mut v = serde_yaml::to_value(law)?;
    if let serde_yaml::Value::Mapping(m) = &mut v {
        for (_, x) in m.iter_mut() {
            if let Some(f) = x.as_f64() {
                let r: f64 = sig(f, 6).parse().unwrap_or(f);
                *x = serde_yaml::Value::from(r);
            }
        }
    }
    serde_yaml::from_value(v).context("rounding the fitted law")
}

const COLOURS: [RGBColor; 8] = [
    RGBColor(120, 120, 120),
    RGBColor(140, 86, 75),
    RGBColor(31, 119, 180),
    RGBColor(255, 127, 14),
    RGBColor(44, 160, 44),
    RGBColor(214, 39, 40),
    RGBColor(148, 103, 189),
    RGBColor(23, 190, 207),
];

fn colour(law: FitLaw) -> RGBColor {
    let i = FitLaw::ALL.iter().position(|l| *l == law).unwrap_or(0);
    COLOURS[i % COLOURS.len()]
}

/// SVG chart: true stress against true plastic strain, the data and every
/// plastic-strain law; with a reach strain, a second panel runs each law out
/// to it, dashed past the end of the test.
pub fn svg(r: &FitReport, src: &Source) -> Result<String> {
    let mut buf = String::new();
    {
        let wide = r.reach_strain.is_some_and(|x| x > r.strain_to());
        let size = if wide { (1200, 620) } else { (760, 620) };
        // The caution in as many lines as the width needs, so none runs off the edge.
        let caution = wrap_words(CAUTION, (size.0 as usize - 32) / CAUTION_CHAR_PX);
        let foot_px = 14 + 16 * caution.len() as u32;
        let root = SVGBackend::with_string(&mut buf, size).into_drawing_area();
        root.fill(&WHITE).map_err(plot_err)?;
        let (top, rest) = root.split_vertically(44);
        let (body, foot) = rest.split_vertically(size.1 - 44 - foot_px);
        top.draw(&Text::new(
            format!("True stress vs true plastic strain: {}", src.file),
            (16, 14),
            ("sans-serif", 20).into_font(),
        ))
        .map_err(plot_err)?;
        for (i, line) in caution.iter().enumerate() {
            foot.draw(&Text::new(
                line.as_str(),
                (16, 6 + 16 * i as i32),
                ("sans-serif", 12).into_font().color(&RGBColor(90, 90, 90)),
            ))
            .map_err(plot_err)?;
        }
        let laws: Vec<&LawFit> = r
            .fits
            .iter()
            .filter(|f| !f.law.is_total_strain_form() && f.flow_law.is_some())
            .collect();
        if wide {
            let (left, right) = body.split_horizontally(size.0 / 2);
            panel(&left, r, &laws, r.strain_to() * 1.05, false)?;
            panel(&right, r, &laws, r.reach_strain.unwrap_or(1.0), true)?;
        } else {
            panel(&body, r, &laws, r.strain_to() * 1.05, false)?;
        }
        root.present().map_err(plot_err)?;
    }
    Ok(buf)
}

/// A generous width of one character of the 12-point caution, px (the
/// drawn font is narrower; this leaves room for a wider one).
const CAUTION_CHAR_PX: usize = 6;

/// `text` broken at spaces into lines of at most `width` characters (a
/// longer word stands alone on its line).
fn wrap_words(text: &str, width: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    for word in text.split_whitespace() {
        match lines.last_mut() {
            Some(line) if line.chars().count() + 1 + word.chars().count() <= width => {
                line.push(' ');
                line.push_str(word);
            }
            _ => lines.push(word.to_string()),
        }
    }
    lines
}

/// Fewest pixels between the centres of two data dots drawn: closer points
/// are left out so that each dot drawn can be seen.
const DOT_GAP_PX: i32 = 10;

fn plot_err<E: std::fmt::Debug>(e: E) -> anyhow::Error {
    anyhow::anyhow!("drawing the chart: {e:?}")
}

fn panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    r: &FitReport,
    laws: &[&LawFit],
    x_max: f64,
    reach: bool,
) -> Result<()>
where
    DB::ErrorType: 'static,
{
    let end = r.strain_to();
    let samples = 240;
    let curve = |f: &LawFit, a: f64, b: f64| -> Vec<(f64, f64)> {
        let law = f.flow_law.as_ref();
        (0..=samples)
            .map(|i| {
                let x = a + (b - a) * i as f64 / samples as f64;
                (x, law.map_or(0.0, |l| l.stress_mpa(x)))
            })
            .collect()
    };
    let x0 = if reach {
        0.0
    } else {
        r.strain_from().min(end) * 0.0
    };
    let mut y_max = r.true_stress_mpa.iter().copied().fold(0.0, f64::max);
    if reach {
        // Scale to the hardening laws; the straight line runs off the top
        // (its label in the legend says so by its absence beyond the edge).
        for f in laws.iter().filter(|f| f.law != FitLaw::Linear) {
            if let Some(s) = f.stress_at_reach_mpa {
                y_max = y_max.max(s);
            }
        }
    }
    let y_max = (y_max * 1.12).max(1.0);
    let curve = |f: &LawFit, a: f64, b: f64| -> Vec<(f64, f64)> {
        curve(f, a, b)
            .into_iter()
            .take_while(|p| p.1 <= y_max)
            .collect()
    };
    let caption = if reach {
        format!(
            "Run out to the schedule's strain {} (dashed past the test)",
            sig(x_max, 3)
        )
    } else {
        "Fitted range: data (dots) and laws".to_string()
    };
    let mut chart = ChartBuilder::on(area)
        .caption(caption, ("sans-serif", 16))
        .margin(12)
        // room for the half of the last x tick label that lies past the axis end
        .margin_right(30)
        .x_label_area_size(44)
        .y_label_area_size(62)
        .build_cartesian_2d(x0..x_max, 0.0..y_max)
        .map_err(plot_err)?;
    chart
        .configure_mesh()
        .x_desc("true plastic strain")
        .y_desc("true stress, MPa")
        .y_label_formatter(&|v| format!("{v:.0}"))
        .label_style(("sans-serif", 13))
        .axis_desc_style(("sans-serif", 15))
        .light_line_style(RGBColor(236, 236, 236))
        .draw()
        .map_err(plot_err)?;
    for f in laws {
        let c = colour(f.law);
        let style = ShapeStyle::from(&c).stroke_width(2);
        let solid_to = end.min(x_max);
        let label = if Some(f.law) == r.best {
            format!("{} (best)", f.law)
        } else {
            f.law.to_string()
        };
        chart
            .draw_series(LineSeries::new(curve(f, 0.0, solid_to), style))
            .map_err(plot_err)?
            .label(label)
            .legend(move |(x, y)| {
                PathElement::new(
                    vec![(x, y), (x + 20, y)],
                    ShapeStyle::from(&c).stroke_width(2),
                )
            });
        if reach && x_max > end {
            chart
                .draw_series(DashedLineSeries::new(curve(f, end, x_max), 8, 5, style))
                .map_err(plot_err)?;
        }
    }
    // The data over the laws, a white rim round each dot so that it stands
    // out on a curve, thinned to one dot per few pixels along the record.
    let mut dots = Vec::new();
    let mut last: Option<(i32, i32)> = None;
    for (&x, &y) in r.plastic_strain.iter().zip(&r.true_stress_mpa) {
        if !(x0..=x_max).contains(&x) || !(0.0..=y_max).contains(&y) {
            continue;
        }
        let at = chart.backend_coord(&(x, y));
        let far = last.is_none_or(|(lx, ly)| {
            let (dx, dy) = (at.0 - lx, at.1 - ly);
            dx * dx + dy * dy >= DOT_GAP_PX * DOT_GAP_PX
        });
        if far {
            dots.push((x, y));
            last = Some(at);
        }
    }
    let ink = RGBColor(20, 20, 20);
    let label = if dots.len() < r.plastic_strain.len() {
        format!(
            "data ({} points, {} drawn)",
            r.plastic_strain.len(),
            dots.len()
        )
    } else {
        format!("data ({} points)", r.plastic_strain.len())
    };
    chart
        .draw_series(dots.iter().map(|&p| {
            EmptyElement::at(p)
                + Circle::new((0, 0), 3, WHITE.filled())
                + Circle::new((0, 0), 2, ink.filled())
        }))
        .map_err(plot_err)?
        .label(label)
        .legend(move |(x, y)| {
            EmptyElement::at((x + 10, y))
                + Circle::new((0, 0), 3, WHITE.filled())
                + Circle::new((0, 0), 2, ink.filled())
        });
    if reach {
        let grey = ShapeStyle::from(&RGBColor(60, 60, 60)).stroke_width(1);
        chart
            .draw_series(DashedLineSeries::new(
                vec![(end, 0.0), (end, y_max)],
                3,
                3,
                grey,
            ))
            .map_err(plot_err)?;
        chart
            .draw_series(std::iter::once(Text::new(
                format!(" end of test, {}", sig(end, 3)),
                (end, y_max * 0.04),
                ("sans-serif", 13).into_font(),
            )))
            .map_err(plot_err)?;
    }
    chart
        .configure_series_labels()
        .position(if reach {
            SeriesLabelPosition::UpperLeft
        } else {
            SeriesLabelPosition::LowerRight
        })
        .background_style(WHITE.mix(0.85))
        .border_style(RGBColor(180, 180, 180))
        .label_font(("sans-serif", 13))
        .draw()
        .map_err(plot_err)?;
    Ok(())
}
