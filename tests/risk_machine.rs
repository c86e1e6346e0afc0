//! `risk` on a machine: the probability that a block is over its motor
//! rating uses the block's own motor, its drive efficiency and the net pull
//! (front pull less the back pull it holds on the next die), as `check`
//! flags `over-block-power`.
//!
//! The hand-worked case: a perfectly plastic rod, Y = 300 MPa, drawn
//! 5.0 -> 4.5 -> 4.05 -> 3.645 mm by the ideal-work method, so each die's
//! drawing stress is the published `sigma_d = sigma_b + Y eps` with
//! `eps = 2 ln(D0/D1) = 2 ln(1/0.9)` (Dieter, Mechanical Metallurgy,
//! ch. 19), on a three-block non-slip machine whose dancers hold 50 MPa on
//! dies 2 and 3. With the finish speed v_f = 5 m/s, each capstan runs at
//! the wire speed `v_i = v_f (D_f/D_i)^2` (volume constancy); block i
//! carries `F_i - B_i+1` with `F_i = sigma_d,i pi D_i^2 / 4` and
//! `B_i+1 = sigma_b pi D_i^2 / 4` (the back tension on the next die's entry,
//! which is this die's exit); its motor load is `(F_i - B_i+1) v_i / eta`
//! over its rating (force balance on a capstan; common practice). The test
//! works these out itself from those formulas, not from the code.

use std::f64::consts::PI;
use std::sync::atomic::AtomicBool;

use coldpass::evaluation::{evaluate_on, EvaluateOptions, Flag, StepKind};
use coldpass::machine::{self, Machine};
use coldpass::risk::{assess_on, RiskOptions, RiskReport, Sampling};
use coldpass::schedule::{self, ScheduleFile};

const Y_MPA: f64 = 300.0;
const BACK_MPA: f64 = 50.0;
const SPEED_M_S: f64 = 5.0;
const EFFICIENCY: f64 = 0.9;
const DIAMETERS_MM: [f64; 4] = [5.0, 4.5, 4.05, 3.645];

fn schedule_text(flow_scatter: &str) -> String {
    format!(
        "material:
  density_kg_m3: 7850
  specific_heat_j_kg_k: 470
  flow: {{law: perfectly-plastic, yield_mpa: {Y_MPA}}}
{flow_scatter}
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
  finish_speed_m_s: {SPEED_M_S}
passes:
  - exit: 4.5
  - exit: 4.05
  - exit: 3.645
"
    )
}

fn machine_with(motor_kw: [f64; 3]) -> Machine {
    machine::parse(&format!(
        "name: test machine (three blocks)
kind: non-slip
cooling_between_dies: 1
drive_efficiency: {EFFICIENCY}
blocks:
  - {{capstan_diameter_mm: 500, max_capstan_rpm: 2000, motor_kw: {}}}
  - {{capstan_diameter_mm: 500, max_capstan_rpm: 2000, motor_kw: {}, dancer_back_tension_mpa: {BACK_MPA}}}
  - {{capstan_diameter_mm: 500, max_capstan_rpm: 2000, motor_kw: {}, dancer_back_tension_mpa: {BACK_MPA}}}
",
        motor_kw[0], motor_kw[1], motor_kw[2]
    ))
    .unwrap()
}

/// The net power at each block's motor, kW, worked from the formulas in the
/// module comment for yield `y`.
fn hand_motor_kw(y: f64) -> [f64; 3] {
    let area = |d: f64| PI * d * d / 4.0; // mm^2
    let eps = 2.0 * (1.0f64 / 0.9).ln();
    let d_f = DIAMETERS_MM[3];
    let mut out = [0.0; 3];
    for (i, slot) in out.iter_mut().enumerate() {
        let d = DIAMETERS_MM[i + 1];
        let back_in = if i == 0 { 0.0 } else { BACK_MPA };
        let front_n = (back_in + y * eps) * area(d);
        let held_n = if i < 2 { BACK_MPA * area(d) } else { 0.0 };
        let v = SPEED_M_S * (d_f / d).powi(2);
        *slot = (front_n - held_n) * v / 1000.0 / EFFICIENCY;
    }
    out
}

fn run(file: &ScheduleFile, m: &Machine, samples: u64) -> RiskReport {
    let options = RiskOptions {
        samples,
        seed: 5,
        sampling: Sampling::LatinHypercube,
        ..RiskOptions::default()
    };
    assess_on(file, &options, Some(m), &|_| {}, &AtomicBool::new(false)).unwrap()
}

#[test]
fn zero_scatter_gives_check_s_block_flags_exactly() {
    let file = schedule::parse(&schedule_text("")).unwrap();
    let need = hand_motor_kw(Y_MPA);
    // Block 2 is rated 5 % under its load, blocks 1 and 3 5 % over theirs.
    let m = machine_with([need[0] * 1.05, need[1] * 0.95, need[2] * 1.05]);
    let check = evaluate_on(&file, &EvaluateOptions::default(), Some(&m)).unwrap();
    let run_ = check.machine.as_ref().unwrap();
    // check agrees with the hand figures (to rounding).
    for (b, hand) in run_.blocks.iter().zip(need) {
        assert!(
            (b.motor_load_kw - hand).abs() < 1e-9 * hand,
            "block {}: check {} vs hand {hand}",
            b.block,
            b.motor_load_kw
        );
    }
    let rep = run(&file, &m, 200);
    let draws: Vec<_> = check
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    for (p, row) in rep.passes.iter().zip(&draws) {
        let flagged = row.flags.contains(&Flag::OverBlockPower);
        let prob = p.over_block_power_probability.unwrap();
        assert_eq!(prob, if flagged { 1.0 } else { 0.0 }, "step {}", p.step);
        // The dancers' back tension is in the nominal pass, as in check.
        assert_eq!(Some(p.draw_ratio), row.draw_ratio, "step {}", p.step);
    }
    let over: Vec<f64> = rep
        .passes
        .iter()
        .map(|p| p.over_block_power_probability.unwrap())
        .collect();
    assert_eq!(over, [0.0, 1.0, 0.0]);
}

/// Standard normal CDF, from the complementary error function.
fn phi(x: f64) -> f64 {
    0.5 * libm::erfc(-x / std::f64::consts::SQRT_2)
}

#[test]
fn a_scattered_yield_puts_the_last_block_over_its_motor_as_the_normal_law_says() {
    // Y ~ normal(300, 15). Block 3 carries (sigma_b + Y eps) A_3 with nothing
    // held after it, so its load is linear in Y and over its rating when
    // Y > Y*, where the hand load at Y* equals the rating: P = 1 - Phi((Y* - 300)/15).
    let sd = 15.0;
    let file = schedule::parse(&schedule_text(&format!(
        "  flow_scatter: {{sd: {{yield_mpa: {sd}}}}}"
    )))
    .unwrap();
    let rating_3 = hand_motor_kw(310.0)[2];
    let m = machine_with([1e3, 1e3, rating_3]);
    // The load is linear in Y: solve for Y* from two hand points.
    let (a, b) = (
        hand_motor_kw(0.0)[2],
        hand_motor_kw(1.0)[2] - hand_motor_kw(0.0)[2],
    );
    let y_star = (rating_3 - a) / b;
    assert!((y_star - 310.0).abs() < 1e-9);
    let expected = 1.0 - phi((y_star - Y_MPA) / sd);
    let rep = run(&file, &m, 40_000);
    let p = &rep.passes[2];
    let got = p.over_block_power_probability.unwrap();
    let se = p.over_block_power_standard_error.unwrap();
    assert!(
        (got - expected).abs() < 3.0 * se,
        "sampled {got} +- {se} vs normal law {expected}"
    );
    // Blocks 1 and 2 have motors far over their loads.
    assert_eq!(rep.passes[0].over_block_power_probability, Some(0.0));
    assert_eq!(rep.passes[1].over_block_power_probability, Some(0.0));
}

#[test]
fn without_a_machine_the_line_limit_is_held_to_the_net_power() {
    // On a line, die 3 alone has a back tension: the capstan after die 2
    // holds it, so block 2's net power is its gross power less
    // sigma_b A_2 v_2. A block_power_kw between the two: check does not flag
    // die 2 (net), and neither does risk (it once compared the gross power).
    let text = schedule_text("").replace(
        "  - exit: 3.645\n",
        &format!("  - {{exit: 3.645, back_tension_mpa: {BACK_MPA}}}\n"),
    );
    let area = |d: f64| PI * d * d / 4.0;
    let eps = 2.0 * (1.0f64 / 0.9).ln();
    let v2 = SPEED_M_S * (DIAMETERS_MM[3] / DIAMETERS_MM[2]).powi(2);
    let gross_2 = Y_MPA * eps * area(DIAMETERS_MM[2]) * v2 / 1000.0;
    let net_2 = gross_2 - BACK_MPA * area(DIAMETERS_MM[2]) * v2 / 1000.0;
    let limit = 0.5 * (gross_2 + net_2);
    let text = text.replace(
        &format!("  finish_speed_m_s: {SPEED_M_S}\n"),
        &format!("  finish_speed_m_s: {SPEED_M_S}\n  block_power_kw: {limit}\n"),
    );
    let file = schedule::parse(&text).unwrap();
    let check = coldpass::evaluation::evaluate(&file, &EvaluateOptions::default()).unwrap();
    let options = RiskOptions {
        samples: 100,
        ..RiskOptions::default()
    };
    let rep = coldpass::risk::assess(&file, &options, &|_| {}, &AtomicBool::new(false)).unwrap();
    let draws: Vec<_> = check
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    for (p, row) in rep.passes.iter().zip(&draws) {
        let flagged = row.flags.contains(&Flag::OverBlockPower);
        assert_eq!(
            p.over_block_power_probability,
            Some(if flagged { 1.0 } else { 0.0 }),
            "step {}",
            p.step
        );
    }
    assert_eq!(rep.passes[1].over_block_power_probability, Some(0.0));
    // Its hand net power is the one check reports.
    let reported = draws[1].power_kw.unwrap();
    assert!(
        (reported - net_2).abs() < 1e-9 * net_2,
        "{reported} vs {net_2}"
    );
}
