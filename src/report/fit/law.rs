//! The chosen law as a `flow:` block for a schedule file, with its scatter.

use super::*;

/// The `flow_scatter:` block: `{sd: {key: value}, correlation: [{between:
/// [a, b], r}], specimens: n}` (the shape the risk analysis reads).
pub(super) fn scatter_yaml(sc: &Scatter) -> Result<serde_yaml::Value> {
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
pub(super) fn law_blocks(
    flow: &FlowLaw,
    valid_to: f64,
    scatter: Option<&Scatter>,
) -> Result<String> {
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
pub(super) fn round_law(law: &FlowLaw) -> Result<FlowLaw> {
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
