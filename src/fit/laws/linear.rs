//! The closed-form fits: perfectly plastic (the weighted mean) and linear
//! hardening (the weighted least-squares line).

use super::super::solver::Points;
use super::{finish, FitLaw, LawFit};

pub(super) fn fit_constant(p: &Points<'_>) -> LawFit {
    let w = p.weight();
    let mean = p.iter().map(|(_, y, wi)| wi * y).sum::<f64>() / w;
    let ssr: f64 = p.iter().map(|(_, y, wi)| wi * (y - mean).powi(2)).sum();
    let var = ssr / (w - 1.0) / w;
    finish(
        FitLaw::PerfectlyPlastic,
        &["yield_mpa"],
        &[mean],
        Some(vec![vec![var]]),
        ssr,
        p,
        true,
        0,
    )
}

/// Weighted least-squares line `y = a + b x` with its covariance and SSR:
/// `(a, b, [[var a, cov], [cov, var b]], ssr)`.
pub(super) fn weighted_line(
    pts: impl Iterator<Item = (f64, f64, f64)> + Clone,
) -> Option<(f64, f64, [[f64; 2]; 2], f64)> {
    let (mut sw, mut sx, mut sy) = (0.0, 0.0, 0.0);
    for (x, y, w) in pts.clone() {
        sw += w;
        sx += w * x;
        sy += w * y;
    }
    let (mx, my) = (sx / sw, sy / sw);
    let (mut sxx, mut sxy) = (0.0, 0.0);
    for (x, y, w) in pts.clone() {
        sxx += w * (x - mx) * (x - mx);
        sxy += w * (x - mx) * (y - my);
    }
    if sxx <= 0.0 || !sxx.is_finite() {
        return None;
    }
    let b = sxy / sxx;
    let a = my - b * mx;
    let ssr: f64 = pts.map(|(x, y, w)| w * (y - a - b * x).powi(2)).sum();
    let s2 = if sw > 2.0 { ssr / (sw - 2.0) } else { f64::NAN };
    let var_b = s2 / sxx;
    let var_a = s2 * (1.0 / sw + mx * mx / sxx);
    let cov = -mx * var_b;
    Some((a, b, [[var_a, cov], [cov, var_b]], ssr))
}

pub(super) fn fit_linear(p: &Points<'_>) -> LawFit {
    match weighted_line(p.iter()) {
        Some((a, b, c, ssr)) => finish(
            FitLaw::Linear,
            &["yield_mpa", "hardening_modulus_mpa"],
            &[a, b],
            Some(c.iter().map(|r| r.to_vec()).collect()),
            ssr,
            p,
            true,
            0,
        ),
        None => finish(
            FitLaw::Linear,
            &["yield_mpa", "hardening_modulus_mpa"],
            &[f64::NAN, f64::NAN],
            None,
            f64::NAN,
            p,
            false,
            0,
        ),
    }
}
