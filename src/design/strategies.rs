//! How a run spreads its strain over its passes (the strategies), and the
//! range of run strains a run of `n` passes can carry within every limit.
//!
//! A run's passes are set by one *level* `t`:
//!
//! - `equal-ratio`: `t` is the common draw ratio `rho`; pass `i` is solved so
//!   that its ratio is `rho`, from the state the earlier passes leave. The
//!   first `n` passes at `rho` do not depend on `n`, so one shot at `rho`
//!   serves every pass count (and is kept, keyed by `rho`);
//! - `equal-strain`: `t` is the pass strain, `eps_i = t`;
//! - `tapered`: `t` is the mean pass strain, `eps_i = n t (1 - q) q^(i-1) / (1 - q^n)`.
//!
//! The run strain `S(t)` rises with `t`. Limits fall in two kinds: *heavy*
//! ones (draw ratio over the cap on the heavy side, `reduction_max`, the
//! cold-work limit, wire temperature, block power) hold for `t` up to some
//! `t_b`, and *light* ones (`reduction_min`, `Delta`, a pass so light that
//! redundant work alone puts its ratio over the cap) hold from some `t_a`.
//! The run strains `n` passes can carry are then `[S(t_a), S(t_b)]` when
//! `t_a <= t_b`, found by bisection on `t` (30 halvings: `t` to 1e-9 of its range).
//! That each limit switches once along `t` is the model's assumption (true of
//! the closed forms: the ratio's U shape in the pass strain is split into its
//! light and heavy sides).
//!
//! Passes are evaluated with the worst die land (see `Ctx::pick`), so a range
//! found here holds wherever the run falls; with no die land the size does
//! not enter and the range is exact.

use std::collections::HashMap;

use crate::flow::FlowLaw;
use crate::schedule::Strategy;

use super::limits::{solve_increasing, Breach, Ctx, PassPick, SEARCH_GUARD};
use super::{DesignError, PASS_STRAIN_FLOOR};

/// Halvings of a level bracket.
const BISECTIONS: usize = 30;
/// A level whose binding pass is within its limit (past the search's guard)
/// by at most this fraction of the limit is the switch: the level tolerance
/// of [`RunTable::switch`] (1e-10 of the level range) leaves margins of about
/// this size.
const SWITCH_MARGIN: f64 = 1e-11;

/// The kind of run: where it starts and with which law.
#[derive(Debug, Clone, Copy)]
pub(super) struct Class<'a> {
    /// Flow law of the run.
    pub(super) law: &'a FlowLaw,
    /// Accumulated strain at the run's start.
    pub(super) e0: f64,
    /// Diameter the run's passes are laid from, mm (with the worst land the
    /// size does not change any figure but the reported diameters).
    pub(super) from_mm: f64,
    /// Most strain the run may carry: the cold-work limit less `e0`, and at
    /// most the whole reduction.
    pub(super) strain_cap: f64,
}

/// A closed range of run strains.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Interval {
    /// Least run strain.
    pub(super) lo: f64,
    /// Most run strain.
    pub(super) hi: f64,
}

/// Equal-ratio passes at one ratio from the class's start, shot as far as
/// asked and extended on demand.
#[derive(Debug)]
struct Shot {
    /// Run strain after each pass.
    cum: Vec<f64>,
    /// Index of the first pass over a heavy limit (the shot stops there).
    heavy_stop: Option<usize>,
    /// Index of the first pass under a light limit.
    light_fail: Option<usize>,
    /// Heavy and light margins of each pass shot (the heavy stop's included).
    heavy_margin: Vec<f64>,
    light_margin: Vec<f64>,
    /// The limits the heavy stop and the first light failure break.
    stop_breaches: Vec<Breach>,
    light_breaches: Vec<Breach>,
    /// The shot stopped because a pass could not be made light enough: later
    /// passes add no strain.
    floored: bool,
    /// Entry diameter, strain and pass strain of the next pass.
    d: f64,
    e: f64,
    prev: f64,
}

impl Shot {
    fn stopped(&self) -> bool {
        self.floored || self.heavy_stop.is_some()
    }

    /// The first `n` passes are within the heavy limits and the strain cap.
    fn heavy(&self, n: usize) -> bool {
        self.heavy_stop.is_none_or(|i| i >= n)
    }

    /// The first `n` passes are within the light limits (a pass past a
    /// heavy stop counts as light enough: a higher ratio only makes it heavier).
    fn light(&self, n: usize) -> bool {
        self.light_fail.is_none_or(|i| i >= n) && !(self.floored && self.cum.len() < n)
    }

    /// Run strain of the first `n` passes (infinite when the shot stopped
    /// on the heavy side before `n`).
    fn strain(&self, n: usize) -> f64 {
        if n == 0 {
            0.0
        } else if n <= self.cum.len() {
            self.cum[n - 1]
        } else if self.floored {
            self.cum.last().copied().unwrap_or(0.0)
        } else {
            f64::INFINITY
        }
    }
}

/// How the design spreads strain and which limits it holds passes to.
pub(super) struct Chooser<'a> {
    pub(super) ctx: Ctx<'a>,
    pub(super) strategy: Strategy,
    pub(super) taper: f64,
}

/// The pass-strain weights of a tapered or equal-strain run of `n` passes
/// (summing to `n`, so the level is the mean pass strain).
pub(super) fn weights(strategy: Strategy, taper: f64, n: u32) -> Vec<f64> {
    match strategy {
        Strategy::Tapered if taper != 1.0 => {
            let first = n as f64 * (1.0 - taper) / (1.0 - taper.powi(n as i32));
            (0..n).map(|i| first * taper.powi(i as i32)).collect()
        }
        _ => vec![1.0; n as usize],
    }
}

/// What one run of given pass strains does against the limits.
#[derive(Debug, Clone)]
pub(super) struct Probe {
    pub(super) passes: Vec<PassPick>,
    pub(super) heavy_ok: bool,
    pub(super) light_ok: bool,
}

impl Chooser<'_> {
    /// Passes of the given strains from `from_mm` at strain `e0`, with the worst land.
    pub(super) fn probe(
        &self,
        law: &FlowLaw,
        e0: f64,
        from_mm: f64,
        strains: &[f64],
        strain_cap: f64,
    ) -> Result<Probe, DesignError> {
        let (mut d, mut e, mut cum) = (from_mm, e0, 0.0);
        let mut out = Probe {
            passes: Vec::with_capacity(strains.len()),
            heavy_ok: true,
            light_ok: true,
        };
        for (i, &x) in strains.iter().enumerate() {
            cum += x;
            let back = self.ctx.back_mpa(i);
            let d_out = from_mm * (-0.5 * cum).exp();
            let p = self
                .ctx
                .pick(law, d, d_out, e, back, true)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("a pass from {d:.4} mm"),
                    problem,
                })?;
            for b in self.ctx.breaches_within(&p, SEARCH_GUARD) {
                if b.is_light()
                    || (matches!(b, super::limits::Breach::Ratio(_)) && {
                        // The ratio's light side: a heavier pass has a lower ratio.
                        let q = self
                            .ctx
                            .pick(law, d, d * (-0.5 * x * 1.02).exp(), e, back, true)
                            .map_err(|problem| DesignError::Pass {
                                pass: format!("a pass from {d:.4} mm"),
                                problem,
                            })?;
                        q.ratio < p.ratio
                    })
                {
                    out.light_ok = false;
                } else {
                    out.heavy_ok = false;
                }
            }
            d = d_out;
            e = p.strain_after;
            out.passes.push(p);
        }
        if cum > strain_cap * (1.0 + 1e-12) {
            out.heavy_ok = false;
        }
        Ok(out)
    }
}

/// The run strains a class can carry, by pass count, found lazily and kept.
///
/// For `equal-ratio` and `equal-strain` the first `n` passes at a level do
/// not depend on `n`, and each pass's heavy limits hold for levels up to its
/// own `t_j^b`, its light limits from its own `t_j^a`; so `n` passes are
/// heavy-safe up to `t_b(n) = min_{j<n} t_j^b` and light-safe from
/// `t_a(n) = max_{j<n} t_j^a`, kept as running extremes: a bisection is
/// needed only when a new pass binds. Then `a(n) = S(t_a(n), n)` and
/// `b(n) = min(S(t_b(n), n), strain_cap)`; the range is empty from the first
/// `n` with `t_a > t_b` or `a(n)` over the cap on (the extremes only tighten).
pub(super) struct RunTable<'c, 'f> {
    chooser: &'c Chooser<'f>,
    pub(super) class: Class<'f>,
    /// Most passes a run may have.
    max_n: u32,
    intervals: Vec<Option<Option<Interval>>>,
    shots: HashMap<u64, Shot>,
    /// The pass strain and stock angle of pass `i` of the last shot that
    /// solved it: where pass `i` of the next level's solve starts.
    guesses: Vec<f64>,
    angle_hints: Vec<f64>,
    /// Counts done by the running extremes, and the extremes.
    done: u32,
    t_a: f64,
    t_b: f64,
    /// How far the light side's level rose at the last two counts that
    /// moved it (the last, the one before): where the next count's switch
    /// is first tried.
    t_a_step: f64,
    t_a_step_before: f64,
    blocked: bool,
    /// The levels `(t_a, t_b)` of each count done by the running extremes.
    levels: Vec<Option<(f64, f64)>>,
    /// The least count whose range reaches the class's strain cap, once
    /// found, and the counts looked at for it.
    capped: Option<u32>,
    scanned: u32,
}

impl<'c, 'f> RunTable<'c, 'f> {
    pub(super) fn new(chooser: &'c Chooser<'f>, class: Class<'f>, max_n: u32) -> Self {
        let mut t = RunTable {
            chooser,
            class,
            max_n,
            intervals: vec![None; max_n as usize + 1],
            shots: HashMap::new(),
            guesses: Vec::new(),
            angle_hints: Vec::new(),
            done: 0,
            t_a: 0.0,
            t_b: 0.0,
            t_a_step: 0.0,
            t_a_step_before: 0.0,
            blocked: false,
            levels: vec![None; max_n as usize + 1],
            capped: None,
            scanned: 0,
        };
        t.t_b = t.level_top(1);
        t
    }

    /// Most passes a run may have.
    pub(super) fn max_n(&self) -> u32 {
        self.max_n
    }

    /// The least count up to `n` whose run can carry the class's strain cap
    /// (`b(m)` at the cap), if one is: a run of more passes can carry no
    /// strain that this count cannot (`a` never falls as passes are added,
    /// `b` is at most the cap), so a search for the fewest passes need not
    /// look past it ([`super::search`]).
    pub(super) fn capped_by(&mut self, n: u32) -> Result<Option<u32>, DesignError> {
        if let Some(c) = self.capped {
            return Ok((c <= n).then_some(c));
        }
        let cap = self.class.strain_cap;
        while self.scanned < n.min(self.max_n) {
            let q = self.scanned + 1;
            self.scanned = q;
            if self
                .interval(q)?
                .is_some_and(|iv| iv.hi >= cap * (1.0 - 1e-12))
            {
                self.capped = Some(q);
                return Ok(Some(q));
            }
        }
        Ok(None)
    }

    fn shared(&self) -> bool {
        matches!(
            self.chooser.strategy,
            Strategy::EqualRatio | Strategy::EqualStrain
        )
    }

    /// The run strains `n` passes of the class can carry within every limit.
    pub(super) fn interval(&mut self, n: u32) -> Result<Option<Interval>, DesignError> {
        if n == 0 || n > self.max_n || self.class.strain_cap <= 0.0 {
            return Ok(None);
        }
        if let Some(v) = self.intervals[n as usize] {
            return Ok(v);
        }
        if self.shared() {
            while self.done < n {
                self.extend()?;
            }
            return Ok(self.intervals[n as usize].flatten());
        }
        // A run's least strain never falls as passes are added: once a count
        // cannot be made light enough, no larger one can.
        if n > 1 {
            if let Some(None) = self.intervals[n as usize - 1] {
                let t = self.class.strain_cap / (n - 1) as f64;
                if !self.scaled_probe(n - 1, t)?.light_ok {
                    self.intervals[n as usize] = Some(None);
                    return Ok(None);
                }
            }
        }
        let v = self.scaled_interval(n)?;
        self.intervals[n as usize] = Some(v);
        Ok(v)
    }

    /// The range of the next count by the running extremes.
    fn extend(&mut self) -> Result<(), DesignError> {
        let k = self.done + 1;
        let ku = k as usize;
        self.done = k;
        if self.blocked {
            self.intervals[ku] = Some(None);
            return Ok(());
        }
        let top = self.level_top(1);
        // Heavy side: the new pass may bind below the running minimum.
        if !self.shot(self.t_b, ku)?.heavy(ku) {
            self.t_b = self.switch(0.0, self.t_b, ku, true, None)?;
        }
        // Light side: the new pass may bind above the running maximum.
        if !self.shot(self.t_a, ku)?.light(ku) {
            if !self.shot(top, ku)?.light(ku) {
                self.blocked = true;
            } else {
                let guess = self.light_guess(top);
                let t = self.switch(self.t_a, top, ku, false, guess)?;
                self.t_a_step_before = self.t_a_step;
                self.t_a_step = t - self.t_a;
                self.t_a = t;
            }
        }
        if self.blocked || self.t_a > self.t_b {
            self.blocked = true;
            self.intervals[ku] = Some(None);
            return Ok(());
        }
        self.levels[ku] = Some((self.t_a, self.t_b));
        let cap = self.class.strain_cap;
        let a = self.shot(self.t_a, ku)?.strain(ku);
        let b = self.shot(self.t_b, ku)?.strain(ku).min(cap);
        if a > cap * (1.0 + 1e-12) {
            self.blocked = true;
        }
        self.intervals[ku] = Some((a <= b && b.is_finite()).then_some(Interval { lo: a, hi: b }));
        Ok(())
    }

    /// The limits that bound `n` passes: on the heavy side (`heavy`), those a
    /// level just above the range breaks; on the light side, just below. As
    /// the file names them; empty when the strategy does not keep them.
    pub(super) fn binding(&mut self, n: u32, heavy: bool) -> Result<Vec<String>, DesignError> {
        if !self.shared() || n == 0 {
            return Ok(Vec::new());
        }
        self.interval(n)?;
        let ctx = &self.chooser.ctx;
        let mut out: Vec<String> = Vec::new();
        let Some((t_a, t_b)) = self.levels[n as usize] else {
            return Ok(out);
        };
        let nu = n as usize;
        if heavy {
            let cap = self.class.strain_cap;
            if self.shot(t_b, nu)?.strain(nu) >= cap {
                if let Some(l) = ctx.cold_work {
                    out.push(format!("material.cold_work_limit {l}"));
                }
            }
            let t = t_b * (1.0 + 1e-6) + 1e-12;
            if t_b >= self.level_top(1) && self.chooser.strategy == Strategy::EqualRatio {
                out.push(ctx.cap_name());
            }
            let bs = self.shot(t, nu)?.stop_breaches.clone();
            for b in bs {
                let k = b.limit(&self.chooser.ctx);
                if !out.contains(&k) {
                    out.push(k);
                }
            }
        } else {
            let t = t_a * (1.0 - 1e-6);
            let bs = self.shot(t, nu)?.light_breaches.clone();
            for b in bs {
                let k = b.limit(&self.chooser.ctx);
                if !out.contains(&k) {
                    out.push(k);
                }
            }
        }
        Ok(out)
    }

    /// Where the light side's switch for `n` passes is first tried: the
    /// running level `t_a` plus the last count's rise times the ratio of the
    /// last two rises (each count's lightest pass moves the level a little
    /// less than the one before, near geometrically); `None` before two
    /// counts have moved it.
    fn light_guess(&self, top: f64) -> Option<f64> {
        let (d1, d0) = (self.t_a_step, self.t_a_step_before);
        if !(d1 > 0.0 && d0 > 0.0) {
            return None;
        }
        let x = self.t_a + d1 * (d1 / d0).clamp(0.3, 1.0);
        (x > self.t_a && x < top).then_some(x)
    }

    /// The level in `[lo, hi]` where the first `n` passes switch: on the
    /// heavy side (`heavy`: ok at `lo`, over at `hi`, the last ok level
    /// returned) or the light side (under at `lo`, ok at `hi`, the first ok
    /// level returned). The secant on pass `n`'s margin through the last two
    /// levels tried (from `first` when given), kept inside the bracket the
    /// limits themselves keep, with regula falsi (Illinois) when it leaves
    /// it and a halving whenever the bracket fails to halve in three steps;
    /// done at an ok level within [`SWITCH_MARGIN`] of the limit, or when the
    /// bracket is 1e-10 of the level range.
    fn switch(
        &mut self,
        lo: f64,
        hi: f64,
        n: usize,
        heavy: bool,
        first: Option<f64>,
    ) -> Result<f64, DesignError> {
        let tol = 1e-10 * self.level_top(1).max(1e-12);
        let margin = |s: &Shot| -> (bool, f64) {
            let ok = if heavy { s.heavy(n) } else { s.light(n) };
            let m = if heavy {
                &s.heavy_margin
            } else {
                &s.light_margin
            };
            let v = m.get(n - 1).copied().unwrap_or(if ok { 1.0 } else { -1.0 });
            // Keep the sign the limits decide.
            (ok, if ok { v.max(0.0) } else { v.min(-1e-300) })
        };
        // Orient so that `g` rises from the failing end to the ok end.
        let (mut a, mut b) = if heavy { (hi, lo) } else { (lo, hi) };
        let (_, mut ga) = margin(self.shot(a, n)?);
        let (_, mut gb) = margin(self.shot(b, n)?);
        // The last two levels tried, for the secant.
        let mut last = [(a, ga), (b, gb)];
        let mut side = 0i8;
        let mut width_ref = (b - a).abs();
        for it in 0..200 {
            if (b - a).abs() <= tol {
                break;
            }
            let (lo_x, hi_x) = (a.min(b), a.max(b));
            let inside = |x: f64| x > lo_x && x < hi_x;
            let [(x0, g0), (x1, g1)] = last;
            let secant = x1 - g1 * (x1 - x0) / (g1 - g0);
            let mut x = match first.filter(|&f| it == 0 && inside(f)) {
                Some(f) => f,
                None if secant.is_finite() && inside(secant) => secant,
                None if ga.is_finite() && gb.is_finite() && gb > ga => a - ga * (b - a) / (gb - ga),
                None => 0.5 * (a + b),
            };
            if it % 3 == 2 {
                if (b - a).abs() > 0.5 * width_ref {
                    x = 0.5 * (a + b);
                }
                width_ref = (b - a).abs();
            }
            if !inside(x) {
                x = 0.5 * (a + b);
            }
            let (ok, g) = margin(self.shot(x, n)?);
            if ok && g <= SWITCH_MARGIN {
                // Within the limit by less than a part in 1e11 of it: as
                // close as the level tolerance would bring it.
                return Ok(x);
            }
            last = [last[1], (x, g)];
            if ok {
                b = x;
                gb = g;
                if side == 1 {
                    ga *= 0.5;
                }
                side = 1;
            } else {
                a = x;
                ga = g;
                if side == -1 {
                    gb *= 0.5;
                }
                side = -1;
            }
        }
        Ok(b)
    }

    /// The pass strains of `n` passes carrying run strain `s`, as the table
    /// evaluates them (worst die land): the level `t` with `S(t) = s`, sought
    /// only between the levels `t_a(n)` and `t_b(n)` the range was found at,
    /// where every pass is within every limit (with the search's guard), so
    /// that the passes returned are passes the table checked; a strain just
    /// outside the range (its last digits) takes the nearer end. Regula falsi
    /// (Illinois, with halvings) on the rising `S`, to 1e-13 of the level;
    /// the last pass takes the remainder, far inside the search's guard.
    pub(super) fn pass_strains(&mut self, n: u32, s: f64) -> Result<Vec<f64>, DesignError> {
        let t = if self.shared() {
            self.interval(n)?;
            let Some((t_a, t_b)) = self.levels[n as usize] else {
                return Err(DesignError::Input {
                    key: "target".into(),
                    why: format!("internal: no range of {n} passes to lay a run from"),
                });
            };
            let (slo, shi) = (self.strain_at(n, t_a)?, self.strain_at(n, t_b)?);
            if slo >= s {
                t_a
            } else if shi <= s {
                t_b
            } else {
                solve_increasing(
                    |t| Ok(self.strain_at(n, t)? - s),
                    t_a,
                    t_b,
                    slo - s,
                    shi - s,
                    1e-13,
                    "run level",
                )?
            }
        } else {
            s / n as f64
        };
        Ok(if self.shared() {
            let shot = self.shot(t, n as usize)?;
            let mut prev = 0.0;
            let mut out: Vec<f64> = shot
                .cum
                .iter()
                .take(n as usize)
                .map(|c| {
                    let x = c - prev;
                    prev = *c;
                    x
                })
                .collect();
            // The last pass lands on the run's end exactly.
            let sum: f64 = out.iter().sum();
            if let Some(last) = out.last_mut() {
                *last += s - sum;
            }
            out
        } else {
            weights(self.chooser.strategy, self.chooser.taper, n)
                .iter()
                .map(|w| w * s / n as f64)
                .collect()
        })
    }

    /// The run strain of `n` passes at level `t` (infinite past the heavy side).
    pub(super) fn strain_at(&mut self, n: u32, t: f64) -> Result<f64, DesignError> {
        Ok(if self.shared() {
            self.shot(t, n as usize)?.strain(n as usize)
        } else {
            n as f64 * t
        })
    }

    /// Top of the level range: the ratio cap, or the pass strain that fills the run's cap.
    pub(super) fn level_top(&self, n: u32) -> f64 {
        match self.chooser.strategy {
            Strategy::EqualRatio => self.chooser.ctx.ratio_cap,
            Strategy::EqualStrain => self.class.strain_cap.min(super::PASS_STRAIN_CEILING),
            Strategy::Tapered => self.class.strain_cap / n.max(1) as f64,
        }
    }

    /// The shot at level `t`, extended to at least `n` passes unless it stopped.
    fn shot(&mut self, t: f64, n: usize) -> Result<&Shot, DesignError> {
        let c = self.class;
        let ch = self.chooser;
        let ctx = &ch.ctx;
        let by_ratio = ch.strategy == Strategy::EqualRatio;
        let shot = self.shots.entry(t.to_bits()).or_insert_with(|| Shot {
            cum: Vec::new(),
            heavy_stop: None,
            light_fail: None,
            heavy_margin: Vec::new(),
            light_margin: Vec::new(),
            stop_breaches: Vec::new(),
            light_breaches: Vec::new(),
            floored: false,
            d: c.from_mm,
            e: c.e0,
            prev: 0.2,
        });
        let n = n.min(self.max_n as usize);
        let fail = |d: f64| {
            move |problem| DesignError::Pass {
                pass: format!("a pass from {d:.4} mm"),
                problem,
            }
        };
        while shot.cum.len() < n && !shot.stopped() {
            let i = shot.cum.len();
            let (d, e) = (shot.d, shot.e);
            let back = ctx.back_mpa(i);
            let x = if by_ratio {
                let guess = if i == 0 {
                    self.guesses.first().copied().unwrap_or(0.2)
                } else {
                    shot.prev
                };
                let hint = self.angle_hints.get(i).copied();
                let x = ctx.strain_at_ratio(c.law, d, (e, back), t, (guess, hint), true, 1e-10)?;
                if i < self.guesses.len() {
                    self.guesses[i] = x;
                } else {
                    self.guesses.push(x);
                }
                x
            } else {
                t
            };
            shot.prev = x;
            if x <= PASS_STRAIN_FLOOR * 1.000001 {
                // No pass from here is light enough to be at this level.
                shot.light_fail.get_or_insert(i);
                shot.floored = true;
                shot.light_margin.push(-1.0);
                shot.heavy_margin.push(1.0);
                break;
            }
            let d_out = d * (-0.5 * x).exp();
            let p = ctx.pick(c.law, d, d_out, e, back, true).map_err(fail(d))?;
            if by_ratio {
                if i < self.angle_hints.len() {
                    self.angle_hints[i] = p.semi_angle_deg;
                } else {
                    self.angle_hints.push(p.semi_angle_deg);
                }
            }
            let (mr, mh, ml) = ctx.margins(&p);
            let mut heavy = false;
            let mut light_here = Vec::new();
            let mut heavy_here = Vec::new();
            // The cold-work limit is the run's strain cap (`Class::strain_cap`,
            // which `b(n)` is cut to): as a breach it would only move `t_b` to
            // where the run reaches the cap, a level solve per count that
            // changes no range.
            for b in ctx
                .breaches_within(&p, SEARCH_GUARD)
                .into_iter()
                .filter(|b| !matches!(b, Breach::ColdWork(_)))
            {
                let light = b.is_light()
                    || (!by_ratio && matches!(b, super::limits::Breach::Ratio(_)) && {
                        // The ratio's light side: a heavier pass has a lower ratio.
                        let q = ctx
                            .pick(c.law, d, d * (-0.51 * x).exp(), e, back, true)
                            .map_err(fail(d))?;
                        q.ratio < p.ratio
                    });
                if light {
                    light_here.push(b);
                } else {
                    heavy = true;
                    heavy_here.push(b);
                }
            }
            // The ratio's margin goes with the side its breach was put on.
            let ratio_light = light_here.iter().any(|b| matches!(b, Breach::Ratio(_)));
            if by_ratio || !ratio_light {
                shot.heavy_margin.push(mh.min(mr));
                shot.light_margin.push(ml);
            } else {
                shot.heavy_margin.push(mh);
                shot.light_margin.push(ml.min(mr));
            }
            if !light_here.is_empty() && shot.light_fail.is_none() {
                shot.light_fail = Some(i);
                shot.light_breaches = light_here;
            }
            if heavy {
                shot.heavy_stop = Some(i);
                shot.stop_breaches = heavy_here;
                break;
            }
            let cum = shot.cum.last().copied().unwrap_or(0.0) + x;
            shot.cum.push(cum);
            shot.d = d_out;
            shot.e = p.strain_after;
        }
        Ok(shot)
    }

    fn scaled_probe(&self, n: u32, t: f64) -> Result<Probe, DesignError> {
        let c = self.class;
        let ch = self.chooser;
        let strains: Vec<f64> = weights(ch.strategy, ch.taper, n)
            .iter()
            .map(|w| w * t)
            .collect();
        ch.probe(c.law, c.e0, c.from_mm, &strains, c.strain_cap)
    }

    fn scaled_interval(&mut self, n: u32) -> Result<Option<Interval>, DesignError> {
        let top_t = self.level_top(n);
        let top = self.scaled_probe(n, top_t)?;
        if !top.light_ok {
            return Ok(None);
        }
        let (mut lo, mut hi) = (0.0, top_t);
        for _ in 0..BISECTIONS {
            let m = 0.5 * (lo + hi);
            if self.scaled_probe(n, m)?.light_ok {
                hi = m;
            } else {
                lo = m;
            }
        }
        let t_a = hi;
        if !self.scaled_probe(n, t_a)?.heavy_ok {
            return Ok(None);
        }
        let t_b = if top.heavy_ok {
            top_t
        } else {
            let (mut lo, mut hi) = (t_a, top_t);
            for _ in 0..BISECTIONS {
                let m = 0.5 * (lo + hi);
                if self.scaled_probe(n, m)?.heavy_ok {
                    lo = m;
                } else {
                    hi = m;
                }
            }
            lo
        };
        Ok(Some(Interval {
            lo: n as f64 * t_a,
            hi: n as f64 * t_b,
        }))
    }
}
