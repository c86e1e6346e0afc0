//! CSV of a fit: one row per law, the parameter keys as columns.

use super::*;

/// Parameter keys in the order of the CSV columns.
pub(super) const PARAM_KEYS: [&str; 8] = [
    "yield_mpa",
    "hardening_modulus_mpa",
    "k_mpa",
    "n",
    "sigma0_mpa",
    "eps0",
    "saturation_mpa",
    "eps_c",
];

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
