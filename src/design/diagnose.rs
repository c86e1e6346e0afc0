//! Why no design exists within the passes asked for: the passes one needs,
//! what sets each run's count, or what binds when none exists at all.

#[allow(unused_imports)]
use super::*;

/// Why no design within the passes asked for exists: the passes a design
/// needs (searched up to the most a design may have, at the draw-ratio
/// limit), or what binds when none exists at all.
pub(super) fn diagnose(input: &Input) -> Result<DesignError, DesignError> {
    let cap = *input.caps.last().expect("one cap");
    let chooser = input.chooser(cap)?;
    let mut tables = input.tables(&chooser, PASSES_ALLOWED);
    let asked = input.passes;
    let from = match asked {
        Some(_) => 1,
        None => input.max_passes + 1,
    };
    // The least count with any number of anneals (up to the file's max_anneals).
    let anneals = Some(input.max_anneals.unwrap_or(PASSES_ALLOWED));
    let found = if from <= PASSES_ALLOWED {
        tables.fewest(from..=PASSES_ALLOWED, anneals)?
    } else {
        None
    };
    if let Some(n) = asked {
        return Ok(DesignError::PassCount {
            passes: n,
            least: found.as_ref().map(Split::passes),
            why: match &found {
                Some(s) if s.passes() > n => format!(
                    "{n} passes are too few; the fewest that meet every limit are {} ({})",
                    s.passes(),
                    split_words(s)
                ),
                Some(s) => format!(
                    "with {n} passes no split into runs keeps every pass within the limits (the passes would be too light or the runs too long); the fewest that meet every limit are {} ({})",
                    s.passes(),
                    split_words(s)
                ),
                None => format!("no pass count up to {PASSES_ALLOWED} meets every limit"),
            },
            remedy: match &found {
                Some(s) => format!(
                    "set target.passes to {} (the least that can), or relax the limits",
                    s.passes()
                ),
                None => explain(input, &chooser, &mut tables)?.1,
            },
        });
    }
    Ok(match found {
        Some(s) => {
            let set_by = set_by(input, &chooser, &mut tables, &s)?;
            DesignError::TooFewPasses {
                max_passes: input.max_passes,
                passes_needed: s.passes(),
                split: split_words(&s),
                set_by,
            }
        }
        None => {
            let (binding, remedy) = explain(input, &chooser, &mut tables)?;
            DesignError::NoDesign {
                max_passes: PASSES_ALLOWED.max(input.max_passes),
                binding,
                remedy,
            }
        }
    })
}

/// A split in words: `8 + 5 around the temper anneal`.
pub(super) fn split_words(s: &Split) -> String {
    let mut counts: Vec<u32> = Vec::new();
    if s.first > 0 {
        counts.push(s.first);
    }
    counts.extend(s.middle.iter().copied());
    if let Some(t) = s.temper.filter(|t| *t > 0) {
        counts.push(t);
    }
    let c = counts
        .iter()
        .map(u32::to_string)
        .collect::<Vec<_>>()
        .join(" + ");
    let anneals = s.middle.len() + usize::from(s.temper.is_some());
    let temper = s.temper.is_some();
    match (anneals, temper) {
        (0, _) => format!("{c} in one run, no anneal"),
        (1, true) => format!("{c} around the temper anneal"),
        (1, false) => format!("{c} around the cold-work anneal"),
        (k, true) => format!("{c} around {k} anneals, the last for the temper"),
        (k, false) => format!("{c} around {k} anneals"),
    }
}

/// What sets each run's count of a split: the limits one pass fewer would
/// break (the run's strain spread evenly over one pass fewer), run by run.
pub(super) fn set_by(
    input: &Input,
    chooser: &Chooser,
    tables: &mut Tables,
    s: &Split,
) -> Result<String, DesignError> {
    let (strains, _, _) = anneal::place(tables, s, input.window, true)?;
    let mut counts = vec![s.first];
    counts.extend(s.middle.iter().copied());
    if let Some(t) = s.temper {
        counts.push(t);
    }
    let mut out = Vec::new();
    let mut run_no = 0;
    for (i, (&n, &strain)) in counts.iter().zip(&strains).enumerate() {
        if n == 0 {
            continue;
        }
        run_no += 1;
        if n == 1 {
            out.push(format!("run {run_no}: 1 pass"));
            continue;
        }
        let fewer = n - 1;
        let table = if i == 0 {
            &mut tables.first
        } else {
            tables.annealed()
        };
        let mut keys = match table.interval(fewer)? {
            Some(iv) if strain < iv.lo => table.binding(fewer, false)?,
            Some(_) => table.binding(fewer, true)?,
            None => {
                let mut k = table.binding(fewer, true)?;
                k.extend(table.binding(fewer, false)?);
                k
            }
        };
        if keys.is_empty() {
            // Tapered runs do not keep their limits: spread the run evenly and look.
            let class = table.class;
            let even = vec![strain / fewer as f64; fewer as usize];
            let probe = chooser.probe(class.law, class.e0, class.from_mm, &even, f64::INFINITY)?;
            for p in &probe.passes {
                for b in chooser.ctx.breaches(p) {
                    let k = b.limit(&chooser.ctx);
                    if !keys.contains(&k) {
                        keys.push(k);
                    }
                }
            }
        }
        if keys.is_empty() {
            keys.push("the split of the reduction between the runs".into());
        }
        out.push(format!(
            "run {run_no}: {fewer} passes would break {}",
            keys.join(", ")
        ));
    }
    Ok(out.join("; "))
}

/// What binds when no pass count works, and what would help.
pub(super) fn explain(
    input: &Input,
    chooser: &Chooser,
    tables: &mut Tables,
) -> Result<(String, String), DesignError> {
    let ctx = &chooser.ctx;
    let total = input.total;
    let mut binding = Vec::new();
    let mut remedy = Vec::new();
    let one = tables.annealed().interval(1)?;
    let one_first = tables.first.interval(1)?;
    match one.or(one_first) {
        None => {
            // No single pass meets the limits: say what each light-to-heavy pass breaks.
            let class = tables.annealed().class;
            let mut seen = Vec::new();
            for r in [0.02, 0.1, 0.2, 0.35, 0.5] {
                let x = -f64::ln(1.0 - r);
                let p = chooser.probe(class.law, class.e0, class.from_mm, &[x], f64::INFINITY)?;
                let b: Vec<String> = p
                    .passes
                    .iter()
                    .flat_map(|p| ctx.breaches(p))
                    .map(|b| b.describe(ctx))
                    .collect();
                let line = if b.is_empty() {
                    format!("at {:.0} % reduction the pass meets the limits but the run cannot be made up", 100.0 * r)
                } else {
                    format!("at {:.0} % reduction: {}", 100.0 * r, b.join(", "))
                };
                seen.push(line);
            }
            binding.push(format!(
                "no single pass from annealed stock meets every limit ({})",
                seen.join("; ")
            ));
            remedy.push("relax the limits named (draw_ratio_max, reduction bounds, delta_max, wire temperature, block power)".into());
        }
        Some(iv) => {
            binding.push(format!(
                "one pass can carry a strain of {:.4} to {:.4} (reductions {:.2} % to {:.2} %), and the whole reduction is a strain of {total:.4}",
                iv.lo,
                iv.hi,
                100.0 * -f64::exp_m1(-iv.lo),
                100.0 * -f64::exp_m1(-iv.hi)
            ));
            if let Some(l) = ctx.cold_work {
                binding.push(format!(
                    "each run at most material.cold_work_limit {l} (less the start strain {} for the first)",
                    input.file.start.strain
                ));
            }
            if let Some(w) = input.window {
                if w.lo <= w.hi {
                    binding.push(format!(
                        "the run after the temper anneal must carry {:.4} to {:.4}",
                        w.lo, w.hi
                    ));
                } else {
                    binding.push("no anneal lands the temper window".into());
                }
            }
            binding.push(format!(
                "no count of passes up to {PASSES_ALLOWED}, split into such runs{}, adds up to it",
                input
                    .max_anneals
                    .map(|k| format!(" with at most {k} anneals (target.max_anneals)"))
                    .unwrap_or_default()
            ));
            if let Some(k) = input.max_anneals {
                remedy.push(format!("raise target.max_anneals (now {k})"));
            }
            if let Some(r) = ctx.r_min {
                remedy.push(format!("lower target.reduction_min (now {r})"));
            }
            if let Some(r) = ctx.r_max {
                remedy.push(format!("raise target.reduction_max (now {r})"));
            }
            if let Some(l) = ctx.cold_work {
                remedy.push(format!("raise material.cold_work_limit (now {l})"));
            }
            if input.window.is_some() {
                remedy.push("widen target.strength_mpa".into());
            }
            if remedy.is_empty() {
                remedy.push("relax the limits named".into());
            }
        }
    }
    Ok((binding.join("; "), remedy.join(", or ")))
}
