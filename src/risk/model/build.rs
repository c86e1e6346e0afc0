//! Building a [`Model`] from a checked schedule (and its machine run): the
//! nominal steps, the laws, the spreads, the block limits.

use crate::evaluation::strength;
use crate::machine::{Machine, MachineKind, MachineRun};
use crate::pass::{Method, Settings};
use crate::risk::considere::ConsidereSolver;
use crate::risk::distribution::{Law, Sampler};
use crate::risk::scatter::DieSpread;
use crate::schedule::{ScheduleFile, Step};

use super::*;

impl Model {
    /// Prepares `file` (already checked by `evaluation::evaluate`) with `method`.
    pub fn new(file: &ScheduleFile, method: Method, spreads: Spreads) -> Result<Self, String> {
        Self::on(file, method, spreads, None)
    }

    /// [`Model::new`] on a machine, with the run `check` made of it
    /// (`evaluation::evaluate_on`): the machine's dancers give the back
    /// tension of a pass that has none, and each block's load is held to
    /// its motor.
    pub fn on(
        file: &ScheduleFile,
        method: Method,
        spreads: Spreads,
        machine: Option<(&Machine, &MachineRun)>,
    ) -> Result<Self, String> {
        let mut steps = Vec::with_capacity(file.passes.len());
        let mut draw_no = 0;
        for (i, s) in file.passes.iter().enumerate() {
            steps.push(match s {
                Step::Anneal => NominalStep::Anneal,
                Step::Draw(d) => {
                    let angle = d
                        .die
                        .semi_angle_deg
                        .or(file.dies.semi_angle_deg)
                        .ok_or_else(|| format!("passes[{i}]: no semi_angle_deg"))?;
                    // As check lays it out: the pass's own back tension, else
                    // the dancer of the block it runs on.
                    let dancer = machine
                        .and_then(|(m, _)| m.blocks.get(draw_no))
                        .and_then(|b| b.dancer_back_tension_mpa);
                    draw_no += 1;
                    NominalStep::Draw {
                        step: i + 1,
                        exit_diameter_mm: d.exit.mm(),
                        die: file.die_for(&d.die, angle).map_err(|e| e.to_string())?,
                        back_tension_mpa: d.back_tension_mpa.or(dancer).unwrap_or(0.0),
                    }
                }
            });
        }
        let draws = steps
            .iter()
            .filter(|s| matches!(s, NominalStep::Draw { .. }))
            .count();
        let mut dims = 0;
        let mut drivers = Vec::new();
        let start_diameter_mm = file.start.diameter.mm();
        let rod = spreads.rod.map(|l: Law| {
            dims += 1;
            drivers.push(Driver::RodDiameter);
            drivers.push(Driver::EntryDiameter);
            (l.at(start_diameter_mm), dims - 1)
        });
        let nominal = |f: &dyn Fn(&NominalStep) -> Option<f64>| -> Vec<f64> {
            steps.iter().filter_map(f).collect()
        };
        let exits = nominal(&|s| match s {
            NominalStep::Draw {
                exit_diameter_mm, ..
            } => Some(*exit_diameter_mm),
            NominalStep::Anneal => None,
        });
        let mus = nominal(&|s| match s {
            NominalStep::Draw { die, .. } => Some(die.friction),
            NominalStep::Anneal => None,
        });
        let angles = nominal(&|s| match s {
            NominalStep::Draw { die, .. } => Some(die.semi_angle_deg),
            NominalStep::Anneal => None,
        });
        let backs = nominal(&|s| match s {
            NominalStep::Draw {
                back_tension_mpa, ..
            } => Some(*back_tension_mpa),
            NominalStep::Anneal => None,
        });
        fn die_input(
            s: Option<DieSpread>,
            d: Driver,
            dims: &mut usize,
            drivers: &mut Vec<Driver>,
            nominal: &[f64],
        ) -> Option<DieInput> {
            s.map(|spread| {
                let r = spread.between_dies;
                let common_dim = (r > 0.0).then(|| {
                    *dims += 1;
                    *dims - 1
                });
                let own_dim = (r < 1.0).then(|| {
                    *dims += nominal.len();
                    *dims - nominal.len()
                });
                drivers.push(d);
                // Back tension scatters only where there is one.
                let samplers = nominal
                    .iter()
                    .map(|&m| {
                        if d == Driver::BackTension && m == 0.0 {
                            Sampler::Fixed(0.0)
                        } else {
                            spread.law.at(m)
                        }
                    })
                    .collect();
                DieInput {
                    spread,
                    samplers,
                    common_dim,
                    own_dim,
                    weights: (r.sqrt(), (1.0 - r).sqrt()),
                }
            })
        }
        let die_diameter = die_input(
            spreads.die_diameter,
            Driver::DieDiameter,
            &mut dims,
            &mut drivers,
            &exits,
        );
        if die_diameter.is_some() && rod.is_none() {
            drivers.push(Driver::EntryDiameter);
        }
        let friction = die_input(
            spreads.friction,
            Driver::Friction,
            &mut dims,
            &mut drivers,
            &mus,
        );
        let semi_angle = die_input(
            spreads.semi_angle,
            Driver::SemiAngle,
            &mut dims,
            &mut drivers,
            &angles,
        );
        let back_tension = die_input(
            spreads.back_tension,
            Driver::BackTension,
            &mut dims,
            &mut drivers,
            &backs,
        );
        let flow_spread = spreads.flow.map(|f| {
            let first = dims;
            dims += f.keys.len();
            for k in 0..f.keys.len() {
                drivers.push(Driver::Flow(k));
            }
            (f, first)
        });
        let line = file.line.as_ref();
        let block_limit = match machine {
            Some((m, run)) => Some(BlockLimit::Machine {
                running_speed_m_s: run.running_speed_m_s,
                fixed_capstan_speed: (m.kind == MachineKind::Slip).then(|| {
                    // As machine::run: the last capstan at the finish speed,
                    // each one before it slower by its successor's step ratio.
                    let mut h = vec![1.0; draws];
                    for j in (0..draws.saturating_sub(1)).rev() {
                        h[j] = h[j + 1] / m.blocks[j + 1].step_ratio.unwrap_or(1.0);
                    }
                    h
                }),
                efficiency: (0..draws).map(|j| m.efficiency(j)).collect(),
                motor_kw: m.blocks.iter().take(draws).map(|b| b.motor_kw).collect(),
            }),
            None => match line {
                Some(l) => l
                    .block_power_kw
                    .map(|limit_kw| BlockLimit::Line { limit_kw }),
                None => None,
            },
        };
        let holds_next = {
            let mut v = Vec::with_capacity(draws);
            for (i, s) in steps.iter().enumerate() {
                if matches!(s, NominalStep::Draw { .. }) {
                    v.push(matches!(steps.get(i + 1), Some(NominalStep::Draw { .. })));
                }
            }
            v
        };
        Ok(Self {
            method,
            settings: Settings {
                redundant_c: file
                    .limits
                    .redundant_c
                    .unwrap_or(Settings::default().redundant_c),
            },
            steps,
            draws,
            start_diameter_mm,
            start_strain: file.start.strain,
            flow: file.material.flow.clone(),
            annealed: file.annealed_law().clone(),
            considere: (
                strength::considere_strain(&file.material.flow),
                strength::considere_strain(file.annealed_law()),
            ),
            annealed_is_flow: file.annealed_law() == &file.material.flow,
            solvers: (
                ConsidereSolver::new(&file.material.flow),
                ConsidereSolver::new(file.annealed_law()),
            ),
            finish_speed_m_s: line
                .map(|l| l.finish_speed_m_s)
                .or(machine.map(|(_, r)| r.running_speed_m_s)),
            block_limit,
            holds_next,
            warn: file.limits.draw_ratio_warn,
            max: file.limits.draw_ratio_max,
            rod,
            friction,
            semi_angle,
            die_diameter,
            back_tension,
            flow_spread,
            dims,
            drivers,
        })
    }
}
