//! Adaptive quadrature with honest diagnostics.
//!
//! A thin wrapper around the double-exponential (tanh-sinh) rule of the
//! `quadrature` crate (Takahasi & Mori 1974; port of J. D. Cook's code). That
//! crate silently replaces a non-finite integrand value by 0.0 and has no
//! "converged" flag, so this wrapper records the first non-finite value and
//! reports it, compares the crate's error estimate with the requested
//! tolerance and reports a miss as an error, and splits the interval at given
//! break points (kinks of a tabulated law) so that each piece is smooth.

use std::cell::Cell;

/// Why an integral could not be trusted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum QuadratureError {
    /// The integrand returned NaN or an infinity.
    #[error("the integrand is not finite ({value}) at {at}")]
    NonFinite {
        /// Abscissa of the first bad value.
        at: f64,
        /// The bad value.
        value: f64,
    },
    /// The error estimate stayed above the tolerance after the rule's last level.
    #[error("quadrature did not converge on [{a}, {b}]: error estimate {error_estimate:e} above tolerance {tolerance:e} after {evaluations} evaluations")]
    NotConverged {
        /// Lower limit.
        a: f64,
        /// Upper limit.
        b: f64,
        /// The crate's error estimate (absolute).
        error_estimate: f64,
        /// The absolute tolerance asked for.
        tolerance: f64,
        /// Integrand evaluations spent.
        evaluations: u32,
    },
    /// Each piece is finite but their sum is not.
    #[error("the integral over [{a}, {b}] overflows floating point")]
    Overflow {
        /// Lower limit.
        a: f64,
        /// Upper limit.
        b: f64,
    },
    /// A limit of integration is not finite.
    #[error("the limits of integration must be finite (got [{a}, {b}])")]
    BadLimits {
        /// Lower limit.
        a: f64,
        /// Upper limit.
        b: f64,
    },
}

/// A converged integral with its diagnostics.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Integral {
    /// The value of the integral.
    pub value: f64,
    /// The sum of the pieces' absolute error estimates.
    pub error_estimate: f64,
    /// Integrand evaluations over all pieces.
    pub evaluations: u32,
}

/// Integral of `f` over `[a, b]` to absolute tolerance `abs_tol`, split at the
/// `breaks` that lie strictly inside the interval (they need not be sorted).
///
/// The tolerance is shared among the pieces in proportion to their length.
/// `a == b` gives 0; `a > b` gives minus the integral over `[b, a]`.
pub fn integrate<F>(
    f: F,
    a: f64,
    b: f64,
    abs_tol: f64,
    breaks: &[f64],
) -> Result<Integral, QuadratureError>
where
    F: Fn(f64) -> f64,
{
    if !a.is_finite() || !b.is_finite() {
        return Err(QuadratureError::BadLimits { a, b });
    }
    if a == b {
        return Ok(Integral {
            value: 0.0,
            error_estimate: 0.0,
            evaluations: 0,
        });
    }
    let (lo, hi, sign) = if a < b { (a, b, 1.0) } else { (b, a, -1.0) };
    let tol = if abs_tol.is_finite() && abs_tol > 0.0 {
        abs_tol
    } else {
        f64::EPSILON * (hi - lo)
    };
    // Up to a few dozen inner break points: a schedule's table rarely holds more,
    // and a longer table simply integrates piece by piece in the loop below.
    let mut cuts: Vec<f64> = Vec::with_capacity(breaks.len() + 2);
    cuts.push(lo);
    cuts.extend(breaks.iter().copied().filter(|&x| x > lo && x < hi));
    cuts.push(hi);
    cuts.sort_by(|x, y| x.total_cmp(y));
    cuts.dedup();

    let mut total = Integral {
        value: 0.0,
        error_estimate: 0.0,
        evaluations: 0,
    };
    for w in cuts.windows(2) {
        let piece = integrate_piece(&f, w[0], w[1], tol * (w[1] - w[0]) / (hi - lo))?;
        total.value += piece.value;
        total.error_estimate += piece.error_estimate;
        total.evaluations += piece.evaluations;
    }
    if !total.value.is_finite() || !total.error_estimate.is_finite() {
        return Err(QuadratureError::Overflow { a, b });
    }
    total.value *= sign;
    Ok(total)
}

fn integrate_piece<F>(f: &F, a: f64, b: f64, tol: f64) -> Result<Integral, QuadratureError>
where
    F: Fn(f64) -> f64,
{
    let bad: Cell<Option<(f64, f64)>> = Cell::new(None);
    let out = quadrature::double_exponential::integrate(
        |x| {
            let y = f(x);
            if !y.is_finite() && bad.get().is_none() {
                bad.set(Some((x, y)));
            }
            y
        },
        a,
        b,
        tol,
    );
    if let Some((at, value)) = bad.get() {
        return Err(QuadratureError::NonFinite { at, value });
    }
    // A NaN error estimate is a miss too.
    if out.error_estimate.is_nan() || out.error_estimate > tol || !out.integral.is_finite() {
        return Err(QuadratureError::NotConverged {
            a,
            b,
            error_estimate: out.error_estimate,
            tolerance: tol,
            evaluations: out.num_function_evaluations,
        });
    }
    Ok(Integral {
        value: out.integral,
        error_estimate: out.error_estimate,
        evaluations: out.num_function_evaluations,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integrates_a_polynomial_exactly() {
        // integral of 3x^2 over [0, 2] = 8 (closed form)
        let r = integrate(|x| 3.0 * x * x, 0.0, 2.0, 1e-12, &[]).unwrap();
        assert!((r.value - 8.0).abs() < 1e-12);
    }

    #[test]
    fn reports_a_non_finite_integrand_instead_of_zeroing_it() {
        let r = integrate(
            |x| if x > 0.5 { f64::NAN } else { 1.0 },
            0.0,
            1.0,
            1e-10,
            &[],
        );
        assert!(matches!(r, Err(QuadratureError::NonFinite { .. })));
    }

    #[test]
    fn splits_at_a_kink() {
        // |x - 1/3| over [0, 1]: (1/3)^2/2 + (2/3)^2/2 = 5/18 (closed form)
        let f = |x: f64| (x - 1.0 / 3.0).abs();
        let r = integrate(f, 0.0, 1.0, 1e-13, &[1.0 / 3.0]).unwrap();
        assert!((r.value - 5.0 / 18.0).abs() < 1e-13);
    }

    #[test]
    fn reports_non_convergence() {
        // A jump the rule is not told about cannot reach 1e-15.
        let r = integrate(|x| if x < 0.3 { 0.0 } else { 1.0 }, 0.0, 1.0, 1e-15, &[]);
        assert!(matches!(r, Err(QuadratureError::NotConverged { .. })));
    }

    #[test]
    fn reversed_limits_change_the_sign() {
        let r = integrate(|x| x, 1.0, 0.0, 1e-12, &[]).unwrap();
        assert!((r.value + 0.5).abs() < 1e-12);
    }

    #[test]
    fn finite_pieces_whose_sum_overflows_are_an_error() {
        // Each quarter integrates to 5e307; the whole, 2e308, is beyond f64.
        let r = integrate(|_| 5e307, 0.0, 4.0, 1e295, &[1.0, 2.0, 3.0]);
        assert!(matches!(r, Err(QuadratureError::Overflow { .. })), "{r:?}");
    }
}
