//! Strength of drawn wire from the law and the Considere condition, and the
//! entry yield of annealed stock (issue 9; docs/physics.md, "More single-pass
//! physics" and "Flow-stress laws").

use coldpass::flow::ENTRY_YIELD_OFFSET_STRAIN;
use coldpass::{Beyond, FlowLaw};

/// The largest engineering stress sigma(e + d) e^(-d) over d by a
/// fine scan (step 1e-4 over [0, 3]), an independent check of the closed forms.
fn scanned_strength(law: &FlowLaw, e: f64) -> f64 {
    (0..=30_000)
        .map(|i| {
            let d = i as f64 * 1e-4;
            law.stress_mpa(e + d) * (-d).exp()
        })
        .fold(0.0, f64::max)
}

#[test]
fn annealed_hollomon_tensile_strength_is_k_n_to_the_n_e_to_minus_n() {
    // Considere (published): engineering UTS = K n^n e^(-n); check values
    // K 315, n 0.54 -> 131.6 MPa; K 1275, n 0.45 -> 567.6 MPa (docs/physics.md).
    for (k, n, uts) in [(315.0, 0.54, 131.6), (1275.0, 0.45, 567.6)] {
        let law = FlowLaw::hollomon(k, n).unwrap();
        assert_eq!(law.considere_strain(), n);
        let s = law.tensile_strength_mpa(0.0).unwrap();
        assert!((s - uts).abs() < 0.05, "{s}");
        let exact: f64 = k * n.powf(n) * (-n).exp();
        assert!((s / exact - 1.0).abs() < 1e-12);
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
            let ours = law.tensile_strength_mpa(e).unwrap();
            let scan = scanned_strength(law, e);
            assert!(
                (ours / scan - 1.0).abs() < 1e-7,
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
    assert!((law.considere_strain() - 0.40).abs() < 1e-12);
    assert_eq!(
        law.tensile_strength_mpa(0.87).unwrap(),
        law.stress_mpa(0.87)
    );
    assert!(law.tensile_strength_mpa(0.2).unwrap() > law.stress_mpa(0.2));
}

#[test]
fn annealed_hollomon_stock_has_a_positive_entry_yield() {
    // K 0^n = 0; the entry yield is read at the 0.2 % offset strain instead.
    let law = FlowLaw::hollomon(315.0, 0.54).unwrap();
    assert_eq!(law.stress_mpa(0.0), 0.0);
    let y = law.entry_yield_mpa(0.0);
    assert_eq!(ENTRY_YIELD_OFFSET_STRAIN, 0.002);
    assert!((y - 315.0 * 0.002f64.powf(0.54)).abs() < 1e-12, "{y}");
    assert!(
        y > 5.0,
        "a 5 MPa back pull on annealed copper is under its yield: {y}"
    );
    assert_eq!(law.entry_yield_mpa(0.3), law.stress_mpa(0.3));
}
