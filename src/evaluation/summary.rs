//! Stage 5, summary: totals, the worst pass, throughput and the verdict.
//!
//! Mass throughput is `rho A_f v_f`; tonnes per shift multiply it by the
//! shift length and the line's utilisation (common practice).

use crate::pass;
use crate::schedule::{self, Line, ScheduleFile};

use super::{StepKind, StepReport, Summary, Verdict};

/// The worst draw ratio and its step: the first of equal ratios (equal to a
/// part in a million, the design solver's tolerance), so an equal-ratio run
/// names its first pass.
fn worst_ratio(draws: &[&StepReport]) -> Option<(f64, usize)> {
    draws
        .iter()
        .filter_map(|r| r.draw_ratio.map(|x| (x, r.step)))
        .fold(None, |best: Option<(f64, usize)>, (x, step)| match best {
            Some((b, _)) if x <= b * (1.0 + 1e-6) => best,
            _ => Some((x, step)),
        })
}

/// `over` if any flag is over a limit, `warn` if any flag at all, else `ok`.
pub(super) fn verdict(rows: &[StepReport]) -> Verdict {
    rows.iter()
        .flat_map(|r| r.flags.iter())
        .map(|f| {
            if f.is_over() {
                Verdict::Over
            } else {
                Verdict::Warn
            }
        })
        .max()
        .unwrap_or(Verdict::Ok)
}

/// Mass throughput at `finish_speed_m_s`, kg/h: `rho A_f v_f 3600`.
pub(super) fn throughput_kg_h(density_kg_m3: f64, finish_diameter_mm: f64, speed_m_s: f64) -> f64 {
    let finish_area_m2 = std::f64::consts::PI * (finish_diameter_mm * 1e-3).powi(2) / 4.0;
    density_kg_m3 * finish_area_m2 * speed_m_s * 3600.0
}

/// Tonnes per shift from kg/h, with the line's shift length and utilisation
/// (defaults 8 h and 0.85 without a line).
pub(super) fn tonnes_per_shift(line: Option<&Line>, kg_h: f64) -> f64 {
    let hours = line
        .and_then(|l| l.shift_hours)
        .unwrap_or(schedule::DEFAULT_SHIFT_HOURS);
    let utilisation = line
        .and_then(|l| l.utilisation)
        .unwrap_or(schedule::DEFAULT_UTILISATION);
    kg_h * hours * utilisation / 1000.0
}

/// The whole-schedule summary of `rows` (which hold at least one draw).
pub(super) fn summarise(
    file: &ScheduleFile,
    rows: &[StepReport],
    finish_d: f64,
    total_power_kw: Option<f64>,
) -> Summary {
    let start_d = file.start.diameter.mm();
    let line = file.line.as_ref();
    let draws: Vec<&StepReport> = rows.iter().filter(|r| r.kind == StepKind::Draw).collect();
    let worst = worst_ratio(&draws);
    let throughput =
        line.map(|l| throughput_kg_h(file.material.density_kg_m3, finish_d, l.finish_speed_m_s));
    let per_shift = throughput.map(|kg_h| tonnes_per_shift(line, kg_h));
    let coil = line
        .and_then(|l| l.coil_mass_kg)
        .zip(throughput)
        .map(|(m, kg_h)| m / kg_h * 60.0);
    let last = rows.last().expect("a schedule with a draw pass has rows");
    Summary {
        start_diameter_mm: start_d,
        finish_diameter_mm: finish_d,
        total_area_reduction: pass::area_reduction(start_d, finish_d),
        total_strain: pass::true_strain(start_d, finish_d),
        final_strain: last.strain_after,
        draw_passes: draws.len(),
        anneals: rows.len() - draws.len(),
        worst_draw_ratio: worst.map(|w| w.0),
        worst_step: worst.map(|w| w.1),
        final_flow_stress_mpa: last.flow_stress_exit_mpa,
        throughput_kg_h: throughput,
        throughput_t_per_shift: per_shift,
        coil_time_min: coil,
        total_power_kw,
        tensile_strength_mpa: last.tensile_strength_mpa,
        considere_strain: None,
        attainable_speed_m_s: None,
        binding_block: None,
        binding_limit: None,
        attainable_t_per_shift: None,
        verdict: verdict(rows),
    }
}
