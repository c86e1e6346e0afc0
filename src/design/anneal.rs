//! Anneal placement inputs: the strain range the temper window allows after
//! the last anneal, and the diameters that range stands for.
//!
//! After an anneal the stock follows the annealed law from strain 0, so the
//! finished flow stress is `sigma(eps_w)` with `eps_w` the true strain from
//! the anneal to the finish. The window `[s_min, s_max]` allows
//! `eps_w in [eps(s_min), eps(s_max)]` by the law's inverse
//! (`FlowLaw::strain_at_stress`), cut to the cold-work limit and the whole
//! reduction; an anneal at `D_a = D_f exp(eps_w / 2)` (Dieter, ch. 19:
//! `eps = 2 ln(D0/D1)`) lands in the window for any `D_a` in
//! `[D_f exp(eps_lo / 2), D_f exp(eps_hi / 2)]`.

use crate::flow::StrainAt;
use crate::schedule::{ScheduleFile, Target};

use super::limits::solve_increasing;
use super::model::DiameterRange;
use super::search::{Split, Tables};
use super::strategies::RunTable;
use super::{DesignError, COLD_WORK_MARGIN};

/// What a temper window asks of the last run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct WindowStrains {
    /// Least strain after the last anneal (0 when the annealed stock is already in the window).
    pub(super) lo: f64,
    /// Most strain after the last anneal (window, cold-work limit, whole reduction).
    pub(super) hi: f64,
    /// Strain that lands the middle of the window (clamped to `[lo, hi]`).
    pub(super) aim: f64,
    /// Drawn straight through from the start, the wire lands in the window.
    pub(super) straight_ok: bool,
}

impl WindowStrains {
    /// The anneal diameters, mm, that land in the window.
    pub(super) fn diameters(&self, finish_mm: f64) -> DiameterRange {
        DiameterRange {
            min_mm: finish_mm * (0.5 * self.lo).exp(),
            max_mm: finish_mm * (0.5 * self.hi).exp(),
        }
    }
}

/// The strain range after the last anneal that the window allows, or `None`
/// without a window. Errors name a window no anneal can reach.
pub(super) fn window_strains(
    file: &ScheduleFile,
    target: &Target,
    total: f64,
    finish_mm: f64,
) -> Result<Option<WindowStrains>, DesignError> {
    let Some(w) = target.strength_mpa else {
        return Ok(None);
    };
    let e0 = file.start.strain;
    let limit = file.material.cold_work_limit;
    let l_eff = limit.map_or(f64::INFINITY, |l| l * (1.0 - COLD_WORK_MARGIN));
    let no_anneal = file.material.flow.stress_mpa(e0 + total);
    let straight_ok = e0 + total <= l_eff && (w.min..=w.max).contains(&no_anneal);
    let law_a = file.annealed_law();
    let annealed = law_a.stress_mpa(0.0);
    let strain_at = |s: f64| {
        law_a.strain_at_stress(s).map_err(|e| DesignError::Input {
            key: "target.strength_mpa".into(),
            why: e.to_string(),
        })
    };
    let fail = |e: DesignError| -> Result<Option<WindowStrains>, DesignError> {
        if straight_ok {
            Ok(Some(WindowStrains {
                lo: 1.0,
                hi: 0.0,
                aim: 0.0,
                straight_ok,
            }))
        } else {
            Err(e)
        }
    };
    if annealed > w.max {
        return fail(DesignError::WindowBelowAnnealed {
            min: w.min,
            max: w.max,
            annealed_mpa: annealed,
        });
    }
    let e_lo = if annealed >= w.min {
        0.0
    } else {
        match strain_at(w.min)? {
            StrainAt::Reached(e) => e,
            StrainAt::Unreachable { limit_mpa } => {
                return fail(DesignError::WindowAboveSaturation {
                    min: w.min,
                    max: w.max,
                    saturation_mpa: limit_mpa,
                })
            }
        }
    };
    let e_hi = match strain_at(w.max)? {
        StrainAt::Reached(e) => e,
        StrainAt::Unreachable { .. } => f64::INFINITY,
    };
    let mid = 0.5 * (w.min + w.max);
    let aim = match strain_at(mid)? {
        StrainAt::Reached(e) => e,
        StrainAt::Unreachable { .. } => e_lo,
    };
    if let Some(l) = limit {
        if e_lo > l_eff {
            return fail(DesignError::WindowColdWork {
                min: w.min,
                strain_needed: e_lo,
                cold_work_limit: l,
                stress_at_limit_mpa: law_a.stress_mpa(l),
            });
        }
    }
    if e_lo > total {
        return fail(DesignError::WindowReduction {
            min: w.min,
            strain_needed: e_lo,
            strain_available: total,
            stress_without_anneal_mpa: no_anneal,
            start_needed_mm: finish_mm * (0.5 * e_lo).exp(),
        });
    }
    let hi = e_hi.min(l_eff).min(total);
    Ok(Some(WindowStrains {
        lo: e_lo,
        hi,
        aim: aim.clamp(e_lo, hi),
        straight_ok,
    }))
}

/// The strain of each run of `split` (first, middle runs, temper run),
/// whether every run with passes could be held at one level, and that level
/// when it was solved (for equal-ratio the common draw ratio, where each
/// run's own layout starts its solve).
///
/// With a window and `aim_temper`, the temper run takes the strain nearest
/// the window's middle that leaves the other runs a feasible total. The rest
/// is spread by one *level* `lambda` (the draw ratio for equal-ratio, the pass
/// strain otherwise): each run takes `clamp(S_i(lambda), a_i, b_i)`, and
/// `lambda` is solved so the run strains sum to the whole reduction
/// (`S_i` rises with `lambda`, so the sum does: a bracketed solve). Runs not clamped
/// share one level, which makes the ratios equal across runs wherever the
/// limits allow.
pub(super) fn place(
    tables: &mut Tables,
    split: &Split,
    window: Option<WindowStrains>,
    aim_temper: bool,
) -> Result<(Vec<f64>, bool, Option<f64>), DesignError> {
    let total = tables.total;
    let mut counts = vec![split.first];
    counts.extend(split.middle.iter().copied());
    if let Some(t) = split.temper {
        counts.push(t);
    }
    let r = counts.len();
    let mut ivs = Vec::with_capacity(r);
    for i in 0..r {
        ivs.push(tables.run_iv(split, i)?);
    }
    let mut fixed: Vec<Option<f64>> = counts.iter().map(|&n| (n == 0).then_some(0.0)).collect();
    if let (Some(w), true, Some(_)) = (window, aim_temper, split.temper) {
        let t = r - 1;
        if fixed[t].is_none() {
            let others_lo: f64 = (0..t).map(|i| ivs[i].lo).sum();
            let others_hi: f64 = (0..t).map(|i| ivs[i].hi).sum();
            let lo = ivs[t].lo.max(total - others_hi);
            let hi = ivs[t].hi.min(total - others_lo);
            fixed[t] = Some(w.aim.clamp(lo, hi.max(lo)));
        }
    }
    let rest = total - fixed.iter().flatten().sum::<f64>();
    let free: Vec<usize> = (0..r).filter(|i| fixed[*i].is_none()).collect();
    let mut s: Vec<f64> = fixed.iter().map(|x| x.unwrap_or(0.0)).collect();
    if free.is_empty() {
        return Ok((s, true, None));
    }
    let top = free
        .iter()
        .map(|&i| table(tables, i).level_top(counts[i]))
        .fold(0.0, f64::max);
    // The sum of the clamped run strains at a level, whether a run is
    // clamped, and the sum less `rest` plus `TILT` times how far the runs'
    // own strains pass their ends (at most 1 each): rising where every run
    // is clamped, so that its root is the least level whose clamped sum
    // reaches `rest` (the difference taken first, so the tilt is not lost
    // to rounding).
    const TILT: f64 = 1e-12;
    let mut eval = |lam: f64, s: &mut Vec<f64>| -> Result<(f64, bool, f64), DesignError> {
        let mut sum = 0.0;
        let mut past = 0.0;
        let mut clamped = false;
        for &i in &free {
            let raw = table(tables, i).strain_at(counts[i], lam)?;
            let v = raw.clamp(ivs[i].lo, ivs[i].hi);
            clamped |= raw < ivs[i].lo * (1.0 - 1e-9) || raw > ivs[i].hi * (1.0 + 1e-9);
            past += (raw - v).clamp(-1.0, 1.0);
            s[i] = v;
            sum += v;
        }
        Ok((sum, clamped, (sum - rest) + TILT * past))
    };
    // The level where the tilted difference is 0: regula falsi (Illinois,
    // with halvings) on it, to 1e-13 of the level range; the last rounding goes
    // to the runs below.
    let f_lo = eval(0.0, &mut s)?.2;
    let f_hi = eval(top, &mut s)?.2;
    let level = if f_lo >= 0.0 {
        0.0
    } else if f_hi <= 0.0 {
        top
    } else {
        // Solved in `u = lambda + top`, so that the tolerance is of the
        // level range even where the level is near 0. Where a run's strain
        // jumps (a level past its heavy side) the solve may not settle: then
        // 60 halvings of the level range, the least level whose sum reaches.
        match solve_increasing(
            |u| Ok(eval(u - top, &mut s)?.2),
            top,
            2.0 * top,
            f_lo,
            f_hi,
            1e-13,
            "anneal placement",
        ) {
            Ok(u) => u - top,
            Err(DesignError::Solver { .. }) => {
                let (mut lo, mut hi) = (0.0, top);
                for _ in 0..60 {
                    let m = 0.5 * (lo + hi);
                    if eval(m, &mut s)?.2 < 0.0 {
                        lo = m;
                    } else {
                        hi = m;
                    }
                }
                hi
            }
            Err(e) => return Err(e),
        }
    };
    let (_, clamped, _) = eval(level, &mut s)?;
    // Hand the last rounding to the runs with room, in order.
    let mut residual = rest - free.iter().map(|&i| s[i]).sum::<f64>();
    for &i in &free {
        if residual == 0.0 {
            break;
        }
        let v = (s[i] + residual).clamp(ivs[i].lo, ivs[i].hi);
        residual -= v - s[i];
        s[i] = v;
    }
    Ok((s, !clamped, Some(level)))
}

fn table<'a, 'c, 'f>(tables: &'a mut Tables<'c, 'f>, i: usize) -> &'a mut RunTable<'c, 'f> {
    if i == 0 {
        &mut tables.first
    } else {
        tables.annealed()
    }
}
