//! Runs the 30-pass design of `benches/design.rs` (demo values) the number
//! of times given (default 200), for a profiler: `cargo build --release
//! --example design_30_passes`, then `perf record` on the binary.

use coldpass::design::{design, DesignOptions};
use coldpass::schedule;

/// The bench's 30-pass case (demo values).
const FILE: &str = include_str!("../benches/data/design-30.yaml");

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
