//! The least-squares solver: Levenberg-Marquardt for laws of two or three
//! parameters (Marquardt, SIAM J. Appl. Math. 11 (1963) 431; from memory),
//! on weighted points, with the normal matrix kept for the covariance
//! `s^2 (J^T W J)^-1`.
//!
//! Speed (issue 14): the iteration runs first on a stride of the record (at
//! most [`STRIDE_POINTS`] points), then finishes on every point from there,
//! so that a 100,000-point record costs a handful of passes, not hundreds.

/// Most Levenberg-Marquardt iterations before a fit is reported as not
/// converged (a choice of this tool).
pub const MAX_ITERATIONS: usize = 200;

/// Converged when the Gauss-Newton step predicts an SSR drop below this
/// fraction of SSR: the parameters are then within `se sqrt(1e-12 m)` of
/// the minimum (`se` their standard error, `m` points): a thousandth of a
/// standard error for 100,000 points, and on the demo records within 1e-6
/// of SciPy's curve_fit (tests/fit_scipy.rs).
pub const PREDICTED_DROP: f64 = 1e-12;

/// Points of the stride a fit iterates on before it finishes on the whole
/// record (a choice of this tool, issue 14; see the module documentation).
pub const STRIDE_POINTS: usize = 2000;

/// The points of one fit: the record's points (weight 1) and extra weighted
/// points (the drawn-wire strengths), as `(x, y, weight)`.
#[derive(Debug, Clone, Copy)]
pub struct Points<'a> {
    /// Abscissa (true plastic strain), one per record point.
    pub x: &'a [f64],
    /// Ordinate (true stress, MPa), one per record point.
    pub y: &'a [f64],
    /// Extra points `(x, y, weight)`.
    pub extra: &'a [(f64, f64, f64)],
}

impl<'a> Points<'a> {
    /// Every point as `(x, y, weight)`.
    pub fn iter(&self) -> impl Iterator<Item = (f64, f64, f64)> + Clone + 'a {
        let (x, y, extra) = (self.x, self.y, self.extra);
        x.iter()
            .zip(y)
            .map(|(&a, &b)| (a, b, 1.0))
            .chain(extra.iter().copied())
    }

    /// Sum of the weights.
    pub fn weight(&self) -> f64 {
        self.x.len() as f64 + self.extra.iter().map(|p| p.2).sum::<f64>()
    }

    /// Points, record and extra.
    pub fn len(&self) -> usize {
        self.x.len() + self.extra.len()
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

/// A stride of a record: every `k`-th point, `k` chosen so that at most
/// [`STRIDE_POINTS`] remain (and the last point is kept), extra points kept
/// with their weight scaled by `1/k` so that they weigh as much against the
/// stride as against the record.
pub struct Stride {
    /// Stride abscissae.
    pub x: Vec<f64>,
    /// Stride ordinates.
    pub y: Vec<f64>,
    /// Extra points, weights scaled.
    pub extra: Vec<(f64, f64, f64)>,
}

impl Stride {
    /// The stride of `p`.
    pub fn of(p: &Points<'_>) -> Stride {
        let m = p.x.len();
        let k = m.div_ceil(STRIDE_POINTS).max(1);
        let mut x: Vec<f64> = p.x.iter().step_by(k).copied().collect();
        let mut y: Vec<f64> = p.y.iter().step_by(k).copied().collect();
        if m > 0 && (m - 1) % k != 0 {
            x.push(p.x[m - 1]);
            y.push(p.y[m - 1]);
        }
        let extra = p
            .extra
            .iter()
            .map(|&(a, b, w)| (a, b, w / k as f64))
            .collect();
        Stride { x, y, extra }
    }

    /// As points.
    pub fn points(&self) -> Points<'_> {
        Points {
            x: &self.x,
            y: &self.y,
            extra: &self.extra,
        }
    }
}

/// A law of `N` parameters in transformed (unbounded) parameters `t`: value
/// and gradient at one abscissa. The functions of `t` alone (`exp` of a
/// log-parameter, the logistic of n) are taken once per pass over the
/// points by [`Model::at`], not once per point.
pub trait Model<const N: usize> {
    /// What [`Model::eval`] needs of `t`.
    type At;
    /// The parts of the law that depend on `t` only.
    fn at(&self, t: &[f64; N]) -> Self::At;
    /// `(f, df/dt)` at `x`, with `at = self.at(t)`.
    fn eval(&self, at: &Self::At, x: f64) -> (f64, [f64; N]);
}

/// Normal equations at `t`: `J^T W J`, `J^T W r`, weighted SSR; `None` if
/// any value is not finite.
pub struct Normal<const N: usize> {
    /// `J^T W J`.
    pub a: [[f64; N]; N],
    /// `J^T W r`.
    pub g: [f64; N],
    /// `sum w r^2`.
    pub ssr: f64,
}

#[allow(clippy::needless_range_loop)] // matrix algebra reads best with indices
fn normal<const N: usize, M: Model<N>>(
    model: &M,
    t: &[f64; N],
    p: &Points<'_>,
) -> Option<Normal<N>> {
    let mut a = [[0.0; N]; N];
    let mut g = [0.0; N];
    let mut ssr = 0.0;
    let at = model.at(t);
    for (x, y, w) in p.iter() {
        let (f, j) = model.eval(&at, x);
        let r = y - f;
        ssr += w * r * r;
        for i in 0..N {
            let wj = w * j[i];
            g[i] += wj * r;
            for k in i..N {
                a[i][k] += wj * j[k];
            }
        }
    }
    for i in 0..N {
        for k in 0..i {
            a[i][k] = a[k][i];
        }
    }
    let ok = ssr.is_finite() && a.iter().flatten().chain(&g).all(|v| v.is_finite());
    ok.then_some(Normal { a, g, ssr })
}

/// Solves `a z = b` by Gaussian elimination with partial pivoting (Golub &
/// Van Loan, *Matrix Computations*, ch. 3; from memory); `None` when singular.
#[allow(clippy::needless_range_loop)] // matrix algebra reads best with indices
pub fn solve<const N: usize>(mut a: [[f64; N]; N], mut b: [f64; N]) -> Option<[f64; N]> {
    for c in 0..N {
        let piv = (c..N).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))?;
        if a[piv][c].abs() < 1e-300 || !a[piv][c].is_finite() {
            return None;
        }
        a.swap(c, piv);
        b.swap(c, piv);
        for r in c + 1..N {
            let f = a[r][c] / a[c][c];
            for k in c..N {
                a[r][k] -= f * a[c][k];
            }
            b[r] -= f * b[c];
        }
    }
    let mut z = [0.0; N];
    for r in (0..N).rev() {
        let s: f64 = (r + 1..N).map(|k| a[r][k] * z[k]).sum();
        z[r] = (b[r] - s) / a[r][r];
    }
    z.iter().all(|v| v.is_finite()).then_some(z)
}

/// The inverse of a symmetric positive matrix, column by column: column `c`
/// solves `a x = e_c` by [`solve`]; `None` when singular.
pub fn inverse<const N: usize>(a: [[f64; N]; N]) -> Option<[[f64; N]; N]> {
    let mut inv = [[0.0; N]; N];
    for c in 0..N {
        let mut e = [0.0; N];
        e[c] = 1.0;
        let col = solve(a, e)?;
        for r in 0..N {
            inv[r][c] = col[r];
        }
    }
    Some(inv)
}

/// Outcome of a fit.
pub struct Outcome<const N: usize> {
    /// Transformed parameters.
    pub t: [f64; N],
    /// Whether the tolerance was met.
    pub converged: bool,
    /// Iterations taken (stride and finish).
    pub iterations: usize,
    /// `J^T W J` at `t` on every point (for the covariance).
    pub a: [[f64; N]; N],
    /// Weighted SSR at `t` on every point.
    pub ssr: f64,
}

/// Levenberg-Marquardt with Marquardt's diagonal scaling: solve
/// `(J^T J + lambda diag(J^T J)) d = J^T r`, accept a step that lowers SSR
/// (lambda / 10), else raise lambda tenfold. Converged when an accepted step
/// lowers SSR by less than 1e-12 of itself and moves no parameter by more
/// than 1e-9 (transformed), when the Gauss-Newton step predicts a drop below
/// [`PREDICTED_DROP`] of SSR, or when no step can lower SSR at all.
fn iterate<const N: usize, M: Model<N>>(
    model: &M,
    start: [f64; N],
    p: &Points<'_>,
    max_iterations: usize,
    lambda0: f64,
) -> Option<(Normal<N>, [f64; N], bool, usize)> {
    let mut t = start;
    let mut cur = normal(model, &t, p)?;
    let mut lambda = lambda0;
    for it in 1..=max_iterations {
        // Converged when even the undamped (Gauss-Newton) step predicts an
        // SSR drop below PREDICTED_DROP of SSR: no trial pass is needed.
        if let Some(d) = solve(cur.a, cur.g) {
            let predicted: f64 = d.iter().zip(&cur.g).map(|(a, b)| a * b).sum();
            if predicted.abs() <= PREDICTED_DROP * cur.ssr || cur.ssr == 0.0 {
                return Some((cur, t, true, it - 1));
            }
        }
        let mut accepted = None;
        while lambda <= 1e16 {
            let mut damped = cur.a;
            for (i, row) in damped.iter_mut().enumerate() {
                row[i] += lambda * cur.a[i][i].max(1e-300);
            }
            if let Some(d) = solve(damped, cur.g) {
                if d.iter().all(|v| {
                    v.abs() <= 1e-15 * (1.0 + t.iter().fold(0.0f64, |m, x| m.max(x.abs())))
                }) {
                    // The step vanishes before SSR falls: t is a minimum to working precision.
                    return Some((cur, t, true, it));
                }
                let mut trial = t;
                for i in 0..N {
                    trial[i] += d[i];
                }
                if let Some(n2) = normal(model, &trial, p) {
                    if n2.ssr < cur.ssr {
                        accepted = Some((trial, d, n2));
                        lambda = (lambda * 0.1).max(1e-12);
                        break;
                    }
                }
            }
            lambda *= 10.0;
        }
        let Some((trial, d, n2)) = accepted else {
            return Some((cur, t, true, it));
        };
        let drop = cur.ssr - n2.ssr;
        t = trial;
        cur = n2;
        if drop <= 1e-12 * cur.ssr && d.iter().all(|v| v.abs() <= 1e-9) {
            return Some((cur, t, true, it));
        }
    }
    Some((cur, t, false, max_iterations))
}

/// Fits `model` from `start` by Levenberg-Marquardt (Marquardt 1963, see
/// the module documentation): iterates on the stride of `p` to its
/// tolerance, then finishes on every point of `p`.
pub fn levenberg_marquardt<const N: usize, M: Model<N>>(
    model: &M,
    start: [f64; N],
    p: &Points<'_>,
) -> Outcome<N> {
    let failed = |t| Outcome {
        t,
        converged: false,
        iterations: 0,
        a: [[f64::NAN; N]; N],
        ssr: f64::NAN,
    };
    let stride = Stride::of(p);
    let (mut t, mut iterations) = (start, 0);
    if stride.x.len() < p.x.len() {
        if let Some((_, ts, _, it)) = iterate(model, start, &stride.points(), MAX_ITERATIONS, 1e-3)
        {
            t = ts;
            iterations = it;
        }
    }
    // From the stride's minimum the whole record needs a Gauss-Newton step or two.
    let lambda0 = if iterations > 0 { 1e-6 } else { 1e-3 };
    match iterate(model, t, p, MAX_ITERATIONS, lambda0) {
        Some((n, t, converged, it)) => Outcome {
            t,
            converged,
            iterations: iterations + it,
            a: n.a,
            ssr: n.ssr,
        },
        None => failed(t),
    }
}
