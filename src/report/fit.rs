//! Report formats for `coldpass fit`: a table for people, JSON / YAML / CSV
//! for programs, an SVG chart, and the `flow:` block for a schedule file.
//! Every format uses the same keys and carries the caution line.

use std::collections::BTreeMap;
use std::fmt::Write as _;

use anyhow::{Context, Result};
use plotters::prelude::*;
use serde::Serialize;

use super::table::{build, stack, terminal_width, wrap_long_lines};
use super::units::{Quantity, Units, MPA_PER_KSI};

use coldpass::fit::{self, DataKind, FitLaw, FitReport, LawFit, Scatter, Yielding};
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
    #[serde(skip_serializing_if = "Vec::is_empty")]
    not_finite: Vec<String>,
}

#[derive(Serialize)]
struct ReportOut<'a> {
    file: &'a str,
    columns: &'a str,
    data: &'static str,
    points_read: usize,
    youngs_modulus_gpa: Option<f64>,
    youngs_modulus_std_error_gpa: Option<f64>,
    modulus_band_mpa: Option<[f64; 2]>,
    modulus_points: Option<usize>,
    toe_strain: Option<f64>,
    yield_mpa: Option<f64>,
    yielding: Option<&'static str>,
    upper_yield_mpa: Option<f64>,
    lower_yield_mpa: Option<f64>,
    lueders_strain: Option<f64>,
    uts_mpa: Option<f64>,
    uniform_strain: Option<f64>,
    noise_mpa: Option<f64>,
    points_merged_or_dropped: usize,
    fitted_points: usize,
    strain_from: f64,
    strain_to: f64,
    flow_valid_to_strain: f64,
    reach_strain: Option<f64>,
    standard_errors: &'static str,
    fits: Vec<FitOut>,
    best: Option<&'static str>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    drawn_points: Vec<[f64; 2]>,
    #[serde(skip_serializing_if = "Vec::is_empty")]
    fits_with_drawn_points: Vec<FitOut>,
    #[serde(skip_serializing_if = "Option::is_none")]
    best_with_drawn_points: Option<&'static str>,
    warnings: Vec<String>,
    caution: &'static str,
}

/// What the standard errors assume, said beside them in every format.
pub const STD_ERROR_NOTE: &str = "standard errors assume the law is right and the residuals independent (see the warnings for where the record says otherwise)";

fn fit_out(f: &LawFit) -> FitOut {
    let mut not_finite = Vec::new();
    for p in &f.params {
        if !p.value.is_finite() {
            not_finite.push(format!("params.{}", p.name));
        }
        if p.std_error.is_some_and(|v| !v.is_finite()) {
            not_finite.push(format!("std_errors.{}", p.name));
        }
    }
    for (k, v) in [("rms_mpa", f.rms_mpa), ("r2", f.r2), ("aic", f.aic)] {
        if !v.is_finite() {
            not_finite.push(k.to_string());
        }
    }
    FitOut {
        not_finite,
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
        youngs_modulus_std_error_gpa: r.modulus.as_ref().map(|m| m.std_error_mpa / 1000.0),
        modulus_band_mpa: r.modulus.as_ref().map(|m| [m.band_mpa.0, m.band_mpa.1]),
        modulus_points: r.modulus.as_ref().map(|m| m.points),
        toe_strain: r.toe_strain,
        yield_mpa: r.yield_mpa,
        yielding: r.yielding.as_ref().map(|y| match y {
            Yielding::Continuous { .. } => "continuous",
            Yielding::Discontinuous { .. } => "discontinuous",
        }),
        upper_yield_mpa: match r.yielding {
            Some(Yielding::Discontinuous { upper_mpa, .. }) => Some(upper_mpa),
            _ => None,
        },
        lower_yield_mpa: match r.yielding {
            Some(Yielding::Discontinuous { lower_mpa, .. }) => Some(lower_mpa),
            _ => None,
        },
        lueders_strain: match r.yielding {
            Some(Yielding::Discontinuous { lueders_strain, .. }) => Some(lueders_strain),
            _ => None,
        },
        uts_mpa: r.uts_mpa,
        uniform_strain: r.uniform_strain,
        noise_mpa: finite(r.noise_mpa),
        points_merged_or_dropped: r.cleaning.changed(),
        fitted_points: r.plastic_strain.len(),
        strain_from: r.strain_from(),
        strain_to: r.strain_to(),
        flow_valid_to_strain: r.valid_to_strain(),
        reach_strain: r.reach_strain,
        standard_errors: STD_ERROR_NOTE,
        fits: r.fits.iter().map(fit_out).collect(),
        best: r.best.map(FitLaw::name),
        drawn_points: r
            .drawn
            .iter()
            .map(|d| [d.strain, d.tensile_strength_mpa])
            .collect(),
        fits_with_drawn_points: r.drawn_fits.iter().map(fit_out).collect(),
        best_with_drawn_points: r.best_with_drawn.map(FitLaw::name),
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

#[derive(Serialize)]
struct CorrelationOut {
    between: [&'static str; 2],
    r: f64,
}

#[derive(Serialize)]
struct SetOut {
    law: &'static str,
    specimens: usize,
    mean: BTreeMap<&'static str, f64>,
    sd: BTreeMap<&'static str, f64>,
    correlation: Vec<CorrelationOut>,
    with_drawn_points: bool,
    flow_valid_to_strain: f64,
}

#[derive(Serialize)]
struct AllOut<'a> {
    specimens: Vec<ReportOut<'a>>,
    set: Option<SetOut>,
    caution: &'static str,
}

fn set_out(set: &Set, reports: &[FitReport]) -> SetOut {
    let sc = &set.scatter;
    SetOut {
        law: sc.law.name(),
        specimens: sc.specimens,
        mean: sc
            .names
            .iter()
            .copied()
            .zip(sc.mean.iter().copied())
            .collect(),
        sd: sc
            .names
            .iter()
            .copied()
            .zip(sc.sd.iter().copied())
            .collect(),
        correlation: sc
            .correlation
            .iter()
            .map(|&(a, b, r)| CorrelationOut { between: [a, b], r })
            .collect(),
        with_drawn_points: set.with_drawn,
        flow_valid_to_strain: reports
            .iter()
            .map(FitReport::valid_to_strain)
            .fold(0.0, f64::max),
    }
}

fn all_out<'a>(rs: &[FitReport], srcs: &'a [Source], set: Option<&Set>) -> AllOut<'a> {
    AllOut {
        specimens: rs.iter().zip(srcs).map(|(r, s)| report_out(r, s)).collect(),
        set: set.map(|s| set_out(s, rs)),
        caution: CAUTION,
    }
}

/// JSON of one record (as [`json`]) or, for several, `specimens[]` and `set`.
pub fn json_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>) -> Result<String> {
    if rs.len() == 1 {
        return json(&rs[0], &srcs[0]);
    }
    let mut s = serde_json::to_string_pretty(&all_out(rs, srcs, set))?;
    s.push('\n');
    Ok(s)
}

/// YAML with the same keys as the JSON.
pub fn yaml_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>) -> Result<String> {
    if rs.len() == 1 {
        return yaml(&rs[0], &srcs[0]);
    }
    Ok(serde_yaml::to_string(&all_out(rs, srcs, set))?)
}

/// CSV of one record (as [`csv`]) or, for several, the same rows with the
/// record's `file` in a first column.
pub fn csv_all(rs: &[FitReport], srcs: &[Source]) -> Result<String> {
    if rs.len() == 1 {
        return csv(&rs[0], &srcs[0]);
    }
    let mut out = String::new();
    for (i, (r, s)) in rs.iter().zip(srcs).enumerate() {
        let one = csv(r, s)?;
        let quoted = format!("\"{}\"", s.file.replace('"', "\"\""));
        for (k, line) in one.lines().enumerate() {
            if k == 0 {
                if i == 0 {
                    out.push_str("file,");
                    out.push_str(line);
                    out.push('\n');
                }
                continue;
            }
            out.push_str(&quoted);
            out.push(',');
            out.push_str(line);
            out.push('\n');
        }
    }
    Ok(out)
}

/// The tables of every record, then the set's law and scatter.
pub fn table_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>, units: Units) -> String {
    wrap_long_lines(&records_and_set(rs, srcs, set, units), terminal_width())
}

fn records_and_set(rs: &[FitReport], srcs: &[Source], set: Option<&Set>, units: Units) -> String {
    if rs.len() == 1 {
        return table(&rs[0], &srcs[0], units);
    }
    let mut out = String::new();
    for (r, s) in rs.iter().zip(srcs) {
        out.push_str(&table(r, s, units));
        out.push('\n');
    }
    if let Some(set) = set {
        let sc = &set.scatter;
        let _ = writeln!(
            out,
            "Set of {} specimens: {}{}, parameters over the specimens (mean ± standard deviation):",
            sc.specimens,
            sc.law,
            if set.with_drawn {
                " (with the drawn-wire points)"
            } else {
                ""
            }
        );
        for ((n, m), sd) in sc.names.iter().zip(&sc.mean).zip(&sc.sd) {
            let _ = writeln!(out, "  {n} = {} ± {}", sig(*m, 5), sig(*sd, 2));
        }
        for (a, b, r) in &sc.correlation {
            let _ = writeln!(out, "  correlation of {a} and {b}: {r:.3}");
        }
        let _ = writeln!(out, "\n{CAUTION}");
    }
    out
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

/// A number to `decimals` places, or "not finite" (an overflow) when it is not.
fn fixed(v: f64, decimals: usize) -> String {
    if v.is_finite() {
        format!("{v:.decimals$}")
    } else {
        "not finite".into()
    }
}

fn opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| "-".into(), |x| sig(x, digits))
}

/// A stress (MPa in the core) in `units`, to `digits` significant figures.
fn stress(mpa: f64, digits: usize, units: Units) -> String {
    sig(Quantity::Stress.convert(mpa, units), digits)
}

fn opt_stress(mpa: Option<f64>, digits: usize, units: Units) -> String {
    mpa.map_or_else(|| "-".into(), |x| stress(x, digits, units))
}

/// Young's modulus (MPa in the core) as GPa, or Msi (10^6 psi) in US units.
fn modulus(mpa: f64, digits: usize, units: Units) -> String {
    match units {
        Units::Si => sig(mpa / 1000.0, digits),
        Units::Us => sig(mpa / MPA_PER_KSI / 1000.0, digits),
    }
}

fn modulus_unit(units: Units) -> &'static str {
    match units {
        Units::Si => "GPa",
        Units::Us => "Msi",
    }
}

/// A fitted parameter as the table shows it: `name = value ± error` under
/// its JSON name; in US units a stress parameter (`k_mpa`, ...) also in ksi
/// (`k_mpa = 318.55 ± 0.76 (46.201 ± 0.11 ksi)`), so the name stays the key's.
pub fn param_text(
    name: &str,
    value: f64,
    std_error: Option<f64>,
    pm: &str,
    units: Units,
) -> String {
    let mut out = match std_error {
        Some(se) => format!("{name} = {}{pm}{}", sig(value, 5), sig(se, 2)),
        None => format!("{name} = {}", sig(value, 5)),
    };
    if units == Units::Us && name.ends_with("_mpa") {
        let ksi = |x: f64| Quantity::Stress.convert(x, units);
        let gap = if pm.contains('\n') { "\n  " } else { " " };
        let _ = match std_error {
            Some(se) => write!(
                out,
                "{gap}({} ± {} ksi)",
                sig(ksi(value), 5),
                sig(ksi(se), 2)
            ),
            None => write!(out, "{gap}({} ksi)", sig(ksi(value), 5)),
        };
    }
    out
}

/// The table for people, fitted to the terminal's width: the law table's
/// headers word by word and its cells wrapped at words, long lines wrapped.
pub fn table(r: &FitReport, src: &Source, units: Units) -> String {
    let su = Quantity::Stress.label(units);
    let width = terminal_width();
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
            DataKind::Engineering => match r.yielding {
                Some(Yielding::Discontinuous { .. }) =>
                    "end of the Lueders plateau to maximum force",
                _ => "0.2 % proof strength to maximum force",
            },
            DataKind::True => "true data as given",
        }
    );
    if r.data == DataKind::Engineering {
        if let Some(m) = &r.modulus {
            let _ = writeln!(
                out,
                "  Young's modulus {} ± {} {mu} (one line over stress {} to {} {su}, 10-40 % of the yield strength, {} points; ISO 6892-1)",
                modulus(m.modulus_mpa, 4, units),
                modulus(m.std_error_mpa, 2, units),
                stress(m.band_mpa.0, 3, units),
                stress(m.band_mpa.1, 3, units),
                m.points,
                mu = modulus_unit(units),
            );
        }
        match &r.yielding {
            Some(Yielding::Discontinuous {
                upper_mpa,
                lower_mpa,
                lueders_strain,
                ..
            }) => {
                let _ = writeln!(
                    out,
                    "  yield drop: upper yield ReH {} {su} | lower yield ReL {} {su} | Lueders strain {} (hardening fitted after the plateau)",
                    stress(*upper_mpa, 4, units),
                    stress(*lower_mpa, 4, units),
                    sig(*lueders_strain, 3)
                );
            }
            _ => {
                let _ = writeln!(
                    out,
                    "  continuous yielding: 0.2 % proof strength Rp0.2 {} {su}",
                    opt_stress(r.yield_mpa, 4, units)
                );
            }
        }
        let _ = writeln!(
            out,
            "  tensile strength {} {su} | uniform strain {} (true plastic, at maximum force) | record noise {} {su}",
            opt_stress(r.uts_mpa, 4, units),
            opt(r.uniform_strain, 3),
            stress(r.noise_mpa, 2, units),
        );
    }
    let _ = writeln!(out, "  Note: {STD_ERROR_NOTE}.");
    let _ = writeln!(out);
    let _ = writeln!(out, "{}", law_table(r, &r.fits, r.best, width, units));
    match r.best {
        Some(best) => {
            let _ = writeln!(
                out,
                "Best by AIC: {best} (among the converged plastic-strain laws; the total-strain forms are for the record and not ranked)."
            );
        }
        None => {
            let _ = writeln!(
                out,
                "Best by AIC: none of the fits converged to a valid law."
            );
        }
    }
    if !r.drawn_fits.is_empty() {
        let pts = r
            .drawn
            .iter()
            .map(|d| {
                format!(
                    "{} {su} at strain {}",
                    stress(d.tensile_strength_mpa, 4, units),
                    sig(d.strain, 3)
                )
            })
            .collect::<Vec<_>>()
            .join(", ");
        let _ = writeln!(
            out,
            "\nWith the drawn-wire points ({pts}; together weighted as much as the record):"
        );
        let _ = writeln!(
            out,
            "{}",
            law_table(r, &r.drawn_fits, r.best_with_drawn, width, units)
        );
        if let Some(b) = r.best_with_drawn {
            let _ = writeln!(
                out,
                "Best by AIC with the drawn-wire points: {b}; the law holds to strain {}.",
                sig(r.valid_to_strain(), 3)
            );
        }
    }
    if !r.warnings.is_empty() {
        let _ = writeln!(out, "\nWarnings:");
        for w in &r.warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    let _ = writeln!(out, "\n{CAUTION}");
    wrap_long_lines(&out, width)
}

/// The table of fitted laws.
fn law_table(
    r: &FitReport,
    fits: &[LawFit],
    best: Option<FitLaw>,
    width: usize,
    units: Units,
) -> String {
    let header = law_header(r.reach_strain, units);
    // Headers word by word (the parameters' header stays whole: its column is
    // wide anyway), as the check table does, and the whole fitted to the width.
    let header: Vec<String> = header
        .iter()
        .enumerate()
        .map(|(i, h)| if i == 1 { h.clone() } else { stack(h) })
        .collect();
    // One line a parameter when that fits; else its standard error on the
    // line below; else the cells wrapped at words to the width.
    let natural = |split: bool| {
        build(
            header.clone(),
            law_rows(fits, best, split, units),
            None,
            &[1, 7],
        )
    };
    for split in [false, true] {
        let t = natural(split);
        if t.lines().all(|l| l.chars().count() <= width) {
            return t;
        }
    }
    build(
        header,
        law_rows(fits, best, true, units),
        Some(width),
        &[1, 7],
    )
}

/// The law table's header, the same words in the table and the page, each
/// stress header with its unit in `units`.
pub fn law_header(reach_strain: Option<f64>, units: Units) -> Vec<String> {
    let su = Quantity::Stress.label(units);
    let reach = reach_strain.map_or(format!("stress {su} at reach strain"), |x| {
        format!("stress {su} at strain {}", sig(x, 3))
    });
    vec![
        "law".to_string(),
        "parameters ± std error".to_string(),
        format!("RMS {su}"),
        "R^2".to_string(),
        "AIC".to_string(),
        format!("UTS from law {su}"),
        reach,
        "converged".to_string(),
    ]
}

/// The rows of the law table; `split` puts each standard error on the line
/// below its parameter.
fn law_rows(fits: &[LawFit], best: Option<FitLaw>, split: bool, units: Units) -> Vec<Vec<String>> {
    let pm = if split { "\n  ± " } else { " ± " };
    let mut rows = Vec::new();
    for f in fits {
        let mut name = f.law.name().to_string();
        if Some(f.law) == best {
            name.push_str(" (best)");
        }
        if f.law.is_total_strain_form() {
            name.push_str("\n(total strain)");
        }
        let params = f
            .params
            .iter()
            .map(|p| param_text(p.name, p.value, p.std_error, pm, units))
            .collect::<Vec<_>>()
            .join("\n");
        let conv = match (f.converged, f.iterations) {
            (true, 0) => "yes\n(direct)".to_string(),
            (true, i) => format!("yes\n({i} it.)"),
            (false, i) => format!("NO\n({i} it.)"),
        };
        rows.push(vec![
            name,
            params,
            stress(f.rms_mpa, 3, units),
            fixed(f.r2, 5),
            fixed(f.aic, 1),
            opt_stress(f.uts_mpa, 4, units),
            opt_stress(f.stress_at_reach_mpa, 4, units),
            conv,
        ]);
    }
    rows
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

/// The `flow_scatter:` block: `{sd: {key: value}, correlation: [{between:
/// [a, b], r}], specimens: n}` (the shape the risk analysis reads).
fn scatter_yaml(sc: &Scatter) -> Result<serde_yaml::Value> {
    use serde_yaml::{Mapping, Value};
    let round = |v: f64| -> Value { Value::from(sig(v, 4).parse::<f64>().unwrap_or(v)) };
    let mut sd = Mapping::new();
    for (n, v) in sc.names.iter().zip(&sc.sd) {
        sd.insert(Value::from(*n), round(*v));
    }
    let corr: Vec<Value> = sc
        .correlation
        .iter()
        .map(|(a, b, r)| {
            let mut m = Mapping::new();
            m.insert(
                Value::from("between"),
                Value::Sequence(vec![Value::from(*a), Value::from(*b)]),
            );
            m.insert(Value::from("r"), round(*r));
            Value::Mapping(m)
        })
        .collect();
    let mut m = Mapping::new();
    m.insert(Value::from("sd"), Value::Mapping(sd));
    m.insert(Value::from("correlation"), Value::Sequence(corr));
    m.insert(Value::from("specimens"), Value::from(sc.specimens as u64));
    Ok(Value::Mapping(m))
}

/// The blocks after the comments: `flow:`, `flow_valid_to_strain:`, `flow_scatter:`.
fn law_blocks(flow: &FlowLaw, valid_to: f64, scatter: Option<&Scatter>) -> Result<String> {
    use serde_yaml::{Mapping, Value};
    let rounded = round_law(flow)?;
    let mut m = Mapping::new();
    m.insert(Value::from("flow"), serde_yaml::to_value(&rounded)?);
    m.insert(
        Value::from("flow_valid_to_strain"),
        Value::from(sig(valid_to, 6).parse::<f64>().unwrap_or(valid_to)),
    );
    if let Some(sc) = scatter {
        m.insert(Value::from("flow_scatter"), scatter_yaml(sc)?);
    }
    Ok(serde_yaml::to_string(&Value::Mapping(m))?)
}

/// The chosen fit as a `flow:` block a schedule file can paste under
/// `material:`, parameters to 6 significant figures, with
/// `flow_valid_to_strain` (the largest true plastic strain fitted, drawn
/// points included) and `flow_scatter` (one specimen: the fit's standard
/// errors and correlation), and comment lines naming the record, the fitted
/// range and the caution.
pub fn law_yaml(r: &FitReport, fit: &LawFit, src: &Source) -> Result<String> {
    let law = fit.law;
    let flow = fit.flow_law.as_ref().with_context(|| {
        format!("the fitted '{law}' parameters are not a valid law for a schedule")
    })?;
    let with_drawn = r.drawn_fits.iter().any(|f| std::ptr::eq(f, fit));
    let best = if with_drawn {
        r.best_with_drawn
    } else {
        r.best
    };
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# coldpass fit: {law}{} fitted to '{}' ({} points{}).",
        if Some(law) == best {
            " (best by AIC)"
        } else {
            ""
        },
        src.file,
        fit.points,
        if with_drawn {
            format!(", {} of them drawn-wire points", r.drawn.len())
        } else {
            String::new()
        }
    );
    let _ = writeln!(
        out,
        "# True plastic strain {} to {}; RMS {} MPa; R^2 {}.",
        sig(r.strain_from(), 3),
        sig(r.valid_to_strain(), 3),
        sig(fit.rms_mpa, 3),
        fixed(fit.r2, 5)
    );
    if !fit.converged {
        let _ = writeln!(
            out,
            "# NOT CONVERGED after {} iterations: written on request (--allow-unconverged); treat it as rough.",
            fit.iterations
        );
    }
    match r.reach_strain {
        Some(x) if x > r.valid_to_strain() => {
            let _ = writeln!(
                out,
                "# A schedule reaching strain {} uses this law {:.1} times past its data: check it against drawn-wire strength.",
                sig(x, 3),
                x / r.valid_to_strain()
            );
        }
        _ => {
            let _ = writeln!(
                out,
                "# Beyond strain {} (flow_valid_to_strain) this law is extrapolated: check it against drawn-wire strength.",
                sig(r.valid_to_strain(), 3)
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
    let scatter = fit::fit_uncertainty(fit);
    if scatter.is_some() {
        let _ = writeln!(
            out,
            "# flow_scatter is the fit uncertainty of one specimen (standard errors and correlation of the fit, assuming the law is right), not a spread between specimens."
        );
    }
    let _ = writeln!(out, "# {CAUTION}");
    out.push_str(&law_blocks(flow, r.valid_to_strain(), scatter.as_ref())?);
    Ok(out)
}

/// The law of a set of specimens and its scatter.
pub struct Set {
    /// The scatter (mean, sd, correlation) of the chosen law.
    pub scatter: Scatter,
    /// Whether the specimens' fits with drawn-wire points were used.
    pub with_drawn: bool,
}

impl Set {
    /// The set of several reports (`None` for one): `law` or the law with
    /// the lowest summed AIC.
    pub fn of(reports: &[FitReport], law: Option<FitLaw>) -> Result<Option<Set>> {
        if reports.len() < 2 {
            return Ok(None);
        }
        let with_drawn = reports.iter().all(|r| !r.drawn_fits.is_empty());
        let law = match law {
            Some(l) => l,
            None => fit::set_law(reports, with_drawn)
                .context("no law converged to a valid fit in every specimen")?,
        };
        let scatter = fit::set_scatter(reports, law, with_drawn)?;
        Ok(Some(Set {
            scatter,
            with_drawn,
        }))
    }
}

/// The set's law as a `flow:` block with its scatter between specimens.
pub fn set_law_yaml(set: &Set, reports: &[FitReport], sources: &[Source]) -> Result<String> {
    let sc = &set.scatter;
    let flow = sc
        .flow_law()
        .map_err(|e| anyhow::anyhow!("the mean parameters of the set are not a valid law: {e}"))?;
    let valid_to = reports
        .iter()
        .map(FitReport::valid_to_strain)
        .fold(0.0, f64::max);
    let mut out = String::new();
    let _ = writeln!(
        out,
        "# coldpass fit: {} fitted to each of {} specimens ({}); the law is at the mean parameters.",
        sc.law,
        sc.specimens,
        sources
            .iter()
            .map(|s| format!("'{}'", s.file))
            .collect::<Vec<_>>()
            .join(", ")
    );
    let _ = writeln!(
        out,
        "# flow_scatter: standard deviation and correlation of the parameters between the specimens."
    );
    let _ = writeln!(out, "# {CAUTION}");
    out.push_str(&law_blocks(&flow, valid_to, Some(sc))?);
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
        // The run-out panel reaches the schedule's strain or the farthest drawn point.
        let far = r
            .drawn
            .iter()
            .map(|d| d.strain * 1.05)
            .fold(r.reach_strain.unwrap_or(0.0), f64::max);
        let wide = far > r.strain_to();
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
            panel(&right, r, &laws, far, true)?;
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
    for d in r.drawn.iter().filter(|d| d.strain <= x_max) {
        y_max = y_max.max(d.tensile_strength_mpa);
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
    // The best law's confidence band: +-2 standard errors of its predicted
    // stress (delta method on the covariance; assumes the law is right).
    if let Some(best) = r.best.and_then(|b| r.fit(b)) {
        let c = colour(best.law);
        let n = 120;
        let pts: Vec<(f64, f64, f64)> = (0..=n)
            .filter_map(|i| {
                let x = x_max * (i as f64 / n as f64).max(1e-4);
                best.stress_with_error_mpa(x).map(|(f, se)| (x, f, se))
            })
            .collect();
        if !pts.is_empty() {
            let mut poly: Vec<(f64, f64)> = pts
                .iter()
                .map(|&(x, f, se)| (x, (f + 2.0 * se).min(y_max)))
                .collect();
            poly.extend(
                pts.iter()
                    .rev()
                    .map(|&(x, f, se)| (x, (f - 2.0 * se).clamp(0.0, y_max))),
            );
            chart
                .draw_series(std::iter::once(Polygon::new(poly, c.mix(0.18).filled())))
                .map_err(plot_err)?
                .label(format!("{} ±2 std errors (law assumed right)", best.law))
                .legend(move |(x, y)| {
                    Rectangle::new([(x, y - 4), (x + 20, y + 4)], c.mix(0.18).filled())
                });
        }
    }
    // With drawn-wire points: their best law (black, dashed) and the points (triangles).
    if let Some(wd) = r.best_with_drawn.and_then(|b| r.drawn_fit(b)) {
        let black = ShapeStyle::from(&BLACK).stroke_width(2);
        chart
            .draw_series(DashedLineSeries::new(curve(wd, 0.0, x_max), 6, 4, black))
            .map_err(plot_err)?
            .label(format!("{} with drawn-wire points", wd.law))
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], black));
        let inside: Vec<(f64, f64)> = r
            .drawn
            .iter()
            .map(|d| (d.strain, d.tensile_strength_mpa))
            .filter(|&(x, y)| x <= x_max && y <= y_max)
            .collect();
        chart
            .draw_series(
                inside
                    .iter()
                    .map(|&p| TriangleMarker::new(p, 6, BLACK.filled())),
            )
            .map_err(plot_err)?
            .label("drawn-wire tensile strength")
            .legend(|(x, y)| TriangleMarker::new((x + 10, y), 6, BLACK.filled()));
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
