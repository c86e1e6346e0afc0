//! The schedule file: material, start size, die defaults, limits, line and
//! the steps (draw passes and anneals), as read from YAML.
//!
//! One model serves both `check` (which needs `passes`) and `design` (which
//! needs `target`). Unknown keys are errors; numbers are validated as they are
//! read, and each message names the key, the value and what is allowed.
//! Stresses, speeds, powers, temperatures and lengths may carry their unit
//! in the value (`back_tension_mpa: "3 ksi"`, `finish_speed_m_s: "1500
//! ft/min"`; [`crate::size::quantity`]); a plain number is in the key's unit.

pub mod ranges;
mod read;
mod validate;

use serde::{Deserialize, Serialize};

use crate::flow::FlowLaw;
use crate::param::{self, Ends, ParamError};
use crate::pass::{Die, Method};
use crate::size::quantity::de as q;
use crate::size::Diameter;

/// Why a schedule file cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ScheduleError {
    /// The YAML is malformed or a key is unknown, missing or of the wrong type;
    /// the message carries the line and column.
    #[error("{0}")]
    Syntax(String),
    /// A value is out of range (`key` is its path in the file).
    #[error("{}", key_says(key, problem))]
    Value {
        /// Path of the key in the file (`passes[3].exit`).
        key: String,
        /// What is wrong with it.
        problem: ParamError,
    },
    /// A pass could not be evaluated.
    #[error("{}", pass_says(key, problem))]
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

/// Blocks of keys a message may name: a parameter inside one is shown as
/// `block.parameter` (`dies.friction`).
const BLOCK_KEYS: [&str; 10] = [
    "material", "start", "dies", "limits", "line", "target", "passes", "blocks", "scatter",
    "machine",
];

/// One message shape for every bad value: `` `key.path` = value: rule ``,
/// the rule in the words "allowed ..." where it states a range (`` `dies.friction`
/// = 5: allowed in [0, 0.5] ``). `key` is where the file holds the value
/// (`dies`, `limits.ambient_c`, `passes[3] (step 4)`); a parameter inside a
/// block is joined to it.
pub fn key_says(key: &str, problem: &ParamError) -> String {
    let (path, note) = match key.split_once(" (") {
        Some((p, rest)) => (p, format!(" ({rest}")),
        None => (key, String::new()),
    };
    let last = path.rsplit('.').next().unwrap_or(path);
    let last = last.split('[').next().unwrap_or(last);
    let path = if problem.name.contains('.') || path.is_empty() {
        problem.name.clone()
    } else if BLOCK_KEYS.contains(&last) && last != problem.name {
        format!("{path}.{}", problem.name)
    } else {
        path.to_string()
    };
    let rule = rule_in_unit(&problem.name, &problem.allowed);
    // A range in a unit the key does not name (`start.diameter`, a
    // `passes[i].exit`) shows the value in that unit too: it may have been
    // written in another (`"0.002 in"`) and converted.
    let last = path.rsplit('.').next().unwrap_or(&path);
    let last = last.split('[').next().unwrap_or(last);
    let value = match unit_of(&problem.name) {
        Some(u)
            if unit_of(last).is_none()
                && rule.starts_with("allowed in ")
                && problem.value.parse::<f64>().is_ok() =>
        {
            format!("{} {u}", problem.value)
        }
        _ => problem.value.clone(),
    };
    format!("`{path}`{note} = {value}: {rule}")
}

/// A rule in the messages' words: "must be in [0, 1]" reads "allowed in [0, 1]".
pub fn rule_words(rule: &str) -> String {
    match rule.strip_prefix("must be ") {
        Some(rest) => format!("allowed {rest}"),
        None => rule.to_string(),
    }
}

/// The rule of parameter `name` in the messages' words, a range followed by
/// the unit the name ends in: "must be in [0.001, 1000]" for `diameter_mm`
/// reads "allowed in [0.001, 1000] mm" (what follows the range is kept);
/// "must be 0 or greater" for `back_tension_mpa` reads "allowed 0 MPa or greater".
pub fn rule_in_unit(name: &str, rule: &str) -> String {
    let words = rule_words(rule);
    let Some(unit) = unit_of(name) else {
        return words;
    };
    // The one-sided rules of `param` (`non_negative`, `positive`).
    match words.as_str() {
        "allowed 0 or greater" => return format!("allowed 0 {unit} or greater"),
        "allowed greater than 0" => return format!("allowed greater than 0 {unit}"),
        _ => {}
    }
    let Some(range) = words.strip_prefix("allowed in ") else {
        return words;
    };
    match range.find([']', ')']) {
        Some(end) => format!("allowed in {} {unit}{}", &range[..=end], &range[end + 1..]),
        None => words,
    }
}

/// The unit a key or parameter name ends in (`_mm`, `_kg_m3`, `_m_s`, ...),
/// as the messages write it; `None` for a plain number (`friction`,
/// `draw_ratio_aim`, `eps_c`, `redundant_c`: `_c` is a temperature only in
/// a temperature's name).
pub fn unit_of(name: &str) -> Option<&'static str> {
    const SUFFIXES: [(&str, &str); 14] = [
        ("_kg_m3", "kg/m^3"),
        ("_j_kg_k", "J/(kg K)"),
        ("_m_s", "m/s"),
        ("_mm2", "mm^2"),
        ("_mm", "mm"),
        ("_mpa", "MPa"),
        ("_gpa", "GPa"),
        ("_deg", "deg"),
        ("_kw", "kW"),
        ("_kn", "kN"),
        ("_kg", "kg"),
        ("_rpm", "rpm"),
        ("_hours", "h"),
        ("_t_per_shift", "t"),
    ];
    let name = name.trim_start_matches('-').replace('-', "_");
    if let Some((_, u)) = SUFFIXES.iter().find(|(s, _)| name.ends_with(s)) {
        return Some(u);
    }
    let temperature =
        name.ends_with("_c") && (name.contains("temperature") || name.contains("ambient"));
    temperature.then_some("C")
}

fn pass_says(key: &str, problem: &crate::pass::PassError) -> String {
    match problem {
        crate::pass::PassError::Param(p) => key_says(key, p),
        other => match key.split_once(" (") {
            Some((path, note)) => format!("`{path}` ({note}: {other}"),
            None => format!("`{key}`: {other}"),
        },
    }
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
pub use ranges::{
    COIL_MASS_MAX_KG, DENSITY_RANGE_KG_M3, DIAMETER_RANGE_MM, SPECIFIC_HEAT_RANGE_J_KG_K,
    STRAIN_MAX, WIRE_TEMPERATURE_MAX_C,
};
/// Fastest finishing speed, m/s ([`ranges::SPEED_MAX_M_S`]).
pub const FINISH_SPEED_MAX_M_S: f64 = ranges::SPEED_MAX_M_S;
/// Largest block motor power, kW ([`ranges::POWER_MAX_KW`]).
pub const BLOCK_POWER_MAX_KW: f64 = ranges::POWER_MAX_KW;
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
    #[serde(
        default,
        deserialize_with = "q::opt_stress",
        skip_serializing_if = "Option::is_none"
    )]
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
    #[serde(deserialize_with = "q::stress")]
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
    #[serde(
        default,
        deserialize_with = "q::opt_length",
        skip_serializing_if = "Option::is_none"
    )]
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
    #[serde(
        default,
        deserialize_with = "q::opt_temperature",
        skip_serializing_if = "Option::is_none"
    )]
    pub wire_temperature_max_c: Option<f64>,
    /// Ambient temperature, deg C; the wire enters every die at it. Default 25.
    #[serde(
        default,
        deserialize_with = "q::opt_temperature",
        skip_serializing_if = "Option::is_none"
    )]
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
    #[serde(deserialize_with = "q::speed")]
    pub finish_speed_m_s: f64,
    /// Motor power limit per die (block), kW.
    #[serde(
        default,
        deserialize_with = "q::opt_power",
        skip_serializing_if = "Option::is_none"
    )]
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
    #[serde(deserialize_with = "q::stress")]
    pub min: f64,
    /// Highest allowed, MPa.
    #[serde(deserialize_with = "q::stress")]
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
    #[serde(
        default,
        deserialize_with = "q::opt_length",
        skip_serializing_if = "Option::is_none"
    )]
    pub die_step_mm: Option<f64>,
    /// Die sizes the die room stocks, mm: every die but the finish die is one of them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub die_sizes_mm: Option<Vec<f64>>,
    /// Which feasible design to keep: `strategy` (the default: the one
    /// `strategy` lays out) or `speed` (on a machine, each strategy is tried
    /// and the design with the highest attainable speed kept).
    #[serde(default, skip_serializing_if = "crate::design::Prefer::is_default")]
    pub prefer: crate::design::Prefer,
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
    #[serde(
        default,
        deserialize_with = "q::opt_length",
        skip_serializing_if = "Option::is_none"
    )]
    land_length_mm: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    efficiency: Option<f64>,
    #[serde(
        default,
        deserialize_with = "q::opt_stress",
        skip_serializing_if = "Option::is_none"
    )]
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

impl ScheduleFile {
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

#[cfg(test)]
mod unit_tests {
    use super::*;

    #[test]
    fn a_range_takes_the_unit_its_name_ends_in() {
        // The units as the keys spell them (README's key list, the project's own).
        assert_eq!(
            rule_in_unit("diameter_mm", "must be in [0.001, 1000]"),
            "allowed in [0.001, 1000] mm"
        );
        assert_eq!(
            rule_in_unit("density_kg_m3", "must be in [100, 30000]"),
            "allowed in [100, 30000] kg/m^3"
        );
        // What follows the range stays after the unit.
        assert_eq!(
            rule_in_unit(
                "wire_temperature_max_c",
                "must be in (25, 2000] (above 25 C)"
            ),
            "allowed in (25, 2000] C (above 25 C)"
        );
        // A plain number gets no unit; a one-sided rule gets it after its 0.
        assert_eq!(
            rule_in_unit("friction", "must be in [0, 0.5]"),
            "allowed in [0, 0.5]"
        );
        assert_eq!(
            rule_in_unit("yield_mpa", "must be greater than 0"),
            "allowed greater than 0 MPa"
        );
        assert_eq!(
            rule_in_unit("back_tension_mpa", "must be 0 or greater"),
            "allowed 0 MPa or greater"
        );
        assert_eq!(
            rule_in_unit("friction", "must be 0 or greater"),
            "allowed 0 or greater"
        );
        // `_c` names a temperature only in a temperature's name: Voce's
        // `eps_c` is a strain and `redundant_c` a coefficient.
        assert_eq!(unit_of("eps_c"), None);
        assert_eq!(unit_of("redundant_c"), None);
        assert_eq!(unit_of("ambient_c"), Some("C"));
        assert_eq!(unit_of("--shear-modulus-gpa"), Some("GPa"));
    }
}
