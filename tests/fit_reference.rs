//! `coldpass::fit` against published relations and textbook examples.

use coldpass::fit::{considere_uts_mpa, engineering_uts_mpa, fit_law, FitLaw};
use coldpass::FlowLaw;

#[test]
fn hollomon_from_two_points_gives_callisters_exponent() {
    // Callister, Materials Science and Engineering, example on the
    // strain-hardening exponent (from memory): a true stress of 415 MPa at a
    // true strain of 0.10 with K = 1035 MPa gives n = 0.40. K is the stress
    // at true strain 1, so the two points are (0.10, 415) and (1.0, 1035).
    let fit = fit_law(FitLaw::Hollomon, &[0.10, 1.0], &[415.0, 1035.0]).unwrap();
    let n = fit.param("n").unwrap();
    let k = fit.param("k_mpa").unwrap();
    assert!((n - 0.40).abs() < 0.005, "n = {n}");
    // Two points fix the law exactly: n = log10(1035/415) = 0.396 942 ...
    // (achieved to 2e-16, K to 2e-13 MPa).
    assert!((n - (1035.0f64 / 415.0).log10()).abs() < 1e-12, "n = {n}");
    assert!((k - 1035.0).abs() < 1e-12 * 1035.0, "K = {k}");
}

#[test]
fn considere_uts_matches_the_reference_sheet() {
    // Considere criterion, engineering UTS = K n^n e^-n (published; check
    // values computed on the project's docs/physics.md): K = 315, n = 0.54
    // gives 131.6 MPa; K = 1275, n = 0.45 gives 567.6 MPa.
    for (k, n, uts) in [(315.0, 0.54, 131.6), (1275.0, 0.45, 567.6)] {
        let closed = considere_uts_mpa(k, n).unwrap();
        assert!((closed - uts).abs() < 0.05, "closed form {closed} vs {uts}");
        let exact: f64 = k * n.powf(n) * (-n).exp();
        assert!((closed / exact - 1.0).abs() < 1e-12, "{closed} vs {exact}");
        // The same figure by maximising sigma(eps) exp(-eps) for the law,
        // reached at the uniform strain eps = n (Considere).
        let (scanned, at) = engineering_uts_mpa(&FlowLaw::hollomon(k, n).unwrap());
        assert!((scanned - uts).abs() < 0.05, "scan {scanned} vs {uts}");
        // The peak is flat: its value to rounding, its strain to about the
        // square root of machine epsilon (golden section; achieved 9e-9).
        assert!(
            (scanned / exact - 1.0).abs() < 1e-12,
            "{scanned} vs {exact}"
        );
        assert!((at - n).abs() < 1e-7, "uniform strain {at} vs n = {n}");
    }
}

#[test]
fn considere_rejects_an_exponent_of_one_or_more() {
    let err = considere_uts_mpa(500.0, 1.2).unwrap_err();
    assert!(err.to_string().contains("`n` = 1.2"), "{err}");
}
