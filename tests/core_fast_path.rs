//! The fast Sachs path (closed forms, the exact piecewise form of a table,
//! the power series of Hollomon, Ludwik and Swift; src/pass/sachs.rs) against
//! adaptive double-exponential quadrature of the same integral (Dieter,
//! *Mechanical Metallurgy*, ch. 19: sigma_d = sigma_b e^(-B eps) + (1+B)
//! int_0^eps sigma_f(eps_a+t) e^(-B(eps-t)) dt), on every law, within 1e-12
//! relative (achieved: 1.5e-13 for the Sachs stress, against a quadrature
//! asked for 1e-11 of sigma_f eps, which the double-exponential rule beats
//! by far once converged; 2.3e-14 for the mean flow stress, quadrature at
//! 1e-13); and the optimum-angle search against a fine scan.

use coldpass::pass::PreparedPass;
use coldpass::{optimum_semi_angle, Beyond, Die, DrawPass, FlowLaw, Method, Settings};

fn every_law() -> Vec<FlowLaw> {
    vec![
        FlowLaw::perfectly_plastic(250.0).unwrap(),
        FlowLaw::linear(200.0, 150.0).unwrap(),
        FlowLaw::hollomon(530.0, 0.26).unwrap(),
        FlowLaw::hollomon(315.0, 0.54).unwrap(),
        FlowLaw::hollomon(900.0, 0.0).unwrap(),
        FlowLaw::hollomon(900.0, 0.95).unwrap(),
        FlowLaw::ludwik(120.0, 400.0, 0.45).unwrap(),
        FlowLaw::swift(600.0, 0.02, 0.3).unwrap(),
        FlowLaw::swift(600.0, 0.0, 0.3).unwrap(),
        FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
        FlowLaw::points(
            vec![[0.0, 100.0], [0.2, 180.0], [0.5, 250.0], [1.0, 300.0]],
            Beyond::Slope,
        )
        .unwrap(),
        FlowLaw::points(
            vec![[0.0, 150.0], [0.4, 320.0], [0.8, 300.0], [1.4, 340.0]],
            Beyond::Flat,
        )
        .unwrap(),
    ]
}

#[test]
fn fast_sachs_agrees_with_adaptive_quadrature_within_1e_12_on_every_law() {
    let settings = Settings::default();
    let mut worst = 0.0f64;
    let mut cases = 0;
    for law in every_law() {
        // Zero strain after an anneal (the singular t^n), tiny, ordinary and large entry strains.
        for strain_before in [0.0, 1e-6, 0.01, 0.3, 1.1, 3.5] {
            for (d0, d1) in [(5.0, 4.95), (5.0, 4.5), (8.0, 5.5)] {
                for deg in [1.0, 3.0, 6.0, 12.0, 20.0, 40.0] {
                    for mu in [0.0, 0.02, 0.08, 0.5] {
                        for back in [0.0, 40.0] {
                            let pass = DrawPass {
                                entry_diameter_mm: d0,
                                exit_diameter_mm: d1,
                                strain_before,
                                back_tension_mpa: back,
                                die: Die::new(deg, mu).unwrap(),
                            };
                            let p = PreparedPass::new(&law, &pass, &settings).unwrap();
                            let fast = p.stresses(&pass.die).unwrap().sachs;
                            let slow = p.sachs_cone_by_quadrature_mpa(&pass.die).unwrap();
                            let rel = (fast / slow - 1.0).abs();
                            assert!(
                                rel < 1e-12,
                                "{} from {strain_before}, {d0}->{d1}, {deg} deg, mu {mu}: {fast} vs {slow}",
                                law.name()
                            );
                            worst = worst.max(rel);
                            cases += 1;
                        }
                    }
                }
            }
        }
    }
    assert_eq!(cases, 12 * 6 * 3 * 6 * 4 * 2);
    eprintln!("worst relative difference {worst:e} over {cases} cases");
}

#[test]
fn prepared_pass_gives_what_analyse_pass_gives_for_other_dies() {
    let law = FlowLaw::hollomon(530.0, 0.26).unwrap();
    let base = DrawPass {
        entry_diameter_mm: 5.0,
        exit_diameter_mm: 4.4,
        strain_before: 0.0,
        back_tension_mpa: 10.0,
        die: Die::new(6.0, 0.05).unwrap(),
    };
    let p = PreparedPass::new(&law, &base, &Settings::default()).unwrap();
    for (deg, mu, land) in [(4.0, 0.03, 0.0), (9.0, 0.1, 1.5), (15.0, 0.0, 2.0)] {
        let mut die = Die::new(deg, mu).unwrap();
        die.land_length_mm = land;
        let pass = DrawPass { die, ..base };
        let direct = coldpass::analyse_pass(&law, &pass, &Settings::default()).unwrap();
        assert_eq!(p.mechanics(&die).unwrap(), direct);
        assert_eq!(p.stresses(&die).unwrap(), direct.draw_stress_mpa);
    }
}

#[test]
fn optimum_angle_matches_a_fine_scan_to_1e_3_degree() {
    // A scan at 1e-3 degree steps over [1, 20] finds the minimum of each
    // angle-dependent method; Brent's answer must match it, and its stress
    // must not exceed the scan's.
    let settings = Settings::default();
    let laws = [
        FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
        FlowLaw::hollomon(530.0, 0.44).unwrap(),
    ];
    for law in &laws {
        for (d0, d1, mu, land) in [
            (8.0, 7.2, 0.05, 0.0),
            (5.0, 4.5, 0.1, 1.5),
            (3.0, 2.9, 0.03, 0.0),
        ] {
            let mut die = Die::new(6.0, mu).unwrap();
            die.land_length_mm = land;
            let pass = DrawPass {
                entry_diameter_mm: d0,
                exit_diameter_mm: d1,
                strain_before: 0.2,
                back_tension_mpa: 0.0,
                die,
            };
            let p = PreparedPass::new(law, &pass, &settings).unwrap();
            for method in [
                Method::Siebel,
                Method::Redundant,
                Method::UpperBound,
                Method::Max,
            ] {
                let o = optimum_semi_angle(law, &pass, &settings, method)
                    .unwrap()
                    .unwrap();
                let mut best = (0.0, f64::INFINITY);
                for i in 0..=19_000 {
                    let deg = 1.0 + i as f64 * 1e-3;
                    let mut d = die;
                    d.semi_angle_deg = deg;
                    let v = p.stress_mpa(&d, method).unwrap();
                    if v < best.1 {
                        best = (deg, v);
                    }
                }
                assert!(
                    (o.semi_angle_deg - best.0).abs() < 2e-3,
                    "{method} {d0}->{d1}: {} vs scan {}",
                    o.semi_angle_deg,
                    best.0
                );
                assert!(
                    o.draw_stress_mpa <= best.1 * (1.0 + 1e-12),
                    "{method}: {o:?} vs {best:?}"
                );
            }
        }
    }
}

#[test]
fn prepared_flow_stresses_agree_with_quadrature_within_1e_12_on_every_law() {
    // The prepared pass takes its mean flow stress from the law's closed
    // form (for Voce with e^(-eps_a/ec) shared with the entry stress and the
    // Sachs form); the reference is the mean by adaptive double-exponential
    // quadrature of sigma_f over the pass (Dieter, ch. 19: the mean flow
    // stress is the integral over the strain interval divided by its width).
    let settings = Settings::default();
    for law in every_law() {
        for strain_before in [0.0, 1e-6, 0.01, 0.3, 1.1, 3.5] {
            for (d0, d1) in [(5.0, 4.999), (5.0, 4.95), (5.0, 4.5), (8.0, 5.5)] {
                let pass = DrawPass {
                    entry_diameter_mm: d0,
                    exit_diameter_mm: d1,
                    strain_before,
                    back_tension_mpa: 0.0,
                    die: Die::new(6.0, 0.05).unwrap(),
                };
                let p = PreparedPass::new(&law, &pass, &settings).unwrap();
                let m = p.own_mechanics().unwrap();
                let (e1, e2) = (strain_before, strain_before + m.pass_strain);
                let slow = law.integral_by_quadrature(e1, e2, 1e-13).unwrap().value / (e2 - e1);
                let rel = (m.mean_flow_stress_mpa / slow - 1.0).abs();
                assert!(
                    rel < 1e-12,
                    "{} from {strain_before}, {d0}->{d1}: mean {} vs {slow}",
                    law.name(),
                    m.mean_flow_stress_mpa
                );
                assert_eq!(m.flow_stress_entry_mpa, law.stress_mpa(e1));
                assert_eq!(m.flow_stress_exit_mpa, law.stress_mpa(e2));
                assert_eq!(m, coldpass::analyse_pass(&law, &pass, &settings).unwrap());
            }
        }
    }
}

/// A stock angle's terms computed once (`AngleTerms`, as design keeps them
/// for every pass that tries the angle) give every method's stress to the
/// bit, on every law, with and without land and back tension: the cache
/// only moves where `tan`, `sin_cos` and Avitzur's `f(alpha)` are computed.
#[test]
fn cached_angle_terms_give_the_same_bits_as_the_angle_itself() {
    use coldpass::pass::AngleTerms;
    let settings = Settings::default();
    let methods = [
        Method::Ideal,
        Method::Sachs,
        Method::Siebel,
        Method::Redundant,
        Method::UpperBound,
        Method::Max,
    ];
    let mut cases = 0;
    for law in every_law() {
        for strain_before in [0.0, 0.3, 1.1] {
            for deg in [2.5, 5.0, 7.0, 11.3, 20.0] {
                let terms = AngleTerms::new(deg);
                for (land, back) in [(0.0, 0.0), (0.8, 40.0)] {
                    let mut die = Die::new(deg, 0.06).unwrap();
                    die.land_length_mm = land;
                    let pass = DrawPass {
                        entry_diameter_mm: 5.0,
                        exit_diameter_mm: 4.4,
                        strain_before,
                        back_tension_mpa: back,
                        die,
                    };
                    let p = PreparedPass::new(&law, &pass, &settings).unwrap();
                    for m in methods {
                        let plain = p.stress_mpa(&die, m).unwrap();
                        let cached = p.stress_mpa_at(&die, &terms, m).unwrap();
                        assert_eq!(plain.to_bits(), cached.to_bits(), "{law:?} {deg} {m:?}");
                        cases += 1;
                    }
                }
            }
        }
    }
    assert_eq!(cases, 12 * 3 * 5 * 2 * 6);
}
