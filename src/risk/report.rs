//! The neutral report of a risk run, built from the merged tally: per pass
//! its probabilities with their standard errors, percentiles and drivers;
//! the summary (any break, the weakest pass, the margin for a target); the
//! warnings on too few or refused samples; the notes on how the figures
//! were made.

use crate::evaluation::{self, StepKind};
use crate::schedule::ScheduleFile;

use super::model::BlockLimit;
use super::{
    driver_name, stats, DriverShare, InputScatter, Model, PassRisk, QuotedFigures, RiskOptions,
    RiskReport, RiskSummary, Tally, RELATIVE_PRECISION, SCOPE,
};

/// The report of a run over `t`, with `check`'s nominal rows.
pub(super) fn build_report(
    file: &ScheduleFile,
    options: &RiskOptions,
    check: &evaluation::ScheduleReport,
    model: &Model,
    listed: &[InputScatter],
    (nominal, nominal_strength): (&[f64], &[f64]),
    t: &Tally,
) -> RiskReport {
    let n = t.accepted;
    let mut warnings = Vec::new();
    let passes = pass_risks(check, model, (nominal, nominal_strength), t, &mut warnings);
    let weakest = weakest_pass(&passes);
    let (pa, sa) = stats::probability(t.any_break, n);
    let (po, so) = stats::probability(t.any_over_max, n);
    // The rule of three (Hanley & Lippman-Hand 1983): no event in n trials
    // puts the probability below 3/n at 95 %; a bound over 1 says nothing more.
    let upper = (t.any_break == 0 && n > 0).then(|| (3.0 / n as f64).min(1.0));
    if let Some(u) = upper {
        warnings.push(format!(
            "no sample broke: the schedule's break probability is below {} % (95 %, rule of three), not zero",
            stats::percent_2sig(u)
        ));
    } else if 1.96 * sa > RELATIVE_PRECISION * pa {
        warnings.push(format!(
            "{} of {} samples broke: the 95 % interval of the schedule's break probability is +-{:.0} %; --samples {} would bring it to +-20 %",
            t.any_break,
            n,
            100.0 * 1.96 * sa / pa,
            stats::samples_for(pa, RELATIVE_PRECISION)
        ));
    }
    let target = options.target_probability;
    let (at_target, scale, weakest_needs) = match target {
        Some(tp) if n > 0 => {
            if tp * (n as f64) < 10.0 {
                warnings.push(format!(
                    "--target-probability {tp}: {n} samples put fewer than 10 beyond it, too few to place the margin; use --samples {} or more",
                    (10.0 / tp).ceil() as u64
                ));
                // No margin is placed from a tail the samples do not reach.
                (None, None, None)
            } else {
                let qa = t
                    .worst
                    .quantile(1.0 - tp, n, t.worst_range.0, t.worst_range.1);
                let wp = &t.passes[weakest];
                let qw = wp.ratio.quantile(1.0 - tp, n, wp.lowest, wp.highest);
                (qa, qa.map(|q| 1.0 / q), qw.map(|q| nominal[weakest] / q))
            }
        }
        _ => (None, None, None),
    };
    let verdict = match target {
        None => "no-target",
        Some(tp) if pa > tp => "over-target",
        Some(tp) if tp * (n as f64) < 10.0 => "too-few-samples",
        Some(_) => "within-target",
    };
    scatter_warnings(options, model, listed, t, &mut warnings);
    let notes = notes(file, options, check, model);
    let wp = &passes[weakest];
    RiskReport {
        title: check.title.clone(),
        material: check.material.clone(),
        method: check.method,
        method_source: check.method_source.clone(),
        sampling: options.sampling,
        seed: options.seed,
        draw_ratio_warn: check.draw_ratio_warn,
        draw_ratio_max: check.draw_ratio_max,
        scatter: listed.to_vec(),
        summary: RiskSummary {
            samples: options.samples,
            samples_used: n,
            samples_refused: t.rejected,
            any_break_probability: pa,
            any_break_standard_error: sa,
            any_break_upper_95: upper,
            any_over_max_probability: po,
            any_over_max_standard_error: so,
            weakest_step: wp.step,
            weakest_break_probability: wp.break_probability,
            weakest_main_driver: wp.main_driver.clone(),
            target_probability: target,
            worst_draw_ratio_at_target: at_target,
            draw_ratio_scale_for_target: scale,
            weakest_draw_ratio_for_target: weakest_needs,
            verdict: verdict.into(),
        },
        passes,
        warnings,
        notes,
        scope: SCOPE.into(),
        caution: evaluation::CAUTION.into(),
        quoted: QuotedFigures {
            running_speed_m_s: match (model.block_limit(), &check.machine) {
                (Some(BlockLimit::Machine { .. }), Some(run)) => Some(run.running_speed_m_s),
                _ => None,
            },
            block_power_kw: match model.block_limit() {
                Some(BlockLimit::Line { limit_kw }) => Some(*limit_kw),
                _ => None,
            },
        },
    }
}

/// Stage 1: each draw pass's probabilities, percentiles and drivers; a
/// warning where its break count is too small to pin the probability.
fn pass_risks(
    check: &evaluation::ScheduleReport,
    model: &Model,
    (nominal, nominal_strength): (&[f64], &[f64]),
    t: &Tally,
    warnings: &mut Vec<String>,
) -> Vec<PassRisk> {
    let n = t.accepted;
    let draw_rows: Vec<&evaluation::StepReport> = check
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    let has_power = model.has_block_power();
    let mut passes = Vec::with_capacity(model.draws);
    for (j, p) in t.passes.iter().enumerate() {
        let row = draw_rows[j];
        let (pb, sb) = stats::probability(p.breaks, n);
        let (pw, sw) = stats::probability(p.over_warn, n);
        let (pm, sm) = stats::probability(p.over_max, n);
        let power = has_power.then(|| stats::probability(p.over_power, n));
        let q = |x: f64| p.ratio.quantile(x, n, p.lowest, p.highest);
        let mut drivers: Vec<DriverShare> = model
            .drivers
            .iter()
            .enumerate()
            .filter_map(|(k, d)| {
                p.correlation(k, n).map(|r| DriverShare {
                    input: driver_name(model, *d),
                    correlation: r,
                    share: r * r,
                })
            })
            .collect();
        // Largest |r| first; equal ones keep the model's order (stable sort).
        drivers.sort_by(|a, b| b.share.total_cmp(&a.share));
        if p.breaks > 0 && 1.96 * sb > RELATIVE_PRECISION * pb {
            warnings.push(format!(
                "step {}: {} breaks in {} samples: the 95 % interval of its break probability is +-{:.0} %; --samples {} would bring it to +-20 %",
                row.step,
                p.breaks,
                n,
                100.0 * 1.96 * sb / pb,
                stats::samples_for(pb, RELATIVE_PRECISION)
            ));
        }
        passes.push(PassRisk {
            step: row.step,
            exit_diameter_mm: row.exit_diameter_mm,
            draw_ratio: nominal[j],
            tensile_strength_mpa: nominal_strength[j],
            break_probability: pb,
            break_standard_error: sb,
            over_warn_probability: pw,
            over_warn_standard_error: sw,
            over_max_probability: pm,
            over_max_standard_error: sm,
            over_block_power_probability: power.map(|x| x.0),
            over_block_power_standard_error: power.map(|x| x.1),
            draw_ratio_p5: q(0.05),
            draw_ratio_p50: q(0.50),
            draw_ratio_p95: q(0.95),
            draw_ratio_p99: q(0.99),
            lowest_draw_ratio: p.lowest,
            highest_draw_ratio: p.highest,
            main_driver: drivers.first().map(|d| d.input.clone()),
            drivers,
        });
    }
    passes
}

/// Stage 2: the pass most likely to break (on equal probability: the higher
/// 99th percentile, then the higher nominal draw ratio).
fn weakest_pass(passes: &[PassRisk]) -> usize {
    passes
        .iter()
        .enumerate()
        .fold(None, |best: Option<usize>, (j, p)| match best {
            None => Some(j),
            Some(b) => {
                let pb = &passes[b];
                let key = |x: &PassRisk| {
                    (
                        x.break_probability,
                        x.draw_ratio_p99.unwrap_or(f64::INFINITY),
                        x.draw_ratio,
                    )
                };
                if key(p).partial_cmp(&key(pb)) == Some(std::cmp::Ordering::Greater) {
                    Some(j)
                } else {
                    Some(b)
                }
            }
        })
        .unwrap_or(0)
}

/// Stage 4: warnings on the samples and the scatter themselves.
fn scatter_warnings(
    options: &RiskOptions,
    model: &Model,
    listed: &[InputScatter],
    t: &Tally,
    warnings: &mut Vec<String>,
) {
    if t.rejected > 0 {
        let (i, why) = t.first_rejection.clone().unwrap_or_default();
        warnings.push(format!(
            "{} of {} samples drew inputs the model refuses and are left out of every probability (first: sample {i}, {why}); narrow or truncate the scatter",
            t.rejected, options.samples
        ));
    }
    if let Some((f, _)) = &model.flow_spread {
        if let Some(k) = f.specimens.filter(|&k| k < 5) {
            warnings.push(format!(
                "the flow-law scatter comes from {k} specimens: a standard deviation from so few is itself uncertain by about +-{:.0} % (1/sqrt(2(n-1)))",
                100.0 / (2.0 * (k.max(2) as f64 - 1.0)).sqrt()
            ));
        }
    }
    if listed.is_empty() {
        warnings.push("nothing scatters (no scatter block, no material.flow_scatter): every sample is the nominal schedule".into());
    }
}

/// Stage 5: how the figures were made.
fn notes(
    file: &ScheduleFile,
    options: &RiskOptions,
    check: &evaluation::ScheduleReport,
    model: &Model,
) -> Vec<String> {
    let mut notes = vec![
        format!(
            "break: the governing drawing stress ({}) reaches the drawn wire's tensile strength (Considere, tensile_strength_mpa as check reports it; for wire drawn past its Considere strain, the exit flow stress: draw ratio 1)",
            check.method
        ),
        format!(
            "{} samples by {} with seed {}; standard errors are binomial, sqrt(p(1-p)/N), an upper figure for a Latin hypercube",
            options.samples,
            options.sampling.name(),
            options.seed
        ),
        "percentiles from a histogram of draw-ratio bins 0.0005 wide (within 0.00025 of the sample percentile)".into(),
        "driver: the input whose normal score correlates most with the pass's draw ratio (Pearson); its share is the correlation squared".into(),
    ];
    if file.scatter.as_ref().is_some_and(|s| s.friction.is_some()) {
        notes.push(
            "a given shear factor m moves with the friction in proportion (capped at 1)".into(),
        );
    }
    if model.flow_spread.is_some() && file.material.annealed_flow.is_some() {
        notes.push(
            "the flow-law deviations of a sample apply to the annealed law too (same heat)".into(),
        );
    }
    if file
        .scatter
        .as_ref()
        .is_some_and(|s| s.back_tension_mpa.is_some())
    {
        notes.push("back tension scatters only on the passes that have one".into());
    }
    match (model.block_limit(), &check.machine) {
        (Some(BlockLimit::Machine { .. }), Some(run)) => notes.push(format!(
            "over block power: the block's motor load (front pull less the back pull it holds on the next die, times its capstan speed, over its drive efficiency) above its motor_kw, as check flags it, with machine '{}' running at {:.3} m/s in every sample",
            run.name, run.running_speed_m_s
        )),
        (Some(BlockLimit::Line { limit_kw }), _) => notes.push(format!(
            "over block power: the net power (front pull less the back pull held on the next die, times the exit speed) above line.block_power_kw {limit_kw} kW, as check flags it"
        )),
        _ => {}
    }
    notes
}
