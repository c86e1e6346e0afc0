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
//! On a machine the block figures come from [`crate::machine::run`]
//! (capstan speeds, slip, motor loads, temperature carried die to die).
//! The back tension of the first die (or of the die after an anneal) is held
//! by the pay-off, which no capstan drives. The total is the sum of the net
//! powers, so each back pull is counted once.

use crate::machine::{self, BlockReport, DieLoad, Machine, MachineRun};
use crate::schedule::ScheduleError;

use super::geometry::Planned;
use super::mechanics::PassFigures;
use crate::pass;

/// What stage 3 gives for one draw pass.
#[derive(Debug, Clone, Default)]
pub(super) struct LineFigures {
    /// Exit speed, m/s (with a line or a machine).
    pub exit_speed_m_s: Option<f64>,
    /// Net pull of the capstan after the die, kN: front pull less the back
    /// pull it holds on the next die.
    pub net_pull_kn: f64,
    /// Net pulling power, kW (with a line or a machine): `net pull x
    /// capstan speed` (the wire speed off a machine).
    pub power_kw: Option<f64>,
    /// Mean wire temperature at the die exit, deg C.
    pub wire_temperature_c: f64,
    /// Mean wire temperature at the die entry, deg C.
    pub wire_temperature_entry_c: f64,
    /// Exit temperature with no cooling since the last anneal, deg C.
    pub wire_temperature_no_cooling_c: f64,
    /// The machine block the die is on.
    pub block: Option<BlockReport>,
}

/// The dies of `planned` as the machine sees them, in order.
fn die_loads(planned: &[Planned<'_>], figures: &[Option<PassFigures>]) -> Vec<DieLoad> {
    planned
        .iter()
        .zip(figures)
        .enumerate()
        .filter_map(|(i, (p, f))| match (p, f) {
            (Planned::Draw(d), Some(f)) => Some(DieLoad {
                step: d.index + 1,
                exit_diameter_mm: d.pass.exit_diameter_mm,
                front_pull_kn: f.force_kn,
                back_pull_held_kn: back_pull_held_kn(planned, i),
                temperature_rise_c: f.temperature_rise_c,
            }),
            _ => None,
        })
        .collect()
}

/// The run on `machine` (block loads, slip, temperatures, attainable speed).
pub(super) fn run_machine(
    machine: &Machine,
    planned: &[Planned<'_>],
    figures: &[Option<PassFigures>],
    speed_m_s: Option<f64>,
    ambient_c: f64,
    temperature_max_c: Option<f64>,
) -> Result<MachineRun, ScheduleError> {
    Ok(machine::run(
        machine,
        &die_loads(planned, figures),
        speed_m_s,
        ambient_c,
        temperature_max_c,
    )?)
}

/// Speeds, power and temperatures of every draw (`None` for anneals), at
/// finish speed `speed_m_s`; on a machine, from its `run`.
pub(super) fn run_line(
    planned: &[Planned<'_>],
    figures: &[Option<PassFigures>],
    speed_m_s: Option<f64>,
    finish_diameter_mm: f64,
    ambient_c: f64,
    run: Option<&MachineRun>,
) -> Vec<Option<LineFigures>> {
    let mut blocks = run.map(|r| r.blocks.iter());
    let mut since_anneal = 0.0;
    planned
        .iter()
        .zip(figures)
        .enumerate()
        .map(|(i, (p, f))| match (p, f) {
            (Planned::Draw(d), Some(f)) => {
                let d_out = d.pass.exit_diameter_mm;
                let speed = speed_m_s.map(|v| v * (finish_diameter_mm / d_out).powi(2));
                let net = f.force_kn - back_pull_held_kn(planned, i);
                since_anneal += f.temperature_rise_c;
                let block = blocks.as_mut().and_then(|b| b.next()).cloned();
                let (t_in, t_out, power) = match &block {
                    Some(b) => (
                        b.wire_temperature_in_c,
                        b.wire_temperature_out_c,
                        Some(b.net_power_kw),
                    ),
                    None => (
                        ambient_c,
                        ambient_c + f.temperature_rise_c,
                        speed.map(|v| pass::power_kw(net, v)),
                    ),
                };
                Some(LineFigures {
                    exit_speed_m_s: speed,
                    net_pull_kn: net,
                    power_kw: power,
                    wire_temperature_c: t_out,
                    wire_temperature_entry_c: t_in,
                    wire_temperature_no_cooling_c: ambient_c + since_anneal,
                    block,
                })
            }
            _ => {
                since_anneal = 0.0;
                None
            }
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
