//! coldpass against SciPy: the Sachs drawing stress (integral form, Dieter,
//! *Mechanical Metallurgy*, ch. 19) and the mean flow stress over a grid of
//! laws and passes, computed independently by `scipy.integrate.quad` in
//! tests/scipy/core_reference.py and committed as
//! tests/scipy/core_reference.json (regenerated and diffed by .ci/run); and
//! every method (Sachs, Siebel, redundant, upper bound with m and land, the
//! land's slab balance, Delta), each method's optimum semi-angle
//! (`scipy.optimize.minimize_scalar`), force, power and temperature rise,
//! each written in Python from its published formula (docs/physics.md).

use std::collections::BTreeSet;

use std::collections::BTreeMap;

use coldpass::pass;
use coldpass::{
    analyse_pass, optimum_semi_angle, Die, DrawPass, FlowLaw, FlowLawSpec, Method, Settings,
};
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

/// An optimum as the script writes it.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Optimum {
    semi_angle_deg: f64,
    draw_stress_mpa: f64,
}

/// One every-method case as the script writes it.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct MethodCase {
    law: FlowLaw,
    entry_diameter_mm: f64,
    exit_diameter_mm: f64,
    strain_before: f64,
    semi_angle_deg: f64,
    friction: f64,
    friction_factor: f64,
    land_length_mm: f64,
    back_tension_mpa: f64,
    redundant_c: f64,
    delta: f64,
    /// By method name (`sachs`, `siebel`, `redundant`, `upper-bound`, `max`), MPa.
    draw_stress_mpa: BTreeMap<String, f64>,
    optimum: BTreeMap<String, Optimum>,
    exit_speed_m_s: f64,
    density_kg_m3: f64,
    specific_heat_j_kg_k: f64,
    heat_fraction: f64,
    redundant_force_kn: f64,
    redundant_power_kw: f64,
    redundant_temperature_rise_c: f64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Reference {
    #[allow(dead_code)]
    about: String,
    cases: Vec<Case>,
    methods: Vec<MethodCase>,
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
fn sachs_and_mean_flow_stress_match_scipy_within_1e_9() {
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
                rel < 1e-9,
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

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

#[test]
fn every_method_its_optimum_force_power_and_heat_match_scipy() {
    let reference = reference();
    assert!(reference.methods.len() >= 72, "{}", reference.methods.len());
    let (mut worst_stress, mut worst_angle, mut lands) = (0.0f64, 0.0f64, 0);
    for (i, c) in reference.methods.iter().enumerate() {
        let die = Die {
            semi_angle_deg: c.semi_angle_deg,
            friction: c.friction,
            friction_factor: Some(c.friction_factor),
            land_length_mm: c.land_length_mm,
            efficiency: None,
        };
        let pass = DrawPass {
            entry_diameter_mm: c.entry_diameter_mm,
            exit_diameter_mm: c.exit_diameter_mm,
            strain_before: c.strain_before,
            back_tension_mpa: c.back_tension_mpa,
            die,
        };
        let settings = Settings {
            redundant_c: c.redundant_c,
        };
        lands += usize::from(c.land_length_mm > 0.0);
        let r = analyse_pass(&c.law, &pass, &settings).unwrap();
        // Delta and every method's stress: exact formulas, 1e-9.
        assert!(rel(r.delta, c.delta) < 1e-9, "case {i} delta");
        for (name, &scipy) in &c.draw_stress_mpa {
            let method: Method = name.parse().unwrap();
            let ours = r.draw_stress_mpa.get(method).unwrap();
            let e = rel(ours, scipy);
            assert!(e < 1e-9, "case {i} {name}: {ours} vs SciPy {scipy} ({e:e})");
            worst_stress = worst_stress.max(e);
        }
        // Optimum semi-angle of each method: Brent to 1e-4 deg against
        // SciPy's bounded minimiser to 1e-9 deg; at the minimum the stress
        // agrees closely (a smooth minimum is flat; `max` may sit on a kink).
        for (name, o) in &c.optimum {
            let method: Method = name.parse().unwrap();
            let ours = optimum_semi_angle(&c.law, &pass, &settings, method)
                .unwrap()
                .unwrap();
            let d = (ours.semi_angle_deg - o.semi_angle_deg).abs();
            assert!(
                d < 1e-4,
                "case {i} {name}: {} vs SciPy {} deg",
                ours.semi_angle_deg,
                o.semi_angle_deg
            );
            worst_angle = worst_angle.max(d);
            let tol = if method == Method::Max { 1e-6 } else { 1e-9 };
            assert!(
                rel(ours.draw_stress_mpa, o.draw_stress_mpa) < tol,
                "case {i} {name}: {} vs SciPy {}",
                ours.draw_stress_mpa,
                o.draw_stress_mpa
            );
        }
        // Force, power and heat of the redundant stress: exact, 1e-9.
        let s = r.draw_stress_mpa.redundant;
        let force = pass::force_kn(s, c.exit_diameter_mm);
        assert!(rel(force, c.redundant_force_kn) < 1e-9, "case {i} force");
        assert!(
            rel(
                pass::power_kw(force, c.exit_speed_m_s),
                c.redundant_power_kw
            ) < 1e-9,
            "case {i} power"
        );
        let heat = pass::temperature_rise_c(
            s - c.back_tension_mpa,
            c.density_kg_m3,
            c.specific_heat_j_kg_k,
            c.heat_fraction,
        );
        assert!(
            rel(heat, c.redundant_temperature_rise_c) < 1e-9,
            "case {i} heat"
        );
    }
    assert!(lands >= 48, "the grid must exercise the land: {lands}");
    eprintln!("worst stress {worst_stress:e}, worst optimum angle {worst_angle:e} deg");
}
