//! What a metallurgist should look at: the checks run on a finished fit.
//! None is a refusal.

use std::fmt;

use super::{
    residual_checks, FitLaw, FitOptions, FitReport, MaterialClass, Yielding,
    MODULUS_CLASS_TOLERANCE, MODULUS_PLAUSIBLE_GPA, RESIDUAL_AUTOCORRELATION, RESIDUAL_NOISE_RATIO,
};

/// The share of the lower yield strength ReL under which the best law's
/// stress at zero plastic strain is warned of on a record with a yield drop:
/// 0.9, our choice (well outside a fit's scatter, and the mean flow stress of
/// a first pass of about 0.2 strain that starts 10 % low along the plateau
/// is a few per cent low).
pub const PLATEAU_SHORTFALL: f64 = 0.9;

/// Something a metallurgist should look at; never a refusal.
#[derive(Debug, Clone, PartialEq)]
pub enum FitWarning {
    /// An iterative fit stopped before meeting its tolerance.
    NotConverged {
        /// The law.
        law: FitLaw,
        /// Iterations taken.
        iterations: usize,
    },
    /// A law with a lower AIC than the best did not converge, so it was not chosen.
    UnconvergedNotChosen {
        /// The law.
        law: FitLaw,
    },
    /// The fitted parameters do not make a law a schedule accepts.
    NotAFlowLaw {
        /// The law.
        law: FitLaw,
        /// Why, from the flow-law validation.
        reason: String,
    },
    /// Repeated strain readings merged.
    RepeatsMerged {
        /// Points merged.
        count: usize,
    },
    /// Small backward strain steps dropped.
    BackstepsDropped {
        /// Points dropped.
        count: usize,
    },
    /// Unload-reload loops cut out.
    UnloadLoopsCut {
        /// Loops.
        loops: usize,
        /// Points dropped.
        points: usize,
    },
    /// A spike dropped.
    SpikeDropped {
        /// 1-based point as given.
        point: usize,
        /// Column.
        field: &'static str,
        /// Its value.
        value: f64,
        /// Mean of its neighbours.
        neighbours: f64,
    },
    /// Points after fracture dropped.
    AfterFractureDropped {
        /// Points dropped.
        count: usize,
    },
    /// Young's modulus outside any metal's.
    ModulusImplausible {
        /// The modulus, GPa.
        gpa: f64,
    },
    /// Young's modulus far from the named class.
    ModulusFarFromClass {
        /// The modulus, GPa.
        gpa: f64,
        /// The class.
        class: MaterialClass,
    },
    /// The best law's residuals are much larger than the record's noise.
    ResidualsAboveNoise {
        /// The law.
        law: FitLaw,
        /// RMS residual, MPa.
        rms_mpa: f64,
        /// Record noise, MPa.
        noise_mpa: f64,
    },
    /// The best law's residuals are strongly correlated.
    ResidualsCorrelated {
        /// The law.
        law: FitLaw,
        /// Lag-1 autocorrelation.
        r1: f64,
    },
    /// Considere: the uniform strain should equal Hollomon's n; warned when
    /// they differ by more than 20 % of n.
    Considere {
        /// True plastic strain at maximum load.
        uniform_strain: f64,
        /// Hollomon exponent (stress-space fit).
        n: f64,
    },
    /// The best law's predicted engineering UTS differs from the measured one
    /// by more than 3 %.
    UtsMismatch {
        /// The law.
        law: FitLaw,
        /// Predicted, MPa.
        fitted_mpa: f64,
        /// Measured, MPa.
        measured_mpa: f64,
    },
    /// Hollomon n outside 0.2 to 0.5 (common practice).
    ExponentUnusual {
        /// Hollomon exponent.
        n: f64,
    },
    /// Hollomon K outside G/1000 to G/100 (common practice).
    StrengthUnusual {
        /// Hollomon K, MPa.
        k_mpa: f64,
        /// G/1000, MPa.
        low_mpa: f64,
        /// G/100, MPa.
        high_mpa: f64,
    },
    /// A drawn-wire point below the record's uniform strain: its tensile
    /// strength is above its flow stress (Considere), so it reads the law high.
    DrawnBelowUniform {
        /// The point's strain.
        strain: f64,
        /// The record's uniform strain.
        uniform_strain: f64,
    },
    /// A record with a yield drop: the best law, fitted after the Lueders
    /// plateau, gives less than [`PLATEAU_SHORTFALL`] of the lower yield
    /// strength ReL at zero plastic strain, where the metal flows at about
    /// ReL along the plateau; a first pass from this state reads it low.
    BelowPlateau {
        /// The best law.
        law: FitLaw,
        /// Its flow stress at zero plastic strain, MPa.
        stress_at_zero_mpa: f64,
        /// ReL, MPa.
        lower_yield_mpa: f64,
        /// The Lueders strain (engineering).
        lueders_strain: f64,
    },
    /// The laws are fitted over a strain range that drawing goes far beyond.
    Extrapolated {
        /// Lowest fitted plastic strain.
        strain_from: f64,
        /// Highest fitted plastic strain (drawn points included).
        strain_to: f64,
        /// The strain a schedule reaches, when given.
        reach_strain: Option<f64>,
    },
}

impl fmt::Display for FitWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FitWarning::NotConverged { law, iterations } => write!(
                f,
                "{law}: the fit did not converge in {iterations} iterations; it is not ranked, and --emit-law refuses it unless --allow-unconverged is given"
            ),
            FitWarning::UnconvergedNotChosen { law } => write!(
                f,
                "{law} has a lower AIC than the best law but its fit did not converge, so it was not chosen"
            ),
            FitWarning::NotAFlowLaw { law, reason } => write!(
                f,
                "{law}: the fitted parameters are not a law a schedule accepts ({reason})"
            ),
            FitWarning::RepeatsMerged { count } => write!(
                f,
                "record: {count} point(s) repeating the strain of the point before were merged into it at their mean stress"
            ),
            FitWarning::BackstepsDropped { count } => write!(
                f,
                "record: {count} point(s) whose strain stepped back within the noise were dropped"
            ),
            FitWarning::UnloadLoopsCut { loops, points } => write!(
                f,
                "record: {loops} unload-reload loop(s) cut out ({points} points dropped); the monotone loading envelope is fitted"
            ),
            FitWarning::SpikeDropped {
                point,
                field,
                value,
                neighbours,
            } => write!(
                f,
                "record: point {point} has {field} {value} far outside its neighbours (about {neighbours:.6}); dropped as a bad reading and not used for the tensile strength"
            ),
            FitWarning::AfterFractureDropped { count } => write!(
                f,
                "record: {count} point(s) after fracture dropped"
            ),
            FitWarning::ModulusImplausible { gpa } => write!(
                f,
                "Young's modulus {gpa:.1} GPa lies outside {} to {} GPa, where every metal lies: check the strain column and its unit",
                MODULUS_PLAUSIBLE_GPA.0, MODULUS_PLAUSIBLE_GPA.1
            ),
            FitWarning::ModulusFarFromClass { gpa, class } => {
                let (lo, hi) = class.modulus_gpa();
                write!(
                    f,
                    "Young's modulus {gpa:.1} GPa is far from {} ({lo} to {hi} GPa, more than {:.0} % off): strain from the crosshead rather than an extensometer, or the wrong unit?",
                    class.name(),
                    MODULUS_CLASS_TOLERANCE * 100.0
                )
            }
            FitWarning::ResidualsAboveNoise {
                law,
                rms_mpa,
                noise_mpa,
            } => write!(
                f,
                "{law}: residuals (RMS {rms_mpa:.3} MPa) are {:.1} times the record's noise ({noise_mpa:.3} MPa): the law does not follow the record to within its noise, and its standard errors, which assume it does, understate the uncertainty",
                rms_mpa / noise_mpa
            ),
            FitWarning::ResidualsCorrelated { law, r1 } => write!(
                f,
                "{law}: residuals are strongly correlated from point to point (lag-1 autocorrelation {r1:.2}): the law misses the curve's shape, and its standard errors, which assume independent residuals, understate the uncertainty"
            ),
            FitWarning::Considere { uniform_strain, n } => write!(
                f,
                "Considere: uniform strain {uniform_strain:.4} differs from Hollomon n = {n:.4} by more than 20 %; the record may not follow a power law to maximum load"
            ),
            FitWarning::UtsMismatch {
                law,
                fitted_mpa,
                measured_mpa,
            } => write!(
                f,
                "{law}: predicted engineering UTS {fitted_mpa:.1} MPa differs from the measured {measured_mpa:.1} MPa by more than 3 %"
            ),
            FitWarning::ExponentUnusual { n } => write!(
                f,
                "Hollomon n = {n:.4} lies outside 0.2 to 0.5, the usual range for metals; check the record"
            ),
            FitWarning::StrengthUnusual {
                k_mpa,
                low_mpa,
                high_mpa,
            } => write!(
                f,
                "Hollomon K = {k_mpa:.1} MPa lies outside G/1000 to G/100 ({low_mpa:.1} to {high_mpa:.1} MPa); check the record and the shear modulus"
            ),
            FitWarning::DrawnBelowUniform {
                strain,
                uniform_strain,
            } => write!(
                f,
                "drawn-wire point at strain {strain:.3} lies below the record's uniform strain {uniform_strain:.3}: such wire still hardens before it necks, so its tensile strength is above the flow stress at its strain (Considere) and reads the law high"
            ),
            FitWarning::BelowPlateau {
                law,
                stress_at_zero_mpa,
                lower_yield_mpa,
                lueders_strain,
            } => write!(
                f,
                "{law} gives {stress_at_zero_mpa:.0} MPa at zero plastic strain, under the lower yield strength ReL {lower_yield_mpa:.0} MPa: along the Lueders plateau (to strain {lueders_strain:.4}) the metal flows at about ReL, so a first pass drawn from this state is given too low a flow stress; a points law starting [[0, {lower_yield_mpa:.0}], [{lueders_strain:.4}, {lower_yield_mpa:.0}], ...] follows the record there"
            ),
            FitWarning::Extrapolated {
                strain_from,
                strain_to,
                reach_strain,
            } => {
                write!(
                    f,
                    "the laws are fitted over true plastic strain {strain_from:.4} to {strain_to:.4} only"
                )?;
                match reach_strain {
                    Some(r) if *r > *strain_to => write!(
                        f,
                        "; the schedule reaches {r:.3}, {:.1} times the top of that range, where the laws part company (see the stress at the reach strain); add drawn-wire strengths (--drawn-point) to fit out there",
                        r / strain_to
                    ),
                    Some(r) => write!(f, "; the schedule reaches {r:.3}, inside that range"),
                    None => write!(
                        f,
                        "; drawing goes far beyond (several units of strain): give the schedule's accumulated strain to see how far"
                    ),
                }
            }
        }
    }
}

fn cleaning_warnings(report: &FitReport, out: &mut Vec<FitWarning>) {
    let c = &report.cleaning;
    for s in &c.spikes {
        out.push(FitWarning::SpikeDropped {
            point: s.point,
            field: s.field,
            value: s.value,
            neighbours: s.neighbours,
        });
    }
    if c.repeats_merged > 0 {
        out.push(FitWarning::RepeatsMerged {
            count: c.repeats_merged,
        });
    }
    if c.backsteps_dropped > 0 {
        out.push(FitWarning::BackstepsDropped {
            count: c.backsteps_dropped,
        });
    }
    if c.unload_loops > 0 {
        out.push(FitWarning::UnloadLoopsCut {
            loops: c.unload_loops,
            points: c.unload_points_dropped,
        });
    }
    if c.after_fracture_dropped > 0 {
        out.push(FitWarning::AfterFractureDropped {
            count: c.after_fracture_dropped,
        });
    }
}

fn modulus_warnings(report: &FitReport, options: &FitOptions, out: &mut Vec<FitWarning>) {
    let Some(gpa) = report.youngs_modulus_gpa else {
        return;
    };
    if !(MODULUS_PLAUSIBLE_GPA.0..=MODULUS_PLAUSIBLE_GPA.1).contains(&gpa) {
        out.push(FitWarning::ModulusImplausible { gpa });
    }
    if let Some(class) = options.material {
        let (lo, hi) = class.modulus_gpa();
        let t = MODULUS_CLASS_TOLERANCE;
        if gpa < lo * (1.0 - t) || gpa > hi * (1.0 + t) {
            out.push(FitWarning::ModulusFarFromClass { gpa, class });
        }
    }
}

/// Every check on a finished report.
pub(super) fn checks(report: &FitReport, options: &FitOptions) -> Vec<FitWarning> {
    let mut out = Vec::new();
    cleaning_warnings(report, &mut out);
    modulus_warnings(report, options, &mut out);
    for fit in report.fits.iter().chain(&report.drawn_fits) {
        if !fit.converged {
            out.push(FitWarning::NotConverged {
                law: fit.law,
                iterations: fit.iterations,
            });
        }
        if fit.flow_law.is_none() {
            out.push(FitWarning::NotAFlowLaw {
                law: fit.law,
                reason: super::laws::flow_law_of(fit.law, &fit.params)
                    .err()
                    .unwrap_or_else(|| "parameters not finite".into()),
            });
        }
    }
    let best = report.best.and_then(|b| report.fit(b));
    if let Some(b) = best {
        for f in &report.fits {
            if !f.converged && !f.law.is_total_strain_form() && f.aic < b.aic {
                out.push(FitWarning::UnconvergedNotChosen { law: f.law });
            }
        }
        if let Some((rms, r1)) = residual_checks(b, &report.plastic_strain, &report.true_stress_mpa)
        {
            // True stress carries the engineering noise times (1 + e): compare with that.
            let grow = report.total_strain.last().map_or(1.0, |e| e.exp());
            let noise = report.noise_mpa * grow;
            if noise > 0.0 && rms > RESIDUAL_NOISE_RATIO * noise {
                out.push(FitWarning::ResidualsAboveNoise {
                    law: b.law,
                    rms_mpa: rms,
                    noise_mpa: noise,
                });
            }
            if r1 > RESIDUAL_AUTOCORRELATION {
                out.push(FitWarning::ResidualsCorrelated { law: b.law, r1 });
            }
        }
    }
    if let Some(h) = report.fit(FitLaw::Hollomon) {
        if let (Some(n), Some(k)) = (h.param("n"), h.param("k_mpa")) {
            if let Some(eu) = report.uniform_strain {
                if (eu - n).abs() > 0.2 * n {
                    out.push(FitWarning::Considere {
                        uniform_strain: eu,
                        n,
                    });
                }
            }
            if !(0.2..=0.5).contains(&n) {
                out.push(FitWarning::ExponentUnusual { n });
            }
            if let Some(g) = options.shear_modulus_gpa {
                let g_mpa = g * 1000.0;
                let (low_mpa, high_mpa) = (g_mpa / 1000.0, g_mpa / 100.0);
                if k < low_mpa || k > high_mpa {
                    out.push(FitWarning::StrengthUnusual {
                        k_mpa: k,
                        low_mpa,
                        high_mpa,
                    });
                }
            }
        }
    }
    if let (
        Some(b),
        Some(Yielding::Discontinuous {
            lower_mpa,
            lueders_strain,
            ..
        }),
    ) = (best, &report.yielding)
    {
        if let Some(s0) = b.flow_law.as_ref().map(|l| l.stress_mpa(0.0)) {
            if s0 < PLATEAU_SHORTFALL * lower_mpa {
                out.push(FitWarning::BelowPlateau {
                    law: b.law,
                    stress_at_zero_mpa: s0,
                    lower_yield_mpa: *lower_mpa,
                    lueders_strain: *lueders_strain,
                });
            }
        }
    }
    if let (Some(b), Some(measured)) = (best, report.uts_mpa) {
        if let Some(fitted) = b.uts_mpa {
            if (fitted - measured).abs() > 0.03 * measured {
                out.push(FitWarning::UtsMismatch {
                    law: b.law,
                    fitted_mpa: fitted,
                    measured_mpa: measured,
                });
            }
        }
    }
    if let Some(eu) = report.uniform_strain {
        for d in report.drawn.iter().filter(|d| d.strain < eu) {
            out.push(FitWarning::DrawnBelowUniform {
                strain: d.strain,
                uniform_strain: eu,
            });
        }
    }
    out.push(FitWarning::Extrapolated {
        strain_from: report.strain_from(),
        strain_to: report.valid_to_strain(),
        reach_strain: options.reach_strain,
    });
    out
}
