//! What the design needs from the file, read and checked once: the target,
//! the die stock, the ratio caps in the order tried, the temper window; and
//! the pass chooser and run tables built from them.

#[allow(unused_imports)]
use super::*;

/// What the design needs from the file, checked once.
pub(super) struct Input<'f> {
    pub(super) file: &'f ScheduleFile,
    pub(super) target: &'f Target,
    pub(super) angles: Vec<f64>,
    pub(super) from_stock: bool,
    pub(super) method: Method,
    pub(super) start_mm: f64,
    pub(super) finish_mm: f64,
    /// Whole reduction, true strain.
    pub(super) total: f64,
    pub(super) max_passes: u32,
    /// The ratio caps in the order tried: aim, warn line, limit (each once).
    pub(super) caps: Vec<f64>,
    pub(super) window: Option<WindowStrains>,
    /// Exactly this many draw passes: `target.passes`, else the machine's blocks.
    pub(super) passes: Option<u32>,
    /// Most anneals: `target.max_anneals`; 0 on a machine (it draws one run).
    pub(super) max_anneals: Option<u32>,
    /// The machine the design runs on, when there is one.
    pub(super) machine: Option<&'f Machine>,
    /// The area reduction above which `check` flags a pass `heavy-reduction`:
    /// `limits.reduction_warn`, else [`crate::evaluation::REDUCTION_WARN_SINGLE_DRAFT`]
    /// on a single-block machine and [`crate::evaluation::REDUCTION_WARN_WIRE`]
    /// otherwise (the value `check` uses).
    pub(super) reduction_warn: f64,
}

/// One margin tier of the search: the draw ratio the passes are held to and
/// whether each pass's area reduction is also held to the heavy-reduction line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Tier {
    /// Index into [`Input::caps`].
    pub(super) ratio: usize,
    /// The reduction is held to `min(target.reduction_max, reduction_warn)`
    /// (else to `target.reduction_max` alone, the last tier).
    pub(super) light: bool,
}

pub(super) fn read_input<'f>(
    file: &'f ScheduleFile,
    options: &DesignOptions,
    machine: Option<&'f Machine>,
) -> Result<Input<'f>, DesignError> {
    file.validate()?;
    let target = file.target.as_ref().ok_or_else(|| DesignError::Input {
        key: "target".into(),
        why: "a design file needs a `target` block with at least `diameter`".into(),
    })?;
    if !file.passes.is_empty() {
        return Err(DesignError::Input {
            key: "passes".into(),
            why: "a design file has no passes (the design fills them in); remove them, or use `coldpass check` for a schedule".into(),
        });
    }
    let (angles, from_stock) = match (&file.dies.semi_angles_deg, file.dies.semi_angle_deg) {
        (Some(_), Some(_)) => {
            return Err(DesignError::Input {
                key: "dies.semi_angle_deg".into(),
                why: "give either one angle (semi_angle_deg) or the stock to choose from (semi_angles_deg), not both".into(),
            })
        }
        (Some(list), None) => (list.clone(), true),
        (None, Some(a)) => (vec![a], false),
        (None, None) => {
            return Err(DesignError::Input {
                key: "dies.semi_angles_deg".into(),
                why: "a design needs the die stock (semi_angles_deg: [..]) or one angle (semi_angle_deg)".into(),
            })
        }
    };
    if angles.is_empty() {
        return Err(DesignError::Input {
            key: "dies.semi_angles_deg".into(),
            why: "needs at least one angle".into(),
        });
    }
    let start_mm = file.start.diameter.mm();
    let finish_mm = target.diameter.mm();
    if finish_mm >= start_mm {
        return Err(DesignError::Input {
            key: "target.diameter".into(),
            why: format!(
                "{} must be below start.diameter {} (drawing only makes wire thinner)",
                as_written(&target.diameter),
                as_written(&file.start.diameter)
            ),
        });
    }
    let method = options
        .method
        .or(file.limits.method)
        .unwrap_or(schedule::DEFAULT_METHOD);
    if method == Method::Efficiency && file.dies.efficiency.is_none() {
        return Err(DesignError::Input {
            key: "dies.efficiency".into(),
            why: "the efficiency method needs a drawing efficiency in (0, 1]".into(),
        });
    }
    // Every pass leaves the die above the ambient it entered at.
    if let Some(tmax) = file.limits.wire_temperature_max_c {
        let ambient = file.limits.ambient_c.unwrap_or(schedule::DEFAULT_AMBIENT_C);
        if tmax <= ambient {
            return Err(DesignError::Input {
                key: "limits.wire_temperature_max_c".into(),
                why: format!(
                    "{tmax} C is at or below the {ambient} C ambient the wire enters every die at (limits.ambient_c), so no pass can meet it; raise it above {ambient} C"
                ),
            });
        }
    }
    let max_passes = target.max_passes.unwrap_or(DEFAULT_MAX_PASSES);
    if let Some(n) = target.passes {
        if target.max_passes.is_some_and(|m| n > m) {
            return Err(DesignError::Input {
                key: "target.passes".into(),
                why: format!("{n} is over target.max_passes {max_passes}; give one of the two, or raise max_passes"),
            });
        }
    }
    let passes = on_machine(target, machine)?;
    let l = &file.limits;
    let aim = target
        .draw_ratio_aim
        .unwrap_or(DEFAULT_AIM_FRACTION * l.draw_ratio_warn)
        .min(l.draw_ratio_max);
    let mut caps = vec![aim];
    for c in [l.draw_ratio_warn.min(l.draw_ratio_max), l.draw_ratio_max] {
        if c > *caps.last().expect("one cap") {
            caps.push(c);
        }
    }
    let total = pass::true_strain(start_mm, finish_mm);
    let window = anneal::window_strains(file, target, total, finish_mm)?;
    Ok(Input {
        file,
        target,
        angles,
        from_stock,
        method,
        start_mm,
        finish_mm,
        total,
        max_passes,
        caps,
        window,
        passes,
        max_anneals: if machine.is_some() {
            Some(0)
        } else {
            target.max_anneals
        },
        machine,
        reduction_warn: file.limits.reduction_warn.unwrap_or(
            if machine.is_some_and(|m| m.kind == MachineKind::SingleBlock) {
                crate::evaluation::REDUCTION_WARN_SINGLE_DRAFT
            } else {
                crate::evaluation::REDUCTION_WARN_WIRE
            },
        ),
    })
}

/// The pass count a machine asks for: `target.passes` when given (at most
/// the blocks; fewer only on a non-slip machine, which can run a block
/// empty), else one die per block. Without a machine, `target.passes`.
fn on_machine(target: &Target, machine: Option<&Machine>) -> Result<Option<u32>, DesignError> {
    let Some(m) = machine else {
        return Ok(target.passes);
    };
    let blocks = m.blocks.len() as u32;
    let n = target.passes.unwrap_or(blocks);
    let name = if m.name.is_empty() {
        "(unnamed)"
    } else {
        &m.name
    };
    if n > blocks {
        return Err(DesignError::Input {
            key: "target.passes".into(),
            why: format!("{n} passes, but machine {name} has {blocks} blocks (one die per block); give at most {blocks}"),
        });
    }
    if n < blocks && m.kind != MachineKind::NonSlip {
        return Err(DesignError::Input {
            key: "target.passes".into(),
            why: format!(
                "{n} passes, but {} machine {name} has {blocks} blocks and cannot run a block empty; give {blocks}, or leave target.passes out",
                m.kind.name()
            ),
        });
    }
    if target.max_passes.is_some_and(|mp| n > mp) {
        return Err(DesignError::Input {
            key: "target.max_passes".into(),
            why: format!("{} is under the {n} passes machine {name} is designed for; raise it or leave it out", target.max_passes.unwrap_or(0)),
        });
    }
    Ok(Some(n))
}

impl<'f> Input<'f> {
    /// The margin tiers in the order tried: each ratio cap (aim, warn line,
    /// limit) with every pass's reduction at or under the heavy-reduction
    /// line, then, only when `target.reduction_max` allows more than that
    /// line, the limit with the reduction up to `target.reduction_max`.
    pub(super) fn tiers(&self) -> Vec<Tier> {
        let mut v: Vec<Tier> = (0..self.caps.len())
            .map(|ratio| Tier { ratio, light: true })
            .collect();
        if self
            .target
            .reduction_max
            .is_none_or(|r| r > self.reduction_warn)
        {
            v.push(Tier {
                ratio: self.caps.len() - 1,
                light: false,
            });
        }
        v
    }

    /// The pass chooser of a tier.
    pub(super) fn tier_chooser(&self, tier: Tier) -> Result<Chooser<'f>, DesignError> {
        let mut c = self.chooser(self.caps[tier.ratio])?;
        if tier.light
            && self
                .target
                .reduction_max
                .is_none_or(|r| r > self.reduction_warn)
        {
            c.ctx.r_max = Some(self.reduction_warn);
            c.ctx.r_max_is_warn = true;
        }
        Ok(c)
    }

    pub(super) fn chooser(&self, cap: f64) -> Result<Chooser<'f>, DesignError> {
        let file = self.file;
        let mut dies = Vec::with_capacity(self.angles.len());
        for &a in &self.angles {
            let step = DieOverrides {
                semi_angle_deg: Some(a),
                ..DieOverrides::default()
            };
            dies.push(
                file.die_for(&step, a)
                    .map_err(|problem| DesignError::Pass {
                        pass: format!("the die of semi-angle {a} deg"),
                        problem,
                    })?,
            );
        }
        Ok(Chooser {
            ctx: Ctx {
                file,
                method: self.method,
                settings: Settings {
                    redundant_c: file
                        .limits
                        .redundant_c
                        .unwrap_or(Settings::default().redundant_c),
                },
                angles: self.angles.clone(),
                angle_terms: self
                    .angles
                    .iter()
                    .map(|&a| pass::AngleTerms::new(a))
                    .collect(),
                dies,
                from_stock: self.from_stock,
                ratio_max: file.limits.draw_ratio_max,
                ratio_cap: cap,
                r_min: self.target.reduction_min,
                r_max: self.target.reduction_max,
                r_max_is_warn: false,
                fewer_anneals_than: std::cell::Cell::new(None),
                delta_max: file.limits.delta_max,
                cold_work: file.material.cold_work_limit,
                finish_mm: self.finish_mm,
                last_pick: std::cell::Cell::new(None),
                dancers_mpa: self
                    .machine
                    .map(|m| {
                        m.blocks
                            .iter()
                            .map(|b| b.dancer_back_tension_mpa.unwrap_or(0.0))
                            .collect()
                    })
                    .unwrap_or_default(),
            },
            strategy: self.target.strategy,
            taper: self.target.taper.unwrap_or(DEFAULT_TAPER),
        })
    }

    pub(super) fn tables<'c>(&self, chooser: &'c Chooser<'f>, max_n: u32) -> Tables<'c, 'f> {
        let file = self.file;
        let l_eff = file
            .material
            .cold_work_limit
            .map_or(f64::INFINITY, |l| l * (1.0 - COLD_WORK_MARGIN));
        let e0 = file.start.strain;
        let first = Class {
            law: &file.material.flow,
            e0,
            from_mm: self.start_mm,
            strain_cap: (l_eff - e0).min(self.total),
        };
        let annealed = Class {
            law: file.annealed_law(),
            e0: 0.0,
            from_mm: self.start_mm,
            strain_cap: l_eff.min(self.total),
        };
        let mut t = Tables::new(
            RunTable::new(chooser, first, max_n),
            RunTable::new(chooser, annealed, max_n),
            self.window.map(|w| Interval { lo: w.lo, hi: w.hi }),
            e0 > 0.0 || file.material.annealed_flow.is_some(),
            self.window.is_some_and(|w| w.straight_ok),
            self.total,
        );
        t.aim = self.window.map(|w| w.aim);
        if e0 == 0.0 && file.material.annealed_flow.is_none() {
            t.share();
        }
        t
    }

    pub(super) fn pass_range(&self) -> std::ops::RangeInclusive<u32> {
        match self.passes {
            Some(n) => n..=n,
            None => 1..=self.max_passes,
        }
    }
}
