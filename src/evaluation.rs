//! Evaluating a schedule pass by pass: strain accumulation, flow stress,
//! drawing stress, limits, anneals, speeds, power and throughput.
//!
//! Speeds follow volume constancy on a continuous line, `v_i A_i = v_f A_f`
//! (common practice), from the finish speed through every pass; mass
//! throughput is `rho A_f v_f`. The wire is taken to enter every die at the
//! ambient temperature (cooled on the capstan between dies), so its exit
//! temperature is ambient plus the pass's mean adiabatic rise.

use serde::Serialize;

use crate::flow::FlowLaw;
use crate::param::ParamError;
use crate::pass::{
    self, analyse_pass, optimum_semi_angle, DrawPass, DrawStresses, Method, Settings,
};
use crate::schedule::{self, ScheduleError, ScheduleFile, Step};

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
    /// Pulling power, kW (with a `line`).
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
    /// Sum of the passes' pulling power, kW (with a `line`).
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
fn step_key(i: usize, key: &str) -> String {
    format!("passes[{i}]{key} (step {})", i + 1)
}

fn pass_error(i: usize, source: pass::PassError) -> ScheduleError {
    ScheduleError::Pass {
        key: step_key(i, ""),
        problem: source,
    }
}

/// Evaluates every step of `file` (see the module documentation for the assumptions).
pub fn evaluate(
    file: &ScheduleFile,
    options: &EvaluateOptions,
) -> Result<ScheduleReport, ScheduleError> {
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
    let (method, method_source) = match (options.method, file.limits.method) {
        (Some(m), _) => (m, "command line"),
        (None, Some(m)) => (m, "file"),
        (None, None) => (schedule::DEFAULT_METHOD, "default"),
    };
    let needs_efficiency = method == Method::Efficiency;
    let limits = &file.limits;
    let settings = Settings {
        redundant_c: limits
            .redundant_c
            .unwrap_or(Settings::default().redundant_c),
    };
    let ambient = limits.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C);
    let heat_fraction = file
        .material
        .heat_fraction
        .unwrap_or(schedule::DEFAULT_HEAT_FRACTION);
    let angle_tolerance = limits
        .angle_tolerance_deg
        .unwrap_or(schedule::DEFAULT_ANGLE_TOLERANCE_DEG);

    let mut notes = Vec::new();
    if method_source == "default" {
        notes.push(format!(
            "governing method: {method} (the default; set limits.method to choose)"
        ));
    }

    let start_d = file.start.diameter.mm();
    let finish_d = file
        .passes
        .iter()
        .rev()
        .find_map(|s| match s {
            Step::Draw(d) => Some(d.exit.mm()),
            Step::Anneal => None,
        })
        .unwrap_or(start_d);
    let line = file.line.as_ref();

    let mut law: &FlowLaw = &file.material.flow;
    let mut strain = file.start.strain;
    let mut d_in = start_d;
    let mut d_since_anneal = start_d;
    let mut rows = Vec::with_capacity(file.passes.len());
    let mut derived_m_noted = false;
    let mut anneal_due_noted = false;

    for (i, step) in file.passes.iter().enumerate() {
        let draw = match step {
            Step::Anneal => {
                law = file.annealed_law();
                rows.push(StepReport {
                    step: i + 1,
                    kind: StepKind::Anneal,
                    die_size: None,
                    entry_diameter_mm: d_in,
                    exit_diameter_mm: d_in,
                    area_reduction: None,
                    elongation: None,
                    cumulative_reduction: 0.0,
                    pass_strain: None,
                    strain_before: strain,
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
                    power_kw: None,
                    temperature_rise_c: None,
                    wire_temperature_c: None,
                    flags: Vec::new(),
                });
                strain = 0.0;
                d_since_anneal = d_in;
                continue;
            }
            Step::Draw(d) => d,
        };
        let exit = &draw.exit;
        let d_out = exit.mm();
        if d_out >= d_in {
            return Err(ScheduleError::Value {
                key: step_key(i, ".exit"),
                problem: ParamError::new(
                    "exit",
                    exit,
                    format!("must be below its entry diameter ({d_in} mm)"),
                ),
            });
        }
        let semi_angle = draw
            .die
            .semi_angle_deg
            .or(file.dies.semi_angle_deg)
            .ok_or_else(|| ScheduleError::Missing {
                key: step_key(i, ".semi_angle_deg"),
                why: "no semi_angle_deg on the pass or under dies".into(),
            })?;
        let die = file
            .die_for(&draw.die, semi_angle)
            .map_err(|e| pass_error(i, e))?;
        if needs_efficiency && die.efficiency.is_none() {
            return Err(ScheduleError::Missing {
                key: "dies.efficiency".into(),
                why: format!("the efficiency method needs it (step {})", i + 1),
            });
        }
        let dp = DrawPass {
            entry_diameter_mm: d_in,
            exit_diameter_mm: d_out,
            strain_before: strain,
            back_tension_mpa: draw.back_tension_mpa.unwrap_or(0.0),
            die,
        };
        let mech = analyse_pass(law, &dp, &settings).map_err(|e| pass_error(i, e))?;
        let governing = mech
            .draw_stress_mpa
            .get(method)
            .map_err(|e| pass_error(i, e))?;
        let ratio = governing / mech.flow_stress_exit_mpa;
        let optimum =
            optimum_semi_angle(law, &dp, &settings, method).map_err(|e| pass_error(i, e))?;
        if mech.friction_factor_derived && method_uses_m(method) && !derived_m_noted {
            notes.push(format!(
                "shear factor m derived from friction as min(1, sqrt(3) mu) = {:.3} (set dies.friction_factor to give it)",
                mech.friction_factor
            ));
            derived_m_noted = true;
        }

        let force = pass::force_kn(governing, d_out);
        let speed = line.map(|l| l.finish_speed_m_s * (finish_d / d_out).powi(2));
        let power = speed.map(|v| pass::power_kw(force, v));
        let rise = pass::temperature_rise_c(
            (governing - dp.back_tension_mpa).max(0.0),
            file.material.density_kg_m3,
            file.material.specific_heat_j_kg_k,
            heat_fraction,
        );
        let wire_t = ambient + rise;

        let mut flags = Vec::new();
        if ratio > limits.draw_ratio_max {
            flags.push(Flag::OverDrawLimit);
        } else if ratio > limits.draw_ratio_warn {
            flags.push(Flag::NearDrawLimit);
        }
        if let Some(limit) = file.material.cold_work_limit {
            if mech.strain_after > limit {
                flags.push(Flag::AnnealDue);
                if !anneal_due_noted {
                    notes.push(format!(
                        "cold-work limit {limit} is passed at step {}: schedule an anneal before it",
                        i + 1
                    ));
                    anneal_due_noted = true;
                }
            }
        }
        if let Some(dmax) = limits.delta_max {
            if mech.delta > dmax {
                flags.push(Flag::CentralBurstRisk);
            }
        }
        if let Some(tmax) = limits.wire_temperature_max_c {
            if wire_t > tmax {
                flags.push(Flag::TooHot);
            }
        }
        if let (Some(p), Some(pmax)) = (power, line.and_then(|l| l.block_power_kw)) {
            if p > pmax {
                flags.push(Flag::OverBlockPower);
            }
        }
        if dp.back_tension_mpa > 0.0 && dp.back_tension_mpa >= mech.flow_stress_entry_mpa {
            flags.push(Flag::BackTensionOverYield);
        }
        if let Some(o) = optimum {
            if !o.at_search_limit && (o.semi_angle_deg - die.semi_angle_deg).abs() > angle_tolerance
            {
                flags.push(Flag::AngleOffOptimum);
            }
        }

        rows.push(StepReport {
            step: i + 1,
            kind: StepKind::Draw,
            die_size: exit.written().map(str::to_string),
            entry_diameter_mm: d_in,
            exit_diameter_mm: d_out,
            area_reduction: Some(mech.area_reduction),
            elongation: Some(mech.elongation),
            cumulative_reduction: pass::area_reduction(d_since_anneal, d_out),
            pass_strain: Some(mech.pass_strain),
            strain_before: mech.strain_before,
            strain_after: mech.strain_after,
            flow_stress_entry_mpa: Some(mech.flow_stress_entry_mpa),
            mean_flow_stress_mpa: Some(mech.mean_flow_stress_mpa),
            flow_stress_exit_mpa: mech.flow_stress_exit_mpa,
            delta: Some(mech.delta),
            semi_angle_deg: Some(die.semi_angle_deg),
            friction: Some(die.friction),
            friction_factor: Some(mech.friction_factor),
            back_tension_mpa: Some(dp.back_tension_mpa),
            draw_stress_mpa: Some(mech.draw_stress_mpa),
            governing_draw_stress_mpa: Some(governing),
            draw_ratio: Some(ratio),
            optimum_semi_angle_deg: optimum.map(|o| o.semi_angle_deg),
            force_kn: Some(force),
            exit_speed_m_s: speed,
            power_kw: power,
            temperature_rise_c: Some(rise),
            wire_temperature_c: Some(wire_t),
            flags,
        });
        strain = mech.strain_after;
        d_in = d_out;
    }

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
    if line.is_some() {
        notes.push("speeds by volume constancy from the finish speed through every pass (one continuous line)".into());
    }

    let draws: Vec<&StepReport> = rows.iter().filter(|r| r.kind == StepKind::Draw).collect();
    let worst = draws
        .iter()
        .filter_map(|r| r.draw_ratio.map(|x| (x, r.step)))
        // The first of equal ratios (equal to a part in a million, the design
        // solver's tolerance), so an equal-ratio run names its first pass.
        .fold(None, |best: Option<(f64, usize)>, (x, step)| match best {
            Some((b, _)) if x <= b * (1.0 + 1e-6) => best,
            _ => Some((x, step)),
        });
    let verdict = rows
        .iter()
        .flat_map(|r| r.flags.iter())
        .map(|f| {
            if f.is_over() {
                Verdict::Over
            } else {
                Verdict::Warn
            }
        })
        .max()
        .unwrap_or(Verdict::Ok);
    let finish_area_m2 = std::f64::consts::PI * (finish_d * 1e-3).powi(2) / 4.0;
    let throughput =
        line.map(|l| file.material.density_kg_m3 * finish_area_m2 * l.finish_speed_m_s * 3600.0);
    let per_shift = line.zip(throughput).map(|(l, kg_h)| {
        kg_h * l.shift_hours.unwrap_or(schedule::DEFAULT_SHIFT_HOURS)
            * l.utilisation.unwrap_or(schedule::DEFAULT_UTILISATION)
            / 1000.0
    });
    let coil = line
        .and_then(|l| l.coil_mass_kg)
        .zip(throughput)
        .map(|(m, kg_h)| m / kg_h * 60.0);
    let total_power = line.map(|_| draws.iter().filter_map(|r| r.power_kw).sum());
    let last = rows.last().expect("a schedule with a draw pass has rows");
    let summary = Summary {
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
        total_power_kw: total_power,
        verdict,
    };
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

fn method_uses_m(method: Method) -> bool {
    matches!(method, Method::UpperBound | Method::Max)
}
