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

use crate::flow::{FlowLaw, FlowLawSpec};
use crate::pass::{Die, Method, Settings};

use super::considere::{bisect, ConsidereSolver, Scan};
use super::distribution::{Law, Sampler};
use super::scatter::{flow_param, DieSpread, FlowSpread};

mod build;
mod sample;

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
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::evaluation::strength;

    use crate::risk::test_uniforms as uniforms;

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
