//! The Sachs weighted integral `I(B) = int_0^eps sigma_f(eps_a + t) e^(-B(eps - t)) dt`
//! of one pass, split into an angle-independent part (prepared once per pass)
//! and a cheap evaluation for each `B = mu cot(alpha)`.
//!
//! Every law has an exact form:
//!
//! - perfectly plastic, linear hardening and Voce: closed forms in `B`;
//! - a `points` table: piecewise linear, so each piece `[t1, t2]` of length
//!   `L` gives `e^(-B(eps - t2)) [sigma(t1) g(L) + slope h(L)]` with
//!   `g(L) = (1 - e^(-BL))/B` and `h(L) = (L - g(L))/B`;
//! - the power laws (Hollomon `K e^n`, Ludwik `s0 + K e^n`, Swift
//!   `K (e0 + e)^n`), written as `K (c + t)^n` with `c` the strain offset
//!   (`eps_a`, or `eps_a + e0` for Swift) and `b = c + eps`: expanding
//!   `e^(Bs)` term by term,
//!   `int_c^b s^n e^(-B(b - s)) ds = e^(-z) sum_k z^k/k! d_k/(n + 1 + k)`,
//!   `z = B b`, `d_k = (b^(n+1+k) - c^(n+1+k)) / b^k`, built by the
//!   recurrence `d_(k+1) = d_k + (eps/b) c^(n+1) (c/b)^k` from
//!   `d_0 = b^(n+1) - c^(n+1)` (a Poisson-weighted sum of positive terms, so
//!   no cancellation). It is exact at `c = 0` too, where the integrand is
//!   singular (`t^n` at zero strain after an anneal), a case a fixed
//!   Gauss-Legendre rule would need special handling for. Only `d_0` and
//!   `c^(n+1)` need the law's power function, once per pass; each angle costs
//!   about `z + 8 sqrt(z) + 20` multiply-adds.
//!
//! The series is used for `z <= 600` (an optimum-angle search at 1 degree
//! with mu 0.5 reaches z = 29 per unit strain); beyond it, or for anything
//! not finite, the adaptive double-exponential rule of [`crate::quad`] is
//! used, as it is by [`integral_by_quadrature`], the independent check the
//! tests compare the fast path with (agreement within 1e-12 relative, on every law;
//! tests/core_fast_path.rs).

use crate::flow::{
    finite_or_overflow, power_difference, voce_integral, FlowError, FlowLaw, FlowLawSpec,
};
use crate::quad;

use super::PassError;

/// Largest `z = B b` the power series is used for; `e^-600` is still a
/// normal f64 and the series needs under 1000 terms there.
const SERIES_Z_MAX: f64 = 600.0;

/// Terms the series may take: beyond `z + 8 sqrt(z) + 40` at `z = 600`.
const SERIES_TERMS: usize = 1024;

/// `1/k` for `k < SERIES_TERMS` (index 0 unused), so that each term of the
/// series costs one division, not two.
static RECIPROCALS: [f64; SERIES_TERMS] = reciprocals();

const fn reciprocals() -> [f64; SERIES_TERMS] {
    let mut table = [0.0; SERIES_TERMS];
    let mut k = 1;
    while k < SERIES_TERMS {
        table[k] = 1.0 / k as f64;
        k += 1;
    }
    table
}

/// One linear piece of a tabulated law inside the pass, in pass strain `t`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Piece {
    t1: f64,
    t2: f64,
    stress1: f64,
    slope: f64,
}

/// The angle-independent part of the Sachs integral.
#[derive(Debug, Clone, PartialEq)]
pub(crate) enum SachsForm {
    PerfectlyPlastic {
        yield_mpa: f64,
    },
    Linear {
        /// Flow stress at entry, `Y + H eps_a`.
        entry_mpa: f64,
        hardening_mpa: f64,
    },
    Voce {
        saturation_mpa: f64,
        /// `(ss - s0) e^(-eps_a/ec)`.
        drop_mpa: f64,
        eps_c: f64,
        /// `e^(-eps/ec)`.
        pass_decay: f64,
    },
    Power {
        /// Additive constant (Ludwik s0; 0 otherwise).
        constant_mpa: f64,
        k_mpa: f64,
        n: f64,
        /// Strain offset c of the singular point (`s = c + t`).
        c: f64,
        /// `b = c + eps`.
        b: f64,
        /// `b^(n+1) - c^(n+1)`.
        d0: f64,
        /// `c^(n+1)`.
        c_n1: f64,
    },
    Table {
        pieces: Vec<Piece>,
    },
}

/// The flow stresses of a pass over `[eps_a, eps_a + eps]` and the
/// angle-independent part of its Sachs integral, computed together so that
/// a law's transcendental functions are evaluated once: for Voce,
/// `e^(-eps_a/ec)` serves the entry stress, the mean (through the integral)
/// and the Sachs form. Every figure is bit for bit what
/// [`FlowLaw::stress_mpa`], [`FlowLaw::mean_stress_mpa`] and [`SachsForm::new`]
/// give apart (a unit test holds it).
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct FlowParts {
    /// Mean flow stress over the pass, MPa.
    pub mean_mpa: f64,
    /// Flow stress at entry, MPa.
    pub entry_mpa: f64,
    /// Flow stress at exit, MPa.
    pub exit_mpa: f64,
    /// The angle-independent part of the Sachs integral.
    pub form: SachsForm,
}

impl FlowParts {
    /// The parts for `law` over `[eps_a, eps_a + eps]`, `eps_a` at least 0.
    pub(crate) fn new(law: &FlowLaw, eps_a: f64, eps: f64) -> Result<Self, FlowError> {
        let e2 = eps_a + eps;
        if let FlowLawSpec::Voce {
            sigma0_mpa,
            saturation_mpa,
            eps_c,
        } = *law.spec()
        {
            if e2 > eps_a && eps_a >= 0.0 && e2.is_finite() {
                // The same expressions as FlowLaw::stress_mpa, integral_mpa
                // and SachsForm::new, with e^(-eps_a/ec) taken once.
                let e = eps_a.max(0.0);
                let entry_decay = (-e / eps_c).exp();
                let d = e2 - eps_a;
                let integral = voce_integral(saturation_mpa, sigma0_mpa, eps_c, entry_decay, d);
                let integral = finite_or_overflow("flow-stress integral", integral)?;
                let mean = finite_or_overflow("mean flow stress", integral / d)?;
                return Ok(FlowParts {
                    mean_mpa: mean,
                    entry_mpa: saturation_mpa - (saturation_mpa - sigma0_mpa) * entry_decay,
                    exit_mpa: law.stress_mpa(e2),
                    form: SachsForm::Voce {
                        saturation_mpa,
                        drop_mpa: (saturation_mpa - sigma0_mpa) * entry_decay,
                        eps_c,
                        pass_decay: (-eps / eps_c).exp(),
                    },
                });
            }
        }
        Ok(FlowParts {
            mean_mpa: law.mean_stress_mpa(eps_a, e2)?,
            entry_mpa: law.stress_mpa(eps_a),
            exit_mpa: law.stress_mpa(e2),
            form: SachsForm::new(law, eps_a, eps),
        })
    }
}

impl SachsForm {
    /// The angle-independent part for `law` over `[eps_a, eps_a + eps]`.
    pub(crate) fn new(law: &FlowLaw, eps_a: f64, eps: f64) -> Self {
        let power = |constant_mpa: f64, k_mpa: f64, n: f64, c: f64| {
            let b = c + eps;
            SachsForm::Power {
                constant_mpa,
                k_mpa,
                n,
                c,
                b,
                d0: power_difference(c, b, n),
                c_n1: if c > 0.0 { c.powf(n + 1.0) } else { 0.0 },
            }
        };
        match *law.spec() {
            FlowLawSpec::PerfectlyPlastic { yield_mpa } => {
                SachsForm::PerfectlyPlastic { yield_mpa }
            }
            FlowLawSpec::Linear {
                yield_mpa,
                hardening_modulus_mpa,
            } => SachsForm::Linear {
                entry_mpa: yield_mpa + hardening_modulus_mpa * eps_a,
                hardening_mpa: hardening_modulus_mpa,
            },
            FlowLawSpec::Voce {
                sigma0_mpa,
                saturation_mpa,
                eps_c,
            } => SachsForm::Voce {
                saturation_mpa,
                drop_mpa: (saturation_mpa - sigma0_mpa) * (-eps_a / eps_c).exp(),
                eps_c,
                pass_decay: (-eps / eps_c).exp(),
            },
            FlowLawSpec::Hollomon { k_mpa, n } => power(0.0, k_mpa, n, eps_a),
            FlowLawSpec::Ludwik {
                sigma0_mpa,
                k_mpa,
                n,
            } => power(sigma0_mpa, k_mpa, n, eps_a),
            FlowLawSpec::Swift { k_mpa, eps0, n } => power(0.0, k_mpa, n, eps0 + eps_a),
            FlowLawSpec::Points { .. } => {
                let mut cuts = vec![0.0];
                cuts.extend(
                    law.break_strains()
                        .iter()
                        .map(|s| s - eps_a)
                        .filter(|&t| t > 0.0 && t < eps),
                );
                cuts.push(eps);
                let pieces = cuts
                    .windows(2)
                    .map(|w| {
                        let (t1, t2) = (w[0], w[1]);
                        let s1 = law.stress_mpa(eps_a + t1);
                        let s2 = law.stress_mpa(eps_a + t2);
                        Piece {
                            t1,
                            t2,
                            stress1: s1,
                            slope: (s2 - s1) / (t2 - t1),
                        }
                    })
                    .collect();
                SachsForm::Table { pieces }
            }
        }
    }

    /// `I(B)` for pass strain `eps` (the one the form was prepared with) and
    /// `decay = e^(-B eps)`, or `None` where the fast path does not apply
    /// (the caller falls back to quadrature).
    pub(crate) fn integral(&self, b: f64, eps: f64, decay: f64) -> Option<f64> {
        // g = int_0^eps e^(-B(eps-t)) dt = (1 - e^(-B eps)) / B
        let g = weight_integral(b, eps);
        let value = match self {
            SachsForm::PerfectlyPlastic { yield_mpa } => yield_mpa * g,
            SachsForm::Linear {
                entry_mpa,
                hardening_mpa,
            } => entry_mpa * g + hardening_mpa * ramp_integral(b, eps, g),
            SachsForm::Voce {
                saturation_mpa,
                drop_mpa,
                eps_c,
                pass_decay,
            } => {
                // int_0^eps e^(-t/ec) e^(-B(eps-t)) dt = (e^(-eps/ec) - e^(-B eps)) / x, x = B - 1/ec
                let x = b - 1.0 / eps_c;
                let k = if (x * eps).abs() < 0.5 {
                    let series = if x == 0.0 {
                        eps
                    } else {
                        (x * eps).exp_m1() / x
                    };
                    decay * series
                } else {
                    (pass_decay - decay) / x
                };
                saturation_mpa * g - drop_mpa * k
            }
            SachsForm::Power {
                constant_mpa,
                k_mpa,
                n,
                c,
                b: upper,
                d0,
                c_n1,
            } => {
                let z = b * upper;
                if z.is_nan() || z > SERIES_Z_MAX {
                    return None;
                }
                constant_mpa * g + k_mpa * power_series(z, *n, *c, *upper, eps, *d0, *c_n1)
            }
            SachsForm::Table { pieces } => pieces
                .iter()
                .map(|p| {
                    let len = p.t2 - p.t1;
                    let gl = weight_integral(b, len);
                    (-b * (eps - p.t2)).exp()
                        * (p.stress1 * gl + p.slope * ramp_integral(b, len, gl))
                })
                .sum(),
        };
        value.is_finite().then_some(value)
    }
}

/// `g = int_0^L e^(-B(L-t)) dt = (1 - e^(-BL))/B`, `L` when `B L = 0`.
#[inline]
fn weight_integral(b: f64, len: f64) -> f64 {
    if b * len > 0.0 {
        -(-b * len).exp_m1() / b
    } else {
        len
    }
}

/// `h = int_0^L t e^(-B(L-t)) dt = (L - g)/B`, by its series for small `B L`.
#[inline]
fn ramp_integral(b: f64, len: f64, g: f64) -> f64 {
    let x = b * len;
    if x < 1e-4 {
        len * len * (0.5 - x / 6.0 + x * x / 24.0)
    } else {
        (len - g) / b
    }
}

/// `e^(-z) sum_k z^k/k! d_k/(n+1+k)` (see the module documentation).
fn power_series(z: f64, n: f64, c: f64, b: f64, eps: f64, d0: f64, c_n1: f64) -> f64 {
    let ratio = c / b;
    let step = eps / b;
    let mut p = (-z).exp(); // Poisson weight e^-z z^k / k!
    let mut d = d0;
    let mut q = c_n1;
    let mut sum = 0.0;
    let mut k = 0.0f64;
    let mut i = 0usize;
    loop {
        sum += p * d / (n + 1.0 + k);
        // Next term's pieces.
        d += step * q;
        q *= ratio;
        k += 1.0;
        i += 1;
        if i >= SERIES_TERMS {
            break;
        }
        p *= z * RECIPROCALS[i];
        // Past the Poisson peak the weights fall at least geometrically by
        // r = z/(k+1) < 1, and d_k <= b^(n+1) = d0 + c^(n+1): the tail is
        // under the next term's bound over (1 - r).
        if k > z {
            let r = z / (k + 1.0);
            if p * (d0 + c_n1) / (n + 1.0 + k) <= 1e-17 * sum * (1.0 - r) {
                break;
            }
        }
        if p == 0.0 {
            break;
        }
    }
    sum
}

/// `I(B)` by the adaptive double-exponential rule, split at the table's
/// kinks, to `1e-11` of `sigma_f(exit) eps` (the reference path).
pub(crate) fn integral_by_quadrature(
    law: &FlowLaw,
    eps_a: f64,
    eps: f64,
    b: f64,
) -> Result<f64, PassError> {
    let breaks: Vec<f64> = law.break_strains().iter().map(|s| s - eps_a).collect();
    let scale = law.stress_mpa(eps_a + eps).max(1.0) * eps;
    Ok(quad::integrate(
        |t| law.stress_mpa(eps_a + t) * (-b * (eps - t)).exp(),
        0.0,
        eps,
        1e-11 * scale,
        &breaks,
    )?
    .value)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn voce_parts_are_bit_for_bit_the_separate_figures() {
        // The shared-exponential path must not move a single bit of what
        // stress_mpa, mean_stress_mpa and SachsForm::new give one by one.
        for law in [
            FlowLaw::voce(80.0, 470.0, 0.8).unwrap(),
            FlowLaw::voce(300.0, 310.0, 0.01).unwrap(),
            FlowLaw::voce(1e-3, 2e5, 30.0).unwrap(),
        ] {
            for ea in [0.0, 1e-9, 0.02, 0.3, 1.7, 6.0, 40.0] {
                for eps in [1e-12, 1e-6, 0.01, 0.2, 0.4, 1.4, 3.0] {
                    let parts = FlowParts::new(&law, ea, eps).unwrap();
                    assert_eq!(parts.mean_mpa, law.mean_stress_mpa(ea, ea + eps).unwrap());
                    assert_eq!(parts.entry_mpa, law.stress_mpa(ea));
                    assert_eq!(parts.exit_mpa, law.stress_mpa(ea + eps));
                    assert_eq!(parts.form, SachsForm::new(&law, ea, eps));
                }
            }
        }
    }
}
