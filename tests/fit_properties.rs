//! A fit recovers the parameters that made its data: each law's stress at
//! 200 strains from 0.005 to 0.40, plus Gaussian noise of 0.3 MPa from a
//! seeded generator passed in (no global randomness). Stated tolerance:
//! every parameter within 3 % of the value that made the data (Swift's e0,
//! the least determined, within 10 % or 0.002 absolute), and an RMS error within
//! 20 % of the noise.

use coldpass::fit::{fit_law, FitLaw};
use proptest::prelude::*;

const NOISE_MPA: f64 = 0.3;

/// SplitMix64 (Steele, Lea & Flood 2014; common practice) with Box-Muller
/// normals: small, seeded, and all the test needs.
struct Noise(u64);

impl Noise {
    fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

fn data(stress: impl Fn(f64) -> f64, noise: &mut Noise) -> (Vec<f64>, Vec<f64>) {
    let x: Vec<f64> = (0..200).map(|i| 0.005 + 0.395 * i as f64 / 199.0).collect();
    let y = x
        .iter()
        .map(|&e| stress(e) + NOISE_MPA * noise.normal())
        .collect();
    (x, y)
}

fn recovers(law: FitLaw, truth: &[(&str, f64)], x: &[f64], y: &[f64]) -> Result<(), TestCaseError> {
    let fit = fit_law(law, x, y).map_err(|e| TestCaseError::fail(e.to_string()))?;
    prop_assert!(fit.converged, "{law} did not converge");
    for &(name, want) in truth {
        let got = fit.param(name).unwrap();
        let ok = if name == "eps0" {
            (got - want).abs() <= (0.10 * want).max(0.002)
        } else {
            (got - want).abs() <= 0.03 * want.abs()
        };
        prop_assert!(ok, "{law} {name}: fitted {got}, made with {want}");
    }
    prop_assert!(
        (fit.rms_mpa - NOISE_MPA).abs() < 0.2 * NOISE_MPA,
        "{law} RMS {} vs noise {NOISE_MPA}",
        fit.rms_mpa
    );
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn hollomon_is_recovered(k in 200.0..1400.0f64, n in 0.1..0.6f64, seed: u64) {
        let (x, y) = data(|e| k * e.powf(n), &mut Noise(seed));
        recovers(FitLaw::Hollomon, &[("k_mpa", k), ("n", n)], &x, &y)?;
    }

    #[test]
    fn linear_is_recovered(yld in 50.0..400.0f64, h in 100.0..1500.0f64, seed: u64) {
        let (x, y) = data(|e| yld + h * e, &mut Noise(seed));
        recovers(FitLaw::Linear, &[("yield_mpa", yld), ("hardening_modulus_mpa", h)], &x, &y)?;
    }

    #[test]
    fn perfectly_plastic_is_recovered(yld in 50.0..400.0f64, seed: u64) {
        let (x, y) = data(|_| yld, &mut Noise(seed));
        recovers(FitLaw::PerfectlyPlastic, &[("yield_mpa", yld)], &x, &y)?;
    }

    #[test]
    fn ludwik_is_recovered(s0 in 50.0..300.0f64, k in 200.0..800.0f64, n in 0.3..0.7f64, seed: u64) {
        let (x, y) = data(|e| s0 + k * e.powf(n), &mut Noise(seed));
        recovers(FitLaw::Ludwik, &[("sigma0_mpa", s0), ("k_mpa", k), ("n", n)], &x, &y)?;
    }

    #[test]
    fn swift_is_recovered(k in 300.0..1000.0f64, e0 in 0.005..0.05f64, n in 0.15..0.5f64, seed: u64) {
        let (x, y) = data(|e| k * (e0 + e).powf(n), &mut Noise(seed));
        recovers(FitLaw::Swift, &[("k_mpa", k), ("eps0", e0), ("n", n)], &x, &y)?;
    }

    #[test]
    fn voce_is_recovered(s0 in 30.0..300.0f64, rise in 50.0..400.0f64, ec in 0.05..0.3f64, seed: u64) {
        let ss = s0 + rise;
        let (x, y) = data(|e| ss - rise * (-e / ec).exp(), &mut Noise(seed));
        recovers(FitLaw::Voce, &[("sigma0_mpa", s0), ("saturation_mpa", ss), ("eps_c", ec)], &x, &y)?;
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Any numbers at all give a report or an error, never a panic.
    #[test]
    fn any_record_gives_a_report_or_an_error(
        strain in proptest::collection::vec(proptest::num::f64::ANY, 0..80),
        stress in proptest::collection::vec(proptest::num::f64::ANY, 0..80),
        sorted in any::<bool>(),
    ) {
        let mut strain = strain;
        if sorted {
            strain.retain(|v| v.is_finite());
            strain.sort_by(f64::total_cmp);
        }
        let _ = coldpass::fit::fit_record(&strain, &stress, &coldpass::fit::FitOptions::default());
        let _ = fit_law(FitLaw::Voce, &strain, &stress);
        let _ = fit_law(FitLaw::Swift, &strain, &stress);
        let _ = fit_law(FitLaw::Ludwik, &strain, &stress);
    }

    /// A plausible record with random hardening still never panics.
    #[test]
    fn rising_records_give_a_report_or_an_error(
        steps in proptest::collection::vec((1e-6..0.01f64, -5.0..20.0f64), 10..200),
    ) {
        let (mut e, mut s) = (0.0, 0.0);
        let (mut strain, mut stress) = (vec![0.0], vec![0.0]);
        for (de, ds) in steps {
            e += de;
            s = f64::max(s + ds, 0.0);
            strain.push(e);
            stress.push(s);
        }
        let _ = coldpass::fit::fit_record(&strain, &stress, &coldpass::fit::FitOptions::default());
    }
}
