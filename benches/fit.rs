//! Benchmark of `coldpass fit`'s core: every law fitted to a 100,000-point
//! engineering record (elastic part, hardening to maximum load, necking).
//! Target (issue 14): the whole `coldpass fit` process on such a record under
//! 40 ms in the release build, so the core well under that.
//!
//!     cargo bench --bench fit

use coldpass::fit::{fit_law, fit_record, FitLaw, FitOptions};
use criterion::{black_box, criterion_group, criterion_main, Criterion};

/// A record of `m` points from Swift K = 330 MPa, e0 = 0.015, n = 0.48 with
/// E = 117 GPa (demo values), with a deterministic +-0.3 MPa ripple as noise.
fn record(m: usize) -> (Vec<f64>, Vec<f64>) {
    let e_mpa = 117_000.0;
    let law = |ep: f64| 330.0 * (0.015 + ep).powf(0.48);
    let elastic = m / 20;
    let necking = m / 10;
    let plastic = m - elastic - necking;
    let mut strain = Vec::with_capacity(m);
    let mut stress = Vec::with_capacity(m);
    let s_y = law(0.0);
    for i in 0..elastic {
        let s = s_y * i as f64 / elastic as f64;
        strain.push(s / e_mpa);
        stress.push(s);
    }
    let eu = 0.465;
    for i in 0..plastic {
        let ep = eu * (i + 1) as f64 / plastic as f64;
        let st = law(ep);
        let et = ep + st / e_mpa;
        strain.push(et.exp_m1());
        stress.push(st * (-et).exp());
    }
    let (e_top, s_top) = (*strain.last().unwrap(), *stress.last().unwrap());
    for i in 0..necking {
        let t = (i + 1) as f64 / necking as f64;
        strain.push(e_top + 0.1 * t);
        stress.push(s_top * (1.0 - 0.3 * t * t));
    }
    for (i, s) in stress.iter_mut().enumerate() {
        *s = (*s + 0.3 * ((i as f64 * 12.9898).sin() * 43_758.545).fract()).max(0.0);
    }
    stress[0] = 0.0;
    (strain, stress)
}

fn bench(c: &mut Criterion) {
    let (strain, stress) = record(100_000);
    let options = FitOptions {
        reach_strain: Some(3.5),
        ..FitOptions::default()
    };
    let mut g = c.benchmark_group("fit");
    g.sample_size(10);
    g.bench_function("every law, 100000-point record", |b| {
        b.iter(|| fit_record(black_box(&strain), black_box(&stress), &options).unwrap())
    });
    let report = fit_record(&strain, &stress, &options).unwrap();
    for law in [FitLaw::Ludwik, FitLaw::Swift, FitLaw::Voce] {
        g.bench_function(format!("{law} alone"), |b| {
            b.iter(|| {
                fit_law(
                    law,
                    black_box(&report.plastic_strain),
                    black_box(&report.true_stress_mpa),
                )
                .unwrap()
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
