//! The die land (bearing) against hand-computed values: the slab balance on a
//! parallel land, sigma_exit = Y - (Y - sigma_cone) e^(-4 mu L / d) (the
//! standard slab treatment of the land, d sigma_x/dx = (2 mu / r_f)(Y - sigma_x),
//! as in Hosford & Caddell, *Metal Forming*, from memory; docs/physics.md, "More
//! single-pass physics"; integrated by hand here, not read from the code), in Sachs, Siebel and
//! redundant; Avitzur's land term (2m/sqrt 3)(L/Rf) sigma_bar in the upper
//! bound; and the common-practice "long land" test (docs/physics.md).

use coldpass::pass::{self, land_is_long, LAND_LONG_RATIO};
use coldpass::{analyse_pass, Die, DrawPass, FlowLaw, Settings};

fn pass_with_land(land_length_mm: f64) -> DrawPass {
    let mut die = Die::new(6.0, 0.05).unwrap();
    die.friction_factor = Some(0.1);
    die.land_length_mm = land_length_mm;
    DrawPass {
        entry_diameter_mm: 5.0,
        exit_diameter_mm: 4.5,
        strain_before: 0.0,
        back_tension_mpa: 0.0,
        die,
    }
}

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// `ours` agrees with a hand value printed to six decimals: within half a
/// unit of its last digit.
fn to_six_decimals(ours: f64, printed: f64) -> bool {
    (ours - printed).abs() <= 5e-7
}

#[test]
fn sachs_on_a_land_of_0_3_d_is_the_hand_computed_slab_balance() {
    // Hand-computed: perfectly plastic 300 MPa, 5.0 -> 4.5 mm, 6 deg, mu 0.05:
    // B = 0.05 cot 6 deg = 0.4757182, eps = 2 ln(5/4.5) = 0.2107210, cone
    // 300 (1+B)/B (1 - e^(-B eps)) = 88.766016 MPa (Dieter's closed form); a land
    // of 1.35 mm (0.3 d): decay e^(-4 0.05 1.35/4.5) = e^-0.06 = 0.9417645,
    // exit 300 - (300 - 88.766016) 0.9417645 = 101.067326 MPa (+13.9 %).
    let law = FlowLaw::perfectly_plastic(300.0).unwrap();
    let bare = analyse_pass(&law, &pass_with_land(0.0), &Settings::default()).unwrap();
    let land = analyse_pass(&law, &pass_with_land(1.35), &Settings::default()).unwrap();
    assert!(to_six_decimals(bare.draw_stress_mpa.sachs, 88.766016));
    assert!(
        to_six_decimals(land.draw_stress_mpa.sachs, 101.067326),
        "{}",
        land.draw_stress_mpa.sachs
    );
    // Siebel and redundant get the same balance on their own cone stress.
    let decay = 0.9417645335842487;
    for (cone, exit) in [
        (bare.draw_stress_mpa.siebel, land.draw_stress_mpa.siebel),
        (
            bare.draw_stress_mpa.redundant,
            land.draw_stress_mpa.redundant,
        ),
    ] {
        assert!(rel(exit, 300.0 - (300.0 - cone) * decay) < 1e-12);
    }
    // The upper bound adds Avitzur's land term (2m/sqrt 3)(L/Rf) sigma_bar =
    // 300 (0.2/sqrt 3)(1.35/2.25) = 20.784610 MPa (hand-computed).
    let added = land.draw_stress_mpa.upper_bound - bare.draw_stress_mpa.upper_bound;
    assert!(to_six_decimals(added, 20.784610), "{added}");
    // Ideal work has no friction to feel the land.
    assert_eq!(land.draw_stress_mpa.ideal, bare.draw_stress_mpa.ideal);
}

#[test]
fn no_land_leaves_the_cone_stress_exactly() {
    assert_eq!(pass::land_exit_stress(123.456, 300.0, 1.0), 123.456);
    assert_eq!(pass::land_decay(0.05, 0.0, 4.5), 1.0);
    // A section already at its flow stress has no die pressure on the land.
    assert_eq!(pass::land_exit_stress(310.0, 300.0, 0.9), 310.0);
}

#[test]
fn a_land_is_long_above_0_6_d() {
    // Common practice (from memory): wire-die bearings 0.3 to 0.5 d.
    assert_eq!(LAND_LONG_RATIO, 0.6);
    assert!(!land_is_long(1.35, 4.5)); // 0.3 d
    assert!(!land_is_long(2.25, 4.5)); // 0.5 d
    assert!(!land_is_long(2.7, 4.5)); // 0.6 d exactly
    assert!(land_is_long(2.71, 4.5));
    assert!(land_is_long(5.0, 4.5));
}
