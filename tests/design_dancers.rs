//! `design` on a non-slip machine lays its passes out with the dancers' back
//! tension on their dies (issue 8), checked against the Sachs slab solution
//! with back tension (Dieter, *Mechanical Metallurgy*, ch. 19; the formula in
//! docs/physics.md, "Sachs"): for a constant flow stress `Y`,
//!
//! `sigma_d = sigma_b x + Y (1 + B)/B (1 - x)`, `x = (A1/A0)^B`, `B = mu cot(alpha)`,
//!
//! so a pass drawn at draw ratio `rho = sigma_d / Y` with back tension
//! `sigma_b` has `x = (c - rho) / (c - sigma_b / Y)`, `c = (1 + B)/B`. An
//! equal-ratio design on blocks whose dancers differ must then give every
//! pass the same `rho` from that formula, the heavier first pass (no dancer)
//! and the lighter later ones alike; a layout that left the tension out
//! would give the later passes a higher ratio.

use coldpass::design::{design_on, DesignOptions};
use coldpass::{machine, schedule};

/// Dancer tension on blocks 2 and 3 (block 1 draws from the payoff), MPa;
/// ours, chosen so that the passes differ clearly.
const DANCERS_MPA: [f64; 3] = [0.0, 40.0, 70.0];
const YIELD_MPA: f64 = 250.0;
const MU: f64 = 0.05;
const ANGLE_DEG: f64 = 8.0;

fn machine_text() -> String {
    let mut t =
        String::from("name: three blocks\nkind: non-slip\ncooling_between_dies: 1\nblocks:\n");
    for b in DANCERS_MPA {
        t.push_str(&format!(
            "  - {{capstan_diameter_mm: 500, motor_kw: 500, max_capstan_rpm: 3000, dancer_back_tension_mpa: {b}}}\n"
        ));
    }
    t
}

fn design_text() -> String {
    format!(
        r#"
title: dancers reference case
material:
  density_kg_m3: 8000
  specific_heat_j_kg_k: 450
  flow: {{law: perfectly-plastic, yield_mpa: {YIELD_MPA}}}
start:
  diameter: 5.0
dies:
  semi_angle_deg: {ANGLE_DEG}
  friction: {MU}
limits:
  method: sachs
  draw_ratio_warn: 0.9
  draw_ratio_max: 0.95
  reduction_warn: 0.45
line:
  finish_speed_m_s: 2
target:
  diameter: 3.8
  strategy: equal-ratio
"#
    )
}

/// The draw ratio of a pass from the Sachs closed form with back tension.
fn sachs_ratio(d_in: f64, d_out: f64, back_mpa: f64) -> f64 {
    let b = MU / ANGLE_DEG.to_radians().tan();
    let x = ((d_out / d_in).powi(2)).powf(b);
    (back_mpa * x + YIELD_MPA * (1.0 + b) / b * (1.0 - x)) / YIELD_MPA
}

#[test]
fn equal_ratio_on_a_machine_counts_each_dancer_as_the_sachs_solution_does() {
    let m = machine::parse(&machine_text()).expect("the machine parses");
    let f = schedule::parse(&design_text()).expect("the design file parses");
    let d = design_on(&f, &DesignOptions::default(), Some(&m)).expect("a design exists");
    let rows: Vec<_> = d
        .report
        .passes
        .iter()
        .filter(|r| r.draw_ratio.is_some())
        .collect();
    assert_eq!(rows.len(), 3, "one die per block");
    let ratios: Vec<f64> = rows
        .iter()
        .zip(DANCERS_MPA)
        .map(|(r, back)| {
            assert_eq!(
                r.back_tension_mpa,
                Some(back),
                "check applies block's dancer"
            );
            sachs_ratio(r.entry_diameter_mm, r.exit_diameter_mm, back)
        })
        .collect();
    // Each pass as check reports it is the closed form's (the same slab
    // solution; the report's rounding-free figures).
    for (r, rho) in rows.iter().zip(&ratios) {
        let got = r.draw_ratio.unwrap();
        assert!((got - rho).abs() <= 1e-9 * rho, "{got} vs Sachs {rho}");
    }
    // Equal ratio across the blocks, with the tension counted: the common
    // ratio is solved to 1e-13 and the last exit lands on the finish.
    let (lo, hi) = ratios
        .iter()
        .fold((f64::INFINITY, 0.0f64), |(a, b), &x| (a.min(x), b.max(x)));
    assert!((hi - lo) / hi <= 1e-9, "ratios {ratios:?}");
    // The first pass, without a dancer, takes the heaviest reduction.
    let red = |r: &&coldpass::evaluation::StepReport| {
        1.0 - (r.exit_diameter_mm / r.entry_diameter_mm).powi(2)
    };
    assert!(red(&rows[0]) > red(&rows[1]) && red(&rows[1]) > red(&rows[2]));
    // The design's own note says the tension was counted.
    assert!(
        d.summary
            .notes
            .iter()
            .any(|n| n.contains("with the dancers' back tension")),
        "{:?}",
        d.summary.notes
    );
}
