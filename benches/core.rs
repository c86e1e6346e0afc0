//! Benchmarks of the core's hot paths: one pass by every method, and the
//! optimum-angle search, for each flow law. Targets (2-core machine): every
//! method together under 5 us a pass; the optimum-angle search under 100 us.

use coldpass::{
    analyse_pass, optimum_semi_angle, Beyond, Die, DrawPass, FlowLaw, Method, Settings,
};
use criterion::{black_box, criterion_group, criterion_main, Criterion};

fn laws() -> Vec<FlowLaw> {
    vec![
        FlowLaw::perfectly_plastic(250.0).unwrap(),
        FlowLaw::linear(200.0, 150.0).unwrap(),
        FlowLaw::hollomon(530.0, 0.26).unwrap(),
        FlowLaw::ludwik(120.0, 400.0, 0.45).unwrap(),
        FlowLaw::swift(600.0, 0.02, 0.3).unwrap(),
        FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
        FlowLaw::points(
            vec![
                [0.0, 100.0],
                [0.2, 180.0],
                [0.5, 250.0],
                [1.0, 300.0],
                [2.0, 340.0],
                [4.0, 370.0],
            ],
            Beyond::Flat,
        )
        .unwrap(),
    ]
}

fn pass() -> DrawPass {
    let mut die = Die::new(6.0, 0.05).unwrap();
    die.efficiency = Some(0.65);
    DrawPass {
        entry_diameter_mm: 5.0,
        exit_diameter_mm: 4.4,
        strain_before: 0.6,
        back_tension_mpa: 20.0,
        die,
    }
}

fn bench(c: &mut Criterion) {
    let settings = Settings::default();
    let p = pass();
    for law in laws() {
        c.bench_function(&format!("pass/all-methods/{}", law.name()), |b| {
            b.iter(|| analyse_pass(black_box(&law), black_box(&p), &settings).unwrap())
        });
        c.bench_function(&format!("pass/optimum-angle/{}", law.name()), |b| {
            b.iter(|| {
                optimum_semi_angle(black_box(&law), black_box(&p), &settings, Method::Max).unwrap()
            })
        });
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
