//! Why no design could be made: each message names the binding constraint
//! and what would make the design feasible.

use crate::pass::PassError;
use crate::schedule::ScheduleError;

use super::{at_least, at_most, passes_in_words, COLD_WORK_MARGIN, PASSES_ALLOWED};

/// Why no design could be made. Each message names the binding constraint and
/// what would make the design feasible.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DesignError {
    /// The file cannot be used (bad value, missing key).
    #[error(transparent)]
    Schedule(#[from] ScheduleError),
    /// A key of the design file is missing, contradicts another or is out of range.
    #[error("{key}: {why}")]
    Input {
        /// Path of the key in the file.
        key: String,
        /// What is wrong and what is allowed.
        why: String,
    },
    /// A pass could not be evaluated by the core.
    #[error("designing {pass}: {problem}")]
    Pass {
        /// Which pass, in words (`run 2, pass 3`, or the entry diameter
        /// while a pass is still being solved for).
        pass: String,
        /// The core's reason.
        problem: PassError,
    },
    /// The design meets every limit, but only with more draw passes than
    /// `target.max_passes` allows.
    #[error("target.max_passes {max_passes} is too few: meeting every limit takes {passes_needed} draw passes ({split}); allow at least {passes_needed} (target.max_passes), or relax what sets each run's count ({set_by})")]
    TooFewPasses {
        /// Passes allowed.
        max_passes: u32,
        /// Fewest draw passes of a design that meets every limit.
        passes_needed: u32,
        /// The passes run by run, with the anneals between (`8 + 5 around the temper anneal`).
        split: String,
        /// The limits that set each run's pass count, in words.
        set_by: String,
    },
    /// Keeping every pass under the ratio limit takes more passes than any
    /// design may have.
    #[error("the draw-ratio limit binds: keeping every pass of run {run} at or under limits.draw_ratio_max {draw_ratio_max} takes {}, more than the {passes_allowed} left of the {PASSES_ALLOWED} draw passes target.max_passes may allow; raise draw_ratio_max, or lower the friction or land length", passes_in_words(.passes_needed))]
    RatioLimit {
        /// Run number, from 1.
        run: usize,
        /// The limit.
        draw_ratio_max: f64,
        /// Passes the ratio limit needs in the run (`None`: more than the
        /// count ceiling of 1000).
        passes_needed: Option<u32>,
        /// Passes left for the run.
        passes_allowed: u32,
    },
    /// The designed schedule, evaluated as `check` evaluates it, puts a pass
    /// over a limit (a fault of the design, reported rather than hidden).
    #[error("the designed schedule fails its own check: step {step} ({from_mm:.4} mm to {to_mm:.4} mm) is flagged {flags}; relax the limit named, or try another strategy")]
    CheckFlags {
        /// Step number in the designed schedule, from 1.
        step: usize,
        /// Entry diameter, mm.
        from_mm: f64,
        /// Exit diameter, mm.
        to_mm: f64,
        /// The flags over their limits, comma-separated.
        flags: String,
    },
    /// No pass, however light, stays under the ratio limit.
    #[error("the draw-ratio limit binds: even a pass of {reduction_pct:.4} % reduction from {diameter_mm} mm has draw ratio {ratio:.4}, over limits.draw_ratio_max {draw_ratio_max} (the die's redundant work and land alone); raise draw_ratio_max above {ratio:.4}, or lower the friction or land length")]
    NoLightPass {
        /// Entry diameter of the pass, mm.
        diameter_mm: f64,
        /// Reduction tried, percent.
        reduction_pct: f64,
        /// Its draw ratio.
        ratio: f64,
        /// The limit.
        draw_ratio_max: f64,
    },
    /// The window lies below the annealed strength: no anneal makes the wire that soft.
    #[error("target.strength_mpa {min}-{max} MPa is softer than the annealed stock ({annealed_mpa:.1} MPa at strain 0): no anneal reaches it; raise the window's max to at least {:.1} MPa", at_least(*.annealed_mpa, 1))]
    WindowBelowAnnealed {
        /// Window min, MPa.
        min: f64,
        /// Window max, MPa.
        max: f64,
        /// Annealed flow stress, MPa.
        annealed_mpa: f64,
    },
    /// The window lies above what the annealed law can ever reach.
    #[error("target.strength_mpa {min}-{max} MPa is harder than the annealed law can reach (it saturates at {saturation_mpa:.1} MPa); lower the window's min below {:.1} MPa", at_most(*.saturation_mpa, 1))]
    WindowAboveSaturation {
        /// Window min, MPa.
        min: f64,
        /// Window max, MPa.
        max: f64,
        /// The law's highest stress, MPa.
        saturation_mpa: f64,
    },
    /// The window needs more cold work after the last anneal than the cold-work limit allows.
    #[error("target.strength_mpa min {min} MPa needs strain {strain_needed:.4} after the last anneal, over material.cold_work_limit {cold_work_limit}; the most the limit allows is {stress_at_limit_mpa:.1} MPa: lower the window's min to at most {:.1} MPa, or raise cold_work_limit to at least {:.4}", at_most(*.stress_at_limit_mpa, 1), at_least(*.strain_needed * (1.0 + 2.0 * COLD_WORK_MARGIN), 4))]
    WindowColdWork {
        /// Window min, MPa.
        min: f64,
        /// Strain the window's min needs.
        strain_needed: f64,
        /// The cold-work limit.
        cold_work_limit: f64,
        /// Flow stress at the limit, MPa.
        stress_at_limit_mpa: f64,
    },
    /// The whole reduction is too small to work the wire into the window.
    #[error("target.strength_mpa min {min} MPa needs strain {strain_needed:.4} after an anneal, but the whole reduction from start to finish is only {strain_available:.4} (and without an anneal the wire ends at {stress_without_anneal_mpa:.1} MPa); start from at least {:.4} mm, or lower the window's min", at_least(*.start_needed_mm, 4))]
    WindowReduction {
        /// Window min, MPa.
        min: f64,
        /// Strain the window's min needs.
        strain_needed: f64,
        /// True strain from start to finish.
        strain_available: f64,
        /// Finished flow stress with no anneal, MPa.
        stress_without_anneal_mpa: f64,
        /// Start diameter that would give the needed strain, mm.
        start_needed_mm: f64,
    },
    /// A run is too short for even one pass within the lower limits.
    #[error("run {run} ({from_mm:.4} mm to {to_mm:.4} mm, strain {strain:.4}) cannot be drawn within the limits: {binding}; {remedy}")]
    RunLimits {
        /// Run number, from 1.
        run: usize,
        /// Run start diameter, mm.
        from_mm: f64,
        /// Run end diameter, mm.
        to_mm: f64,
        /// Run strain.
        strain: f64,
        /// The limits broken, pass by pass.
        binding: String,
        /// What would make it feasible.
        remedy: String,
    },
    /// A numerical solve did not converge within its bound.
    #[error("the {what} solve did not converge in {iterations} iterations; try the equal-strain strategy")]
    Solver {
        /// Which solve.
        what: &'static str,
        /// The bound reached.
        iterations: usize,
    },
    /// `target.passes` asks for a count no design within the limits has.
    #[error("target.passes {passes} cannot meet every limit: {why}; {remedy}")]
    PassCount {
        /// Passes asked for.
        passes: u32,
        /// Least count that meets every limit, when one does (up to the 200 a design may have).
        least: Option<u32>,
        /// What goes wrong with the count asked for, in words.
        why: String,
        /// What to do instead.
        remedy: String,
    },
    /// No split of the reduction into runs meets every limit.
    #[error("no design meets every limit within {max_passes} draw passes: {binding}; {remedy}")]
    NoDesign {
        /// Passes searched (target.max_passes, or 200 for the passes needed).
        max_passes: u32,
        /// What binds, with its figures.
        binding: String,
        /// What would make it feasible.
        remedy: String,
    },
    /// A die rounded to the die room's sizes breaks a limit either way.
    #[error("die room: die {step} ({size_mm:.4} mm) rounded to the stock sizes ({choices}) breaks {broken}; use a finer target.die_step_mm or more target.die_sizes_mm")]
    DieRoom {
        /// Step number of the die, from 1.
        step: usize,
        /// The designed size, mm.
        size_mm: f64,
        /// The stock sizes tried, in words.
        choices: String,
        /// The limits broken, in words.
        broken: String,
    },
}
