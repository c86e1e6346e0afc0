//! Hollomon, Ludwik, Swift and Voce by Levenberg-Marquardt on the stress
//! residuals, each from its own start (log-log lines, a scan of Voce's ec),
//! with the covariance carried back to the natural parameters.

use super::super::solver::{self, Model, Points, Stride};
use super::linear::weighted_line;
use super::{finish, FitLaw, LawFit};

fn logistic(t: f64) -> f64 {
    1.0 / (1.0 + (-t).exp())
}

fn logit(n: f64) -> f64 {
    let n = n.clamp(1e-6, 1.0 - 1e-6);
    (n / (1.0 - n)).ln()
}

/// Covariance in natural parameters `theta(t)` from `J^T W J` in `t`:
/// `D s^2 (J^T W J)^-1 D^T`, `D = d theta / d t`, `s^2 = SSR / (W - N)`.
pub(super) fn natural_covariance<const N: usize>(
    a: [[f64; N]; N],
    ssr: f64,
    weight: f64,
    d: [[f64; N]; N],
) -> Option<Vec<Vec<f64>>> {
    let inv = solver::inverse(a)?;
    let s2 = ssr / (weight - N as f64);
    let mut out = vec![vec![0.0; N]; N];
    for i in 0..N {
        for j in 0..N {
            let mut v = 0.0;
            for k in 0..N {
                for l in 0..N {
                    v += d[i][k] * inv[k][l] * d[j][l];
                }
            }
            out[i][j] = s2 * v;
        }
    }
    out.iter().flatten().all(|v| v.is_finite()).then_some(out)
}

pub(super) fn diag<const N: usize>(v: [f64; N]) -> [[f64; N]; N] {
    let mut d = [[0.0; N]; N];
    for i in 0..N {
        d[i][i] = v[i];
    }
    d
}

/// The start among `starts` with the lowest SSR on the stride `sp` (the
/// first on a tie), `None` when none has a finite SSR.
fn best_start<const N: usize, M: Model<N>>(
    model: &M,
    starts: impl Iterator<Item = [f64; N]>,
    sp: &Points<'_>,
) -> Option<[f64; N]> {
    let mut start = None;
    let mut best = f64::INFINITY;
    for t in starts {
        let s = ssr_at(model, &t, sp);
        if s < best {
            best = s;
            start = Some(t);
        }
    }
    start
}

/// The [`LawFit`] of a solved law: its natural parameters `values`, the
/// covariance carried back with `d = d theta / d t`, and the solver's figures.
fn finish_solved<const N: usize>(
    law: FitLaw,
    names: &[&'static str; N],
    values: [f64; N],
    d: [[f64; N]; N],
    out: &solver::Outcome<N>,
    p: &Points<'_>,
) -> LawFit {
    let cov = natural_covariance(out.a, out.ssr, p.weight(), d);
    finish(
        law,
        names,
        &values,
        cov,
        out.ssr,
        p,
        out.converged,
        out.iterations,
    )
}

struct Hollomon;
struct Ludwik;
struct Swift;
struct Voce;

/// The points with `ln x` in place of `x`, for Hollomon and Ludwik, in
/// which the strain enters only through its logarithm: the logarithm is
/// taken once per point, not once per point and solver pass (the same
/// values, so the same sums bit for bit).
struct LogStrain {
    /// `ln x` of every point.
    lx: Vec<f64>,
    /// The extra points with `ln x`.
    extra: Vec<(f64, f64, f64)>,
}

impl LogStrain {
    fn of(p: &Points<'_>) -> Self {
        LogStrain {
            lx: p.x.iter().map(|x| x.ln()).collect(),
            extra: p.extra.iter().map(|&(x, y, w)| (x.ln(), y, w)).collect(),
        }
    }

    /// `p` with `ln x` for `x`.
    fn points<'a>(&'a self, p: &Points<'a>) -> Points<'a> {
        Points {
            x: &self.lx,
            y: p.y,
            extra: &self.extra,
        }
    }
}

// Hollomon and Ludwik take `ln x` for `x` (see LogStrain).
impl Model<2> for Hollomon {
    // t = (ln K, logit n); at = (ln K, n)
    type At = (f64, f64);
    fn at(&self, t: &[f64; 2]) -> (f64, f64) {
        (t[0], logistic(t[1]))
    }
    #[inline]
    fn eval(&self, &(ln_k, n): &(f64, f64), lx: f64) -> (f64, [f64; 2]) {
        let f = (ln_k + n * lx).exp();
        (f, [f, f * lx * n * (1.0 - n)])
    }
}

impl Model<3> for Ludwik {
    // t = (ln s0, ln K, logit n); at = (s0, ln K, n)
    type At = (f64, f64, f64);
    fn at(&self, t: &[f64; 3]) -> (f64, f64, f64) {
        (t[0].exp(), t[1], logistic(t[2]))
    }
    #[inline]
    fn eval(&self, &(s0, ln_k, n): &(f64, f64, f64), lx: f64) -> (f64, [f64; 3]) {
        let p = (ln_k + n * lx).exp();
        (s0 + p, [s0, p, p * lx * n * (1.0 - n)])
    }
}

impl Model<3> for Swift {
    // t = (ln K, ln e0, logit n); at = (ln K, e0, n)
    type At = (f64, f64, f64);
    fn at(&self, t: &[f64; 3]) -> (f64, f64, f64) {
        (t[0], t[1].exp(), logistic(t[2]))
    }
    #[inline]
    fn eval(&self, &(ln_k, e0, n): &(f64, f64, f64), x: f64) -> (f64, [f64; 3]) {
        let u = e0 + x;
        let lu = u.ln();
        let f = (ln_k + n * lu).exp();
        (f, [f, f * n / u * e0, f * lu * n * (1.0 - n)])
    }
}

impl Model<3> for Voce {
    // t = (ln s0, ln (ss - s0), ln ec); at = (s0, ss - s0, ec)
    type At = (f64, f64, f64);
    fn at(&self, t: &[f64; 3]) -> (f64, f64, f64) {
        (t[0].exp(), t[1].exp(), t[2].exp())
    }
    #[inline]
    fn eval(&self, &(s0, d, ec): &(f64, f64, f64), x: f64) -> (f64, [f64; 3]) {
        let ex = (-x / ec).exp();
        (s0 + d * (1.0 - ex), [s0, d * (1.0 - ex), -d * ex * x / ec])
    }
}

/// Weighted SSR of a model at `t`, `inf` when not finite.
fn ssr_at<const N: usize, M: Model<N>>(model: &M, t: &[f64; N], p: &Points<'_>) -> f64 {
    let at = model.at(t);
    let s: f64 = p
        .iter()
        .map(|(x, y, w)| w * (y - model.eval(&at, x).0).powi(2))
        .sum();
    if s.is_finite() {
        s
    } else {
        f64::INFINITY
    }
}

/// Least-squares line of `ln y` on `ln u(x)` over the points: `(a, n)`.
fn log_line(p: &Points<'_>, u: impl Fn(f64) -> f64, shift: f64) -> Option<(f64, f64)> {
    let pts = p.iter().filter_map(|(x, y, w)| {
        let (ux, yy) = (u(x), y - shift);
        (ux > 0.0 && yy > 0.0).then(|| (ux.ln(), yy.ln(), w))
    });
    let v: Vec<(f64, f64, f64)> = pts.collect();
    weighted_line(v.iter().copied()).map(|(a, b, ..)| (a, b))
}

/// Hollomon's log-space start: `ln sigma = ln K + n ln eps` by least
/// squares on the stride.
pub fn hollomon_log_space(strain: &[f64], stress_mpa: &[f64]) -> Option<(f64, f64)> {
    let p = Points {
        x: strain,
        y: stress_mpa,
        extra: &[],
    };
    log_line(&p, |x| x, 0.0).map(|(a, n)| (a.exp(), n))
}

pub(super) fn fit_hollomon(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let (a, n) = log_line(&sp, |x| x, 0.0).unwrap_or((sp.y[0].max(1.0).ln(), 0.3));
    let logs = LogStrain::of(p);
    let out = solver::levenberg_marquardt(&Hollomon, [a, logit(n)], &logs.points(p));
    let (k, n) = (out.t[0].exp(), logistic(out.t[1]));
    let d = diag([k, n * (1.0 - n)]);
    finish_solved(FitLaw::Hollomon, &["k_mpa", "n"], [k, n], d, &out, p)
}

pub(super) fn fit_ludwik(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let ymin = sp.iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
    let starts = [0.1, 0.3, 0.5, 0.7, 0.9].into_iter().filter_map(|frac| {
        let s0 = frac * ymin;
        log_line(&sp, |x| x, s0).map(|(a, n)| [s0.ln(), a, logit(n)])
    });
    let logs = LogStrain::of(p);
    let lp = logs.points(p);
    let log_stride = Stride::of(&lp);
    let start = best_start(&Ludwik, starts, &log_stride.points());
    let start = start.unwrap_or([(0.5 * ymin).ln(), ymin.ln(), 0.0]);
    let out = solver::levenberg_marquardt(&Ludwik, start, &lp);
    let (s0, k, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let names = ["sigma0_mpa", "k_mpa", "n"];
    let d = diag([s0, k, n * (1.0 - n)]);
    finish_solved(FitLaw::Ludwik, &names, [s0, k, n], d, &out, p)
}

pub(super) fn fit_swift(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let xmin = sp.iter().map(|q| q.0).fold(f64::INFINITY, f64::min);
    let e0s = [0.5 * xmin, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1];
    let starts = e0s
        .into_iter()
        .filter_map(|e0| log_line(&sp, |x| e0 + x, 0.0).map(|(a, n)| [a, e0.ln(), logit(n)]));
    let ymax = sp.iter().map(|q| q.1).fold(0.0, f64::max);
    let start = best_start(&Swift, starts, &sp).unwrap_or([ymax.ln(), (0.01f64).ln(), 0.0]);
    let out = solver::levenberg_marquardt(&Swift, start, p);
    let (k, e0, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let d = diag([k, e0, n * (1.0 - n)]);
    finish_solved(
        FitLaw::Swift,
        &["k_mpa", "eps0", "n"],
        [k, e0, n],
        d,
        &out,
        p,
    )
}

pub(super) fn fit_voce(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let xmax = sp.iter().map(|q| q.0).fold(0.0, f64::max).max(1e-6);
    let ymin = sp.iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
    let ymax = sp.iter().map(|q| q.1).fold(0.0, f64::max);
    let fallback = [
        ymin.max(1e-3).ln(),
        (ymax - ymin).max(1e-3).ln(),
        (xmax / 3.0).ln(),
    ];
    // ec from xmax/50 to 10 xmax, 40 steps; s0 and ss - s0 by linear least squares.
    let starts = (0..40).filter_map(|i| {
        let ec = xmax / 50.0 * (500f64).powf(i as f64 / 39.0);
        let z = sp.iter().map(|(x, y, w)| (1.0 - (-x / ec).exp(), y, w));
        let z: Vec<(f64, f64, f64)> = z.collect();
        let (s0, d, ..) = weighted_line(z.iter().copied())?;
        (s0 > 0.0 && d > 0.0).then(|| [s0.ln(), d.ln(), ec.ln()])
    });
    let start = best_start(&Voce, starts, &sp).unwrap_or(fallback);
    let out = solver::levenberg_marquardt(&Voce, start, p);
    let (s0, d, ec) = (out.t[0].exp(), out.t[1].exp(), out.t[2].exp());
    let dm = [[s0, 0.0, 0.0], [s0, d, 0.0], [0.0, 0.0, ec]];
    let names = ["sigma0_mpa", "saturation_mpa", "eps_c"];
    finish_solved(FitLaw::Voce, &names, [s0, s0 + d, ec], dm, &out, p)
}
