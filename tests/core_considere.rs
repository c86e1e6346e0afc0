//! Strength of drawn wire from the law and the Considere condition, and the
//! entry yield of annealed stock (issue 9; docs/physics.md, "More single-pass
//! physics" and "Flow-stress laws"): `coldpass::evaluation::strength`, the one
//! implementation `check` and `risk` use.

use coldpass::evaluation::strength::{
    considere_strain, entry_yield_mpa, tensile_strength_mpa, YIELD_OFFSET_STRAIN,
};
use coldpass::{Beyond, FlowLaw};

/// The largest engineering stress sigma(e + d) e^(-d) over d by a
/// fine scan (step h = 1e-4 over [0, 3]), an independent check of the solve.
/// The scan's nearest point misses the flat peak by at most h/2, so it reads
/// low by about (h/2)^2 / 2 times the relative curvature there: 1.1e-9 at
/// worst on these laws, hence 3e-9.
fn scanned_strength(law: &FlowLaw, e: f64) -> f64 {
    (0..=30_000)
        .map(|i| {
            let d = i as f64 * 1e-4;
            law.stress_mpa(e + d) * (-d).exp()
        })
        .fold(0.0, f64::max)
}

fn strength(law: &FlowLaw, e: f64) -> f64 {
    tensile_strength_mpa(law, considere_strain(law), e).unwrap()
}

#[test]
fn annealed_hollomon_tensile_strength_is_k_n_to_the_n_e_to_minus_n() {
    // Considere (published): engineering UTS = K n^n e^(-n); check values
    // K 315, n 0.54 -> 131.6 MPa; K 1275, n 0.45 -> 567.6 MPa (docs/physics.md).
    for (k, n, uts) in [(315.0, 0.54, 131.6), (1275.0, 0.45, 567.6)] {
        let law = FlowLaw::hollomon(k, n).unwrap();
        let eu = considere_strain(&law).unwrap();
        // The bisection stops at 1e-13 relative (achieved 7.7e-12, the
        // central-difference slope's own error).
        assert!((eu - n).abs() < 1e-10, "{eu}");
        let s = strength(&law, 0.0);
        assert!((s - uts).abs() < 0.05, "{s}");
        let exact: f64 = k * n.powf(n) * (-n).exp();
        // The peak is flat: a strain off by 1e-7 moves it by about 1e-14.
        assert!((s / exact - 1.0).abs() < 1e-12, "{s} vs {exact}");
    }
}

#[test]
fn strength_of_drawn_wire_matches_a_scan_on_every_smooth_law() {
    let laws = [
        FlowLaw::hollomon(530.0, 0.26).unwrap(),
        FlowLaw::swift(1275.0, 0.05, 0.45).unwrap(),
        FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
        FlowLaw::ludwik(120.0, 400.0, 0.45).unwrap(),
        FlowLaw::linear(100.0, 300.0).unwrap(),
        FlowLaw::perfectly_plastic(250.0).unwrap(),
        FlowLaw::points(vec![[0.0, 100.0], [0.2, 200.0], [1.0, 260.0]], Beyond::Flat).unwrap(),
    ];
    for law in &laws {
        for e in [0.0, 0.05, 0.2, 0.87, 2.0] {
            let ours = strength(law, e);
            let scan = scanned_strength(law, e);
            assert!(
                (ours / scan - 1.0).abs() < 3e-9,
                "{} at {e}: {ours} vs scan {scan}",
                law.name()
            );
        }
    }
}

#[test]
fn past_the_considere_strain_the_strength_is_the_flow_stress() {
    // A Swift law with n 0.45 finished at strain 0.87 is past its Considere
    // strain n - e0 = 0.40: its tensile strength is its flow stress there.
    let law = FlowLaw::swift(1275.0, 0.05, 0.45).unwrap();
    assert!((considere_strain(&law).unwrap() - 0.40).abs() < 1e-10);
    assert_eq!(strength(&law, 0.87), law.stress_mpa(0.87));
    assert!(strength(&law, 0.2) > law.stress_mpa(0.2));
}

#[test]
fn annealed_hollomon_stock_has_a_positive_entry_yield() {
    // K 0^n = 0; the entry yield is read at the 0.2 % offset strain instead.
    let law = FlowLaw::hollomon(315.0, 0.54).unwrap();
    assert_eq!(law.stress_mpa(0.0), 0.0);
    let y = entry_yield_mpa(&law, 0.0, None);
    assert_eq!(YIELD_OFFSET_STRAIN, 0.002);
    assert!((y - 315.0 * 0.002f64.powf(0.54)).abs() < 1e-12, "{y}");
    assert!(
        y > 5.0,
        "a 5 MPa back pull on annealed copper is under its yield: {y}"
    );
    assert_eq!(entry_yield_mpa(&law, 0.3, None), law.stress_mpa(0.3));
}
