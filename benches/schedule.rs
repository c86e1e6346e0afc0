//! Benchmark of `check`'s core: evaluating a 25-pass schedule, every method
//! and every pass's optimum angle included. Target: under 2 ms.

use coldpass::evaluation::{evaluate, EvaluateOptions};
use coldpass::schedule;
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

fn bench(c: &mut Criterion) {
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
