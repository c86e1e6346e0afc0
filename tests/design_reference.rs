//! `design` against published limits of a single pass.
//!
//! - Perfectly plastic stock through Sachs dies (Dieter, *Mechanical
//!   Metallurgy*, ch. 19; Example 19.2 gives r_max = 0.514 for its data, the
//!   formula from the docs/physics.md): with `B = mu cot(alpha)` the draw
//!   ratio reaches 1 at `r_max = 1 - (1+B)^(-1/B)`, so with
//!   `draw_ratio_max: 1` the fewest passes is
//!   `ceil(ln(A0/Af) / ln(1/(1 - r_max)))`.
//! - Ideal work with a Hollomon law from the annealed state: one pass reaches
//!   at most `eps = n + 1` (Hosford & Caddell, *Metal Forming*; from memory).

use coldpass::design::{design, DesignError, DesignOptions};
use coldpass::schedule;

fn file(flow: &str, method: &str, angle: f64, mu: f64, d0: f64, df: f64, extra: &str) -> String {
    format!(
        r#"
title: reference case
material:
  density_kg_m3: 8000
  specific_heat_j_kg_k: 450
  flow: {flow}
start:
  diameter: {d0}
dies:
  semi_angle_deg: {angle}
  friction: {mu}
limits:
  method: {method}
  draw_ratio_warn: 1
  draw_ratio_max: 1
  reduction_warn: 0.9999  # the heavy-reduction line out of the way (above the 99.75 % the solvers try): these checks are about the ratio limit
target:
  diameter: {df}
  draw_ratio_aim: 1  # held to the limit itself: these checks are about the ratio limit
{extra}
"#
    )
}

fn passes(text: &str) -> Result<usize, DesignError> {
    let f = schedule::parse(text).expect("the case parses");
    design(&f, &DesignOptions::default()).map(|d| d.summary.draw_passes)
}

/// The published fewest passes, and how far the count is from a whole number
/// (a case on the boundary would not test anything).
fn sachs_passes(angle_deg: f64, mu: f64, d0: f64, df: f64) -> (usize, f64) {
    let b = mu / angle_deg.to_radians().tan();
    let r_max = 1.0 - (1.0 + b).powf(-1.0 / b);
    let x = (2.0 * (d0 / df).ln()) / (1.0 / (1.0 - r_max)).ln();
    (x.ceil() as usize, x - x.floor())
}

#[test]
fn perfectly_plastic_sachs_fewest_passes_match_the_slab_limit() {
    // Two cases of our own, each well away from a whole number of passes.
    for (angle, mu, d0, df) in [(6.0, 0.05, 10.0, 2.0), (8.0, 0.10, 8.0, 1.5)] {
        let (expect, frac) = sachs_passes(angle, mu, d0, df);
        assert!((0.05..0.95).contains(&frac), "case on a boundary: {frac}");
        for strategy in ["equal-ratio", "equal-strain"] {
            let text = file(
                "{law: perfectly-plastic, yield_mpa: 250}",
                "sachs",
                angle,
                mu,
                d0,
                df,
                &format!("  strategy: {strategy}"),
            );
            assert_eq!(
                passes(&text).unwrap(),
                expect,
                "{angle} deg, mu {mu}, {d0} -> {df}, {strategy}"
            );
            // One pass fewer cannot be done: the error asks for the
            // published count, and the ratio limit is what sets it.
            let text = format!("{text}  max_passes: {}\n", expect - 1);
            match passes(&text) {
                Err(DesignError::TooFewPasses {
                    passes_needed,
                    set_by,
                    ..
                }) => {
                    assert_eq!(passes_needed as usize, expect);
                    assert!(set_by.contains("limits.draw_ratio_max 1"), "{set_by}");
                }
                other => panic!("{other:?}"),
            }
        }
    }
}

#[test]
fn ideal_work_hollomon_one_pass_reaches_n_plus_one() {
    // Hosford & Caddell (from memory): eps_max = n + 1 from the annealed state.
    let n = 0.3;
    let d0 = 10.0;
    for (factor, expect) in [(0.99, 1), (1.01, 2)] {
        let eps = (n + 1.0) * factor;
        let df = d0 * (-eps / 2.0f64).exp();
        let text = file(
            &format!("{{law: hollomon, k_mpa: 500, n: {n}}}"),
            "ideal",
            6.0,
            0.05,
            d0,
            df,
            "",
        );
        assert_eq!(passes(&text).unwrap(), expect, "eps = {eps}");
    }
}
