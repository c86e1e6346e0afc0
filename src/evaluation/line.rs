//! Stage 3, the line: exit speeds by volume constancy, pulling power and
//! the wire temperature at each die exit.
//!
//! Speeds follow volume constancy on a continuous line, `v_i A_i = v_f A_f`
//! (common practice), from the finish speed through every pass.

use crate::schedule::Line;

use super::geometry::Planned;
use super::mechanics::PassFigures;
use crate::pass;

/// What stage 3 gives for one draw pass.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct LineFigures {
    /// Exit speed, m/s (with a line).
    pub exit_speed_m_s: Option<f64>,
    /// Pulling power, kW (with a line).
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
        .map(|(p, f)| match (p, f) {
            (Planned::Draw(d), Some(f)) => {
                let d_out = d.pass.exit_diameter_mm;
                let speed = line.map(|l| l.finish_speed_m_s * (finish_diameter_mm / d_out).powi(2));
                Some(LineFigures {
                    exit_speed_m_s: speed,
                    power_kw: speed.map(|v| pass::power_kw(f.force_kn, v)),
                    wire_temperature_c: ambient_c + f.temperature_rise_c,
                })
            }
            _ => None,
        })
        .collect()
}
