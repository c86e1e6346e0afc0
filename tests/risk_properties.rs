//! Invariants of coldpass risk: zero scatter reproduces `check` exactly;
//! a wider symmetric scatter never lowers the break probability of a
//! nominally safe pass (with common random numbers); a seed gives the same
//! report whatever the thread count.

mod common;

use std::sync::atomic::AtomicBool;

use coldpass::evaluation::{evaluate, EvaluateOptions, Flag, StepKind};
use coldpass::risk::{assess, RiskOptions, RiskReport, Sampling};
use coldpass::schedule::{self, ScheduleFile};
use proptest::prelude::*;

fn run(file: &ScheduleFile, samples: u64, seed: u64, sampling: Sampling) -> RiskReport {
    let options = RiskOptions {
        samples,
        seed,
        sampling,
        ..RiskOptions::default()
    };
    assess(file, &options, &|_| {}, &AtomicBool::new(false)).unwrap()
}

fn read(path: &std::path::Path) -> ScheduleFile {
    schedule::parse(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// Every spread of the file set to zero size (sd, cv, tolerances, limits).
fn zeroed(mut file: ScheduleFile) -> ScheduleFile {
    if let Some(s) = file.scatter.as_mut() {
        for sp in [
            &mut s.friction,
            &mut s.semi_angle_deg,
            &mut s.die_diameter_mm,
            &mut s.rod_diameter_mm,
            &mut s.back_tension_mpa,
        ]
        .into_iter()
        .flatten()
        {
            sp.sd = sp.sd.map(|_| 0.0);
            sp.cv = sp.cv.map(|_| 0.0);
            sp.tolerance = sp.tolerance.map(|_| 0.0);
            sp.below = sp.below.map(|_| 0.0);
            sp.above = sp.above.map(|_| 0.0);
        }
        if let Some(f) = s.flow.as_mut() {
            f.sd.values_mut().for_each(|v| *v = 0.0);
        }
    }
    if let Some(f) = file.material.flow_scatter.as_mut() {
        f.sd.values_mut().for_each(|v| *v = 0.0);
    }
    file
}

/// Zero scatter is the nominal schedule: every sample's draw ratio and
/// tensile strength are `check`'s to the last bit, and each probability is 0
/// or 1 as `check`'s figures and flags say (over-draw-limit: ratio > max;
/// near: ratio > warn).
#[test]
fn zero_scatter_reproduces_check_exactly_for_every_demo() {
    for path in common::demo_schedules() {
        let file = zeroed(read(&path));
        let check = evaluate(&file, &EvaluateOptions::default()).unwrap();
        let rep = run(&file, 300, 5, Sampling::LatinHypercube);
        let draws: Vec<_> = check
            .passes
            .iter()
            .filter(|r| r.kind == StepKind::Draw)
            .collect();
        assert_eq!(draws.len(), rep.passes.len(), "{}", path.display());
        for (c, p) in draws.iter().zip(&rep.passes) {
            let r = c.draw_ratio.unwrap();
            let at = format!("{} step {}", path.display(), c.step);
            assert_eq!(p.step, c.step, "{at}");
            assert_eq!(p.draw_ratio, r, "{at}");
            assert_eq!(p.lowest_draw_ratio, r, "{at}");
            assert_eq!(p.highest_draw_ratio, r, "{at}");
            for q in [
                p.draw_ratio_p5,
                p.draw_ratio_p50,
                p.draw_ratio_p95,
                p.draw_ratio_p99,
            ] {
                if r < 2.0 {
                    assert_eq!(q, Some(r), "{at}");
                }
            }
            let one = |b: bool| if b { 1.0 } else { 0.0 };
            // Break: the governing drawing stress at or over the drawn wire's
            // tensile strength, as check reports both.
            let uts = c.tensile_strength_mpa.unwrap_or(c.flow_stress_exit_mpa);
            assert_eq!(p.tensile_strength_mpa, uts, "{at}");
            assert_eq!(
                p.break_probability,
                one(c.governing_draw_stress_mpa.unwrap() >= uts),
                "{at}"
            );
            assert_eq!(
                p.over_max_probability,
                one(c.flags.contains(&Flag::OverDrawLimit)),
                "{at}"
            );
            assert_eq!(
                p.over_warn_probability,
                one(r > check.draw_ratio_warn),
                "{at}"
            );
            if let Some(pw) = p.over_block_power_probability {
                assert_eq!(pw, one(c.flags.contains(&Flag::OverBlockPower)), "{at}");
            }
            assert_eq!(p.break_standard_error, 0.0, "{at}");
        }
    }
}

#[test]
fn the_same_seed_gives_the_same_report_on_one_thread_and_on_two() {
    let file = read(&common::root(
        "schedules-demo/steel-multiblock-scatter.yaml",
    ));
    for sampling in [Sampling::LatinHypercube, Sampling::MonteCarlo] {
        let on = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            let rep = pool.install(|| run(&file, 5000, 11, sampling));
            serde_json::to_string(&rep).unwrap()
        };
        let one = on(1);
        assert_eq!(one, on(2), "{sampling:?}");
        assert_eq!(one, on(2), "{sampling:?}: a second run");
    }
}

#[test]
fn a_different_seed_gives_different_samples() {
    let file = read(&common::root(
        "schedules-demo/steel-multiblock-scatter.yaml",
    ));
    let a = run(&file, 2000, 1, Sampling::LatinHypercube);
    let b = run(&file, 2000, 2, Sampling::LatinHypercube);
    assert_ne!(
        a.passes[3].highest_draw_ratio,
        b.passes[3].highest_draw_ratio
    );
}

/// A one-pass, perfectly plastic schedule (Sachs governs) with one input
/// scattering normally: `which` 0 friction, 1 back tension, 2 yield stress.
fn one_pass(reduction: f64, angle: f64, mu: f64, back: f64, which: u8, sd_frac: f64) -> String {
    let d1 = 5.0 * (1.0 - reduction).sqrt();
    let (scatter, flow_scatter) = match which {
        0 => (
            format!(
                "scatter:\n  friction: {{distribution: normal, sd: {}, between_dies: 0}}\n",
                sd_frac * mu
            ),
            String::new(),
        ),
        1 => (
            format!(
                "scatter:\n  back_tension_mpa: {{distribution: normal, sd: {}, between_dies: 0}}\n",
                sd_frac * back
            ),
            String::new(),
        ),
        _ => (
            String::new(),
            format!(
                "  flow_scatter: {{sd: {{yield_mpa: {}}}}}\n",
                sd_frac * 300.0
            ),
        ),
    };
    format!(
        "material:\n  density_kg_m3: 7850\n  specific_heat_j_kg_k: 470\n  flow: {{law: perfectly-plastic, yield_mpa: 300}}\n{flow_scatter}\
start: {{diameter: 5.0}}\ndies: {{semi_angle_deg: {angle}, friction: {mu}}}\n\
limits: {{method: sachs, draw_ratio_warn: 0.6, draw_ratio_max: 0.8}}\n\
passes:\n  - {{exit: {d1}, back_tension_mpa: {back}}}\n{scatter}"
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 40, failure_persistence: None, ..ProptestConfig::default() })]

    /// Doubling the sd of a normal input never lowers the break probability
    /// of a pass that is safe at its nominal inputs, when the draw ratio is
    /// monotone in that input (Sachs, perfectly plastic: rising in friction
    /// and back tension, falling in the yield stress). With common random
    /// numbers (the same seed, so the same scores) every sample that broke
    /// at sd still breaks at 2 sd: its input moved further the same way. The
    /// sd stays at most an eighth of the nominal so no drawn value leaves its
    /// range in 1,000 samples (|z| < 3.3).
    #[test]
    fn doubling_an_sd_never_lowers_a_break_probability(
        reduction in 0.15f64..0.45,
        angle in 4.0f64..12.0,
        mu in 0.03f64..0.15,
        nominal in 0.85f64..0.99,
        which in 0u8..3,
        sd_frac in 0.01f64..0.0625,
        seed in 0u64..1000,
    ) {
        // Back tension that puts the nominal draw ratio near `nominal`, so
        // breaks are sampled: from the perfectly plastic Sachs solution
        // sigma_d/Y = (sigma_b/Y) e^(-B eps) + (1+B)/B (1 - e^(-B eps))
        // (Dieter ch. 19), solved for sigma_b.
        let eps = -(1.0 - reduction).ln();
        let b = mu / angle.to_radians().tan();
        let decay = (-b * eps).exp();
        let back = 300.0 * (nominal - (1.0 + b) / b * (1.0 - decay)) / decay;
        prop_assume!(back > 5.0);
        let narrow = schedule::parse(&one_pass(reduction, angle, mu, back, which, sd_frac)).unwrap();
        let wide = schedule::parse(&one_pass(reduction, angle, mu, back, which, 2.0 * sd_frac)).unwrap();
        let a = run(&narrow, 1000, seed, Sampling::LatinHypercube);
        prop_assume!(a.passes[0].draw_ratio < 1.0);
        let b = run(&wide, 1000, seed, Sampling::LatinHypercube);
        prop_assert_eq!(a.summary.samples_refused, 0);
        prop_assert_eq!(b.summary.samples_refused, 0);
        prop_assert!(
            b.passes[0].break_probability >= a.passes[0].break_probability,
            "sd {}: {} -> 2 sd: {}", sd_frac, a.passes[0].break_probability, b.passes[0].break_probability
        );
        prop_assert!((a.passes[0].draw_ratio - nominal).abs() < 1e-6);
    }
}
