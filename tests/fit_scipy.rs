//! coldpass's fits of the demo tensile records against
//! scipy.optimize.curve_fit (tests/scipy/fit_reference.py writes the
//! reference file; .ci/run regenerates it and fails on any change).
//! The record analysis (modulus, Rp0.2, maximum force) is computed there
//! from the definitions of ISO 6892-1 in its own way (linregress over the
//! band, brentq on the interpolated curve), so it agrees to 1e-9; the fits
//! are curve_fit's own iterations, so they agree to what two converged
//! solvers reach: parameters 1e-6, standard errors 1e-4, RMS 1e-9.

use std::path::Path;

use coldpass::fit::{self, FitOptions, FitReport};
use serde_json::Value;

fn root(rel: &str) -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn columns(name: &str) -> Vec<Vec<f64>> {
    // The semicolon export writes decimal commas.
    let semicolon = name.contains("lueders");
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .delimiter(if semicolon { b';' } else { b',' })
        .from_path(root("schedules-demo").join(name))
        .unwrap();
    let mut cols: Vec<Vec<f64>> = Vec::new();
    for rec in r.records() {
        let rec = rec.unwrap();
        cols.resize(rec.len(), Vec::new());
        for (i, c) in rec.iter().enumerate() {
            cols[i].push(c.trim().replace(',', ".").parse().unwrap());
        }
    }
    cols
}

/// The same reading as the SciPy script's RECORDS table.
fn analyse(name: &str) -> FitReport {
    let c = columns(name);
    let (strain, stress) = match name {
        "tensile-copper-rod.csv" => (c[0].clone(), c[1].clone()),
        "tensile-aluminium-rod.csv" => (c[0].iter().map(|v| v * 0.01).collect(), c[1].clone()),
        "tensile-steel-rod.csv" => {
            let force_n: Vec<f64> = c[2].iter().map(|v| v * 1000.0).collect();
            let area = fit::round_area_mm2(5.5).unwrap();
            fit::engineering_from_force(&force_n, &c[1], 50.0, area).unwrap()
        }
        "tensile-steel-lueders.csv" => {
            let force_n: Vec<f64> = c[1].iter().map(|v| v * 1000.0).collect();
            let area = fit::round_area_mm2(6.5).unwrap();
            fit::engineering_from_force(&force_n, &c[0], 50.0, area).unwrap()
        }
        other => panic!("no reading for {other}"),
    };
    fit::fit_record(&strain, &stress, &FitOptions::default()).unwrap()
}

fn close(what: &str, ours: f64, theirs: f64, rel: f64) {
    assert!(
        (ours - theirs).abs() <= rel * theirs.abs(),
        "{what}: coldpass {ours} vs SciPy {theirs} (allowed {} %)",
        rel * 100.0
    );
}

#[test]
fn every_fit_of_every_demo_record_agrees_with_scipy() {
    let text = std::fs::read_to_string(root("tests/scipy/fit_reference.json")).unwrap();
    let reference: Value = serde_json::from_str(&text).unwrap();
    let records = reference["records"].as_object().unwrap();
    assert_eq!(records.len(), 4, "four demo records");
    for (name, want) in records {
        let got = analyse(name);
        if let Some(reh) = want.get("upper_yield_mpa") {
            // The yield-drop record: ReH, the modulus over 10-40 % of it and
            // the maximum force after the plateau, from ISO 6892-1's definitions.
            let Some(fit::Yielding::Discontinuous { upper_mpa, .. }) = got.yielding else {
                panic!("{name}: no yield drop found");
            };
            close(
                &format!("{name} ReH"),
                upper_mpa,
                reh.as_f64().unwrap(),
                1e-12,
            );
            for (what, ours, key) in [
                ("E", got.youngs_modulus_gpa.unwrap(), "youngs_modulus_gpa"),
                (
                    "E std error",
                    got.modulus.as_ref().unwrap().std_error_mpa / 1000.0,
                    "youngs_modulus_std_error_gpa",
                ),
                ("Rm", got.uts_mpa.unwrap(), "uts_mpa"),
                (
                    "uniform strain",
                    got.uniform_strain.unwrap(),
                    "uniform_strain",
                ),
            ] {
                close(
                    &format!("{name} {what}"),
                    ours,
                    want[key].as_f64().unwrap(),
                    1e-9,
                );
            }
            continue;
        }
        // Same definitions, independent code: exact to rounding.
        close(
            &format!("{name} E"),
            got.youngs_modulus_gpa.unwrap(),
            want["youngs_modulus_gpa"].as_f64().unwrap(),
            1e-9,
        );
        close(
            &format!("{name} E std error"),
            got.modulus.as_ref().unwrap().std_error_mpa / 1000.0,
            want["youngs_modulus_std_error_gpa"].as_f64().unwrap(),
            1e-9,
        );
        close(
            &format!("{name} yield"),
            got.yield_mpa.unwrap(),
            want["yield_mpa"].as_f64().unwrap(),
            1e-9,
        );
        close(
            &format!("{name} UTS"),
            got.uts_mpa.unwrap(),
            want["uts_mpa"].as_f64().unwrap(),
            1e-9,
        );
        close(
            &format!("{name} uniform strain"),
            got.uniform_strain.unwrap(),
            want["uniform_strain"].as_f64().unwrap(),
            1e-9,
        );
        assert_eq!(
            got.plastic_strain.len() as u64,
            want["fitted_points"].as_u64().unwrap(),
            "{name}: fitted points"
        );
        let fits = want["fits"].as_object().unwrap();
        assert_eq!(fits.len(), got.fits.len(), "{name}: every law");
        for (law, w) in fits {
            let f = got
                .fits
                .iter()
                .find(|f| f.law.name() == law)
                .unwrap_or_else(|| panic!("{name}: no {law} fit"));
            assert!(f.converged, "{name} {law} converged");
            for p in &f.params {
                let what = format!("{name} {law} {}", p.name);
                close(&what, p.value, w["params"][p.name].as_f64().unwrap(), 1e-6);
                close(
                    &format!("{what} std error"),
                    p.std_error.unwrap(),
                    w["std_errors"][p.name].as_f64().unwrap(),
                    1e-4,
                );
            }
            close(
                &format!("{name} {law} RMS"),
                f.rms_mpa,
                w["rms_mpa"].as_f64().unwrap(),
                1e-9,
            );
        }
    }
}
