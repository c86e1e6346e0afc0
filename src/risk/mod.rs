//! Break risk under scatter: how likely each pass of a schedule is to break
//! when friction, the flow law, rod and die sizes, back tension and die
//! angles scatter as the schedule's `scatter` block (and the material's
//! `flow_scatter`) say.
//!
//! Each sample moves every scattering input by a draw from its distribution
//! ([`distribution`]), placed by Latin hypercube or Monte Carlo ([`plan`]),
//! and evaluates every pass with the core's pass mechanics ([`model`]),
//! as `check` does. A pass breaks in a sample when its governing drawing
//! stress reaches the drawn wire's tensile strength (Considere, as `check`
//! reports it in `tensile_strength_mpa`): for wire drawn past its Considere
//! strain that is the exit flow stress, a draw ratio of 1. Statistics stream ([`stats`]):
//! memory does not grow with the number of samples, and chunks of
//! [`CHUNK_SAMPLES`] are merged in index order, so a seed gives the same
//! figures to the last bit whatever the thread count.
//!
//! The driver of each pass is the input whose standard normal score has the
//! largest Pearson correlation with the pass's draw ratio; its square is the
//! share of the ratio's variance a straight line in that input alone explains
//! (for small, near-linear scatter: the first-order sensitivity index,
//! Saltelli et al., *Global Sensitivity Analysis*, 2008; from memory). It is
//! chosen over a rank correlation because it streams: Spearman's needs every
//! sample's rank.

pub mod considere;
pub mod distribution;
pub mod model;
pub mod plan;
mod report;
pub mod scatter;
pub mod stats;

use std::sync::atomic::{AtomicBool, Ordering};

use rayon::prelude::*;
use serde::Serialize;

use crate::evaluation::{self, EvaluateOptions};
use crate::machine::Machine;
use crate::param::ParamError;
use crate::pass::Method;
use crate::schedule::{ScheduleError, ScheduleFile};

pub use distribution::{Law, Shape, Spread};
pub use model::{BlockLimit, Driver, Model, SampleOut, Spreads};
pub use plan::{Plan, Sampling};
pub use scatter::{Correlation, DieSpread, FlowScatter, FlowSpread, Scatter};
pub use stats::Tally;

/// Default number of samples: enough for the 95 % interval of a 1 %
/// probability to be within +-20 % of it, `1.96^2 x 0.99 / (0.01 x 0.2^2)
/// = 9,508`, rounded up.
pub const DEFAULT_SAMPLES: u64 = 10_000;
/// Most samples a run may ask for (the histogram counts are 32-bit).
pub const MAX_SAMPLES: u64 = 1_000_000_000;
/// Samples per chunk: the unit of work and of the fixed-order merge.
pub const CHUNK_SAMPLES: u64 = 1024;
/// Chunks evaluated in parallel between two merges (bounds the memory).
pub const CHUNKS_PER_ROUND: u64 = 16;
/// Relative half-width of the 95 % interval above which a probability is
/// reported as too uncertain.
pub const RELATIVE_PRECISION: f64 = 0.2;

/// What the figures are and are not: printed on every risk report.
pub const SCOPE: &str = "These probabilities are those of the model under the scatter given: how often the calculated drawing stress reaches the calculated wire strength. They are not a forecast of breaks per tonne: breaks from inclusions, surface defects, welds, die chips and handling are outside the model.";

/// Why a risk run cannot be done.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RiskError {
    /// The schedule itself is not valid (the same error `check` gives).
    #[error(transparent)]
    Schedule(#[from] ScheduleError),
    /// A value of the scatter block or an option is out of range.
    #[error(transparent)]
    Value(#[from] ParamError),
    /// The nominal schedule could not be evaluated.
    #[error("evaluating the nominal schedule: {0}")]
    Nominal(String),
    /// Stopped by the caller before the end.
    #[error("stopped before the end: nothing was reported")]
    Cancelled,
}

/// How to run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RiskOptions {
    /// Number of samples.
    pub samples: u64,
    /// Seed of the random streams.
    pub seed: u64,
    /// Latin hypercube or Monte Carlo.
    pub sampling: Sampling,
    /// Governing method, overriding the file.
    pub method: Option<Method>,
    /// Break probability of the whole schedule to design for.
    pub target_probability: Option<f64>,
}

impl Default for RiskOptions {
    fn default() -> Self {
        Self {
            samples: DEFAULT_SAMPLES,
            seed: 0,
            sampling: Sampling::LatinHypercube,
            method: None,
            target_probability: None,
        }
    }
}

/// One input that scatters, as the report lists it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InputScatter {
    /// The input, in the file's key (`friction`, `flow.k_mpa`).
    pub input: String,
    /// Its distribution in words.
    pub distribution: String,
    /// Correlation between dies, for per-die inputs.
    pub between_dies: Option<f64>,
    /// Where it came from: `scatter` or `material.flow_scatter`.
    pub source: String,
    /// The law behind `distribution`, in the input's own unit (the unit its
    /// key names: `_mm`, `_mpa`), for a report shown in other units.
    #[serde(skip)]
    pub law: Law,
}

/// An input's correlation with a pass's draw ratio.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DriverShare {
    /// The input (`friction`, `die diameter`, `flow k_mpa`, ...).
    pub input: String,
    /// Pearson correlation of its normal score with the draw ratio.
    pub correlation: f64,
    /// `correlation^2`: share of the ratio's variance a line in this input alone explains.
    pub share: f64,
}

/// One draw pass under scatter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PassRisk {
    /// Step number in the schedule, from 1 (as `check`).
    pub step: usize,
    /// Nominal exit diameter, mm.
    pub exit_diameter_mm: f64,
    /// Nominal draw ratio (exactly `check`'s).
    pub draw_ratio: f64,
    /// Nominal tensile strength of the wire after the pass, MPa (exactly `check`'s).
    pub tensile_strength_mpa: f64,
    /// Probability that the governing drawing stress reaches the drawn
    /// wire's tensile strength (break).
    pub break_probability: f64,
    /// Its standard error.
    pub break_standard_error: f64,
    /// Probability of a draw ratio over `draw_ratio_warn`.
    pub over_warn_probability: f64,
    /// Its standard error.
    pub over_warn_standard_error: f64,
    /// Probability of a draw ratio over `draw_ratio_max`.
    pub over_max_probability: f64,
    /// Its standard error.
    pub over_max_standard_error: f64,
    /// Probability that the block after the die is over its rating: its net
    /// power over `line.block_power_kw`, or on a machine its motor load
    /// (net pull, drive efficiency) over the block's `motor_kw`, by the test
    /// `check` flags `over-block-power` with.
    pub over_block_power_probability: Option<f64>,
    /// Its standard error.
    pub over_block_power_standard_error: Option<f64>,
    /// 5th percentile of the draw ratio.
    pub draw_ratio_p5: Option<f64>,
    /// Median draw ratio.
    pub draw_ratio_p50: Option<f64>,
    /// 95th percentile.
    pub draw_ratio_p95: Option<f64>,
    /// 99th percentile.
    pub draw_ratio_p99: Option<f64>,
    /// Least draw ratio sampled.
    pub lowest_draw_ratio: f64,
    /// Greatest draw ratio sampled.
    pub highest_draw_ratio: f64,
    /// The input with the largest |correlation|.
    pub main_driver: Option<String>,
    /// Every scattering input that reaches this pass, largest |correlation| first.
    pub drivers: Vec<DriverShare>,
}

/// The whole schedule under scatter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RiskSummary {
    /// Samples asked for.
    pub samples: u64,
    /// Samples evaluated.
    pub samples_used: u64,
    /// Samples whose drawn inputs the model refused (counted in no probability).
    pub samples_refused: u64,
    /// Probability that at least one pass breaks.
    pub any_break_probability: f64,
    /// Its standard error.
    pub any_break_standard_error: f64,
    /// With no break sampled: the 95 % upper bound `3 / N`.
    pub any_break_upper_95: Option<f64>,
    /// Probability that at least one pass is over the max line.
    pub any_over_max_probability: f64,
    /// Its standard error.
    pub any_over_max_standard_error: f64,
    /// The pass most likely to break (on equal probability: the higher 99th percentile).
    pub weakest_step: usize,
    /// Its break probability.
    pub weakest_break_probability: f64,
    /// What drives it.
    pub weakest_main_driver: Option<String>,
    /// The schedule break probability asked for.
    pub target_probability: Option<f64>,
    /// The `1 - target` quantile of each sample's greatest draw ratio.
    pub worst_draw_ratio_at_target: Option<f64>,
    /// Factor on every pass's draw ratio that brings the schedule to the
    /// target (`1 / worst_draw_ratio_at_target`; below 1: a cut is needed).
    pub draw_ratio_scale_for_target: Option<f64>,
    /// Nominal draw ratio the weakest pass alone would need for its own break
    /// probability to be at the target.
    pub weakest_draw_ratio_for_target: Option<f64>,
    /// `within-target`, `over-target`, `too-few-samples` (the target is
    /// reached by fewer than 10 samples' worth of tail, so neither is shown),
    /// or `no-target`.
    pub verdict: String,
}

/// The neutral report every format renders.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RiskReport {
    /// The file's title.
    pub title: String,
    /// The material's label.
    pub material: String,
    /// The governing method.
    pub method: Method,
    /// Where it came from.
    pub method_source: String,
    /// `latin-hypercube` or `monte-carlo`.
    pub sampling: Sampling,
    /// The seed.
    pub seed: u64,
    /// The warn line.
    pub draw_ratio_warn: f64,
    /// The max line.
    pub draw_ratio_max: f64,
    /// The inputs that scatter.
    pub scatter: Vec<InputScatter>,
    /// One per draw pass.
    pub passes: Vec<PassRisk>,
    /// The summary.
    pub summary: RiskSummary,
    /// Too few samples, refused samples, uncertain scatter.
    pub warnings: Vec<String>,
    /// How the figures were made.
    pub notes: Vec<String>,
    /// What the probability is and is not.
    pub scope: String,
    /// The caution footer.
    pub caution: String,
    /// The figures with a unit the notes quote, for a report shown in other
    /// units: the machine's running speed, m/s, and the line's block power
    /// limit, kW (each `None` when no note quotes it).
    #[serde(skip)]
    pub quoted: QuotedFigures,
}

/// Figures with a unit that a risk note quotes (SI), so that a report in
/// other units can show them converted.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct QuotedFigures {
    /// The machine's running speed in the over-block-power note, m/s
    /// (quoted as `{:.3} m/s`).
    pub running_speed_m_s: Option<f64>,
    /// `line.block_power_kw` in the over-block-power note, kW (quoted as `{} kW`).
    pub block_power_kw: Option<f64>,
}

impl RiskReport {
    /// Whether the schedule's break probability is over the target.
    pub fn is_over_target(&self) -> bool {
        self.summary.verdict == "over-target"
    }
}

/// The spreads of `file` and the list the report shows.
pub fn spreads(file: &ScheduleFile) -> Result<(Spreads, Vec<InputScatter>), RiskError> {
    let none = Scatter::default();
    let sc = file.scatter.as_ref().unwrap_or(&none);
    let mut listed = Vec::new();
    let mut die = |s: &Option<Spread>, key: &str| -> Result<Option<DieSpread>, RiskError> {
        let Some(s) = s else { return Ok(None) };
        let d = scatter::die_spread(s, &format!("scatter.{key}"))?;
        listed.push(InputScatter {
            input: key.to_string(),
            distribution: d.law.describe(),
            between_dies: Some(d.between_dies),
            law: d.law,
            source: "scatter".into(),
        });
        Ok(Some(d))
    };
    let friction = die(&sc.friction, "friction")?;
    let semi_angle = die(&sc.semi_angle_deg, "semi_angle_deg")?;
    let die_diameter = die(&sc.die_diameter_mm, "die_diameter_mm")?;
    let back_tension = die(&sc.back_tension_mpa, "back_tension_mpa")?;
    let rod = match &sc.rod_diameter_mm {
        Some(s) => {
            let l = scatter::single_spread(s, "scatter.rod_diameter_mm")?;
            listed.push(InputScatter {
                input: "rod_diameter_mm".into(),
                distribution: l.describe(),
                between_dies: None,
                law: l,
                source: "scatter".into(),
            });
            Some(l)
        }
        None => None,
    };
    let (flow_scatter, source) = match (&sc.flow, &file.material.flow_scatter) {
        (Some(f), _) => (Some(f), "scatter.flow"),
        (None, Some(f)) => (Some(f), "material.flow_scatter"),
        (None, None) => (None, ""),
    };
    let flow = match flow_scatter {
        Some(f) => {
            let s = f.spread(&file.material.flow, source)?;
            for (k, sd) in s.keys.iter().zip(&s.sd) {
                listed.push(InputScatter {
                    input: format!("flow.{k}"),
                    distribution: format!("normal, sd {sd}"),
                    between_dies: None,
                    law: Law::Normal {
                        sd: Some(*sd),
                        cv: None,
                    },
                    source: source.to_string(),
                });
            }
            Some(s)
        }
        None => None,
    };
    Ok((
        Spreads {
            rod,
            friction,
            semi_angle,
            die_diameter,
            back_tension,
            flow,
        },
        listed,
    ))
}

/// The names of the values [`assess_keeping`] hands over per sample
/// ([`Model::sample_columns`]).
pub fn sample_columns(file: &ScheduleFile) -> Result<Vec<String>, RiskError> {
    let (spreads, _) = spreads(file)?;
    let model = Model::new(file, Method::Sachs, spreads).map_err(RiskError::Nominal)?;
    Ok(model.sample_columns())
}

/// The name of a driver in the report.
pub fn driver_name(model: &Model, d: Driver) -> String {
    match d {
        Driver::RodDiameter => "rod diameter".into(),
        Driver::EntryDiameter => "entry diameter".into(),
        Driver::DieDiameter => "die diameter".into(),
        Driver::Friction => "friction".into(),
        Driver::SemiAngle => "semi-angle".into(),
        Driver::BackTension => "back tension".into(),
        Driver::Flow(k) => format!(
            "flow {}",
            model.flow_spread.as_ref().map_or("?", |f| f.0.keys[k])
        ),
    }
}

/// The samples of one chunk as `--keep-samples` writes them: each sample's
/// values in [`Model::sample_columns`] order, and why it was refused.
#[derive(Debug, Clone, Default)]
pub struct KeptChunk {
    /// Values of every sample of the chunk, one after the other.
    pub values: Vec<f64>,
    /// Per sample: its index and, when refused, why.
    pub samples: Vec<(u64, Option<String>)>,
}

/// What receives every kept sample, in index order: its index, its values
/// in [`Model::sample_columns`] order, and why it was refused.
pub type KeepSample<'a> = &'a mut dyn FnMut(u64, &[f64], Option<&str>);

/// Evaluates chunk `c` of the plan into a tally.
pub fn run_chunk(model: &Model, plan: &Plan, nominal: &[f64], c: u64) -> Tally {
    run_chunk_keeping(model, plan, nominal, c, None)
}

/// [`run_chunk`], recording each sample into `kept` when given.
pub fn run_chunk_keeping(
    model: &Model,
    plan: &Plan,
    nominal: &[f64],
    c: u64,
    mut kept: Option<&mut KeptChunk>,
) -> Tally {
    let lo = c * CHUNK_SAMPLES;
    let hi = (lo + CHUNK_SAMPLES).min(plan.samples);
    let nd = model.drivers.len();
    let (warn, max) = model.lines();
    let block = model.has_block_power();
    let mut t = Tally::new(model.draws, nd);
    let mut rng = plan.generator();
    let mut z = vec![0.0; model.dims];
    let mut out = model.buffer();
    let prepared = model.prepare();
    for i in lo..hi {
        plan.scores(i, &mut rng, &mut z);
        let result = model.evaluate_prepared(Some(&z), prepared.as_deref(), &mut out);
        if let Some(k) = kept.as_deref_mut() {
            model.sample_values(&out, result.is_ok(), &mut k.values);
            k.samples.push((i, result.as_ref().err().cloned()));
        }
        if let Err(why) = result {
            t.rejected += 1;
            if t.first_rejection.is_none() {
                t.first_rejection = Some((i, why));
            }
            continue;
        }
        t.accepted += 1;
        let mut worst = f64::NEG_INFINITY;
        let (mut broke, mut over) = (false, false);
        for (j, p) in t.passes.iter_mut().enumerate() {
            let r = out.ratio[j];
            worst = worst.max(r);
            p.ratio.add(r);
            if out.breaks[j] {
                p.breaks += 1;
                broke = true;
            }
            if r > warn {
                p.over_warn += 1;
            }
            if r > max {
                p.over_max += 1;
                over = true;
            }
            if block && out.over_block[j] {
                p.over_power += 1;
            }
            p.lowest = p.lowest.min(r);
            p.highest = p.highest.max(r);
            let y = r - nominal[j];
            p.sum_y += y;
            p.sum_yy += y * y;
            for (acc, &zk) in p
                .inputs
                .iter_mut()
                .zip(&out.driver_scores[j * nd..(j + 1) * nd])
            {
                acc[0] += zk;
                acc[1] += zk * zk;
                acc[2] += zk * y;
            }
        }
        t.any_break += broke as u64;
        t.any_over_max += over as u64;
        t.worst.add(worst);
        t.worst_range = (t.worst_range.0.min(worst), t.worst_range.1.max(worst));
    }
    t
}

/// Samples the whole plan: chunks in parallel, merged in index order.
/// `progress` is told the samples done after each round; `cancel` is read
/// between rounds.
pub fn sample(
    model: &Model,
    plan: &Plan,
    nominal: &[f64],
    progress: &(dyn Fn(u64) + Sync),
    cancel: &AtomicBool,
) -> Result<Tally, RiskError> {
    sample_keeping(model, plan, nominal, progress, cancel, None)
}

/// [`sample`], handing every sample to `keep` in index order when given
/// (a round's samples are held until they are handed over, so memory stays
/// bounded by [`CHUNKS_PER_ROUND`] chunks).
pub fn sample_keeping(
    model: &Model,
    plan: &Plan,
    nominal: &[f64],
    progress: &(dyn Fn(u64) + Sync),
    cancel: &AtomicBool,
    mut keep: Option<KeepSample<'_>>,
) -> Result<Tally, RiskError> {
    let width = model.sample_columns().len();
    let chunks = plan.samples.div_ceil(CHUNK_SAMPLES);
    let mut total = Tally::new(model.draws, model.drivers.len());
    let mut c = 0;
    while c < chunks {
        if cancel.load(Ordering::Relaxed) {
            return Err(RiskError::Cancelled);
        }
        let end = (c + CHUNKS_PER_ROUND).min(chunks);
        let keeping = keep.is_some();
        let round: Vec<(Tally, KeptChunk)> = (c..end)
            .into_par_iter()
            .map(|k| {
                let mut kept = KeptChunk::default();
                let t = run_chunk_keeping(model, plan, nominal, k, keeping.then_some(&mut kept));
                (t, kept)
            })
            .collect();
        for (t, kept) in &round {
            total.merge(t);
            if let Some(f) = keep.as_mut() {
                for ((i, why), values) in kept.samples.iter().zip(kept.values.chunks(width)) {
                    f(*i, values, why.as_deref());
                }
            }
        }
        c = end;
        progress((c * CHUNK_SAMPLES).min(plan.samples));
    }
    if cancel.load(Ordering::Relaxed) {
        return Err(RiskError::Cancelled);
    }
    Ok(total)
}

fn check_options(o: &RiskOptions) -> Result<(), RiskError> {
    if !(1..=MAX_SAMPLES).contains(&o.samples) {
        return Err(ParamError::new(
            "--samples",
            o.samples,
            format!("must be in [1, {MAX_SAMPLES}]"),
        )
        .into());
    }
    if let Some(p) = o.target_probability {
        crate::param::within(
            "--target-probability",
            p,
            0.0,
            1.0,
            crate::param::Ends::Open,
        )?;
    }
    Ok(())
}

/// Runs the break-risk assessment of `file` (a schedule with passes).
pub fn assess(
    file: &ScheduleFile,
    options: &RiskOptions,
    progress: &(dyn Fn(u64) + Sync),
    cancel: &AtomicBool,
) -> Result<RiskReport, RiskError> {
    assess_on(file, options, None, progress, cancel)
}

/// [`assess`] on `machine` (the schedule's `machine:` or `--machine`): the
/// nominal schedule is `check`'s on that machine (`evaluation::evaluate_on`),
/// the dancers give the back tension of a pass that has none, and each
/// block's load is held to its own motor.
pub fn assess_on(
    file: &ScheduleFile,
    options: &RiskOptions,
    machine: Option<&Machine>,
    progress: &(dyn Fn(u64) + Sync),
    cancel: &AtomicBool,
) -> Result<RiskReport, RiskError> {
    assess_keeping(file, options, machine, progress, cancel, None)
}

/// [`assess_on`], handing every sample to `keep` (index order) when given,
/// with its values in [`sample_columns`] order.
pub fn assess_keeping(
    file: &ScheduleFile,
    options: &RiskOptions,
    machine: Option<&Machine>,
    progress: &(dyn Fn(u64) + Sync),
    cancel: &AtomicBool,
    keep: Option<KeepSample<'_>>,
) -> Result<RiskReport, RiskError> {
    check_options(options)?;
    let check = evaluation::evaluate_on(
        file,
        &EvaluateOptions {
            method: options.method,
        },
        machine,
    )?;
    let (spreads, listed) = spreads(file)?;
    let on = match (machine, &check.machine) {
        (Some(m), Some(run)) => Some((m, run)),
        _ => None,
    };
    let model = Model::on(file, check.method, spreads, on).map_err(RiskError::Nominal)?;
    let mut nominal_out = model.buffer();
    model
        .evaluate(None, &mut nominal_out)
        .map_err(RiskError::Nominal)?;
    let nominal = nominal_out.ratio.clone();
    let nominal_strength = nominal_out.tensile_strength_mpa.clone();
    let plan = Plan::new(options.samples, options.seed, options.sampling, model.dims);
    let tally = sample_keeping(&model, &plan, &nominal, progress, cancel, keep)?;
    Ok(report::build_report(
        file,
        options,
        &check,
        &model,
        &listed,
        (&nominal, &nominal_strength),
        &tally,
    ))
}

/// SplitMix64 uniforms in `[lo, hi)` (Steele, Lea & Flood 2014), a small
/// deterministic generator for the risk modules' unit tests' cases.
#[cfg(test)]
pub(crate) fn test_uniforms(seed: u64) -> impl FnMut(f64, f64) -> f64 {
    let mut x = seed;
    move |lo, hi| {
        x = x.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = x;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        lo + (hi - lo) * ((z >> 11) as f64 / (1u64 << 53) as f64)
    }
}
