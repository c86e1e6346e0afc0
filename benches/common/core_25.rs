//! The 25-pass core case shared by `benches/schedule.rs` (`core-25/*`) and
//! `examples/core_25_passes.rs` (timed beside SciPy by
//! `benches/scipy_side_by_side.py`), so both time the same work.

use coldpass::pass::PreparedPass;
use coldpass::{Die, DrawPass, FlowLaw, Method, Settings};

/// 8 mm down by 10 % in diameter a pass, an anneal after pass 13 (bench data only).
pub fn core_passes() -> Vec<DrawPass> {
    let mut die = Die::new(6.0, 0.05).unwrap();
    die.efficiency = Some(0.65);
    let mut passes = Vec::new();
    let (mut d, mut strain) = (8.0f64, 0.0f64);
    for i in 0..25 {
        let exit = d * 0.9;
        passes.push(DrawPass {
            entry_diameter_mm: d,
            exit_diameter_mm: exit,
            strain_before: strain,
            back_tension_mpa: 0.0,
            die,
        });
        strain += 2.0 * (d / exit).ln();
        d = exit;
        if i == 12 {
            strain = 0.0;
        }
    }
    passes
}

/// Every pass's mechanics at its own die and, with `optimum`, its optimum
/// angle by that method: what `check` does per pass (one prepared pass for
/// both, as `evaluation::mechanics` does).
pub fn run(law: &FlowLaw, passes: &[DrawPass], optimum: Option<Method>) -> f64 {
    let settings = Settings::default();
    let mut total = 0.0;
    for p in passes {
        let prepared = PreparedPass::new(law, p, &settings).unwrap();
        let m = prepared.own_mechanics().unwrap();
        total += m.draw_stress_mpa.sachs;
        if let Some(method) = optimum {
            total += prepared
                .own_optimum_semi_angle(method)
                .unwrap()
                .unwrap()
                .semi_angle_deg;
        }
    }
    total
}
