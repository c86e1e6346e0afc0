//! One designed pass against the mill's limits: the die angle chosen from
//! the stock, the limits the pass breaks (the comparisons `check` makes), and
//! the pass strain at which a pass has a given draw ratio.

use std::cell::Cell;

use crate::flow::FlowLaw;
use crate::pass::{self, AngleTerms, Die, DrawPass, Method, PassError, PreparedPass, Settings};
use crate::schedule::{self, ScheduleFile};

use super::{DesignError, PASS_STRAIN_CEILING, PASS_STRAIN_FLOOR};

/// How far inside each limit the search's run ranges hold a pass, as a
/// fraction of the limit (see [`Ctx::breaches_within`]): 1e-8, a hundred
/// times the 1e-10 to which a level's pass strains are solved, and far under
/// anything a die room or a report can show.
pub(super) const SEARCH_GUARD: f64 = 1e-8;

/// A limit a designed pass breaks.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Breach {
    Ratio(f64),
    ReductionMax(f64),
    ReductionMin(f64),
    Delta(f64),
    ColdWork(f64),
    Hot(f64),
    Power(f64),
}

impl Breach {
    /// Breaches that more (lighter) passes only make worse.
    pub(super) fn is_light(self) -> bool {
        matches!(self, Breach::ReductionMin(_) | Breach::Delta(_))
    }

    /// The limit broken, as the file names it, with its value.
    pub(super) fn limit(self, c: &Ctx) -> String {
        let l = &c.file.limits;
        let v = |x: Option<f64>| x.map_or_else(String::new, |x| format!(" {x}"));
        match self {
            Breach::Ratio(_) => c.cap_name(),
            Breach::ReductionMax(_) => format!("{}{}", c.r_max_name(), v(c.r_max)),
            Breach::ReductionMin(_) => format!("target.reduction_min{}", v(c.r_min)),
            Breach::Delta(_) => format!("limits.delta_max{}", v(c.delta_max)),
            Breach::ColdWork(_) => format!("material.cold_work_limit{}", v(c.cold_work)),
            Breach::Hot(_) => format!(
                "limits.wire_temperature_max_c{}",
                v(l.wire_temperature_max_c)
            ),
            Breach::Power(_) => format!(
                "line.block_power_kw{}",
                v(c.file.line.as_ref().and_then(|x| x.block_power_kw))
            ),
        }
    }

    pub(super) fn describe(self, c: &Ctx) -> String {
        match self {
            Breach::Ratio(x) => format!("draw ratio {x:.4} over {}", c.cap_name()),
            Breach::ReductionMax(r) => format!(
                "reduction {:.2} % over {} {}",
                100.0 * r,
                c.r_max_name(),
                c.r_max.unwrap_or(1.0)
            ),
            Breach::ReductionMin(r) => format!(
                "reduction {:.2} % under target.reduction_min {}",
                100.0 * r,
                c.r_min.unwrap_or(0.0)
            ),
            Breach::Delta(d) => format!(
                "Delta {d:.3} over limits.delta_max {} with every stock angle",
                c.delta_max.unwrap_or(f64::INFINITY)
            ),
            Breach::ColdWork(e) => format!(
                "strain {e:.4} over material.cold_work_limit {}",
                c.cold_work.unwrap_or(f64::INFINITY)
            ),
            Breach::Hot(t) => format!(
                "wire at {t:.1} C, over limits.wire_temperature_max_c {}",
                c.file
                    .limits
                    .wire_temperature_max_c
                    .unwrap_or(f64::INFINITY)
            ),
            Breach::Power(p) => format!(
                "{p:.2} kW, over line.block_power_kw {}",
                c.file
                    .line
                    .as_ref()
                    .and_then(|l| l.block_power_kw)
                    .unwrap_or(f64::INFINITY)
            ),
        }
    }
}

/// A pass with its chosen die.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct PassPick {
    pub(super) exit_mm: f64,
    pub(super) semi_angle_deg: f64,
    pub(super) ratio: f64,
    pub(super) reduction: f64,
    pub(super) delta: f64,
    pub(super) stress_mpa: f64,
    pub(super) strain_after: f64,
    pub(super) delta_ok: bool,
}

/// What the design needs from the file, read once.
pub(super) struct Ctx<'a> {
    pub(super) file: &'a ScheduleFile,
    pub(super) method: Method,
    pub(super) settings: Settings,
    pub(super) angles: Vec<f64>,
    /// The die of each stock angle, as the file gives it.
    pub(super) dies: Vec<Die>,
    /// The terms of each stock angle (tangent, sine, cosine, Avitzur's
    /// `f`), computed once: every pass tries the same few angles.
    pub(super) angle_terms: Vec<AngleTerms>,
    pub(super) from_stock: bool,
    /// The draw-ratio limit of the file.
    pub(super) ratio_max: f64,
    /// The draw ratio the search holds the passes to (the aim, the warn line or the limit).
    pub(super) ratio_cap: f64,
    pub(super) r_min: Option<f64>,
    pub(super) r_max: Option<f64>,
    /// `r_max` is the heavy-reduction line `limits.reduction_warn` (as `check`
    /// takes it), not `target.reduction_max`.
    pub(super) r_max_is_warn: bool,
    /// The design was made at this cap although a tighter one had a design:
    /// that cap and its anneals, more than this one needs.
    pub(super) fewer_anneals_than: Cell<Option<(f64, usize)>>,
    pub(super) delta_max: Option<f64>,
    pub(super) cold_work: Option<f64>,
    pub(super) finish_mm: f64,
    /// The last pass `pick` made, by its inputs (the law by address and the
    /// sizes and strain by their bits): a level's pass is picked once where
    /// its pass strain is solved and again where it is laid, from the same
    /// figures, and the second is this one.
    pub(super) last_pick: Cell<Option<(PickKey, PassPick)>>,
    /// Back tension on each pass of a run, MPa, by its place in the run (from
    /// 0): a non-slip machine's dancers, block `i`'s on die `i` as `check
    /// --machine` applies them; empty without one (no back tension).
    pub(super) dancers_mpa: Vec<f64>,
}

/// The inputs of one `pick`: the law's address, then `d_in`, `d_out`,
/// `strain_before` and the back tension as bits, and the land switch.
pub(super) type PickKey = (usize, u64, u64, u64, u64, bool);

impl Ctx<'_> {
    /// The back tension on pass `i` of a run (from 0), MPa: the dancer of the
    /// machine's block `i`, else 0.
    pub(super) fn back_mpa(&self, i: usize) -> f64 {
        self.dancers_mpa.get(i).copied().unwrap_or(0.0)
    }

    /// The key the largest reduction comes from.
    pub(super) fn r_max_name(&self) -> &'static str {
        if self.r_max_is_warn {
            "limits.reduction_warn"
        } else {
            "target.reduction_max"
        }
    }

    /// The ratio the passes are held to, as the file names it.
    pub(super) fn cap_name(&self) -> String {
        if self.ratio_cap >= self.ratio_max {
            format!("limits.draw_ratio_max {}", self.ratio_max)
        } else if self.ratio_cap == self.file.limits.draw_ratio_warn {
            format!("limits.draw_ratio_warn {} (the warn line)", self.ratio_cap)
        } else {
            format!("the draw-ratio aim {}", self.ratio_cap)
        }
    }

    /// The pass from `d_in` to `d_out` at accumulated strain `strain_before`,
    /// with the stock angle of least governing stress within the Delta limit.
    /// With `worst_land` the die land is scaled so that land over exit radius
    /// is what it is at the finish size, the most any pass of the design sees
    /// (the drawing stress depends on the size only through that ratio).
    /// `back_mpa` is the back tension on the die ([`Ctx::back_mpa`]).
    pub(super) fn pick(
        &self,
        law: &FlowLaw,
        d_in: f64,
        d_out: f64,
        strain_before: f64,
        back_mpa: f64,
        worst_land: bool,
    ) -> Result<PassPick, PassError> {
        let key = (
            std::ptr::from_ref(law) as usize,
            d_in.to_bits(),
            d_out.to_bits(),
            strain_before.to_bits(),
            back_mpa.to_bits(),
            worst_land,
        );
        if let Some((k, p)) = self.last_pick.get() {
            if k == key {
                return Ok(p);
            }
        }
        let p = self.pick_fresh(law, d_in, d_out, strain_before, back_mpa, worst_land)?;
        self.last_pick.set(Some((key, p)));
        Ok(p)
    }

    /// `pick` without the last-pass memo.
    fn pick_fresh(
        &self,
        law: &FlowLaw,
        d_in: f64,
        d_out: f64,
        strain_before: f64,
        back_mpa: f64,
        worst_land: bool,
    ) -> Result<PassPick, PassError> {
        let mut best: Option<PassPick> = None;
        let mut best_any: Option<PassPick> = None;
        let land_die = |die: &Die| {
            let mut die = *die;
            if worst_land {
                die.land_length_mm *= d_out / self.finish_mm;
            }
            die
        };
        // The angle-independent part (geometry, flow stresses, the law's
        // integrals) once for every stock angle (`analyse_pass` is this
        // preparation then `mechanics`), so the figures are the same.
        let Some(first) = self.dies.first() else {
            return unreachable_pick();
        };
        let dp = DrawPass {
            entry_diameter_mm: d_in,
            exit_diameter_mm: d_out,
            strain_before,
            back_tension_mpa: back_mpa,
            die: land_die(first),
        };
        let prepared = PreparedPass::new(law, &dp, &self.settings)?;
        for ((&a, die), terms) in self.angles.iter().zip(&self.dies).zip(&self.angle_terms) {
            let p = self.pick_one(
                &prepared,
                (a, terms),
                &land_die(die),
                d_in,
                d_out,
                strain_before,
            )?;
            let delta_ok = p.delta_ok;
            if best_any.is_none_or(|b| p.stress_mpa < b.stress_mpa) {
                best_any = Some(p);
            }
            if delta_ok && best.is_none_or(|b| p.stress_mpa < b.stress_mpa) {
                best = Some(p);
            }
        }
        // `angles` is never empty (checked when the context is built).
        best.or(best_any).map_or_else(unreachable_pick, Ok)
    }

    /// The pass with one stock angle (`semi_angle_deg`, one of `angles`).
    #[allow(clippy::too_many_arguments)]
    pub(super) fn pick_at(
        &self,
        law: &FlowLaw,
        d_in: f64,
        d_out: f64,
        strain_before: f64,
        back_mpa: f64,
        worst_land: bool,
        semi_angle_deg: f64,
    ) -> Result<PassPick, PassError> {
        let i = self
            .angles
            .iter()
            .position(|a| *a == semi_angle_deg)
            .unwrap_or(0);
        let mut die = self.dies[i];
        if worst_land {
            die.land_length_mm *= d_out / self.finish_mm;
        }
        let dp = DrawPass {
            entry_diameter_mm: d_in,
            exit_diameter_mm: d_out,
            strain_before,
            back_tension_mpa: back_mpa,
            die,
        };
        let prepared = PreparedPass::new(law, &dp, &self.settings)?;
        self.pick_one(
            &prepared,
            (semi_angle_deg, &self.angle_terms[i]),
            &die,
            d_in,
            d_out,
            strain_before,
        )
    }

    /// One stock die on a prepared pass: the governing stress alone, not
    /// every method's, with the figures `analyse_pass` gives (the same
    /// formulas on the same prepared part). Should any figure not be finite,
    /// the full analysis is run so that its overflow error is returned.
    fn pick_one(
        &self,
        prepared: &PreparedPass,
        (semi_angle_deg, terms): (f64, &AngleTerms),
        die: &Die,
        d_in: f64,
        d_out: f64,
        strain_before: f64,
    ) -> Result<PassPick, PassError> {
        let stress = prepared.stress_mpa_at(die, terms, self.method)?;
        let flow_exit = prepared.flow_stress_exit_mpa();
        let reduction = pass::area_reduction(d_in, d_out);
        let delta = pass::delta(die.semi_angle_deg.to_radians(), reduction);
        let ratio = stress / flow_exit;
        if !(delta.is_finite() && flow_exit.is_finite() && ratio.is_finite()) {
            prepared.mechanics(die)?;
        }
        Ok(PassPick {
            exit_mm: d_out,
            semi_angle_deg,
            ratio,
            reduction,
            delta,
            stress_mpa: stress,
            strain_after: strain_before + prepared.pass_strain(),
            delta_ok: self.delta_max.is_none_or(|x| delta <= x),
        })
    }

    /// The limits the pass breaks, with the comparisons `check` makes.
    pub(super) fn breaches(&self, p: &PassPick) -> Vec<Breach> {
        self.breaches_within(p, 0.0)
    }

    /// The limits the pass breaks when each limit is drawn `guard` (a
    /// fraction) inside itself: the search's run ranges use
    /// [`SEARCH_GUARD`], so that a run laid out at a strain of its range,
    /// whose passes differ from the range's in their last digits (a level
    /// solved to 1e-10, a strain split into passes), still meets every limit
    /// exactly as `check` compares it. The cold-work limit is not drawn in
    /// here: the run strain caps keep `COLD_WORK_MARGIN` under it.
    pub(super) fn breaches_within(&self, p: &PassPick, guard: f64) -> Vec<Breach> {
        let inside = 1.0 - guard;
        let mut v = Vec::new();
        if p.ratio > self.ratio_cap * inside {
            v.push(Breach::Ratio(p.ratio));
        }
        if self.r_max.is_some_and(|r| p.reduction > r * inside) {
            v.push(Breach::ReductionMax(p.reduction));
        }
        if self.r_min.is_some_and(|r| p.reduction < r * (1.0 + guard)) {
            v.push(Breach::ReductionMin(p.reduction));
        }
        if !p.delta_ok || self.delta_max.is_some_and(|x| p.delta > x * inside) {
            v.push(Breach::Delta(p.delta));
        }
        if self.cold_work.is_some_and(|l| p.strain_after > l) {
            v.push(Breach::ColdWork(p.strain_after));
        }
        let m = &self.file.material;
        let l = &self.file.limits;
        if let Some(tmax) = l.wire_temperature_max_c {
            let rise = pass::temperature_rise_c(
                p.stress_mpa.max(0.0),
                m.density_kg_m3,
                m.specific_heat_j_kg_k,
                m.heat_fraction.unwrap_or(schedule::DEFAULT_HEAT_FRACTION),
            );
            let t = l.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C) + rise;
            if t > tmax - guard * tmax.abs().max(1.0) {
                v.push(Breach::Hot(t));
            }
        }
        if let Some(line) = &self.file.line {
            if let Some(pmax) = line.block_power_kw {
                let speed = line.finish_speed_m_s * (self.finish_mm / p.exit_mm).powi(2);
                let power = pass::power_kw(pass::force_kn(p.stress_mpa, p.exit_mm), speed);
                if power > pmax * inside {
                    v.push(Breach::Power(power));
                }
            }
        }
        v
    }

    /// How far a pass is inside its limits, as fractions of each limit
    /// (negative: over): `(ratio, heavy, light)`, where heavy is the least of
    /// the `reduction_max`, wire-temperature and block-power margins and
    /// light the least of the `reduction_min` and `Delta` ones, each less
    /// [`SEARCH_GUARD`] so that they cross zero where `breaches_within` with
    /// the guard switches. They guide the level solves; the breaches decide.
    pub(super) fn margins(&self, p: &PassPick) -> (f64, f64, f64) {
        let g = SEARCH_GUARD;
        let ratio = (self.ratio_cap - p.ratio) / self.ratio_cap - g;
        let mut heavy = f64::INFINITY;
        let mut light = f64::INFINITY;
        if let Some(r) = self.r_max {
            heavy = heavy.min((r - p.reduction) / r - g);
        }
        if let Some(r) = self.r_min {
            light = light.min((p.reduction - r) / r - g);
        }
        if let Some(d) = self.delta_max {
            light = light.min((d - p.delta) / d - g);
        }
        let m = &self.file.material;
        let l = &self.file.limits;
        if let Some(tmax) = l.wire_temperature_max_c {
            let rise = pass::temperature_rise_c(
                p.stress_mpa.max(0.0),
                m.density_kg_m3,
                m.specific_heat_j_kg_k,
                m.heat_fraction.unwrap_or(schedule::DEFAULT_HEAT_FRACTION),
            );
            let t = l.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C) + rise;
            heavy = heavy.min((tmax - t) / tmax.abs().max(1.0) - g);
        }
        if let Some(line) = &self.file.line {
            if let Some(pmax) = line.block_power_kw {
                let speed = line.finish_speed_m_s * (self.finish_mm / p.exit_mm).powi(2);
                let power = pass::power_kw(pass::force_kn(p.stress_mpa, p.exit_mm), speed);
                heavy = heavy.min((pmax - power) / pmax - g);
            }
        }
        (ratio, heavy, light)
    }

    /// Draw ratio minus `rho` of a pass of strain `x` from `d_in`, at the
    /// accumulated strain and back tension (MPa) given.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn ratio_gap(
        &self,
        law: &FlowLaw,
        d_in: f64,
        (strain_before, back_mpa): (f64, f64),
        x: f64,
        rho: f64,
        worst_land: bool,
    ) -> Result<(f64, PassPick), PassError> {
        let p = self.pick(
            law,
            d_in,
            d_in * (-0.5 * x).exp(),
            strain_before,
            back_mpa,
            worst_land,
        )?;
        Ok((p.ratio - rho, p))
    }

    /// The pass strain from `d_in`, at the accumulated strain and back
    /// tension (MPa) given, at which the draw ratio is `rho`, clamped to
    /// `[PASS_STRAIN_FLOOR, PASS_STRAIN_CEILING]`; `guess` seeds the bracket,
    /// with the stock angle the pass likely takes (that of the same pass at
    /// a nearby level), when known: the one-angle solve starts from it, and
    /// falls back to the angle picked at the guess when it does not settle.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn strain_at_ratio(
        &self,
        law: &FlowLaw,
        d_in: f64,
        (strain_before, back_mpa): (f64, f64),
        rho: f64,
        (guess, hint): (f64, Option<f64>),
        worst_land: bool,
        tol: f64,
    ) -> Result<f64, DesignError> {
        let f = |x: f64| {
            self.ratio_gap(law, d_in, (strain_before, back_mpa), x, rho, worst_land)
                .map(|r| r.0)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("a pass from {d_in:.4} mm"),
                    problem,
                })
        };
        let g0 = guess.clamp(PASS_STRAIN_FLOOR, PASS_STRAIN_CEILING);
        // Fast path: solve with one die angle (a smooth ratio, a sixth of
        // the work with six angles), then check that the stock's pick at the
        // root is that angle, so the root is the full pick's root.
        let mut angle = hint.filter(|h| self.angles.contains(h));
        // The hint, when tried first, is one try more than the four the
        // picked angles have.
        let mut from_hint = angle.is_some();
        let mut tries = if from_hint { 5 } else { 4 };
        while tries > 0 {
            tries -= 1;
            let a = match angle {
                Some(a) => a,
                None => {
                    self.pick(
                        law,
                        d_in,
                        d_in * (-0.5 * g0).exp(),
                        strain_before,
                        back_mpa,
                        worst_land,
                    )
                    .map_err(|problem| DesignError::Pass {
                        pass: format!("a pass from {d_in:.4} mm"),
                        problem,
                    })?
                    .semi_angle_deg
                }
            };
            let one = |x: f64| -> Result<f64, DesignError> {
                self.pick_at(
                    law,
                    d_in,
                    d_in * (-0.5 * x).exp(),
                    strain_before,
                    back_mpa,
                    worst_land,
                    a,
                )
                .map(|p| p.ratio - rho)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("a pass from {d_in:.4} mm"),
                    problem,
                })
            };
            let Some(x) = secant(one, g0, tol)? else {
                if std::mem::take(&mut from_hint) {
                    // The hinted angle did not settle: go on as without a
                    // hint, from the angle picked at the guess.
                    angle = None;
                    tries = 4;
                    continue;
                }
                break;
            };
            from_hint = false;
            let p = self
                .pick(
                    law,
                    d_in,
                    d_in * (-0.5 * x).exp(),
                    strain_before,
                    back_mpa,
                    worst_land,
                )
                .map_err(|problem| DesignError::Pass {
                    pass: format!("a pass from {d_in:.4} mm"),
                    problem,
                })?;
            if p.semi_angle_deg == a {
                return Ok(x);
            }
            angle = Some(p.semi_angle_deg);
        }
        let f0 = f(g0)?;
        if f0 == 0.0 {
            return Ok(g0);
        }
        // Secant from the guess with the full pick (the angle may change
        // along the way); the bracketed solve below decides when it fails.
        if let Some(x) = secant(&f, g0, tol)? {
            return Ok(x);
        }
        // Step away from the guess by factors of 1.25 until the sign changes.
        let (mut lo, mut hi, mut flo, mut fhi) = (g0, g0, f0, f0);
        let mut found = false;
        for _ in 0..120 {
            if f0 < 0.0 {
                if hi >= PASS_STRAIN_CEILING {
                    return Ok(PASS_STRAIN_CEILING);
                }
                lo = hi;
                flo = fhi;
                hi = (hi * 1.25).min(PASS_STRAIN_CEILING);
                fhi = f(hi)?;
                if fhi >= 0.0 {
                    found = true;
                    break;
                }
            } else {
                if lo <= PASS_STRAIN_FLOOR {
                    return Ok(PASS_STRAIN_FLOOR);
                }
                hi = lo;
                fhi = flo;
                lo = (lo / 1.25).max(PASS_STRAIN_FLOOR);
                flo = f(lo)?;
                if flo <= 0.0 {
                    found = true;
                    break;
                }
            }
        }
        if !found {
            return Err(DesignError::Solver {
                what: "pass-strain bracket",
                iterations: 120,
            });
        }
        solve_increasing(f, lo, hi, flo, fhi, tol, "pass strain")
    }
}

fn unreachable_pick() -> Result<PassPick, PassError> {
    Err(PassError::Param(crate::param::ParamError::new(
        "semi_angles_deg",
        "[]",
        "needs at least one angle",
    )))
}

/// Root of an increasing function on `[lo, hi]` with `f(lo) <= 0 <= f(hi)`:
/// regula falsi with the Illinois modification, and a bisection step whenever
/// the bracket fails to halve in three steps; at most 200 evaluations.
/// Root of a rising `f` by the secant method from `g0`, on the rising side
/// only and within the solvers' strain range; `None` when it does not settle
/// in 12 steps (the caller then brackets).
fn secant(
    mut f: impl FnMut(f64) -> Result<f64, DesignError>,
    g0: f64,
    tol: f64,
) -> Result<Option<f64>, DesignError> {
    let (mut x0, mut y0) = (g0, f(g0)?);
    if y0 == 0.0 {
        return Ok(Some(g0));
    }
    let mut x1 =
        (g0 * if y0 > 0.0 { 0.98 } else { 1.02 }).clamp(PASS_STRAIN_FLOOR, PASS_STRAIN_CEILING);
    let mut y1 = f(x1)?;
    for _ in 0..12 {
        let slope = (y1 - y0) / (x1 - x0);
        if slope.is_nan() || slope <= 0.0 || slope.is_infinite() {
            return Ok(None);
        }
        let x2 = (x1 - y1 / slope).clamp(0.5 * x1, 2.0 * x1);
        if !(PASS_STRAIN_FLOOR..=PASS_STRAIN_CEILING).contains(&x2) {
            return Ok(None);
        }
        if (x2 - x1).abs() <= tol * x2 {
            return Ok(Some(x2));
        }
        (x0, y0) = (x1, y1);
        x1 = x2;
        y1 = f(x1)?;
        if y1 == 0.0 {
            return Ok(Some(x1));
        }
    }
    Ok(None)
}

pub(super) fn solve_increasing(
    mut f: impl FnMut(f64) -> Result<f64, DesignError>,
    mut lo: f64,
    mut hi: f64,
    mut flo: f64,
    mut fhi: f64,
    tol: f64,
    what: &'static str,
) -> Result<f64, DesignError> {
    const MAX_ITER: usize = 200;
    if flo == 0.0 {
        return Ok(lo);
    }
    if fhi == 0.0 {
        return Ok(hi);
    }
    let mut side = 0i8;
    let mut width_ref = hi - lo;
    for it in 0..MAX_ITER {
        let width = hi - lo;
        if width <= tol * hi.abs().max(1e-300) {
            return Ok(if -flo < fhi { lo } else { hi });
        }
        let x = if it % 3 == 2 && width > 0.5 * width_ref {
            0.5 * (lo + hi)
        } else {
            let s = lo - flo * (hi - lo) / (fhi - flo);
            if s.is_finite() && s > lo && s < hi {
                s
            } else {
                0.5 * (lo + hi)
            }
        };
        if it % 3 == 2 {
            width_ref = hi - lo;
        }
        let fx = f(x)?;
        if fx == 0.0 {
            return Ok(x);
        }
        if fx < 0.0 {
            lo = x;
            flo = fx;
            if side == -1 {
                fhi *= 0.5;
            }
            side = -1;
        } else {
            hi = x;
            fhi = fx;
            if side == 1 {
                flo *= 0.5;
            }
            side = 1;
        }
    }
    Err(DesignError::Solver {
        what,
        iterations: MAX_ITER,
    })
}
