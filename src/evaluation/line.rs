//! Stage 3, the line: exit speeds by volume constancy, pulling power and
//! the wire temperature at each die exit.
//!
//! Speeds follow volume constancy on a continuous line, `v_i A_i = v_f A_f`
//! (common practice), from the finish speed through every pass.
//!
//! The capstan after die `i` pulls the wire out of it with the front force
//! `F_i = sigma_d,i A_i` but is itself held back by the back tension it gives
//! die `i+1`, `B_{i+1} = sigma_b,i+1 A_i` (the back tension acts on the entry
//! section of die `i+1`, the exit section of die `i`). Its net pull is
//! `F_i - B_{i+1}` and its power `(F_i - B_{i+1}) v_i` (force balance on the
//! capstan; Wright, Wire Technology, ch. on drawing machines, from memory).
//! The back tension of the first die (or of the die after an anneal) is held
//! by the pay-off, which no capstan drives. The total is the sum of the net
//! powers, so each back pull is counted once.

use crate::schedule::Line;

use super::geometry::Planned;
use super::mechanics::PassFigures;
use crate::pass;

/// What stage 3 gives for one draw pass.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct LineFigures {
    /// Exit speed, m/s (with a line).
    pub exit_speed_m_s: Option<f64>,
    /// Net pull of the capstan after the die, kN: front pull less the back
    /// pull it holds on the next die.
    pub net_pull_kn: f64,
    /// Net pulling power, kW (with a line): `net pull x exit speed`.
    pub power_kw: Option<f64>,
    /// Mean wire temperature at the die exit, deg C.
    pub wire_temperature_c: f64,
}

/// Speeds, power and temperatures of every draw (`None` for anneals).
pub(super) fn run_line(
    planned: &[Planned<'_>],
    figures: &[Option<PassFigures>],
    line: Option<&Line>,
    finish_diameter_mm: f64,
    ambient_c: f64,
) -> Vec<Option<LineFigures>> {
    planned
        .iter()
        .zip(figures)
        .enumerate()
        .map(|(i, (p, f))| match (p, f) {
            (Planned::Draw(d), Some(f)) => {
                let d_out = d.pass.exit_diameter_mm;
                let speed = line.map(|l| l.finish_speed_m_s * (finish_diameter_mm / d_out).powi(2));
                let net = f.force_kn - back_pull_held_kn(planned, i);
                Some(LineFigures {
                    exit_speed_m_s: speed,
                    net_pull_kn: net,
                    power_kw: speed.map(|v| pass::power_kw(net, v)),
                    wire_temperature_c: ambient_c + f.temperature_rise_c,
                })
            }
            _ => None,
        })
        .collect()
}

/// The back pull, kN, that the capstan after step `i` holds on the next
/// die: `sigma_b A` on the next die's entry section, 0 when the next step is
/// an anneal or there is none.
pub(super) fn back_pull_held_kn(planned: &[Planned<'_>], i: usize) -> f64 {
    match planned.get(i + 1) {
        Some(Planned::Draw(next)) => {
            pass::force_kn(next.pass.back_tension_mpa, next.pass.entry_diameter_mm)
        }
        _ => 0.0,
    }
}
