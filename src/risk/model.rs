//! One sample of a schedule: the nominal steps with each scattering input
//! moved by its drawn score, evaluated pass by pass with the core's pass
//! mechanics as `check` does ([`PreparedPass`], the governing method's
//! stress only: the value `analyse_pass` gives; the draw ratio is the
//! governing drawing stress over the exit flow stress). A pass breaks when
//! the governing drawing stress reaches the drawn wire's tensile strength
//! from the Considere condition (`evaluation::strength`, as `check` reports
//! it): the exit flow stress for wire drawn past its Considere strain. The
//! block after each die carries the net pull, front less the back pull it
//! holds on the next die, held to `line.block_power_kw` or, on a machine, to
//! its motor ([`BlockLimit`]), as check's line and machine stages do.

use crate::evaluation::strength;
use crate::flow::{FlowLaw, FlowLawSpec};
use crate::machine::{Machine, MachineKind, MachineRun};
use crate::pass::{self, Die, DrawPass, Method, PreparedPass, Settings};
use crate::schedule::{ScheduleFile, Step};

use super::considere::{bisect, ConsidereSolver, Scan};
use super::distribution::{Law, Sampler};
use super::scatter::{flow_param, DieSpread, FlowSpread};

/// A nominal step.
#[derive(Debug, Clone, PartialEq)]
pub enum NominalStep {
    /// An anneal.
    Anneal,
    /// A draw pass.
    Draw {
        /// Step number in the schedule, from 1.
        step: usize,
        /// Exit (die) diameter, mm.
        exit_diameter_mm: f64,
        /// The die.
        die: Die,
        /// Back tension, MPa (0 when the pass has none).
        back_tension_mpa: f64,
    },
}

/// A per-die input and where its scores sit in a sample's score vector:
/// one common score (unless the dies are independent) and one per draw pass
/// (unless they move together).
#[derive(Debug, Clone, PartialEq)]
pub struct DieInput {
    /// The distribution and correlation between dies.
    pub spread: DieSpread,
    /// The distribution fixed at each draw pass's nominal value.
    pub samplers: Vec<Sampler>,
    /// Index of the common score, when `between_dies > 0`.
    pub common_dim: Option<usize>,
    /// Index of the first pass's own score, when `between_dies < 1`.
    pub own_dim: Option<usize>,
    /// `(sqrt(r), sqrt(1 - r))`.
    pub weights: (f64, f64),
}

impl DieInput {
    /// The standard normal score of pass `j`: `sqrt(r) z0 + sqrt(1 - r) e_j`.
    fn score(&self, z: &[f64], j: usize) -> f64 {
        let common = self.common_dim.map_or(0.0, |k| self.weights.0 * z[k]);
        let own = self.own_dim.map_or(0.0, |k| self.weights.1 * z[k + j]);
        common + own
    }
}

/// The inputs whose correlation with each pass's draw ratio is reported.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Driver {
    /// The rod diameter (sets the strain accumulated before each pass).
    RodDiameter,
    /// The entry diameter: the previous die, or the rod for the first pass.
    EntryDiameter,
    /// This pass's die diameter.
    DieDiameter,
    /// This die's friction.
    Friction,
    /// This die's semi-angle.
    SemiAngle,
    /// This pass's back tension.
    BackTension,
    /// A flow-law parameter (index into the flow keys).
    Flow(usize),
}

/// The schedule prepared for sampling.
#[derive(Debug, Clone)]
pub struct Model {
    /// The governing method.
    pub method: Method,
    settings: Settings,
    /// The steps.
    pub steps: Vec<NominalStep>,
    /// Number of draw passes.
    pub draws: usize,
    start_diameter_mm: f64,
    start_strain: f64,
    flow: FlowLaw,
    annealed: FlowLaw,
    /// Considere strains of the nominal laws.
    considere: (Option<f64>, Option<f64>),
    /// The annealed law is the drawn law (no `annealed_flow`): a sample's
    /// deviations then give one law, solved once.
    annealed_is_flow: bool,
    /// Considere solvers warmed on the nominal laws (drawn, annealed).
    solvers: (ConsidereSolver, ConsidereSolver),
    finish_speed_m_s: Option<f64>,
    /// What a block's load is held to, when anything.
    block_limit: Option<BlockLimit>,
    /// Per draw pass: whether the next step is a draw, whose back pull the
    /// capstan after this die holds.
    holds_next: Vec<bool>,
    warn: f64,
    max: f64,
    /// Rod diameter sampler and its score index.
    pub rod: Option<(Sampler, usize)>,
    /// Friction.
    pub friction: Option<DieInput>,
    /// Semi-angle.
    pub semi_angle: Option<DieInput>,
    /// Die diameter.
    pub die_diameter: Option<DieInput>,
    /// Back tension.
    pub back_tension: Option<DieInput>,
    /// Flow-law scatter and the index of its first score.
    pub flow_spread: Option<(FlowSpread, usize)>,
    /// Number of scores a sample needs.
    pub dims: usize,
    /// The inputs reported as drivers, in report order.
    pub drivers: Vec<Driver>,
}

/// The Considere strain of the law in force, as far as a sample has needed
/// it: `strength::tensile_strength_mpa` is `sigma(eps_u) e^(eps - eps_u)`
/// below `eps_u` and `sigma(eps)` past it, and for a pass to break the
/// governing stress must reach it. Most passes are decided by the scan's
/// bracket alone; the bisection runs only for a pass it cannot decide, and
/// then gives the very bits `check` has.
#[derive(Debug, Clone, Copy)]
enum Necking {
    /// `eps_u` (or none) and `sigma(eps_u)`.
    Known(Option<f64>, Option<f64>),
    /// `eps_u` in `[lo, hi]`, with `sigma(lo)`, `sigma(hi)`.
    Bracket {
        lo: f64,
        hi: f64,
        stress_lo: f64,
        stress_hi: f64,
    },
}

impl Necking {
    fn known(law: &FlowLaw, eps_u: Option<f64>) -> Self {
        Necking::Known(eps_u, eps_u.map(|e| law.stress_mpa(e)))
    }

    fn scan(solver: &ConsidereSolver, law: &FlowLaw) -> Self {
        match solver.scan(law) {
            Scan::Solved(e) => Self::known(law, e),
            Scan::Bracket { lo, hi } => Necking::Bracket {
                lo,
                hi,
                stress_lo: law.stress_mpa(lo),
                stress_hi: law.stress_mpa(hi),
            },
        }
    }

    /// Whether a pass with `governing` stress, drawn to `strain`, breaks,
    /// and the wire's strength when it was computed (NaN when the bracket
    /// decided without it).
    fn breaks(
        &mut self,
        law: &FlowLaw,
        governing: f64,
        strain: f64,
        flow_exit: f64,
    ) -> (bool, f64) {
        let (eps_u, stress_u) = match *self {
            Necking::Known(e, s) => (e, s),
            Necking::Bracket {
                lo,
                hi,
                stress_lo,
                stress_hi,
            } => {
                if strain >= hi {
                    // Past every eps_u in the bracket: the exit flow stress.
                    return (governing >= flow_exit, flow_exit);
                }
                if strain < lo {
                    // sigma(e) e^(strain - e) is unimodal on the bracket (its
                    // log's slope is sigma'/sigma - 1, positive then
                    // negative), so at eps_u it is at least the lower of its
                    // ends; a margin of 1e-12 covers the rounding of both.
                    let least =
                        (stress_lo * (strain - lo).exp()).min(stress_hi * (strain - hi).exp());
                    if governing < least * (1.0 - 1e-12) {
                        return (false, f64::NAN);
                    }
                }
                let e = bisect(law, lo, hi);
                let s = law.stress_mpa(e);
                *self = Necking::Known(Some(e), Some(s));
                (Some(e), Some(s))
            }
        };
        // strength::tensile_strength_mpa with sigma(eps_u) computed once per
        // law and sigma(strain) the exit flow stress.
        let uts = match (eps_u, stress_u) {
            (Some(e), Some(s)) if strain < e => s * (strain - e).exp(),
            _ => flow_exit,
        };
        (governing >= uts, uts)
    }
}

/// Inputs a sample records per draw pass (see [`Model::sample_columns`]).
const DRAWN_PER_PASS: usize = 4;

/// What a block's load is held to: the same test `check` flags
/// `over-block-power` by.
#[derive(Debug, Clone, PartialEq)]
pub enum BlockLimit {
    /// A line with `block_power_kw`: the net power `(F_i - B_i+1) v_i` over it.
    Line {
        /// `line.block_power_kw`, kW.
        limit_kw: f64,
    },
    /// A machine: block `i`'s motor load `(F_i - B_i+1) V_i / eta_i` over
    /// its `motor_kw` (beyond `1 + 1e-9`, check's margin at the limit), at
    /// the speed `check` runs it (the file's finish speed, else the
    /// attainable one), held for every sample.
    Machine {
        /// The finish speed the machine runs at, m/s.
        running_speed_m_s: f64,
        /// Slip machine: the capstan speeds are fixed by the step ratios
        /// (per unit finish speed, `h_i`); otherwise each capstan runs at
        /// the wire speed off its die, `(d_f / d_i)^2` of the sample's sizes.
        fixed_capstan_speed: Option<Vec<f64>>,
        /// Drive efficiency of each block.
        efficiency: Vec<f64>,
        /// Motor rating of each block, kW.
        motor_kw: Vec<f64>,
    },
}

/// What one sample gives per draw pass.
#[derive(Debug, Clone, Default)]
pub struct SampleOut {
    /// Draw ratio per draw pass.
    pub ratio: Vec<f64>,
    /// Whether the pass breaks: the governing drawing stress at or over the
    /// drawn wire's tensile strength.
    pub breaks: Vec<bool>,
    /// Tensile strength of the wire after each pass, MPa (Considere; the
    /// exit flow stress when the law has no Considere strain).
    pub tensile_strength_mpa: Vec<f64>,
    /// Net power per draw pass, kW (with a line or a machine): front pull
    /// less the back pull held on the next die, times the capstan speed.
    pub power_kw: Vec<f64>,
    /// Per draw pass: the block's load over its rating (line:
    /// `block_power_kw`; machine: the motor's `motor_kw` with the drive
    /// efficiency), with a limit.
    pub block_load: Vec<f64>,
    /// Per draw pass: over the block's rating, as check flags it.
    pub over_block: Vec<bool>,
    /// Per draw pass, the score of each driver (`drivers` order), flattened.
    pub driver_scores: Vec<f64>,
    exits: Vec<f64>,
    die_z: Vec<f64>,
    front_kn: Vec<f64>,
    back_mpa: Vec<f64>,
    /// Per draw pass: exit diameter, friction, semi-angle, back tension as
    /// drawn (NaN past a pass that refused the sample).
    drawn: Vec<f64>,
    /// The rod diameter drawn, mm.
    rod_mm: f64,
    flow_dev: Vec<f64>,
}

/// The spreads a model samples.
#[derive(Debug, Clone, Default)]
pub struct Spreads {
    /// Rod diameter.
    pub rod: Option<Law>,
    /// Friction.
    pub friction: Option<DieSpread>,
    /// Semi-angle.
    pub semi_angle: Option<DieSpread>,
    /// Die diameter.
    pub die_diameter: Option<DieSpread>,
    /// Back tension.
    pub back_tension: Option<DieSpread>,
    /// Flow law.
    pub flow: Option<FlowSpread>,
}

impl Model {
    /// Prepares `file` (already checked by `evaluation::evaluate`) with `method`.
    pub fn new(file: &ScheduleFile, method: Method, spreads: Spreads) -> Result<Self, String> {
        Self::on(file, method, spreads, None)
    }

    /// [`Model::new`] on a machine, with the run `check` made of it
    /// (`evaluation::evaluate_on`): the machine's dancers give the back
    /// tension of a pass that has none, and each block's load is held to
    /// its motor.
    pub fn on(
        file: &ScheduleFile,
        method: Method,
        spreads: Spreads,
        machine: Option<(&Machine, &MachineRun)>,
    ) -> Result<Self, String> {
        let mut steps = Vec::with_capacity(file.passes.len());
        let mut draw_no = 0;
        for (i, s) in file.passes.iter().enumerate() {
            steps.push(match s {
                Step::Anneal => NominalStep::Anneal,
                Step::Draw(d) => {
                    let angle = d
                        .die
                        .semi_angle_deg
                        .or(file.dies.semi_angle_deg)
                        .ok_or_else(|| format!("passes[{i}]: no semi_angle_deg"))?;
                    // As check lays it out: the pass's own back tension, else
                    // the dancer of the block it runs on.
                    let dancer = machine
                        .and_then(|(m, _)| m.blocks.get(draw_no))
                        .and_then(|b| b.dancer_back_tension_mpa);
                    draw_no += 1;
                    NominalStep::Draw {
                        step: i + 1,
                        exit_diameter_mm: d.exit.mm(),
                        die: file.die_for(&d.die, angle).map_err(|e| e.to_string())?,
                        back_tension_mpa: d.back_tension_mpa.or(dancer).unwrap_or(0.0),
                    }
                }
            });
        }
        let draws = steps
            .iter()
            .filter(|s| matches!(s, NominalStep::Draw { .. }))
            .count();
        let mut dims = 0;
        let mut drivers = Vec::new();
        let start_diameter_mm = file.start.diameter.mm();
        let rod = spreads.rod.map(|l: Law| {
            dims += 1;
            drivers.push(Driver::RodDiameter);
            drivers.push(Driver::EntryDiameter);
            (l.at(start_diameter_mm), dims - 1)
        });
        let nominal = |f: &dyn Fn(&NominalStep) -> Option<f64>| -> Vec<f64> {
            steps.iter().filter_map(f).collect()
        };
        let exits = nominal(&|s| match s {
            NominalStep::Draw {
                exit_diameter_mm, ..
            } => Some(*exit_diameter_mm),
            NominalStep::Anneal => None,
        });
        let mus = nominal(&|s| match s {
            NominalStep::Draw { die, .. } => Some(die.friction),
            NominalStep::Anneal => None,
        });
        let angles = nominal(&|s| match s {
            NominalStep::Draw { die, .. } => Some(die.semi_angle_deg),
            NominalStep::Anneal => None,
        });
        let backs = nominal(&|s| match s {
            NominalStep::Draw {
                back_tension_mpa, ..
            } => Some(*back_tension_mpa),
            NominalStep::Anneal => None,
        });
        fn die_input(
            s: Option<DieSpread>,
            d: Driver,
            dims: &mut usize,
            drivers: &mut Vec<Driver>,
            nominal: &[f64],
        ) -> Option<DieInput> {
            s.map(|spread| {
                let r = spread.between_dies;
                let common_dim = (r > 0.0).then(|| {
                    *dims += 1;
                    *dims - 1
                });
                let own_dim = (r < 1.0).then(|| {
                    *dims += nominal.len();
                    *dims - nominal.len()
                });
                drivers.push(d);
                // Back tension scatters only where there is one.
                let samplers = nominal
                    .iter()
                    .map(|&m| {
                        if d == Driver::BackTension && m == 0.0 {
                            Sampler::Fixed(0.0)
                        } else {
                            spread.law.at(m)
                        }
                    })
                    .collect();
                DieInput {
                    spread,
                    samplers,
                    common_dim,
                    own_dim,
                    weights: (r.sqrt(), (1.0 - r).sqrt()),
                }
            })
        }
        let die_diameter = die_input(
            spreads.die_diameter,
            Driver::DieDiameter,
            &mut dims,
            &mut drivers,
            &exits,
        );
        if die_diameter.is_some() && rod.is_none() {
            drivers.push(Driver::EntryDiameter);
        }
        let friction = die_input(
            spreads.friction,
            Driver::Friction,
            &mut dims,
            &mut drivers,
            &mus,
        );
        let semi_angle = die_input(
            spreads.semi_angle,
            Driver::SemiAngle,
            &mut dims,
            &mut drivers,
            &angles,
        );
        let back_tension = die_input(
            spreads.back_tension,
            Driver::BackTension,
            &mut dims,
            &mut drivers,
            &backs,
        );
        let flow_spread = spreads.flow.map(|f| {
            let first = dims;
            dims += f.keys.len();
            for k in 0..f.keys.len() {
                drivers.push(Driver::Flow(k));
            }
            (f, first)
        });
        let line = file.line.as_ref();
        let block_limit = match machine {
            Some((m, run)) => Some(BlockLimit::Machine {
                running_speed_m_s: run.running_speed_m_s,
                fixed_capstan_speed: (m.kind == MachineKind::Slip).then(|| {
                    // As machine::run: the last capstan at the finish speed,
                    // each one before it slower by its successor's step ratio.
                    let mut h = vec![1.0; draws];
                    for j in (0..draws.saturating_sub(1)).rev() {
                        h[j] = h[j + 1] / m.blocks[j + 1].step_ratio.unwrap_or(1.0);
                    }
                    h
                }),
                efficiency: (0..draws).map(|j| m.efficiency(j)).collect(),
                motor_kw: m.blocks.iter().take(draws).map(|b| b.motor_kw).collect(),
            }),
            None => match line {
                Some(l) => l
                    .block_power_kw
                    .map(|limit_kw| BlockLimit::Line { limit_kw }),
                None => None,
            },
        };
        let holds_next = {
            let mut v = Vec::with_capacity(draws);
            for (i, s) in steps.iter().enumerate() {
                if matches!(s, NominalStep::Draw { .. }) {
                    v.push(matches!(steps.get(i + 1), Some(NominalStep::Draw { .. })));
                }
            }
            v
        };
        Ok(Self {
            method,
            settings: Settings {
                redundant_c: file
                    .limits
                    .redundant_c
                    .unwrap_or(Settings::default().redundant_c),
            },
            steps,
            draws,
            start_diameter_mm,
            start_strain: file.start.strain,
            flow: file.material.flow.clone(),
            annealed: file.annealed_law().clone(),
            considere: (
                strength::considere_strain(&file.material.flow),
                strength::considere_strain(file.annealed_law()),
            ),
            annealed_is_flow: file.annealed_law() == &file.material.flow,
            solvers: (
                ConsidereSolver::new(&file.material.flow),
                ConsidereSolver::new(file.annealed_law()),
            ),
            finish_speed_m_s: line
                .map(|l| l.finish_speed_m_s)
                .or(machine.map(|(_, r)| r.running_speed_m_s)),
            block_limit,
            holds_next,
            warn: file.limits.draw_ratio_warn,
            max: file.limits.draw_ratio_max,
            rod,
            friction,
            semi_angle,
            die_diameter,
            back_tension,
            flow_spread,
            dims,
            drivers,
        })
    }

    /// The warn and max lines.
    pub fn lines(&self) -> (f64, f64) {
        (self.warn, self.max)
    }

    /// Whether the model has a block rating to compare with.
    pub fn has_block_power(&self) -> bool {
        self.block_limit.is_some()
    }

    /// What a block's load is held to.
    pub fn block_limit(&self) -> Option<&BlockLimit> {
        self.block_limit.as_ref()
    }

    /// A buffer sized for this model.
    pub fn buffer(&self) -> SampleOut {
        SampleOut {
            ratio: vec![0.0; self.draws],
            breaks: vec![false; self.draws],
            tensile_strength_mpa: vec![0.0; self.draws],
            power_kw: vec![0.0; self.draws],
            block_load: vec![0.0; self.draws],
            over_block: vec![false; self.draws],
            front_kn: vec![0.0; self.draws],
            back_mpa: vec![0.0; self.draws],
            drawn: vec![f64::NAN; DRAWN_PER_PASS * self.draws],
            rod_mm: f64::NAN,
            driver_scores: vec![0.0; self.draws * self.drivers.len()],
            exits: vec![0.0; self.draws],
            die_z: vec![0.0; self.draws],
            flow_dev: vec![0.0; self.flow_spread.as_ref().map_or(0, |f| f.0.keys.len())],
        }
    }

    fn law_with(&self, base: &FlowLaw, dev: &[f64]) -> Result<FlowLaw, String> {
        let Some((f, _)) = &self.flow_spread else {
            return Ok(base.clone());
        };
        let mut spec: FlowLawSpec = base.spec().clone();
        for (k, d) in f.keys.iter().zip(dev) {
            if let Some(p) = flow_param(&mut spec, k) {
                *p += d;
            }
        }
        FlowLaw::new(spec).map_err(|e| format!("flow law: {e}"))
    }

    /// Whether every pass's sizes, strain, law and back tension are the
    /// nominal ones in every sample (only the dies' friction and angles
    /// scatter): the die-independent part of each pass is then the same.
    pub fn passes_are_fixed(&self) -> bool {
        self.rod.is_none()
            && self.die_diameter.is_none()
            && self.flow_spread.is_none()
            && self.back_tension.is_none()
    }

    /// The die-independent part of every draw pass ([`PreparedPass`]), made
    /// once, when no sample moves it ([`Model::passes_are_fixed`]); `None`
    /// otherwise, or when the nominal passes themselves are refused (each
    /// sample then says why).
    pub fn prepare(&self) -> Option<Vec<PreparedPass<'_>>> {
        if !self.passes_are_fixed() {
            return None;
        }
        let mut out = Vec::with_capacity(self.draws);
        let (mut law, mut strain, mut d_in) =
            (&self.flow, self.start_strain, self.start_diameter_mm);
        for s in &self.steps {
            match s {
                NominalStep::Anneal => {
                    law = &self.annealed;
                    strain = 0.0;
                }
                NominalStep::Draw {
                    exit_diameter_mm,
                    die,
                    back_tension_mpa,
                    ..
                } => {
                    let dp = DrawPass {
                        entry_diameter_mm: d_in,
                        exit_diameter_mm: *exit_diameter_mm,
                        strain_before: strain,
                        back_tension_mpa: *back_tension_mpa,
                        die: *die,
                    };
                    let p = PreparedPass::new(law, &dp, &self.settings).ok()?;
                    strain += p.pass_strain();
                    d_in = *exit_diameter_mm;
                    out.push(p);
                }
            }
        }
        Some(out)
    }

    /// Evaluates one sample with scores `z` (or the nominal schedule with
    /// `None`) into `out`; an `Err` names why the drawn inputs were refused.
    pub fn evaluate(&self, z: Option<&[f64]>, out: &mut SampleOut) -> Result<(), String> {
        self.evaluate_prepared(z, None, out)
    }

    /// [`Model::evaluate`] with the passes of [`Model::prepare`] when given:
    /// the same figures, without preparing each pass again.
    pub fn evaluate_prepared(
        &self,
        z: Option<&[f64]>,
        prepared: Option<&[PreparedPass<'_>]>,
        out: &mut SampleOut,
    ) -> Result<(), String> {
        // Flow-law deviations d = L z.
        let laws = match (z, &self.flow_spread) {
            (Some(z), Some((f, first))) => {
                let n = f.keys.len();
                for i in 0..n {
                    out.flow_dev[i] = (0..=i)
                        .map(|k| f.cholesky[i * n + k] * z[first + k])
                        .sum::<f64>();
                }
                let flow = self.law_with(&self.flow, &out.flow_dev)?;
                let necking = Necking::scan(&self.solvers.0, &flow);
                // The same law and so the same Considere strain when the
                // file gives no annealed law: built and scanned once.
                let (annealed, annealed_necking) = if self.annealed_is_flow {
                    (flow.clone(), necking)
                } else {
                    let a = self.law_with(&self.annealed, &out.flow_dev)?;
                    let n = Necking::scan(&self.solvers.1, &a);
                    (a, n)
                };
                Some((flow, annealed, (necking, annealed_necking)))
            }
            _ => None,
        };
        let (flow, annealed, considere) = match &laws {
            Some((a, b, c)) => (a, b, *c),
            None => (
                &self.flow,
                &self.annealed,
                (
                    Necking::known(&self.flow, self.considere.0),
                    Necking::known(&self.annealed, self.considere.1),
                ),
            ),
        };
        let rod_z = match (z, &self.rod) {
            (Some(z), Some((_, k))) => z[*k],
            _ => 0.0,
        };
        let start = match (z, &self.rod) {
            (Some(_), Some((sampler, _))) => sampler.value(rod_z),
            _ => self.start_diameter_mm,
        };
        out.rod_mm = start;
        out.drawn.fill(f64::NAN);
        fn per_die<'m>(
            z: Option<&[f64]>,
            input: &'m Option<DieInput>,
            j: usize,
        ) -> Option<(f64, &'m Sampler)> {
            match (z, input) {
                (Some(z), Some(d)) => Some((d.score(z, j), &d.samplers[j])),
                _ => None,
            }
        }
        // Exit diameters first: the finish size sets every pass's speed.
        let mut j = 0;
        for s in &self.steps {
            if let NominalStep::Draw {
                exit_diameter_mm, ..
            } = s
            {
                (out.exits[j], out.die_z[j]) = match per_die(z, &self.die_diameter, j) {
                    Some((zj, sampler)) => (sampler.value(zj), zj),
                    None => (*exit_diameter_mm, 0.0),
                };
                j += 1;
            }
        }
        let finish = out.exits.last().copied().unwrap_or(start);
        let nd = self.drivers.len();
        let mut law = flow;
        let (mut necking, mut annealed_necking) = considere;
        let mut strain = self.start_strain;
        let mut d_in = start;
        let mut j = 0;
        for s in &self.steps {
            let (step, die, back) = match s {
                NominalStep::Anneal => {
                    law = annealed;
                    if self.annealed_is_flow {
                        // One law: keep what the drawn passes resolved.
                        annealed_necking = necking;
                    }
                    necking = annealed_necking;
                    strain = 0.0;
                    continue;
                }
                NominalStep::Draw {
                    step,
                    die,
                    back_tension_mpa,
                    ..
                } => (*step, die, *back_tension_mpa),
            };
            let d_out = out.exits[j];
            if d_out >= d_in {
                return Err(format!(
                    "step {step}: drawn die diameter {d_out:.4} mm is not below the entry {d_in:.4} mm"
                ));
            }
            let mut die = *die;
            let fr = per_die(z, &self.friction, j);
            if let Some((zj, l)) = fr {
                let mu = l.value(zj);
                if let Some(m) = die.friction_factor {
                    if die.friction > 0.0 {
                        die.friction_factor = Some((m * mu / die.friction).min(1.0));
                    }
                }
                die.friction = mu;
            }
            let an = per_die(z, &self.semi_angle, j);
            if let Some((zj, l)) = an {
                die.semi_angle_deg = l.value(zj);
            }
            let bt = if back > 0.0 {
                per_die(z, &self.back_tension, j)
            } else {
                None
            };
            let back = match bt {
                Some((zj, l)) => l.value(zj),
                None => back,
            };
            out.drawn[DRAWN_PER_PASS * j..DRAWN_PER_PASS * (j + 1)].copy_from_slice(&[
                d_out,
                die.friction,
                die.semi_angle_deg,
                back,
            ]);
            let dp = DrawPass {
                entry_diameter_mm: d_in,
                exit_diameter_mm: d_out,
                strain_before: strain,
                back_tension_mpa: back,
                die,
            };
            // Only the governing stress, not every method's figures: the
            // same value `analyse_pass(..).draw_stress_mpa.get(method)` gives.
            let made;
            let prepared = match prepared {
                Some(p) => &p[j],
                None => {
                    made = PreparedPass::new(law, &dp, &self.settings)
                        .map_err(|e| format!("step {step}: {e}"))?;
                    &made
                }
            };
            let governing = prepared
                .stress_mpa(&die, self.method)
                .map_err(|e| format!("step {step}: {e}"))?;
            let flow_exit = prepared.flow_stress_exit_mpa();
            let strain_after = strain + prepared.pass_strain();
            out.ratio[j] = governing / flow_exit;
            (out.breaks[j], out.tensile_strength_mpa[j]) =
                necking.breaks(law, governing, strain_after, flow_exit);
            out.front_kn[j] = pass::force_kn(governing, d_out);
            out.back_mpa[j] = back;
            if z.is_some() {
                let row = &mut out.driver_scores[j * nd..(j + 1) * nd];
                for (slot, d) in row.iter_mut().zip(&self.drivers) {
                    *slot = match *d {
                        Driver::RodDiameter => rod_z,
                        Driver::EntryDiameter => {
                            if j == 0 {
                                rod_z
                            } else {
                                out.die_z[j - 1]
                            }
                        }
                        Driver::DieDiameter => out.die_z[j],
                        Driver::Friction => fr.map_or(0.0, |x| x.0),
                        Driver::SemiAngle => an.map_or(0.0, |x| x.0),
                        Driver::BackTension => bt.map_or(0.0, |x| x.0),
                        Driver::Flow(k) => match &self.flow_spread {
                            Some((f, _)) if f.sd[k] > 0.0 => out.flow_dev[k] / f.sd[k],
                            _ => 0.0,
                        },
                    };
                }
            }
            strain = strain_after;
            d_in = d_out;
            j += 1;
        }
        self.block_loads(finish, out);
        Ok(())
    }

    /// The columns of a kept sample ([`Model::sample_values`]): the rod
    /// diameter, each scattering flow-law parameter (`flow.k_mpa`), then per
    /// draw step `s` its `step<s>.exit_diameter_mm`, `.friction`,
    /// `.semi_angle_deg`, `.back_tension_mpa` and `.draw_ratio` (the names
    /// of check's CSV).
    pub fn sample_columns(&self) -> Vec<String> {
        let mut c = vec!["rod_diameter_mm".to_string()];
        if let Some((f, _)) = &self.flow_spread {
            c.extend(f.keys.iter().map(|k| format!("flow.{k}")));
        }
        for s in &self.steps {
            if let NominalStep::Draw { step, .. } = s {
                for key in [
                    "exit_diameter_mm",
                    "friction",
                    "semi_angle_deg",
                    "back_tension_mpa",
                    "draw_ratio",
                ] {
                    c.push(format!("step{step}.{key}"));
                }
            }
        }
        c
    }

    /// The values of one evaluated sample in [`Model::sample_columns`]
    /// order, appended to `values`: NaN where the sample was refused before
    /// reaching the figure (`accepted` false leaves every draw ratio NaN).
    pub fn sample_values(&self, out: &SampleOut, accepted: bool, values: &mut Vec<f64>) {
        values.push(out.rod_mm);
        if let Some((f, _)) = &self.flow_spread {
            let mut spec = self.flow.spec().clone();
            for (k, d) in f.keys.iter().zip(&out.flow_dev) {
                values.push(flow_param(&mut spec, k).map_or(f64::NAN, |p| *p + d));
            }
        }
        for j in 0..self.draws {
            values.extend_from_slice(&out.drawn[DRAWN_PER_PASS * j..DRAWN_PER_PASS * (j + 1)]);
            values.push(if accepted { out.ratio[j] } else { f64::NAN });
        }
    }

    /// Net power and block load of every draw, as check's line and machine
    /// stages make them: the capstan after die `j` carries the front pull
    /// `F_j` less the back pull `B_j+1 = sigma_b,j+1 A_j` it holds on the
    /// next die (none before an anneal or after the last die).
    fn block_loads(&self, finish: f64, out: &mut SampleOut) {
        let Some(v) = self.finish_speed_m_s else {
            return;
        };
        for j in 0..self.draws {
            let d_out = out.exits[j];
            let held = if self.holds_next[j] {
                pass::force_kn(out.back_mpa[j + 1], d_out)
            } else {
                0.0
            };
            let net = out.front_kn[j] - held;
            match &self.block_limit {
                Some(BlockLimit::Machine {
                    running_speed_m_s,
                    fixed_capstan_speed,
                    efficiency,
                    motor_kw,
                }) => {
                    let h = match fixed_capstan_speed {
                        Some(h) => h[j],
                        None => (finish / d_out).powi(2),
                    };
                    let power = net * (running_speed_m_s * h);
                    let load = power / efficiency[j] / motor_kw[j];
                    out.power_kw[j] = power;
                    out.block_load[j] = load;
                    // check's margin: a block exactly at its limit is within it.
                    out.over_block[j] = load > 1.0 + 1e-9;
                }
                limit => {
                    let power = pass::power_kw(net, v * (finish / d_out).powi(2));
                    out.power_kw[j] = power;
                    if let Some(BlockLimit::Line { limit_kw }) = limit {
                        out.block_load[j] = power / limit_kw;
                        out.over_block[j] = power > *limit_kw;
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SplitMix64 uniforms in [lo, hi) for the test's cases.
    fn uniforms(seed: u64) -> impl FnMut(f64, f64) -> f64 {
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

    #[test]
    fn the_bracket_decides_a_break_as_the_full_considere_solve_does() {
        // Against evaluation::strength (check's own strength): the same
        // verdict on every case, and the same strength wherever one is given.
        let nominal = FlowLaw::hollomon(530.0, 0.26).unwrap();
        let solver = ConsidereSolver::new(&nominal);
        let mut u = uniforms(3);
        for _ in 0..20_000 {
            let law = match (u(0.0, 3.0) as u32, u(0.0, 1.0)) {
                (0, _) => FlowLaw::hollomon(u(300.0, 700.0), u(0.05, 0.6)),
                (1, _) => FlowLaw::voce(u(50.0, 200.0), u(300.0, 700.0), u(0.1, 1.5)),
                _ => FlowLaw::swift(u(300.0, 900.0), u(0.0, 0.1), u(0.1, 0.6)),
            }
            .unwrap();
            let eps_u = strength::considere_strain(&law);
            let strain = u(0.0, 1.5);
            let flow_exit = law.stress_mpa(strain);
            let uts = strength::tensile_strength_mpa(&law, eps_u, strain).unwrap_or(flow_exit);
            // Governing stresses about the strength, some within rounding of it.
            let governing = match u(0.0, 3.0) as u32 {
                0 => uts * u(0.3, 1.2),
                1 => uts * (1.0 + u(-1e-13, 1e-13)),
                _ => uts,
            };
            let mut n = Necking::scan(&solver, &law);
            let (broke, strength) = n.breaks(&law, governing, strain, flow_exit);
            assert_eq!(
                broke,
                governing >= uts,
                "{law:?} at {strain}: {governing} vs {uts}"
            );
            assert!(strength.is_nan() || strength.to_bits() == uts.to_bits());
        }
    }

    #[test]
    fn passes_prepared_once_give_what_preparing_each_sample_gives() {
        // Only friction and angles scatter: the die-independent part of each
        // pass is prepared once, and every figure of a sample is unchanged.
        let text = "material: {density_kg_m3: 8940, specific_heat_j_kg_k: 385, flow: {law: hollomon, k_mpa: 530, n: 0.44}}
start: {diameter: 8.0}
dies: {semi_angle_deg: 6, friction: 0.05}
limits: {method: max, draw_ratio_warn: 0.6, draw_ratio_max: 0.8}
passes:
  - exit: 7.2
  - {exit: 6.5, back_tension_mpa: 20}
  - anneal: {}
  - exit: 5.8
scatter:
  friction: {distribution: lognormal, cv: 0.3, between_dies: 0.5}
  semi_angle_deg: {distribution: uniform, tolerance: 1.0, between_dies: 0}
";
        let file = crate::schedule::parse(text).unwrap();
        let model =
            Model::new(&file, Method::Max, super::super::spreads(&file).unwrap().0).unwrap();
        let prepared = model.prepare().expect("nothing but the dies scatters");
        let mut u = uniforms(11);
        let (mut a, mut b) = (model.buffer(), model.buffer());
        for _ in 0..2000 {
            let z: Vec<f64> = (0..model.dims).map(|_| u(-4.0, 4.0)).collect();
            let ra = model.evaluate(Some(&z), &mut a);
            let rb = model.evaluate_prepared(Some(&z), Some(&prepared), &mut b);
            assert_eq!(ra, rb);
            assert_eq!(a.ratio, b.ratio);
            assert_eq!(a.breaks, b.breaks);
            assert_eq!(a.driver_scores, b.driver_scores);
        }
    }
}
