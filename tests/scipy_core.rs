//! coldpass against SciPy: the Sachs drawing stress (integral form, Dieter,
//! *Mechanical Metallurgy*, ch. 19) and the mean flow stress over a grid of
//! laws and passes, computed independently by `scipy.integrate.quad` in
//! tests/scipy/core_reference.py and committed as
//! tests/scipy/core_reference.json (regenerated and diffed by .ci/run).

use std::collections::BTreeSet;

use coldpass::{analyse_pass, Die, DrawPass, FlowLaw, FlowLawSpec, Settings};
use serde::Deserialize;

/// One case as the script writes it.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Case {
    law: FlowLaw,
    entry_diameter_mm: f64,
    exit_diameter_mm: f64,
    strain_before: f64,
    semi_angle_deg: f64,
    friction: f64,
    back_tension_mpa: f64,
    /// SciPy's Sachs drawing stress, MPa.
    sachs_mpa: f64,
    /// SciPy's mean flow stress over the pass, MPa.
    mean_flow_stress_mpa: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Reference {
    #[allow(dead_code)]
    about: String,
    cases: Vec<Case>,
}

fn reference() -> Reference {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/scipy/core_reference.json"
    );
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("reading {path}: {e}"));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("parsing {path}: {e}"))
}

#[test]
fn sachs_and_mean_flow_stress_match_scipy_within_1e_7() {
    let reference = reference();
    let mut kinds = BTreeSet::new();
    let mut worst = (0.0f64, String::new());
    for (i, c) in reference.cases.iter().enumerate() {
        kinds.insert(match c.law.spec() {
            FlowLawSpec::Points { beyond, .. } => format!("points-{beyond:?}"),
            _ => c.law.name().to_string(),
        });
        let pass = DrawPass {
            entry_diameter_mm: c.entry_diameter_mm,
            exit_diameter_mm: c.exit_diameter_mm,
            strain_before: c.strain_before,
            back_tension_mpa: c.back_tension_mpa,
            die: Die::new(c.semi_angle_deg, c.friction).unwrap(),
        };
        let r = analyse_pass(&c.law, &pass, &Settings::default())
            .unwrap_or_else(|e| panic!("case {i} {c:?}: {e}"));
        for (what, ours, scipy) in [
            ("sachs", r.draw_stress_mpa.sachs, c.sachs_mpa),
            ("mean", r.mean_flow_stress_mpa, c.mean_flow_stress_mpa),
        ] {
            let rel = ((ours - scipy) / scipy).abs();
            assert!(
                rel < 1e-7,
                "case {i} {what}: coldpass {ours} vs SciPy {scipy} (rel {rel:e}) in {c:?}"
            );
            if rel > worst.0 {
                worst = (rel, format!("case {i} {what}"));
            }
        }
    }
    // The grid must cover every law kind and both table endings, so that an
    // empty or truncated file cannot pass.
    let expected: BTreeSet<String> = [
        "perfectly-plastic",
        "linear",
        "hollomon",
        "ludwik",
        "swift",
        "voce",
        "points-Slope",
        "points-Flat",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    assert_eq!(kinds, expected);
    assert!(reference.cases.len() >= 900, "{}", reference.cases.len());
    eprintln!("worst relative difference {:e} ({})", worst.0, worst.1);
}
