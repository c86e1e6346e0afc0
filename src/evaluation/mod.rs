//! Evaluating a schedule pass by pass: strain accumulation, flow stress,
//! drawing stress, limits, anneals, speeds, power and throughput.
//!
//! [`evaluate`] is a pipeline of stages, each in a file named for it:
//! `geometry` (sizes, dies and strain), `mechanics` (each pass by every
//! method, with `strength`: Considere and the entry yield), `line` (speeds,
//! net power, temperatures, and the machine run of [`crate::machine`]),
//! `flags` and `rows` (each pass against the limits), `summary` (totals and
//! the verdict) and `notes` (what the report says in words).
//!
//! Speeds follow volume constancy on a continuous line, `v_i A_i = v_f A_f`
//! (common practice), from the finish speed through every pass; mass
//! throughput is `rho A_f v_f`. Without a machine the wire is taken to enter
//! every die at the ambient temperature (cooled on the capstan between
//! dies), so its exit temperature is ambient plus the pass's mean adiabatic
//! rise; the no-cooling upper bound sums the rises. On a machine the
//! temperature is carried die to die through its cooling.

use serde::Serialize;

mod flags;
mod geometry;
mod line;
mod mechanics;
mod notes;
mod rows;
pub mod strength;
mod summary;

use crate::flow::FlowLaw;
use crate::machine::{Machine, MachineKind, MachineRun, SpeedLimit};
use crate::pass::{self, DrawStresses, Method, Settings};
use crate::schedule::{self, ScheduleError, ScheduleFile, Step};

use flags::FlagLimits;
use geometry::Planned;
use mechanics::Heat;

/// The caution every report carries.
pub const CAUTION: &str = "Planning estimates only: confirm every figure by trial. Wire under tension whips when it breaks and running capstans trap hands; the machine maker's limits, local codes and licensed practice govern.";

/// Per-pass area reduction above which a multi-die wire pass is flagged
/// `heavy-reduction`: fine and medium wire takes 15 to 25 % a pass and
/// larger sizes 20 to 45 % (Kalpakjian & Schmid, Manufacturing Engineering
/// and Technology, ch. on drawing; from memory), so 30 % is the common
/// ceiling on a multi-die machine.
pub const REDUCTION_WARN_WIRE: f64 = 0.30;
/// The same for a single draft on a single-block machine (bar, rod): the
/// top of the 20 to 45 % range above.
pub const REDUCTION_WARN_SINGLE_DRAFT: f64 = 0.45;

/// A flag raised on a pass. Names are plain words, the same in every format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Flag {
    /// Draw ratio above `draw_ratio_warn`.
    NearDrawLimit,
    /// Draw ratio above `draw_ratio_max`: the wire may break at the die exit.
    OverDrawLimit,
    /// Accumulated strain past `cold_work_limit` with no anneal before this pass.
    AnnealDue,
    /// Delta above `delta_max`: centreline tension, void growth, central bursts.
    CentralBurstRisk,
    /// Wire temperature at the die exit above `wire_temperature_max_c`.
    TooHot,
    /// Pulling power above `block_power_kw`.
    OverBlockPower,
    /// Semi-angle more than `angle_tolerance_deg` from the optimum.
    AngleOffOptimum,
    /// Back tension at or above the entry yield: the wire would yield
    /// before it reaches the die.
    BackTensionOverYield,
    /// Area reduction of the pass above `reduction_warn` (common practice).
    HeavyReduction,
    /// The pass takes the wire past the strain its flow law was fitted over.
    PastLawRange,
    /// Capstan surface speed above the block's highest.
    OverCapstanSpeed,
    /// Capstan slower than the wire on it: it does not pull, and the next
    /// capstan draws through two dies (a common cause of breaks).
    NegativeSlip,
    /// Slip above the machine's `slip_max`: capstan and wire wear.
    SlipOverLimit,
}

impl Flag {
    /// The flag's name as written in every format (`over-draw-limit`).
    pub fn name(self) -> &'static str {
        match self {
            Flag::NearDrawLimit => "near-draw-limit",
            Flag::OverDrawLimit => "over-draw-limit",
            Flag::AnnealDue => "anneal-due",
            Flag::CentralBurstRisk => "central-burst-risk",
            Flag::TooHot => "too-hot",
            Flag::OverBlockPower => "over-block-power",
            Flag::AngleOffOptimum => "angle-off-optimum",
            Flag::BackTensionOverYield => "back-tension-over-yield",
            Flag::HeavyReduction => "heavy-reduction",
            Flag::PastLawRange => "past-law-range",
            Flag::OverCapstanSpeed => "over-capstan-speed",
            Flag::NegativeSlip => "negative-slip",
            Flag::SlipOverLimit => "slip-over-limit",
        }
    }

    /// Whether the flag puts the schedule over its limits (exit status 3)
    /// rather than only warning.
    pub fn is_over(self) -> bool {
        matches!(
            self,
            Flag::OverDrawLimit
                | Flag::AnnealDue
                | Flag::TooHot
                | Flag::OverBlockPower
                | Flag::BackTensionOverYield
                | Flag::OverCapstanSpeed
                | Flag::NegativeSlip
        )
    }
}

/// The schedule's overall verdict.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Verdict {
    /// Every pass within every limit and no warning.
    Ok,
    /// Within the limits, with warnings.
    Warn,
    /// At least one pass over a limit, or an anneal due and not scheduled.
    Over,
}

/// Kind of step.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum StepKind {
    /// A draw through one die.
    Draw,
    /// An anneal.
    Anneal,
}

/// One row of the report. Anneal rows carry only the sizes and strains.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StepReport {
    /// Step number, from 1.
    pub step: usize,
    /// `draw` or `anneal`.
    pub kind: StepKind,
    /// Die size as written in the file (`"AWG 10"`), when written as text.
    pub die_size: Option<String>,
    /// Entry diameter, mm.
    pub entry_diameter_mm: f64,
    /// Exit diameter, mm.
    pub exit_diameter_mm: f64,
    /// Fractional area reduction of the pass, `1 - (D1/D0)^2`.
    pub area_reduction: Option<f64>,
    /// Elongation `A0/A1`.
    pub elongation: Option<f64>,
    /// Fractional area reduction since the last anneal (or the start),
    /// `1 - (D1/D_anneal)^2`.
    pub cumulative_reduction: f64,
    /// Pass true strain, `2 ln(D0/D1)`.
    pub pass_strain: Option<f64>,
    /// Accumulated strain since the last anneal, before the step.
    pub strain_before: f64,
    /// Accumulated strain after the step (0 after an anneal).
    pub strain_after: f64,
    /// Flow stress at entry, MPa.
    pub flow_stress_entry_mpa: Option<f64>,
    /// Mean flow stress over the pass, MPa.
    pub mean_flow_stress_mpa: Option<f64>,
    /// Flow stress at exit, MPa (after an anneal: the annealed yield).
    pub flow_stress_exit_mpa: f64,
    /// Deformation-zone shape Delta.
    pub delta: Option<f64>,
    /// Die semi-angle, degrees.
    pub semi_angle_deg: Option<f64>,
    /// Coulomb friction mu.
    pub friction: Option<f64>,
    /// Shear factor m used by the upper bound.
    pub friction_factor: Option<f64>,
    /// Back tension, MPa.
    pub back_tension_mpa: Option<f64>,
    /// Drawing stress by every method, MPa.
    pub draw_stress_mpa: Option<DrawStresses>,
    /// Drawing stress by the governing method, MPa.
    pub governing_draw_stress_mpa: Option<f64>,
    /// Governing drawing stress over exit flow stress, `sigma_d / sigma_f(eps_b)`
    /// (the draw limit is 1; docs/physics.md, "Draw limit").
    pub draw_ratio: Option<f64>,
    /// Semi-angle that minimises the governing drawing stress, degrees.
    pub optimum_semi_angle_deg: Option<f64>,
    /// Drawing force `F = sigma_d A1`, kN.
    pub force_kn: Option<f64>,
    /// Exit speed, m/s (with a `line`).
    pub exit_speed_m_s: Option<f64>,
    /// Net pull of the capstan after this die, kN: the front pull
    /// (`force_kn`) less the back pull it holds on the next die.
    pub net_pull_kn: Option<f64>,
    /// Net pulling power of the capstan after this die, kW (with a `line`):
    /// `net_pull_kn x exit_speed_m_s`, so a back pull is counted once.
    pub power_kw: Option<f64>,
    /// Mean adiabatic temperature rise, deg C.
    pub temperature_rise_c: Option<f64>,
    /// Mean wire temperature at the die exit, deg C (on a machine: carried
    /// from die to die through its cooling).
    pub wire_temperature_c: Option<f64>,
    /// Mean wire temperature at the die entry, deg C.
    pub wire_temperature_entry_c: Option<f64>,
    /// Upper bound of the exit temperature with no cooling at all, deg C:
    /// ambient plus the rises of every die since the last anneal.
    pub wire_temperature_no_cooling_c: Option<f64>,
    /// Yield the back tension is held against, MPa (the entry flow stress,
    /// or the offset yield of annealed stock).
    pub entry_yield_mpa: Option<f64>,
    /// Tensile strength of the wire after the step, MPa (Considere).
    pub tensile_strength_mpa: Option<f64>,
    /// The machine block the die is on.
    pub block: Option<usize>,
    /// Flags raised on this step.
    pub flags: Vec<Flag>,
}

/// The whole-schedule summary.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    /// Start diameter, mm.
    pub start_diameter_mm: f64,
    /// Finished diameter, mm.
    pub finish_diameter_mm: f64,
    /// Area reduction from start to finish.
    pub total_area_reduction: f64,
    /// True strain from start to finish, `2 ln(D_start/D_finish)`.
    pub total_strain: f64,
    /// Accumulated strain in the finished wire since its last anneal.
    pub final_strain: f64,
    /// Number of draw passes.
    pub draw_passes: usize,
    /// Number of anneals.
    pub anneals: usize,
    /// Highest draw ratio.
    pub worst_draw_ratio: Option<f64>,
    /// Step with the highest draw ratio.
    pub worst_step: Option<usize>,
    /// Flow stress of the finished wire, MPa (for heavily drawn wire, close to its tensile strength).
    pub final_flow_stress_mpa: f64,
    /// Mass throughput `rho A_finish v_finish`, kg/h (with a `line`).
    pub throughput_kg_h: Option<f64>,
    /// Tonnes per shift at the utilisation (with a `line`).
    pub throughput_t_per_shift: Option<f64>,
    /// Minutes to draw one coil (with `coil_mass_kg`).
    pub coil_time_min: Option<f64>,
    /// Sum of the capstans' net pulling power, kW (with a `line` or a machine).
    pub total_power_kw: Option<f64>,
    /// Tensile strength of the finished wire, MPa (Considere).
    pub tensile_strength_mpa: Option<f64>,
    /// Considere strain of the finishing law (where `d sigma/d eps = sigma`).
    pub considere_strain: Option<f64>,
    /// Highest finish speed the machine allows, m/s (with a machine).
    pub attainable_speed_m_s: Option<f64>,
    /// The block that limits the speed (with a machine).
    pub binding_block: Option<usize>,
    /// The limit that binds: `motor-rating`, `capstan-speed` or `wire-temperature`.
    pub binding_limit: Option<SpeedLimit>,
    /// Tonnes per shift at the attainable speed (with a machine).
    pub attainable_t_per_shift: Option<f64>,
    /// `ok`, `warn` or `over`.
    pub verdict: Verdict,
}

/// A neutral report that every format renders.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ScheduleReport {
    /// The file's title.
    pub title: String,
    /// The material's label.
    pub material: String,
    /// The governing method.
    pub method: Method,
    /// Where the method came from: `file`, `default` or `command line`.
    pub method_source: String,
    /// Draw ratio above which a pass is flagged `near-draw-limit`.
    pub draw_ratio_warn: f64,
    /// Draw ratio above which a pass is flagged `over-draw-limit`.
    pub draw_ratio_max: f64,
    /// Assumptions and defaults that matter to the figures.
    pub notes: Vec<String>,
    /// One row per step.
    pub passes: Vec<StepReport>,
    /// The summary.
    pub summary: Summary,
    /// The run on the machine, block by block (with a machine).
    pub machine: Option<MachineRun>,
    /// The law against the mill's measured strengths of drawn wire.
    pub strength_checks: Vec<StrengthCheck>,
    /// The caution footer.
    pub caution: String,
}

impl ScheduleReport {
    /// Whether any step is over a limit (exit status 3).
    pub fn is_over(&self) -> bool {
        self.summary.verdict == Verdict::Over
    }
}

/// A measured strength of drawn wire against the law's estimate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StrengthCheck {
    /// Accumulated true strain of the point.
    pub strain: f64,
    /// Measured tensile strength, MPa.
    pub measured_mpa: f64,
    /// The law's tensile strength there (Considere), MPa.
    pub predicted_mpa: f64,
    /// `(predicted - measured) / measured`.
    pub difference: f64,
}

/// Where the governing method is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct EvaluateOptions {
    /// A method that overrides the file's `limits.method`.
    pub method: Option<Method>,
}

/// The path of a step's key as the file has it, with the step number the
/// report shows (`passes[1].exit (step 2)`): YAML counts from 0, the mill from 1.
pub(crate) fn step_key(i: usize, key: &str) -> String {
    format!("passes[{i}]{key} (step {})", i + 1)
}

pub(crate) fn pass_error(i: usize, source: pass::PassError) -> ScheduleError {
    ScheduleError::Pass {
        key: step_key(i, ""),
        problem: source,
    }
}

/// Evaluates every step of `file` on its line alone (see the module
/// documentation for the assumptions).
pub fn evaluate(
    file: &ScheduleFile,
    options: &EvaluateOptions,
) -> Result<ScheduleReport, ScheduleError> {
    evaluate_on(file, options, None)
}

/// Evaluates every step of `file`, on `machine` when one is given: a
/// pipeline of the five stages, each in its own file.
pub fn evaluate_on(
    file: &ScheduleFile,
    options: &EvaluateOptions,
    machine: Option<&Machine>,
) -> Result<ScheduleReport, ScheduleError> {
    refuse_without_draws(file)?;
    if let Some(m) = machine {
        refuse_anneal_inside_run(file)?;
        let draws = file
            .passes
            .iter()
            .filter(|s| matches!(s, Step::Draw(_)))
            .count();
        m.check_fit(draws)?;
    }
    let (method, method_source) = governing_method(file, options);
    let mut notes = Vec::new();
    if method_source == "default" {
        notes.push(format!(
            "governing method: {method} (the default; set limits.method to choose)"
        ));
    }
    let limits = &file.limits;
    let settings = Settings {
        redundant_c: limits
            .redundant_c
            .unwrap_or(Settings::default().redundant_c),
    };
    let ambient = limits.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C);
    let heat = Heat {
        density_kg_m3: file.material.density_kg_m3,
        specific_heat_j_kg_k: file.material.specific_heat_j_kg_k,
        heat_fraction: file
            .material
            .heat_fraction
            .unwrap_or(schedule::DEFAULT_HEAT_FRACTION),
    };
    let temperature_max_c = match (
        limits.wire_temperature_max_c,
        machine.and_then(|m| m.wire_temperature_max_c),
    ) {
        (Some(a), Some(b)) => Some(a.min(b)),
        (a, b) => a.or(b),
    };
    let flag_limits = FlagLimits {
        angle_tolerance_deg: limits
            .angle_tolerance_deg
            .unwrap_or(schedule::DEFAULT_ANGLE_TOLERANCE_DEG),
        reduction_warn: limits.reduction_warn.unwrap_or(
            if machine.is_some_and(|m| m.kind == MachineKind::SingleBlock) {
                REDUCTION_WARN_SINGLE_DRAFT
            } else {
                REDUCTION_WARN_WIRE
            },
        ),
        temperature_max_c,
        slip_max: machine.map(|m| m.slip_limit()),
        block_power_kw: if machine.is_some() {
            None
        } else {
            file.line.as_ref().and_then(|l| l.block_power_kw)
        },
    };
    let finish_d = geometry::finish_diameter_mm(file);
    // Without an annealed law the stock anneals back onto the same law: one
    // Considere solve serves both (it is a few hundred flow stresses).
    let flow_eps_u = strength::considere_strain(&file.material.flow);
    let considere = Considere {
        flow: flow_eps_u,
        annealed: match &file.material.annealed_flow {
            Some(law) => strength::considere_strain(law),
            None => flow_eps_u,
        },
    };

    // 1. Geometry and strain.
    let dancers: Vec<Option<f64>> = machine
        .map(|m| m.blocks.iter().map(|b| b.dancer_back_tension_mpa).collect())
        .unwrap_or_default();
    let planned = geometry::plan_steps(file, method == Method::Efficiency, &dancers)?;
    // 2. Mechanics per pass.
    let figures = planned
        .iter()
        .map(|p| match p {
            Planned::Draw(d) => {
                let eps_u = considere.of(file, d.law);
                mechanics::analyse(d, &settings, method, heat, file.material.yield_mpa, eps_u)
                    .map(Some)
            }
            Planned::Anneal { .. } => Ok(None),
        })
        .collect::<Result<Vec<_>, _>>()?;
    if method_uses_m(method) {
        if let Some(f) = figures
            .iter()
            .flatten()
            .find(|f| f.mech.friction_factor_derived)
        {
            notes.push(format!(
                "shear factor m derived from friction as {} = {:.3} (set dies.friction_factor to give it)",
                crate::pass::DERIVED_SHEAR_FACTOR_RULE,
                f.mech.friction_factor
            ));
        }
    }
    // 3. Line and machine.
    let line = file.line.as_ref();
    let run = match machine {
        Some(m) => Some(line::run_machine(
            m,
            &planned,
            &figures,
            line.map(|l| l.finish_speed_m_s),
            ambient,
            temperature_max_c,
        )?),
        None => None,
    };
    let speed = line
        .map(|l| l.finish_speed_m_s)
        .or(run.as_ref().map(|r| r.running_speed_m_s));
    let line_figures = line::run_line(&planned, &figures, speed, finish_d, ambient, run.as_ref());
    // 4. Flags.
    let rows = rows::build_rows(file, flag_limits, &planned, &figures, &line_figures);
    notes.extend(notes::flag_notes(file, &rows, &flag_limits));
    // 5. Summary.
    notes.extend(notes::closing_notes(
        &rows,
        ambient,
        line.is_some() || run.is_some(),
        considere.of(file, last_law(&planned)),
        run.as_ref(),
    ));
    if let Some(r) = &run {
        notes.extend(notes::machine_notes(r, line.map(|l| l.finish_speed_m_s)));
        if line.is_some_and(|l| l.block_power_kw.is_some()) {
            notes.push(
                "line.block_power_kw is not used on a machine: each block's motor_kw applies"
                    .into(),
            );
        }
    }
    let total_power = speed.map(|_| rows.iter().filter_map(|r| r.power_kw).sum());
    let mut summary = summary::summarise(file, &rows, finish_d, total_power);
    summary.considere_strain = considere.of(file, last_law(&planned));
    if let Some(r) = &run {
        summary.attainable_speed_m_s = r.attainable_speed_m_s;
        summary.binding_block = Some(r.binding_block);
        summary.binding_limit = Some(r.binding_limit);
        summary.attainable_t_per_shift = r.attainable_speed_m_s.map(|v| {
            summary::tonnes_per_shift(
                line,
                summary::throughput_kg_h(file.material.density_kg_m3, finish_d, v),
            )
        });
    }
    let strength_checks = notes::strength_checks(file, &considere);
    if let Some(worst) = strength_checks
        .iter()
        .max_by(|a, b| a.difference.abs().total_cmp(&b.difference.abs()))
    {
        notes.push(format!(
            "law against the mill's measured strengths: {} points, farthest at strain {:.3}: law {:.0} MPa vs measured {:.0} MPa ({:+.1} %)",
            strength_checks.len(),
            worst.strain,
            worst.predicted_mpa,
            worst.measured_mpa,
            100.0 * worst.difference
        ));
    }
    Ok(ScheduleReport {
        title: file.title.clone(),
        material: file.material.label.clone(),
        method,
        method_source: method_source.to_string(),
        draw_ratio_warn: limits.draw_ratio_warn,
        draw_ratio_max: limits.draw_ratio_max,
        notes,
        passes: rows,
        summary,
        machine: run,
        strength_checks,
        caution: CAUTION.to_string(),
    })
}

/// The Considere strains of the file's two laws.
#[derive(Debug, Clone, Copy)]
struct Considere {
    flow: Option<f64>,
    annealed: Option<f64>,
}

impl Considere {
    fn of(&self, file: &ScheduleFile, law: &FlowLaw) -> Option<f64> {
        if std::ptr::eq(law, &file.material.flow) {
            self.flow
        } else {
            self.annealed
        }
    }
}

/// The law in force at the end of the schedule.
fn last_law<'a>(planned: &[Planned<'a>]) -> &'a FlowLaw {
    match planned.last().expect("a schedule has steps") {
        Planned::Draw(d) => d.law,
        Planned::Anneal { law, .. } => law,
    }
}

/// A machine draws one continuous run: an anneal may come before the
/// first die or after the last, not between dies.
fn refuse_anneal_inside_run(file: &ScheduleFile) -> Result<(), ScheduleError> {
    let is_draw = |s: &Step| matches!(s, Step::Draw(_));
    let first = file.passes.iter().position(is_draw);
    let last = file.passes.iter().rposition(is_draw);
    if let (Some(a), Some(b)) = (first, last) {
        if let Some(i) = (a..b).find(|&i| matches!(file.passes[i], Step::Anneal)) {
            return Err(ScheduleError::Machine(
                crate::machine::MachineError::DoesNotFit(format!(
                    "{}: a machine draws one continuous run of dies, so an anneal between dies cannot run on it; check each run between anneals on its own",
                    step_key(i, "")
                )),
            ));
        }
    }
    Ok(())
}

/// A schedule needs a draw; a design file given to `check` is named as such.
fn refuse_without_draws(file: &ScheduleFile) -> Result<(), ScheduleError> {
    if file.passes.iter().all(|s| matches!(s, Step::Anneal)) {
        let why = if file.target.is_some() && file.passes.is_empty() {
            "this is a design file (it has `target`): run `coldpass design` on it, or add passes"
                .into()
        } else {
            "a schedule needs at least one draw pass (`- exit: <diameter>`)".into()
        };
        return Err(ScheduleError::Missing {
            key: "passes".into(),
            why,
        });
    }
    Ok(())
}

/// The governing method and where it came from.
fn governing_method(file: &ScheduleFile, options: &EvaluateOptions) -> (Method, &'static str) {
    match (options.method, file.limits.method) {
        (Some(m), _) => (m, "command line"),
        (None, Some(m)) => (m, "file"),
        (None, None) => (schedule::DEFAULT_METHOD, "default"),
    }
}

fn method_uses_m(method: Method) -> bool {
    matches!(method, Method::UpperBound | Method::Max)
}
