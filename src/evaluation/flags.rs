//! Stage 4, flags: each pass against the file's limits (draw ratio, cold
//! work, Delta, temperature, block power, back tension, die angle).

use crate::schedule::ScheduleFile;

use super::line::LineFigures;
use super::mechanics::PassFigures;
use super::Flag;

/// The limits a pass is held to, resolved once.
#[derive(Debug, Clone, Copy)]
pub(super) struct FlagLimits {
    /// Largest distance from the optimum semi-angle, degrees.
    pub angle_tolerance_deg: f64,
    /// Per-pass area reduction above which a pass is `heavy-reduction`.
    pub reduction_warn: f64,
    /// Highest wire temperature at a die exit (the lower of the file's and
    /// the machine's), deg C.
    pub temperature_max_c: Option<f64>,
    /// Largest slip (on a slip machine).
    pub slip_max: Option<f64>,
    /// Power limit per die without a machine, kW (`line.block_power_kw`).
    pub block_power_kw: Option<f64>,
}

/// The flags of one draw pass.
pub(super) fn pass_flags(
    file: &ScheduleFile,
    limits: FlagLimits,
    f: &PassFigures,
    line: &LineFigures,
) -> Vec<Flag> {
    let l = &file.limits;
    let mech = &f.mech;
    let mut flags = Vec::new();
    if f.draw_ratio > l.draw_ratio_max {
        flags.push(Flag::OverDrawLimit);
    } else if f.draw_ratio > l.draw_ratio_warn {
        flags.push(Flag::NearDrawLimit);
    }
    if let Some(limit) = file.material.cold_work_limit {
        if mech.strain_after > limit {
            flags.push(Flag::AnnealDue);
        }
    }
    if let Some(dmax) = l.delta_max {
        if mech.delta > dmax {
            flags.push(Flag::CentralBurstRisk);
        }
    }
    if let Some(tmax) = limits.temperature_max_c {
        if line.wire_temperature_c > tmax {
            flags.push(Flag::TooHot);
        }
    }
    if let (Some(p), Some(pmax)) = (line.power_kw, limits.block_power_kw) {
        if p > pmax {
            flags.push(Flag::OverBlockPower);
        }
    }
    // A relative margin keeps a block exactly at its limit (the attainable
    // speed) within it despite rounding.
    const AT_LIMIT: f64 = 1.0 + 1e-9;
    if let Some(b) = &line.block {
        if b.motor_load > AT_LIMIT {
            flags.push(Flag::OverBlockPower);
        }
        if b.surface_speed_m_s > b.max_surface_speed_m_s * AT_LIMIT {
            flags.push(Flag::OverCapstanSpeed);
        }
        if b.slip < -1e-9 {
            flags.push(Flag::NegativeSlip);
        } else if limits.slip_max.is_some_and(|s| b.slip > s) {
            flags.push(Flag::SlipOverLimit);
        }
    }
    let back = mech.back_tension_mpa;
    if back > 0.0 && back >= f.entry_yield_mpa {
        flags.push(Flag::BackTensionOverYield);
    }
    if mech.area_reduction > limits.reduction_warn {
        flags.push(Flag::HeavyReduction);
    }
    if let Some(valid) = file.material.flow_valid_to_strain {
        if mech.strain_after > valid {
            flags.push(Flag::PastLawRange);
        }
    }
    if let Some(o) = f.optimum {
        if !o.at_search_limit
            && (o.semi_angle_deg - f.semi_angle_deg).abs() > limits.angle_tolerance_deg
        {
            flags.push(Flag::AngleOffOptimum);
        }
    }
    flags
}
