//! Times the core over the 25-pass schedule of `benches/schedule.rs`
//! (`core-25/*`) for `benches/scipy_side_by_side.py`, which runs the same
//! mechanics in SciPy and prints the ratio. Prints one JSON object: for each
//! case, the best-of-rounds time of one whole schedule in microseconds.
//!
//! Usage: `cargo run --release --example core_25_passes -- [ROUNDS] [CASE]`;
//! with CASE (a part of a case's name, `fixed-angle/voce`) only the cases
//! that contain it run (for `perf record`).

use std::hint::black_box;
use std::time::Instant;

use coldpass::{FlowLaw, Method};

#[path = "../benches/common/core_25.rs"]
mod core_25;
use core_25::{core_passes, run};

fn main() {
    let rounds: u32 = std::env::args()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .unwrap_or(20);
    let voce = FlowLaw::voce(80.0, 470.0, 0.8).unwrap();
    let hollomon = FlowLaw::hollomon(530.0, 0.44).unwrap();
    let only = std::env::args().nth(2).unwrap_or_default();
    let passes = core_passes();
    let cases = [
        ("fixed-angle/voce", &voce, None),
        ("optimum-upper-bound/voce", &voce, Some(Method::UpperBound)),
        ("optimum-max/voce", &voce, Some(Method::Max)),
        ("fixed-angle/hollomon", &hollomon, None),
        ("optimum-max/hollomon", &hollomon, Some(Method::Max)),
    ];
    let mut out = Vec::new();
    for (name, law, optimum) in cases {
        if !name.contains(only.as_str()) {
            continue;
        }
        // Calibrate a batch to about 20 ms, then keep the best of `rounds` batches.
        let mut batch = 1u32;
        loop {
            let t = Instant::now();
            for _ in 0..batch {
                black_box(run(black_box(law), black_box(&passes), optimum));
            }
            if t.elapsed().as_secs_f64() > 0.02 || batch > 1 << 20 {
                break;
            }
            batch *= 2;
        }
        let mut best = f64::INFINITY;
        for _ in 0..rounds {
            let t = Instant::now();
            for _ in 0..batch {
                black_box(run(black_box(law), black_box(&passes), optimum));
            }
            best = best.min(t.elapsed().as_secs_f64() / batch as f64);
        }
        out.push(format!("\"{name}\": {:.4}", best * 1e6));
    }
    println!("{{{}}}", out.join(", "));
}
