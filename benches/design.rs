//! Benchmark of `design`: a 30-pass equal-ratio schedule with two anneals
//! (forced by the cold-work limit) and a six-angle die stock. Target: under
//! 50 ms in the release build (issue 5). The inputs are demo values.

use coldpass::design::{design, DesignOptions};
use coldpass::schedule;
use criterion::{black_box, criterion_group, criterion_main, Criterion};

const FILE: &str = r#"
title: Bench, 10 mm copper to 0.9 mm, two anneals (demo values)
material:
  label: copper (demo values)
  density_kg_m3: 8940
  specific_heat_j_kg_k: 385
  flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}
  cold_work_limit: 2.0
start:
  diameter: 10.0
dies:
  semi_angles_deg: [5, 6, 7, 8, 9, 10]
  friction: 0.05
  friction_factor: 0.09
limits:
  method: max
  draw_ratio_warn: 0.5
  draw_ratio_max: 0.6
  delta_max: 4.0
target:
  diameter: 0.9
  reduction_max: 0.2
  strategy: equal-ratio
  max_passes: 40
"#;

fn bench(c: &mut Criterion) {
    let file = schedule::parse(FILE).expect("the bench file parses");
    let options = DesignOptions::default();
    let d = design(&file, &options).expect("the bench file has a design");
    // The case the target is set for: 30 passes, two anneals, six angles.
    assert_eq!(d.summary.draw_passes, 30);
    assert_eq!(d.summary.anneals.len(), 2);
    assert_eq!(d.summary.die_angles_deg.len(), 6);
    c.bench_function("design 30 passes, 2 anneals, 6 angles", |b| {
        b.iter(|| design(black_box(&file), &options).unwrap())
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
