//! The schedule file: material, start size, die defaults, limits, line and
//! the steps (draw passes and anneals), as read from YAML.
//!
//! One model serves both `check` (which needs `passes`) and `design` (which
//! needs `target`). Unknown keys are errors; numbers are validated as they are
//! read, and each message names the key, the value and what is allowed.

mod read;

use serde::{Deserialize, Serialize};

use crate::flow::FlowLaw;
use crate::param::{self, Ends, ParamError};
use crate::pass::{Die, Method};
use crate::size::Diameter;

/// Why a schedule file cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ScheduleError {
    /// The YAML is malformed or a key is unknown, missing or of the wrong type;
    /// the message carries the line and column.
    #[error("{0}")]
    Syntax(String),
    /// A value is out of range (`key` is its path in the file).
    #[error("{key}: {problem}")]
    Value {
        /// Path of the key in the file (`passes[3].exit`).
        key: String,
        /// What is wrong with it.
        problem: ParamError,
    },
    /// A pass could not be evaluated.
    #[error("{key}: {problem}")]
    Pass {
        /// Path of the step in the file (`passes[3]`).
        key: String,
        /// The core's reason.
        problem: crate::pass::PassError,
    },
    /// The machine cannot take the schedule (more dies than blocks, ...).
    #[error("machine: {0}")]
    Machine(crate::machine::MachineError),
    /// The file lacks a key that this use of it needs.
    #[error("{key} is missing: {why}")]
    Missing {
        /// The key that is needed.
        key: String,
        /// Why it is needed.
        why: String,
    },
}

/// Default fraction of the deformation work that becomes heat (Taylor-Quinney
/// 0.9 to 0.95; from memory).
pub const DEFAULT_HEAT_FRACTION: f64 = 0.9;
/// Default ambient (and die-entry wire) temperature, deg C.
pub const DEFAULT_AMBIENT_C: f64 = 25.0;
/// Default shift length, hours.
pub const DEFAULT_SHIFT_HOURS: f64 = 8.0;
/// Default line utilisation (running time over shift time), common practice.
pub const DEFAULT_UTILISATION: f64 = 0.85;
/// Default largest distance from the optimum semi-angle before a pass is flagged, degrees.
pub const DEFAULT_ANGLE_TOLERANCE_DEG: f64 = 3.0;
/// The most draw passes a design file may ask for (`target.max_passes`).
pub const MAX_PASSES_ALLOWED: u32 = 200;
/// Physical range of a metal's density, kg/m^3: lithium 534 to osmium 22,590
/// (CRC Handbook of Chemistry and Physics, from memory), widened to round
/// figures. Outside it a figure such as the temperature rise overflows.
pub const DENSITY_RANGE_KG_M3: (f64, f64) = (100.0, 30_000.0);
/// Physical range of a metal's specific heat near room temperature,
/// J/(kg K): about 116 (uranium) to 3,580 (lithium) (CRC Handbook, from
/// memory), widened to round figures.
pub const SPECIFIC_HEAT_RANGE_J_KG_K: (f64, f64) = (50.0, 5_000.0);
/// Range of a diameter in a file, mm: from 1 um (below the finest drawn
/// wire, about 10 um) to 1 m (above any drawn bar); common practice.
pub const DIAMETER_RANGE_MM: (f64, f64) = (0.001, 1000.0);
/// Largest accumulated true strain in a file (`start.strain`,
/// `cold_work_limit`): 20 is an area ratio of e^20, about 5e8, beyond any
/// drawing sequence (rod to the finest wire is about 12).
pub const STRAIN_MAX: f64 = 20.0;
/// Highest wire-temperature limit, deg C: above the melting point of the
/// drawn metals this is no limit (copper melts at 1,085 C); from memory.
pub const WIRE_TEMPERATURE_MAX_C: f64 = 2000.0;
/// Fastest finishing speed, m/s: the fastest fine-wire lines run at tens of
/// m/s (common practice); 500 leaves wide room.
pub const FINISH_SPEED_MAX_M_S: f64 = 500.0;
/// Largest block motor power, kW (common practice: drawing blocks are a few
/// to a few hundred kW).
pub const BLOCK_POWER_MAX_KW: f64 = 100_000.0;
/// Heaviest coil or spool, kg (common practice: rod coils are a few tonnes).
pub const COIL_MASS_MAX_KG: f64 = 1_000_000.0;
/// Default governing method: Sachs with the Hosford-Caddell redundant work,
/// the closest method on the validation table (README, "Validation": mean
/// error 5.0 %, largest 12.2 %, against 19.9 % and 28.6 % for `max`).
pub const DEFAULT_METHOD: Method = Method::Redundant;

// Written by hand rather than with `#[from]`, which would also make the
// machine error the message's source and print it twice.
impl From<crate::machine::MachineError> for ScheduleError {
    fn from(e: crate::machine::MachineError) -> Self {
        ScheduleError::Machine(e)
    }
}

/// A whole schedule (or design) file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ScheduleFile {
    /// Free text.
    #[serde(default)]
    pub title: String,
    /// The stock and its flow law.
    pub material: Material,
    /// The starting rod or wire.
    pub start: Start,
    /// Die defaults for every draw pass.
    pub dies: DieDefaults,
    /// The mill's limits.
    pub limits: Limits,
    /// Line speed and capacity (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub line: Option<Line>,
    /// The drawing machine the schedule runs on: a machine file's path,
    /// relative to the schedule file (the binary reads it).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub machine: Option<String>,
    /// What to design (design files only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub target: Option<Target>,
    /// The steps in order (schedule files only).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub passes: Vec<Step>,
    /// How the inputs scatter, for `coldpass risk` (optional; see `crate::risk`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub scatter: Option<crate::risk::Scatter>,
}

/// The stock.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Material {
    /// Free text.
    #[serde(default)]
    pub label: String,
    /// Density, kg/m^3.
    pub density_kg_m3: f64,
    /// Specific heat, J/(kg K).
    pub specific_heat_j_kg_k: f64,
    /// Flow law of the stock as it starts.
    #[serde(deserialize_with = "flow_key")]
    pub flow: FlowLaw,
    /// Flow law after an anneal; default: `flow`.
    #[serde(
        default,
        deserialize_with = "annealed_flow_key",
        skip_serializing_if = "Option::is_none"
    )]
    pub annealed_flow: Option<FlowLaw>,
    /// Accumulated strain at which an anneal is due; default: no limit.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cold_work_limit: Option<f64>,
    /// Fraction of the die work that heats the wire; default 0.9.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub heat_fraction: Option<f64>,
    /// Scatter of the flow law's parameters (as `fit` writes it), the default
    /// flow scatter for `coldpass risk`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flow_scatter: Option<crate::risk::FlowScatter>,
    /// Yield stress of the annealed stock, MPa (for the back-tension check);
    /// default: the law at a 0.002 offset strain.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub yield_mpa: Option<f64>,
    /// Largest true plastic strain the flow law was fitted over (`fit` emits
    /// it beside `flow:`); past it the law is extrapolated.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flow_valid_to_strain: Option<f64>,
    /// Measured tensile strengths of drawn wire (the mill's own points).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub drawn_strengths: Vec<DrawnStrength>,
}

/// A measured tensile strength of drawn wire, at a strain or a diameter.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DrawnStrength {
    /// Accumulated true strain of the wire (give this or `diameter`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub strain: Option<f64>,
    /// Wire diameter drawn from the start stock (strain
    /// `start.strain + 2 ln(D_start/D)`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub diameter: Option<Diameter>,
    /// Measured tensile strength, MPa.
    pub tensile_strength_mpa: f64,
}

/// Reads a flow law, naming its key in a validation error (`flow: `n` = 1.5 ...`).
fn law_at<'de, D: serde::Deserializer<'de>>(d: D, key: &str) -> Result<FlowLaw, D::Error> {
    let spec = crate::flow::FlowLawSpec::deserialize(d)
        .map_err(|e| serde::de::Error::custom(format!("{key}: {e}")))?;
    FlowLaw::new(spec).map_err(|e| serde::de::Error::custom(format!("{key}: {e}")))
}

fn flow_key<'de, D: serde::Deserializer<'de>>(d: D) -> Result<FlowLaw, D::Error> {
    law_at(d, "flow")
}

fn annealed_flow_key<'de, D: serde::Deserializer<'de>>(d: D) -> Result<Option<FlowLaw>, D::Error> {
    law_at(d, "annealed_flow").map(Some)
}

/// The starting stock.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Start {
    /// Start diameter (mm, or a string with unit or gauge).
    pub diameter: Diameter,
    /// Cold work already in the stock (accumulated true strain); default 0.
    #[serde(default, skip_serializing_if = "is_zero")]
    pub strain: f64,
}

fn is_zero(x: &f64) -> bool {
    *x == 0.0
}

/// Die settings for every draw pass; each may be overridden on a pass.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DieDefaults {
    /// Semi-angle, degrees (check files need it; design files may give `semi_angles_deg`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub semi_angle_deg: Option<f64>,
    /// The die stock to choose from, degrees (design files).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub semi_angles_deg: Option<Vec<f64>>,
    /// Coulomb friction mu.
    pub friction: f64,
    /// Shear factor m for the upper bound; default `min(1, mu)` (`pass::DERIVED_SHEAR_FACTOR_PER_MU`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub friction_factor: Option<f64>,
    /// Die land length, mm; default 0.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub land_length_mm: Option<f64>,
    /// Drawing efficiency for the efficiency method.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub efficiency: Option<f64>,
}

/// The mill's limits and the method that governs them.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Limits {
    /// Governing method; default `redundant` ([`DEFAULT_METHOD`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub method: Option<Method>,
    /// Draw ratio above which a pass is near the limit.
    pub draw_ratio_warn: f64,
    /// Draw ratio above which a pass is over the limit.
    pub draw_ratio_max: f64,
    /// Delta above which central bursts are a risk.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub delta_max: Option<f64>,
    /// Highest mean wire temperature at a die exit, deg C.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wire_temperature_max_c: Option<f64>,
    /// Ambient temperature, deg C; the wire enters every die at it. Default 25.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ambient_c: Option<f64>,
    /// Largest distance from the optimum semi-angle before a pass is flagged, degrees; default 3.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub angle_tolerance_deg: Option<f64>,
    /// C of the redundant-work factor; default 0.21.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub redundant_c: Option<f64>,
    /// Per-pass area reduction above which a pass is `heavy-reduction`;
    /// default 0.30 (0.45 on a single-block machine).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reduction_warn: Option<f64>,
}

/// Line speed and capacity.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Line {
    /// Speed of the finished wire, m/s.
    pub finish_speed_m_s: f64,
    /// Motor power limit per die (block), kW.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub block_power_kw: Option<f64>,
    /// Mass of one finished coil or spool, kg.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub coil_mass_kg: Option<f64>,
    /// Shift length, hours; default 8.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shift_hours: Option<f64>,
    /// Running time over shift time; default 0.85.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub utilisation: Option<f64>,
}

/// A strength window, MPa.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Window {
    /// Lowest allowed, MPa.
    pub min: f64,
    /// Highest allowed, MPa.
    pub max: f64,
}

/// How a design spreads the strain over its passes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum Strategy {
    /// Every pass at the same draw ratio.
    #[default]
    EqualRatio,
    /// Every pass with the same strain.
    EqualStrain,
    /// Each pass's strain a fixed fraction of the one before.
    Tapered,
}

/// What a design file asks for.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Target {
    /// Finished diameter.
    pub diameter: Diameter,
    /// Finished flow-stress window (temper), MPa.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub strength_mpa: Option<Window>,
    /// Largest area reduction of a pass.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reduction_max: Option<f64>,
    /// Smallest area reduction of a pass.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub reduction_min: Option<f64>,
    /// How the strain is spread; default equal-ratio.
    #[serde(default)]
    pub strategy: Strategy,
    /// For `tapered`: each pass's strain this fraction of the one before.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub taper: Option<f64>,
    /// Most draw passes to consider.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_passes: Option<u32>,
    /// Exactly this many draw passes (a machine with a fixed count of dies).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub passes: Option<u32>,
    /// Most anneals; with it the design takes the fewest passes with at most
    /// this many anneals. Default: the fewest anneals any design needs.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_anneals: Option<u32>,
    /// Draw ratio the design aims its passes at, at or under
    /// `limits.draw_ratio_max`; default 0.95 x `limits.draw_ratio_warn`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub draw_ratio_aim: Option<f64>,
    /// For `equal-ratio`: one ratio in each run between anneals (`each-run`,
    /// the default) or one ratio over the whole schedule (`whole-schedule`).
    #[serde(default)]
    pub ratio_across: RatioAcross,
    /// Die-room size step, mm: every die but the finish die is rounded to a
    /// multiple of it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub die_step_mm: Option<f64>,
    /// Die sizes the die room stocks, mm: every die but the finish die is one of them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub die_sizes_mm: Option<Vec<f64>>,
}

/// Where an equal-ratio design holds its one draw ratio.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum RatioAcross {
    /// One ratio in each run between anneals; runs may differ.
    #[default]
    EachRun,
    /// One ratio over every pass of the schedule.
    WholeSchedule,
}

/// One step of a schedule: a draw pass or an anneal.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "StepText", into = "StepText")]
pub enum Step {
    /// A draw through one die.
    Draw(DrawStep),
    /// An anneal: the strain goes back to 0 and the annealed law applies.
    Anneal,
}

/// A draw pass: its die size, any die setting that differs from `dies`,
/// and its back tension.
#[derive(Debug, Clone, PartialEq)]
pub struct DrawStep {
    /// Exit diameter (die size).
    pub exit: Diameter,
    /// Die settings of this pass that differ from `dies`.
    pub die: DieOverrides,
    /// Back tension, MPa.
    pub back_tension_mpa: Option<f64>,
}

/// Die settings given on one pass, each over the file's `dies` default.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct DieOverrides {
    /// Semi-angle, degrees.
    pub semi_angle_deg: Option<f64>,
    /// Coulomb friction mu.
    pub friction: Option<f64>,
    /// Shear factor m.
    pub friction_factor: Option<f64>,
    /// Land length, mm.
    pub land_length_mm: Option<f64>,
    /// Drawing efficiency.
    pub efficiency: Option<f64>,
}

/// An anneal step's settings (none yet: `anneal: {}`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct AnnealText {}

/// A step as written: the union of the draw keys and `anneal`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields)]
pub struct StepText {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    exit: Option<Diameter>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    anneal: Option<AnnealText>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    semi_angle_deg: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    friction: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    friction_factor: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    land_length_mm: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    efficiency: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    back_tension_mpa: Option<f64>,
}

impl TryFrom<StepText> for Step {
    type Error = String;
    fn try_from(t: StepText) -> Result<Self, String> {
        let die_keys = t.semi_angle_deg.is_some()
            || t.friction.is_some()
            || t.friction_factor.is_some()
            || t.land_length_mm.is_some()
            || t.efficiency.is_some()
            || t.back_tension_mpa.is_some();
        match (t.exit, t.anneal) {
            (Some(_), Some(_)) => Err(
                "a step is either a draw (`exit: ...`) or an anneal (`anneal: {}`), not both"
                    .into(),
            ),
            (None, Some(_)) if die_keys => {
                Err("an anneal step takes no die keys; put them on the next draw pass".into())
            }
            (None, Some(_)) => Ok(Step::Anneal),
            (None, None) => Err("a step needs `exit: <diameter>` (a draw) or `anneal: {}`".into()),
            (Some(exit), None) => Ok(Step::Draw(DrawStep {
                exit,
                die: DieOverrides {
                    semi_angle_deg: t.semi_angle_deg,
                    friction: t.friction,
                    friction_factor: t.friction_factor,
                    land_length_mm: t.land_length_mm,
                    efficiency: t.efficiency,
                },
                back_tension_mpa: t.back_tension_mpa,
            })),
        }
    }
}

impl From<Step> for StepText {
    fn from(s: Step) -> Self {
        match s {
            Step::Anneal => StepText {
                anneal: Some(AnnealText {}),
                ..StepText::default()
            },
            Step::Draw(d) => StepText {
                exit: Some(d.exit),
                anneal: None,
                semi_angle_deg: d.die.semi_angle_deg,
                friction: d.die.friction,
                friction_factor: d.die.friction_factor,
                land_length_mm: d.die.land_length_mm,
                efficiency: d.die.efficiency,
                back_tension_mpa: d.back_tension_mpa,
            },
        }
    }
}

/// Reads a schedule or design file from YAML text. Syntax errors, unknown
/// keys and type errors come back in the file's words with their line and
/// column; nesting deeper than 32 levels and YAML tags (`!name`) are
/// refused before parsing; then every value is checked by
/// [`ScheduleFile::validate`].
pub fn parse(text: &str) -> Result<ScheduleFile, ScheduleError> {
    if text
        .lines()
        .all(|l| l.trim().is_empty() || l.trim_start().starts_with('#'))
    {
        return Err(ScheduleError::Syntax(
            "the file is empty: a schedule needs material, start, dies, limits and passes".into(),
        ));
    }
    read::check_shape(text).map_err(ScheduleError::Syntax)?;
    let file: ScheduleFile =
        serde_yaml::from_str(text).map_err(|e| ScheduleError::Syntax(read::explain(&e, text)))?;
    file.validate()?;
    Ok(file)
}

fn value(key: &str, r: Result<f64, ParamError>) -> Result<f64, ScheduleError> {
    r.map_err(|mut problem| {
        problem.value = compact_number(&problem.value);
        ScheduleError::Value {
            key: key.to_string(),
            problem,
        }
    })
}

/// A number as short as it is exact: `5e-324`, not 324 digits.
fn compact_number(text: &str) -> String {
    match text.parse::<f64>() {
        Ok(x) if x.is_finite() && text.len() > 15 => format!("{x:e}"),
        _ => text.to_string(),
    }
}

impl ScheduleFile {
    /// Checks every value that serde cannot: ranges of the material, limits,
    /// line and target numbers, and the die defaults.
    pub fn validate(&self) -> Result<(), ScheduleError> {
        let m = &self.material;
        let (lo, hi) = DENSITY_RANGE_KG_M3;
        value(
            "material.density_kg_m3",
            param::within("density_kg_m3", m.density_kg_m3, lo, hi, Ends::Closed),
        )?;
        let (lo, hi) = SPECIFIC_HEAT_RANGE_J_KG_K;
        value(
            "material.specific_heat_j_kg_k",
            param::within(
                "specific_heat_j_kg_k",
                m.specific_heat_j_kg_k,
                lo,
                hi,
                Ends::Closed,
            ),
        )?;
        if let Some(c) = m.cold_work_limit {
            value(
                "material.cold_work_limit",
                param::within("cold_work_limit", c, 0.0, STRAIN_MAX, Ends::OpenClosed),
            )?;
        }
        self.validate_sizes()?;
        if let Some(b) = m.heat_fraction {
            value(
                "material.heat_fraction",
                param::within("heat_fraction", b, 0.0, 1.0, Ends::Closed),
            )?;
        }
        if let Some(y) = m.yield_mpa {
            value("material.yield_mpa", param::positive("yield_mpa", y))?;
        }
        if let Some(e) = m.flow_valid_to_strain {
            value(
                "material.flow_valid_to_strain",
                param::positive("flow_valid_to_strain", e),
            )?;
        }
        for (i, p) in m.drawn_strengths.iter().enumerate() {
            let key = |k: &str| format!("material.drawn_strengths[{i}].{k}");
            value(
                &key("tensile_strength_mpa"),
                param::positive("tensile_strength_mpa", p.tensile_strength_mpa),
            )?;
            match (p.strain, &p.diameter) {
                (Some(e), None) => {
                    value(&key("strain"), param::non_negative("strain", e))?;
                }
                (None, Some(_)) => {}
                _ => {
                    return Err(ScheduleError::Missing {
                        key: key("strain"),
                        why: "give a point's strain or its diameter (one of them)".into(),
                    })
                }
            }
        }
        value(
            "start.strain",
            param::within("strain", self.start.strain, 0.0, STRAIN_MAX, Ends::Closed),
        )?;
        let d = &self.dies;
        if let Some(a) = d.semi_angle_deg {
            value(
                "dies.semi_angle_deg",
                param::within("semi_angle_deg", a, 0.0, 45.0, Ends::Open),
            )?;
        }
        if let Some(list) = &d.semi_angles_deg {
            if list.is_empty() {
                return Err(ScheduleError::Value {
                    key: "dies.semi_angles_deg".into(),
                    problem: ParamError::new("semi_angles_deg", "[]", "needs at least one angle"),
                });
            }
            for (i, a) in list.iter().enumerate() {
                value(
                    &format!("dies.semi_angles_deg[{i}]"),
                    param::within("semi_angle_deg", *a, 0.0, 45.0, Ends::Open),
                )?;
            }
        }
        self.die_for(&DieOverrides::default(), d.semi_angle_deg.unwrap_or(6.0))
            .map_err(|problem| ScheduleError::Pass {
                key: "dies".into(),
                problem,
            })?;
        let l = &self.limits;
        value(
            "limits.draw_ratio_warn",
            param::positive("draw_ratio_warn", l.draw_ratio_warn),
        )?;
        value(
            "limits.draw_ratio_max",
            param::positive("draw_ratio_max", l.draw_ratio_max),
        )?;
        if l.draw_ratio_warn > l.draw_ratio_max {
            return Err(ScheduleError::Value {
                key: "limits.draw_ratio_warn".into(),
                problem: ParamError::new(
                    "draw_ratio_warn",
                    l.draw_ratio_warn,
                    format!("must not exceed draw_ratio_max ({})", l.draw_ratio_max),
                ),
            });
        }
        if let Some(x) = l.delta_max {
            value("limits.delta_max", param::positive("delta_max", x))?;
        }
        if let Some(x) = l.ambient_c {
            value(
                "limits.ambient_c",
                param::within("ambient_c", x, -50.0, 100.0, Ends::Closed),
            )?;
        }
        if let Some(x) = l.wire_temperature_max_c {
            // The wire enters every die at ambient and only warms: a limit at
            // or below ambient can never be met (it would only send a design
            // searching to its last pass).
            let ambient = l.ambient_c.unwrap_or(DEFAULT_AMBIENT_C);
            value(
                "limits.wire_temperature_max_c",
                param::within(
                    "wire_temperature_max_c",
                    x,
                    ambient,
                    WIRE_TEMPERATURE_MAX_C,
                    Ends::OpenClosed,
                ),
            )
            .map_err(|e| match e {
                ScheduleError::Value { key, mut problem } => {
                    problem.allowed = format!(
                        "{} (above the ambient {ambient} C at which the wire enters every die, and at most {WIRE_TEMPERATURE_MAX_C} C)",
                        problem.allowed
                    );
                    ScheduleError::Value { key, problem }
                }
                other => other,
            })?;
        }
        if let Some(x) = l.angle_tolerance_deg {
            value(
                "limits.angle_tolerance_deg",
                param::positive("angle_tolerance_deg", x),
            )?;
        }
        if let Some(x) = l.redundant_c {
            value("limits.redundant_c", param::non_negative("redundant_c", x))?;
        }
        if let Some(x) = l.reduction_warn {
            value(
                "limits.reduction_warn",
                param::within("reduction_warn", x, 0.0, 1.0, Ends::Open),
            )?;
        }
        if l.method == Some(Method::Efficiency) && d.efficiency.is_none() {
            return Err(ScheduleError::Missing {
                key: "dies.efficiency".into(),
                why: "limits.method is efficiency, which divides ideal work by it".into(),
            });
        }
        if let Some(line) = &self.line {
            value(
                "line.finish_speed_m_s",
                param::within(
                    "finish_speed_m_s",
                    line.finish_speed_m_s,
                    0.0,
                    FINISH_SPEED_MAX_M_S,
                    Ends::OpenClosed,
                ),
            )?;
            if let Some(x) = line.block_power_kw {
                value(
                    "line.block_power_kw",
                    param::within(
                        "block_power_kw",
                        x,
                        0.0,
                        BLOCK_POWER_MAX_KW,
                        Ends::OpenClosed,
                    ),
                )?;
            }
            if let Some(x) = line.coil_mass_kg {
                value(
                    "line.coil_mass_kg",
                    param::within("coil_mass_kg", x, 0.0, COIL_MASS_MAX_KG, Ends::OpenClosed),
                )?;
            }
            if let Some(x) = line.shift_hours {
                value(
                    "line.shift_hours",
                    param::within("shift_hours", x, 0.0, 24.0, Ends::OpenClosed),
                )?;
            }
            if let Some(x) = line.utilisation {
                value(
                    "line.utilisation",
                    param::within("utilisation", x, 0.0, 1.0, Ends::OpenClosed),
                )?;
            }
        }
        if let Some(t) = &self.target {
            if let Some(w) = t.strength_mpa {
                value("target.strength_mpa.min", param::positive("min", w.min))?;
                value("target.strength_mpa.max", param::positive("max", w.max))?;
                if w.max < w.min {
                    return Err(ScheduleError::Value {
                        key: "target.strength_mpa.max".into(),
                        problem: ParamError::new(
                            "max",
                            w.max,
                            format!("must be at least min ({})", w.min),
                        ),
                    });
                }
            }
            for (key, r) in [
                ("target.reduction_max", t.reduction_max),
                ("target.reduction_min", t.reduction_min),
            ] {
                if let Some(r) = r {
                    value(key, param::within(&key[7..], r, 0.0, 1.0, Ends::Open))?;
                }
            }
            if let (Some(lo), Some(hi)) = (t.reduction_min, t.reduction_max) {
                if lo > hi {
                    return Err(ScheduleError::Value {
                        key: "target.reduction_min".into(),
                        problem: ParamError::new(
                            "reduction_min",
                            lo,
                            format!("must not exceed reduction_max ({hi})"),
                        ),
                    });
                }
            }
            if let Some(x) = t.taper {
                value(
                    "target.taper",
                    param::within("taper", x, 0.0, 1.0, Ends::OpenClosed),
                )?;
            }
            for (key, n) in [
                ("target.max_passes", t.max_passes),
                ("target.passes", t.passes),
            ] {
                if let Some(n) = n {
                    if !(1..=MAX_PASSES_ALLOWED).contains(&n) {
                        return Err(ScheduleError::Value {
                            key: key.into(),
                            problem: ParamError::new(
                                &key[7..],
                                n,
                                format!("must be in [1, {MAX_PASSES_ALLOWED}]"),
                            ),
                        });
                    }
                }
            }
            if let Some(n) = t.max_anneals {
                if n > MAX_PASSES_ALLOWED {
                    return Err(ScheduleError::Value {
                        key: "target.max_anneals".into(),
                        problem: ParamError::new(
                            "max_anneals",
                            n,
                            format!("must be in [0, {MAX_PASSES_ALLOWED}]"),
                        ),
                    });
                }
            }
            if let Some(x) = t.draw_ratio_aim {
                value(
                    "target.draw_ratio_aim",
                    param::within(
                        "draw_ratio_aim",
                        x,
                        0.0,
                        self.limits.draw_ratio_max,
                        Ends::OpenClosed,
                    ),
                )?;
            }
            if let Some(x) = t.die_step_mm {
                value(
                    "target.die_step_mm",
                    param::within("die_step_mm", x, 0.0, 10.0, Ends::OpenClosed),
                )?;
            }
            if let Some(list) = &t.die_sizes_mm {
                if t.die_step_mm.is_some() {
                    return Err(ScheduleError::Value {
                        key: "target.die_sizes_mm".into(),
                        problem: ParamError::new(
                            "die_sizes_mm",
                            format!("{list:?}"),
                            "give either die_step_mm or die_sizes_mm, not both",
                        ),
                    });
                }
                if list.is_empty() {
                    return Err(ScheduleError::Value {
                        key: "target.die_sizes_mm".into(),
                        problem: ParamError::new("die_sizes_mm", "[]", "needs at least one size"),
                    });
                }
                for x in list {
                    value("target.die_sizes_mm", param::positive("die_sizes_mm", *x))?;
                }
            }
        }
        if self.scatter.is_some() || m.flow_scatter.is_some() {
            crate::risk::spreads(self).map_err(|e| match e {
                crate::risk::RiskError::Value(problem) => ScheduleError::Value {
                    key: if problem.name.starts_with("material") {
                        "material.flow_scatter".into()
                    } else {
                        "scatter".into()
                    },
                    problem,
                },
                other => ScheduleError::Syntax(other.to_string()),
            })?;
        }
        Ok(())
    }

    /// Every diameter in the file (start, pass exits, target) within
    /// [`DIAMETER_RANGE_MM`].
    fn validate_sizes(&self) -> Result<(), ScheduleError> {
        let (lo, hi) = DIAMETER_RANGE_MM;
        let check = |key: String, d: &Diameter| -> Result<(), ScheduleError> {
            value(
                &key,
                param::within("diameter_mm", d.mm(), lo, hi, Ends::Closed),
            )
            .map(|_| ())
        };
        check("start.diameter".into(), &self.start.diameter)?;
        if let Some(t) = &self.target {
            check("target.diameter".into(), &t.diameter)?;
        }
        for (i, step) in self.passes.iter().enumerate() {
            if let Step::Draw(d) = step {
                check(format!("passes[{i}].exit"), &d.exit)?;
            }
        }
        Ok(())
    }

    /// The die of a draw step: the step's own keys over the file's `dies`,
    /// with `semi_angle_deg` when neither gives one.
    pub fn die_for(
        &self,
        step: &DieOverrides,
        semi_angle_deg: f64,
    ) -> Result<Die, crate::pass::PassError> {
        let d = &self.dies;
        let die = Die {
            semi_angle_deg: step
                .semi_angle_deg
                .or(d.semi_angle_deg)
                .unwrap_or(semi_angle_deg),
            friction: step.friction.unwrap_or(d.friction),
            friction_factor: step.friction_factor.or(d.friction_factor),
            land_length_mm: step.land_length_mm.or(d.land_length_mm).unwrap_or(0.0),
            efficiency: step.efficiency.or(d.efficiency),
        };
        die.validate()?;
        Ok(die)
    }

    /// The law after an anneal: `annealed_flow`, or `flow` when none is given.
    pub fn annealed_law(&self) -> &FlowLaw {
        self.material
            .annealed_flow
            .as_ref()
            .unwrap_or(&self.material.flow)
    }
}
