//! Stage 2, mechanics per pass: flow stresses, drawing stress by every
//! method and the governing one, draw ratio, optimum semi-angle, drawing
//! force and the mean adiabatic temperature rise (formulas and sources in
//! [`crate::pass`]).

use crate::pass::{self, Method, PassMechanics, PreparedPass, Settings};
use crate::schedule::ScheduleError;

use super::geometry::PlannedDraw;
use super::{pass_error, strength};

/// What stage 2 gives for one draw pass.
#[derive(Debug, Clone)]
pub(super) struct PassFigures {
    /// The pass's mechanics (every method).
    pub mech: PassMechanics,
    /// Drawing stress by the governing method, MPa.
    pub governing_mpa: f64,
    /// Governing drawing stress over exit flow stress.
    pub draw_ratio: f64,
    /// The optimum semi-angle (none for angle-free methods).
    pub optimum: Option<pass::OptimumAngle>,
    /// Drawing force (front pull), kN: `sigma_d A1`.
    pub force_kn: f64,
    /// Mean adiabatic temperature rise in the die, deg C.
    pub temperature_rise_c: f64,
    /// The die's semi-angle, degrees.
    pub semi_angle_deg: f64,
    /// The yield the back tension is held against, MPa.
    pub entry_yield_mpa: f64,
    /// Tensile strength of the wire after the pass, MPa (Considere).
    pub tensile_strength_mpa: Option<f64>,
}

/// Material constants the temperature rise needs.
#[derive(Debug, Clone, Copy)]
pub(super) struct Heat {
    /// Density, kg/m^3.
    pub density_kg_m3: f64,
    /// Specific heat, J/(kg K).
    pub specific_heat_j_kg_k: f64,
    /// Fraction of the die work that becomes heat.
    pub heat_fraction: f64,
}

/// Evaluates one planned draw by `method`; `yield_mpa` is the file's yield
/// of annealed stock and `eps_u` the law's Considere strain.
pub(super) fn analyse(
    draw: &PlannedDraw<'_>,
    settings: &Settings,
    method: Method,
    heat: Heat,
    yield_mpa: Option<f64>,
    eps_u: Option<f64>,
) -> Result<PassFigures, ScheduleError> {
    let i = draw.index;
    let dp = &draw.pass;
    // One prepared pass for the pass's own die and its optimum angle: the
    // same figures as `analyse_pass` and `optimum_semi_angle`, prepared once.
    let prepared = PreparedPass::new(draw.law, dp, settings).map_err(|e| pass_error(i, e))?;
    let mech = prepared.own_mechanics().map_err(|e| pass_error(i, e))?;
    let governing = mech
        .draw_stress_mpa
        .get(method)
        .map_err(|e| pass_error(i, e))?;
    let optimum = prepared
        .own_optimum_semi_angle(method)
        .map_err(|e| pass_error(i, e))?;
    let rise = pass::temperature_rise_c(
        (governing - dp.back_tension_mpa).max(0.0),
        heat.density_kg_m3,
        heat.specific_heat_j_kg_k,
        heat.heat_fraction,
    );
    Ok(PassFigures {
        draw_ratio: governing / mech.flow_stress_exit_mpa,
        force_kn: pass::force_kn(governing, dp.exit_diameter_mm),
        governing_mpa: governing,
        optimum,
        temperature_rise_c: rise,
        semi_angle_deg: dp.die.semi_angle_deg,
        entry_yield_mpa: strength::entry_yield_mpa(draw.law, dp.strain_before, yield_mpa),
        tensile_strength_mpa: strength::tensile_strength_mpa(draw.law, eps_u, mech.strain_after),
        mech,
    })
}
