//! Drawing machines: the machine file model (blocks, capstans, motors,
//! cooling, limits) and the mechanics of a run of dies on it: capstan
//! speeds, slip, net block loads, the wire temperature carried from die to
//! die and the fastest finish speed the machine allows.
//!
//! Formulas (sources in docs/physics.md, "Machines, blocks and heat carried
//! die to die"):
//! - capstan surface speed `V = pi D N / 60` (D in m, N in rpm);
//! - volume constancy `v_i = v_f (D_f / D_i)^2` (common practice);
//! - net pull of the capstan after die `i`: `F_i - B_{i+1}`, its front pull
//!   less the back pull it holds on the next die (force balance on the
//!   capstan); motor load `P = (F_i - B_{i+1}) V_i / eta` (the motor also
//!   supplies the capstan's slip friction on a slip machine, where `V > v`);
//! - slip at a capstan `s = (V - v) / V`, v the wire speed on it, which is the
//!   speed into the next die (common practice);
//! - wire temperature: the wire enters die 1 at ambient, leaves die `i` at
//!   `T_in,i + dT_i` (the die's mean adiabatic rise), and between dies the
//!   machine's cooling takes off a fraction `c` of the heat it carries above
//!   ambient: `T_in,i+1 = T_a + (1 - c)(T_out,i - T_a)` (the lumped heat
//!   balance of multi-pass drawing; Wright, Wire Technology, ch. on drawing
//!   temperatures, from memory). `c = 0` sums the adiabatic rises; `c = 1`
//!   gives every die its own rise over ambient.
//!
//! Every load and speed is proportional to the finish speed, so the
//! attainable speed is the least of each block's motor and capstan-speed
//! limits. The adiabatic rise has no speed in it; with a fixed cooling
//! fraction the temperature limit holds at every speed or at none. With
//! `cooling_at_speed_m_s` the cooling falls with speed (Newtonian cooling over
//! a time on the capstan that goes as 1/v:
//! `1 - c(v) = (1 - c_ref)^(v_ref/v)`), the wire runs hotter the faster it
//! goes, and the fastest speed within the limit is found by bisection.

use std::f64::consts::PI;

use serde::{Deserialize, Serialize};

use crate::param::{self, Ends, ParamError};
use crate::size::quantity::de as q;

/// Default drive efficiency (motor to capstan: gearbox and belts), common
/// practice 0.85 to 0.95; from memory.
pub const DEFAULT_DRIVE_EFFICIENCY: f64 = 0.9;
/// Default largest slip at a capstan on a slip machine: beyond about 15 %
/// capstans wear grooves and the wire surface scuffs (common practice, from
/// memory; machine makers design the cone steps for a few per cent per step).
pub const DEFAULT_SLIP_MAX: f64 = 0.15;

// The physical ranges a machine file is checked against live with the
// schedule's, in `schedule::ranges`; the names below are kept for callers.
use crate::schedule::ranges::{AMBIENT_RANGE_C, STEP_RATIO_RANGE, WIRE_TEMPERATURE_MAX_C};
pub use crate::schedule::ranges::{
    CAPSTAN_DIAMETER_MAX_MM as MAX_CAPSTAN_DIAMETER_MM, CAPSTAN_RPM_MAX as MAX_CAPSTAN_RPM,
    POWER_MAX_KW as MAX_MOTOR_KW, SPEED_MAX_M_S as MAX_SURFACE_SPEED_M_S,
};

/// Why a machine file cannot be used, or a schedule cannot run on it.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum MachineError {
    /// The YAML is malformed or a key is unknown, missing or of the wrong type.
    #[error("{0}")]
    Syntax(String),
    /// A value is out of range (`key` is its path in the machine file).
    #[error("{}", crate::schedule::key_says(key, problem))]
    Value {
        /// Path of the key (`blocks[2].motor_kw`).
        key: String,
        /// What is wrong with it.
        problem: ParamError,
    },
    /// The schedule does not fit the machine.
    #[error("{0}")]
    DoesNotFit(String),
}

/// How the blocks of a machine move the wire.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum MachineKind {
    /// Each capstan runs at the wire speed (no slip); the tension between
    /// blocks is set by dancers or accumulation. Blocks past the last die
    /// may stand idle.
    NonSlip,
    /// Capstans on cones or steps with a fixed speed ratio between steps run
    /// faster than the wire; every capstan needs a die.
    Slip,
    /// One block, one die (a bull block or single-hole machine).
    SingleBlock,
}

impl MachineKind {
    /// The name as written in the file (`non-slip`).
    pub fn name(self) -> &'static str {
        match self {
            MachineKind::NonSlip => "non-slip",
            MachineKind::Slip => "slip",
            MachineKind::SingleBlock => "single-block",
        }
    }
}

/// One block: a capstan, its motor and limits.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Block {
    /// Capstan diameter, mm (where the wire wraps).
    #[serde(deserialize_with = "q::length")]
    pub capstan_diameter_mm: f64,
    /// Motor rating, kW (shaft output).
    #[serde(deserialize_with = "q::power")]
    pub motor_kw: f64,
    /// Highest capstan speed, rpm (give this or `max_surface_speed_m_s`, or both).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_capstan_rpm: Option<f64>,
    /// Highest capstan surface speed, m/s.
    #[serde(
        default,
        deserialize_with = "q::opt_speed",
        skip_serializing_if = "Option::is_none"
    )]
    pub max_surface_speed_m_s: Option<f64>,
    /// Motor-to-capstan efficiency, (0, 1]; default the machine's, else 0.9.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub drive_efficiency: Option<f64>,
    /// Non-slip machines: back tension the dancer before this block holds on
    /// its die, MPa (a pass's own `back_tension_mpa` wins).
    #[serde(
        default,
        deserialize_with = "q::opt_stress",
        skip_serializing_if = "Option::is_none"
    )]
    pub dancer_back_tension_mpa: Option<f64>,
    /// Slip machines: this capstan's surface speed over the previous one's
    /// (the cone step ratio), above 1; not on the first block.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub step_ratio: Option<f64>,
}

/// A drawing machine as its file describes it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Machine {
    /// Free text (`line 3`).
    #[serde(default)]
    pub name: String,
    /// `non-slip`, `slip` or `single-block`.
    pub kind: MachineKind,
    /// The blocks in wire order.
    pub blocks: Vec<Block>,
    /// Fraction of the heat the wire carries out of a die (above ambient)
    /// taken off before the next die, [0, 1]: capstan water cooling, or
    /// immersion on a wet machine.
    pub cooling_between_dies: f64,
    /// The wire speed at which `cooling_between_dies` holds, m/s; with it the
    /// cooling falls with speed (less time on the capstan), without it the
    /// fraction is the same at every speed.
    #[serde(
        default,
        deserialize_with = "q::opt_speed",
        skip_serializing_if = "Option::is_none"
    )]
    pub cooling_at_speed_m_s: Option<f64>,
    /// Drive efficiency of every block without its own, (0, 1]; default 0.9.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub drive_efficiency: Option<f64>,
    /// Highest wire temperature at a die exit, deg C (the lubricant's limit,
    /// or strain ageing of carbon steel).
    #[serde(
        default,
        deserialize_with = "q::opt_temperature",
        skip_serializing_if = "Option::is_none"
    )]
    pub wire_temperature_max_c: Option<f64>,
    /// Slip machines: largest slip allowed at a capstan; default 0.15.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub slip_max: Option<f64>,
}

/// Reads a machine file from YAML text and validates it.
pub fn parse(text: &str) -> Result<Machine, MachineError> {
    let m: Machine = serde_yaml::from_str(text).map_err(|e| {
        let said = e
            .to_string()
            .replace("expected f64", "expected a number")
            .replace("expected a borrowed string", "expected text");
        // A value with a bad unit reads `` `key.path` = value: allowed ... ``.
        MachineError::Syntax(match said.split_once(": = ") {
            Some((path, rest)) if !path.contains(' ') => format!("`{path}` = {rest}"),
            _ => plain_words(&said),
        })
    })?;
    m.validate()?;
    Ok(m)
}

/// What a required machine key holds, for the message when it is missing.
fn required_key_says(key: &str) -> &'static str {
    match key {
        "name" => "free text naming the machine",
        "kind" => "one of `non-slip`, `slip`, `single-block`",
        "blocks" => "a list of blocks in wire order, one die per block",
        "cooling_between_dies" => {
            "the fraction of the heat above ambient taken off between dies, in [0, 1] (0 for none)"
        }
        "capstan_diameter_mm" => "the capstan diameter, mm",
        "motor_kw" => "the motor rating (shaft output), kW",
        _ => "see README, \"Run a schedule on a machine\"",
    }
}

/// serde's words for a missing or unknown key, said as the schedule's
/// messages say them: the key, and what it holds or which keys are allowed.
fn plain_words(said: &str) -> String {
    if let Some((head, rest)) = said.split_once("missing field `") {
        if let Some((key, tail)) = rest.split_once('`') {
            return format!(
                "{head}the key `{key}` is missing: {}{tail}",
                required_key_says(key)
            );
        }
    }
    if let Some((head, rest)) = said.split_once("unknown field ") {
        if let Some((name, list)) = rest.split_once(", expected ") {
            let list = list.trim_start_matches("one of ");
            return format!("{head}unknown field {name}: the keys here are {list}");
        }
    }
    said.to_string()
}

fn value(key: String, r: Result<f64, ParamError>) -> Result<f64, MachineError> {
    r.map_err(|problem| MachineError::Value { key, problem })
}

impl Machine {
    /// Checks every number and the keys each kind needs or refuses.
    pub fn validate(&self) -> Result<(), MachineError> {
        if self.blocks.is_empty() {
            return Err(MachineError::Value {
                key: "blocks".into(),
                problem: ParamError::new("blocks", "[]", "needs at least one block"),
            });
        }
        if self.kind == MachineKind::SingleBlock && self.blocks.len() != 1 {
            return Err(MachineError::Value {
                key: "blocks".into(),
                problem: ParamError::new(
                    "blocks",
                    format!("{} blocks", self.blocks.len()),
                    "a single-block machine has exactly one block",
                ),
            });
        }
        value(
            "cooling_between_dies".into(),
            param::within(
                "cooling_between_dies",
                self.cooling_between_dies,
                0.0,
                1.0,
                Ends::Closed,
            ),
        )?;
        if let Some(v) = self.cooling_at_speed_m_s {
            value(
                "cooling_at_speed_m_s".into(),
                param::within(
                    "cooling_at_speed_m_s",
                    v,
                    0.0,
                    MAX_SURFACE_SPEED_M_S,
                    Ends::OpenClosed,
                ),
            )?;
        }
        if let Some(e) = self.drive_efficiency {
            value(
                "drive_efficiency".into(),
                param::within("drive_efficiency", e, 0.0, 1.0, Ends::OpenClosed),
            )?;
        }
        if let Some(t) = self.wire_temperature_max_c {
            value(
                "wire_temperature_max_c".into(),
                param::within(
                    "wire_temperature_max_c",
                    t,
                    AMBIENT_RANGE_C.0,
                    WIRE_TEMPERATURE_MAX_C,
                    Ends::OpenClosed,
                ),
            )?;
        }
        if let Some(s) = self.slip_max {
            value(
                "slip_max".into(),
                param::within("slip_max", s, 0.0, 1.0, Ends::Open),
            )?;
        }
        for (i, b) in self.blocks.iter().enumerate() {
            let key = |k: &str| format!("blocks[{i}].{k} (block {})", i + 1);
            value(
                key("capstan_diameter_mm"),
                param::within(
                    "capstan_diameter_mm",
                    b.capstan_diameter_mm,
                    0.0,
                    MAX_CAPSTAN_DIAMETER_MM,
                    Ends::OpenClosed,
                ),
            )?;
            value(
                key("motor_kw"),
                param::within("motor_kw", b.motor_kw, 0.0, MAX_MOTOR_KW, Ends::OpenClosed),
            )?;
            if b.max_capstan_rpm.is_none() && b.max_surface_speed_m_s.is_none() {
                return Err(MachineError::Value {
                    key: key("max_capstan_rpm"),
                    problem: ParamError::new(
                        "max_capstan_rpm",
                        "missing",
                        "give max_capstan_rpm or max_surface_speed_m_s (or both)",
                    ),
                });
            }
            if let Some(n) = b.max_capstan_rpm {
                value(
                    key("max_capstan_rpm"),
                    param::within("max_capstan_rpm", n, 0.0, MAX_CAPSTAN_RPM, Ends::OpenClosed),
                )?;
            }
            if let Some(v) = b.max_surface_speed_m_s {
                value(
                    key("max_surface_speed_m_s"),
                    param::within(
                        "max_surface_speed_m_s",
                        v,
                        0.0,
                        MAX_SURFACE_SPEED_M_S,
                        Ends::OpenClosed,
                    ),
                )?;
            }
            if let Some(e) = b.drive_efficiency {
                value(
                    key("drive_efficiency"),
                    param::within("drive_efficiency", e, 0.0, 1.0, Ends::OpenClosed),
                )?;
            }
            if let Some(t) = b.dancer_back_tension_mpa {
                if self.kind == MachineKind::Slip {
                    return Err(MachineError::Value {
                        key: key("dancer_back_tension_mpa"),
                        problem: ParamError::new(
                            "dancer_back_tension_mpa",
                            t,
                            "a slip machine has no dancers: give back_tension_mpa on the pass",
                        ),
                    });
                }
                value(
                    key("dancer_back_tension_mpa"),
                    param::non_negative("dancer_back_tension_mpa", t),
                )?;
            }
            match (self.kind, i, b.step_ratio) {
                (MachineKind::Slip, 0, Some(r)) => {
                    return Err(MachineError::Value {
                        key: key("step_ratio"),
                        problem: ParamError::new(
                            "step_ratio",
                            r,
                            "the first block has no step before it: leave step_ratio off",
                        ),
                    })
                }
                (MachineKind::Slip, 0, None) => {}
                (MachineKind::Slip, _, None) => return Err(MachineError::Value {
                    key: key("step_ratio"),
                    problem: ParamError::new(
                        "step_ratio",
                        "missing",
                        "a slip machine needs each capstan's speed over the one before (above 1)",
                    ),
                }),
                (MachineKind::Slip, _, Some(r)) => {
                    value(
                        key("step_ratio"),
                        param::within(
                            "step_ratio",
                            r,
                            STEP_RATIO_RANGE.0,
                            STEP_RATIO_RANGE.1,
                            Ends::Open,
                        ),
                    )?;
                }
                (_, _, Some(r)) => {
                    return Err(MachineError::Value {
                        key: key("step_ratio"),
                        problem: ParamError::new(
                            "step_ratio",
                            r,
                            "only a slip machine has fixed step ratios",
                        ),
                    })
                }
                (_, _, None) => {}
            }
        }
        Ok(())
    }

    /// The drive efficiency of block `i` (its own, the machine's, or 0.9).
    pub fn efficiency(&self, i: usize) -> f64 {
        self.blocks[i]
            .drive_efficiency
            .or(self.drive_efficiency)
            .unwrap_or(DEFAULT_DRIVE_EFFICIENCY)
    }

    /// The largest slip allowed (slip machines).
    pub fn slip_limit(&self) -> f64 {
        self.slip_max.unwrap_or(DEFAULT_SLIP_MAX)
    }

    /// Refuses a run of `draws` dies that this machine cannot take: more dies
    /// than blocks, or fewer where the kind cannot leave a block empty.
    pub fn check_fit(&self, draws: usize) -> Result<(), MachineError> {
        let n = self.blocks.len();
        let name = self.label();
        if draws > n {
            return Err(MachineError::DoesNotFit(format!(
                "the schedule has {draws} draw passes but machine {name} has {n} blocks: one die per block, so split the schedule or use a longer machine"
            )));
        }
        if draws < n && self.kind != MachineKind::NonSlip {
            return Err(MachineError::DoesNotFit(format!(
                "the schedule has {draws} draw passes but {} machine {name} has {n} blocks and cannot run a block empty (its capstan speeds are fixed to each other): give it {n} dies",
                self.kind.name()
            )));
        }
        Ok(())
    }

    fn label(&self) -> String {
        if self.name.is_empty() {
            "(unnamed)".into()
        } else {
            format!("'{}'", self.name)
        }
    }

    /// Highest surface speed of block `i`, m/s: the lower of
    /// `pi D N_max / 60` and `max_surface_speed_m_s`.
    pub fn max_surface_speed_m_s(&self, i: usize) -> f64 {
        let b = &self.blocks[i];
        let by_rpm = b
            .max_capstan_rpm
            .map(|n| surface_speed_m_s(b.capstan_diameter_mm, n))
            .unwrap_or(f64::INFINITY);
        by_rpm.min(b.max_surface_speed_m_s.unwrap_or(f64::INFINITY))
    }
}

/// Capstan surface speed `V = pi D N / 60`, m/s, from the diameter (mm) and rpm.
pub fn surface_speed_m_s(capstan_diameter_mm: f64, rpm: f64) -> f64 {
    PI * capstan_diameter_mm * 1e-3 * rpm / 60.0
}

/// Capstan speed `N = 60 V / (pi D)`, rpm, from the surface speed (m/s) and diameter (mm).
pub fn capstan_rpm(surface_speed_m_s: f64, capstan_diameter_mm: f64) -> f64 {
    60.0 * surface_speed_m_s / (PI * capstan_diameter_mm * 1e-3)
}

/// Slip `s = (V - v) / V` of a capstan at surface speed V over wire at v.
pub fn slip(surface_speed_m_s: f64, wire_speed_m_s: f64) -> f64 {
    (surface_speed_m_s - wire_speed_m_s) / surface_speed_m_s
}

/// Wire temperatures (in, out) at every die, deg C: enters die 1 at
/// `ambient_c`, leaves die `i` at `T_in + rise_i`, and the cooling removes
/// the fraction `cooling` of its heat above ambient before the next die.
pub fn carry_temperature(rises_c: &[f64], ambient_c: f64, cooling: f64) -> Vec<(f64, f64)> {
    carry_temperature_each(rises_c, ambient_c, &vec![cooling; rises_c.len()])
}

/// [`carry_temperature`] with a cooling fraction after each die.
pub fn carry_temperature_each(rises_c: &[f64], ambient_c: f64, cooling: &[f64]) -> Vec<(f64, f64)> {
    let mut t_in = ambient_c;
    rises_c
        .iter()
        .zip(cooling)
        .map(|(rise, c)| {
            let t_out = t_in + rise;
            let here = (t_in, t_out);
            t_in = ambient_c + (1.0 - c) * (t_out - ambient_c);
            here
        })
        .collect()
}

/// Cooling fraction at wire speed `v` when the fraction is `c_ref` at
/// `v_ref`: Newtonian (lumped) cooling over a time on the capstan that goes
/// as `1/v` keeps `exp(-t/tau)` of the heat, so
/// `1 - c(v) = (1 - c_ref)^(v_ref / v)` (Incropera & DeWitt, lumped
/// capacitance; from memory).
pub fn cooling_at_speed(c_ref: f64, v_ref: f64, v: f64) -> f64 {
    if c_ref >= 1.0 {
        return 1.0;
    }
    1.0 - (1.0 - c_ref).powf(v_ref / v)
}

/// One die on its block, as the machine sees it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DieLoad {
    /// Step number of the die in the schedule.
    pub step: usize,
    /// Exit diameter, mm.
    pub exit_diameter_mm: f64,
    /// Front pull out of the die, kN.
    pub front_pull_kn: f64,
    /// Back pull the capstan holds on the next die, kN.
    pub back_pull_held_kn: f64,
    /// Mean adiabatic temperature rise in the die, deg C.
    pub temperature_rise_c: f64,
}

/// What limits a machine's speed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum SpeedLimit {
    /// A block's motor rating.
    MotorRating,
    /// A capstan's highest speed.
    CapstanSpeed,
    /// The wire temperature limit (holds at no speed in this model).
    WireTemperature,
}

impl SpeedLimit {
    /// The name as written in every format (`motor-rating`).
    pub fn name(self) -> &'static str {
        match self {
            SpeedLimit::MotorRating => "motor-rating",
            SpeedLimit::CapstanSpeed => "capstan-speed",
            SpeedLimit::WireTemperature => "wire-temperature",
        }
    }
}

/// One block with its die, at the running speed.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BlockReport {
    /// Block number, from 1.
    pub block: usize,
    /// Step number of the die on it.
    pub step: usize,
    /// Capstan diameter, mm.
    pub capstan_diameter_mm: f64,
    /// Capstan speed, rpm.
    pub capstan_rpm: f64,
    /// Capstan surface speed, m/s.
    pub surface_speed_m_s: f64,
    /// Wire speed on the capstan (out of its die, into the next), m/s.
    pub wire_speed_m_s: f64,
    /// Slip `(V - v)/V` (slip machines; 0 on a non-slip block).
    pub slip: f64,
    /// Net pull: front pull less the back pull held on the next die, kN.
    pub net_pull_kn: f64,
    /// Net power at the capstan, kW: `net pull x surface speed`.
    pub net_power_kw: f64,
    /// Motor load, kW: net power over the drive efficiency.
    pub motor_load_kw: f64,
    /// Motor rating, kW.
    pub motor_kw: f64,
    /// Motor load over rating (1 = full load).
    pub motor_load: f64,
    /// Wire temperature into the die, deg C.
    pub wire_temperature_in_c: f64,
    /// Wire temperature out of the die, deg C.
    pub wire_temperature_out_c: f64,
    /// Highest capstan surface speed, m/s.
    pub max_surface_speed_m_s: f64,
}

/// A run of dies on a machine.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MachineRun {
    /// The machine's name.
    pub name: String,
    /// Its kind.
    pub kind: MachineKind,
    /// Its number of blocks (some may stand idle on a non-slip machine).
    pub blocks_available: usize,
    /// The finish speed the block figures are at, m/s.
    pub running_speed_m_s: f64,
    /// The highest finish speed within every motor rating, capstan speed and
    /// the temperature limit, m/s (`None` when the wire is too hot at any speed).
    pub attainable_speed_m_s: Option<f64>,
    /// The highest finish speed within the motors and capstans alone, m/s.
    pub mechanical_speed_m_s: f64,
    /// The block that binds.
    pub binding_block: usize,
    /// The limit that binds.
    pub binding_limit: SpeedLimit,
    /// Cooling fraction between dies.
    pub cooling_between_dies: f64,
    /// Wire temperature limit applied, deg C.
    pub wire_temperature_max_c: Option<f64>,
    /// Slip limit (slip machines).
    pub slip_max: Option<f64>,
    /// Sum of the motor loads, kW.
    pub total_motor_load_kw: f64,
    /// One row per block with a die.
    pub blocks: Vec<BlockReport>,
}

/// Runs `dies` (in block order) on `machine` at `speed_m_s` (the file's
/// finish speed) or, without one, at the attainable speed. `finish_diameter_mm`
/// is the last die's exit; `temperature_max_c` the lower of the machine's
/// and the file's limits.
pub fn run(
    machine: &Machine,
    dies: &[DieLoad],
    speed_m_s: Option<f64>,
    ambient_c: f64,
    temperature_max_c: Option<f64>,
) -> Result<MachineRun, MachineError> {
    machine.check_fit(dies.len())?;
    let last = dies
        .last()
        .ok_or_else(|| MachineError::DoesNotFit("a machine run needs a die".into()))?;
    let d_f = last.exit_diameter_mm;
    // Wire and capstan speeds per unit finish speed.
    let g: Vec<f64> = dies
        .iter()
        .map(|d| (d_f / d.exit_diameter_mm).powi(2))
        .collect();
    let mut h = g.clone();
    if machine.kind == MachineKind::Slip {
        // The last capstan finishes the wire without slip; each one before it
        // runs slower by its successor's step ratio.
        for j in (0..dies.len().saturating_sub(1)).rev() {
            h[j] = h[j + 1] / machine.blocks[j + 1].step_ratio.unwrap_or(1.0);
        }
    }
    let rises: Vec<f64> = dies.iter().map(|d| d.temperature_rise_c).collect();
    // Temperatures at finish speed s: the cooling after die j at its wire speed s g_j.
    let temps_at = |s: f64| {
        let cooling: Vec<f64> = g
            .iter()
            .map(|gj| match machine.cooling_at_speed_m_s {
                Some(v_ref) => cooling_at_speed(machine.cooling_between_dies, v_ref, s * gj),
                None => machine.cooling_between_dies,
            })
            .collect();
        carry_temperature_each(&rises, ambient_c, &cooling)
    };
    let hottest_over = |s: f64, tmax: f64| temps_at(s).iter().position(|&(_, out)| out > tmax);
    // The attainable speed: the least limit over the blocks.
    let mut best = (f64::INFINITY, 0usize, SpeedLimit::CapstanSpeed);
    for (j, d) in dies.iter().enumerate() {
        let by_speed = machine.max_surface_speed_m_s(j) / h[j];
        if by_speed < best.0 {
            best = (by_speed, j, SpeedLimit::CapstanSpeed);
        }
        let net = d.front_pull_kn - d.back_pull_held_kn;
        if net > 0.0 {
            let by_power = machine.blocks[j].motor_kw * machine.efficiency(j) / (net * h[j]);
            if by_power < best.0 {
                best = (by_power, j, SpeedLimit::MotorRating);
            }
        }
    }
    let (attainable, binding_block, binding_limit) = match temperature_max_c {
        Some(tmax) => match hottest_over(best.0, tmax) {
            None => (Some(best.0), best.1, best.2),
            Some(j) if machine.cooling_at_speed_m_s.is_none() => {
                (None, j, SpeedLimit::WireTemperature)
            }
            Some(_) => {
                // Hotter with speed: bisect for the fastest speed within the
                // limit, none if even the slowest (full cooling) is too hot.
                match hottest_over(best.0 * 1e-9, tmax) {
                    Some(j) => (None, j, SpeedLimit::WireTemperature),
                    None => {
                        let (mut lo, mut hi) = (best.0 * 1e-9, best.0);
                        for _ in 0..200 {
                            let mid = 0.5 * (lo + hi);
                            if hottest_over(mid, tmax).is_some() {
                                hi = mid;
                            } else {
                                lo = mid;
                            }
                            if hi - lo <= 1e-13 * hi {
                                break;
                            }
                        }
                        let j = hottest_over(hi, tmax).unwrap_or(0);
                        (Some(lo), j, SpeedLimit::WireTemperature)
                    }
                }
            }
        },
        None => (Some(best.0), best.1, best.2),
    };
    let running = speed_m_s.unwrap_or(attainable.unwrap_or(best.0));
    let temps = temps_at(running);
    let blocks: Vec<BlockReport> = dies
        .iter()
        .enumerate()
        .map(|(j, d)| {
            let b = &machine.blocks[j];
            let v_wire = running * g[j];
            let v_cap = running * h[j];
            let net = d.front_pull_kn - d.back_pull_held_kn;
            let net_power = net * v_cap;
            let load_kw = net_power / machine.efficiency(j);
            BlockReport {
                block: j + 1,
                step: d.step,
                capstan_diameter_mm: b.capstan_diameter_mm,
                capstan_rpm: capstan_rpm(v_cap, b.capstan_diameter_mm),
                surface_speed_m_s: v_cap,
                wire_speed_m_s: v_wire,
                slip: slip(v_cap, v_wire),
                net_pull_kn: net,
                net_power_kw: net_power,
                motor_load_kw: load_kw,
                motor_kw: b.motor_kw,
                motor_load: load_kw / b.motor_kw,
                wire_temperature_in_c: temps[j].0,
                wire_temperature_out_c: temps[j].1,
                max_surface_speed_m_s: machine.max_surface_speed_m_s(j),
            }
        })
        .collect();
    Ok(MachineRun {
        name: machine.name.clone(),
        kind: machine.kind,
        blocks_available: machine.blocks.len(),
        running_speed_m_s: running,
        attainable_speed_m_s: attainable,
        mechanical_speed_m_s: best.0,
        binding_block: binding_block + 1,
        binding_limit,
        cooling_between_dies: machine.cooling_between_dies,
        wire_temperature_max_c: temperature_max_c,
        slip_max: (machine.kind == MachineKind::Slip).then(|| machine.slip_limit()),
        total_motor_load_kw: blocks.iter().map(|b| b.motor_load_kw).sum(),
        blocks,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn surface_speed_and_rpm_are_inverse() {
        // v = pi D N / 60: a 600 mm capstan at 100 rpm moves pi 0.6 100 / 60 = pi m/s.
        assert!((surface_speed_m_s(600.0, 100.0) - PI).abs() < 1e-12);
        assert!((capstan_rpm(PI, 600.0) - 100.0).abs() < 1e-9);
    }

    #[test]
    fn temperature_limits_of_the_cooling() {
        let rises = [30.0, 40.0, 50.0];
        // No cooling: the exit temperature is ambient plus the summed rises.
        let none = carry_temperature(&rises, 20.0, 0.0);
        assert!((none[2].1 - 140.0).abs() < 1e-12);
        // Full cooling: every die is its own rise over ambient.
        let full = carry_temperature(&rises, 20.0, 1.0);
        for (t, r) in full.iter().zip(rises) {
            assert!((t.1 - (20.0 + r)).abs() < 1e-12);
        }
    }
}
