//! Validation of a schedule file after serde has read it: the ranges of the
//! material, limits, line and target numbers, and the die defaults. Each
//! message names the key, the value and what is allowed.

use super::ranges::*;
use super::*;

pub(super) fn value(key: &str, r: Result<f64, ParamError>) -> Result<f64, ScheduleError> {
    r.map_err(|mut problem| {
        problem.value = compact_number(&problem.value);
        ScheduleError::Value {
            key: key.to_string(),
            problem,
        }
    })
}

/// A number as short as it is exact: `5e-324`, not 324 digits.
fn compact_number(text: &str) -> String {
    match text.parse::<f64>() {
        Ok(x) if x.is_finite() && text.len() > 15 => format!("{x:e}"),
        _ => text.to_string(),
    }
}

impl ScheduleFile {
    /// Checks every value that serde cannot: ranges of the material, limits,
    /// line and target numbers, and the die defaults.
    pub fn validate(&self) -> Result<(), ScheduleError> {
        let m = &self.material;
        let (lo, hi) = DENSITY_RANGE_KG_M3;
        value(
            "material.density_kg_m3",
            param::within("density_kg_m3", m.density_kg_m3, lo, hi, Ends::Closed),
        )?;
        let (lo, hi) = SPECIFIC_HEAT_RANGE_J_KG_K;
        value(
            "material.specific_heat_j_kg_k",
            param::within(
                "specific_heat_j_kg_k",
                m.specific_heat_j_kg_k,
                lo,
                hi,
                Ends::Closed,
            ),
        )?;
        if let Some(c) = m.cold_work_limit {
            value(
                "material.cold_work_limit",
                param::within("cold_work_limit", c, 0.0, STRAIN_MAX, Ends::OpenClosed),
            )?;
        }
        self.validate_sizes()?;
        if let Some(b) = m.heat_fraction {
            value(
                "material.heat_fraction",
                param::within("heat_fraction", b, 0.0, 1.0, Ends::Closed),
            )?;
        }
        if let Some(y) = m.yield_mpa {
            value("material.yield_mpa", param::positive("yield_mpa", y))?;
        }
        if let Some(e) = m.flow_valid_to_strain {
            value(
                "material.flow_valid_to_strain",
                param::positive("flow_valid_to_strain", e),
            )?;
        }
        for (i, p) in m.drawn_strengths.iter().enumerate() {
            let key = |k: &str| format!("material.drawn_strengths[{i}].{k}");
            value(
                &key("tensile_strength_mpa"),
                param::positive("tensile_strength_mpa", p.tensile_strength_mpa),
            )?;
            match (p.strain, &p.diameter) {
                (Some(e), None) => {
                    value(&key("strain"), param::non_negative("strain", e))?;
                }
                (None, Some(_)) => {}
                _ => {
                    return Err(ScheduleError::Missing {
                        key: key("strain"),
                        why: "give a point's strain or its diameter (one of them)".into(),
                    })
                }
            }
        }
        value(
            "start.strain",
            param::within("strain", self.start.strain, 0.0, STRAIN_MAX, Ends::Closed),
        )?;
        let d = &self.dies;
        if let Some(a) = d.semi_angle_deg {
            value(
                "dies.semi_angle_deg",
                param::within(
                    "semi_angle_deg",
                    a,
                    SEMI_ANGLE_RANGE_DEG.0,
                    SEMI_ANGLE_RANGE_DEG.1,
                    Ends::Open,
                ),
            )?;
        }
        if let Some(list) = &d.semi_angles_deg {
            if list.is_empty() {
                return Err(ScheduleError::Value {
                    key: "dies.semi_angles_deg".into(),
                    problem: ParamError::new("semi_angles_deg", "[]", "needs at least one angle"),
                });
            }
            for (i, a) in list.iter().enumerate() {
                value(
                    &format!("dies.semi_angles_deg[{i}]"),
                    param::within(
                        "semi_angle_deg",
                        *a,
                        SEMI_ANGLE_RANGE_DEG.0,
                        SEMI_ANGLE_RANGE_DEG.1,
                        Ends::Open,
                    ),
                )?;
            }
        }
        self.die_for(&DieOverrides::default(), d.semi_angle_deg.unwrap_or(6.0))
            .map_err(|problem| ScheduleError::Pass {
                key: "dies".into(),
                problem,
            })?;
        let l = &self.limits;
        value(
            "limits.draw_ratio_warn",
            param::positive("draw_ratio_warn", l.draw_ratio_warn),
        )?;
        value(
            "limits.draw_ratio_max",
            param::positive("draw_ratio_max", l.draw_ratio_max),
        )?;
        if l.draw_ratio_warn > l.draw_ratio_max {
            return Err(ScheduleError::Value {
                key: "limits.draw_ratio_warn".into(),
                problem: ParamError::new(
                    "draw_ratio_warn",
                    l.draw_ratio_warn,
                    format!("must not exceed draw_ratio_max ({})", l.draw_ratio_max),
                ),
            });
        }
        if let Some(x) = l.delta_max {
            value("limits.delta_max", param::positive("delta_max", x))?;
        }
        if let Some(x) = l.ambient_c {
            value(
                "limits.ambient_c",
                param::within(
                    "ambient_c",
                    x,
                    AMBIENT_RANGE_C.0,
                    AMBIENT_RANGE_C.1,
                    Ends::Closed,
                ),
            )?;
        }
        if let Some(x) = l.wire_temperature_max_c {
            // The wire enters every die at ambient and only warms: a limit at
            // or below ambient can never be met (it would only send a design
            // searching to its last pass).
            let ambient = l.ambient_c.unwrap_or(DEFAULT_AMBIENT_C);
            value(
                "limits.wire_temperature_max_c",
                param::within(
                    "wire_temperature_max_c",
                    x,
                    ambient,
                    WIRE_TEMPERATURE_MAX_C,
                    Ends::OpenClosed,
                ),
            )
            .map_err(|e| match e {
                ScheduleError::Value { key, mut problem } => {
                    problem.allowed = format!(
                        "{} (above the ambient {ambient} C at which the wire enters every die, and at most {WIRE_TEMPERATURE_MAX_C} C)",
                        problem.allowed
                    );
                    ScheduleError::Value { key, problem }
                }
                other => other,
            })?;
        }
        if let Some(x) = l.angle_tolerance_deg {
            value(
                "limits.angle_tolerance_deg",
                param::positive("angle_tolerance_deg", x),
            )?;
        }
        if let Some(x) = l.redundant_c {
            value("limits.redundant_c", param::non_negative("redundant_c", x))?;
        }
        if let Some(x) = l.reduction_warn {
            value(
                "limits.reduction_warn",
                param::within("reduction_warn", x, 0.0, 1.0, Ends::Open),
            )?;
        }
        if l.method == Some(Method::Efficiency) && d.efficiency.is_none() {
            return Err(ScheduleError::Missing {
                key: "dies.efficiency".into(),
                why: "limits.method is efficiency, which divides ideal work by it".into(),
            });
        }
        if let Some(line) = &self.line {
            value(
                "line.finish_speed_m_s",
                param::within(
                    "finish_speed_m_s",
                    line.finish_speed_m_s,
                    0.0,
                    FINISH_SPEED_MAX_M_S,
                    Ends::OpenClosed,
                ),
            )?;
            if let Some(x) = line.block_power_kw {
                value(
                    "line.block_power_kw",
                    param::within(
                        "block_power_kw",
                        x,
                        0.0,
                        BLOCK_POWER_MAX_KW,
                        Ends::OpenClosed,
                    ),
                )?;
            }
            if let Some(x) = line.coil_mass_kg {
                value(
                    "line.coil_mass_kg",
                    param::within("coil_mass_kg", x, 0.0, COIL_MASS_MAX_KG, Ends::OpenClosed),
                )?;
            }
            if let Some(x) = line.shift_hours {
                value(
                    "line.shift_hours",
                    param::within("shift_hours", x, 0.0, SHIFT_HOURS_MAX, Ends::OpenClosed),
                )?;
            }
            if let Some(x) = line.utilisation {
                value(
                    "line.utilisation",
                    param::within("utilisation", x, 0.0, 1.0, Ends::OpenClosed),
                )?;
            }
        }
        if let Some(t) = &self.target {
            if let Some(w) = t.strength_mpa {
                value("target.strength_mpa.min", param::positive("min", w.min))?;
                value("target.strength_mpa.max", param::positive("max", w.max))?;
                if w.max < w.min {
                    return Err(ScheduleError::Value {
                        key: "target.strength_mpa.max".into(),
                        problem: ParamError::new(
                            "max",
                            w.max,
                            format!("must be at least min ({})", w.min),
                        ),
                    });
                }
            }
            for (key, r) in [
                ("target.reduction_max", t.reduction_max),
                ("target.reduction_min", t.reduction_min),
            ] {
                if let Some(r) = r {
                    value(key, param::within(&key[7..], r, 0.0, 1.0, Ends::Open))?;
                }
            }
            if let (Some(lo), Some(hi)) = (t.reduction_min, t.reduction_max) {
                if lo > hi {
                    return Err(ScheduleError::Value {
                        key: "target.reduction_min".into(),
                        problem: ParamError::new(
                            "reduction_min",
                            lo,
                            format!("must not exceed reduction_max ({hi})"),
                        ),
                    });
                }
            }
            if let Some(x) = t.taper {
                value(
                    "target.taper",
                    param::within("taper", x, 0.0, 1.0, Ends::OpenClosed),
                )?;
            }
            for (key, n) in [
                ("target.max_passes", t.max_passes),
                ("target.passes", t.passes),
            ] {
                if let Some(n) = n {
                    if !(1..=MAX_PASSES_ALLOWED).contains(&n) {
                        return Err(ScheduleError::Value {
                            key: key.into(),
                            problem: ParamError::new(
                                &key[7..],
                                n,
                                format!("must be in [1, {MAX_PASSES_ALLOWED}]"),
                            ),
                        });
                    }
                }
            }
            if let Some(n) = t.max_anneals {
                if n > MAX_PASSES_ALLOWED {
                    return Err(ScheduleError::Value {
                        key: "target.max_anneals".into(),
                        problem: ParamError::new(
                            "max_anneals",
                            n,
                            format!("must be in [0, {MAX_PASSES_ALLOWED}]"),
                        ),
                    });
                }
            }
            if let Some(x) = t.draw_ratio_aim {
                value(
                    "target.draw_ratio_aim",
                    param::within(
                        "draw_ratio_aim",
                        x,
                        0.0,
                        self.limits.draw_ratio_max,
                        Ends::OpenClosed,
                    ),
                )?;
            }
            if let Some(x) = t.die_step_mm {
                value(
                    "target.die_step_mm",
                    param::within("die_step_mm", x, 0.0, DIE_STEP_MAX_MM, Ends::OpenClosed),
                )?;
            }
            if let Some(list) = &t.die_sizes_mm {
                if t.die_step_mm.is_some() {
                    return Err(ScheduleError::Value {
                        key: "target.die_sizes_mm".into(),
                        problem: ParamError::new(
                            "die_sizes_mm",
                            format!("{list:?}"),
                            "give either die_step_mm or die_sizes_mm, not both",
                        ),
                    });
                }
                if list.is_empty() {
                    return Err(ScheduleError::Value {
                        key: "target.die_sizes_mm".into(),
                        problem: ParamError::new("die_sizes_mm", "[]", "needs at least one size"),
                    });
                }
                for x in list {
                    value("target.die_sizes_mm", param::positive("die_sizes_mm", *x))?;
                }
            }
        }
        if self.scatter.is_some() || m.flow_scatter.is_some() {
            crate::risk::spreads(self).map_err(|e| match e {
                crate::risk::RiskError::Value(problem) => ScheduleError::Value {
                    key: if problem.name.starts_with("material") {
                        "material.flow_scatter".into()
                    } else {
                        "scatter".into()
                    },
                    problem,
                },
                other => ScheduleError::Syntax(other.to_string()),
            })?;
        }
        Ok(())
    }

    /// Every diameter in the file (start, pass exits, target) within
    /// [`DIAMETER_RANGE_MM`].
    fn validate_sizes(&self) -> Result<(), ScheduleError> {
        let (lo, hi) = DIAMETER_RANGE_MM;
        let check = |key: String, d: &Diameter| -> Result<(), ScheduleError> {
            value(
                &key,
                param::within("diameter_mm", d.mm(), lo, hi, Ends::Closed),
            )
            .map(|_| ())
        };
        check("start.diameter".into(), &self.start.diameter)?;
        if let Some(t) = &self.target {
            check("target.diameter".into(), &t.diameter)?;
        }
        for (i, step) in self.passes.iter().enumerate() {
            if let Step::Draw(d) = step {
                check(format!("passes[{i}].exit"), &d.exit)?;
            }
        }
        Ok(())
    }
}
