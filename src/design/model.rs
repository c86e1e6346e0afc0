//! The report model of a design: what was chosen and why, in the form every
//! output format serialises.

use serde::Serialize;

use crate::evaluation::ScheduleReport;
use crate::pass::Method;
use crate::schedule::{RatioAcross, ScheduleFile, Strategy, Window};

/// Why an anneal is in the design.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AnnealReason {
    /// The cold-work limit would be passed without it.
    ColdWork,
    /// It sets the finished strength: the remaining reduction lands the
    /// flow stress in the temper window.
    Temper,
    /// Not forced by the cold-work limit: the softened wire takes passes
    /// that save passes in all.
    FewerPasses,
}

impl AnnealReason {
    /// The name as written in every format (`cold-work`, `temper`, `fewer-passes`).
    pub fn name(self) -> &'static str {
        match self {
            AnnealReason::ColdWork => "cold-work",
            AnnealReason::Temper => "temper",
            AnnealReason::FewerPasses => "fewer-passes",
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
    /// For a temper anneal: the range of anneal diameters, mm, from which the
    /// remaining reduction lands the finished flow stress in the window (and
    /// keeps the run within the cold-work limit); the chosen one lies inside.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub window_mm: Option<DiameterRange>,
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
    /// Largest spread of the draw ratios within one run, `(max - min) / max`.
    pub run_draw_ratio_spread: f64,
    /// Spread of the draw ratios over every pass of the schedule, `(max - min) / max`.
    pub draw_ratio_spread: f64,
    /// For `equal-ratio`: where the one ratio is held (`each-run` or `whole-schedule`).
    pub ratio_across: RatioAcross,
    /// The draw ratio the passes were aimed at (at most): `target.draw_ratio_aim`,
    /// or the warn line, or the limit, whichever is the lowest a design meets.
    pub draw_ratio_aimed: f64,
    /// The dies to order: each distinct die (size, semi-angle, land) with its count.
    pub dies: Vec<DieOrder>,
    /// Die-room step or sizes the dies were rounded to, in words (`None`: full precision).
    pub die_rounding: Option<String>,
    /// Decimals (mm) the die room works to, for showing die sizes: those of
    /// `target.die_step_mm`, or the most of `target.die_sizes_mm`, at most 6;
    /// 3 without rounding (a micrometre). Not in JSON, which keeps full precision.
    #[serde(skip)]
    pub die_decimals: usize,
    /// The runs between anneals.
    pub runs: Vec<RunPlan>,
    /// The anneals, in order.
    pub anneals: Vec<AnnealPlan>,
    /// Choices and defaults that matter.
    pub notes: Vec<String>,
    /// The machine designed for (its `name`), when there is one.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub machine: Option<String>,
    /// Highest finish speed the machine allows for the design, m/s (with a
    /// machine; as `check --machine` reports it).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub attainable_speed_m_s: Option<f64>,
    /// Tonnes per shift at the attainable speed (with a machine).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub attainable_t_per_shift: Option<f64>,
}

/// A range of diameters, mm.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct DiameterRange {
    /// Smallest, mm.
    pub min_mm: f64,
    /// Largest, mm.
    pub max_mm: f64,
}

/// One line of the die list: a die the die room can make or order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DieOrder {
    /// Die (exit) size, mm.
    pub size_mm: f64,
    /// Semi-angle, degrees.
    pub semi_angle_deg: f64,
    /// Land length, mm.
    pub land_length_mm: f64,
    /// Passes of the schedule that use it.
    pub count: usize,
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

/// Which feasible design `target.prefer` keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Prefer {
    /// The design `target.strategy` lays out (the default).
    #[default]
    Strategy,
    /// On a machine: of the designs each strategy (`equal-ratio`,
    /// `equal-strain`, `tapered`) lays out at the machine's pass count and
    /// no anneal, the one with the highest attainable finish speed (m/s, as
    /// `check --machine` reports it; the tonnes per shift follow it) among
    /// those of the cleanest verdict (a design with no warning before one
    /// with), the file's strategy kept on a tie.
    Speed,
}

impl Prefer {
    /// Whether this is the default (`strategy`): the key is then not written.
    pub fn is_default(&self) -> bool {
        *self == Prefer::Strategy
    }
}
