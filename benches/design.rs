//! Benchmarks of `design` (demo values):
//!
//! - `design 30 passes, 2 anneals, 6 angles`: an equal-ratio schedule whose
//!   two anneals the cold-work limit forces, from a six-angle die stock
//!   (target: under 2 ms in the release build, issues 10 and 14);
//! - `design growth/N`: the same mill drawing to finer sizes, so that the
//!   design has about N passes (growth with the passes designed should be
//!   near linear);
//! - `design with no solution`: reductions of 19-20 % with at most two
//!   anneals, which no split meets within 40 passes (target: under 50 ms);
//! - `design temperature limit below ambient`: refused as the file is read
//!   (issue 15: it must not search).
//!
//! Run with `cargo bench --bench design`.

use coldpass::design::{design, DesignOptions};
use coldpass::schedule;
use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};

/// The 30-pass case (demo values), shared with `examples/design_30_passes.rs`.
const FILE: &str = include_str!("data/design-30.yaml");

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

    let mut group = c.benchmark_group("design growth");
    for finish_mm in [3.5, 0.87, 0.2, 0.02] {
        let text = FILE
            .replace("diameter: 0.87", &format!("diameter: {finish_mm}"))
            .replace("max_passes: 40", "max_passes: 200");
        let file = schedule::parse(&text).expect("the growth file parses");
        let n = design(&file, &options)
            .expect("the growth file has a design")
            .summary
            .draw_passes;
        group.bench_with_input(BenchmarkId::from_parameter(n), &file, |b, f| {
            b.iter(|| design(black_box(f), &options).unwrap())
        });
    }
    group.finish();

    let text = FILE.replace(
        "reduction_max: 0.2",
        "reduction_max: 0.2\n  reduction_min: 0.19\n  max_anneals: 2",
    );
    let none = schedule::parse(&text).expect("the infeasible file parses");
    assert!(design(&none, &options).is_err());
    c.bench_function("design with no solution", |b| {
        b.iter(|| design(black_box(&none), &options).unwrap_err())
    });

    let text = FILE
        .replace(
            "delta_max: 4.0",
            "delta_max: 4.0\n  wire_temperature_max_c: 20",
        )
        .replace("max_passes: 40", "max_passes: 5");
    // Refused as the file is read (issue 15), so the design never starts.
    assert!(schedule::parse(&text).is_err());
    c.bench_function("design temperature limit below ambient", |b| {
        b.iter(|| schedule::parse(black_box(&text)).unwrap_err())
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
