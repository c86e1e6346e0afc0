//! Stage 1, geometry and strain: each step's entry and exit diameters, the
//! die it draws through, its back tension, the law in force (the annealed
//! law after an anneal) and the strain it enters with.
//!
//! Strain accumulates as the true strain `eps = 2 ln(D0/D1)` of each pass
//! and returns to 0 at an anneal (common practice; Dieter, Mechanical
//! Metallurgy, ch. 19).

use crate::flow::FlowLaw;
use crate::param::ParamError;
use crate::pass::{self, DrawPass};
use crate::schedule::{ScheduleError, ScheduleFile, Step};

use super::{pass_error, step_key};

/// A draw step ready for the mechanics: its pass and the law in force.
#[derive(Debug, Clone)]
pub(super) struct PlannedDraw<'a> {
    /// Index of the step in the file, from 0.
    pub index: usize,
    /// Die size as written in the file, when written as text.
    pub die_size: Option<String>,
    /// The pass (sizes, strain before, back tension, die).
    pub pass: DrawPass,
    /// The flow law in force.
    pub law: &'a FlowLaw,
    /// Area reduction since the last anneal (or the start).
    pub cumulative_reduction: f64,
}

/// A step after stage 1.
#[derive(Debug, Clone)]
pub(super) enum Planned<'a> {
    /// A draw pass.
    Draw(PlannedDraw<'a>),
    /// An anneal at `diameter_mm`, entered with `strain_before`.
    Anneal {
        /// Index of the step in the file, from 0.
        index: usize,
        /// Wire diameter, mm.
        diameter_mm: f64,
        /// Accumulated strain before the anneal.
        strain_before: f64,
        /// The law after the anneal.
        law: &'a FlowLaw,
    },
}

/// The finished diameter: the last draw's exit (the start when there is none).
pub(super) fn finish_diameter_mm(file: &ScheduleFile) -> f64 {
    file.passes
        .iter()
        .rev()
        .find_map(|s| match s {
            Step::Draw(d) => Some(d.exit.mm()),
            Step::Anneal => None,
        })
        .unwrap_or_else(|| file.start.diameter.mm())
}

/// Lays out every step: sizes, dies, strains and laws, refusing an exit at
/// or above its entry, a pass with no semi-angle, and the efficiency method
/// without an efficiency. `dancers[k]` is the back tension a machine's
/// dancer holds on draw `k` (from 0) when the pass gives none.
pub(super) fn plan_steps<'a>(
    file: &'a ScheduleFile,
    needs_efficiency: bool,
    dancers: &[Option<f64>],
) -> Result<Vec<Planned<'a>>, ScheduleError> {
    let mut draw_no = 0usize;
    let mut law: &FlowLaw = &file.material.flow;
    let mut strain = file.start.strain;
    let mut d_in = file.start.diameter.mm();
    let mut d_since_anneal = d_in;
    let mut out = Vec::with_capacity(file.passes.len());
    for (i, step) in file.passes.iter().enumerate() {
        let draw = match step {
            Step::Anneal => {
                law = file.annealed_law();
                out.push(Planned::Anneal {
                    index: i,
                    diameter_mm: d_in,
                    strain_before: strain,
                    law,
                });
                strain = 0.0;
                d_since_anneal = d_in;
                continue;
            }
            Step::Draw(d) => d,
        };
        let exit = &draw.exit;
        let d_out = exit.mm();
        if d_out >= d_in {
            return Err(ScheduleError::Value {
                key: step_key(i, ".exit"),
                problem: ParamError::new(
                    "exit",
                    exit,
                    format!("must be below its entry diameter ({d_in} mm)"),
                ),
            });
        }
        let semi_angle = draw
            .die
            .semi_angle_deg
            .or(file.dies.semi_angle_deg)
            .ok_or_else(|| ScheduleError::Missing {
                key: step_key(i, ".semi_angle_deg"),
                why: "no semi_angle_deg on the pass or under dies".into(),
            })?;
        let die = file
            .die_for(&draw.die, semi_angle)
            .map_err(|e| pass_error(i, e))?;
        if needs_efficiency && die.efficiency.is_none() {
            return Err(ScheduleError::Missing {
                key: "dies.efficiency".into(),
                why: format!("the efficiency method needs it (step {})", i + 1),
            });
        }
        out.push(Planned::Draw(PlannedDraw {
            index: i,
            die_size: exit.written().map(str::to_string),
            pass: DrawPass {
                entry_diameter_mm: d_in,
                exit_diameter_mm: d_out,
                strain_before: strain,
                back_tension_mpa: draw
                    .back_tension_mpa
                    .or(dancers.get(draw_no).copied().flatten())
                    .unwrap_or(0.0),
                die,
            },
            law,
            cumulative_reduction: pass::area_reduction(d_since_anneal, d_out),
        }));
        strain += pass::true_strain(d_in, d_out);
        draw_no += 1;
        d_in = d_out;
    }
    Ok(out)
}
