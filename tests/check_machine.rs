//! `check` on the line and on a machine, against hand calculations: the net
//! pull and power of each capstan (force balance), volume constancy, the
//! capstan surface speed `v = pi D N`, slip, the temperature carried from
//! die to die, and the attainable speed. Formulas and sources:
//! docs/physics.md, "Machines, blocks and heat carried die to die".

use coldpass::evaluation::{evaluate, EvaluateOptions, ScheduleReport};
use coldpass::schedule;
use std::f64::consts::PI;

/// A three-die line in a perfectly plastic stock (Y = 300 MPa) drawn by the
/// ideal-work method, so each drawing stress is known by hand:
/// `sigma_d = sigma_b + Y ln(A0/A1)` (ideal work plus back tension; Dieter,
/// Mechanical Metallurgy, ch. 19).
fn three_dies(extra: &str) -> String {
    format!(
        "title: three dies by hand
material:
  density_kg_m3: 8900
  specific_heat_j_kg_k: 385
  flow: {{law: perfectly-plastic, yield_mpa: 300}}
start:
  diameter: 5.0
dies:
  semi_angle_deg: 6
  friction: 0.05
limits:
  method: ideal
  draw_ratio_warn: 0.9
  draw_ratio_max: 0.95
line:
  finish_speed_m_s: 5
{extra}passes:
  - exit: 4.5
  - exit: 4.0
    back_tension_mpa: 40
  - exit: 3.6
    back_tension_mpa: 50
"
    )
}

fn check(text: &str) -> ScheduleReport {
    let file = schedule::parse(text).unwrap();
    evaluate(&file, &EvaluateOptions::default()).unwrap()
}

fn area(d_mm: f64) -> f64 {
    PI * d_mm * d_mm / 4.0
}

#[test]
fn net_block_power_counts_each_back_pull_once_three_dies_by_hand() {
    // Worked by hand (Y = 300 MPa, ideal work, sigma_d = sigma_b + Y 2 ln(D0/D1)):
    //   die 1 5.0 -> 4.5: eps 0.210721, sigma_d 63.216 MPa, A1 15.904 mm^2, F1 1.00541 kN
    //   die 2 4.5 -> 4.0: eps 0.235566, sigma_d 40 + 70.670 = 110.670 MPa, A2 12.566 mm^2, F2 1.39072 kN
    //   die 3 4.0 -> 3.6: eps 0.210721, sigma_d 50 + 63.216 = 113.216 MPa, A3 10.179 mm^2, F3 1.15240 kN
    // The capstan after die 1 holds die 2's back pull B2 = 40 MPa x A1 = 0.63617 kN,
    // the one after die 2 holds B3 = 50 MPa x A2 = 0.62832 kN, the last holds none.
    //   net pulls 0.36924, 0.76240, 1.15240 kN
    // Speeds by volume constancy from 5 m/s at 3.6 mm: v1 = 5 (3.6/4.5)^2 = 3.2,
    // v2 = 5 (3.6/4.0)^2 = 4.05, v3 = 5 m/s.
    //   net powers 1.18157, 3.08772, 5.76201 kW; total 10.0313 kW
    // (the gross sum F v would be 14.612 kW: each back pull counted twice over).
    let rep = check(&three_dies(""));
    let y = 300.0;
    let sd = [
        y * 2.0 * (5.0f64 / 4.5).ln(),
        40.0 + y * 2.0 * (4.5f64 / 4.0).ln(),
        50.0 + y * 2.0 * (4.0f64 / 3.6).ln(),
    ];
    let f = [
        sd[0] * area(4.5) / 1e3,
        sd[1] * area(4.0) / 1e3,
        sd[2] * area(3.6) / 1e3,
    ];
    let b = [40.0 * area(4.5) / 1e3, 50.0 * area(4.0) / 1e3, 0.0];
    let v = [5.0 * (3.6f64 / 4.5).powi(2), 5.0 * 0.81, 5.0];
    let mut total = 0.0;
    for i in 0..3 {
        let r = &rep.passes[i];
        let net = f[i] - b[i];
        assert!((r.force_kn.unwrap() - f[i]).abs() < 1e-12 * f[i].max(1.0));
        assert!((r.net_pull_kn.unwrap() - net).abs() < 1e-12, "die {i}");
        assert!((r.exit_speed_m_s.unwrap() - v[i]).abs() < 1e-12);
        assert!((r.power_kw.unwrap() - net * v[i]).abs() < 1e-12);
        total += net * v[i];
    }
    // The hand figures above, to their printed digits.
    assert!((total - 10.0313).abs() < 5e-4, "{total}");
    assert!((rep.summary.total_power_kw.unwrap() - total).abs() < 1e-12);
}

#[test]
fn block_power_flag_is_on_the_net_load() {
    // Die 2's gross power is 1.39072 x 4.05 = 5.632 kW but its net is 3.088 kW:
    // a 4 kW block limit flags only die 3 (5.762 kW net), not die 2.
    let rep = check(&three_dies("").replace(
        "finish_speed_m_s: 5\n",
        "finish_speed_m_s: 5\n  block_power_kw: 4\n",
    ));
    let over: Vec<usize> = rep
        .passes
        .iter()
        .filter(|r| r.flags.iter().any(|f| f.name() == "over-block-power"))
        .map(|r| r.step)
        .collect();
    assert_eq!(over, vec![3]);
}

use coldpass::evaluation::evaluate_on;
use coldpass::machine::{self, Machine};
use proptest::prelude::*;

fn on(text: &str, m: &Machine) -> ScheduleReport {
    let file = schedule::parse(text).unwrap();
    evaluate_on(&file, &EvaluateOptions::default(), Some(m)).unwrap()
}

fn flagged(rep: &ScheduleReport, name: &str) -> Vec<usize> {
    rep.passes
        .iter()
        .filter(|r| r.flags.iter().any(|f| f.name() == name))
        .map(|r| r.step)
        .collect()
}

/// A three-block non-slip machine: 600 mm capstans, `motor_kw` motors,
/// `rpm` top speed, drive efficiency 0.9, cooling `c`.
fn non_slip(motor_kw: [f64; 3], rpm: [f64; 3], c: f64) -> Machine {
    let blocks: String = (0..3)
        .map(|i| {
            format!(
                "  - {{capstan_diameter_mm: 600, motor_kw: {}, max_capstan_rpm: {}}}\n",
                motor_kw[i], rpm[i]
            )
        })
        .collect();
    machine::parse(&format!(
        "name: hand\nkind: non-slip\ncooling_between_dies: {c}\ndrive_efficiency: 0.9\nblocks:\n{blocks}"
    ))
    .unwrap()
}

/// The hand figures of the three-die case (see the first test).
const NET_KN: [f64; 3] = [0.369_239, 0.762_399, 1.152_402];
const SPEED_PER_FINISH: [f64; 3] = [0.64, 0.81, 1.0];

#[test]
fn non_slip_capstans_run_at_the_wire_speed_v_equals_pi_d_n() {
    // Volume constancy v_i = v_f (D_f/D_i)^2 and N = 60 v / (pi D) with D = 0.6 m:
    // at 5 m/s finish the capstans turn 60 x 3.2 / (pi 0.6) = 101.859 rpm,
    // 60 x 4.05 / (pi 0.6) = 128.916 rpm and 60 x 5 / (pi 0.6) = 159.155 rpm.
    let m = non_slip([50.0; 3], [1000.0; 3], 1.0);
    let rep = on(&three_dies(""), &m);
    let run = rep.machine.as_ref().unwrap();
    for (b, rpm) in run.blocks.iter().zip([101.859, 128.916, 159.155]) {
        let v = 5.0 * SPEED_PER_FINISH[b.block - 1];
        assert!((b.wire_speed_m_s - v).abs() < 1e-12);
        assert!((b.surface_speed_m_s - v).abs() < 1e-12);
        assert!((b.capstan_rpm - 60.0 * v / (PI * 0.6)).abs() < 1e-9);
        assert!((b.capstan_rpm - rpm).abs() < 5e-4, "{}", b.capstan_rpm);
        assert_eq!(b.slip, 0.0);
    }
}

#[test]
fn net_block_load_with_the_drive_efficiency_by_hand() {
    // Motor load = net pull x capstan speed / efficiency: block 3 carries
    // 1.15240 kN at 5 m/s through a 0.9 drive, 5.76201 / 0.9 = 6.40223 kW,
    // 64.02 % of a 10 kW motor.
    let m = non_slip([10.0; 3], [1000.0; 3], 1.0);
    let rep = on(&three_dies(""), &m);
    let b = &rep.machine.as_ref().unwrap().blocks;
    for j in 0..3 {
        let load = NET_KN[j] * 5.0 * SPEED_PER_FINISH[j] / 0.9;
        assert!((b[j].motor_load_kw - load).abs() < 5e-5, "block {j}");
        assert!((b[j].motor_load - load / 10.0).abs() < 5e-6);
    }
    assert!((b[2].motor_load - 0.640_223).abs() < 5e-6);
}

#[test]
fn attainable_speed_by_hand_where_a_motor_binds() {
    // Block 3 limits: s = eta P / (net g) = 0.9 x 10 / (1.15240 x 1) = 7.80978 m/s;
    // block 1 would allow 0.9 x 10 / (0.36924 x 0.64) = 38.09 m/s, and the
    // capstans 600 mm x 1000 rpm = 31.4 m/s. At 5 m/s (the file's speed) the
    // block figures stay at 5 m/s; tonnes per shift at 7.80978 m/s with the
    // default 8 h and 0.85: 8900 x pi 0.0036^2/4 x 7.80978 x 3600 x 8 x 0.85 / 1000.
    let m = non_slip([10.0; 3], [1000.0; 3], 1.0);
    let rep = on(&three_dies(""), &m);
    let s = &rep.summary;
    let v = s.attainable_speed_m_s.unwrap();
    assert!((v - 0.9 * 10.0 / NET_KN[2]).abs() < 5e-5, "{v}");
    assert_eq!(s.binding_block, Some(3));
    assert_eq!(s.binding_limit.unwrap().name(), "motor-rating");
    let t = 8900.0 * PI * 0.0036f64.powi(2) / 4.0 * v * 3600.0 * 8.0 * 0.85 / 1000.0;
    assert!((s.attainable_t_per_shift.unwrap() - t).abs() < 1e-9);
    assert!((rep.machine.as_ref().unwrap().running_speed_m_s - 5.0).abs() < 1e-12);
}

#[test]
fn a_file_speed_above_the_attainable_flags_the_block_over_its_rating() {
    // At 5 m/s block 3 needs 6.40 kW: a 6 kW motor is over (it allows
    // 0.9 x 6 / 1.15240 = 4.686 m/s), and the capstan limit of 140 rpm
    // (pi 0.6 x 140 / 60 = 4.398 m/s at 600 mm) is passed too, and binds.
    let m = non_slip([50.0, 50.0, 6.0], [1000.0, 1000.0, 140.0], 1.0);
    let rep = on(&three_dies(""), &m);
    assert_eq!(flagged(&rep, "over-block-power"), vec![3]);
    assert_eq!(flagged(&rep, "over-capstan-speed"), vec![3]);
    assert!(rep.is_over());
    let v = rep.summary.attainable_speed_m_s.unwrap();
    assert!((v - PI * 0.6 * 140.0 / 60.0).abs() < 1e-9, "{v}");
    assert_eq!(rep.summary.binding_limit.unwrap().name(), "capstan-speed");
}

#[test]
fn slip_by_hand_turns_negative_when_the_step_beats_the_die() {
    // Slip machine, steps 1.2 and 1.25, last capstan at the finish speed 5 m/s:
    // V3 = 5, V2 = 5 / 1.25 = 4, V1 = 4 / 1.2 = 3.3333 m/s. Wire 3.2, 4.05, 5 m/s.
    // Slip (V - v)/V: block 1 (3.3333 - 3.2)/3.3333 = 0.04; block 2
    // (4 - 4.05)/4 = -0.0125: die 3's elongation (4/3.6)^2 = 1.2346 is below
    // the step 1.25, so capstan 2 runs slower than its wire and the last
    // capstan draws through two dies (common practice: a cause of breaks).
    let m = machine::parse(
        "kind: slip
cooling_between_dies: 0.9
blocks:
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30}
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30, step_ratio: 1.2}
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30, step_ratio: 1.25}
",
    )
    .unwrap();
    let rep = on(&three_dies(""), &m);
    let b = &rep.machine.as_ref().unwrap().blocks;
    assert!((b[0].slip - 0.04).abs() < 1e-12, "{}", b[0].slip);
    assert!((b[1].slip + 0.0125).abs() < 1e-12, "{}", b[1].slip);
    assert!(b[2].slip.abs() < 1e-12);
    assert!((b[1].surface_speed_m_s - 4.0).abs() < 1e-12);
    assert_eq!(flagged(&rep, "negative-slip"), vec![2]);
    // A slip machine's motor also drives the slip: block 1 carries its net
    // pull at the capstan's 3.3333 m/s, not the wire's 3.2 m/s.
    assert!((b[0].net_power_kw - NET_KN[0] * 5.0 / 1.25 / 1.2).abs() < 5e-5);
    // Slip above the limit: block 1's 4 % is over a 3 % slip_max.
    let tight = machine::parse(
        "kind: slip
cooling_between_dies: 0.9
slip_max: 0.03
blocks:
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30}
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30, step_ratio: 1.2}
  - {capstan_diameter_mm: 300, motor_kw: 20, max_surface_speed_m_s: 30, step_ratio: 1.25}
",
    )
    .unwrap();
    assert_eq!(
        flagged(&on(&three_dies(""), &tight), "slip-over-limit"),
        vec![1]
    );
}

#[test]
fn temperature_limits_no_cooling_sums_the_rises_full_cooling_is_per_die() {
    // Adiabatic rise dT = beta Y eps / (rho c) with beta 0.9, Y 300 MPa,
    // rho 8900, c 385 (ideal work, back tension not counted as die work):
    // 0.9 x 300e6 / (8900 x 385) = 78.797 K per unit strain.
    let k = 0.9 * 300e6 / (8900.0 * 385.0);
    let eps = [
        2.0 * (5.0f64 / 4.5).ln(),
        2.0 * (4.5f64 / 4.0).ln(),
        2.0 * (4.0f64 / 3.6).ln(),
    ];
    let none = on(&three_dies(""), &non_slip([50.0; 3], [1000.0; 3], 0.0));
    let sum: f64 = eps.iter().map(|e| k * e).sum();
    let last = none.passes.last().unwrap();
    assert!((last.wire_temperature_c.unwrap() - (25.0 + sum)).abs() < 1e-9);
    assert!((last.wire_temperature_no_cooling_c.unwrap() - (25.0 + sum)).abs() < 1e-9);
    let full = on(&three_dies(""), &non_slip([50.0; 3], [1000.0; 3], 1.0));
    let alone = check(&three_dies(""));
    for (i, (a, b)) in full.passes.iter().zip(&alone.passes).enumerate() {
        assert!((a.wire_temperature_c.unwrap() - (25.0 + k * eps[i])).abs() < 1e-9);
        assert_eq!(a.wire_temperature_c, b.wire_temperature_c);
        assert_eq!(a.wire_temperature_entry_c, Some(25.0));
    }
    // Half cooling by hand: T_in,2 = 25 + 0.5 dT1, T_out,2 = T_in,2 + dT2.
    let half = on(&three_dies(""), &non_slip([50.0; 3], [1000.0; 3], 0.5));
    let t2 = 25.0 + 0.5 * k * eps[0] + k * eps[1];
    assert!((half.passes[1].wire_temperature_c.unwrap() - t2).abs() < 1e-9);
    // A limit between the per-die and summed figures: too hot only without cooling.
    let limited = three_dies("").replace(
        "  draw_ratio_max: 0.95\n",
        "  draw_ratio_max: 0.95\n  wire_temperature_max_c: 75\n",
    );
    assert!(!flagged(
        &on(&limited, &non_slip([50.0; 3], [1000.0; 3], 0.0)),
        "too-hot"
    )
    .is_empty());
    assert!(flagged(
        &on(&limited, &non_slip([50.0; 3], [1000.0; 3], 1.0)),
        "too-hot"
    )
    .is_empty());
}

#[test]
fn a_machine_refuses_a_schedule_it_cannot_run() {
    let file = schedule::parse(&three_dies("")).unwrap();
    let two = machine::parse(
        "kind: non-slip\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n",
    )
    .unwrap();
    let e = evaluate_on(&file, &EvaluateOptions::default(), Some(&two))
        .unwrap_err()
        .to_string();
    assert!(e.contains("3 draw passes") && e.contains("2 blocks"), "{e}");
    let four_slip = machine::parse(
        "kind: slip\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300, step_ratio: 1.2}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300, step_ratio: 1.2}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300, step_ratio: 1.2}\n",
    )
    .unwrap();
    let e = evaluate_on(&file, &EvaluateOptions::default(), Some(&four_slip))
        .unwrap_err()
        .to_string();
    assert!(e.contains("cannot run a block empty"), "{e}");
    let annealed = three_dies("").replace("  - exit: 4.0\n", "  - anneal: {}\n  - exit: 4.0\n");
    let file = schedule::parse(&annealed).unwrap();
    let e = evaluate_on(
        &file,
        &EvaluateOptions::default(),
        Some(&non_slip([50.0; 3], [1000.0; 3], 0.5)),
    )
    .unwrap_err()
    .to_string();
    assert!(e.contains("passes[1]") && e.contains("anneal"), "{e}");
}

#[test]
fn machine_file_errors_name_the_key_value_and_what_is_allowed() {
    for (text, want) in [
        ("kind: slip\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n", "`blocks[1].step_ratio` (block 2) = missing"),
        ("kind: non-slip\ncooling_between_dies: 1.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n", "cooling_between_dies"),
        ("kind: non-slip\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: -1, max_capstan_rpm: 300}\n", "blocks[0].motor_kw"),
        ("kind: non-slip\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10}\n", "max_surface_speed_m_s"),
        ("kind: fast\ncooling_between_dies: 0.5\nblocks: []\n", "unknown variant"),
        ("kind: single-block\ncooling_between_dies: 0.5\nblocks:\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n  - {capstan_diameter_mm: 500, motor_kw: 10, max_capstan_rpm: 300}\n", "exactly one block"),
    ] {
        let e = machine::parse(text).unwrap_err().to_string();
        assert!(e.contains(want), "{e}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn attainable_speed_properties(
        kw in prop::array::uniform3(1.0f64..80.0),
        rpm in prop::array::uniform3(50.0f64..2000.0),
        factor in 1.01f64..4.0,
    ) {
        // Without a file speed the blocks run at the attainable speed: no
        // block is ever above its rating or its capstan speed there.
        let text = three_dies("").replace("line:\n  finish_speed_m_s: 5\n", "");
        let m = non_slip(kw, rpm, 0.5);
        let rep = on(&text, &m);
        let v = rep.summary.attainable_speed_m_s.unwrap();
        for b in &rep.machine.as_ref().unwrap().blocks {
            prop_assert!(b.motor_load <= 1.0 + 1e-9);
            prop_assert!(b.surface_speed_m_s <= b.max_surface_speed_m_s * (1.0 + 1e-9));
        }
        prop_assert!(rep.passes.iter().all(|r| r.flags.iter().all(|f| !f.is_over())));
        // A faster machine (bigger motors, faster capstans) never gives a lower speed.
        let faster = non_slip(kw.map(|k| k * factor), rpm.map(|n| n * factor), 0.5);
        let v2 = on(&text, &faster).summary.attainable_speed_m_s.unwrap();
        prop_assert!(v2 >= v * (1.0 - 1e-12));
        // Where power binds, the speed scales with the motor rating.
        if rep.summary.binding_limit.unwrap().name() == "motor-rating" {
            let stronger = non_slip(kw.map(|k| k * factor), [1e5; 3], 0.5);
            let base = non_slip(kw, [1e5; 3], 0.5);
            let vs = on(&text, &stronger).summary.attainable_speed_m_s.unwrap();
            let vb = on(&text, &base).summary.attainable_speed_m_s.unwrap();
            prop_assert!((vs / vb - factor).abs() < 1e-9 * factor);
        }
    }
}

mod common;
use common::{coldpass, root, stderr, stdout};

#[test]
fn check_reads_the_machine_the_schedule_names_relative_to_the_schedule() {
    let o = coldpass(&[
        "check",
        "schedules-demo/copper-line-3-speed.yaml",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert_eq!(v["machine"]["kind"], "slip");
    assert_eq!(v["machine"]["blocks"].as_array().unwrap().len(), 13);
    for key in [
        "attainable_speed_m_s",
        "binding_block",
        "binding_limit",
        "attainable_t_per_shift",
        "tensile_strength_mpa",
    ] {
        assert!(!v["summary"][key].is_null(), "summary lacks {key}");
    }
    for key in [
        "block",
        "step",
        "capstan_rpm",
        "surface_speed_m_s",
        "slip",
        "net_pull_kn",
        "net_power_kw",
        "motor_load",
        "wire_temperature_in_c",
        "wire_temperature_out_c",
    ] {
        assert!(
            !v["machine"]["blocks"][0][key].is_null(),
            "block lacks {key}"
        );
    }
    assert!(v["caution"]
        .as_str()
        .unwrap()
        .contains("Planning estimates"));
}

#[test]
fn the_machine_option_overrides_and_a_missing_machine_file_is_named() {
    let o = coldpass(&[
        "check",
        "schedules-demo/copper-building-wire.yaml",
        "--machine",
        "machines/northfield-wet-13.yaml",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("Machine summary"));
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("report.txt");
    let o = coldpass(&[
        "check",
        "schedules-demo/copper-building-wire.yaml",
        "--machine",
        "machines/no-such.yaml",
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_ne!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("--machine") && stderr(&o).contains("no-such.yaml"));
    assert!(!out.exists(), "no partial report");
    // Seven dies on a thirteen-die slip machine: refused, naming both counts.
    let o = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        "machines/northfield-wet-13.yaml",
    ]);
    assert_ne!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("7 draw passes") && stderr(&o).contains("13 blocks"));
}

#[test]
fn every_demo_machine_parses() {
    for e in std::fs::read_dir(root("machines")).unwrap() {
        let p = e.unwrap().path();
        let text = std::fs::read_to_string(&p).unwrap();
        assert!(
            text.contains("DEMO VALUES"),
            "{} is marked demo values",
            p.display()
        );
        machine::parse(&text).unwrap();
    }
}

#[test]
fn csv_carries_the_machine_columns_and_the_caution_last() {
    let o = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--format",
        "csv",
    ]);
    let text = stdout(&o);
    let header = text.lines().next().unwrap();
    assert!(header.contains("machine.motor_load") && header.ends_with("caution"));
    assert!(header.contains("summary.attainable_speed_m_s"));
}

#[test]
fn the_chart_on_a_machine_shows_load_and_temperature_against_limits_and_the_caution() {
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("chart.svg");
    let o = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--plot",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&svg).unwrap();
    for want in [
        "Motor load per block",
        "motor rating (100 %)",
        "Wire temperature, cooling 50 %",
        "limit 150 C",
        "Planning estimates only",
        "licensed practice govern",
    ] {
        assert!(text.contains(want), "chart lacks {want}");
    }
}

#[test]
fn cooling_that_falls_with_speed_makes_the_temperature_limit_a_speed() {
    // Newtonian cooling over a capstan time that goes as 1/v (lumped
    // capacitance; Incropera & DeWitt, from memory): 1 - c(v) = (1 - c_ref)^(v_ref/v).
    // Half the heat off at 5 m/s keeps 0.5^(5/10) = 0.70711 of it at 10 m/s.
    assert!((machine::cooling_at_speed(0.5, 5.0, 10.0) - (1.0 - 0.5f64.sqrt())).abs() < 1e-15);
    assert!((machine::cooling_at_speed(0.5, 5.0, 5.0) - 0.5).abs() < 1e-15);
    // Three dies, cooling 0.5 at 5 m/s, limit 70 C, motors and capstans
    // generous: the temperature binds, and at the attainable speed the hottest
    // exit sits on the limit, by the hand heat balance T_in,i+1 = T_a + (1 - c_i)(T_out,i - T_a).
    let m = machine::parse(
        "kind: non-slip
cooling_between_dies: 0.5
cooling_at_speed_m_s: 5
wire_temperature_max_c: 70
blocks:
  - {capstan_diameter_mm: 600, motor_kw: 500, max_capstan_rpm: 5000}
  - {capstan_diameter_mm: 600, motor_kw: 500, max_capstan_rpm: 5000}
  - {capstan_diameter_mm: 600, motor_kw: 500, max_capstan_rpm: 5000}
",
    )
    .unwrap();
    let text = three_dies("").replace("line:\n  finish_speed_m_s: 5\n", "");
    let rep = on(&text, &m);
    let s = rep.summary.attainable_speed_m_s.unwrap();
    assert_eq!(
        rep.summary.binding_limit.unwrap().name(),
        "wire-temperature"
    );
    let k = 0.9 * 300e6 / (8900.0 * 385.0);
    let rises = [
        k * 2.0 * (5.0f64 / 4.5).ln(),
        k * 2.0 * (4.5f64 / 4.0).ln(),
        k * 2.0 * (4.0f64 / 3.6).ln(),
    ];
    let mut t_in = 25.0;
    let mut hottest = 0.0f64;
    for j in 0..3 {
        let t_out = t_in + rises[j];
        hottest = hottest.max(t_out);
        let v = s * SPEED_PER_FINISH[j];
        let kept = 0.5f64.powf(5.0 / v);
        t_in = 25.0 + kept * (t_out - 25.0);
    }
    assert!((hottest - 70.0).abs() < 1e-6, "{hottest} at {s} m/s");
    assert!(flagged(&rep, "too-hot").is_empty());
    // Faster than that is too hot.
    let fast = on(
        &three_dies("").replace(
            "finish_speed_m_s: 5",
            &format!("finish_speed_m_s: {}", s * 1.1),
        ),
        &m,
    );
    assert!(!flagged(&fast, "too-hot").is_empty());
}

#[test]
fn idle_blocks_on_a_non_slip_machine_and_a_single_draft_on_a_bull_block() {
    // Three dies on a five-block non-slip machine: blocks 4 and 5 stand idle,
    // said in a note; the figures are those of the three-block machine.
    let five = machine::parse(
        &("name: five\nkind: non-slip\ncooling_between_dies: 1\ndrive_efficiency: 0.9\nblocks:\n"
            .to_string()
            + &"  - {capstan_diameter_mm: 600, motor_kw: 10, max_capstan_rpm: 1000}\n".repeat(5)),
    )
    .unwrap();
    let rep = on(&three_dies(""), &five);
    assert_eq!(rep.machine.as_ref().unwrap().blocks.len(), 3);
    assert!(rep
        .notes
        .iter()
        .any(|n| n.contains("blocks 4 to 5 stand idle")));
    let three = on(&three_dies(""), &non_slip([10.0; 3], [1000.0; 3], 1.0));
    assert_eq!(
        rep.summary.attainable_speed_m_s,
        three.summary.attainable_speed_m_s
    );
    // One 38 % draft (5.0 -> 3.95 mm, 1 - 0.79^2 = 37.6 %) on a single-block
    // machine is within the single-draft practice of up to 45 % (Kalpakjian &
    // Schmid, from memory); the same draft is heavy on a multi-die line.
    let one = three_dies("")
        .replace("  - exit: 4.5\n", "  - exit: 3.95\n")
        .replace(
            "  - exit: 4.0\n    back_tension_mpa: 40\n  - exit: 3.6\n    back_tension_mpa: 50\n",
            "",
        );
    let bull = machine::parse(
        "kind: single-block\ncooling_between_dies: 0\nblocks:\n  - {capstan_diameter_mm: 900, motor_kw: 40, max_capstan_rpm: 60}\n",
    )
    .unwrap();
    assert!(flagged(&on(&one, &bull), "heavy-reduction").is_empty());
    assert_eq!(flagged(&check(&one), "heavy-reduction"), vec![1]);
}

#[test]
fn the_page_carries_the_machine_tables_in_the_table_words() {
    let o = coldpass(&[
        "check",
        "schedules-demo/copper-line-3-speed.yaml",
        "--format",
        "html",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let page = stdout(&o);
    for want in [
        "Machine summary",
        "<th>capstan rpm</th>",
        "<th>motor load %</th>",
        "binding block and limit",
        "Caution: ",
    ] {
        assert!(page.contains(want), "page lacks {want}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn any_numbers_in_a_machine_file_give_a_machine_or_an_error_never_a_panic(
        d in prop::num::f64::ANY,
        kw in prop::num::f64::ANY,
        rpm in prop::num::f64::ANY,
        c in prop::num::f64::ANY,
        r in prop::num::f64::ANY,
    ) {
        let text = format!(
            "kind: slip\ncooling_between_dies: {c:?}\nblocks:\n  - {{capstan_diameter_mm: {d:?}, motor_kw: {kw:?}, max_capstan_rpm: {rpm:?}}}\n  - {{capstan_diameter_mm: {d:?}, motor_kw: {kw:?}, max_capstan_rpm: {rpm:?}, step_ratio: {r:?}}}\n"
        );
        if let Ok(m) = machine::parse(&text) {
            // A machine that parses runs two dies without a panic or a non-finite figure.
            let two = three_dies("").replace("  - exit: 3.6\n    back_tension_mpa: 50\n", "");
            let file = schedule::parse(&two).unwrap();
            if let Ok(rep) = evaluate_on(&file, &EvaluateOptions::default(), Some(&m)) {
                for b in &rep.machine.unwrap().blocks {
                    prop_assert!(b.motor_load.is_finite() && b.capstan_rpm.is_finite());
                }
            }
        }
    }
}
