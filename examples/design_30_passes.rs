//! Runs the 30-pass design of `benches/design.rs` (demo values) the number
//! of times given (default 200), for a profiler: `cargo build --release
//! --example design_30_passes`, then `perf record` on the binary.

use coldpass::design::{design, DesignOptions};
use coldpass::schedule;

const FILE: &str = r#"
title: Bench, 10 mm copper to 0.87 mm, two anneals (demo values)
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
  diameter: 0.87
  reduction_max: 0.2
  strategy: equal-ratio
  max_passes: 40
"#;

fn main() {
    let rounds: usize = std::env::args()
        .nth(1)
        .and_then(|a| a.parse().ok())
        .unwrap_or(200);
    let file = schedule::parse(FILE).expect("the file parses");
    let options = DesignOptions::default();
    let mut passes = 0;
    let t = std::time::Instant::now();
    for _ in 0..rounds {
        passes = design(&file, &options)
            .expect("a design")
            .summary
            .draw_passes;
    }
    let per = t.elapsed().as_secs_f64() / rounds as f64;
    println!("{passes} passes, {:.3} ms a design", per * 1e3);
}
