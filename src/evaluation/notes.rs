//! Stage 5, notes: what the report says in words about the flags raised
//! once per schedule, the machine run, the finished strength (Considere),
//! the temperature and speed models, and the law against the mill's
//! measured strengths.

use crate::machine::MachineRun;
use crate::pass;
use crate::schedule::ScheduleFile;

use super::flags::FlagLimits;
use super::{strength, Considere, Flag, StepReport, StrengthCheck};

/// The law's tensile strength at each of the mill's measured points.
pub(super) fn strength_checks(file: &ScheduleFile, considere: &Considere) -> Vec<StrengthCheck> {
    let start_d = file.start.diameter.mm();
    file.material
        .drawn_strengths
        .iter()
        .filter_map(|p| {
            let strain = p.strain.unwrap_or_else(|| {
                file.start.strain
                    + p.diameter
                        .as_ref()
                        .map_or(0.0, |d| pass::true_strain(start_d, d.mm()))
            });
            let predicted =
                strength::tensile_strength_mpa(&file.material.flow, considere.flow, strain)?;
            Some(StrengthCheck {
                strain,
                measured_mpa: p.tensile_strength_mpa,
                predicted_mpa: predicted,
                difference: (predicted - p.tensile_strength_mpa) / p.tensile_strength_mpa,
            })
        })
        .collect()
}

/// Notes that explain flags raised once per schedule.
pub(super) fn flag_notes(
    file: &ScheduleFile,
    rows: &[StepReport],
    limits: &FlagLimits,
) -> Vec<String> {
    let mut notes = Vec::new();
    if let Some(limit) = file.material.cold_work_limit {
        if let Some(r) = rows.iter().find(|r| r.flags.contains(&Flag::AnnealDue)) {
            notes.push(format!(
                "cold-work limit {limit} is passed at step {}: schedule an anneal before it",
                r.step
            ));
        }
    }
    if let Some(r) = rows
        .iter()
        .find(|r| r.flags.contains(&Flag::HeavyReduction))
    {
        notes.push(format!(
            "step {} takes {:.1} % in one pass, above the {:.0} % that common practice allows (Kalpakjian & Schmid; from memory; set limits.reduction_warn)",
            r.step,
            100.0 * r.area_reduction.unwrap_or(0.0),
            100.0 * limits.reduction_warn
        ));
    }
    if let Some(valid) = file.material.flow_valid_to_strain {
        let past: Vec<&StepReport> = rows
            .iter()
            .filter(|r| r.flags.contains(&Flag::PastLawRange))
            .collect();
        if let (Some(first), Some(worst)) = (
            past.first(),
            past.iter()
                .max_by(|a, b| a.strain_after.total_cmp(&b.strain_after)),
        ) {
            let law = &file.material.flow;
            notes.push(format!(
                "the flow law was fitted to strain {valid}; from step {} the schedule goes past it, to strain {:.3} ({:.3} beyond): the law gives {:.0} MPa there against {:.0} MPa at the end of its range, an extrapolation to confirm by test",
                first.step,
                worst.strain_after,
                worst.strain_after - valid,
                law.stress_mpa(worst.strain_after),
                law.stress_mpa(valid)
            ));
        }
    }
    notes
}

/// Notes on the machine run: the assignment, the temperature model and the
/// speed the file asks against the attainable one.
pub(super) fn machine_notes(run: &MachineRun, file_speed: Option<f64>) -> Vec<String> {
    let name = if run.name.is_empty() {
        "the machine".to_string()
    } else {
        format!("machine '{}'", run.name)
    };
    let used = run.blocks.len();
    let mut notes = vec![format!(
        "{name} ({}, {} blocks): die 1 on block 1 and so on in order{}",
        run.kind.name(),
        run.blocks_available,
        if used < run.blocks_available {
            format!(
                "; blocks {} to {} stand idle",
                used + 1,
                run.blocks_available
            )
        } else {
            String::new()
        }
    )];
    match run.attainable_speed_m_s {
        Some(v) => notes.push(format!(
            "attainable finish speed {v:.2} m/s ({:.0} m/min), bound by block {} ({})",
            v * 60.0,
            run.binding_block,
            run.binding_limit.name()
        )),
        None => notes.push(format!(
            "no speed is attainable: the wire is above the temperature limit at block {} however slowly it runs (with a fixed cooling fraction the temperature does not fall with speed; give cooling_at_speed_m_s for cooling that grows as the wire slows); the motors and capstans alone would allow {:.2} m/s",
            run.binding_block, run.mechanical_speed_m_s
        )),
    }
    match (file_speed, run.attainable_speed_m_s) {
        (Some(f), Some(a)) if f > a * (1.0 + 1e-9) => notes.push(format!(
            "the file's finish speed {f} m/s is above the attainable {a:.2} m/s: block figures are at the file's speed and the blocks over a limit are flagged"
        )),
        (None, _) => notes.push(format!(
            "no line.finish_speed_m_s: block figures are at the highest speed the motors and capstans allow ({:.2} m/s)",
            run.running_speed_m_s
        )),
        _ => {}
    }
    notes
}

/// The notes every report ends with: the finished strength, the temperature
/// model and the speed model.
pub(super) fn closing_notes(
    rows: &[StepReport],
    ambient: f64,
    has_speed: bool,
    eps_u: Option<f64>,
    run: Option<&MachineRun>,
) -> Vec<String> {
    let mut notes = Vec::new();
    if let Some(last) = rows.last() {
        // Considere: wire drawn past the law's necking strain has no uniform
        // elongation left, so its tensile strength is its flow stress; below
        // it the wire still work-hardens in the test.
        notes.push(match (eps_u, last.tensile_strength_mpa) {
            (Some(eu), Some(uts)) if last.strain_after >= eu => format!(
                "finished flow stress {:.0} MPa: drawn past the law's Considere strain {eu:.3} (strain {:.2} since anneal), so the tensile strength is the flow stress, {uts:.0} MPa",
                last.flow_stress_exit_mpa, last.strain_after
            ),
            (Some(eu), Some(uts)) => format!(
                "finished flow stress {:.0} MPa: the wire is drawn to strain {:.2} since anneal, short of the law's Considere strain {eu:.3}, so it still hardens in a tensile test: tensile strength about {uts:.0} MPa",
                last.flow_stress_exit_mpa, last.strain_after
            ),
            _ => format!(
                "finished flow stress {:.0} MPa: the law does not neck (Considere) within strain 20, so no tensile strength is estimated",
                last.flow_stress_exit_mpa
            ),
        });
    }
    notes.push(match run {
        Some(r) => format!(
            "wire temperature: carried die to die; the wire enters die 1 at ambient ({ambient} C) and the machine's cooling takes {:.0} % of its heat above ambient off between dies (lumped heat balance; Wright, Wire Technology, from memory); bulk mean at each exit (the surface runs hotter); the no-cooling upper bound (every rise summed) is reported with it",
            100.0 * r.cooling_between_dies
        ),
        None => format!(
            "wire temperature: the wire enters every die at ambient ({ambient} C), cooled between dies; the figure is the bulk mean at the die exit (the surface runs hotter); the no-cooling upper bound (every rise since the last anneal summed) is reported with it"
        ),
    });
    if has_speed {
        notes.push("speeds by volume constancy from the finish speed through every pass (one continuous line)".into());
        notes.push("power: each capstan's net pull (its front pull less the back pull it holds on the next die) times its speed; the total counts each back pull once".into());
    }
    notes
}
