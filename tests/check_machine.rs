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
    //   die 3 4.0 -> 3.6: eps 0.210721, sigma_d 50 + 63.216 = 113.216 MPa, A3 10.179 mm^2, F3 1.15241 kN
    // The capstan after die 1 holds die 2's back pull B2 = 40 MPa x A1 = 0.63617 kN,
    // the one after die 2 holds B3 = 50 MPa x A2 = 0.62832 kN, the last holds none.
    //   net pulls 0.36924, 0.76240, 1.15241 kN
    // Speeds by volume constancy from 5 m/s at 3.6 mm: v1 = 5 (3.6/4.5)^2 = 3.2,
    // v2 = 5 (3.6/4.0)^2 = 4.05, v3 = 5 m/s.
    //   net powers 1.18157, 3.08772, 5.76205 kW; total 10.0313 kW
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
