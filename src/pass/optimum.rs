//! The optimum die semi-angle: Brent's minimisation (golden section with
//! parabolic interpolation; R. P. Brent, *Algorithms for Minimization without
//! Derivatives*, 1973, ch. 5) of a method's drawing stress over
//! [`OPTIMUM_SEARCH_MIN_DEG`, `OPTIMUM_SEARCH_MAX_DEG`].
//!
//! Every method's stress is unimodal in the angle over that range (friction
//! falls and shear work rises with the angle; `max`, the envelope of
//! unimodal curves, is unimodal too), so the whole range is one bracket and
//! no coarse scan is needed. Smooth curves take about 10 to 12 probes to
//! 1e-4 degree; a curve still falling at an end of the range (Sachs, whose
//! friction term alone depends on the angle) converges onto that end, which
//! is then probed itself.

use super::prepared::PreparedPass;
use super::{
    finite_or_overflow, Die, Method, OptimumAngle, PassError, OPTIMUM_SEARCH_MAX_DEG,
    OPTIMUM_SEARCH_MIN_DEG,
};

/// Absolute tolerance on the optimum angle, degrees.
pub(super) const ANGLE_TOLERANCE_DEG: f64 = 1e-4;

/// Within this of an end of the range the optimum counts as at the limit, degrees.
const AT_LIMIT_DEG: f64 = 2e-3;

impl PreparedPass<'_> {
    /// The semi-angle in [1, 20] degrees that minimises `method`'s drawing
    /// stress with `die`'s friction, shear factor, land and efficiency (its
    /// angle is ignored), or `None` for methods that do not depend on the
    /// angle (ideal, efficiency).
    pub fn optimum_semi_angle(
        &self,
        die: &Die,
        method: Method,
    ) -> Result<Option<OptimumAngle>, PassError> {
        die.validate()?;
        self.optimum_of(die, method)
    }

    /// [`PreparedPass::optimum_semi_angle`] with `die` already validated.
    /// Each method's stress is its own closure, so that the search inlines
    /// it rather than matching on the method at every probe.
    pub(super) fn optimum_of(
        &self,
        die: &Die,
        method: Method,
    ) -> Result<Option<OptimumAngle>, PassError> {
        let t = &self.die_terms(die);
        let found = match method {
            Method::Ideal | Method::Efficiency => return Ok(None),
            Method::Sachs => self.search(|a| self.stress(t, Method::Sachs, a)),
            Method::Siebel => self.search(|a| self.stress(t, Method::Siebel, a)),
            Method::Redundant => self.search(|a| self.stress(t, Method::Redundant, a)),
            Method::UpperBound => self.search(|a| Ok(self.upper_bound(t, a))),
            Method::Max => self.search(|a| self.stress(t, Method::Max, a)),
        };
        found.map(Some)
    }

    /// Brent's search of `stress` (MPa, of the angle in radians) over the
    /// range, then the end itself when the stress still falls there.
    #[inline(always)]
    fn search<F>(&self, stress: F) -> Result<OptimumAngle, PassError>
    where
        F: Fn(f64) -> Result<f64, PassError>,
    {
        let f = |deg: f64| finite_or_overflow("drawing stress", stress(deg.to_radians())?);
        let (lo, hi) = (OPTIMUM_SEARCH_MIN_DEG, OPTIMUM_SEARCH_MAX_DEG);
        let (mut deg, mut value, _) = brent_minimum(f, lo, hi, ANGLE_TOLERANCE_DEG)?;
        // A stress still falling at an end converges onto it: take the end itself.
        for end in [lo, hi] {
            if (deg - end).abs() < AT_LIMIT_DEG {
                let v = f(end)?;
                if v <= value {
                    (deg, value) = (end, v);
                }
            }
        }
        Ok(OptimumAngle {
            semi_angle_deg: deg,
            draw_stress_mpa: value,
            at_search_limit: deg - lo < AT_LIMIT_DEG || hi - deg < AT_LIMIT_DEG,
        })
    }
}

/// Brent's minimisation of a unimodal `f` on `[a, b]` to absolute tolerance
/// `tol`: returns the abscissa, the value there and the number of probes.
#[inline]
pub(crate) fn brent_minimum<F, E>(mut f: F, a: f64, b: f64, tol: f64) -> Result<(f64, f64, u32), E>
where
    F: FnMut(f64) -> Result<f64, E>,
{
    const GOLDEN: f64 = 0.381_966_011_250_105_1; // (3 - sqrt 5) / 2
    let (mut a, mut b) = (a, b);
    let mut x = a + GOLDEN * (b - a);
    let (mut w, mut v) = (x, x);
    let mut fx = f(x)?;
    let (mut fw, mut fv) = (fx, fx);
    let mut probes = 1;
    let (mut d, mut e) = (0.0f64, 0.0f64);
    for _ in 0..100 {
        let xm = 0.5 * (a + b);
        let tol1 = f64::EPSILON.sqrt() * x.abs() + tol / 3.0;
        let tol2 = 2.0 * tol1;
        if (x - xm).abs() <= tol2 - 0.5 * (b - a) {
            break;
        }
        let mut golden = true;
        if e.abs() > tol1 {
            // Parabola through x, w, v.
            let r = (x - w) * (fx - fv);
            let mut q = (x - v) * (fx - fw);
            let mut p = (x - v) * q - (x - w) * r;
            q = 2.0 * (q - r);
            if q > 0.0 {
                p = -p;
            }
            q = q.abs();
            let e_old = e;
            if p.abs() < (0.5 * q * e_old).abs() && p > q * (a - x) && p < q * (b - x) {
                e = d;
                d = p / q;
                let u = x + d;
                if u - a < tol2 || b - u < tol2 {
                    d = tol1.copysign(xm - x);
                }
                golden = false;
            }
        }
        if golden {
            e = if x >= xm { a - x } else { b - x };
            d = GOLDEN * e;
        }
        let u = if d.abs() >= tol1 {
            x + d
        } else {
            x + tol1.copysign(d)
        };
        let fu = f(u)?;
        probes += 1;
        if fu <= fx {
            if u >= x {
                a = x;
            } else {
                b = x;
            }
            (v, fv) = (w, fw);
            (w, fw) = (x, fx);
            (x, fx) = (u, fu);
        } else {
            if u < x {
                a = u;
            } else {
                b = u;
            }
            if fu <= fw || w == x {
                (v, fv) = (w, fw);
                (w, fw) = (u, fu);
            } else if fu <= fv || v == x || v == w {
                (v, fv) = (u, fu);
            }
        }
    }
    Ok((x, fx, probes))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn brent_finds_a_parabola_minimum_in_few_probes() {
        let (x, fx, probes) = brent_minimum(
            |x| Ok::<f64, PassError>((x - 7.3) * (x - 7.3) + 2.0),
            1.0,
            20.0,
            1e-4,
        )
        .unwrap();
        assert!((x - 7.3).abs() < 1e-4, "{x}");
        assert!((fx - 2.0).abs() < 1e-8);
        assert!(probes <= 8, "{probes}");
    }

    #[test]
    fn brent_needs_about_ten_probes_on_drawing_stress_curves() {
        // Issue 14: the former scan + golden section spent 28 probes a pass.
        use crate::{Die, DrawPass, FlowLaw, Settings};
        let law = FlowLaw::voce(80.0, 470.0, 0.8).unwrap();
        let pass = DrawPass {
            entry_diameter_mm: 8.0,
            exit_diameter_mm: 7.2,
            strain_before: 0.4,
            back_tension_mpa: 0.0,
            die: Die::new(6.0, 0.05).unwrap(),
        };
        let p = PreparedPass::new(&law, &pass, &Settings::default()).unwrap();
        let t = p.die_terms(&pass.die);
        for m in [
            Method::Siebel,
            Method::Redundant,
            Method::UpperBound,
            Method::Max,
        ] {
            let (_, _, probes) = brent_minimum(
                |deg: f64| p.stress(&t, m, deg.to_radians()),
                1.0,
                20.0,
                ANGLE_TOLERANCE_DEG,
            )
            .unwrap();
            assert!(probes <= 14, "{m}: {probes} probes");
        }
    }

    #[test]
    fn brent_converges_onto_the_end_of_a_falling_curve() {
        let (x, _, _) = brent_minimum(|x| Ok::<f64, PassError>(1.0 / x), 1.0, 20.0, 1e-4).unwrap();
        assert!(20.0 - x < 2e-3, "{x}");
    }
}
