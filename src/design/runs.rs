//! A run laid out at its place: the passes between two anneals from their
//! actual entry size to their actual exit, with the real die land, and the
//! equal-ratio solve that lands the last exit on the run's end.

use crate::flow::FlowLaw;
use crate::pass;
use crate::schedule::Strategy;

use super::limits::{solve_increasing, PassPick};
use super::strategies::{weights, Chooser};
use super::{DesignError, PASSES_COUNT_CEILING, PASS_STRAIN_FLOOR};

/// A run to draw: from `from_mm` to `to_mm` with `law`, starting at strain `strain0`.
#[derive(Debug, Clone, Copy)]
pub(super) struct Run<'a> {
    /// Run number, from 1.
    pub(super) index: usize,
    pub(super) law: &'a FlowLaw,
    pub(super) strain0: f64,
    pub(super) from_mm: f64,
    pub(super) to_mm: f64,
}

impl Run<'_> {
    pub(super) fn strain(&self) -> f64 {
        pass::true_strain(self.from_mm, self.to_mm)
    }
}

impl Chooser<'_> {
    /// Passes of the given strains, evaluated in order; the last exit is `run.to_mm` exactly.
    pub(super) fn passes_of(
        &self,
        run: &Run,
        strains: &[f64],
    ) -> Result<Vec<PassPick>, DesignError> {
        let mut out = Vec::with_capacity(strains.len());
        let (mut d, mut e, mut cum) = (run.from_mm, run.strain0, 0.0);
        for (i, x) in strains.iter().enumerate() {
            cum += x;
            let d_out = if i + 1 == strains.len() {
                run.to_mm
            } else {
                run.from_mm * (-0.5 * cum).exp()
            };
            let p = self
                .ctx
                .pick(run.law, d, d_out, e, self.ctx.back_mpa(i), false)
                .map_err(|problem| DesignError::Pass {
                    pass: format!("run {}, pass {}", run.index, i + 1),
                    problem,
                })?;
            d = d_out;
            e = p.strain_after;
            out.push(p);
        }
        Ok(out)
    }

    /// Shoots `n` passes each at ratio `rho` (or until the end is reached when
    /// `n` is `None`); returns the pass strains and the diameter reached.
    /// `guesses` holds each pass's strain and stock angle from the last shot
    /// (where the next one's solves start), and is updated.
    fn shoot(
        &self,
        run: &Run,
        rho: f64,
        n: Option<u32>,
        (guesses, angles): (&mut Vec<f64>, &mut Vec<f64>),
    ) -> Result<(Vec<f64>, f64), DesignError> {
        let (mut d, mut e) = (run.from_mm, run.strain0);
        let mut strains = Vec::new();
        let count = n.unwrap_or(PASSES_COUNT_CEILING) as usize;
        for i in 0..count {
            if n.is_none() && d <= run.to_mm * (1.0 + 1e-12) {
                break;
            }
            let guess = guesses
                .get(i)
                .copied()
                .or(strains.last().copied())
                .unwrap_or(0.2);
            let x = self.ctx.strain_at_ratio(
                run.law,
                d,
                (e, self.ctx.back_mpa(i)),
                rho,
                (guess, angles.get(i).copied()),
                false,
                1e-14,
            )?;
            if i < guesses.len() {
                guesses[i] = x;
            } else {
                guesses.push(x);
            }
            // The pick at the root is the solve's last (kept by the memo).
            let p = self
                .ctx
                .pick(
                    run.law,
                    d,
                    d * (-0.5 * x).exp(),
                    e,
                    self.ctx.back_mpa(i),
                    false,
                )
                .map_err(|problem| DesignError::Pass {
                    pass: format!("run {}, pass {}", run.index, i + 1),
                    problem,
                })?;
            if i < angles.len() {
                angles[i] = p.semi_angle_deg;
            } else {
                angles.push(p.semi_angle_deg);
            }
            strains.push(x);
            e += x;
            d *= (-0.5 * x).exp();
            if n.is_none() && x <= PASS_STRAIN_FLOOR {
                // No progress: even the lightest pass is over the ratio.
                break;
            }
        }
        Ok((strains, d))
    }

    /// The equal-ratio pass strains of `n` passes: the common ratio solved so
    /// that the last exit lands on `run.to_mm`.
    fn equal_ratio_strains(
        &self,
        run: &Run,
        n: u32,
        hint: Option<f64>,
    ) -> Result<(Vec<f64>, f64), DesignError> {
        let total = run.strain();
        let even = vec![total / n as f64; n as usize];
        let start = self.passes_of(run, &even)?;
        // The bracket: about the ratio the tables placed the run at, when
        // given (the bracket steps out below if the run's own sizes move
        // it), else the ratios of an even split.
        let (mut lo_rho, mut hi_rho) = match hint.filter(|h| h.is_finite() && *h > 0.0) {
            Some(h) => (h * (1.0 - 1e-9), h * (1.0 + 1e-9)),
            None => (
                start.iter().map(|p| p.ratio).fold(f64::INFINITY, f64::min),
                start.iter().map(|p| p.ratio).fold(0.0, f64::max),
            ),
        };
        let mut guesses: Vec<f64> = even.clone();
        let mut angles: Vec<f64> = start.iter().map(|p| p.semi_angle_deg).collect();
        let target = run.to_mm.ln();
        // gap(rho) = ln(target) - ln(D_n(rho)): increasing in rho.
        let gap = |rho: f64, g: (&mut Vec<f64>, &mut Vec<f64>)| -> Result<f64, DesignError> {
            let (_, d) = self.shoot(run, rho, Some(n), g)?;
            Ok(target - d.ln())
        };
        let mut flo = gap(lo_rho, (&mut guesses, &mut angles))?;
        let mut fhi = gap(hi_rho, (&mut guesses, &mut angles))?;
        for _ in 0..60 {
            if flo <= 0.0 {
                break;
            }
            hi_rho = lo_rho;
            fhi = flo;
            lo_rho *= 0.8;
            flo = gap(lo_rho, (&mut guesses, &mut angles))?;
        }
        for _ in 0..60 {
            if fhi >= 0.0 {
                break;
            }
            lo_rho = hi_rho;
            flo = fhi;
            hi_rho *= 1.25;
            fhi = gap(hi_rho, (&mut guesses, &mut angles))?;
        }
        if flo > 0.0 || fhi < 0.0 {
            return Err(DesignError::Solver {
                what: "equal-ratio bracket",
                iterations: 60,
            });
        }
        let rho = solve_increasing(
            |r| gap(r, (&mut guesses, &mut angles)),
            lo_rho,
            hi_rho,
            flo,
            fhi,
            1e-13,
            "equal-ratio",
        )?;
        let (strains, _) = self.shoot(run, rho, Some(n), (&mut guesses, &mut angles))?;
        Ok((strains, rho))
    }

    /// The pass strains of `n` passes by the strategy; `hint` is the draw
    /// ratio an equal-ratio run is likely at (the placement's level).
    pub(super) fn strains(
        &self,
        run: &Run,
        n: u32,
        hint: Option<f64>,
    ) -> Result<Vec<f64>, DesignError> {
        let total = run.strain();
        Ok(match self.strategy {
            Strategy::EqualStrain => vec![total / n as f64; n as usize],
            Strategy::Tapered => weights(self.strategy, self.taper, n)
                .iter()
                .map(|w| w * total / n as f64)
                .collect(),
            Strategy::EqualRatio => self.equal_ratio_strains(run, n, hint)?.0,
        })
    }
}
