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
//! exists. At each of these caps every pass's area reduction is also held at
//! or under the heavy-reduction line `check` flags (`limits.reduction_warn`,
//! or its wire / single-block default); only a last tier at the limit lets
//! passes take up to `target.reduction_max`. Within a cap the design has the
//! fewest passes, then the fewest anneals.
//!
//! The die angle of a pass is the one from the stock that minimises the
//! governing drawing stress among those with `Delta <= delta_max`. Every loop
//! is bounded by the pass counts asked for.

mod anneal;
mod diagnose;
mod die_room;
mod error;
mod finish;
mod input;
mod layout;
mod limits;
mod model;
mod runs;
mod search;
mod slip;
mod strategies;

pub use error::DesignError;
pub use model::{
    AnnealPlan, AnnealReason, Design, DesignOptions, DesignSummary, DiameterRange, DieOrder,
    Prefer, RunPlan,
};

use crate::evaluation::{evaluate_on, EvaluateOptions};
use crate::machine::{Machine, MachineKind};
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

use diagnose::diagnose;
use finish::finish;
use input::{read_input, Input};
use layout::{assemble, broken, spread, RunPasses};

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

/// Designs the schedule asked for by `file.target` (see the module
/// documentation for the method). The file's `passes` must be empty.
pub fn design(file: &ScheduleFile, options: &DesignOptions) -> Result<Design, DesignError> {
    design_on(file, options, None)
}

/// [`design`] on a drawing machine: exactly one die per block (or
/// `target.passes`, at most the blocks, fewer only on a non-slip machine),
/// no anneal between dies (a machine draws one continuous run), and the
/// designed schedule evaluated on the machine as `check --machine` evaluates
/// it, so that its attainable speed and tonnes per shift are reported and a
/// block over its limits (negative slip, motor, capstan speed, temperature)
/// refuses the design rather than pass unseen.
pub fn design_on(
    file: &ScheduleFile,
    options: &DesignOptions,
    machine: Option<&Machine>,
) -> Result<Design, DesignError> {
    if file
        .target
        .as_ref()
        .is_some_and(|t| t.prefer == Prefer::Speed)
    {
        return fastest(file, options, machine);
    }
    let input = read_input(file, options, machine)?;
    if let Some(m) = machine.filter(|m| m.kind == MachineKind::Slip) {
        return slip::design_slip(&input, options, m);
    }
    let max_n = input.max_passes.max(input.passes.unwrap_or(0));
    let mut build_error = None;
    let tiers = input.tiers();
    // The anneals the last tier holding the reduction line needs, worked out
    // only when an earlier tier's design has more anneals than the cold-work
    // limit and the temper window force: a tier that needs more than the last
    // is passed over for a later one that needs no more.
    let last_light = tiers.iter().rposition(|t| t.light);
    let mut fewest_anneals: Option<Option<usize>> = None;
    let mut passed_over: Option<(f64, usize)> = None;
    for (i, &t) in tiers.iter().enumerate() {
        let tier = t.ratio;
        let chooser = input.tier_chooser(t)?;
        let mut tables = input.tables(&chooser, max_n);
        let Some(split) = tables.fewest(input.pass_range(), input.max_anneals)? else {
            continue;
        };
        let k = anneals_of(&split);
        if k > tables.least_anneals() && last_light.is_some_and(|l| i < l) {
            let least = match fewest_anneals {
                Some(x) => x,
                None => {
                    let l = tiers[last_light.expect("checked")];
                    let c = input.tier_chooser(l)?;
                    let mut tb = input.tables(&c, max_n);
                    let x = tb
                        .fewest(input.pass_range(), input.max_anneals)?
                        .map(|s| anneals_of(&s));
                    fewest_anneals = Some(x);
                    x
                }
            };
            if least.is_some_and(|m| m < k) {
                passed_over.get_or_insert((input.caps[tier], k));
                continue;
            }
        }
        chooser.ctx.fewer_anneals_than.set(passed_over);
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

/// The anneals of a split: one between each run and the next (an empty first
/// run is an anneal before the first die, an empty temper run one after the last).
fn anneals_of(split: &Split) -> usize {
    split.middle.len() + usize::from(split.temper.is_some())
}

/// `target.prefer: speed`: the design of each strategy on the machine (the
/// file's first), the one of highest attainable speed among those of the
/// cleanest verdict (ok before warn) kept (the first on a tie), with a note giving every strategy's speed. A slip machine's cones
/// set its dies whatever the strategy: its one design is kept. Without a
/// machine there is no speed to compare: an error naming the key.
fn fastest(
    file: &ScheduleFile,
    options: &DesignOptions,
    machine: Option<&Machine>,
) -> Result<Design, DesignError> {
    let Some(m) = machine else {
        return Err(DesignError::Input {
            key: "target.prefer".into(),
            why: "speed needs a machine to have an attainable speed (machine: in the file, or --machine); leave it out, or give prefer: strategy".into(),
        });
    };
    let mut plain = file.clone();
    let own = match plain.target.as_mut() {
        Some(t) => {
            t.prefer = Prefer::Strategy;
            t.strategy
        }
        None => return design_on(&plain, options, machine),
    };
    if m.kind == MachineKind::Slip {
        return design_on(&plain, options, machine);
    }
    let mut order = vec![own];
    order.extend(
        [
            Strategy::EqualRatio,
            Strategy::EqualStrain,
            Strategy::Tapered,
        ]
        .into_iter()
        .filter(|s| *s != own),
    );
    let mut best: Option<Design> = None;
    let mut first_error = None;
    let mut tried = Vec::new();
    for s in order {
        let mut f = plain.clone();
        if let Some(t) = f.target.as_mut() {
            t.strategy = s;
        }
        let name = strategy_name(s);
        match design_on(&f, options, machine) {
            Ok(d) => {
                let v = d.summary.attainable_speed_m_s;
                tried.push(match v {
                    Some(v) => format!("{name} {v:.3} m/s"),
                    None => format!("{name} no attainable speed"),
                });
                // A cleaner verdict first (no pass into a warning for speed),
                // then the higher speed.
                let faster = match &best {
                    None => true,
                    Some(b) => match rank(&d).cmp(&rank(b)) {
                        std::cmp::Ordering::Less => true,
                        std::cmp::Ordering::Greater => false,
                        std::cmp::Ordering::Equal => {
                            v.is_some_and(|v| b.summary.attainable_speed_m_s.is_none_or(|w| v > w))
                        }
                    },
                };
                if faster {
                    best = Some(d);
                }
            }
            Err(e) => {
                tried.push(format!("{name} no design"));
                first_error.get_or_insert(e);
            }
        }
    }
    let Some(mut d) = best else {
        return Err(first_error.expect("a strategy was tried"));
    };
    d.summary.notes.push(format!(
        "target.prefer speed: {} kept, the highest attainable speed of the strategies ({})",
        strategy_name(d.summary.strategy),
        tried.join(", ")
    ));
    Ok(d)
}

/// A design's verdict as a rank: ok 0, warn 1, over 2.
fn rank(d: &Design) -> u8 {
    match d.report.summary.verdict {
        crate::evaluation::Verdict::Ok => 0,
        crate::evaluation::Verdict::Warn => 1,
        crate::evaluation::Verdict::Over => 2,
    }
}

/// A strategy as the file names it.
fn strategy_name(s: Strategy) -> &'static str {
    match s {
        Strategy::EqualRatio => "equal-ratio",
        Strategy::EqualStrain => "equal-strain",
        Strategy::Tapered => "tapered",
    }
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
