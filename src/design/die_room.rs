//! Die-room rounding: every die but the finish die moved to a size the die
//! room stocks (a multiple of `target.die_step_mm`, or one of
//! `target.die_sizes_mm`), the rounded schedule re-checked pass by pass, and
//! the die list a die room orders from.
//!
//! Dies are taken in drawing order. For each, the stock sizes just below and
//! just above the designed size are tried, nearest first; a size is kept when
//! the pass into it and the pass out of it (to the next designed size) meet
//! every limit the design holds passes to, and, for the die before a temper
//! anneal, when it lies in the anneal window. The finish die stays the
//! finish size exactly (it is the product).

use super::anneal::WindowStrains;
use super::limits::{Ctx, PassPick};
use super::model::DieOrder;
use super::runs::Run;
use super::DesignError;

/// The sizes the die room stocks.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum Stock {
    /// Multiples of a step, mm.
    Step(f64),
    /// A list of sizes, mm, sorted.
    Sizes(Vec<f64>),
}

impl Stock {
    /// The stock sizes just below (or at) and just above `x`, nearest first.
    fn around(&self, x: f64) -> Vec<f64> {
        let (below, above) = match self {
            Stock::Step(step) => {
                let k = (x / step).floor();
                let clean = |v: f64| format!("{v:.9}").parse::<f64>().unwrap_or(v);
                let b = clean(k * step);
                let a = clean((k + 1.0) * step);
                // A size a hair under x may print above it.
                (
                    if b > x { clean((k - 1.0) * step) } else { b },
                    if a <= x { clean((k + 2.0) * step) } else { a },
                )
            }
            Stock::Sizes(v) => {
                let b = v
                    .iter()
                    .copied()
                    .filter(|s| *s <= x)
                    .fold(f64::NAN, f64::max);
                let a = v
                    .iter()
                    .copied()
                    .filter(|s| *s > x)
                    .fold(f64::NAN, f64::min);
                (b, a)
            }
        };
        let mut out: Vec<f64> = [below, above]
            .into_iter()
            .filter(|s| s.is_finite())
            .collect();
        out.sort_by(|p, q| (p - x).abs().total_cmp(&(q - x).abs()));
        out
    }

    /// The stock in words.
    /// Decimals (mm) the stock is given to: the shortest form of the step, or
    /// the most of the sizes, at most 6.
    pub(super) fn decimals(&self) -> usize {
        let of = |x: &f64| {
            let t = x.to_string();
            t.split_once('.').map_or(0, |(_, f)| f.len())
        };
        match self {
            Stock::Step(s) => of(s),
            Stock::Sizes(v) => v.iter().map(of).max().unwrap_or(0),
        }
        .min(6)
    }

    pub(super) fn words(&self) -> String {
        match self {
            Stock::Step(s) => format!("steps of {s} mm (target.die_step_mm)"),
            Stock::Sizes(v) => format!("{} stock sizes (target.die_sizes_mm)", v.len()),
        }
    }
}

/// The runs with every die but the finish rounded to the stock.
pub(super) fn round<'f>(
    ctx: &Ctx<'f>,
    runs: &[(Run<'f>, Vec<PassPick>)],
    stock: &Stock,
    window: Option<(usize, WindowStrains)>,
) -> Result<Vec<(Run<'f>, Vec<PassPick>)>, DesignError> {
    // Designed exits in order, with the run each belongs to.
    let flat: Vec<(usize, f64)> = runs
        .iter()
        .enumerate()
        .flat_map(|(i, (_, p))| p.iter().map(move |x| (i, x.exit_mm)))
        .collect();
    let finish = ctx.finish_mm;
    let mut out: Vec<(Run<'f>, Vec<PassPick>)> =
        runs.iter().map(|(r, _)| (*r, Vec::new())).collect();
    let mut d = runs.first().map_or(finish, |r| r.0.from_mm);
    let mut step = 0usize;
    for (k, &(ri, x)) in flat.iter().enumerate() {
        step += 1;
        let run = runs[ri].0;
        let e = out[ri].1.last().map_or(run.strain0, |p| p.strain_after);
        // This pass's place in its run, and the next pass's in its own.
        let place = out[ri].1.len();
        let last_of_run = flat.get(k + 1).is_none_or(|n| n.0 != ri);
        if k + 1 == flat.len() {
            let p = pick(ctx, &run, (d, finish), (e, place), step)?;
            out[ri].1.push(p);
            break;
        }
        let (next_run, next_x) = flat[k + 1];
        let next_law_run = runs[next_run].0;
        let mut tried = Vec::new();
        let mut chosen = None;
        for c in stock.around(x) {
            if !(c < d && c > finish) {
                continue;
            }
            if let Some((wr, w)) = window {
                if last_of_run && ri == wr {
                    let r = w.diameters(finish);
                    if !(r.min_mm..=r.max_mm).contains(&c) {
                        tried.push(format!("{c} mm (outside the anneal window)"));
                        continue;
                    }
                }
            }
            let p = pick(ctx, &run, (d, c), (e, place), step)?;
            let broken: Vec<String> = ctx.breaches(&p).iter().map(|b| b.describe(ctx)).collect();
            // The pass out of it, to the next designed size.
            let (e_next, law_next, place_next) = if last_of_run {
                (next_law_run.strain0, next_law_run.law, 0)
            } else {
                (p.strain_after, run.law, place + 1)
            };
            let next_ok = next_x < c && {
                let q = ctx
                    .pick(law_next, c, next_x, e_next, ctx.back_mpa(place_next), false)
                    .map_err(|problem| DesignError::Pass {
                        pass: format!("step {}", step + 1),
                        problem,
                    })?;
                ctx.breaches(&q).is_empty()
            };
            if broken.is_empty() && next_ok {
                chosen = Some(p);
                break;
            }
            tried.push(if broken.is_empty() {
                format!("{c} mm (leaves the next pass over a limit)")
            } else {
                format!("{c} mm ({})", broken.join(", "))
            });
        }
        let Some(p) = chosen else {
            return Err(DesignError::DieRoom {
                step,
                size_mm: x,
                choices: stock.words(),
                broken: if tried.is_empty() {
                    "no stock size lies between the dies before and after".into()
                } else {
                    tried.join("; ")
                },
            });
        };
        d = p.exit_mm;
        out[ri].1.push(p);
    }
    // Run ends follow the rounded dies.
    let mut from = runs.first().map_or(finish, |r| r.0.from_mm);
    for (r, p) in out.iter_mut() {
        r.from_mm = from;
        if let Some(last) = p.last() {
            r.to_mm = last.exit_mm;
        } else {
            r.to_mm = from;
        }
        from = r.to_mm;
    }
    Ok(out)
}

/// The pass of `run` from `d` to `c` at strain `e`, the `place`-th of its
/// run (from 0, for its back tension).
fn pick(
    ctx: &Ctx,
    run: &Run,
    (d, c): (f64, f64),
    (e, place): (f64, usize),
    step: usize,
) -> Result<PassPick, DesignError> {
    ctx.pick(run.law, d, c, e, ctx.back_mpa(place), false)
        .map_err(|problem| DesignError::Pass {
            pass: format!("step {step}"),
            problem,
        })
}

/// Each distinct die (size, angle, land) with the passes that use it, largest first.
pub(super) fn die_list(dies: &[(f64, f64, f64)]) -> Vec<DieOrder> {
    let mut out: Vec<DieOrder> = Vec::new();
    for &(size, angle, land) in dies {
        match out
            .iter_mut()
            .find(|o| o.size_mm == size && o.semi_angle_deg == angle && o.land_length_mm == land)
        {
            Some(o) => o.count += 1,
            None => out.push(DieOrder {
                size_mm: size,
                semi_angle_deg: angle,
                land_length_mm: land,
                count: 1,
            }),
        }
    }
    out.sort_by(|a, b| b.size_mm.total_cmp(&a.size_mm));
    out
}
