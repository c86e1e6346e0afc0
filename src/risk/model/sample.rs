//! One sample through the model: the passes prepared once when only the dies
//! scatter, a sample's passes evaluated (draw ratio, break, block load), and
//! the columns of `--keep-samples`.

use crate::pass::{self, DrawPass, PreparedPass};
use crate::risk::distribution::Sampler;
use crate::risk::scatter::flow_param;

use super::*;

impl Model {
    /// Whether every pass's sizes, strain, law and back tension are the
    /// nominal ones in every sample (only the dies' friction and angles
    /// scatter): the die-independent part of each pass is then the same.
    pub fn passes_are_fixed(&self) -> bool {
        self.rod.is_none()
            && self.die_diameter.is_none()
            && self.flow_spread.is_none()
            && self.back_tension.is_none()
    }

    /// The die-independent part of every draw pass ([`PreparedPass`]), made
    /// once, when no sample moves it ([`Model::passes_are_fixed`]); `None`
    /// otherwise, or when the nominal passes themselves are refused (each
    /// sample then says why).
    pub fn prepare(&self) -> Option<Vec<PreparedPass<'_>>> {
        if !self.passes_are_fixed() {
            return None;
        }
        let mut out = Vec::with_capacity(self.draws);
        let (mut law, mut strain, mut d_in) =
            (&self.flow, self.start_strain, self.start_diameter_mm);
        for s in &self.steps {
            match s {
                NominalStep::Anneal => {
                    law = &self.annealed;
                    strain = 0.0;
                }
                NominalStep::Draw {
                    exit_diameter_mm,
                    die,
                    back_tension_mpa,
                    ..
                } => {
                    let dp = DrawPass {
                        entry_diameter_mm: d_in,
                        exit_diameter_mm: *exit_diameter_mm,
                        strain_before: strain,
                        back_tension_mpa: *back_tension_mpa,
                        die: *die,
                    };
                    let p = PreparedPass::new(law, &dp, &self.settings).ok()?;
                    strain += p.pass_strain();
                    d_in = *exit_diameter_mm;
                    out.push(p);
                }
            }
        }
        Some(out)
    }

    /// Evaluates one sample with scores `z` (or the nominal schedule with
    /// `None`) into `out`; an `Err` names why the drawn inputs were refused.
    pub fn evaluate(&self, z: Option<&[f64]>, out: &mut SampleOut) -> Result<(), String> {
        self.evaluate_prepared(z, None, out)
    }

    /// [`Model::evaluate`] with the passes of [`Model::prepare`] when given:
    /// the same figures, without preparing each pass again.
    pub fn evaluate_prepared(
        &self,
        z: Option<&[f64]>,
        prepared: Option<&[PreparedPass<'_>]>,
        out: &mut SampleOut,
    ) -> Result<(), String> {
        // Flow-law deviations d = L z.
        let laws = match (z, &self.flow_spread) {
            (Some(z), Some((f, first))) => {
                let n = f.keys.len();
                for i in 0..n {
                    out.flow_dev[i] = (0..=i)
                        .map(|k| f.cholesky[i * n + k] * z[first + k])
                        .sum::<f64>();
                }
                let flow = self.law_with(&self.flow, &out.flow_dev)?;
                let necking = Necking::scan(&self.solvers.0, &flow);
                // The same law and so the same Considere strain when the
                // file gives no annealed law: built and scanned once.
                let (annealed, annealed_necking) = if self.annealed_is_flow {
                    (flow.clone(), necking)
                } else {
                    let a = self.law_with(&self.annealed, &out.flow_dev)?;
                    let n = Necking::scan(&self.solvers.1, &a);
                    (a, n)
                };
                Some((flow, annealed, (necking, annealed_necking)))
            }
            _ => None,
        };
        let (flow, annealed, considere) = match &laws {
            Some((a, b, c)) => (a, b, *c),
            None => (
                &self.flow,
                &self.annealed,
                (
                    Necking::known(&self.flow, self.considere.0),
                    Necking::known(&self.annealed, self.considere.1),
                ),
            ),
        };
        let rod_z = match (z, &self.rod) {
            (Some(z), Some((_, k))) => z[*k],
            _ => 0.0,
        };
        let start = match (z, &self.rod) {
            (Some(_), Some((sampler, _))) => sampler.value(rod_z),
            _ => self.start_diameter_mm,
        };
        out.rod_mm = start;
        out.drawn.fill(f64::NAN);
        fn per_die<'m>(
            z: Option<&[f64]>,
            input: &'m Option<DieInput>,
            j: usize,
        ) -> Option<(f64, &'m Sampler)> {
            match (z, input) {
                (Some(z), Some(d)) => Some((d.score(z, j), &d.samplers[j])),
                _ => None,
            }
        }
        // Exit diameters first: the finish size sets every pass's speed.
        let mut j = 0;
        for s in &self.steps {
            if let NominalStep::Draw {
                exit_diameter_mm, ..
            } = s
            {
                (out.exits[j], out.die_z[j]) = match per_die(z, &self.die_diameter, j) {
                    Some((zj, sampler)) => (sampler.value(zj), zj),
                    None => (*exit_diameter_mm, 0.0),
                };
                j += 1;
            }
        }
        let finish = out.exits.last().copied().unwrap_or(start);
        let nd = self.drivers.len();
        let mut law = flow;
        let (mut necking, mut annealed_necking) = considere;
        let mut strain = self.start_strain;
        let mut d_in = start;
        let mut j = 0;
        for s in &self.steps {
            let (step, die, back) = match s {
                NominalStep::Anneal => {
                    law = annealed;
                    if self.annealed_is_flow {
                        // One law: keep what the drawn passes resolved.
                        annealed_necking = necking;
                    }
                    necking = annealed_necking;
                    strain = 0.0;
                    continue;
                }
                NominalStep::Draw {
                    step,
                    die,
                    back_tension_mpa,
                    ..
                } => (*step, die, *back_tension_mpa),
            };
            let d_out = out.exits[j];
            if d_out >= d_in {
                return Err(format!(
                    "step {step}: drawn die diameter {d_out:.4} mm is not below the entry {d_in:.4} mm"
                ));
            }
            let mut die = *die;
            let fr = per_die(z, &self.friction, j);
            if let Some((zj, l)) = fr {
                let mu = l.value(zj);
                if let Some(m) = die.friction_factor {
                    if die.friction > 0.0 {
                        die.friction_factor = Some((m * mu / die.friction).min(1.0));
                    }
                }
                die.friction = mu;
            }
            let an = per_die(z, &self.semi_angle, j);
            if let Some((zj, l)) = an {
                die.semi_angle_deg = l.value(zj);
            }
            let bt = if back > 0.0 {
                per_die(z, &self.back_tension, j)
            } else {
                None
            };
            let back = match bt {
                Some((zj, l)) => l.value(zj),
                None => back,
            };
            out.drawn[DRAWN_PER_PASS * j..DRAWN_PER_PASS * (j + 1)].copy_from_slice(&[
                d_out,
                die.friction,
                die.semi_angle_deg,
                back,
            ]);
            let dp = DrawPass {
                entry_diameter_mm: d_in,
                exit_diameter_mm: d_out,
                strain_before: strain,
                back_tension_mpa: back,
                die,
            };
            // Only the governing stress, not every method's figures: the
            // same value `analyse_pass(..).draw_stress_mpa.get(method)` gives.
            let made;
            let prepared = match prepared {
                Some(p) => &p[j],
                None => {
                    made = PreparedPass::new(law, &dp, &self.settings)
                        .map_err(|e| format!("step {step}: {e}"))?;
                    &made
                }
            };
            let governing = prepared
                .stress_mpa(&die, self.method)
                .map_err(|e| format!("step {step}: {e}"))?;
            let flow_exit = prepared.flow_stress_exit_mpa();
            let strain_after = strain + prepared.pass_strain();
            out.ratio[j] = governing / flow_exit;
            (out.breaks[j], out.tensile_strength_mpa[j]) =
                necking.breaks(law, governing, strain_after, flow_exit);
            out.front_kn[j] = pass::force_kn(governing, d_out);
            out.back_mpa[j] = back;
            if z.is_some() {
                let row = &mut out.driver_scores[j * nd..(j + 1) * nd];
                for (slot, d) in row.iter_mut().zip(&self.drivers) {
                    *slot = match *d {
                        Driver::RodDiameter => rod_z,
                        Driver::EntryDiameter => {
                            if j == 0 {
                                rod_z
                            } else {
                                out.die_z[j - 1]
                            }
                        }
                        Driver::DieDiameter => out.die_z[j],
                        Driver::Friction => fr.map_or(0.0, |x| x.0),
                        Driver::SemiAngle => an.map_or(0.0, |x| x.0),
                        Driver::BackTension => bt.map_or(0.0, |x| x.0),
                        Driver::Flow(k) => match &self.flow_spread {
                            Some((f, _)) if f.sd[k] > 0.0 => out.flow_dev[k] / f.sd[k],
                            _ => 0.0,
                        },
                    };
                }
            }
            strain = strain_after;
            d_in = d_out;
            j += 1;
        }
        self.block_loads(finish, out);
        Ok(())
    }

    /// The columns of a kept sample ([`Model::sample_values`]): the rod
    /// diameter, each scattering flow-law parameter (`flow.k_mpa`), then per
    /// draw step `s` its `step<s>.exit_diameter_mm`, `.friction`,
    /// `.semi_angle_deg`, `.back_tension_mpa` and `.draw_ratio` (the names
    /// of check's CSV).
    pub fn sample_columns(&self) -> Vec<String> {
        let mut c = vec!["rod_diameter_mm".to_string()];
        if let Some((f, _)) = &self.flow_spread {
            c.extend(f.keys.iter().map(|k| format!("flow.{k}")));
        }
        for s in &self.steps {
            if let NominalStep::Draw { step, .. } = s {
                for key in [
                    "exit_diameter_mm",
                    "friction",
                    "semi_angle_deg",
                    "back_tension_mpa",
                    "draw_ratio",
                ] {
                    c.push(format!("step{step}.{key}"));
                }
            }
        }
        c
    }

    /// The values of one evaluated sample in [`Model::sample_columns`]
    /// order, appended to `values`: NaN where the sample was refused before
    /// reaching the figure (`accepted` false leaves every draw ratio NaN).
    pub fn sample_values(&self, out: &SampleOut, accepted: bool, values: &mut Vec<f64>) {
        values.push(out.rod_mm);
        if let Some((f, _)) = &self.flow_spread {
            let mut spec = self.flow.spec().clone();
            for (k, d) in f.keys.iter().zip(&out.flow_dev) {
                values.push(flow_param(&mut spec, k).map_or(f64::NAN, |p| *p + d));
            }
        }
        for j in 0..self.draws {
            values.extend_from_slice(&out.drawn[DRAWN_PER_PASS * j..DRAWN_PER_PASS * (j + 1)]);
            values.push(if accepted { out.ratio[j] } else { f64::NAN });
        }
    }

    /// Net power and block load of every draw, as check's line and machine
    /// stages make them: the capstan after die `j` carries the front pull
    /// `F_j` less the back pull `B_j+1 = sigma_b,j+1 A_j` it holds on the
    /// next die (none before an anneal or after the last die).
    fn block_loads(&self, finish: f64, out: &mut SampleOut) {
        let Some(v) = self.finish_speed_m_s else {
            return;
        };
        for j in 0..self.draws {
            let d_out = out.exits[j];
            let held = if self.holds_next[j] {
                pass::force_kn(out.back_mpa[j + 1], d_out)
            } else {
                0.0
            };
            let net = out.front_kn[j] - held;
            match &self.block_limit {
                Some(BlockLimit::Machine {
                    running_speed_m_s,
                    fixed_capstan_speed,
                    efficiency,
                    motor_kw,
                }) => {
                    let h = match fixed_capstan_speed {
                        Some(h) => h[j],
                        None => (finish / d_out).powi(2),
                    };
                    let power = net * (running_speed_m_s * h);
                    let load = power / efficiency[j] / motor_kw[j];
                    out.power_kw[j] = power;
                    out.block_load[j] = load;
                    // check's margin: a block exactly at its limit is within it.
                    out.over_block[j] = load > 1.0 + 1e-9;
                }
                limit => {
                    let power = pass::power_kw(net, v * (finish / d_out).powi(2));
                    out.power_kw[j] = power;
                    if let Some(BlockLimit::Line { limit_kw }) = limit {
                        out.block_load[j] = power / limit_kw;
                        out.over_block[j] = power > *limit_kw;
                    }
                }
            }
        }
    }
}
