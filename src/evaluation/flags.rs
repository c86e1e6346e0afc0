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
    if let Some(tmax) = l.wire_temperature_max_c {
        if line.wire_temperature_c > tmax {
            flags.push(Flag::TooHot);
        }
    }
    if let (Some(p), Some(pmax)) = (
        line.power_kw,
        file.line.as_ref().and_then(|l| l.block_power_kw),
    ) {
        if p > pmax {
            flags.push(Flag::OverBlockPower);
        }
    }
    let back = mech.back_tension_mpa;
    if back > 0.0 && back >= mech.flow_stress_entry_mpa {
        flags.push(Flag::BackTensionOverYield);
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
