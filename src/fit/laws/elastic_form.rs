//! The total-strain forms (elastic-perfectly-plastic, elastic-linear) with
//! the elastic line at the measured modulus, by exact least squares over the
//! elastic-plastic split.

use super::super::solver::Points;
use super::super::FitError;
use super::nonlinear::{diag, natural_covariance};
use super::{finish, Covariance, FitLaw, LawFit};
use crate::param;

/// Running sums for a least-squares line `y = a + b x`.
#[derive(Debug, Default, Clone, Copy)]
pub(crate) struct LineSums {
    pub m: f64,
    pub sx: f64,
    pub sy: f64,
    pub sxx: f64,
    pub sxy: f64,
    pub syy: f64,
}

impl LineSums {
    pub fn add(&mut self, x: f64, y: f64) {
        self.m += 1.0;
        self.sx += x;
        self.sy += y;
        self.sxx += x * x;
        self.sxy += x * y;
        self.syy += y * y;
    }
    pub fn sub(&self, o: &LineSums) -> LineSums {
        LineSums {
            m: self.m - o.m,
            sx: self.sx - o.sx,
            sy: self.sy - o.sy,
            sxx: self.sxx - o.sxx,
            sxy: self.sxy - o.sxy,
            syy: self.syy - o.syy,
        }
    }
    /// `(a, b)` of the least-squares line, `None` when x does not vary.
    pub fn line(&self) -> Option<(f64, f64)> {
        let dxx = self.sxx - self.sx * self.sx / self.m;
        if self.m < 2.0 || dxx <= 0.0 || !dxx.is_finite() {
            return None;
        }
        let dxy = self.sxy - self.sx * self.sy / self.m;
        let b = dxy / dxx;
        let a = (self.sy - b * self.sx) / self.m;
        Some((a, b))
    }
}

/// Fits a total-strain form to total true strain `strain` (increasing) and
/// true stress `stress_mpa` (MPa) with the elastic line held at
/// `youngs_modulus_gpa`:
///
/// - elastic-perfectly-plastic `sigma = min(E eps, Y)`;
/// - elastic-linear `sigma = E eps` up to `eps = Y/E`, then
///   `Y + Ht (eps - Y/E)` with tangent modulus `Ht`, reported as the plastic
///   hardening modulus `H = E Ht / (E - Ht)` so that it reads as a `linear`
///   law `Y + H eps_p`.
///
/// Exact least squares: for each split of the points into an elastic and a
/// plastic part the plastic part is solved in closed form (running sums,
/// no per-point storage) and the split whose breakpoint lies between its two
/// points with the lowest SSR is kept. Standard errors as `s^2 (J^T J)^-1`
/// over all points.
pub fn fit_elastic_form(
    law: FitLaw,
    strain: &[f64],
    stress_mpa: &[f64],
    youngs_modulus_gpa: f64,
) -> Result<LawFit, FitError> {
    let e = param::positive("youngs_modulus_gpa", youngs_modulus_gpa)? * 1000.0;
    super::super::same_length("stress", stress_mpa, "strain", strain)?;
    for (i, (&a, &b)) in strain.iter().zip(stress_mpa).enumerate() {
        for (field, value) in [("strain", a), ("stress", b)] {
            if !value.is_finite() {
                return Err(FitError::NotFinite {
                    point: i + 1,
                    field,
                    value,
                });
            }
        }
    }
    let m = strain.len();
    if m < 4 {
        return Err(FitError::TooFewForLaw {
            law: law.name(),
            found: m,
            needed: 4,
        });
    }
    let (x, y) = (strain, stress_mpa);
    let mut total = LineSums::default();
    for i in 0..m {
        total.add(x[i], y[i]);
    }
    let mut head = LineSums::default();
    let mut el = 0.0; // elastic SSR of points 0..k
    let mut best: Option<(f64, f64, f64)> = None; // (ssr, Y, Ht)
    for k in 0..m - 1 {
        // points 0..k elastic, k..m plastic
        if k > 0 {
            head.add(x[k - 1], y[k - 1]);
            let r = y[k - 1] - e * x[k - 1];
            el += r * r;
        }
        let tail = total.sub(&head);
        let lo = if k == 0 { f64::NEG_INFINITY } else { x[k - 1] };
        let hi = x[k];
        let (yld, ht, ssr_tail) = match law {
            FitLaw::ElasticPerfectlyPlastic => {
                let yv = tail.sy / tail.m;
                (yv, 0.0, (tail.syy - tail.sy * tail.sy / tail.m).max(0.0))
            }
            _ => {
                if tail.m < 2.0 {
                    continue;
                }
                let Some((a, b)) = tail.line() else { continue };
                if b >= e {
                    continue;
                }
                let dxx = tail.sxx - tail.sx * tail.sx / tail.m;
                let dxy = tail.sxy - tail.sx * tail.sy / tail.m;
                let dyy = tail.syy - tail.sy * tail.sy / tail.m;
                let ssr = (dyy - dxy * dxy / dxx).max(0.0);
                (e * a / (e - b), b, ssr)
            }
        };
        let brk = yld / e;
        if !(brk >= lo && brk <= hi) {
            continue;
        }
        let ssr = el + ssr_tail;
        if best.is_none_or(|(s, ..)| ssr < s) {
            best = Some((ssr, yld, ht));
        }
    }
    let (converged, yld, ht) = match best {
        Some((_, yv, h)) => (true, yv, h),
        None => (false, f64::NAN, f64::NAN),
    };
    let model = |v: f64| {
        if e * v <= yld {
            e * v
        } else {
            yld + ht * (v - yld / e)
        }
    };
    let ssr: f64 = (0..m).map(|i| (y[i] - model(x[i])).powi(2)).sum();
    let p = Points { x, y, extra: &[] };
    let plastic = || x.iter().filter(|&&v| e * v > yld);
    let (names, values, cov): (&[&'static str], Vec<f64>, Covariance) = match law {
        FitLaw::ElasticPerfectlyPlastic => {
            let mp = plastic().count() as f64;
            let var = ssr / (m as f64 - 1.0) / mp;
            (&["yield_mpa"], vec![yld], Some(vec![vec![var]]))
        }
        _ => {
            let h = e * ht / (e - ht);
            // d f / d Y = 1 - Ht/E, d f / d H = (eps - Y/E) dHt/dH, dHt/dH = E^2/(E+H)^2
            let dht = e * e / ((e + h) * (e + h));
            let mut a = [[0.0; 2]; 2];
            for &v in plastic() {
                let j = [1.0 - ht / e, (v - yld / e) * dht];
                for r in 0..2 {
                    for c in 0..2 {
                        a[r][c] += j[r] * j[c];
                    }
                }
            }
            let cov = natural_covariance(a, ssr, m as f64, diag([1.0, 1.0]));
            (&["yield_mpa", "hardening_modulus_mpa"], vec![yld, h], cov)
        }
    };
    Ok(finish(law, names, &values, cov, ssr, &p, converged, 0))
}
