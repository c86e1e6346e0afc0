//! Evaluating a schedule pass by pass: strain accumulation, flow stress,
//! drawing stress, limits, anneals, speeds, power and throughput.
//!
//! [`evaluate`] is a pipeline of five stages, each in a file named for it:
//! `geometry` (sizes, dies and strain), `mechanics` (each pass by every
//! method), `line` (speeds, power, temperatures), `flags` (each pass against
//! the limits) and `summary` (totals and the verdict).
//!
//! Speeds follow volume constancy on a continuous line, `v_i A_i = v_f A_f`
//! (common practice), from the finish speed through every pass; mass
//! throughput is `rho A_f v_f`. The wire is taken to enter every die at the
//! ambient temperature (cooled on the capstan between dies), so its exit
//! temperature is ambient plus the pass's mean adiabatic rise.

use serde::Serialize;

mod flags;
mod geometry;
mod line;
mod mechanics;
mod summary;

use crate::flow::FlowLaw;
use crate::pass::{self, DrawStresses, Method, Settings};
use crate::schedule::{self, ScheduleError, ScheduleFile, Step};

use flags::FlagLimits;
use geometry::{Planned, PlannedDraw};
use line::LineFigures;
use mechanics::{Heat, PassFigures};

/// The caution every report carries.
pub const CAUTION: &str = "Planning estimates only: confirm every figure by trial. Wire under tension whips when it breaks and running capstans trap hands; the machine maker's limits, local codes and licensed practice govern.";

/// Accumulated strain past which the finished flow stress is taken as close to
/// the wire's tensile strength (common practice; a judgement, not a law).
pub const HEAVILY_DRAWN_STRAIN: f64 = 1.0;

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
    /// Back tension at or above the entry flow stress: the wire would yield
    /// before it reaches the die.
    BackTensionOverYield,
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
    /// Fractional area reduction of the pass.
    pub area_reduction: Option<f64>,
    /// Elongation `A0/A1`.
    pub elongation: Option<f64>,
    /// Fractional area reduction since the last anneal (or the start).
    pub cumulative_reduction: f64,
    /// Pass true strain.
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
    /// Governing drawing stress over exit flow stress.
    pub draw_ratio: Option<f64>,
    /// Semi-angle that minimises the governing drawing stress, degrees.
    pub optimum_semi_angle_deg: Option<f64>,
    /// Drawing force, kN.
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
    /// Mean wire temperature at the die exit, deg C.
    pub wire_temperature_c: Option<f64>,
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
    /// Mass throughput, kg/h (with a `line`).
    pub throughput_kg_h: Option<f64>,
    /// Tonnes per shift at the utilisation (with a `line`).
    pub throughput_t_per_shift: Option<f64>,
    /// Minutes to draw one coil (with `coil_mass_kg`).
    pub coil_time_min: Option<f64>,
    /// Sum of the capstans' net pulling power, kW (with a `line`).
    pub total_power_kw: Option<f64>,
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
    /// The limits applied.
    pub draw_ratio_warn: f64,
    /// The limits applied.
    pub draw_ratio_max: f64,
    /// Assumptions and defaults that matter to the figures.
    pub notes: Vec<String>,
    /// One row per step.
    pub passes: Vec<StepReport>,
    /// The summary.
    pub summary: Summary,
    /// The caution footer.
    pub caution: String,
}

impl ScheduleReport {
    /// Whether any step is over a limit (exit status 3).
    pub fn is_over(&self) -> bool {
        self.summary.verdict == Verdict::Over
    }
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

/// Evaluates every step of `file` (see the module documentation for the
/// assumptions): a pipeline of the five stages, each in its own file.
pub fn evaluate(
    file: &ScheduleFile,
    options: &EvaluateOptions,
) -> Result<ScheduleReport, ScheduleError> {
    refuse_without_draws(file)?;
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
    let flag_limits = FlagLimits {
        angle_tolerance_deg: limits
            .angle_tolerance_deg
            .unwrap_or(schedule::DEFAULT_ANGLE_TOLERANCE_DEG),
    };
    let finish_d = geometry::finish_diameter_mm(file);

    // 1. Geometry and strain.
    let planned = geometry::plan_steps(file, method == Method::Efficiency)?;
    // 2. Mechanics per pass.
    let figures = planned
        .iter()
        .map(|p| match p {
            Planned::Draw(d) => mechanics::analyse(d, &settings, method, heat).map(Some),
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
                "shear factor m derived from friction as min(1, sqrt(3) mu) = {:.3} (set dies.friction_factor to give it)",
                f.mech.friction_factor
            ));
        }
    }
    // 3. Line (and machine).
    let line = file.line.as_ref();
    let line_figures = line::run_line(&planned, &figures, line, finish_d, ambient);
    // 4. Flags.
    let rows = build_rows(file, flag_limits, &planned, &figures, &line_figures);
    if let Some(limit) = file.material.cold_work_limit {
        if let Some(r) = rows.iter().find(|r| r.flags.contains(&Flag::AnnealDue)) {
            notes.push(format!(
                "cold-work limit {limit} is passed at step {}: schedule an anneal before it",
                r.step
            ));
        }
    }
    // 5. Summary.
    notes.extend(closing_notes(&rows, ambient, line.is_some()));
    let total_power = line.map(|_| rows.iter().filter_map(|r| r.power_kw).sum());
    let summary = summary::summarise(file, &rows, finish_d, total_power);
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
        caution: CAUTION.to_string(),
    })
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

/// One report row per step, with its flags.
fn build_rows(
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

fn draw_row(d: &PlannedDraw<'_>, f: &PassFigures, l: &LineFigures, flags: Vec<Flag>) -> StepReport {
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
        flags,
    }
}

fn anneal_row(index: usize, diameter_mm: f64, strain_before: f64, law: &FlowLaw) -> StepReport {
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
        flags: Vec::new(),
    }
}

/// The notes every report ends with: the finished strength, the temperature
/// model and the speed model.
fn closing_notes(rows: &[StepReport], ambient: f64, has_line: bool) -> Vec<String> {
    let mut notes = Vec::new();
    if let Some(last) = rows.last() {
        // Common practice: heavily drawn wire has almost no uniform elongation
        // left, so its tensile strength is close to its flow stress; a lightly
        // drawn or annealed wire still work-hardens in the test (Considere).
        notes.push(if last.strain_after >= HEAVILY_DRAWN_STRAIN {
            format!(
                "finished flow stress {:.0} MPa: for wire drawn this far (strain {:.2} since anneal) the tensile strength is close to it",
                last.flow_stress_exit_mpa, last.strain_after
            )
        } else {
            format!(
                "finished flow stress {:.0} MPa: the wire is lightly drawn (strain {:.2} since anneal), so its tensile strength is higher than this (Considere)",
                last.flow_stress_exit_mpa, last.strain_after
            )
        });
    }
    notes.push(format!(
        "wire temperature: the wire enters every die at ambient ({ambient} C), cooled between dies; the figure is the bulk mean at the die exit (the surface runs hotter)"
    ));
    if has_line {
        notes.push("speeds by volume constancy from the finish speed through every pass (one continuous line)".into());
        notes.push("power: each capstan's net pull (its front pull less the back pull it holds on the next die) times its speed; the total counts each back pull once".into());
    }
    notes
}

fn method_uses_m(method: Method) -> bool {
    matches!(method, Method::UpperBound | Method::Max)
}
