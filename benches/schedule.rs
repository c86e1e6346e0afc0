//! Benchmarks of a 25-pass schedule.
//!
//! `schedule/25-passes/*` evaluates the whole `check` core (every method,
//! every pass's optimum angle, limits and notes). `core-25/*` times the
//! pass mechanics alone over the same 25 passes (8 mm down by 19 % area a
//! pass, an anneal after pass 13; bench data only), the cases of issue 14:
//!
//! - `core-25/fixed-angle/voce`: every method at the die's own angle
//!   (target under 3 us);
//! - `core-25/optimum-upper-bound/voce` and `core-25/optimum-max/voce`: the
//!   same plus each pass's optimum angle (target under 20 us);
//! - `core-25/optimum-max/hollomon`: a law without a closed Sachs form, from
//!   strain 0 after the anneal (target under 100 us).

use coldpass::evaluation::{evaluate, EvaluateOptions};
use coldpass::schedule;
use coldpass::{FlowLaw, Method};
use criterion::{black_box, criterion_group, criterion_main, Criterion};

/// A 25-pass copper schedule, 8 mm down by 19 % area a pass (bench data only).
fn twenty_five_passes(law: &str) -> String {
    let mut text = format!(
        "material:
  density_kg_m3: 8940
  specific_heat_j_kg_k: 385
  flow: {law}
  cold_work_limit: 4.0
start:
  diameter: 8.0
dies:
  semi_angle_deg: 6
  friction: 0.05
  efficiency: 0.65
limits:
  method: max
  draw_ratio_warn: 0.6
  draw_ratio_max: 0.8
  delta_max: 3.0
line:
  finish_speed_m_s: 20
  block_power_kw: 55
passes:
"
    );
    let mut d = 8.0f64;
    for i in 0..25 {
        d *= 0.9f64;
        text.push_str(&format!("  - exit: {d}\n"));
        if i == 12 {
            text.push_str("  - anneal: {}\n");
        }
    }
    text
}

// The same 25 passes as `twenty_five_passes`, as core pass inputs.
#[path = "common/core_25.rs"]
mod core_25;
use core_25::{core_passes, run as run_core};

fn bench(c: &mut Criterion) {
    let voce = FlowLaw::voce(80.0, 470.0, 0.8).unwrap();
    let hollomon = FlowLaw::hollomon(530.0, 0.44).unwrap();
    let passes = core_passes();
    for (name, law, optimum) in [
        ("fixed-angle/voce", &voce, None),
        ("optimum-upper-bound/voce", &voce, Some(Method::UpperBound)),
        ("optimum-max/voce", &voce, Some(Method::Max)),
        ("fixed-angle/hollomon", &hollomon, None),
        (
            "optimum-upper-bound/hollomon",
            &hollomon,
            Some(Method::UpperBound),
        ),
        ("optimum-max/hollomon", &hollomon, Some(Method::Max)),
    ] {
        c.bench_function(&format!("core-25/{name}"), |b| {
            b.iter(|| run_core(black_box(law), black_box(&passes), optimum))
        });
    }
    for (name, law) in [
        (
            "voce",
            "{law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}",
        ),
        ("hollomon", "{law: hollomon, k_mpa: 530, n: 0.44}"),
    ] {
        let file = schedule::parse(&twenty_five_passes(law)).unwrap();
        let opts = EvaluateOptions::default();
        c.bench_function(&format!("schedule/25-passes/{name}"), |b| {
            b.iter(|| evaluate(black_box(&file), &opts).unwrap())
        });
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
