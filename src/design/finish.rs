//! The designed schedule: steps, anneal plans with their reasons, the
//! evaluation `check` makes, the summary and the notes in words.

#[allow(unused_imports)]
use super::*;
use crate::evaluation::{Flag, ScheduleReport};

#[allow(clippy::too_many_arguments)]
pub(super) fn finish(
    input: &Input,
    options: &DesignOptions,
    chooser: &Chooser,
    split: &Split,
    runs: RunPasses,
    tier: usize,
    one_level: bool,
    stock: Option<&Stock>,
) -> Result<Design, DesignError> {
    let file = input.file;
    let target = input.target;
    let limit = file.material.cold_work_limit;
    let mut steps = Vec::new();
    let mut anneals = Vec::new();
    let mut run_plans = Vec::new();
    let n_runs = runs.len();
    let last_draw = runs.iter().rposition(|r| !r.1.is_empty());
    let counts: Vec<String> = runs
        .iter()
        .filter(|r| !r.1.is_empty())
        .map(|r| r.1.len().to_string())
        .collect();
    let counts = counts.join(" + ");
    let mut dies = Vec::new();
    for (i, (run, passes)) in runs.iter().enumerate() {
        let (from, to, e0) = (run.from_mm, run.to_mm, run.strain0);
        if !passes.is_empty() {
            run_plans.push(RunPlan {
                run: run_plans.len() + 1,
                from_diameter_mm: from,
                to_diameter_mm: to,
                strain: pass::true_strain(from, to),
                strain_after: e0 + pass::true_strain(from, to),
                passes: passes.len(),
                draw_ratio_min: passes.iter().map(|p| p.ratio).fold(f64::INFINITY, f64::min),
                draw_ratio_max: passes.iter().map(|p| p.ratio).fold(0.0, f64::max),
            });
        }
        let np = passes.len();
        for (j, p) in passes.iter().enumerate() {
            let exit = if Some(i) == last_draw && j + 1 == np {
                target.diameter.clone()
            } else {
                Diameter::from_mm(p.exit_mm).map_err(|e| DesignError::Input {
                    key: "target.diameter".into(),
                    why: e.to_string(),
                })?
            };
            let die = DieOverrides {
                semi_angle_deg: chooser.ctx.from_stock.then_some(p.semi_angle_deg),
                ..DieOverrides::default()
            };
            let land = file
                .die_for(&die, p.semi_angle_deg)
                .map(|d| d.land_length_mm)
                .unwrap_or(0.0);
            dies.push((exit.mm(), p.semi_angle_deg, land));
            steps.push(Step::Draw(DrawStep {
                exit,
                die,
                back_tension_mpa: None,
            }));
        }
        // An anneal between each run and the next (an empty first run: before
        // the first die; an empty temper run: after the last).
        if i + 1 == n_runs {
            continue;
        }
        let temper = split.temper.is_some() && i + 2 == n_runs;
        let strain_before = e0 + pass::true_strain(from, to);
        let (reason, why, window_mm) = if temper {
            let w = target
                .strength_mpa
                .unwrap_or(schedule::Window { min: 0.0, max: 0.0 });
            let rest = pass::true_strain(to, input.finish_mm);
            let range = input.window.map(|x| x.diameters(input.finish_mm));
            (
                AnnealReason::Temper,
                format!(
                    "temper window {}-{} MPa: the remaining strain {rest:.4} from {to:.4} mm to the finish gives {:.1} MPa; an anneal anywhere from {} mm lands in the window",
                    w.min,
                    w.max,
                    file.annealed_law().stress_mpa(rest),
                    range.map_or_else(String::new, |r| format!("{:.4} to {:.4}", r.min_mm, r.max_mm)),
                ),
                range,
            )
        } else {
            let next = &runs[i + 1];
            let next_strain = pass::true_strain(next.0.from_mm, next.0.to_mm);
            let would = strain_before + next_strain;
            let where_ = if passes.is_empty() {
                format!("before the first die (the stock arrives at strain {e0:.4})")
            } else {
                format!(
                    "after run {} (strain {strain_before:.4} at {to:.4} mm)",
                    i + 1
                )
            };
            match limit {
                Some(l) if would > l * (1.0 - COLD_WORK_MARGIN) => (
                    AnnealReason::ColdWork,
                    format!(
                        "material.cold_work_limit {l}: {where_}; drawing the next {} passes without it would reach strain {would:.4}; placed so that the runs' passes ({counts}) are the fewest that meet every limit",
                        next.1.len()
                    ),
                    None,
                ),
                _ => (
                    AnnealReason::FewerPasses,
                    format!(
                        "not forced by the cold-work limit: {where_}; the softened wire takes heavier passes, which brings the runs ({counts}) within {} passes with every pass at or under {}",
                        input.max_passes,
                        chooser.ctx.ratio_cap
                    ),
                    None,
                ),
            }
        };
        steps.push(Step::Anneal);
        anneals.push(AnnealPlan {
            step: steps.len(),
            diameter_mm: to,
            strain_before,
            reason,
            window_mm,
            why,
        });
    }
    let mut schedule = file.clone();
    schedule.target = None;
    schedule.passes = steps;
    if let Some(m) = options.method {
        schedule.limits.method = Some(m);
    }
    let report = evaluate_on(
        &schedule,
        &EvaluateOptions {
            method: options.method,
        },
        input.machine,
    )?;
    // The evaluation `check` makes is the last word: a designed pass it puts
    // over a limit is a fault of the design, reported rather than hidden.
    if let Some(bad) = report
        .passes
        .iter()
        .find(|r| r.flags.iter().any(|f| f.is_over()))
    {
        return Err(DesignError::CheckFlags {
            step: bad.step,
            from_mm: bad.entry_diameter_mm,
            to_mm: bad.exit_diameter_mm,
            flags: bad
                .flags
                .iter()
                .filter(|f| f.is_over())
                .map(|f| f.name())
                .collect::<Vec<_>>()
                .join(", "),
        });
    }
    let finished = report.passes.last().map_or(0.0, |r| r.flow_stress_exit_mpa);
    if let Some(w) = target.strength_mpa {
        if !(w.min..=w.max).contains(&finished) {
            return Err(DesignError::NoDesign {
                max_passes: input.max_passes,
                binding: format!(
                    "the rounded dies leave the finished wire at {finished:.1} MPa, outside target.strength_mpa {}-{} MPa",
                    w.min, w.max
                ),
                remedy: "use a finer target.die_step_mm or more target.die_sizes_mm".into(),
            });
        }
    }
    let mut notes = notes(input, chooser, tier, one_level, stock, &report);
    off_aim_note(input, split, &report, &mut notes);
    stock_angle_note(input, &report, &mut notes);
    if let Some(m) = input.machine {
        let most = m
            .blocks
            .iter()
            .filter_map(|b| b.dancer_back_tension_mpa)
            .fold(0.0, f64::max);
        if most > 0.0 {
            notes.push(format!(
                "the passes were laid out with the dancers' back tension on their dies (up to {most} MPa on {}), as check applies it on the machine",
                m.name
            ));
        }
    }
    let ratios: Vec<f64> = report.passes.iter().filter_map(|r| r.draw_ratio).collect();
    runs_as_checked(&mut run_plans, &ratios);
    let aimed = input.window.map(|w| file.annealed_law().stress_mpa(w.aim));
    let summary = DesignSummary {
        strategy: target.strategy,
        taper: (target.strategy == Strategy::Tapered).then_some(chooser.taper),
        method: chooser.ctx.method,
        draw_passes: ratios.len(),
        max_passes: input.max_passes,
        start_diameter_mm: input.start_mm,
        finish_diameter_mm: input.finish_mm,
        die_angles_deg: input.angles.clone(),
        strength_window_mpa: target.strength_mpa,
        aimed_flow_stress_mpa: if split.temper.is_some() {
            aimed
        } else {
            target.strength_mpa.map(|_| finished)
        },
        finished_flow_stress_mpa: finished,
        run_draw_ratio_spread: run_plans
            .iter()
            .map(|r| (r.draw_ratio_max - r.draw_ratio_min) / r.draw_ratio_max)
            .fold(0.0, f64::max),
        draw_ratio_spread: spread(ratios.iter().copied()),
        ratio_across: target.ratio_across,
        draw_ratio_aimed: chooser.ctx.ratio_cap,
        dies: die_room::die_list(&dies),
        die_rounding: stock.map(Stock::words),
        die_decimals: stock.map_or(3, Stock::decimals),
        runs: run_plans,
        anneals,
        notes,
        machine: input.machine.map(|m| m.name.clone()),
        attainable_speed_m_s: report.summary.attainable_speed_m_s,
        attainable_t_per_shift: report.summary.attainable_t_per_shift,
    };
    Ok(Design {
        schedule,
        report,
        summary,
    })
}

/// Choices and defaults that matter, in words.
pub(super) fn notes(
    input: &Input,
    chooser: &Chooser,
    tier: usize,
    one_level: bool,
    stock: Option<&Stock>,
    report: &crate::evaluation::ScheduleReport,
) -> Vec<String> {
    let file = input.file;
    let target = input.target;
    let l = &file.limits;
    let mut notes = Vec::new();
    if target.max_passes.is_none() && input.passes.is_none() {
        notes.push(format!(
            "at most {DEFAULT_MAX_PASSES} passes (the default; set target.max_passes)"
        ));
    }
    if target.strategy == Strategy::Tapered && target.taper.is_none() {
        notes.push(format!(
            "taper {DEFAULT_TAPER} (the default; set target.taper)"
        ));
    }
    let cap = chooser.ctx.ratio_cap;
    let aim = input.caps[0];
    let aim_words = if target.draw_ratio_aim.is_some() {
        format!("target.draw_ratio_aim {aim}")
    } else {
        format!(
            "the default aim {aim:.4} ({DEFAULT_AIM_FRACTION} x limits.draw_ratio_warn; set target.draw_ratio_aim)"
        )
    };
    match tier {
        _ if heavy_tier(input, chooser) => {}
        _ if chooser.ctx.fewer_anneals_than.get().is_some() => {
            let (at, k) = chooser.ctx.fewer_anneals_than.get().unwrap_or_default();
            let n = report
                .passes
                .iter()
                .filter(|r| r.kind == crate::evaluation::StepKind::Anneal)
                .count();
            let held = if cap < l.draw_ratio_max {
                format!("the warn line {cap}")
            } else {
                format!("limits.draw_ratio_max {cap} (passes may sit in the warning zone)")
            };
            let tighter = if at == aim {
                aim_words.clone()
            } else {
                format!("the warn line {at}")
            };
            notes.push(format!(
                "passes held to {held} rather than {tighter}, which would take {k} anneal{} where this design takes {n}",
                if k == 1 { "" } else { "s" }
            ));
        }
        0 => notes.push(format!("every pass at or under {aim_words}")),
        _ if cap < l.draw_ratio_max => notes.push(format!(
            "no design within {} passes keeps every pass at or under {aim_words}: passes held to the warn line {cap}",
            input.max_passes
        )),
        _ => notes.push(format!(
            "no design within {} passes keeps every pass at or under the warn line {}: some passes sit in the warning zone, up to limits.draw_ratio_max {}",
            input.max_passes, l.draw_ratio_warn, l.draw_ratio_max
        )),
    }
    reduction_note(input, chooser, report, &mut notes);
    if target.strategy == Strategy::EqualRatio {
        let whole = target.ratio_across == RatioAcross::WholeSchedule;
        if !one_level {
            notes.push(format!(
                "{}the limits hold some runs at their own draw ratio; the spread over the schedule is in draw_ratio_spread",
                if whole { "one ratio over the whole schedule cannot be kept: " } else { "" }
            ));
        } else if !whole && target.strength_mpa.is_some() {
            notes.push("the temper run is set by the window's middle, the other runs share one draw ratio (target.ratio_across: whole-schedule puts every pass at one)".into());
        }
    }
    if let Some(s) = stock {
        notes.push(format!(
            "every die but the finish rounded to {} and re-checked",
            s.words()
        ));
    }
    let anneals = report
        .passes
        .iter()
        .any(|r| r.kind == crate::evaluation::StepKind::Anneal);
    if anneals && file.material.annealed_flow.is_none() {
        notes.push(
            "after an anneal the stock follows material.flow again (no annealed_flow given)".into(),
        );
    }
    if l.wire_temperature_max_c.is_some()
        || file
            .line
            .as_ref()
            .is_some_and(|x| x.block_power_kw.is_some())
    {
        notes.push("every pass is also held to the wire-temperature and block-power limits that check applies".into());
    }
    if let (Some(w), Some(ws)) = (target.strength_mpa, input.window) {
        let mid = 0.5 * (w.min + w.max);
        let aim = file.annealed_law().stress_mpa(ws.aim);
        if (aim - mid).abs() > 1e-6 * mid && ws.lo <= ws.hi {
            notes.push(format!(
                "aimed at {aim:.1} MPa rather than the window's middle ({mid:.1} MPa): the cold-work limit or the whole reduction allows no more"
            ));
        }
    }
    notes
}

/// The heavy-reduction tier in words: when the reduction was held to the
/// heavy-reduction line and some pass sits near it (within 1 %), or when no
/// design within the passes could be held there (the last tier).
fn reduction_note(
    input: &Input,
    chooser: &Chooser,
    report: &crate::evaluation::ScheduleReport,
    notes: &mut Vec<String>,
) {
    let rw = input.reduction_warn;
    let key = if input.file.limits.reduction_warn.is_some() {
        format!("limits.reduction_warn {rw}")
    } else {
        format!("limits.reduction_warn {rw} (the default; set limits.reduction_warn)")
    };
    let heaviest = report
        .passes
        .iter()
        .filter_map(|r| r.area_reduction)
        .fold(0.0, f64::max);
    if chooser.ctx.r_max_is_warn {
        if heaviest > 0.99 * rw {
            notes.push(format!(
                "every pass's area reduction at or under {key}, the line over which check flags heavy-reduction"
            ));
        }
    } else if heavy_tier(input, chooser) {
        let within = match input.passes {
            Some(n) => format!("with {}", passes_in_words(&Some(n))),
            None => format!("within {} passes", input.max_passes),
        };
        notes.push(format!(
            "no design {within} keeps every pass's area reduction at or under {key}: some passes are heavier (check flags them heavy-reduction){}, with draw ratios held to limits.draw_ratio_max {}",
            input
                .target
                .reduction_max
                .map_or_else(String::new, |r| format!(", up to target.reduction_max {r}")),
            input.file.limits.draw_ratio_max
        ));
    }
}

/// Whether the design was made in the last tier, the reduction held to
/// `target.reduction_max` alone (never on a slip machine, whose cones set the dies).
fn heavy_tier(input: &Input, chooser: &Chooser) -> bool {
    !chooser.ctx.r_max_is_warn
        && input
            .target
            .reduction_max
            .is_none_or(|r| r > input.reduction_warn)
        && input.machine.is_none_or(|m| m.kind != MachineKind::Slip)
}

/// With a temper anneal whose run could not sit at the window's aim (the
/// fewest passes put it elsewhere in the window), the finished flow stress
/// in words, in place of the note that says the run is set by the middle.
fn off_aim_note(
    input: &Input,
    split: &Split,
    report: &crate::evaluation::ScheduleReport,
    notes: &mut Vec<String>,
) {
    let (Some(_), Some(ws), Some(w)) = (split.temper, input.window, input.target.strength_mpa)
    else {
        return;
    };
    let aimed = input.file.annealed_law().stress_mpa(ws.aim);
    let finished = report.summary.final_flow_stress_mpa;
    if (finished - aimed).abs() <= 1e-6 * aimed {
        return;
    }
    notes.retain(|n| !n.starts_with("the temper run is set by the window's middle"));
    notes.push(format!(
        "the temper run could not sit at the aimed {aimed:.1} MPa within the passes every other limit allows: the fewest passes finish the wire at {finished:.1} MPa, inside the {}-{} MPa window",
        w.min, w.max
    ));
}

/// Each run's draw-ratio range as `check` reports the designed schedule
/// (rounded dies, die land, a machine's dancer back tension and all), so the
/// runs table and the spreads agree with the pass table under them; the
/// ratios are the draw passes in order, `runs` their counts in order.
fn runs_as_checked(runs: &mut [RunPlan], ratios: &[f64]) {
    if runs.iter().map(|r| r.passes).sum::<usize>() != ratios.len() {
        return;
    }
    let mut at = 0;
    for r in runs {
        let own = &ratios[at..at + r.passes];
        r.draw_ratio_min = own.iter().copied().fold(f64::INFINITY, f64::min);
        r.draw_ratio_max = own.iter().copied().fold(0.0, f64::max);
        at += r.passes;
    }
}

/// When check flags a designed pass `angle-off-optimum` because the die
/// stock (`dies.semi_angles_deg`) does not reach the pass's optimum
/// semi-angle, a note names the passes and their optimum: the design took
/// the stock angle of least governing stress, so only the stock can clear
/// the flag.
fn stock_angle_note(input: &Input, report: &ScheduleReport, notes: &mut Vec<String>) {
    let (lo, hi) = input
        .angles
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &x| {
            (a.min(x), b.max(x))
        });
    let outside: Vec<(usize, f64)> = report
        .passes
        .iter()
        .filter(|r| r.flags.contains(&Flag::AngleOffOptimum))
        .filter_map(|r| Some((r.step, r.optimum_semi_angle_deg?)))
        .filter(|&(_, opt)| opt < lo || opt > hi)
        .collect();
    if outside.is_empty() {
        return;
    }
    let steps: Vec<String> = outside
        .iter()
        .map(|(step, opt)| format!("step {step} ({opt:.1} deg)"))
        .collect();
    notes.push(format!(
        "the optimum semi-angle of {} lies outside the die stock ({lo}-{hi} deg), so check flags angle-off-optimum there; the design took the stock angle of least drawing stress, and a die nearer the optimum in dies.semi_angles_deg may clear the flag (it is taken when its Delta is within limits.delta_max)",
        steps.join(", ")
    ));
}
