//! Designing a schedule: from a start size, a finish size and the mill's
//! limits, the fewest draw passes, a die angle for each and the anneals.
//!
//! The reduction is cut into *runs* (the passes between two anneals). Anneals
//! go where the cold-work limit forces them, spaced so that every run ends at
//! the same accumulated strain; with a strength (temper) window the last
//! anneal sits at the diameter `D_a = D_f exp(eps_w / 2)` from which the
//! remaining true strain `eps_w` brings the finished flow stress into the
//! window, `eps_w` from the annealed law's inverse at the middle of the window
//! (`FlowLaw::strain_at_stress`). True strain is `eps = 2 ln(D0/D1)` and area
//! reduction `r = 1 - (D1/D0)^2` (Dieter, *Mechanical Metallurgy*, ch. 19).
//!
//! Each run gets the fewest passes for which every pass meets every limit:
//! the governing method's draw ratio `sigma_d / sigma_f(exit)` at or under
//! `draw_ratio_max`, the reduction bounds, `Delta <= delta_max`, the
//! cold-work limit, and (when given) the wire-temperature and block-power
//! limits that `check` also applies. The pass strains follow the strategy:
//!
//! - `equal-ratio`: every pass at one draw ratio `rho`. For a given `rho` each
//!   pass's exit is solved so that its ratio is `rho` (a safeguarded
//!   regula falsi on the pass strain); an outer solve on `rho` lands the last
//!   exit on the run's end diameter. The fewest passes is the count of passes
//!   at `rho = draw_ratio_max` that reach the end (more passes, lower `rho`);
//! - `equal-strain`: `eps_i = E / N`;
//! - `tapered`: `eps_i = eps_1 t^(i-1)`, `eps_1 = E (1 - t) / (1 - t^N)`.
//!
//! The die angle of a pass is the one from the stock that minimises the
//! governing drawing stress among those with `Delta <= delta_max`. Every loop
//! is bounded; when no schedule meets the limits the error names the binding
//! constraint and what would make the design feasible. The designed schedule
//! is then evaluated by [`crate::evaluation::evaluate`], exactly as `check`
//! evaluates it.

use serde::Serialize;

use crate::evaluation::{evaluate, EvaluateOptions, ScheduleReport};
use crate::flow::{FlowLaw, StrainAt};
use crate::pass::{self, analyse_pass, DrawPass, Method, PassError, Settings};
use crate::schedule::{
    self, DieOverrides, DrawStep, ScheduleError, ScheduleFile, Step, Strategy, Target, Window,
};
use crate::size::Diameter;

/// Most draw passes considered when `target.max_passes` is not given.
pub const DEFAULT_MAX_PASSES: u32 = 50;
/// Taper used by `strategy: tapered` when `target.taper` is not given: each
/// pass's strain 0.9 of the one before (common practice for tapering drafts).
pub const DEFAULT_TAPER: f64 = 0.9;
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
}

/// Why an anneal is in the design.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AnnealReason {
    /// The cold-work limit would be passed without it.
    ColdWork,
    /// It sets the finished strength: the remaining reduction lands the
    /// flow stress in the temper window.
    Temper,
}

impl AnnealReason {
    /// The name as written in every format (`cold-work`, `temper`).
    pub fn name(self) -> &'static str {
        match self {
            AnnealReason::ColdWork => "cold-work",
            AnnealReason::Temper => "temper",
        }
    }
}

/// One anneal of the design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AnnealPlan {
    /// Step number in the designed schedule, from 1.
    pub step: usize,
    /// Diameter at which the wire is annealed, mm.
    pub diameter_mm: f64,
    /// Accumulated strain the anneal removes.
    pub strain_before: f64,
    /// Why it is there.
    pub reason: AnnealReason,
    /// The reason in words, with its figures.
    pub why: String,
}

/// One run: the passes between two anneals (or the start or finish).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunPlan {
    /// Run number, from 1.
    pub run: usize,
    /// Entry diameter of the first pass, mm.
    pub from_diameter_mm: f64,
    /// Exit diameter of the last pass, mm.
    pub to_diameter_mm: f64,
    /// True strain of the run, `2 ln(from/to)`.
    pub strain: f64,
    /// Accumulated strain at the end of the run (with any start strain).
    pub strain_after: f64,
    /// Draw passes in the run.
    pub passes: usize,
    /// Lowest draw ratio of the run's passes.
    pub draw_ratio_min: f64,
    /// Highest draw ratio of the run's passes.
    pub draw_ratio_max: f64,
}

/// The design summary: what was chosen and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignSummary {
    /// How the strain was spread over the passes.
    pub strategy: Strategy,
    /// For `tapered`: each pass's strain this fraction of the one before.
    pub taper: Option<f64>,
    /// The governing method of the draw ratio.
    pub method: Method,
    /// Draw passes in the design.
    pub draw_passes: usize,
    /// Most passes that were allowed.
    pub max_passes: u32,
    /// Start diameter, mm.
    pub start_diameter_mm: f64,
    /// Finish diameter, mm (the last die size, exactly).
    pub finish_diameter_mm: f64,
    /// The die stock the angles were chosen from, degrees.
    pub die_angles_deg: Vec<f64>,
    /// Temper window, MPa, when given.
    pub strength_window_mpa: Option<Window>,
    /// Flow stress aimed at in the finished wire, MPa (middle of the window, or where the window's strain range was moved to).
    pub aimed_flow_stress_mpa: Option<f64>,
    /// Flow stress of the finished wire, MPa.
    pub finished_flow_stress_mpa: f64,
    /// Largest spread of the draw ratios within one run, `(max - min) / max`
    /// (runs between anneals each take their own fewest passes, so each has its own ratio).
    pub run_draw_ratio_spread: f64,
    /// The runs between anneals.
    pub runs: Vec<RunPlan>,
    /// The anneals, in order.
    pub anneals: Vec<AnnealPlan>,
    /// Choices and defaults that matter.
    pub notes: Vec<String>,
}

/// A finished design: the schedule (passes filled in, `target` removed), its
/// evaluation as `check` gives it, and the summary.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// The designed schedule file; `coldpass check` reproduces `report` from it.
    pub schedule: ScheduleFile,
    /// The designed schedule evaluated exactly as `check` evaluates it.
    pub report: ScheduleReport,
    /// What was chosen and why.
    pub summary: DesignSummary,
}

/// Options a front end may set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct DesignOptions {
    /// A governing method overriding `limits.method` (it is written into the
    /// designed schedule so that `check` uses it too).
    pub method: Option<Method>,
}

// ------------------------------------------------------------------ one pass

/// A limit a designed pass breaks.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Breach {
    Ratio(f64),
    ReductionMax(f64),
    ReductionMin(f64),
    Delta(f64),
    ColdWork(f64),
    Hot(f64),
    Power(f64),
    Spread(f64),
}

impl Breach {
    /// Breaches that more (lighter) passes only make worse.
    fn is_light(self) -> bool {
        matches!(self, Breach::ReductionMin(_) | Breach::Delta(_))
    }

    /// The limit broken, as the file names it, with its value.
    fn limit(self, c: &Ctx) -> String {
        let l = &c.file.limits;
        let v = |x: Option<f64>| x.map_or_else(String::new, |x| format!(" {x}"));
        match self {
            Breach::Ratio(_) => format!("limits.draw_ratio_max {}", c.ratio_max),
            Breach::ReductionMax(_) => format!("target.reduction_max{}", v(c.r_max)),
            Breach::ReductionMin(_) => format!("target.reduction_min{}", v(c.r_min)),
            Breach::Delta(_) => format!("limits.delta_max{}", v(c.delta_max)),
            Breach::ColdWork(_) => format!("material.cold_work_limit{}", v(c.cold_work)),
            Breach::Hot(_) => format!(
                "limits.wire_temperature_max_c{}",
                v(l.wire_temperature_max_c)
            ),
            Breach::Power(_) => format!(
                "line.block_power_kw{}",
                v(c.file.line.as_ref().and_then(|x| x.block_power_kw))
            ),
            Breach::Spread(_) => format!(
                "the {} % draw-ratio spread of equal-ratio",
                100.0 * EQUAL_RATIO_SPREAD_MAX
            ),
        }
    }

    fn describe(self, c: &Ctx) -> String {
        match self {
            Breach::Ratio(x) => format!(
                "draw ratio {x:.4} over limits.draw_ratio_max {}",
                c.ratio_max
            ),
            Breach::ReductionMax(r) => format!(
                "reduction {:.2} % over target.reduction_max {}",
                100.0 * r,
                c.r_max.unwrap_or(1.0)
            ),
            Breach::ReductionMin(r) => format!(
                "reduction {:.2} % under target.reduction_min {}",
                100.0 * r,
                c.r_min.unwrap_or(0.0)
            ),
            Breach::Delta(d) => format!(
                "Delta {d:.3} over limits.delta_max {} with every stock angle",
                c.delta_max.unwrap_or(f64::INFINITY)
            ),
            Breach::ColdWork(e) => format!(
                "strain {e:.4} over material.cold_work_limit {}",
                c.cold_work.unwrap_or(f64::INFINITY)
            ),
            Breach::Hot(t) => format!(
                "wire at {t:.1} C, over limits.wire_temperature_max_c {}",
                c.file
                    .limits
                    .wire_temperature_max_c
                    .unwrap_or(f64::INFINITY)
            ),
            Breach::Power(p) => format!(
                "{p:.2} kW, over line.block_power_kw {}",
                c.file
                    .line
                    .as_ref()
                    .and_then(|l| l.block_power_kw)
                    .unwrap_or(f64::INFINITY)
            ),
            Breach::Spread(s) => format!(
                "draw ratios spread {:.3} %, over the {} % an equal-ratio design allows",
                100.0 * s,
                100.0 * EQUAL_RATIO_SPREAD_MAX
            ),
        }
    }
}

/// A pass with its chosen die.
#[derive(Debug, Clone, Copy, PartialEq)]
struct PassPick {
    exit_mm: f64,
    semi_angle_deg: f64,
    ratio: f64,
    reduction: f64,
    delta: f64,
    stress_mpa: f64,
    strain_after: f64,
    delta_ok: bool,
}

/// What the design needs from the file, read once.
struct Ctx<'a> {
    file: &'a ScheduleFile,
    method: Method,
    settings: Settings,
    angles: Vec<f64>,
    from_stock: bool,
    ratio_max: f64,
    r_min: Option<f64>,
    r_max: Option<f64>,
    delta_max: Option<f64>,
    cold_work: Option<f64>,
    finish_mm: f64,
}

impl Ctx<'_> {
    /// The pass from `d_in` to `d_out` at accumulated strain `strain_before`,
    /// with the stock angle of least governing stress within the Delta limit.
    fn pick(
        &self,
        law: &FlowLaw,
        d_in: f64,
        d_out: f64,
        strain_before: f64,
    ) -> Result<PassPick, PassError> {
        let mut best: Option<PassPick> = None;
        let mut best_any: Option<PassPick> = None;
        for &a in &self.angles {
            let step = DieOverrides {
                semi_angle_deg: Some(a),
                ..DieOverrides::default()
            };
            let die = self.file.die_for(&step, a)?;
            let dp = DrawPass {
                entry_diameter_mm: d_in,
                exit_diameter_mm: d_out,
                strain_before,
                back_tension_mpa: 0.0,
                die,
            };
            let m = analyse_pass(law, &dp, &self.settings)?;
            let stress = m.draw_stress_mpa.get(self.method)?;
            let delta_ok = self.delta_max.is_none_or(|x| m.delta <= x);
            let p = PassPick {
                exit_mm: d_out,
                semi_angle_deg: a,
                ratio: stress / m.flow_stress_exit_mpa,
                reduction: m.area_reduction,
                delta: m.delta,
                stress_mpa: stress,
                strain_after: m.strain_after,
                delta_ok,
            };
            if best_any.is_none_or(|b| p.stress_mpa < b.stress_mpa) {
                best_any = Some(p);
            }
            if delta_ok && best.is_none_or(|b| p.stress_mpa < b.stress_mpa) {
                best = Some(p);
            }
        }
        // `angles` is never empty (checked when the context is built).
        best.or(best_any).map_or_else(unreachable_pick, Ok)
    }

    /// The limits the pass breaks, with the comparisons `check` makes.
    fn breaches(&self, p: &PassPick) -> Vec<Breach> {
        let mut v = Vec::new();
        if p.ratio > self.ratio_max {
            v.push(Breach::Ratio(p.ratio));
        }
        if self.r_max.is_some_and(|r| p.reduction > r) {
            v.push(Breach::ReductionMax(p.reduction));
        }
        if self.r_min.is_some_and(|r| p.reduction < r) {
            v.push(Breach::ReductionMin(p.reduction));
        }
        if !p.delta_ok {
            v.push(Breach::Delta(p.delta));
        }
        if self.cold_work.is_some_and(|l| p.strain_after > l) {
            v.push(Breach::ColdWork(p.strain_after));
        }
        let m = &self.file.material;
        let l = &self.file.limits;
        if let Some(tmax) = l.wire_temperature_max_c {
            let rise = pass::temperature_rise_c(
                p.stress_mpa.max(0.0),
                m.density_kg_m3,
                m.specific_heat_j_kg_k,
                m.heat_fraction.unwrap_or(schedule::DEFAULT_HEAT_FRACTION),
            );
            let t = l.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C) + rise;
            if t > tmax {
                v.push(Breach::Hot(t));
            }
        }
        if let Some(line) = &self.file.line {
            if let Some(pmax) = line.block_power_kw {
                let speed = line.finish_speed_m_s * (self.finish_mm / p.exit_mm).powi(2);
                let power = pass::power_kw(pass::force_kn(p.stress_mpa, p.exit_mm), speed);
                if power > pmax {
                    v.push(Breach::Power(power));
                }
            }
        }
        v
    }

    /// Draw ratio minus `rho` of a pass of strain `x` from `d_in`.
    fn ratio_gap(
        &self,
        law: &FlowLaw,
        d_in: f64,
        strain_before: f64,
        x: f64,
        rho: f64,
    ) -> Result<(f64, PassPick), PassError> {
        let p = self.pick(law, d_in, d_in * (-0.5 * x).exp(), strain_before)?;
        Ok((p.ratio - rho, p))
    }

    /// The pass strain from `d_in` at which the draw ratio is `rho`, clamped to
    /// `[PASS_STRAIN_FLOOR, PASS_STRAIN_CEILING]`; `guess` seeds the bracket.
    fn strain_at_ratio(
        &self,
        law: &FlowLaw,
        d_in: f64,
        strain_before: f64,
        rho: f64,
        guess: f64,
    ) -> Result<f64, DesignError> {
        let f = |x: f64| {
            self.ratio_gap(law, d_in, strain_before, x, rho)
                .map(|r| r.0)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("a pass from {d_in:.4} mm"),
                    problem,
                })
        };
        let g0 = guess.clamp(PASS_STRAIN_FLOOR, PASS_STRAIN_CEILING);
        let f0 = f(g0)?;
        if f0 == 0.0 {
            return Ok(g0);
        }
        // Step away from the guess by factors of 1.25 until the sign changes.
        let (mut lo, mut hi, mut flo, mut fhi) = (g0, g0, f0, f0);
        let mut found = false;
        for _ in 0..120 {
            if f0 < 0.0 {
                if hi >= PASS_STRAIN_CEILING {
                    return Ok(PASS_STRAIN_CEILING);
                }
                lo = hi;
                flo = fhi;
                hi = (hi * 1.25).min(PASS_STRAIN_CEILING);
                fhi = f(hi)?;
                if fhi >= 0.0 {
                    found = true;
                    break;
                }
            } else {
                if lo <= PASS_STRAIN_FLOOR {
                    return Ok(PASS_STRAIN_FLOOR);
                }
                hi = lo;
                fhi = flo;
                lo = (lo / 1.25).max(PASS_STRAIN_FLOOR);
                flo = f(lo)?;
                if flo <= 0.0 {
                    found = true;
                    break;
                }
            }
        }
        if !found {
            return Err(DesignError::Solver {
                what: "pass-strain bracket",
                iterations: 120,
            });
        }
        solve_increasing(f, lo, hi, flo, fhi, 1e-14, "pass strain")
    }
}

fn unreachable_pick() -> Result<PassPick, PassError> {
    Err(PassError::Param(crate::param::ParamError::new(
        "semi_angles_deg",
        "[]",
        "needs at least one angle",
    )))
}

/// Root of an increasing function on `[lo, hi]` with `f(lo) <= 0 <= f(hi)`:
/// regula falsi with the Illinois modification, and a bisection step whenever
/// the bracket fails to halve in three steps; at most 200 evaluations.
fn solve_increasing(
    mut f: impl FnMut(f64) -> Result<f64, DesignError>,
    mut lo: f64,
    mut hi: f64,
    mut flo: f64,
    mut fhi: f64,
    tol: f64,
    what: &'static str,
) -> Result<f64, DesignError> {
    const MAX_ITER: usize = 200;
    if flo == 0.0 {
        return Ok(lo);
    }
    if fhi == 0.0 {
        return Ok(hi);
    }
    let mut side = 0i8;
    let mut width_ref = hi - lo;
    for it in 0..MAX_ITER {
        let width = hi - lo;
        if width <= tol * hi.abs().max(1e-300) {
            return Ok(if -flo < fhi { lo } else { hi });
        }
        let x = if it % 3 == 2 && width > 0.5 * width_ref {
            0.5 * (lo + hi)
        } else {
            let s = lo - flo * (hi - lo) / (fhi - flo);
            if s.is_finite() && s > lo && s < hi {
                s
            } else {
                0.5 * (lo + hi)
            }
        };
        if it % 3 == 2 {
            width_ref = hi - lo;
        }
        let fx = f(x)?;
        if fx == 0.0 {
            return Ok(x);
        }
        if fx < 0.0 {
            lo = x;
            flo = fx;
            if side == -1 {
                fhi *= 0.5;
            }
            side = -1;
        } else {
            hi = x;
            fhi = fx;
            if side == 1 {
                flo *= 0.5;
            }
            side = 1;
        }
    }
    Err(DesignError::Solver {
        what,
        iterations: MAX_ITER,
    })
}

// ------------------------------------------------------------------ one run

/// A run to draw: from `from_mm` to `to_mm` with `law`, starting at strain `strain0`.
#[derive(Debug, Clone, Copy)]
struct Run<'a> {
    /// Run number, from 1.
    index: usize,
    law: &'a FlowLaw,
    strain0: f64,
    from_mm: f64,
    to_mm: f64,
}

impl Run<'_> {
    fn strain(&self) -> f64 {
        pass::true_strain(self.from_mm, self.to_mm)
    }
}

/// The outcome of trying one pass count.
enum Attempt {
    Fits(Vec<PassPick>),
    Breaks(Vec<(usize, Breach)>),
}

struct Chooser<'a> {
    ctx: Ctx<'a>,
    strategy: Strategy,
    taper: f64,
}

impl Chooser<'_> {
    /// Passes of the given strains, evaluated in order; the last exit is `run.to_mm` exactly.
    fn passes_of(&self, run: &Run, strains: &[f64]) -> Result<Vec<PassPick>, DesignError> {
        let mut out = Vec::with_capacity(strains.len());
        let (mut d, mut e, mut cum) = (run.from_mm, run.strain0, 0.0);
        for (i, x) in strains.iter().enumerate() {
            cum += x;
            let d_out = if i + 1 == strains.len() {
                run.to_mm
            } else {
                run.from_mm * (-0.5 * cum).exp()
            };
            let p = self
                .ctx
                .pick(run.law, d, d_out, e)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("run {}, pass {}", run.index, i + 1),
                    problem,
                })?;
            d = d_out;
            e = p.strain_after;
            out.push(p);
        }
        Ok(out)
    }

    /// Shoots `n` passes each at ratio `rho` (or until the end is reached when
    /// `n` is `None`); returns the pass strains and the diameter reached.
    fn shoot(
        &self,
        run: &Run,
        rho: f64,
        n: Option<u32>,
        guesses: &mut Vec<f64>,
    ) -> Result<(Vec<f64>, f64), DesignError> {
        let (mut d, mut e) = (run.from_mm, run.strain0);
        let mut strains = Vec::new();
        let count = n.unwrap_or(PASSES_COUNT_CEILING) as usize;
        for i in 0..count {
            if n.is_none() && d <= run.to_mm * (1.0 + 1e-12) {
                break;
            }
            let guess = guesses
                .get(i)
                .copied()
                .or(strains.last().copied())
                .unwrap_or(0.2);
            let x = self.ctx.strain_at_ratio(run.law, d, e, rho, guess)?;
            if i < guesses.len() {
                guesses[i] = x;
            } else {
                guesses.push(x);
            }
            strains.push(x);
            e += x;
            d *= (-0.5 * x).exp();
            if n.is_none() && x <= PASS_STRAIN_FLOOR {
                // No progress: even the lightest pass is over the ratio.
                break;
            }
        }
        Ok((strains, d))
    }

    /// Fewest passes that keep every pass of the run at or under the ratio
    /// limit: the count of passes at `rho = draw_ratio_max` that reach the end.
    fn passes_for_ratio(&self, run: &Run) -> Result<u32, DesignError> {
        let rho = self.ctx.ratio_max;
        let mut guesses = Vec::new();
        let (strains, d) = self.shoot(run, rho, None, &mut guesses)?;
        if strains.last().is_some_and(|x| *x <= PASS_STRAIN_FLOOR) {
            let x = 1e-3;
            let (gap, p) = self
                .ctx
                .ratio_gap(run.law, run.from_mm, run.strain0, x, rho)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("run {}, pass 1", run.index),
                    problem,
                })?;
            return Err(DesignError::NoLightPass {
                diameter_mm: run.from_mm,
                reduction_pct: 100.0 * p.reduction,
                ratio: gap + rho,
                draw_ratio_max: rho,
            });
        }
        if d > run.to_mm * (1.0 + 1e-12) {
            return Ok(PASSES_COUNT_CEILING + 1);
        }
        // The last shot pass overshoots the end (or lands on it): it is still one pass.
        Ok(strains.len().max(1) as u32)
    }

    /// The equal-ratio pass strains of `n` passes: the common ratio solved so
    /// that the last exit lands on `run.to_mm`.
    fn equal_ratio_strains(&self, run: &Run, n: u32) -> Result<(Vec<f64>, f64), DesignError> {
        let total = run.strain();
        let even = vec![total / n as f64; n as usize];
        let start = self.passes_of(run, &even)?;
        let mut lo_rho = start.iter().map(|p| p.ratio).fold(f64::INFINITY, f64::min);
        let mut hi_rho = start.iter().map(|p| p.ratio).fold(0.0, f64::max);
        let mut guesses: Vec<f64> = even.clone();
        let target = run.to_mm.ln();
        // gap(rho) = ln(target) - ln(D_n(rho)): increasing in rho.
        let gap = |rho: f64, guesses: &mut Vec<f64>| -> Result<f64, DesignError> {
            let (_, d) = self.shoot(run, rho, Some(n), guesses)?;
            Ok(target - d.ln())
        };
        let mut flo = gap(lo_rho, &mut guesses)?;
        let mut fhi = gap(hi_rho, &mut guesses)?;
        for _ in 0..60 {
            if flo <= 0.0 {
                break;
            }
            hi_rho = lo_rho;
            fhi = flo;
            lo_rho *= 0.8;
            flo = gap(lo_rho, &mut guesses)?;
        }
        for _ in 0..60 {
            if fhi >= 0.0 {
                break;
            }
            lo_rho = hi_rho;
            flo = fhi;
            hi_rho *= 1.25;
            fhi = gap(hi_rho, &mut guesses)?;
        }
        if flo > 0.0 || fhi < 0.0 {
            return Err(DesignError::Solver {
                what: "equal-ratio bracket",
                iterations: 60,
            });
        }
        let rho = solve_increasing(
            |r| gap(r, &mut guesses),
            lo_rho,
            hi_rho,
            flo,
            fhi,
            1e-13,
            "equal-ratio",
        )?;
        let (strains, _) = self.shoot(run, rho, Some(n), &mut guesses)?;
        Ok((strains, rho))
    }

    /// The pass strains of `n` passes by the strategy.
    fn strains(&self, run: &Run, n: u32) -> Result<Vec<f64>, DesignError> {
        let total = run.strain();
        Ok(match self.strategy {
            Strategy::EqualStrain => vec![total / n as f64; n as usize],
            Strategy::Tapered => {
                let t = self.taper;
                let first = if t == 1.0 {
                    total / n as f64
                } else {
                    total * (1.0 - t) / (1.0 - t.powi(n as i32))
                };
                (0..n).map(|i| first * t.powi(i as i32)).collect()
            }
            Strategy::EqualRatio => self.equal_ratio_strains(run, n)?.0,
        })
    }

    fn attempt(&self, run: &Run, n: u32) -> Result<Attempt, DesignError> {
        let strains = self.strains(run, n)?;
        let passes = self.passes_of(run, &strains)?;
        let mut breaks: Vec<(usize, Breach)> = Vec::new();
        for (i, p) in passes.iter().enumerate() {
            breaks.extend(self.ctx.breaches(p).into_iter().map(|b| (i + 1, b)));
        }
        if self.strategy == Strategy::EqualRatio && passes.len() > 1 {
            let s = spread(&passes);
            if s > EQUAL_RATIO_SPREAD_MAX {
                breaks.push((0, Breach::Spread(s)));
            }
        }
        Ok(if breaks.is_empty() {
            Attempt::Fits(passes)
        } else {
            Attempt::Breaks(breaks)
        })
    }

    /// The fewest passes for the run within `cap` passes, `least` of them
    /// needed by the ratio limit.
    fn design_run(&self, run: &Run, least: u32, cap: u32) -> Result<Vec<PassPick>, DesignError> {
        if least > cap {
            return Err(DesignError::RatioLimit {
                run: run.index,
                draw_ratio_max: self.ctx.ratio_max,
                passes_needed: (least <= PASSES_COUNT_CEILING).then_some(least),
                passes_allowed: cap,
            });
        }
        // No pass may exceed reduction_max, so the run needs at least
        // E / -ln(1 - reduction_max) passes whatever the strategy.
        let by_reduction = self.ctx.r_max.map_or(1, |r| {
            let n = run.strain() / -(-r).ln_1p();
            (n * (1.0 - 1e-12))
                .ceil()
                .clamp(1.0, PASSES_COUNT_CEILING as f64) as u32
        });
        let first = least.max(by_reduction);
        let mut last: Vec<(usize, Breach)> = Vec::new();
        let mut tried = first;
        for n in first..=cap {
            tried = n;
            match self.attempt(run, n)? {
                Attempt::Fits(p) => return Ok(p),
                Attempt::Breaks(b) => {
                    let light = b.iter().any(|(_, x)| x.is_light());
                    last = b;
                    if light {
                        break;
                    }
                }
            }
        }
        Err(self.run_error(run, least, tried, cap, &last))
    }

    /// What sets the run's count of `n` passes: the limits that `n - 1`
    /// passes would break, in words.
    fn count_set_by(&self, run: &Run, n: usize) -> String {
        if n <= 1 {
            return format!("run {}: 1 pass", run.index);
        }
        let fewer = n as u32 - 1;
        let mut keys: Vec<String> = Vec::new();
        if let Ok(Attempt::Breaks(b)) = self.attempt(run, fewer) {
            for (_, x) in b {
                let k = x.limit(&self.ctx);
                if !keys.contains(&k) {
                    keys.push(k);
                }
            }
        }
        if keys.is_empty() {
            // The count was not tried (the scan starts at the ratio limit's count).
            keys.push(format!("limits.draw_ratio_max {}", self.ctx.ratio_max));
        }
        format!(
            "run {}: {fewer} passes would break {}",
            run.index,
            keys.join(", ")
        )
    }

    fn run_error(
        &self,
        run: &Run,
        least: u32,
        tried: u32,
        cap: u32,
        breaks: &[(usize, Breach)],
    ) -> DesignError {
        let c = &self.ctx;
        let mut lines: Vec<String> = breaks
            .iter()
            .take(6)
            .map(|(i, b)| {
                if *i == 0 {
                    b.describe(c)
                } else {
                    format!("pass {i}: {}", b.describe(c))
                }
            })
            .collect();
        if breaks.len() > 6 {
            lines.push(format!("and {} more", breaks.len() - 6));
        }
        let binding = format!("with {tried} passes, {}", lines.join("; "));
        let light = breaks.iter().any(|(_, b)| b.is_light());
        let heavy = breaks.iter().any(|(_, b)| !b.is_light());
        let strain = run.strain();
        let mut remedy = Vec::new();
        if light {
            if let Some(rmin) = c.r_min {
                let per_pass = 1.0 - (-strain / tried as f64).exp();
                if per_pass < rmin {
                    remedy.push(format!(
                        "lower target.reduction_min to at most {:.4} (the run's strain over {tried} passes)",
                        at_most(per_pass, 4)
                    ));
                }
            }
            if breaks.iter().any(|(_, b)| matches!(b, Breach::Delta(_))) {
                let worst = breaks
                    .iter()
                    .filter_map(|(_, b)| match b {
                        Breach::Delta(d) => Some(*d),
                        _ => None,
                    })
                    .fold(0.0, f64::max);
                remedy.push(format!(
                    "stock a smaller die angle or raise limits.delta_max to at least {:.3}",
                    at_least(worst, 3)
                ));
            }
            if heavy || least == tried {
                remedy.push(format!(
                    "the ratio limit needs at least {least} passes here, which leaves the passes too light: relax one of the two, or move the anneals (a longer run)"
                ));
            }
        } else {
            remedy.push(format!(
                "{cap} passes, the most left for this run of the {PASSES_ALLOWED} a design may have, are still over: relax the limits named"
            ));
        }
        if self.strategy != Strategy::EqualStrain {
            remedy.push("or try strategy equal-strain".into());
        }
        DesignError::RunLimits {
            run: run.index,
            from_mm: run.from_mm,
            to_mm: run.to_mm,
            strain,
            binding,
            remedy: remedy.join("; "),
        }
    }
}

fn spread(passes: &[PassPick]) -> f64 {
    let hi = passes.iter().map(|p| p.ratio).fold(0.0, f64::max);
    let lo = passes.iter().map(|p| p.ratio).fold(f64::INFINITY, f64::min);
    if hi > 0.0 {
        (hi - lo) / hi
    } else {
        0.0
    }
}

// ------------------------------------------------------------------ anneals

/// Where the runs start and end: strains carried by each run and the reason
/// for the anneal before each run after the first.
#[derive(Debug, Clone, PartialEq)]
struct Layout {
    /// Strain of each run (a run of 0 strain has no passes).
    run_strains: Vec<f64>,
    /// Reason for the anneal after each run but the last (and after the last
    /// when `final_anneal`).
    anneal_reasons: Vec<AnnealReason>,
    /// The wire is annealed after its last pass (a window at the annealed strength).
    final_anneal: bool,
    /// Aimed finished flow stress, MPa.
    aim_mpa: Option<f64>,
}

/// Fewest cold-work anneals for a strain `total` drawn from a start strain
/// `e0`, and the strain of each run when every run ends at the same
/// accumulated strain `S`: `max(S - e0, 0) + k S = total` (water level).
fn cold_work_runs(total: f64, e0: f64, limit: Option<f64>) -> Option<Vec<f64>> {
    let Some(l) = limit else {
        return Some(vec![total]);
    };
    let l = l * (1.0 - COLD_WORK_MARGIN);
    for k in 0..=PASSES_COUNT_CEILING as usize {
        let s = (total + e0) / (k + 1) as f64;
        let (first, rest) = if s >= e0 {
            (s - e0, s)
        } else if k > 0 {
            // The stock arrives harder than the level: anneal before the first pass.
            (0.0, total / k as f64)
        } else {
            continue;
        };
        let first_ok = first == 0.0 || first + e0 <= l;
        if first_ok && (k == 0 || rest <= l) {
            let mut v = vec![first];
            v.extend(std::iter::repeat_n(rest, k));
            return Some(v);
        }
    }
    None
}

fn layouts(
    file: &ScheduleFile,
    target: &Target,
    finish_mm: f64,
) -> Result<Vec<Layout>, DesignError> {
    let start_mm = file.start.diameter.mm();
    let total = pass::true_strain(start_mm, finish_mm);
    let e0 = file.start.strain;
    let limit = file.material.cold_work_limit;
    let law0 = &file.material.flow;
    let law_a = file.annealed_law();
    let cold = |total: f64| -> Result<Vec<f64>, DesignError> {
        cold_work_runs(total, e0, limit).ok_or_else(|| DesignError::Input {
            key: "material.cold_work_limit".into(),
            why: format!(
                "{} would need more than {PASSES_COUNT_CEILING} anneals for a strain of {total:.4}; raise the limit",
                limit.unwrap_or(f64::INFINITY)
            ),
        })
    };
    let Some(w) = target.strength_mpa else {
        let runs = cold(total)?;
        let k = runs.len() - 1;
        return Ok(vec![Layout {
            run_strains: runs,
            anneal_reasons: vec![AnnealReason::ColdWork; k],
            final_anneal: false,
            aim_mpa: None,
        }]);
    };
    let mid = 0.5 * (w.min + w.max);
    let no_anneal = law0.stress_mpa(e0 + total);
    if limit.is_none_or(|l| e0 + total <= l * (1.0 - COLD_WORK_MARGIN))
        && (w.min..=w.max).contains(&no_anneal)
    {
        return Ok(vec![Layout {
            run_strains: vec![total],
            anneal_reasons: Vec::new(),
            final_anneal: false,
            aim_mpa: Some(no_anneal),
        }]);
    }
    let annealed = law_a.stress_mpa(0.0);
    if annealed > w.max {
        return Err(DesignError::WindowBelowAnnealed {
            min: w.min,
            max: w.max,
            annealed_mpa: annealed,
        });
    }
    let strain_at = |s: f64| {
        law_a.strain_at_stress(s).map_err(|e| DesignError::Input {
            key: "target.strength_mpa".into(),
            why: e.to_string(),
        })
    };
    let e_lo = match strain_at(w.min)? {
        StrainAt::Reached(e) => e,
        StrainAt::Unreachable { limit_mpa } => {
            return Err(DesignError::WindowAboveSaturation {
                min: w.min,
                max: w.max,
                saturation_mpa: limit_mpa,
            })
        }
    };
    let e_hi = match strain_at(w.max)? {
        StrainAt::Reached(e) => e,
        StrainAt::Unreachable { .. } => f64::INFINITY,
    };
    let aim = match strain_at(mid)? {
        StrainAt::Reached(e) => e,
        StrainAt::Unreachable { .. } => e_lo,
    };
    let l_eff = limit.map_or(f64::INFINITY, |l| l * (1.0 - COLD_WORK_MARGIN));
    if let Some(l) = limit {
        if e_lo > l_eff {
            return Err(DesignError::WindowColdWork {
                min: w.min,
                strain_needed: e_lo,
                cold_work_limit: l,
                stress_at_limit_mpa: law_a.stress_mpa(l),
            });
        }
    }
    if e_lo > total {
        return Err(DesignError::WindowReduction {
            min: w.min,
            strain_needed: e_lo,
            strain_available: total,
            stress_without_anneal_mpa: no_anneal,
            start_needed_mm: finish_mm * (0.5 * e_lo).exp(),
        });
    }
    let upper = e_hi.min(l_eff).min(total);
    // Fewest anneals: the count at the top of the window's strain range; the
    // strains that keep that count run from `floor` up to `upper`.
    let k_of = |ew: f64| cold(total - ew).map(|v| v.len());
    let k_min = k_of(upper)?;
    let mut floor = e_lo;
    if k_of(e_lo)? > k_min {
        let (mut a, mut b) = (e_lo, upper);
        for _ in 0..100 {
            let m = 0.5 * (a + b);
            if k_of(m)? > k_min {
                a = m;
            } else {
                b = m;
            }
        }
        floor = b;
    }
    let first = aim.clamp(floor, upper);
    // Candidates: the aim first, then points across the allowed range by
    // distance from it (used only when the aim cannot be drawn within the limits).
    let mut cands = vec![first];
    for i in 0..=8 {
        let e = floor + (upper - floor) * i as f64 / 8.0;
        if (e - first).abs() > 1e-9 * upper.max(1e-9) {
            cands.push(e);
        }
    }
    cands[1..].sort_by(|a, b| (a - first).abs().total_cmp(&(b - first).abs()));
    let mut out = Vec::new();
    for ew in cands {
        let mut runs = cold(total - ew)?;
        let k = runs.len() - 1;
        let mut reasons = vec![AnnealReason::ColdWork; k];
        reasons.push(AnnealReason::Temper);
        let final_anneal = ew <= 0.0;
        if !final_anneal {
            runs.push(ew);
        }
        out.push(Layout {
            run_strains: runs,
            anneal_reasons: reasons,
            final_anneal,
            aim_mpa: Some(law_a.stress_mpa(ew)),
        });
    }
    Ok(out)
}

// ------------------------------------------------------------------ the design

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
    let max_passes = target.max_passes.unwrap_or(DEFAULT_MAX_PASSES);
    let taper = target.taper.unwrap_or(DEFAULT_TAPER);
    let chooser = Chooser {
        ctx: Ctx {
            file,
            method,
            settings: Settings {
                redundant_c: file
                    .limits
                    .redundant_c
                    .unwrap_or(Settings::default().redundant_c),
            },
            angles: angles.clone(),
            from_stock,
            ratio_max: file.limits.draw_ratio_max,
            r_min: target.reduction_min,
            r_max: target.reduction_max,
            delta_max: file.limits.delta_max,
            cold_work: file.material.cold_work_limit,
            finish_mm,
        },
        strategy: target.strategy,
        taper,
    };

    let candidates = layouts(file, target, finish_mm)?;
    let first_error = match search(&chooser, &candidates, start_mm, finish_mm, max_passes) {
        Ok((layout, runs)) => {
            return finish(
                file, target, options, &chooser, layout, runs, max_passes, &angles,
            )
        }
        Err(e) => e,
    };
    if max_passes >= PASSES_ALLOWED {
        return Err(first_error);
    }
    // Too few passes allowed, or limits no pass count meets? A design with the
    // most passes any file may allow tells which, and how many are needed:
    // each run takes its own fewest passes, so the fewest total over the
    // layouts is the least max_passes that works.
    let mut best: Option<(u32, &Layout, RunPasses)> = None;
    let mut retry_error = None;
    for layout in &candidates {
        match lay_out(&chooser, layout, start_mm, finish_mm, PASSES_ALLOWED) {
            Ok(runs) => {
                let n: u32 = runs.iter().map(|r| r.1.len() as u32).sum();
                if best.as_ref().is_none_or(|b| n < b.0) {
                    best = Some((n, layout, runs));
                }
            }
            Err(e @ DesignError::RunLimits { .. }) | Err(e @ DesignError::RatioLimit { .. }) => {
                retry_error.get_or_insert(e);
            }
            Err(e) => return Err(e),
        }
    }
    Err(match best {
        Some((n, layout, runs)) => too_few_passes(&chooser, layout, &runs, n, max_passes),
        None => retry_error.unwrap_or(first_error),
    })
}

/// The first layout, in the order given, whose every run can be drawn within
/// `max_passes` passes in all.
fn search<'l, 'f>(
    chooser: &Chooser<'f>,
    candidates: &'l [Layout],
    start_mm: f64,
    finish_mm: f64,
    max_passes: u32,
) -> Result<(&'l Layout, RunPasses<'f>), DesignError> {
    let mut first_error = None;
    for layout in candidates {
        match lay_out(chooser, layout, start_mm, finish_mm, max_passes) {
            Ok(runs) => return Ok((layout, runs)),
            // Another window strain helps only when the passes are too light
            // or too heavy for the run; any other error ends the search.
            Err(e @ DesignError::RunLimits { .. }) | Err(e @ DesignError::RatioLimit { .. }) => {
                first_error.get_or_insert(e);
            }
            Err(e) => return Err(e),
        }
    }
    Err(first_error.unwrap_or_else(|| DesignError::Input {
        key: "target".into(),
        why: "no layout of runs and anneals could be made for this target".into(),
    }))
}

/// The error when the design needs `needed` passes, more than `max_passes`:
/// the passes run by run, the anneals between, and what sets each count.
fn too_few_passes(
    chooser: &Chooser,
    layout: &Layout,
    runs: &RunPasses,
    needed: u32,
    max_passes: u32,
) -> DesignError {
    let drawn: Vec<&(Run, Vec<PassPick>)> = runs.iter().filter(|r| !r.1.is_empty()).collect();
    let counts = drawn
        .iter()
        .map(|r| r.1.len().to_string())
        .collect::<Vec<_>>()
        .join(" + ");
    // One anneal between runs (a run of no strain stands for an anneal
    // before the first pass), and one after the last when the window asks.
    let anneals = runs.len() - 1 + usize::from(layout.final_anneal);
    let reasons: Vec<&str> = layout
        .anneal_reasons
        .iter()
        .take(anneals)
        .map(|r| r.name())
        .collect();
    let split = match anneals {
        0 => format!("{counts} in one run, no anneal"),
        1 => format!("{counts} around the {} anneal", reasons.join("")),
        k => format!("{counts} around {k} anneals: {}", reasons.join(", ")),
    };
    let set_by = drawn
        .iter()
        .map(|(run, passes)| chooser.count_set_by(run, passes.len()))
        .collect::<Vec<_>>()
        .join("; ");
    DesignError::TooFewPasses {
        max_passes,
        passes_needed: needed,
        split,
        set_by,
    }
}

type RunPasses<'a> = Vec<(Run<'a>, Vec<PassPick>)>;

/// Designs every run of `layout`: (from, to, start strain, passes) for each.
fn lay_out<'f>(
    chooser: &Chooser<'f>,
    layout: &Layout,
    start_mm: f64,
    finish_mm: f64,
    max_passes: u32,
) -> Result<RunPasses<'f>, DesignError> {
    let file = chooser.ctx.file;
    let strains = &layout.run_strains;
    // Boundaries from the finish back (the last boundary is the finish exactly).
    let mut ends = vec![0.0; strains.len()];
    let mut d = finish_mm;
    for i in (0..strains.len()).rev() {
        ends[i] = d;
        d *= (0.5 * strains[i]).exp();
    }
    let mut runs = Vec::new();
    let mut from = start_mm;
    for (i, s) in strains.iter().enumerate() {
        // The first run's start is the start diameter exactly.
        let to = if i + 1 == strains.len() {
            finish_mm
        } else {
            ends[i]
        };
        let law = if i == 0 {
            &file.material.flow
        } else {
            file.annealed_law()
        };
        let e0 = if i == 0 { file.start.strain } else { 0.0 };
        runs.push(Run {
            index: i + 1,
            law,
            strain0: e0,
            from_mm: from,
            to_mm: if *s > 0.0 { to } else { from },
        });
        from = if *s > 0.0 { to } else { from };
    }
    // Passes the ratio limit needs in each run: each run leaves the later ones theirs.
    let mut need = Vec::with_capacity(runs.len());
    for r in &runs {
        need.push(if r.to_mm < r.from_mm {
            chooser.passes_for_ratio(r)?
        } else {
            0
        });
    }
    let mut used = 0u32;
    let mut out = Vec::new();
    for (i, r) in runs.iter().enumerate() {
        if r.to_mm >= r.from_mm {
            out.push((*r, Vec::new()));
            continue;
        }
        let later: u32 = need[i + 1..].iter().sum();
        let cap = max_passes.saturating_sub(used).saturating_sub(later);
        let passes = chooser.design_run(r, need[i], cap)?;
        used += passes.len() as u32;
        out.push((*r, passes));
    }
    Ok(out)
}

#[allow(clippy::too_many_arguments)]
fn finish(
    file: &ScheduleFile,
    target: &Target,
    options: &DesignOptions,
    chooser: &Chooser,
    layout: &Layout,
    runs: RunPasses,
    max_passes: u32,
    angles: &[f64],
) -> Result<Design, DesignError> {
    let mut steps = Vec::new();
    let mut anneals = Vec::new();
    let mut run_plans = Vec::new();
    let mut all: Vec<PassPick> = Vec::new();
    let n_runs = runs.len();
    let last_draw = runs.iter().rposition(|r| !r.1.is_empty());
    for (i, (run, passes)) in runs.into_iter().enumerate() {
        let (from, to, e0) = (run.from_mm, run.to_mm, run.strain0);
        if !passes.is_empty() {
            let lo = passes.iter().map(|p| p.ratio).fold(f64::INFINITY, f64::min);
            let hi = passes.iter().map(|p| p.ratio).fold(0.0, f64::max);
            run_plans.push(RunPlan {
                run: run_plans.len() + 1,
                from_diameter_mm: from,
                to_diameter_mm: to,
                strain: pass::true_strain(from, to),
                strain_after: e0 + pass::true_strain(from, to),
                passes: passes.len(),
                draw_ratio_min: lo,
                draw_ratio_max: hi,
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
            steps.push(Step::Draw(DrawStep {
                exit,
                die: DieOverrides {
                    semi_angle_deg: chooser.ctx.from_stock.then_some(p.semi_angle_deg),
                    ..DieOverrides::default()
                },
                back_tension_mpa: None,
            }));
        }
        all.extend(passes.iter().copied());
        let anneal_after = i + 1 < n_runs || layout.final_anneal;
        if anneal_after {
            let reason = layout.anneal_reasons[i.min(layout.anneal_reasons.len() - 1)];
            let strain_before = e0 + pass::true_strain(from, to);
            steps.push(Step::Anneal);
            let why = match reason {
                AnnealReason::ColdWork => format!(
                    "cold-work limit {}: the run to {to:.4} mm reaches strain {strain_before:.4}; the remaining reduction would pass the limit",
                    file.material.cold_work_limit.unwrap_or(f64::INFINITY)
                ),
                AnnealReason::Temper => {
                    let w = target.strength_mpa.unwrap_or(Window { min: 0.0, max: 0.0 });
                    let rest = pass::true_strain(to, chooser.ctx.finish_mm);
                    format!(
                        "temper window {}-{} MPa: the remaining strain {rest:.4} from {to:.4} mm to the finish gives {:.1} MPa",
                        w.min,
                        w.max,
                        file.annealed_law().stress_mpa(rest)
                    )
                }
            };
            anneals.push(AnnealPlan {
                step: steps.len(),
                diameter_mm: to,
                strain_before,
                reason,
                why,
            });
        }
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
    let mut notes = Vec::new();
    if target.max_passes.is_none() {
        notes.push(format!(
            "at most {DEFAULT_MAX_PASSES} passes (the default; set target.max_passes)"
        ));
    }
    if target.strategy == Strategy::Tapered && target.taper.is_none() {
        notes.push(format!(
            "taper {DEFAULT_TAPER} (the default; set target.taper)"
        ));
    }
    if !anneals.is_empty() && file.material.annealed_flow.is_none() {
        notes.push(
            "after an anneal the stock follows material.flow again (no annealed_flow given)".into(),
        );
    }
    if file.limits.wire_temperature_max_c.is_some()
        || file
            .line
            .as_ref()
            .is_some_and(|l| l.block_power_kw.is_some())
    {
        notes.push("every pass is also held to the wire-temperature and block-power limits that check applies".into());
    }
    if let (Some(w), Some(aim)) = (target.strength_mpa, layout.aim_mpa) {
        let mid = 0.5 * (w.min + w.max);
        if (aim - mid).abs() > 1e-6 * mid {
            notes.push(format!(
                "aimed at {aim:.1} MPa rather than the window's middle ({mid:.1} MPa): fewer anneals, or passes within the limits, need it"
            ));
        }
    }
    let last_row = report.passes.last();
    let finished = last_row.map_or(0.0, |r| r.flow_stress_exit_mpa);
    let summary = DesignSummary {
        strategy: target.strategy,
        taper: (target.strategy == Strategy::Tapered).then_some(chooser.taper),
        method: chooser.ctx.method,
        draw_passes: all.len(),
        max_passes,
        start_diameter_mm: file.start.diameter.mm(),
        finish_diameter_mm: chooser.ctx.finish_mm,
        die_angles_deg: angles.to_vec(),
        strength_window_mpa: target.strength_mpa,
        aimed_flow_stress_mpa: layout.aim_mpa,
        finished_flow_stress_mpa: finished,
        run_draw_ratio_spread: run_plans
            .iter()
            .map(|r| (r.draw_ratio_max - r.draw_ratio_min) / r.draw_ratio_max)
            .fold(0.0, f64::max),
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
    fn cold_work_runs_share_the_strain() {
        // Water level: every run ends at the same accumulated strain S with
        // (S - e0) + k S = total (arithmetic, no source needed).
        let v = cold_work_runs(5.0, 0.5, Some(2.0)).unwrap();
        assert_eq!(v.len(), 3);
        let s = v[1];
        assert!((v[0] + 0.5 - s).abs() < 1e-12);
        assert!((v.iter().sum::<f64>() - 5.0).abs() < 1e-12);
        assert!(s <= 2.0);
        assert_eq!(cold_work_runs(1.0, 0.0, None).unwrap(), vec![1.0]);
        assert_eq!(cold_work_runs(1.0, 0.0, Some(2.0)).unwrap(), vec![1.0]);
    }

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
            solve_increasing(|x| Ok(x * x * x - 2.0), 0.0, 2.0, -2.0, 6.0, 1e-14, "test").unwrap();
        assert!((r - 2f64.cbrt()).abs() < 1e-12);
    }
}
