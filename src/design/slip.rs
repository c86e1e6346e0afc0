//! A design on a slip machine: the capstans turn at fixed speed ratios (the
//! cone steps), so the dies after the first are set by the machine.
//!
//! The last capstan finishes the wire without slip and capstan `j` turns
//! `prod_{k>j} 1/q_k` as fast, `q_k` the step ratio of block `k`; the wire
//! on capstan `j` runs `(D_f/D_j)^2` as fast (volume constancy), so its slip
//! `s_j = (V - v)/V` is (common practice; the formula `check --machine` uses)
//!
//! `s_j = 1 - (D_f/D_j)^2 prod_{k>j} q_k = 1 - prod_{k>j} q_k / lambda_k`,
//!
//! `lambda_k = (D_{k-1}/D_k)^2` the elongation of die `k`. Each die `k >= 2`
//! is given the pass strain `ln q_k + delta` (its elongation `delta` above
//! the step ratio), so `s_j = 1 - exp(-(N - j) delta)`: positive at every
//! capstan before the last, least at capstan `N - 1`, most at capstan 1.
//! `delta` is half of what puts capstan 1 at the machine's slip limit,
//! `delta = -ln(1 - s_max) / (2 (N - 1))`, which keeps every capstan within
//! the limit with room for a die rounded to the die room's step. The first
//! die, under no capstan's constraint, takes the rest of the reduction.
//! Every limit is then checked as `check --machine` checks it.

#[allow(unused_imports)]
use super::*;

/// The slip design of `input` on slip machine `m` (with `input.passes` dies).
pub(super) fn design_slip(
    input: &Input,
    options: &DesignOptions,
    m: &Machine,
) -> Result<Design, DesignError> {
    let file = input.file;
    let n = input.passes.unwrap_or(m.blocks.len() as u32) as usize;
    let name = if m.name.is_empty() {
        "(unnamed)"
    } else {
        &m.name
    };
    let cones: Vec<f64> = m.blocks[1..n]
        .iter()
        .map(|b| b.step_ratio.unwrap_or(1.0).ln())
        .collect();
    let delta = -(1.0 - m.slip_limit()).ln() / (2.0 * (n.max(2) - 1) as f64);
    let set: f64 = cones.iter().map(|c| c + delta).sum();
    let first = input.total - set;
    if first <= PASS_STRAIN_FLOOR {
        // The dies the cone sets alone draw from the start past the finish.
        let least = input.finish_mm * (0.5 * set).exp();
        return Err(DesignError::Input {
            key: "start.diameter".into(),
            why: format!(
                "on slip machine {name} the cone ratios set dies 2-{n} (each elongating the wire a little more than its capstan's step ratio, for a positive slip): they alone draw a true strain of {set:.4}, more than the whole reduction {:.4}; start from more than {least:.4} mm, or finish finer",
                input.total
            ),
        });
    }
    let mut strains = vec![first];
    strains.extend(cones.iter().map(|c| c + delta));
    let cap = *input.caps.last().expect("one cap");
    let chooser = input.chooser(cap)?;
    let run = Run {
        index: 1,
        law: &file.material.flow,
        strain0: file.start.strain,
        from_mm: input.start_mm,
        to_mm: input.finish_mm,
    };
    let passes = chooser.passes_of(&run, &strains)?;
    let bad = broken(&chooser, &vec![(run, passes.clone())], &[1]);
    if !bad.is_empty() {
        return Err(DesignError::NoDesign {
            max_passes: n as u32,
            binding: format!(
                "on slip machine {name} the cone ratios set dies 2-{n}, and the {n} passes they leave break {}",
                bad.join("; ")
            ),
            remedy: "change the start or finish size to suit the machine's cones, or relax the limit named".into(),
        });
    }
    let worst = passes.iter().map(|p| p.ratio).fold(0.0, f64::max);
    let tier = input.caps.iter().position(|c| worst <= *c).unwrap_or(0);
    let mut runs: RunPasses = vec![(run, passes)];
    let stock = match (&input.target.die_step_mm, &input.target.die_sizes_mm) {
        (Some(s), _) => Some(die_room::Stock::Step(*s)),
        (None, Some(v)) => {
            let mut v = v.clone();
            v.sort_by(f64::total_cmp);
            Some(die_room::Stock::Sizes(v))
        }
        (None, None) => None,
    };
    if let Some(stock) = &stock {
        runs = die_room::round(&chooser.ctx, &runs, stock, None)?;
    }
    let split = Split {
        first: n as u32,
        middle: Vec::new(),
        temper: None,
    };
    let mut d = finish(
        input,
        options,
        &chooser,
        &split,
        runs,
        tier,
        true,
        stock.as_ref(),
    )?;
    // The cap notes speak of a search; here the machine set the dies.
    d.summary
        .notes
        .retain(|t| !t.starts_with("no design within"));
    let s = |j: usize| 100.0 * -f64::exp_m1(-((n - j) as f64) * delta);
    d.summary.notes.push(format!(
        "slip machine {name}: the cone ratios set dies 2-{n}, each elongating the wire {:.2} % more than its capstan's step ratio, for a slip of {:.2} % at capstan {} rising to {:.2} % at capstan 1 (half the slip limit {:.0} % in logarithmic terms: 1 - sqrt(1 - {})); die 1 takes the rest of the reduction",
        100.0 * f64::exp_m1(delta),
        s(n - 1),
        n - 1,
        s(1),
        100.0 * m.slip_limit(),
        m.slip_limit()
    ));
    Ok(d)
}
