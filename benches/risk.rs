//! Benchmark of `risk`'s core loop: 100,000 samples of a 25-pass schedule,
//! the governing method `max` (so every method is computed), with friction,
//! die diameter, rod diameter, semi-angle, back tension and the flow law all
//! scattering. Target: under 1 s on 2 cores (samples per second =
//! 100,000 / the time reported). `100k-samples/*` is the whole assessment (the
//! nominal check, the model, the sampling, the report); `loop/*` the
//! sampling loop alone on a prepared model and plan.

use std::sync::atomic::AtomicBool;

use coldpass::risk::{assess, sample, spreads, Model, Plan, RiskOptions, Sampling};
use coldpass::schedule;
use coldpass::Method;
use criterion::{black_box, criterion_group, criterion_main, Criterion};

/// A 25-pass copper schedule, 8 mm down by 19 % area a pass, with an anneal
/// and scatter on every input (bench data only).
fn twenty_five_passes(law: &str, flow_sd: &str) -> String {
    let mut text = format!(
        "material:
  density_kg_m3: 8940
  specific_heat_j_kg_k: 385
  flow: {law}
  flow_scatter: {flow_sd}
start:
  diameter: 8.0
dies:
  semi_angle_deg: 6
  friction: 0.05
limits:
  method: max
  draw_ratio_warn: 0.6
  draw_ratio_max: 0.8
line:
  finish_speed_m_s: 20
  block_power_kw: 55
scatter:
  friction: {{distribution: lognormal, cv: 0.2, between_dies: 0.7}}
  die_diameter_mm: {{distribution: truncated-normal, sd: 0.004, below: 0, above: 0.012, between_dies: 0}}
  rod_diameter_mm: {{distribution: normal, sd: 0.05}}
  semi_angle_deg: {{distribution: uniform, tolerance: 0.5, between_dies: 0}}
  back_tension_mpa: {{distribution: normal, cv: 0.1, between_dies: 1}}
passes:
"
    );
    let mut d = 8.0f64;
    for i in 0..25 {
        d *= 0.9f64;
        text.push_str(&format!("  - {{exit: {d}, back_tension_mpa: 20}}\n"));
        if i == 12 {
            text.push_str("  - anneal: {}\n");
        }
    }
    text
}

fn bench(c: &mut Criterion) {
    let mut group = c.benchmark_group("risk");
    group.sample_size(10);
    for (name, law, sd) in [
        (
            "voce",
            "{law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}",
            "{sd: {sigma0_mpa: 5, saturation_mpa: 12}, correlation: [{between: [sigma0_mpa, saturation_mpa], r: 0.5}]}",
        ),
        (
            "hollomon",
            "{law: hollomon, k_mpa: 530, n: 0.44}",
            "{sd: {k_mpa: 15, n: 0.01}, correlation: [{between: [k_mpa, n], r: 0.8}]}",
        ),
    ] {
        let file = schedule::parse(&twenty_five_passes(law, sd)).unwrap();
        let options = RiskOptions {
            samples: 100_000,
            seed: 1,
            sampling: Sampling::LatinHypercube,
            ..RiskOptions::default()
        };
        let cancel = AtomicBool::new(false);
        group.bench_function(format!("100k-samples/25-passes/{name}"), |b| {
            b.iter(|| assess(black_box(&file), &options, &|_| {}, &cancel).unwrap())
        });
        let model = Model::new(&file, Method::Max, spreads(&file).unwrap().0).unwrap();
        let mut nominal = model.buffer();
        model.evaluate(None, &mut nominal).unwrap();
        let plan = Plan::new(100_000, 1, Sampling::LatinHypercube, model.dims);
        group.bench_function(format!("loop/100k-samples/25-passes/{name}"), |b| {
            b.iter(|| sample(black_box(&model), &plan, &nominal.ratio, &|_| {}, &cancel).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
