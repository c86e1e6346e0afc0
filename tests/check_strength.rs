//! `check` on the strength of the stock and of the drawn wire: back tension
//! against a positive entry yield, the tensile strength from the Considere
//! condition, the common-practice reduction guard, and the flow law's range
//! against a schedule and against the mill's measured points. Sources:
//! docs/physics.md, "Machines, blocks and heat carried die to die".

use coldpass::evaluation::{evaluate, EvaluateOptions, ScheduleReport};
use coldpass::schedule;

/// Annealed copper as a Hollomon law (K = 320 MPa, n = 0.54, a handbook
/// value for annealed copper; Kalpakjian & Schmid, Table 2.3, from memory),
/// 3.0 -> 2.7 -> 2.43 mm, with `extra` under `material:` and `back` MPa on die 1.
fn copper(extra: &str, back: f64, exits: &str) -> String {
    copper2(extra, back, exits, "2.43")
}

/// The same with the second die's exit `second`.
fn copper2(extra: &str, back: f64, exits: &str, second: &str) -> String {
    format!(
        "material:
  density_kg_m3: 8940
  specific_heat_j_kg_k: 385
  flow: {{law: hollomon, k_mpa: 320, n: 0.54}}
{extra}start:
  diameter: 3.0
dies:
  semi_angle_deg: 6
  friction: 0.05
limits:
  method: sachs
  draw_ratio_warn: 0.9
  draw_ratio_max: 0.95
passes:
  - exit: {exits}
    back_tension_mpa: {back}
  - exit: {second}
"
    )
}

fn check(text: &str) -> ScheduleReport {
    evaluate(&schedule::parse(text).unwrap(), &EvaluateOptions::default()).unwrap()
}

fn flags(rep: &ScheduleReport, step: usize) -> Vec<&'static str> {
    rep.passes[step - 1]
        .flags
        .iter()
        .map(|f| f.name())
        .collect()
}

#[test]
fn a_small_back_pull_on_annealed_hollomon_stock_is_not_over_its_yield() {
    // K 0^n = 0 would flag any back tension. At the 0.2 % offset the stock
    // yields at 320 x 0.002^0.54 = 11.16 MPa (ASTM E8 offset, common practice):
    // 5 MPa is below it, 15 MPa is over.
    let rep = check(&copper("", 5.0, "2.7"));
    let y = rep.passes[0].entry_yield_mpa.unwrap();
    assert!((y - 320.0 * 0.002f64.powf(0.54)).abs() < 1e-9, "{y}");
    assert!((y - 11.16).abs() < 0.005);
    assert!(!flags(&rep, 1).contains(&"back-tension-over-yield"));
    assert!(flags(&check(&copper("", 15.0, "2.7")), 1).contains(&"back-tension-over-yield"));
    // A yield the file gives wins: 60 MPa holds 15 MPa.
    let given = check(&copper("  yield_mpa: 60\n", 15.0, "2.7"));
    assert_eq!(given.passes[0].entry_yield_mpa, Some(60.0));
    assert!(!flags(&given, 1).contains(&"back-tension-over-yield"));
}

#[test]
fn tensile_strength_from_the_considere_condition() {
    // Hollomon necks at eps_u = n = 0.54 (Considere; Dieter ch. 8). Die 1,
    // 3.0 -> 2.7 mm, strains the wire to eps = 2 ln(3/2.7) = 0.21072 < n, so
    // the drawn wire still hardens: UTS = K n^n exp(eps - n) on its own
    // section. Die 2 to 2.43 mm reaches 0.42144, still below n.
    let rep = check(&copper("", 0.0, "2.7"));
    for (i, d) in [(0usize, 2.7f64), (1, 2.43)] {
        let eps = 2.0 * (3.0f64 / d).ln();
        let hand = 320.0 * 0.54f64.powf(0.54) * (eps - 0.54).exp();
        let got = rep.passes[i].tensile_strength_mpa.unwrap();
        assert!((got - hand).abs() < 1e-4, "{got} vs {hand}");
    }
    let s = &rep.summary;
    assert!((s.considere_strain.unwrap() - 0.54).abs() < 1e-7);
    assert!(rep
        .notes
        .iter()
        .any(|n| n.contains("short of the law's Considere strain 0.540")));
    // Past n the strength is the flow stress: 3.0 -> 2.43 -> 2.0 mm reaches
    // 2 ln(3/2) = 0.81093.
    let heavy = copper2("", 0.0, "2.43", "2.0");
    let rep = check(&heavy);
    let eps = 2.0 * (3.0f64 / 2.0).ln();
    let want = 320.0 * eps.powf(0.54);
    assert!((rep.summary.tensile_strength_mpa.unwrap() - want).abs() < 1e-9);
    assert!(rep
        .notes
        .iter()
        .any(|n| n.contains("drawn past the law's Considere strain 0.540")));
}

#[test]
fn swift_with_n_045_at_strain_087_is_past_its_considere_strain() {
    // Issue 9's case: Swift K (eps0 + eps)^n with eps0 = 0.01, n = 0.45
    // necks at n - eps0 = 0.44, so wire at strain 0.87 is heavily drawn.
    let text = copper("", 0.0, "2.7")
        .replace(
            "{law: hollomon, k_mpa: 320, n: 0.54}",
            "{law: swift, k_mpa: 500, eps0: 0.01, n: 0.45}",
        )
        .replace(
            "  - exit: 2.43\n",
            &format!("  - exit: {}\n", 3.0 * (-0.87f64 / 2.0).exp()),
        );
    assert!(text.contains("exit: 2.7"));
    let rep = check(&text);
    assert!((rep.summary.considere_strain.unwrap() - 0.44).abs() < 1e-7);
    assert!(rep
        .notes
        .iter()
        .any(|n| n.contains("drawn past the law's Considere strain 0.440")));
}

#[test]
fn a_heavy_pass_is_a_warning_above_common_practice() {
    // 3.0 -> 2.43 mm is 1 - 0.81^2 = 34.4 % in one pass: above the 30 % of
    // multi-die wire practice (Kalpakjian & Schmid, from memory). 2.43 -> 2.2 is 18 %.
    let text = copper2("", 0.0, "2.43", "2.2");
    let rep = check(&text);
    assert_eq!(flags(&rep, 1), vec!["heavy-reduction"]);
    assert!(flags(&rep, 2).is_empty());
    assert!(!rep.is_over());
    let relaxed = text.replace(
        "  draw_ratio_max: 0.95\n",
        "  draw_ratio_max: 0.95\n  reduction_warn: 0.4\n",
    );
    assert!(flags(&check(&relaxed), 1).is_empty());
}

#[test]
fn past_the_law_range_by_how_much_and_what_the_law_says_there() {
    // Fitted to 0.3; the schedule reaches 2 ln(3/2.43) = 0.42144, 0.12144 past it.
    // Hollomon there: 320 x 0.42144^0.54 = 201.2 MPa against 320 x 0.3^0.54 = 167.6 MPa.
    let rep = check(&copper("  flow_valid_to_strain: 0.3\n", 0.0, "2.7"));
    assert!(flags(&rep, 1).is_empty());
    assert_eq!(flags(&rep, 2), vec!["past-law-range"]);
    let note = rep
        .notes
        .iter()
        .find(|n| n.contains("fitted to strain 0.3"))
        .unwrap();
    let e = 2.0 * (3.0f64 / 2.43).ln();
    for want in [
        format!("{e:.3}"),
        format!("{:.3} beyond", e - 0.3),
        format!("{:.0} MPa there", 320.0 * e.powf(0.54)),
        format!("{:.0} MPa at the end", 320.0 * 0.3f64.powf(0.54)),
    ] {
        assert!(note.contains(&want), "{note} lacks {want}");
    }
}

#[test]
fn the_law_against_the_mill_measured_strengths() {
    // A point at strain 1.0 measured 330 MPa: the law's strength there is its
    // flow stress (past n), 320 MPa, -3.03 %; a point by diameter 2.7 mm is
    // strain 0.21072 from the 3.0 mm start.
    let rep = check(&copper(
        "  drawn_strengths:\n    - {strain: 1.0, tensile_strength_mpa: 330}\n    - {diameter: 2.7, tensile_strength_mpa: 200}\n",
        0.0,
        "2.7",
    ));
    let c = &rep.strength_checks;
    assert_eq!(c.len(), 2);
    assert!((c[0].predicted_mpa - 320.0).abs() < 1e-9);
    assert!((c[0].difference - (320.0 - 330.0) / 330.0).abs() < 1e-12);
    assert!((c[1].strain - 2.0 * (3.0f64 / 2.7).ln()).abs() < 1e-12);
    assert!(rep.notes.iter().any(|n| n.contains("measured strengths")));
    let bad = copper(
        "  drawn_strengths:\n    - {tensile_strength_mpa: 200}\n",
        0.0,
        "2.7",
    );
    let e = schedule::parse(&bad).unwrap_err().to_string();
    assert!(e.contains("material.drawn_strengths[0].strain"), "{e}");
}
