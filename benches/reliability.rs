//! Benchmarks of the reading guards (issue 15).
//!
//! - `reliability/nested-100000`: a schedule whose title is 100,000 nested
//!   brackets, refused by the shape check before the YAML parser (which took
//!   about 50 s on such a file): target under 10 ms.
//! - `reliability/demo-parse`: the copper demo schedule parsed whole, shape
//!   check included, to show the check costs little on a real file.

use coldpass::schedule;
use criterion::{black_box, criterion_group, criterion_main, Criterion};

fn demo() -> String {
    std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/schedules-demo/copper-building-wire.yaml"
    ))
    .expect("the demo schedule is in the repository")
}

fn bench(c: &mut Criterion) {
    let text = demo();
    let deep = format!(
        "title: {}{}\n{}",
        "[".repeat(100_000),
        "]".repeat(100_000),
        text.lines()
            .filter(|l| !l.starts_with("title:"))
            .collect::<Vec<_>>()
            .join("\n")
    );
    let mut g = c.benchmark_group("reliability");
    g.bench_function("nested-100000", |b| {
        b.iter(|| {
            let r = schedule::parse(black_box(&deep));
            assert!(r.is_err());
        })
    });
    g.bench_function("demo-parse", |b| {
        b.iter(|| schedule::parse(black_box(&text)).expect("the demo parses"))
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
