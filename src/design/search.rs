//! The search: the pass count of every run and the number of anneals,
//! chosen together by a dynamic programme over runs.
//!
//! A design is a first run (the stock's law from its start strain, possibly
//! of no passes: an anneal before the first die), `j` runs of annealed stock,
//! and, with a temper window, a last annealed run whose strain lies in the
//! window's strain range (possibly of no passes: an anneal after the last
//! die). Run `i` with `n_i` passes can carry any strain in
//! `I_i(n_i) = [a_i(n_i), b_i(n_i)]` (`strategies`), and the run strains must
//! sum to the whole reduction `E`. Because the ranges are intervals, a
//! split `(n_1, ..., n_r)` has a design exactly when
//! `sum a_i(n_i) <= E <= sum b_i(n_i)` (choose each run strain in its range;
//! the Minkowski sum of intervals is the interval of the sums).
//!
//! `A[j][p]`, the set of total strains that the first run and `j` annealed
//! runs reach with `p` passes in all, is a finite union of intervals with
//! `A[0][p] = I_first(p)` and `A[j][p] = U_m (A[j-1][p-m] + I_annealed(m))`.
//! With `target.max_anneals` set, trying totals `N = 1, 2, ...` and, for
//! each, anneal counts `k = 0, 1, ..., max_anneals`, and stopping at the
//! first `(N, k)` whose set holds `E`, gives the fewest passes and, among
//! designs with that many, the fewest anneals: every split with fewer passes,
//! or as many with fewer anneals, lies in a set already tried and found not
//! to hold `E`. By default anneals cost more than passes (furnace time): the
//! loops are swapped, giving the fewest anneals any design needs (those the
//! cold-work limit and the temper window force), then the fewest passes with
//! that many. When no `(N, k)` within the bounds works, no split exists
//! within the model: the answer "no design" is true.

use super::strategies::{Interval, RunTable};
use super::DesignError;

/// A finite union of closed intervals, sorted and disjoint.
type Set = Vec<(f64, f64)>;

/// Pass counts of a design, run by run.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(super) struct Split {
    /// Passes of the first run (0: the stock is annealed before the first die).
    pub(super) first: u32,
    /// Passes of each annealed run between the first and the temper run.
    pub(super) middle: Vec<u32>,
    /// Passes of the temper run, when the target has a strength window
    /// (0: the wire is annealed after the last die).
    pub(super) temper: Option<u32>,
}

impl Split {
    /// Draw passes in all.
    pub(super) fn passes(&self) -> u32 {
        self.first + self.middle.iter().sum::<u32>() + self.temper.unwrap_or(0)
    }
}

/// What the search works on: the run tables and the whole reduction.
pub(super) struct Tables<'c, 'f> {
    pub(super) first: RunTable<'c, 'f>,
    annealed_own: RunTable<'c, 'f>,
    /// The first run is of the same kind as an annealed one (no start strain,
    /// the same law): one table serves both.
    same: bool,
    /// Strain range of the temper run, when there is a window.
    pub(super) window: Option<Interval>,
    /// The stock may be annealed before the first die (it arrives with cold work).
    pub(super) anneal_first: bool,
    /// With a window: the stock drawn straight through lands in it.
    pub(super) straight_ok: bool,
    /// Whole reduction, true strain.
    pub(super) total: f64,
    /// Strain of the temper run that lands the window's middle.
    pub(super) aim: Option<f64>,
    rows: Vec<Vec<Option<Set>>>,
    /// Runs are looked at only up to the count that reaches their class's
    /// strain cap ([`RunTable::capped_by`]): set while the fewest passes
    /// are sought, not for an exact count.
    prune: bool,
}

fn tol(total: f64) -> f64 {
    1e-12 * total.max(1e-9)
}

fn merge(mut v: Set, eps: f64) -> Set {
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut out: Set = Vec::with_capacity(v.len());
    for (lo, hi) in v {
        match out.last_mut() {
            Some(last) if lo <= last.1 + eps => last.1 = last.1.max(hi),
            _ => out.push((lo, hi)),
        }
    }
    out
}

fn meets(set: &Set, lo: f64, hi: f64, eps: f64) -> bool {
    set.iter().any(|&(a, b)| a <= hi + eps && lo <= b + eps)
}

impl<'c, 'f> Tables<'c, 'f> {
    pub(super) fn new(
        first: RunTable<'c, 'f>,
        annealed: RunTable<'c, 'f>,
        window: Option<Interval>,
        anneal_first: bool,
        straight_ok: bool,
        total: f64,
    ) -> Self {
        Tables {
            first,
            annealed_own: annealed,
            same: false,
            window,
            anneal_first,
            straight_ok,
            total,
            aim: None,
            rows: Vec::new(),
            prune: false,
        }
    }

    /// Let the first run share the annealed table (when the two are of one kind).
    pub(super) fn share(&mut self) {
        self.same = true;
    }

    /// The table of annealed runs.
    pub(super) fn annealed(&mut self) -> &mut RunTable<'c, 'f> {
        if self.same {
            &mut self.first
        } else {
            &mut self.annealed_own
        }
    }

    pub(super) fn max_n(&self) -> u32 {
        self.first.max_n()
    }

    fn first_iv(&mut self, n: u32) -> Result<Option<Interval>, DesignError> {
        if n == 0 {
            return Ok(self.anneal_first.then_some(Interval { lo: 0.0, hi: 0.0 }));
        }
        self.first.interval(n)
    }

    pub(super) fn temper_iv(&mut self, n: u32) -> Result<Option<Interval>, DesignError> {
        let Some(w) = self.window else {
            return Ok(None);
        };
        let iv = if n == 0 {
            Some(Interval { lo: 0.0, hi: 0.0 })
        } else {
            self.annealed().interval(n)?
        };
        Ok(iv.and_then(|iv| {
            let lo = iv.lo.max(w.lo);
            let hi = iv.hi.min(w.hi);
            (lo <= hi).then_some(Interval { lo, hi })
        }))
    }

    /// The range run `i` of `split` may carry (`i` counts the first run as 0).
    pub(super) fn run_iv(&mut self, split: &Split, i: usize) -> Result<Interval, DesignError> {
        let none = || DesignError::Input {
            key: "target".into(),
            why: "internal: a run of the chosen split has no range".into(),
        };
        let iv = if i == 0 {
            self.first_iv(split.first)?
        } else if i <= split.middle.len() {
            self.annealed().interval(split.middle[i - 1])?
        } else {
            self.temper_iv(split.temper.unwrap_or(0))?
        };
        iv.ok_or_else(none)
    }

    /// Cell `(j, p)` of the programme, computed on first use.
    fn cell(&mut self, j: usize, p: usize) -> Result<&Set, DesignError> {
        let eps = tol(self.total);
        while self.rows.len() <= j {
            self.rows.push(Vec::new());
        }
        if self.rows[j].len() <= p {
            self.rows[j].resize(p + 1, None);
        }
        if self.rows[j][p].is_none() {
            let set = if j == 0 {
                if self.past_cap(true, p)? {
                    Vec::new()
                } else {
                    match self.first_iv(p as u32)? {
                        Some(iv) => vec![(iv.lo, iv.hi)],
                        None => Vec::new(),
                    }
                }
            } else {
                let mut acc: Set = Vec::new();
                for m in 1..=p.saturating_sub(j - 1) {
                    if self.past_cap(false, m)? {
                        break;
                    }
                    let Some(iv) = self.annealed().interval(m as u32)? else {
                        continue;
                    };
                    let prev = self.cell(j - 1, p - m)?.clone();
                    for (a, b) in prev {
                        if a + iv.lo <= self.total + eps {
                            acc.push((a + iv.lo, (b + iv.hi).min(self.total)));
                        }
                    }
                }
                merge(acc, eps)
            };
            self.rows[j][p] = Some(set);
        }
        Ok(self.rows[j][p].as_ref().expect("just filled"))
    }

    /// Whether, while pruning, a run of `n` passes (of the first run's class
    /// with `first`, else the annealed one) is past the count that reaches
    /// its class's strain cap: in the fewest-passes search such a run is
    /// never needed, since that count carries every strain it can with fewer
    /// passes, and the first `(N, k)` and its split are those of the search
    /// that looks at every count.
    fn past_cap(&mut self, first: bool, n: usize) -> Result<bool, DesignError> {
        if !self.prune || n <= 1 {
            return Ok(false);
        }
        let t = if first {
            &mut self.first
        } else {
            self.annealed()
        };
        Ok(t.capped_by(n as u32 - 1)?.is_some_and(|c| n as u32 > c))
    }

    /// Whether row `j` is empty for every pass count up to `n`.
    fn row_empty(&mut self, j: usize, n: usize) -> Result<bool, DesignError> {
        for p in 0..=n {
            if !self.cell(j, p)?.is_empty() {
                return Ok(false);
            }
        }
        Ok(true)
    }

    /// The design the search asks for within `passes`: with `max_anneals`,
    /// the fewest passes with at most that many anneals, then the fewest
    /// anneals; without, the fewest anneals any design needs, then the fewest
    /// passes with that many. `None` when no count in the range has a design.
    pub(super) fn fewest(
        &mut self,
        passes: std::ops::RangeInclusive<u32>,
        max_anneals: Option<u32>,
    ) -> Result<Option<Split>, DesignError> {
        let (lo, hi) = (*passes.start().max(&1), (*passes.end()).min(self.max_n()));
        if lo > hi {
            return Ok(None);
        }
        self.prune = lo < hi;
        match max_anneals {
            Some(kmax) => {
                for n in lo..=hi {
                    for k in 0..=(kmax as usize).min(n as usize + 1) {
                        if k > 0 && self.row_empty(self.row_of(k), n as usize)? {
                            break;
                        }
                        if let Some(s) = self.check(n, k)? {
                            return Ok(Some(s));
                        }
                    }
                }
            }
            None => {
                for k in 0..=(hi as usize + 1) {
                    for n in lo..=hi {
                        if let Some(s) = self.check(n, k)? {
                            return Ok(Some(s));
                        }
                    }
                    // A row empty up to the bound stays empty with more
                    // anneals (not worked out while the runs' strain caps
                    // alone rule `k` out: more anneals may then serve).
                    if k > 0
                        && !self.short_of_cap(k)
                        && self.row_empty(self.row_of(k), hi as usize)?
                    {
                        break;
                    }
                }
            }
        }
        Ok(None)
    }

    /// The fewest anneals any design can have, whatever the draw-ratio cap:
    /// those the cold-work limit forces (the first run carries at most its
    /// strain cap, each later one the annealed cap, as in `check`), and one
    /// when a temper window cannot be met drawn straight through.
    pub(super) fn least_anneals(&mut self) -> usize {
        let e = self.total;
        let eps = tol(e);
        let c0 = self.first.class.strain_cap.max(0.0);
        let ca = self.annealed().class.strain_cap.max(0.0);
        let mut k = 0usize;
        while c0 + k as f64 * ca < e - eps && k <= super::PASSES_ALLOWED as usize {
            k += 1;
        }
        if self.window.is_some() && !self.straight_ok {
            k = k.max(1);
        }
        k
    }

    /// The programme row that holds designs with `k` anneals.
    fn row_of(&self, k: usize) -> usize {
        if self.window.is_some() {
            k - 1
        } else {
            k
        }
    }

    /// Capacity: the first run carries at most its cap, each later run at
    /// most the annealed cap; with `k` anneals, whether that sum is short of
    /// the whole reduction (then no split with `k` anneals can work).
    fn short_of_cap(&mut self, k: usize) -> bool {
        let e = self.total;
        let (c0, ca) = (
            self.first.class.strain_cap.max(0.0),
            self.annealed().class.strain_cap.max(0.0),
        );
        c0 + k as f64 * ca < e - tol(e)
    }

    /// A split of `n` passes with `k` anneals that carries the whole reduction.
    fn check(&mut self, n: u32, k: usize) -> Result<Option<Split>, DesignError> {
        let e = self.total;
        let eps = tol(e);
        if self.short_of_cap(k) {
            return Ok(None);
        }
        let windowed = self.window.is_some();
        if k == 0 {
            if windowed && !self.straight_ok {
                return Ok(None);
            }
            if let Some(iv) = self.first.interval(n)? {
                if iv.lo <= e + eps && e <= iv.hi + eps {
                    return Ok(Some(Split {
                        first: n,
                        middle: Vec::new(),
                        temper: None,
                    }));
                }
            }
            return Ok(None);
        }
        let j = self.row_of(k);
        if windowed {
            // First a temper run that can sit at the window's middle, then any.
            for (t, at_aim) in (0..=n)
                .map(|t| (t, true))
                .chain((0..=n).map(|t| (t, false)))
            {
                if self.past_cap(false, t as usize)? {
                    continue;
                }
                let Some(tv) = self.temper_iv(t)? else {
                    continue;
                };
                let p = (n - t) as usize;
                if j == 0 && p == 0 && !self.anneal_first {
                    continue;
                }
                let tv = match (at_aim, self.aim) {
                    (true, Some(a)) if tv.lo <= a && a <= tv.hi => Interval { lo: a, hi: a },
                    (true, _) => continue,
                    (false, _) => tv,
                };
                if meets(self.cell(j, p)?, e - tv.hi, e - tv.lo, eps) {
                    let middle = self.back(j, p, e - tv.hi, e - tv.lo)?;
                    let first = n - t - middle.iter().sum::<u32>();
                    return Ok(Some(Split {
                        first,
                        middle,
                        temper: Some(t),
                    }));
                }
            }
        } else if meets(self.cell(j, n as usize)?, e, e, eps) {
            let middle = self.back(j, n as usize, e, e)?;
            let first = n - middle.iter().sum::<u32>();
            return Ok(Some(Split {
                first,
                middle,
                temper: None,
            }));
        }
        Ok(None)
    }

    /// The annealed runs' pass counts of a split in row `j`, `p` passes,
    /// whose total strain meets `[lo, hi]`: most even counts first.
    fn back(&mut self, j: usize, p: usize, lo: f64, hi: f64) -> Result<Vec<u32>, DesignError> {
        let eps = tol(self.total);
        let mut out = Vec::new();
        let (mut p, mut lo, mut hi) = (p, lo, hi);
        for jj in (1..=j).rev() {
            let even = p as f64 / (jj + 1) as f64;
            let mut ms: Vec<usize> = (1..=p).collect();
            ms.sort_by(|a, b| {
                (*a as f64 - even)
                    .abs()
                    .total_cmp(&(*b as f64 - even).abs())
            });
            let mut found = None;
            for m in ms {
                if self.past_cap(false, m)? {
                    continue;
                }
                let Some(iv) = self.annealed().interval(m as u32)? else {
                    continue;
                };
                let (l2, h2) = (lo - iv.hi, hi - iv.lo);
                if meets(self.cell(jj - 1, p - m)?, l2, h2, eps) {
                    found = Some((m, l2, h2));
                    break;
                }
            }
            let Some((m, l2, h2)) = found else {
                return Err(DesignError::Input {
                    key: "target".into(),
                    why: "internal: the split could not be traced back".into(),
                });
            };
            out.push(m as u32);
            p -= m;
            lo = l2;
            hi = h2;
        }
        out.reverse();
        Ok(out)
    }
}
