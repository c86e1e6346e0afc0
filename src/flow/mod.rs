//! Flow-stress laws: true stress (MPa) against true plastic strain accumulated
//! since the last anneal.
//!
//! Forms as in Dieter, *Mechanical Metallurgy*, and Hosford & Caddell, *Metal
//! Forming* (from memory): Hollomon (1945) `K eps^n`, Ludwik (1909)
//! `s0 + K eps^n`, Swift (1952) `K (e0 + eps)^n`, Voce (1948)
//! `ss - (ss - s0) exp(-eps/ec)`, plus perfectly plastic, linear hardening and
//! a piecewise-linear table. Each law gives the stress at a strain, the mean
//! over a strain interval (closed form; the table's trapezoid rule is exact)
//! and the inverse. [`FlowLaw::integral_by_quadrature`] gives the same integral
//! by adaptive quadrature, as an independent check.

use serde::{Deserialize, Serialize};

use crate::param::{self, Ends, ParamError};
use crate::quad::{self, Integral, QuadratureError};
mod table;
mod written;

use table::{table_integral, table_inverse, table_stress, validate_points};
use written::{hardening_modulus_mpa, k_mpa, saturation_mpa, sigma0_mpa, stress_points, yield_mpa};

/// Why a flow law or a question put to it is not valid.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FlowError {
    /// A parameter is out of range.
    #[error(transparent)]
    Param(#[from] ParamError),
    /// A numerical integral could not be trusted.
    #[error(transparent)]
    Quadrature(#[from] QuadratureError),
    /// A result is too large (or too small) for floating point: valid but
    /// extreme constants or strains.
    #[error("the {quantity} overflows floating point ({value}); the law's constants or the strain are too extreme")]
    Overflow {
        /// What overflowed, in words (`flow-stress integral`).
        quantity: &'static str,
        /// The value it came to (an infinity or NaN).
        value: f64,
    },
}

/// `value` if it is finite, else [`FlowError::Overflow`] naming `quantity`.
pub(crate) fn finite_or_overflow(quantity: &'static str, value: f64) -> Result<f64, FlowError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(FlowError::Overflow { quantity, value })
    }
}

/// What a `points` table does beyond its last strain.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Beyond {
    /// Continue with the slope of the last segment.
    Slope,
    /// Hold the last stress.
    Flat,
}

/// The description of a flow law as written in a schedule file, before
/// validation. Keys are the serde keys of the file: `{law: hollomon, k_mpa: 530, n: 0.26}`.
///
/// Every stress (the `*_mpa` keys, the hardening modulus and a table's
/// stresses) is read by [`quantity::parse`]: a plain number is MPa (the
/// README contract), or a number with a stress unit (`"60 ksi"`, `"414 MPa"`,
/// `"40 kgf/mm2"`), converted by NIST SP 811 (2008) Appendix B.8, e.g.
/// 1 ksi = 6.894 757 MPa. Written back (as `fit` emits a law) every stress is
/// a plain number of MPa.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "law", rename_all = "kebab-case", deny_unknown_fields)]
pub enum FlowLawSpec {
    /// `sigma = Y` (MPa).
    PerfectlyPlastic {
        /// Yield stress Y, MPa.
        #[serde(deserialize_with = "yield_mpa")]
        yield_mpa: f64,
    },
    /// `sigma = Y + H eps` (MPa).
    Linear {
        /// Yield stress Y, MPa.
        #[serde(deserialize_with = "yield_mpa")]
        yield_mpa: f64,
        /// Hardening modulus H, MPa per unit strain.
        #[serde(deserialize_with = "hardening_modulus_mpa")]
        hardening_modulus_mpa: f64,
    },
    /// Hollomon: `sigma = K eps^n` (MPa).
    Hollomon {
        /// Strength coefficient K, MPa.
        #[serde(deserialize_with = "k_mpa")]
        k_mpa: f64,
        /// Strain-hardening exponent n, 0 <= n < 1.
        n: f64,
    },
    /// Ludwik: `sigma = s0 + K eps^n` (MPa).
    Ludwik {
        /// Initial yield s0, MPa.
        #[serde(deserialize_with = "sigma0_mpa")]
        sigma0_mpa: f64,
        /// Strength coefficient K, MPa.
        #[serde(deserialize_with = "k_mpa")]
        k_mpa: f64,
        /// Exponent n, 0 <= n < 1.
        n: f64,
    },
    /// Swift: `sigma = K (e0 + eps)^n` (MPa).
    Swift {
        /// Strength coefficient K, MPa.
        #[serde(deserialize_with = "k_mpa")]
        k_mpa: f64,
        /// Pre-strain e0 (0 or more).
        eps0: f64,
        /// Exponent n, 0 <= n < 1.
        n: f64,
    },
    /// Voce: `sigma = ss - (ss - s0) exp(-eps/ec)` (MPa).
    Voce {
        /// Initial yield s0, MPa.
        #[serde(deserialize_with = "sigma0_mpa")]
        sigma0_mpa: f64,
        /// Saturation stress ss, MPa (at least s0).
        #[serde(deserialize_with = "saturation_mpa")]
        saturation_mpa: f64,
        /// Characteristic strain ec (greater than 0).
        eps_c: f64,
    },
    /// Piecewise linear through `[strain, stress_mpa]` points.
    Points {
        /// `[strain, stress_mpa]` pairs; strains strictly increasing, the first at 0.
        #[serde(deserialize_with = "stress_points")]
        points: Vec<[f64; 2]>,
        /// Behaviour beyond the last point.
        beyond: Beyond,
    },
}

/// A validated flow law. Build one with a constructor ([`FlowLaw::hollomon`], ...)
/// or [`FlowLaw::new`]; deserializing validates too.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "FlowLawSpec", into = "FlowLawSpec")]
pub struct FlowLaw(FlowLawSpec);

impl TryFrom<FlowLawSpec> for FlowLaw {
    type Error = FlowError;
    fn try_from(spec: FlowLawSpec) -> Result<Self, FlowError> {
        FlowLaw::new(spec)
    }
}

impl From<FlowLaw> for FlowLawSpec {
    fn from(law: FlowLaw) -> Self {
        law.0
    }
}

/// The answer to "at what strain does the law reach this stress?".
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StrainAt {
    /// Reached at this accumulated strain (0 when the stress is at or below the
    /// law's initial stress).
    Reached(f64),
    /// Never reached: the law saturates (or stays flat) below it.
    Unreachable {
        /// The highest stress the law reaches, MPa.
        limit_mpa: f64,
    },
}

fn exponent(name: &str, n: f64) -> Result<f64, ParamError> {
    param::within(name, n, 0.0, 1.0, Ends::ClosedOpen)
}

impl FlowLaw {
    /// Validates a description: K, yield, saturation and characteristic strain
    /// greater than 0; n in [0, 1); hardening modulus, Ludwik s0 and Swift e0 at
    /// least 0; Voce saturation at least s0; a table with at least two points,
    /// the first at strain 0, strains strictly increasing, stresses greater
    /// than 0 and, with `beyond: slope`, a last slope of at least 0.
    pub fn new(spec: FlowLawSpec) -> Result<Self, FlowError> {
        match &spec {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => {
                param::positive("yield_mpa", *yield_mpa)?;
            }
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } => {
                param::positive("yield_mpa", *yield_mpa)?;
                param::non_negative("hardening_modulus_mpa", *hardening_modulus_mpa)?;
            }
            FlowLawSpec::Hollomon { k_mpa, n } => {
                param::positive("k_mpa", *k_mpa)?;
                exponent("n", *n)?;
            }
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } => {
                param::non_negative("sigma0_mpa", *sigma0_mpa)?;
                param::positive("k_mpa", *k_mpa)?;
                exponent("n", *n)?;
            }
            FlowLawSpec::Swift { k_mpa, eps0, n } => {
                param::positive("k_mpa", *k_mpa)?;
                param::non_negative("eps0", *eps0)?;
                exponent("n", *n)?;
            }
            FlowLawSpec::Voce {
                sigma0_mpa,
                saturation_mpa,
                eps_c,
            } => {
                param::positive("sigma0_mpa", *sigma0_mpa)?;
                param::positive("saturation_mpa", *saturation_mpa)?;
                param::positive("eps_c", *eps_c)?;
                if saturation_mpa < sigma0_mpa {
                    return Err(ParamError::new(
                        "saturation_mpa",
                        saturation_mpa,
                        format!("must be at least sigma0_mpa ({sigma0_mpa})"),
                    )
                    .into());
                }
            }
            FlowLawSpec::Points { points, beyond } => validate_points(points, *beyond)?,
        }
        Ok(FlowLaw(spec))
    }

    /// Perfectly plastic: `sigma = yield_mpa`.
    pub fn perfectly_plastic(yield_mpa: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::PerfectlyPlastic { yield_mpa })
    }

    /// Linear hardening: `sigma = yield_mpa + hardening_modulus_mpa * eps`.
    pub fn linear(yield_mpa: f64, hardening_modulus_mpa: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Linear {
            yield_mpa,
            hardening_modulus_mpa,
        })
    }

    /// Hollomon: `sigma = k_mpa * eps^n`.
    pub fn hollomon(k_mpa: f64, n: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Hollomon { k_mpa, n })
    }

    /// Ludwik: `sigma = sigma0_mpa + k_mpa * eps^n`.
    pub fn ludwik(sigma0_mpa: f64, k_mpa: f64, n: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Ludwik {
            sigma0_mpa,
            k_mpa,
            n,
        })
    }

    /// Swift: `sigma = k_mpa * (eps0 + eps)^n`.
    pub fn swift(k_mpa: f64, eps0: f64, n: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Swift { k_mpa, eps0, n })
    }

    /// Voce: `sigma = saturation_mpa - (saturation_mpa - sigma0_mpa) exp(-eps / eps_c)`.
    pub fn voce(sigma0_mpa: f64, saturation_mpa: f64, eps_c: f64) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Voce {
            sigma0_mpa,
            saturation_mpa,
            eps_c,
        })
    }

    /// Piecewise linear through `[strain, stress_mpa]` points.
    pub fn points(points: Vec<[f64; 2]>, beyond: Beyond) -> Result<Self, FlowError> {
        Self::new(FlowLawSpec::Points { points, beyond })
    }

    /// The validated description (for matching on the law's kind).
    pub fn spec(&self) -> &FlowLawSpec {
        &self.0
    }

    /// The law's serde name: `hollomon`, `perfectly-plastic`, ...
    pub fn name(&self) -> &'static str {
        match self.0 {
            FlowLawSpec::PerfectlyPlastic { .. } => "perfectly-plastic",
            FlowLawSpec::Linear { .. } => "linear",
            FlowLawSpec::Hollomon { .. } => "hollomon",
            FlowLawSpec::Ludwik { .. } => "ludwik",
            FlowLawSpec::Swift { .. } => "swift",
            FlowLawSpec::Voce { .. } => "voce",
            FlowLawSpec::Points { .. } => "points",
        }
    }

    /// Flow stress (MPa) at accumulated true plastic strain `strain`.
    /// Strains below 0 are taken as 0 (the annealed state).
    #[inline]
    pub fn stress_mpa(&self, strain: f64) -> f64 {
        let e = strain.max(0.0);
        match &self.0 {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => *yield_mpa,
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } => yield_mpa + hardening_modulus_mpa * e,
            FlowLawSpec::Hollomon { k_mpa, n } => k_mpa * e.powf(*n),
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } => sigma0_mpa + k_mpa * e.powf(*n),
            FlowLawSpec::Swift { k_mpa, eps0, n } => k_mpa * (eps0 + e).powf(*n),
            FlowLawSpec::Voce {
                sigma0_mpa,
                saturation_mpa,
                eps_c,
            } => saturation_mpa - (saturation_mpa - sigma0_mpa) * (-e / eps_c).exp(),
            FlowLawSpec::Points { points, beyond } => table_stress(points, *beyond, e),
        }
    }

    /// Integral of the flow stress over strain from `e1` to `e2` (MPa), closed form:
    /// Hollomon `K (e2^(n+1) - e1^(n+1)) / (n+1)`, Ludwik and Swift likewise,
    /// Voce `ss (e2-e1) - (ss-s0) ec (exp(-e1/ec) - exp(-e2/ec))`, the table by
    /// its exact trapezoids (Dieter, ch. 19, mean flow stress; from memory).
    pub fn integral_mpa(&self, e1: f64, e2: f64) -> Result<f64, FlowError> {
        check_interval(e1, e2)?;
        let d = e2 - e1;
        let integral = match &self.0 {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => yield_mpa * d,
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } => (yield_mpa + hardening_modulus_mpa * 0.5 * (e1 + e2)) * d,
            FlowLawSpec::Hollomon { k_mpa, n } => k_mpa * power_integral(e1, e2, *n),
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } => sigma0_mpa * d + k_mpa * power_integral(e1, e2, *n),
            FlowLawSpec::Swift { k_mpa, eps0, n } => {
                k_mpa * power_integral(eps0 + e1, eps0 + e2, *n)
            }
            FlowLawSpec::Voce {
                sigma0_mpa,
                saturation_mpa,
                eps_c,
            } => voce_integral(*saturation_mpa, *sigma0_mpa, *eps_c, (-e1 / eps_c).exp(), d),
            FlowLawSpec::Points { points, beyond } => table_integral(points, *beyond, e1, e2),
        };
        finite_or_overflow("flow-stress integral", integral)
    }

    /// Mean flow stress over `[e1, e2]` (MPa): `integral / (e2 - e1)`, or the
    /// stress at `e1` when the interval is empty.
    pub fn mean_stress_mpa(&self, e1: f64, e2: f64) -> Result<f64, FlowError> {
        check_interval(e1, e2)?;
        if e2 == e1 {
            return finite_or_overflow("flow stress", self.stress_mpa(e1));
        }
        finite_or_overflow("mean flow stress", self.integral_mpa(e1, e2)? / (e2 - e1))
    }

    /// The same integral as [`FlowLaw::integral_mpa`] by adaptive double-exponential
    /// quadrature, split at the table's points, to relative tolerance `rel_tol`
    /// of `max stress * (e2 - e1)`.
    pub fn integral_by_quadrature(
        &self,
        e1: f64,
        e2: f64,
        rel_tol: f64,
    ) -> Result<Integral, FlowError> {
        check_interval(e1, e2)?;
        let scale = self
            .stress_mpa(e1)
            .abs()
            .max(self.stress_mpa(e2).abs())
            .max(1.0)
            * (e2 - e1);
        let breaks = self.break_strains();
        Ok(quad::integrate(
            |e| self.stress_mpa(e),
            e1,
            e2,
            rel_tol * scale,
            &breaks,
        )?)
    }

    /// Strains at which the law has a kink (the table's points); empty for smooth laws.
    pub fn break_strains(&self) -> Vec<f64> {
        match &self.0 {
            FlowLawSpec::Points { points, .. } => points.iter().map(|p| p[0]).collect(),
            _ => Vec::new(),
        }
    }

    /// The highest stress the law ever reaches (MPa), when it is bounded:
    /// perfectly plastic Y, Voce ss, a flat-ended table its highest point;
    /// `None` for laws that harden without bound.
    pub fn saturation_mpa(&self) -> Option<f64> {
        match &self.0 {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => Some(*yield_mpa),
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } if *hardening_modulus_mpa == 0.0 => Some(*yield_mpa),
            FlowLawSpec::Hollomon { k_mpa, n } if *n == 0.0 => Some(*k_mpa),
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } if *n == 0.0 => Some(sigma0_mpa + k_mpa),
            FlowLawSpec::Swift { k_mpa, n, .. } if *n == 0.0 => Some(*k_mpa),
            FlowLawSpec::Voce { saturation_mpa, .. } => Some(*saturation_mpa),
            FlowLawSpec::Points { points, beyond } => {
                let max = points.iter().map(|p| p[1]).fold(0.0, f64::max);
                let n = points.len();
                let last_slope =
                    (points[n - 1][1] - points[n - 2][1]) / (points[n - 1][0] - points[n - 2][0]);
                match beyond {
                    Beyond::Slope if last_slope > 0.0 => None,
                    _ => Some(max),
                }
            }
            _ => None,
        }
    }

    /// The accumulated strain at which the flow stress first reaches `stress_mpa`:
    /// the closed-form inverse of each law (Hollomon `(s/K)^(1/n)`, Voce
    /// `-ec ln((ss - s)/(ss - s0))`, ...), the table by linear interpolation.
    /// A stress at or below the law's initial stress is reached at strain 0.
    pub fn strain_at_stress(&self, stress_mpa: f64) -> Result<StrainAt, FlowError> {
        let s = param::finite("stress_mpa", stress_mpa)?;
        if s <= self.stress_mpa(0.0) {
            return Ok(StrainAt::Reached(0.0));
        }
        if let Some(limit) = self.saturation_mpa() {
            if s >= limit {
                // A table with `flat` reaches its highest point exactly; saturating laws only tend to it.
                let reached_exactly = matches!(self.0, FlowLawSpec::Points { .. }) && s == limit;
                if !reached_exactly {
                    return Ok(StrainAt::Unreachable { limit_mpa: limit });
                }
            }
        }
        let e = match &self.0 {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => {
                return Ok(StrainAt::Unreachable {
                    limit_mpa: *yield_mpa,
                })
            }
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } => (s - yield_mpa) / hardening_modulus_mpa,
            FlowLawSpec::Hollomon { k_mpa, n } => (s / k_mpa).powf(1.0 / n),
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } => ((s - sigma0_mpa) / k_mpa).powf(1.0 / n),
            FlowLawSpec::Swift { k_mpa, eps0, n } => ((s / k_mpa).powf(1.0 / n) - eps0).max(0.0),
            FlowLawSpec::Voce {
                sigma0_mpa,
                saturation_mpa,
                eps_c,
            } => -eps_c * ((saturation_mpa - s) / (saturation_mpa - sigma0_mpa)).ln(),
            FlowLawSpec::Points { points, .. } => table_inverse(points, s),
        };
        // An exponent near 0 or a modulus near 0 can put the strain beyond f64.
        Ok(StrainAt::Reached(finite_or_overflow(
            "strain at that stress",
            e,
        )?))
    }
}

fn check_interval(e1: f64, e2: f64) -> Result<(), ParamError> {
    param::non_negative("strain_from", e1)?;
    param::non_negative("strain_to", e2)?;
    if e2 < e1 {
        return Err(ParamError::new(
            "strain_to",
            e2,
            format!("must be at least strain_from ({e1})"),
        ));
    }
    Ok(())
}

/// `b^(n+1) - a^(n+1)` for `0 <= a <= b`, written as
/// `a^(n+1) expm1((n+1) ln1p((b-a)/a))` so that thin intervals lose no digits.
pub(crate) fn power_difference(a: f64, b: f64, n: f64) -> f64 {
    let p = n + 1.0;
    if a > 0.0 {
        a.powf(p) * (p * ((b - a) / a).ln_1p()).exp_m1()
    } else {
        b.powf(p)
    }
}

/// `integral of x^n dx from a to b = (b^(n+1) - a^(n+1)) / (n+1)`, by
/// [`power_difference`].
fn power_integral(a: f64, b: f64, n: f64) -> f64 {
    power_difference(a, b, n) / (n + 1.0)
}

/// The Voce integral over `[e1, e1 + d]` (MPa):
/// `ss d - (ss - s0) ec (exp(-e1/ec) - exp(-(e1+d)/ec))`, with
/// `entry_decay = exp(-e1/ec)` given, and the difference of exponentials
/// written `exp(-e1/ec) (-expm1(-d/ec))` so that it does not cancel.
pub(crate) fn voce_integral(ss: f64, s0: f64, ec: f64, entry_decay: f64, d: f64) -> f64 {
    let drop = entry_decay * -(-d / ec).exp_m1();
    ss * d - (ss - s0) * ec * drop
}

#[cfg(test)]
mod tests {
    use super::*;

    fn laws() -> Vec<FlowLaw> {
        vec![
            FlowLaw::perfectly_plastic(250.0).unwrap(),
            FlowLaw::linear(200.0, 150.0).unwrap(),
            FlowLaw::hollomon(530.0, 0.26).unwrap(),
            FlowLaw::ludwik(120.0, 400.0, 0.45).unwrap(),
            FlowLaw::swift(600.0, 0.02, 0.3).unwrap(),
            FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
            FlowLaw::points(
                vec![[0.0, 100.0], [0.5, 250.0], [1.5, 330.0]],
                Beyond::Slope,
            )
            .unwrap(),
            FlowLaw::points(vec![[0.0, 100.0], [0.5, 250.0], [1.5, 330.0]], Beyond::Flat).unwrap(),
        ]
    }

    #[test]
    fn closed_form_integral_matches_quadrature() {
        for law in laws() {
            for (e1, e2) in [(0.0, 0.2), (0.1, 0.35), (0.9, 2.4), (2.0, 2.01)] {
                let closed = law.integral_mpa(e1, e2).unwrap();
                let q = law.integral_by_quadrature(e1, e2, 1e-13).unwrap().value;
                assert!(
                    ((closed - q) / q).abs() < 1e-9,
                    "{} on [{e1}, {e2}]: {closed} vs {q}",
                    law.name()
                );
            }
        }
    }

    #[test]
    fn inverse_round_trips() {
        for law in laws() {
            for e in [0.05, 0.3, 1.2, 2.5] {
                let s = law.stress_mpa(e);
                // The inverse gives the first strain at which the stress is reached:
                // the same stress, at a strain no larger than the one that made it.
                match law.strain_at_stress(s).unwrap() {
                    StrainAt::Reached(back) => {
                        assert!(
                            (law.stress_mpa(back) - s).abs() < 1e-9 * s,
                            "{}: {e} -> {s} -> {back}",
                            law.name()
                        );
                        assert!(
                            back <= e + 1e-9 * (1.0 + e),
                            "{}: {e} -> {back}",
                            law.name()
                        );
                    }
                    StrainAt::Unreachable { limit_mpa } => {
                        panic!("{}: {s} MPa is reached at {e}, yet called unreachable (limit {limit_mpa})", law.name())
                    }
                }
            }
        }
    }

    #[test]
    fn saturating_law_never_reaches_its_saturation() {
        let voce = FlowLaw::voce(80.0, 470.0, 0.8).unwrap();
        assert_eq!(
            voce.strain_at_stress(470.0).unwrap(),
            StrainAt::Unreachable { limit_mpa: 470.0 }
        );
        assert_eq!(voce.strain_at_stress(50.0).unwrap(), StrainAt::Reached(0.0));
    }

    #[test]
    fn serde_keys_read_naturally() {
        let law: FlowLaw = serde_yaml::from_str("{law: hollomon, k_mpa: 530, n: 0.26}").unwrap();
        assert_eq!(law, FlowLaw::hollomon(530.0, 0.26).unwrap());
        let pts: FlowLaw =
            serde_yaml::from_str("{law: points, points: [[0, 100], [1, 200]], beyond: flat}")
                .unwrap();
        assert_eq!(pts.stress_mpa(3.0), 200.0);
        let bad =
            serde_yaml::from_str::<FlowLaw>("{law: hollomon, k_mpa: 530, n: 1.2}").unwrap_err();
        assert!(bad.to_string().contains("`n` = 1.2"), "{bad}");
        let unknown = serde_yaml::from_str::<FlowLaw>("{law: hollomon, k_mpa: 530, n: 0.2, m: 1}")
            .unwrap_err();
        assert!(unknown.to_string().contains("unknown field"), "{unknown}");
        let out = serde_yaml::to_string(&law).unwrap();
        assert!(out.contains("law: hollomon"), "{out}");
    }

    #[test]
    fn stresses_with_a_unit_read_in_mpa_and_write_back_plain() {
        // NIST SP 811 (2008) B.8: 1 ksi = 6.894 757 E+06 Pa (seven digits),
        // 1 kgf/mm2 = 9.806 65 E+06 Pa (exact); 1 GPa = 1000 MPa by definition.
        let law: FlowLaw = serde_yaml::from_str(
            r#"{law: ludwik, sigma0_mpa: "10 kgf/mm2", k_mpa: 60 ksi, n: 0.3}"#,
        )
        .unwrap();
        let FlowLawSpec::Ludwik {
            sigma0_mpa, k_mpa, ..
        } = *law.spec()
        else {
            panic!("{law:?}")
        };
        assert!((sigma0_mpa - 98.0665).abs() < 1e-12, "{sigma0_mpa}");
        assert!((k_mpa - 413.685_42).abs() <= 0.5e-6 * 60.0, "{k_mpa}");
        let table: FlowLaw = serde_yaml::from_str(
            r#"{law: points, points: [[0, 100], [1, "0.2 GPa"]], beyond: flat}"#,
        )
        .unwrap();
        assert_eq!(
            table,
            FlowLaw::points(vec![[0.0, 100.0], [1.0, 200.0]], Beyond::Flat).unwrap()
        );
        // Written back (as `fit` emits a law), every stress is a plain number of MPa.
        let out = serde_yaml::to_string(&law).unwrap();
        assert!(!out.contains("ksi") && !out.contains('"'), "{out}");
        assert_eq!(serde_yaml::from_str::<FlowLaw>(&out).unwrap(), law);
    }

    #[test]
    fn a_bad_stress_names_its_key() {
        let e = serde_yaml::from_str::<FlowLaw>(r#"{law: swift, k_mpa: "9 ksq", eps0: 0, n: 0.2}"#)
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("`k_mpa` = \"9 ksq\" is not allowed: `ksq` is not a unit of a stress; allowed a number of MPa"), "{e}");
        let e = serde_yaml::from_str::<FlowLaw>(
            "{law: points, points: [[0, 1], [1, [2]]], beyond: flat}",
        )
        .unwrap_err()
        .to_string();
        assert!(
            e.starts_with(
                "`points[1] stress_mpa` = a list is not allowed: must be a number of MPa"
            ),
            "{e}"
        );
        // Validation still applies to a value read with a unit.
        let e = serde_yaml::from_str::<FlowLaw>(r#"{law: hollomon, k_mpa: "-5 ksi", n: 0.2}"#)
            .unwrap_err()
            .to_string();
        assert!(e.contains("`k_mpa` = -34.47"), "{e}");
    }

    #[test]
    fn tables_are_validated() {
        assert!(FlowLaw::points(vec![[0.1, 100.0], [1.0, 200.0]], Beyond::Flat).is_err());
        assert!(FlowLaw::points(vec![[0.0, 100.0], [0.0, 200.0]], Beyond::Flat).is_err());
        assert!(FlowLaw::points(vec![[0.0, 100.0]], Beyond::Flat).is_err());
        assert!(FlowLaw::points(vec![[0.0, 200.0], [1.0, 100.0]], Beyond::Slope).is_err());
    }

    #[test]
    fn strain_beyond_f64_is_an_overflow_error_not_infinity() {
        // (200/100)^(1/1e-300) overflows: a valid law, an unreachable-in-practice stress.
        let law = FlowLaw::hollomon(100.0, 1e-300).unwrap();
        assert!(matches!(
            law.strain_at_stress(200.0),
            Err(FlowError::Overflow { .. })
        ));
    }

    #[test]
    fn integral_that_overflows_is_an_overflow_error_not_infinity() {
        let law = FlowLaw::linear(1e300, 1e300).unwrap();
        assert!(matches!(
            law.mean_stress_mpa(0.0, 1e300),
            Err(FlowError::Overflow { .. })
        ));
        assert!(matches!(
            law.integral_mpa(0.0, 1e300),
            Err(FlowError::Overflow { .. })
        ));
    }
}
