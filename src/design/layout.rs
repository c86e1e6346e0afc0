//! A split laid out: each run's passes from its actual entry to its actual
//! exit, the limits the laid-out passes break, and the assembly of a split
//! into a design (layout, die-room rounding, then `finish`).

#[allow(unused_imports)]
use super::*;

/// The runs of a split laid out at their strains: each run's passes from its
/// actual entry to its actual exit.
pub(super) type RunPasses<'f> = Vec<(Run<'f>, Vec<PassPick>)>;

pub(super) fn lay_out<'f>(
    input: &Input<'f>,
    chooser: &Chooser<'f>,
    tables: &mut Tables<'_, 'f>,
    counts: &[u32],
    (strains, level): (&[f64], Option<f64>),
) -> Result<(RunPasses<'f>, Vec<usize>), DesignError> {
    let file = input.file;
    let r = counts.len();
    let mut by_table = Vec::new();
    let mut ends = vec![0.0; r];
    let mut d = input.finish_mm;
    for i in (0..r).rev() {
        ends[i] = d;
        d *= (0.5 * strains[i]).exp();
    }
    let mut out = Vec::with_capacity(r);
    let mut from = input.start_mm;
    for i in 0..r {
        let to = if counts[i] == 0 {
            from
        } else if i + 1 == r || counts[i + 1..].iter().all(|&n| n == 0) {
            input.finish_mm
        } else {
            ends[i]
        };
        let run = Run {
            index: i + 1,
            law: if i == 0 {
                &file.material.flow
            } else {
                file.annealed_law()
            },
            strain0: if i == 0 { file.start.strain } else { 0.0 },
            from_mm: from,
            to_mm: to,
        };
        let passes = if counts[i] == 0 {
            Vec::new()
        } else {
            let s = chooser.strains(&run, counts[i], level)?;
            let p = chooser.passes_of(&run, &s)?;
            let even = chooser.strategy != Strategy::EqualRatio
                || spread(p.iter().map(|p| p.ratio)) <= EQUAL_RATIO_SPREAD_MAX;
            if even && p.iter().all(|p| chooser.ctx.breaches(p).is_empty()) {
                p
            } else {
                // The run's passes laid out afresh at their real sizes and
                // land break a limit or spread (the equal-ratio solve moves
                // strain between passes with the land, or lands on a pass
                // whose best die changes): the table's own passes (worst
                // land, checked with the search's guard) hold every limit
                // wherever the run falls, so the run takes those.
                let table = if i == 0 {
                    &mut tables.first
                } else {
                    tables.annealed()
                };
                let s = table.pass_strains(counts[i], run.strain())?;
                by_table.push(i + 1);
                chooser.passes_of(&run, &s)?
            }
        };
        out.push((run, passes));
        from = to;
    }
    Ok((out, by_table))
}

/// The limits the laid-out passes break, in words (empty: none).
pub(super) fn broken(chooser: &Chooser, runs: &RunPasses, by_table: &[usize]) -> Vec<String> {
    let mut v = Vec::new();
    for (run, passes) in runs {
        for (j, p) in passes.iter().enumerate() {
            for b in chooser.ctx.breaches(p) {
                v.push(format!(
                    "run {}, pass {}: {}",
                    run.index,
                    j + 1,
                    b.describe(&chooser.ctx)
                ));
            }
        }
        if chooser.strategy == Strategy::EqualRatio
            && passes.len() > 1
            && !by_table.contains(&run.index)
        {
            let s = spread(passes.iter().map(|p| p.ratio));
            if s > EQUAL_RATIO_SPREAD_MAX {
                v.push(format!(
                    "run {}: draw ratios spread {:.3} %, over the {} % an equal-ratio design allows",
                    run.index,
                    100.0 * s,
                    100.0 * EQUAL_RATIO_SPREAD_MAX
                ));
            }
        }
    }
    v
}

/// `(max - min) / max` of some draw ratios.
pub(super) fn spread(ratios: impl Iterator<Item = f64>) -> f64 {
    let (mut lo, mut hi) = (f64::INFINITY, 0.0f64);
    for r in ratios {
        lo = lo.min(r);
        hi = hi.max(r);
    }
    if hi > 0.0 {
        (hi - lo) / hi
    } else {
        0.0
    }
}

pub(super) fn assemble<'f>(
    input: &Input<'f>,
    options: &DesignOptions,
    chooser: &Chooser<'f>,
    tables: &mut Tables<'_, 'f>,
    split: &Split,
    tier: usize,
) -> Result<Design, DesignError> {
    let t = input.target;
    let whole = t.strategy == Strategy::EqualRatio && t.ratio_across == RatioAcross::WholeSchedule;
    let (strains, one_level, level) = anneal::place(tables, split, input.window, !whole)?;
    let mut counts = vec![split.first];
    counts.extend(split.middle.iter().copied());
    if let Some(n) = split.temper {
        counts.push(n);
    }
    let (mut runs, by_table) = lay_out(input, chooser, tables, &counts, (&strains, level))?;
    let bad = broken(chooser, &runs, &by_table);
    if !bad.is_empty() {
        return Err(DesignError::NoDesign {
            max_passes: input.max_passes,
            binding: format!(
                "the {} passes found, laid out at their sizes, break {}",
                split.passes(),
                bad.join("; ")
            ),
            remedy: "relax the limit named, or try strategy equal-strain".into(),
        });
    }
    let stock = match (&t.die_step_mm, &t.die_sizes_mm) {
        (Some(s), _) => Some(Stock::Step(*s)),
        (None, Some(v)) => {
            let mut v = v.clone();
            v.sort_by(f64::total_cmp);
            Some(Stock::Sizes(v))
        }
        (None, None) => None,
    };
    let temper_run = split
        .temper
        .filter(|n| *n > 0)
        .and_then(|_| input.window.map(|w| (counts.len() - 2, w)));
    // Runs that took the table's passes, in words, before rounding moves them.
    // Without a die land the table's passes are the laid-out ones: no note.
    let land = chooser.ctx.dies.iter().any(|d| d.land_length_mm > 0.0);
    let table_notes: Vec<String> = runs
        .iter()
        .filter(|(run, _)| land && by_table.contains(&run.index))
        .map(|(run, passes)| {
            format!(
                "the run from {:.4} mm to {:.4} mm keeps the passes the search checked at the finish size's land-to-radius (laid out afresh at its own sizes it broke a limit or spread); its draw ratios spread {:.3} %",
                run.from_mm,
                run.to_mm,
                100.0 * spread(passes.iter().map(|p| p.ratio))
            )
        })
        .collect();
    if let Some(stock) = &stock {
        runs = die_room::round(&chooser.ctx, &runs, stock, temper_run)?;
    }
    let mut d = finish(
        input,
        options,
        chooser,
        split,
        runs,
        tier,
        one_level,
        stock.as_ref(),
    )?;
    d.summary.notes.extend(table_notes);
    Ok(d)
}
