//! Stage 4, rows: one report row per step from stages 1 to 3, with the
//! flags of stage 4.

use crate::flow::FlowLaw;
use crate::schedule::ScheduleFile;

use super::flags::{self, FlagLimits};
use super::geometry::{Planned, PlannedDraw};
use super::line::LineFigures;
use super::mechanics::PassFigures;
use super::{Flag, StepKind, StepReport};

/// One report row per step, with its flags.
pub(super) fn build_rows(
    file: &ScheduleFile,
    flag_limits: FlagLimits,
    planned: &[Planned<'_>],
    figures: &[Option<PassFigures>],
    line_figures: &[Option<LineFigures>],
) -> Vec<StepReport> {
    planned
        .iter()
        .zip(figures)
        .zip(line_figures)
        .map(|((p, f), l)| match (p, f, l) {
            (Planned::Draw(d), Some(f), Some(l)) => {
                draw_row(d, f, l, flags::pass_flags(file, flag_limits, f, l))
            }
            (
                Planned::Anneal {
                    index,
                    diameter_mm,
                    strain_before,
                    law,
                },
                _,
                _,
            ) => anneal_row(*index, *diameter_mm, *strain_before, law),
            _ => unreachable!("stages 2 and 3 give figures for every draw"),
        })
        .collect()
}

pub(super) fn draw_row(
    d: &PlannedDraw<'_>,
    f: &PassFigures,
    l: &LineFigures,
    flags: Vec<Flag>,
) -> StepReport {
    let mech = &f.mech;
    let dp = &d.pass;
    StepReport {
        step: d.index + 1,
        kind: StepKind::Draw,
        die_size: d.die_size.clone(),
        entry_diameter_mm: dp.entry_diameter_mm,
        exit_diameter_mm: dp.exit_diameter_mm,
        area_reduction: Some(mech.area_reduction),
        elongation: Some(mech.elongation),
        cumulative_reduction: d.cumulative_reduction,
        pass_strain: Some(mech.pass_strain),
        strain_before: mech.strain_before,
        strain_after: mech.strain_after,
        flow_stress_entry_mpa: Some(mech.flow_stress_entry_mpa),
        mean_flow_stress_mpa: Some(mech.mean_flow_stress_mpa),
        flow_stress_exit_mpa: mech.flow_stress_exit_mpa,
        delta: Some(mech.delta),
        semi_angle_deg: Some(dp.die.semi_angle_deg),
        friction: Some(dp.die.friction),
        friction_factor: Some(mech.friction_factor),
        back_tension_mpa: Some(dp.back_tension_mpa),
        draw_stress_mpa: Some(mech.draw_stress_mpa),
        governing_draw_stress_mpa: Some(f.governing_mpa),
        draw_ratio: Some(f.draw_ratio),
        optimum_semi_angle_deg: f.optimum.map(|o| o.semi_angle_deg),
        force_kn: Some(f.force_kn),
        exit_speed_m_s: l.exit_speed_m_s,
        net_pull_kn: Some(l.net_pull_kn),
        power_kw: l.power_kw,
        temperature_rise_c: Some(f.temperature_rise_c),
        wire_temperature_c: Some(l.wire_temperature_c),
        wire_temperature_entry_c: Some(l.wire_temperature_entry_c),
        wire_temperature_no_cooling_c: Some(l.wire_temperature_no_cooling_c),
        entry_yield_mpa: Some(f.entry_yield_mpa),
        tensile_strength_mpa: f.tensile_strength_mpa,
        block: l.block.as_ref().map(|b| b.block),
        flags,
    }
}

pub(super) fn anneal_row(
    index: usize,
    diameter_mm: f64,
    strain_before: f64,
    law: &FlowLaw,
) -> StepReport {
    StepReport {
        step: index + 1,
        kind: StepKind::Anneal,
        die_size: None,
        entry_diameter_mm: diameter_mm,
        exit_diameter_mm: diameter_mm,
        area_reduction: None,
        elongation: None,
        cumulative_reduction: 0.0,
        pass_strain: None,
        strain_before,
        strain_after: 0.0,
        flow_stress_entry_mpa: None,
        mean_flow_stress_mpa: None,
        flow_stress_exit_mpa: law.stress_mpa(0.0),
        delta: None,
        semi_angle_deg: None,
        friction: None,
        friction_factor: None,
        back_tension_mpa: None,
        draw_stress_mpa: None,
        governing_draw_stress_mpa: None,
        draw_ratio: None,
        optimum_semi_angle_deg: None,
        force_kn: None,
        exit_speed_m_s: None,
        net_pull_kn: None,
        power_kw: None,
        temperature_rise_c: None,
        wire_temperature_c: None,
        wire_temperature_entry_c: None,
        wire_temperature_no_cooling_c: None,
        entry_yield_mpa: None,
        tensile_strength_mpa: None,
        block: None,
        flags: Vec::new(),
    }
}
