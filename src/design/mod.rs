//! Designing a schedule: from a start size, a finish size and the mill's
//! limits, the fewest draw passes, a die angle for each and the anneals.
//!
//! The reduction (true strain `eps = 2 ln(D0/D1)`, area reduction
//! `r = 1 - (D1/D0)^2`; Dieter, *Mechanical Metallurgy*, ch. 19) is cut into
//! *runs*, the passes between two anneals. The design is made in stages, one
//! file each:
//!
//! 1. `strategies`: for each kind of run (the first, from the stock's start
//!    strain; an annealed one, from strain 0) and each pass count `n`, the
//!    range of run strains `n` passes can carry with every pass within every
//!    limit (the governing method's draw ratio `sigma_d / sigma_f(exit)` at or
//!    under the cap, the reduction bounds, `Delta <= delta_max`, the
//!    cold-work limit, wire temperature and block power), the passes spread
//!    by the strategy (`equal-ratio`, `equal-strain`, `tapered`);
//! 2. `anneal`: the strain range a temper window allows after the last
//!    anneal, by the annealed law's inverse;
//! 3. `search`: a dynamic programme over runs that finds the fewest passes,
//!    then the fewest anneals, for which some split of pass counts carries
//!    the whole reduction; exact for the model (see that module);
//! 4. `anneal::place`: the run strains (where the anneals go), at one draw
//!    ratio (or pass strain) across runs where the limits allow, the temper
//!    run at the window's middle;
//! 5. `runs`: each run laid out at its place with the real die land;
//! 6. `die_room`: every die but the finish rounded to the die room's sizes
//!    and re-checked, and the die list;
//! 7. the schedule evaluated by [`crate::evaluation::evaluate`], exactly as
//!    `check` evaluates it; a pass it puts over a limit is reported, not hidden.
//!
//! **Margin.** Passes are held first to the aim (`target.draw_ratio_aim`,
//! default [`DEFAULT_AIM_FRACTION`] of the warn line), then to the warn line,
//! then to the limit: the first of these a design within `max_passes` meets is
//! used, so no pass is planted in the warning zone when a design outside it
//! exists. Within a cap the design has the fewest passes, then the fewest anneals.
//!
//! The die angle of a pass is the one from the stock that minimises the
//! governing drawing stress among those with `Delta <= delta_max`. Every loop
//! is bounded by the pass counts asked for.

mod anneal;
mod die_room;
mod error;
mod limits;
mod model;
mod runs;
mod search;
mod strategies;

pub use error::DesignError;
pub use model::{
    AnnealPlan, AnnealReason, Design, DesignOptions, DesignSummary, DiameterRange, DieOrder,
    RunPlan,
};

use crate::evaluation::{evaluate, EvaluateOptions};
use crate::pass::{self, Method, Settings};
use crate::schedule::{
    self, DieOverrides, DrawStep, RatioAcross, ScheduleFile, Step, Strategy, Target,
};
use crate::size::Diameter;

use anneal::WindowStrains;
use die_room::Stock;
use limits::{Ctx, PassPick};
use runs::Run;
use search::{Split, Tables};
use strategies::{Chooser, Class, Interval, RunTable};

/// Most draw passes considered when `target.max_passes` is not given.
pub const DEFAULT_MAX_PASSES: u32 = 50;
/// Taper used by `strategy: tapered` when `target.taper` is not given: each
/// pass's strain 0.9 of the one before (common practice for tapering drafts).
pub const DEFAULT_TAPER: f64 = 0.9;
/// The default aim as a fraction of `limits.draw_ratio_warn`: 0.95, so a
/// designed pass sits 5 % under the warn line. Our choice, not a published
/// figure: it keeps passes clear of the near-limit flag when a die is rounded
/// to the die room's step or the friction runs a little high (the Sachs
/// stress rises about as `1 + mu cot(alpha)`, so mu 0.05 -> 0.055 at 6 deg
/// adds about 4 %).
pub const DEFAULT_AIM_FRACTION: f64 = 0.95;
/// Largest spread `(max - min) / max` of the draw ratios of an equal-ratio design.
pub const EQUAL_RATIO_SPREAD_MAX: f64 = 0.005;
/// Largest pass strain the solvers try (an area reduction of 99.75 %).
const PASS_STRAIN_CEILING: f64 = 6.0;
/// Smallest pass strain the solvers try.
const PASS_STRAIN_FLOOR: f64 = 1e-9;
/// Margin kept under the cold-work limit so that rounding never passes it.
const COLD_WORK_MARGIN: f64 = 1e-9;
/// Most passes counted when working out how many a limit needs.
const PASSES_COUNT_CEILING: u32 = 1000;
/// Most draw passes a design may have: the largest `target.max_passes` the
/// schedule file accepts.
pub const PASSES_ALLOWED: u32 = crate::schedule::MAX_PASSES_ALLOWED;

/// A pass count for a message: `12 passes`, or `more than 1000 passes`.
fn passes_in_words(n: &Option<u32>) -> String {
    match n {
        Some(1) => "1 pass".into(),
        Some(n) => format!("{n} passes"),
        None => format!("more than {PASSES_COUNT_CEILING} passes"),
    }
}

/// `x` rounded up to `prec` decimals: a value a message says to raise
/// something "to at least" (rounding to nearest could print one too small).
fn at_least(x: f64, prec: i32) -> f64 {
    let f = 10f64.powi(prec);
    (x * f).ceil() / f
}

/// `x` rounded down to `prec` decimals: a value a message says to lower something "to at most".
fn at_most(x: f64, prec: i32) -> f64 {
    let f = 10f64.powi(prec);
    (x * f).floor() / f
}

/// A diameter as the file gave it, with millimetres added when it was not
/// given in them (`AWG 10 (2.588 mm)`, `9 mm`, never `9 mm (9 mm)`).
fn as_written(d: &Diameter) -> String {
    let mm = d.mm();
    match d.written() {
        Some(w) if w.parse::<f64>().is_err() && !w.trim_end().ends_with("mm") => {
            format!("{w} ({mm:.4} mm)")
        }
        _ => format!("{mm} mm"),
    }
}

/// What the design needs from the file, checked once.
struct Input<'f> {
    file: &'f ScheduleFile,
    target: &'f Target,
    angles: Vec<f64>,
    from_stock: bool,
    method: Method,
    start_mm: f64,
    finish_mm: f64,
    /// Whole reduction, true strain.
    total: f64,
    max_passes: u32,
    /// The ratio caps in the order tried: aim, warn line, limit (each once).
    caps: Vec<f64>,
    window: Option<WindowStrains>,
}

fn read_input<'f>(
    file: &'f ScheduleFile,
    options: &DesignOptions,
) -> Result<Input<'f>, DesignError> {
    file.validate()?;
    let target = file.target.as_ref().ok_or_else(|| DesignError::Input {
        key: "target".into(),
        why: "a design file needs a `target` block with at least `diameter`".into(),
    })?;
    if !file.passes.is_empty() {
        return Err(DesignError::Input {
            key: "passes".into(),
            why: "a design file has no passes (the design fills them in); remove them, or use `coldpass check` for a schedule".into(),
        });
    }
    let (angles, from_stock) = match (&file.dies.semi_angles_deg, file.dies.semi_angle_deg) {
        (Some(_), Some(_)) => {
            return Err(DesignError::Input {
                key: "dies.semi_angle_deg".into(),
                why: "give either one angle (semi_angle_deg) or the stock to choose from (semi_angles_deg), not both".into(),
            })
        }
        (Some(list), None) => (list.clone(), true),
        (None, Some(a)) => (vec![a], false),
        (None, None) => {
            return Err(DesignError::Input {
                key: "dies.semi_angles_deg".into(),
                why: "a design needs the die stock (semi_angles_deg: [..]) or one angle (semi_angle_deg)".into(),
            })
        }
    };
    if angles.is_empty() {
        return Err(DesignError::Input {
            key: "dies.semi_angles_deg".into(),
            why: "needs at least one angle".into(),
        });
    }
    let start_mm = file.start.diameter.mm();
    let finish_mm = target.diameter.mm();
    if finish_mm >= start_mm {
        return Err(DesignError::Input {
            key: "target.diameter".into(),
            why: format!(
                "{} must be below start.diameter {} (drawing only makes wire thinner)",
                as_written(&target.diameter),
                as_written(&file.start.diameter)
            ),
        });
    }
    let method = options
        .method
        .or(file.limits.method)
        .unwrap_or(schedule::DEFAULT_METHOD);
    if method == Method::Efficiency && file.dies.efficiency.is_none() {
        return Err(DesignError::Input {
            key: "dies.efficiency".into(),
            why: "the efficiency method needs a drawing efficiency in (0, 1]".into(),
        });
    }
    // Every pass leaves the die above the ambient it entered at.
    if let Some(tmax) = file.limits.wire_temperature_max_c {
        let ambient = file.limits.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C);
        if tmax <= ambient {
            return Err(DesignError::Input {
                key: "limits.wire_temperature_max_c".into(),
                why: format!(
                    "{tmax} C is at or below the {ambient} C ambient the wire enters every die at (limits.ambient_c), so no pass can meet it; raise it above {ambient} C"
                ),
            });
        }
    }
    let max_passes = target.max_passes.unwrap_or(DEFAULT_MAX_PASSES);
    if let Some(n) = target.passes {
        if target.max_passes.is_some_and(|m| n > m) {
            return Err(DesignError::Input {
                key: "target.passes".into(),
                why: format!("{n} is over target.max_passes {max_passes}; give one of the two, or raise max_passes"),
            });
        }
    }
    let l = &file.limits;
    let aim = target
        .draw_ratio_aim
        .unwrap_or(DEFAULT_AIM_FRACTION * l.draw_ratio_warn)
        .min(l.draw_ratio_max);
    let mut caps = vec![aim];
    for c in [l.draw_ratio_warn.min(l.draw_ratio_max), l.draw_ratio_max] {
        if c > *caps.last().expect("one cap") {
            caps.push(c);
        }
    }
    let total = pass::true_strain(start_mm, finish_mm);
    let window = anneal::window_strains(file, target, total, finish_mm)?;
    Ok(Input {
        file,
        target,
        angles,
        from_stock,
        method,
        start_mm,
        finish_mm,
        total,
        max_passes,
        caps,
        window,
    })
}

impl<'f> Input<'f> {
    fn chooser(&self, cap: f64) -> Result<Chooser<'f>, DesignError> {
        let file = self.file;
        let mut dies = Vec::with_capacity(self.angles.len());
        for &a in &self.angles {
            let step = DieOverrides {
                semi_angle_deg: Some(a),
                ..DieOverrides::default()
            };
            dies.push(
                file.die_for(&step, a)
                    .map_err(|problem| DesignError::Pass {
                        pass: format!("the die of semi-angle {a} deg"),
                        problem,
                    })?,
            );
        }
        Ok(Chooser {
            ctx: Ctx {
                file,
                method: self.method,
                settings: Settings {
                    redundant_c: file
                        .limits
                        .redundant_c
                        .unwrap_or(Settings::default().redundant_c),
                },
                angles: self.angles.clone(),
                dies,
                from_stock: self.from_stock,
                ratio_max: file.limits.draw_ratio_max,
                ratio_cap: cap,
                r_min: self.target.reduction_min,
                r_max: self.target.reduction_max,
                delta_max: file.limits.delta_max,
                cold_work: file.material.cold_work_limit,
                finish_mm: self.finish_mm,
                last_pick: std::cell::Cell::new(None),
            },
            strategy: self.target.strategy,
            taper: self.target.taper.unwrap_or(DEFAULT_TAPER),
        })
    }

    fn tables<'c>(&self, chooser: &'c Chooser<'f>, max_n: u32) -> Tables<'c, 'f> {
        let file = self.file;
        let l_eff = file
            .material
            .cold_work_limit
            .map_or(f64::INFINITY, |l| l * (1.0 - COLD_WORK_MARGIN));
        let e0 = file.start.strain;
        let first = Class {
            law: &file.material.flow,
            e0,
            from_mm: self.start_mm,
            strain_cap: (l_eff - e0).min(self.total),
        };
        let annealed = Class {
            law: file.annealed_law(),
            e0: 0.0,
            from_mm: self.start_mm,
            strain_cap: l_eff.min(self.total),
        };
        let mut t = Tables::new(
            RunTable::new(chooser, first, max_n),
            RunTable::new(chooser, annealed, max_n),
            self.window.map(|w| Interval { lo: w.lo, hi: w.hi }),
            e0 > 0.0 || file.material.annealed_flow.is_some(),
            self.window.is_some_and(|w| w.straight_ok),
            self.total,
        );
        t.aim = self.window.map(|w| w.aim);
        if e0 == 0.0 && file.material.annealed_flow.is_none() {
            t.share();
        }
        t
    }

    fn pass_range(&self) -> std::ops::RangeInclusive<u32> {
        match self.target.passes {
            Some(n) => n..=n,
            None => 1..=self.max_passes,
        }
    }
}

/// Designs the schedule asked for by `file.target` (see the module
/// documentation for the method). The file's `passes` must be empty.
pub fn design(file: &ScheduleFile, options: &DesignOptions) -> Result<Design, DesignError> {
    let input = read_input(file, options)?;
    let max_n = input.max_passes.max(input.target.passes.unwrap_or(0));
    let mut build_error = None;
    for (tier, &cap) in input.caps.iter().enumerate() {
        let chooser = input.chooser(cap)?;
        let mut tables = input.tables(&chooser, max_n);
        let Some(split) = tables.fewest(input.pass_range(), input.target.max_anneals)? else {
            continue;
        };
        match assemble(&input, options, &chooser, &mut tables, &split, tier) {
            Ok(d) => return Ok(d),
            Err(e) => {
                build_error.get_or_insert(e);
            }
        }
    }
    if let Some(e) = build_error {
        return Err(e);
    }
    Err(diagnose(&input)?)
}

/// The runs of a split laid out at their strains: each run's passes from its
/// actual entry to its actual exit.
type RunPasses<'f> = Vec<(Run<'f>, Vec<PassPick>)>;

fn lay_out<'f>(
    input: &Input<'f>,
    chooser: &Chooser<'f>,
    tables: &mut Tables<'_, 'f>,
    counts: &[u32],
    strains: &[f64],
) -> Result<(RunPasses<'f>, Vec<usize>), DesignError> {
    let file = input.file;
    let r = counts.len();
    let mut by_table = Vec::new();
    let mut ends = vec![0.0; r];
    let mut d = input.finish_mm;
    for i in (0..r).rev() {
        ends[i] = d;
        d *= (0.5 * strains[i]).exp();
    }
    let mut out = Vec::with_capacity(r);
    let mut from = input.start_mm;
    for i in 0..r {
        let to = if counts[i] == 0 {
            from
        } else if i + 1 == r || counts[i + 1..].iter().all(|&n| n == 0) {
            input.finish_mm
        } else {
            ends[i]
        };
        let run = Run {
            index: i + 1,
            law: if i == 0 {
                &file.material.flow
            } else {
                file.annealed_law()
            },
            strain0: if i == 0 { file.start.strain } else { 0.0 },
            from_mm: from,
            to_mm: to,
        };
        let passes = if counts[i] == 0 {
            Vec::new()
        } else {
            let s = chooser.strains(&run, counts[i])?;
            let p = chooser.passes_of(&run, &s)?;
            let even = chooser.strategy != Strategy::EqualRatio
                || spread(p.iter().map(|p| p.ratio)) <= EQUAL_RATIO_SPREAD_MAX;
            if even && p.iter().all(|p| chooser.ctx.breaches(p).is_empty()) {
                p
            } else {
                // The run's passes laid out afresh at their real sizes and
                // land break a limit or spread (the equal-ratio solve moves
                // strain between passes with the land, or lands on a pass
                // whose best die changes): the table's own passes (worst
                // land, checked with the search's guard) hold every limit
                // wherever the run falls, so the run takes those.
                let table = if i == 0 {
                    &mut tables.first
                } else {
                    tables.annealed()
                };
                let s = table.pass_strains(counts[i], run.strain())?;
                by_table.push(i + 1);
                chooser.passes_of(&run, &s)?
            }
        };
        out.push((run, passes));
        from = to;
    }
    Ok((out, by_table))
}

/// The limits the laid-out passes break, in words (empty: none).
fn broken(chooser: &Chooser, runs: &RunPasses, by_table: &[usize]) -> Vec<String> {
    let mut v = Vec::new();
    for (run, passes) in runs {
        for (j, p) in passes.iter().enumerate() {
            for b in chooser.ctx.breaches(p) {
                v.push(format!(
                    "run {}, pass {}: {}",
                    run.index,
                    j + 1,
                    b.describe(&chooser.ctx)
                ));
            }
        }
        if chooser.strategy == Strategy::EqualRatio
            && passes.len() > 1
            && !by_table.contains(&run.index)
        {
            let s = spread(passes.iter().map(|p| p.ratio));
            if s > EQUAL_RATIO_SPREAD_MAX {
                v.push(format!(
                    "run {}: draw ratios spread {:.3} %, over the {} % an equal-ratio design allows",
                    run.index,
                    100.0 * s,
                    100.0 * EQUAL_RATIO_SPREAD_MAX
                ));
            }
        }
    }
    v
}

/// `(max - min) / max` of some draw ratios.
fn spread(ratios: impl Iterator<Item = f64>) -> f64 {
    let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
    for r in ratios {
        lo = lo.min(r);
        hi = hi.max(r);
    }
    if hi > 0.0 {
        (hi - lo) / hi
    } else {
        0.0
    }
}

fn assemble<'f>(
    input: &Input<'f>,
    options: &DesignOptions,
    chooser: &Chooser<'f>,
    tables: &mut Tables<'_, 'f>,
    split: &Split,
    tier: usize,
) -> Result<Design, DesignError> {
    let t = input.target;
    let whole = t.strategy == Strategy::EqualRatio && t.ratio_across == RatioAcross::WholeSchedule;
    let (strains, one_level) = anneal::place(tables, split, input.window, !whole)?;
    let mut counts = vec![split.first];
    counts.extend(split.middle.iter().copied());
    if let Some(n) = split.temper {
        counts.push(n);
    }
    let (mut runs, by_table) = lay_out(input, chooser, tables, &counts, &strains)?;
    let bad = broken(chooser, &runs, &by_table);
    if !bad.is_empty() {
        return Err(DesignError::NoDesign {
            max_passes: input.max_passes,
            binding: format!(
                "the {} passes found, laid out at their sizes, break {}",
                split.passes(),
                bad.join("; ")
            ),
            remedy: "relax the limit named, or try strategy equal-strain".into(),
        });
    }
    let stock = match (&t.die_step_mm, &t.die_sizes_mm) {
        (Some(s), _) => Some(Stock::Step(*s)),
        (None, Some(v)) => {
            let mut v = v.clone();
            v.sort_by(f64::total_cmp);
            Some(Stock::Sizes(v))
        }
        (None, None) => None,
    };
    let temper_run = split
        .temper
        .filter(|n| *n > 0)
        .and_then(|_| input.window.map(|w| (counts.len() - 2, w)));
    // Runs that took the table's passes, in words, before rounding moves them.
    // Without a die land the table's passes are the laid-out ones: no note.
    let land = chooser.ctx.dies.iter().any(|d| d.land_length_mm > 0.0);
    let table_notes: Vec<String> = runs
        .iter()
        .filter(|(run, _)| land && by_table.contains(&run.index))
        .map(|(run, passes)| {
            format!(
                "the run from {:.4} mm to {:.4} mm keeps the passes the search checked at the finish size's land-to-radius (laid out afresh at its own sizes it broke a limit or spread); its draw ratios spread {:.3} %",
                run.from_mm,
                run.to_mm,
                100.0 * spread(passes.iter().map(|p| p.ratio))
            )
        })
        .collect();
    if let Some(stock) = &stock {
        runs = die_room::round(&chooser.ctx, &runs, stock, temper_run)?;
    }
    let mut d = finish(
        input,
        options,
        chooser,
        split,
        runs,
        tier,
        one_level,
        stock.as_ref(),
    )?;
    d.summary.notes.extend(table_notes);
    Ok(d)
}

#[allow(clippy::too_many_arguments)]
fn finish(
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
    let report = evaluate(
        &schedule,
        &EvaluateOptions {
            method: options.method,
        },
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
    let notes = notes(input, chooser, tier, one_level, stock, &report);
    let ratios: Vec<f64> = report.passes.iter().filter_map(|r| r.draw_ratio).collect();
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
        runs: run_plans,
        anneals,
        notes,
    };
    Ok(Design {
        schedule,
        report,
        summary,
    })
}

/// Choices and defaults that matter, in words.
fn notes(
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
    if target.max_passes.is_none() && target.passes.is_none() {
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

/// Why no design within the passes asked for exists: the passes a design
/// needs (searched up to the most a design may have, at the draw-ratio
/// limit), or what binds when none exists at all.
fn diagnose(input: &Input) -> Result<DesignError, DesignError> {
    let cap = *input.caps.last().expect("one cap");
    let chooser = input.chooser(cap)?;
    let mut tables = input.tables(&chooser, PASSES_ALLOWED);
    let asked = input.target.passes;
    let from = match asked {
        Some(_) => 1,
        None => input.max_passes + 1,
    };
    // The least count with any number of anneals (up to the file's max_anneals).
    let anneals = Some(input.target.max_anneals.unwrap_or(PASSES_ALLOWED));
    let found = if from <= PASSES_ALLOWED {
        tables.fewest(from..=PASSES_ALLOWED, anneals)?
    } else {
        None
    };
    if let Some(n) = asked {
        return Ok(DesignError::PassCount {
            passes: n,
            least: found.as_ref().map(Split::passes),
            why: match &found {
                Some(s) if s.passes() > n => format!(
                    "{n} passes are too few; the fewest that meet every limit are {} ({})",
                    s.passes(),
                    split_words(s)
                ),
                Some(s) => format!(
                    "with {n} passes no split into runs keeps every pass within the limits (the passes would be too light or the runs too long); the fewest that meet every limit are {} ({})",
                    s.passes(),
                    split_words(s)
                ),
                None => format!("no pass count up to {PASSES_ALLOWED} meets every limit"),
            },
            remedy: match &found {
                Some(s) => format!(
                    "set target.passes to {} (the least that can), or relax the limits",
                    s.passes()
                ),
                None => explain(input, &chooser, &mut tables)?.1,
            },
        });
    }
    Ok(match found {
        Some(s) => {
            let set_by = set_by(input, &chooser, &mut tables, &s)?;
            DesignError::TooFewPasses {
                max_passes: input.max_passes,
                passes_needed: s.passes(),
                split: split_words(&s),
                set_by,
            }
        }
        None => {
            let (binding, remedy) = explain(input, &chooser, &mut tables)?;
            DesignError::NoDesign {
                max_passes: PASSES_ALLOWED.max(input.max_passes),
                binding,
                remedy,
            }
        }
    })
}

/// A split in words: `8 + 5 around the temper anneal`.
fn split_words(s: &Split) -> String {
    let mut counts: Vec<u32> = Vec::new();
    if s.first > 0 {
        counts.push(s.first);
    }
    counts.extend(s.middle.iter().copied());
    if let Some(t) = s.temper.filter(|t| *t > 0) {
        counts.push(t);
    }
    let c = counts
        .iter()
        .map(u32::to_string)
        .collect::<Vec<_>>()
        .join(" + ");
    let anneals = s.middle.len() + usize::from(s.temper.is_some());
    let temper = s.temper.is_some();
    match (anneals, temper) {
        (0, _) => format!("{c} in one run, no anneal"),
        (1, true) => format!("{c} around the temper anneal"),
        (1, false) => format!("{c} around the cold-work anneal"),
        (k, true) => format!("{c} around {k} anneals, the last for the temper"),
        (k, false) => format!("{c} around {k} anneals"),
    }
}

/// What sets each run's count of a split: the limits one pass fewer would
/// break (the run's strain spread evenly over one pass fewer), run by run.
fn set_by(
    input: &Input,
    chooser: &Chooser,
    tables: &mut Tables,
    s: &Split,
) -> Result<String, DesignError> {
    let (strains, _) = anneal::place(tables, s, input.window, true)?;
    let mut counts = vec![s.first];
    counts.extend(s.middle.iter().copied());
    if let Some(t) = s.temper {
        counts.push(t);
    }
    let mut out = Vec::new();
    let mut run_no = 0;
    for (i, (&n, &strain)) in counts.iter().zip(&strains).enumerate() {
        if n == 0 {
            continue;
        }
        run_no += 1;
        if n == 1 {
            out.push(format!("run {run_no}: 1 pass"));
            continue;
        }
        let fewer = n - 1;
        let table = if i == 0 {
            &mut tables.first
        } else {
            tables.annealed()
        };
        let mut keys = match table.interval(fewer)? {
            Some(iv) if strain < iv.lo => table.binding(fewer, false)?,
            Some(_) => table.binding(fewer, true)?,
            None => {
                let mut k = table.binding(fewer, true)?;
                k.extend(table.binding(fewer, false)?);
                k
            }
        };
        if keys.is_empty() {
            // Tapered runs do not keep their limits: spread the run evenly and look.
            let class = table.class;
            let even = vec![strain / fewer as f64; fewer as usize];
            let probe = chooser.probe(class.law, class.e0, class.from_mm, &even, f64::INFINITY)?;
            for p in &probe.passes {
                for b in chooser.ctx.breaches(p) {
                    let k = b.limit(&chooser.ctx);
                    if !keys.contains(&k) {
                        keys.push(k);
                    }
                }
            }
        }
        if keys.is_empty() {
            keys.push("the split of the reduction between the runs".into());
        }
        out.push(format!(
            "run {run_no}: {fewer} passes would break {}",
            keys.join(", ")
        ));
    }
    Ok(out.join("; "))
}

/// What binds when no pass count works, and what would help.
fn explain(
    input: &Input,
    chooser: &Chooser,
    tables: &mut Tables,
) -> Result<(String, String), DesignError> {
    let ctx = &chooser.ctx;
    let total = input.total;
    let mut binding = Vec::new();
    let mut remedy = Vec::new();
    let one = tables.annealed().interval(1)?;
    let one_first = tables.first.interval(1)?;
    match one.or(one_first) {
        None => {
            // No single pass meets the limits: say what each light-to-heavy pass breaks.
            let class = tables.annealed().class;
            let mut seen = Vec::new();
            for r in [0.02, 0.1, 0.2, 0.35, 0.5] {
                let x = -f64::ln(1.0 - r);
                let p = chooser.probe(class.law, class.e0, class.from_mm, &[x], f64::INFINITY)?;
                let b: Vec<String> = p
                    .passes
                    .iter()
                    .flat_map(|p| ctx.breaches(p))
                    .map(|b| b.describe(ctx))
                    .collect();
                let line = if b.is_empty() {
                    format!("at {:.0} % reduction the pass meets the limits but the run cannot be made up", 100.0 * r)
                } else {
                    format!("at {:.0} % reduction: {}", 100.0 * r, b.join(", "))
                };
                seen.push(line);
            }
            binding.push(format!(
                "no single pass from annealed stock meets every limit ({})",
                seen.join("; ")
            ));
            remedy.push("relax the limits named (draw_ratio_max, reduction bounds, delta_max, wire temperature, block power)".into());
        }
        Some(iv) => {
            binding.push(format!(
                "one pass can carry a strain of {:.4} to {:.4} (reductions {:.2} % to {:.2} %), and the whole reduction is a strain of {total:.4}",
                iv.lo,
                iv.hi,
                100.0 * -f64::exp_m1(-iv.lo),
                100.0 * -f64::exp_m1(-iv.hi)
            ));
            if let Some(l) = ctx.cold_work {
                binding.push(format!(
                    "each run at most material.cold_work_limit {l} (less the start strain {} for the first)",
                    input.file.start.strain
                ));
            }
            if let Some(w) = input.window {
                if w.lo <= w.hi {
                    binding.push(format!(
                        "the run after the temper anneal must carry {:.4} to {:.4}",
                        w.lo, w.hi
                    ));
                } else {
                    binding.push("no anneal lands the temper window".into());
                }
            }
            binding.push(format!(
                "no count of passes up to {PASSES_ALLOWED}, split into such runs{}, adds up to it",
                input
                    .target
                    .max_anneals
                    .map(|k| format!(" with at most {k} anneals (target.max_anneals)"))
                    .unwrap_or_default()
            ));
            if let Some(k) = input.target.max_anneals {
                remedy.push(format!("raise target.max_anneals (now {k})"));
            }
            if let Some(r) = ctx.r_min {
                remedy.push(format!("lower target.reduction_min (now {r})"));
            }
            if let Some(r) = ctx.r_max {
                remedy.push(format!("raise target.reduction_max (now {r})"));
            }
            if let Some(l) = ctx.cold_work {
                remedy.push(format!("raise material.cold_work_limit (now {l})"));
            }
            if input.window.is_some() {
                remedy.push("widen target.strength_mpa".into());
            }
            if remedy.is_empty() {
                remedy.push("relax the limits named".into());
            }
        }
    }
    Ok((binding.join("; "), remedy.join(", or ")))
}

/// The designed schedule as YAML that `coldpass check` reads back to the
/// same figures: every diameter written as Rust's shortest round-trip form of
/// its `f64`, so it parses to the same bits. `header` lines become `#` comments.
pub fn schedule_yaml(design: &Design, header: &[String]) -> Result<String, DesignError> {
    let body = serde_yaml::to_string(&design.schedule).map_err(|e| DesignError::Input {
        key: "schedule".into(),
        why: format!("cannot be written as YAML: {e}"),
    })?;
    let mut out = String::new();
    for h in header {
        for line in h.lines() {
            out.push_str("# ");
            out.push_str(line);
            out.push('\n');
        }
    }
    out.push_str(&body);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn advice_values_round_towards_the_feasible_side() {
        // A "raise to at least" printed to 4 places never falls short of the
        // value needed, nor a "lower to at most" above the value allowed.
        assert_eq!(at_least(1.23451, 4), 1.2346);
        assert_eq!(at_least(1.5, 4), 1.5);
        assert_eq!(at_most(0.32709, 4), 0.327);
        assert_eq!(at_most(470.0, 1), 470.0);
    }

    #[test]
    fn a_diameter_in_millimetres_is_written_once() {
        let d = |t: &str| crate::size::Diameter::parse(t).unwrap();
        assert_eq!(as_written(&d("9")), "9 mm");
        assert_eq!(as_written(&d("9mm")), "9 mm");
        assert_eq!(as_written(&d("AWG 10")), "AWG 10 (2.5882 mm)");
    }

    #[test]
    fn solver_finds_a_cubic_root() {
        let r =
            limits::solve_increasing(|x| Ok(x * x * x - 2.0), 0.0, 2.0, -2.0, 6.0, 1e-14, "test")
                .unwrap();
        assert!((r - 2f64.cbrt()).abs() < 1e-12);
    }
}
