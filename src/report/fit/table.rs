//! The table for people: the record, the law table and the set, fitted to the terminal.

use super::*;

/// The tables of every record, then the set's law and scatter.
pub fn table_all(rs: &[FitReport], srcs: &[Source], set: Option<&Set>, units: Units) -> String {
    wrap_long_lines(&records_and_set(rs, srcs, set, units), terminal_width())
}

pub(super) fn records_and_set(
    rs: &[FitReport],
    srcs: &[Source],
    set: Option<&Set>,
    units: Units,
) -> String {
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
            let _ = writeln!(out, "  {}", param_text(n, *m, Some(*sd), " ± ", units));
        }
        for (a, b, r) in &sc.correlation {
            let _ = writeln!(out, "  correlation of {a} and {b}: {r:.3}");
        }
        let _ = writeln!(out, "\n{CAUTION}");
    }
    out
}

/// A stress (MPa in the core) in `units`, to `digits` significant figures.
pub(super) fn stress(mpa: f64, digits: usize, units: Units) -> String {
    sig(Quantity::Stress.convert(mpa, units), digits)
}

pub(super) fn opt_stress(mpa: Option<f64>, digits: usize, units: Units) -> String {
    mpa.map_or_else(|| "-".into(), |x| stress(x, digits, units))
}

/// Young's modulus (MPa in the core) as GPa, or Msi (10^6 psi) in US units.
pub(super) fn modulus(mpa: f64, digits: usize, units: Units) -> String {
    match units {
        Units::Si => sig(mpa / 1000.0, digits),
        Units::Us => sig(mpa / MPA_PER_KSI / 1000.0, digits),
    }
}

pub(super) fn modulus_unit(units: Units) -> &'static str {
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
pub(super) fn law_table(
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
pub(super) fn law_rows(
    fits: &[LawFit],
    best: Option<FitLaw>,
    split: bool,
    units: Units,
) -> Vec<Vec<String>> {
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
