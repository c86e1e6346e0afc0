//! Invariants of the core, held over random inputs (proptest).
//!
//! - the drawing stress rises with friction and with back tension, by the
//!   amounts the formulas prescribe (Dieter, *Mechanical Metallurgy*, ch. 19,
//!   for Sachs and Siebel; Avitzur 1963, from memory, for the upper bound);
//! - Sachs tends to ideal work as friction vanishes (B = mu cot(alpha) -> 0);
//! - the mean flow stress of a rising law lies between the entry and exit
//!   flow stresses (the mean value theorem);
//! - every result for valid inputs is finite and positive;
//! - nothing panics on any input, and every `Ok` holds finite numbers.
//!
//! Case counts are kept small so that the whole file runs in a few seconds.

use coldpass::{
    analyse_pass, optimum_semi_angle, Beyond, Die, DrawPass, FlowLaw, Method, PassMechanics,
    Settings, StrainAt,
};
use proptest::prelude::*;

// ------------------------------------------------------------------ strategies

/// A valid table: 2 to 7 points from strain 0, strains strictly increasing,
/// stresses positive; with `beyond: slope` the last segment does not fall.
fn table_law(rising: bool) -> impl Strategy<Value = FlowLaw> {
    (
        prop::collection::vec((0.01f64..1.0, 1.0f64..600.0), 2..7),
        1.0f64..800.0,
        any::<bool>(),
    )
        .prop_map(move |(steps, first, flat)| {
            let mut points = vec![[0.0, first]];
            for (i, (de, s)) in steps.iter().enumerate().skip(1) {
                let [e, prev] = points[i - 1];
                // A rising table adds each step; a free one may fall anywhere
                // but stays above zero.
                let next = if rising { prev + s } else { *s * 3.0 };
                points.push([e + de, next]);
            }
            let n = points.len();
            let beyond = if flat { Beyond::Flat } else { Beyond::Slope };
            if beyond == Beyond::Slope && points[n - 1][1] < points[n - 2][1] {
                points[n - 1][1] = points[n - 2][1] * 1.2;
            }
            FlowLaw::points(points, beyond).unwrap()
        })
}

/// A valid law of any of the six closed-form kinds; all of them are
/// non-decreasing in strain.
fn smooth_law() -> impl Strategy<Value = FlowLaw> {
    prop_oneof![
        (1.0f64..2000.0).prop_map(|y| FlowLaw::perfectly_plastic(y).unwrap()),
        (1.0f64..2000.0, 0.0f64..3000.0).prop_map(|(y, h)| FlowLaw::linear(y, h).unwrap()),
        (10.0f64..2500.0, 0.0f64..0.95).prop_map(|(k, n)| FlowLaw::hollomon(k, n).unwrap()),
        (0.0f64..800.0, 10.0f64..2000.0, 0.0f64..0.95)
            .prop_map(|(s0, k, n)| FlowLaw::ludwik(s0, k, n).unwrap()),
        (10.0f64..2500.0, 0.0f64..0.5, 0.0f64..0.95)
            .prop_map(|(k, e0, n)| FlowLaw::swift(k, e0, n).unwrap()),
        (1.0f64..1000.0, 0.0f64..1500.0, 0.01f64..3.0).prop_map(|(s0, rise, ec)| FlowLaw::voce(
            s0,
            s0 + rise,
            ec
        )
        .unwrap()),
    ]
}

/// Every kind of law, tables free to rise and fall.
fn any_law() -> impl Strategy<Value = FlowLaw> {
    prop_oneof![3 => smooth_law(), 1 => table_law(false)]
}

/// Every kind of law, non-decreasing in strain.
fn rising_law() -> impl Strategy<Value = FlowLaw> {
    prop_oneof![3 => smooth_law(), 1 => table_law(true)]
}

/// A valid die with every optional part present or absent.
fn any_die() -> impl Strategy<Value = Die> {
    (
        0.5f64..44.0,
        0.0f64..=0.5,
        prop::option::of(0.0f64..=1.0),
        0.0f64..5.0,
        prop::option::of(0.05f64..=1.0),
    )
        .prop_map(
            |(semi_angle_deg, friction, friction_factor, land, efficiency)| Die {
                semi_angle_deg,
                friction,
                friction_factor,
                land_length_mm: land,
                efficiency,
            },
        )
}

/// A valid pass: any size, area reduction 0.5 % to 90 %, any prior strain and
/// back tension.
fn any_pass() -> impl Strategy<Value = DrawPass> {
    (
        0.05f64..50.0,
        0.005f64..0.9,
        0.0f64..5.0,
        0.0f64..500.0,
        any_die(),
    )
        .prop_map(|(d0, r, strain_before, back, die)| DrawPass {
            entry_diameter_mm: d0,
            exit_diameter_mm: d0 * (1.0 - r).sqrt(),
            strain_before,
            back_tension_mpa: back,
            die,
        })
}

/// A pass of the working range (common practice: reductions up to 40 %,
/// semi-angles 2 to 20 deg); the back tension is a fraction of the entry flow
/// stress, set by the caller.
fn working_pass() -> impl Strategy<Value = (DrawPass, f64)> {
    (
        0.5f64..20.0,
        0.02f64..0.4,
        0.0f64..3.0,
        0.0f64..0.5,
        2.0f64..20.0,
        0.0f64..0.3,
    )
        .prop_map(|(d0, r, strain_before, back_fraction, deg, mu)| {
            let pass = DrawPass {
                entry_diameter_mm: d0,
                exit_diameter_mm: d0 * (1.0 - r).sqrt(),
                strain_before,
                back_tension_mpa: 0.0,
                die: Die::new(deg, mu).unwrap(),
            };
            (pass, back_fraction)
        })
}

/// Any f64 at all, weighted toward the values that break code: NaN, the
/// infinities, zeros, extremes, subnormals and plain negatives; a third of the
/// time a plausible value, so that later checks are reached too.
fn wild() -> impl Strategy<Value = f64> {
    prop_oneof![
        3 => prop::num::f64::ANY,
        2 => prop::sample::select(vec![
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
            0.0,
            -0.0,
            f64::MAX,
            f64::MIN,
            f64::MIN_POSITIVE,
            5e-324,
            1e-300,
            1e300,
            -1.0,
            1.0,
            45.0,
            0.5,
        ]),
        3 => -1.0f64..1000.0,
        1 => 0.0f64..1.0,
    ]
}

fn settings() -> Settings {
    Settings::default()
}

fn with_back(pass: &DrawPass, back_tension_mpa: f64) -> DrawPass {
    DrawPass {
        back_tension_mpa,
        ..*pass
    }
}

fn with_friction(pass: &DrawPass, mu: f64) -> DrawPass {
    let mut p = *pass;
    p.die.friction = mu;
    p
}

/// The angle-dependent methods the friction and back-tension properties cover.
const METHODS: [Method; 5] = [
    Method::Sachs,
    Method::Siebel,
    Method::Redundant,
    Method::UpperBound,
    Method::Max,
];

fn stress(r: &PassMechanics, m: Method) -> f64 {
    r.draw_stress_mpa.get(m).unwrap()
}

/// Whether the Sachs axial stress stays at or below the flow stress all
/// through the die (checked at eight stations, each the exit of a shorter
/// pass). Past that point the slab equation's die pressure `sigma_f - sigma_x`
/// turns negative and the model no longer says that friction adds to the
/// stress: the pass is beyond its draw limit.
fn sachs_stays_below_flow(law: &FlowLaw, pass: &DrawPass) -> bool {
    let eps = 2.0 * (pass.entry_diameter_mm / pass.exit_diameter_mm).ln();
    (1..=8).all(|k| {
        let t = eps * k as f64 / 8.0;
        let part = DrawPass {
            exit_diameter_mm: pass.entry_diameter_mm * (-0.5 * t).exp(),
            ..*pass
        };
        let r = analyse_pass(law, &part, &settings()).unwrap();
        r.draw_stress_mpa.sachs <= law.stress_mpa(pass.strain_before + t)
    })
}

/// Every number in a pass result is finite.
fn all_finite(r: &PassMechanics) -> bool {
    let s = r.draw_stress_mpa;
    [
        r.entry_diameter_mm,
        r.exit_diameter_mm,
        r.area_reduction,
        r.elongation,
        r.pass_strain,
        r.strain_before,
        r.strain_after,
        r.delta,
        r.redundant_factor,
        r.flow_stress_entry_mpa,
        r.flow_stress_exit_mpa,
        r.mean_flow_stress_mpa,
        r.friction_factor,
        r.back_tension_mpa,
        s.ideal,
        s.efficiency.unwrap_or(0.0),
        s.sachs,
        s.siebel,
        s.redundant,
        s.upper_bound,
    ]
    .iter()
    .all(|x| x.is_finite())
}

// ------------------------------------------------------------------ properties

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, failure_persistence: None, ..ProptestConfig::default() })]

    /// Friction adds to the drawing stress (Dieter ch. 19; Avitzur, from memory):
    /// Siebel's friction term `sigma_bar mu eps / alpha` and the upper bound's
    /// shear term (m = sqrt(3) mu) always; Sachs, and so redundant and max, as
    /// long as the pass is short of its draw limit (see `sachs_stays_below_flow`).
    #[test]
    fn drawing_stress_rises_with_friction(
        law in rising_law(),
        (pass, back_fraction) in working_pass(),
        dmu in 0.005f64..0.2,
    ) {
        let pass = with_back(&pass, back_fraction * law.stress_mpa(pass.strain_before));
        let mu1 = pass.die.friction;
        let mu2 = (mu1 + dmu).min(0.5);
        let low = analyse_pass(&law, &pass, &settings()).unwrap();
        let high_pass = with_friction(&pass, mu2);
        let high = analyse_pass(&law, &high_pass, &settings()).unwrap();
        let sachs_domain = sachs_stays_below_flow(&law, &high_pass);
        for m in METHODS {
            let needs_sachs_domain = matches!(m, Method::Sachs | Method::Redundant | Method::Max);
            if needs_sachs_domain && !sachs_domain {
                continue;
            }
            let (a, b) = (stress(&low, m), stress(&high, m));
            // 1e-12: the fast Sachs form is good to about 1e-13 against
            // quadrature (tests/core_fast_path.rs).
            prop_assert!(b >= a * (1.0 - 1e-12), "{m} at mu {mu1} -> {mu2}: {a} -> {b}");
        }
        prop_assert!(stress(&high, Method::Siebel) > stress(&low, Method::Siebel));
        prop_assert!(stress(&high, Method::UpperBound) > stress(&low, Method::UpperBound));
    }

    /// A back pull adds whole to ideal work, Siebel and the upper bound, and
    /// decays through the die as `(A1/A0)^B = e^(-B eps)` in the Sachs solution
    /// (Dieter ch. 19; Avitzur, from memory).
    #[test]
    fn drawing_stress_rises_with_back_tension(
        law in any_law(),
        pass in any_pass(),
        extra in 1.0f64..300.0,
    ) {
        let low = analyse_pass(&law, &pass, &settings()).unwrap();
        let high = analyse_pass(&law, &with_back(&pass, pass.back_tension_mpa + extra), &settings()).unwrap();
        let b = pass.die.friction / pass.die.semi_angle_deg.to_radians().tan();
        // The land's slab balance passes a change of the cone's exit stress on
        // times e^(-4 mu L / d) (src/pass/mod.rs, land_exit_stress).
        let land = if pass.die.land_length_mm > 0.0 {
            (-4.0 * pass.die.friction * pass.die.land_length_mm / pass.exit_diameter_mm).exp()
        } else {
            1.0
        };
        let decay = (-b * low.pass_strain).exp() * land;
        for m in METHODS {
            prop_assert!(stress(&high, m) >= stress(&low, m), "{m}");
        }
        let tol = |s: f64| 1e-11 * s.abs().max(1.0);
        let (l, h) = (low.draw_stress_mpa, high.draw_stress_mpa);
        // On a land the balance is linear only while the section stays under its
        // flow stress (beyond it the die pressure would be negative: no land friction).
        let linear = |s: f64| land == 1.0 || s < high.flow_stress_exit_mpa;
        if linear(h.sachs) {
            prop_assert!((h.sachs - l.sachs - extra * decay).abs() <= tol(h.sachs), "{} {} {}", l.sachs, h.sachs, extra * decay);
        }
        if linear(h.redundant) {
            prop_assert!((h.redundant - l.redundant - extra * decay).abs() <= tol(h.redundant));
        }
        if linear(h.siebel) {
            prop_assert!((h.siebel - l.siebel - extra * land).abs() <= tol(h.siebel));
        }
        prop_assert!((h.upper_bound - l.upper_bound - extra).abs() <= tol(h.upper_bound));
        prop_assert!((h.ideal - l.ideal - extra).abs() <= tol(h.ideal));
    }

    /// Sachs tends to ideal work as mu -> 0 (B -> 0 in
    /// `sigma_b e^(-B eps) + (1+B) int sigma_f e^(-B(eps-t)) dt`, Dieter ch. 19):
    /// equal at mu = 0, and within the first-order bound
    /// `B [sigma_b eps + (1 + eps (1+B)) sigma_bar eps]` on the way there.
    #[test]
    fn sachs_tends_to_ideal_as_friction_vanishes(
        law in any_law(),
        pass in any_pass(),
    ) {
        let mu0 = pass.die.friction.max(1e-3);
        for scale in [1.0, 0.1, 0.01, 1e-4, 0.0] {
            let mu = mu0 * scale;
            let r = analyse_pass(&law, &with_friction(&pass, mu), &settings()).unwrap();
            let b = mu / pass.die.semi_angle_deg.to_radians().tan();
            let eps = r.pass_strain;
            let s = r.draw_stress_mpa;
            // The land adds (Y - sigma_cone)(1 - e^(-4 mu L/d)) <= Y 4 mu L / d.
            let land = r.flow_stress_exit_mpa * 4.0 * mu * pass.die.land_length_mm / pass.exit_diameter_mm;
            let bound = b * (pass.back_tension_mpa * eps + (1.0 + eps * (1.0 + b)) * r.mean_flow_stress_mpa * eps) + land;
            let gap = (s.sachs - s.ideal).abs();
            prop_assert!(gap <= bound + 1e-12 * s.ideal, "mu {mu}: sachs {} ideal {} bound {bound}", s.sachs, s.ideal);
        }
    }

    /// The mean of a non-decreasing function over an interval lies between its
    /// values at the ends (mean value theorem).
    #[test]
    fn mean_flow_stress_lies_between_entry_and_exit(
        law in rising_law(),
        pass in any_pass(),
    ) {
        let r = analyse_pass(&law, &pass, &settings()).unwrap();
        let slack = 1e-12 * r.flow_stress_exit_mpa;
        prop_assert!(r.flow_stress_entry_mpa - slack <= r.mean_flow_stress_mpa);
        prop_assert!(r.mean_flow_stress_mpa <= r.flow_stress_exit_mpa + slack);
    }

    /// Valid inputs give finite, positive results, and the optimum angle of
    /// every angle-dependent method lies in the searched range.
    #[test]
    fn valid_inputs_give_finite_positive_results(
        law in any_law(),
        pass in any_pass(),
        method in prop::sample::select(METHODS.to_vec()),
    ) {
        let r = analyse_pass(&law, &pass, &settings()).unwrap();
        prop_assert!(all_finite(&r), "{r:?}");
        let s = r.draw_stress_mpa;
        for x in [s.ideal, s.sachs, s.siebel, s.redundant, s.upper_bound,
                  r.mean_flow_stress_mpa, r.flow_stress_exit_mpa, r.pass_strain, r.delta] {
            prop_assert!(x > 0.0, "{r:?}");
        }
        prop_assert!(r.flow_stress_entry_mpa >= 0.0);
        prop_assert!(r.redundant_factor >= 1.0);
        if let Some(e) = s.efficiency {
            prop_assert!(e >= s.ideal && e > 0.0);
        }
        prop_assert!(r.draw_ratio(Method::Sachs).unwrap().is_finite());
        let o = optimum_semi_angle(&law, &pass, &settings(), method).unwrap().unwrap();
        prop_assert!((1.0..=20.0).contains(&o.semi_angle_deg), "{o:?}");
        prop_assert!(o.draw_stress_mpa.is_finite() && o.draw_stress_mpa > 0.0, "{o:?}");
    }
}

// ------------------------------------------------------------- never a panic

fn check_law_queries(
    law: &FlowLaw,
    e1: f64,
    e2: f64,
    s: f64,
    tol: f64,
) -> Result<(), TestCaseError> {
    if let Ok(m) = law.mean_stress_mpa(e1, e2) {
        prop_assert!(m.is_finite(), "{law:?} mean on [{e1}, {e2}] = {m}");
    }
    if let Ok(i) = law.integral_mpa(e1, e2) {
        prop_assert!(i.is_finite(), "{law:?} integral on [{e1}, {e2}] = {i}");
    }
    if let Ok(q) = law.integral_by_quadrature(e1, e2, tol) {
        prop_assert!(
            q.value.is_finite() && q.error_estimate.is_finite(),
            "{law:?} quadrature on [{e1}, {e2}] = {q:?}"
        );
    }
    match law.strain_at_stress(s) {
        Ok(StrainAt::Reached(e)) => {
            prop_assert!(e.is_finite() && e >= 0.0, "{law:?} strain at {s} = {e}")
        }
        Ok(StrainAt::Unreachable { limit_mpa }) => prop_assert!(limit_mpa.is_finite()),
        Err(_) => {}
    }
    let _ = law.stress_mpa(e1);
    let _ = law.saturation_mpa();
    Ok(())
}

fn check_pass_queries(
    law: &FlowLaw,
    pass: &DrawPass,
    settings: &Settings,
) -> Result<(), TestCaseError> {
    if let Ok(r) = analyse_pass(law, pass, settings) {
        prop_assert!(all_finite(&r), "{law:?} {pass:?}: {r:?}");
        for m in Method::ALL {
            if let Ok(x) = r.draw_ratio(m) {
                prop_assert!(x.is_finite(), "{law:?} {pass:?}: {m} ratio {x}");
            }
        }
    }
    for m in Method::ALL {
        if let Ok(Some(o)) = optimum_semi_angle(law, pass, settings, m) {
            prop_assert!(
                o.semi_angle_deg.is_finite() && o.draw_stress_mpa.is_finite(),
                "{law:?} {pass:?}: {m} {o:?}"
            );
        }
    }
    Ok(())
}

/// Laws that are sure to construct, so that wild passes reach the pass code.
fn fixed_laws() -> Vec<FlowLaw> {
    vec![
        FlowLaw::hollomon(530.0, 0.26).unwrap(),
        FlowLaw::perfectly_plastic(250.0).unwrap(),
        FlowLaw::points(vec![[0.0, 100.0], [0.5, 250.0], [1.5, 200.0]], Beyond::Flat).unwrap(),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 128, failure_persistence: None, ..ProptestConfig::default() })]

    /// Every constructor and query answers Ok or Err for any f64 at all.
    #[test]
    fn flow_laws_never_panic(
        a in wild(), b in wild(), c in wild(),
        e1 in wild(), e2 in wild(), s in wild(), tol in wild(),
        table in prop::collection::vec([wild(), wild()], 0..6),
        flat in any::<bool>(),
    ) {
        let beyond = if flat { Beyond::Flat } else { Beyond::Slope };
        let laws = [
            FlowLaw::perfectly_plastic(a),
            FlowLaw::linear(a, b),
            FlowLaw::hollomon(a, b),
            FlowLaw::ludwik(a, b, c),
            FlowLaw::swift(a, b, c),
            FlowLaw::voce(a, b, c),
            FlowLaw::points(table, beyond),
        ];
        for law in laws.iter().flatten().chain(fixed_laws().iter()) {
            check_law_queries(law, e1, e2, s, tol)?;
            // Wide intervals from 0 as well, where overflow lurks.
            check_law_queries(law, 0.0, e2, s, 1e-10)?;
        }
    }

    /// Every pass question answers Ok or Err for any f64 in any field.
    #[test]
    fn passes_never_panic(
        d0 in wild(), d1 in wild(), ea in wild(), back in wild(),
        deg in wild(), mu in wild(), m in prop::option::of(wild()), land in wild(),
        eta in prop::option::of(wild()), c in wild(),
        k in wild(), n in wild(),
    ) {
        let pass = DrawPass {
            entry_diameter_mm: d0,
            exit_diameter_mm: d1,
            strain_before: ea,
            back_tension_mpa: back,
            die: Die { semi_angle_deg: deg, friction: mu, friction_factor: m, land_length_mm: land, efficiency: eta },
        };
        let _ = Die::new(deg, mu);
        let _ = pass.validate();
        let settings = Settings { redundant_c: c };
        let mut laws = fixed_laws();
        laws.extend(FlowLaw::hollomon(k, n));
        laws.extend(FlowLaw::linear(k, n));
        for law in &laws {
            check_pass_queries(law, &pass, &settings)?;
            check_pass_queries(law, &pass, &Settings::default())?;
        }
    }
}

/// A valid pass with one field replaced by any f64.
fn pass_with_one_wild_field() -> impl Strategy<Value = DrawPass> {
    (any_pass(), 0usize..9, wild()).prop_map(|(mut p, field, x)| {
        match field {
            0 => p.entry_diameter_mm = x,
            1 => p.exit_diameter_mm = x,
            2 => p.strain_before = x,
            3 => p.back_tension_mpa = x,
            4 => p.die.semi_angle_deg = x,
            5 => p.die.friction = x,
            6 => p.die.friction_factor = Some(x),
            7 => p.die.land_length_mm = x,
            _ => p.die.efficiency = Some(x),
        }
        p
    })
}

/// A law of any kind with extreme but valid constants, or a random valid one.
fn extreme_law() -> impl Strategy<Value = FlowLaw> {
    let big = prop::sample::select(vec![1e-300, 5e-324, 1e-10, 1.0, 1e10, 1e300, f64::MAX]);
    let exponent = prop::sample::select(vec![0.0, 5e-324, 1e-300, 1e-10, 0.5, 0.999_999_999]);
    prop_oneof![
        big.clone()
            .prop_map(|y| FlowLaw::perfectly_plastic(y).unwrap()),
        (big.clone(), big.clone()).prop_map(|(y, h)| FlowLaw::linear(y, h).unwrap()),
        (big.clone(), exponent.clone()).prop_map(|(k, n)| FlowLaw::hollomon(k, n).unwrap()),
        (big.clone(), big.clone(), exponent.clone())
            .prop_map(|(s, k, n)| FlowLaw::ludwik(s, k, n).unwrap()),
        (big.clone(), big.clone(), exponent).prop_map(|(k, e, n)| FlowLaw::swift(k, e, n).unwrap()),
        (big.clone(), big.clone(), big.clone()).prop_map(|(s, t, e)| FlowLaw::voce(
            s.min(t),
            s.max(t),
            e
        )
        .unwrap()),
        (big.clone(), big).prop_map(|(s, t)| FlowLaw::points(
            vec![[0.0, s], [1e-3, t], [1e300, t]],
            Beyond::Flat
        )
        .unwrap()),
        any_law(),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 192, failure_persistence: None, ..ProptestConfig::default() })]

    /// Near-valid inputs reach the deep code: a valid pass with one wild field,
    /// and laws with extreme but valid constants.
    #[test]
    fn near_valid_inputs_never_panic(
        law in extreme_law(),
        pass in pass_with_one_wild_field(),
        e1 in wild(), e2 in wild(), s in wild(),
    ) {
        check_law_queries(&law, e1, e2, s, 1e-12)?;
        check_law_queries(&law, 0.0, e2.abs(), s, 1e-12)?;
        check_pass_queries(&law, &pass, &Settings::default())?;
    }
}
