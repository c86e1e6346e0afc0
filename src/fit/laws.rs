//! The laws a record is fitted to and how: every plastic-strain law by least
//! squares on the stress residuals (one criterion, so that RMS, R^2 and AIC
//! rank them fairly), Hollomon refined in stress space from its log-space
//! start, Ludwik, Swift and Voce by Levenberg-Marquardt ([`super::solver`]),
//! the total-strain forms exactly by a scan over the elastic-plastic split.
//!
//! Standard errors are `sqrt` of the diagonal of `s^2 (J^T W J)^-1` with
//! `s^2 = SSR / (W - p)`: they assume the law is the right one and the
//! residuals independent; [`super::FitWarning::ResidualsAboveNoise`] and
//! [`super::FitWarning::ResidualsCorrelated`] say when a record shows they
//! are not.

use std::fmt;

use super::solver::{self, Model, Points, Stride};
use super::FitError;
use crate::flow::FlowLaw;
use crate::param::{self, ParamError};

/// The laws a record is fitted to. The first six are the flow laws of
/// [`crate::flow`] against true plastic strain; the last two are total-strain
/// forms with the elastic line at the measured modulus.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum FitLaw {
    /// `sigma = Y`.
    PerfectlyPlastic,
    /// `sigma = Y + H eps`.
    Linear,
    /// `sigma = K eps^n`.
    Hollomon,
    /// `sigma = s0 + K eps^n`.
    Ludwik,
    /// `sigma = K (e0 + eps)^n`.
    Swift,
    /// `sigma = ss - (ss - s0) exp(-eps / ec)`.
    Voce,
    /// `sigma = min(E eps_t, Y)` against total true strain.
    ElasticPerfectlyPlastic,
    /// `sigma = E eps_t` up to Y, then `Y + H eps_p` against total true strain.
    ElasticLinear,
}

impl FitLaw {
    /// Every law, in report order.
    pub const ALL: [FitLaw; 8] = [
        FitLaw::PerfectlyPlastic,
        FitLaw::Linear,
        FitLaw::Hollomon,
        FitLaw::Ludwik,
        FitLaw::Swift,
        FitLaw::Voce,
        FitLaw::ElasticPerfectlyPlastic,
        FitLaw::ElasticLinear,
    ];

    /// The laws fitted against true plastic strain (the ones ranked by AIC).
    pub const PLASTIC: [FitLaw; 6] = [
        FitLaw::PerfectlyPlastic,
        FitLaw::Linear,
        FitLaw::Hollomon,
        FitLaw::Ludwik,
        FitLaw::Swift,
        FitLaw::Voce,
    ];

    /// The name used in reports and on the command line; the six flow laws
    /// use their schedule-file names (`hollomon`, `perfectly-plastic`, ...).
    pub fn name(self) -> &'static str {
        match self {
            FitLaw::PerfectlyPlastic => "perfectly-plastic",
            FitLaw::Linear => "linear",
            FitLaw::Hollomon => "hollomon",
            FitLaw::Ludwik => "ludwik",
            FitLaw::Swift => "swift",
            FitLaw::Voce => "voce",
            FitLaw::ElasticPerfectlyPlastic => "elastic-perfectly-plastic",
            FitLaw::ElasticLinear => "elastic-linear",
        }
    }

    /// The law with this name, if any.
    pub fn from_name(name: &str) -> Option<FitLaw> {
        FitLaw::ALL.into_iter().find(|l| l.name() == name)
    }

    /// Whether the law is fitted against total strain (elastic part included).
    pub fn is_total_strain_form(self) -> bool {
        matches!(
            self,
            FitLaw::ElasticPerfectlyPlastic | FitLaw::ElasticLinear
        )
    }

    /// Fewest points with strain above 0 the law needs.
    fn points_needed(self) -> usize {
        match self {
            FitLaw::PerfectlyPlastic => 1,
            FitLaw::Linear | FitLaw::Hollomon => 2,
            _ => 4,
        }
    }
}

impl fmt::Display for FitLaw {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// One fitted parameter. `name` is the schedule-file key (`k_mpa`, `n`, ...).
#[derive(Debug, Clone, PartialEq)]
pub struct ParamEstimate {
    /// Schedule-file key.
    pub name: &'static str,
    /// Fitted value, in the unit its name gives.
    pub value: f64,
    /// Standard error, `sqrt` of the diagonal of `s^2 (J^T W J)^-1`
    /// (assumes the law is right); `None` when the normal matrix is singular.
    pub std_error: Option<f64>,
}

/// The fit of one law.
#[derive(Debug, Clone, PartialEq)]
pub struct LawFit {
    /// Which law.
    pub law: FitLaw,
    /// Parameters in schedule-file order.
    pub params: Vec<ParamEstimate>,
    /// Covariance of the parameters (same order), `s^2 (J^T W J)^-1` in the
    /// parameters' own units; `None` when singular.
    pub covariance: Option<Vec<Vec<f64>>>,
    /// Points fitted (record points plus drawn-wire points).
    pub points: usize,
    /// Root-mean-square residual `sqrt(SSR / W)`, MPa (`W` the sum of the
    /// weights: the number of points when none is weighted).
    pub rms_mpa: f64,
    /// Coefficient of determination `1 - SSR / SST`.
    pub r2: f64,
    /// Akaike's criterion `W ln(SSR / W) + 2 p` (lower is better; comparable
    /// only between fits to the same points).
    pub aic: f64,
    /// Whether the iteration met its tolerance (closed-form fits always do).
    pub converged: bool,
    /// Iterations taken (0 for closed-form fits).
    pub iterations: usize,
    /// The fitted law as a schedule takes it (elastic forms as `perfectly-plastic`
    /// and `linear`); `None` when the parameters are not a valid law.
    pub flow_law: Option<FlowLaw>,
    /// Engineering UTS the law predicts, MPa: `max sigma(eps) exp(-eps)`
    /// (Considere), `None` without a valid law.
    pub uts_mpa: Option<f64>,
    /// Flow stress at the reach strain, MPa, when one was given.
    pub stress_at_reach_mpa: Option<f64>,
}

impl LawFit {
    /// The value of parameter `name`, if the law has it.
    pub fn param(&self, name: &str) -> Option<f64> {
        self.params.iter().find(|p| p.name == name).map(|p| p.value)
    }

    /// Correlation of parameters `i` and `j` from the covariance.
    pub fn correlation(&self, i: usize, j: usize) -> Option<f64> {
        let c = self.covariance.as_ref()?;
        let r = c[i][j] / (c[i][i] * c[j][j]).sqrt();
        r.is_finite().then_some(r)
    }

    /// Flow stress of the law at true plastic strain `x` and its standard
    /// error from the parameter covariance (delta method, `g^T C g` with the
    /// gradient `g` by central differences), MPa.
    pub fn stress_with_error_mpa(&self, x: f64) -> Option<(f64, f64)> {
        let law = self.flow_law.as_ref()?;
        let c = self.covariance.as_ref()?;
        let f = law.stress_mpa(x);
        let mut g = Vec::with_capacity(self.params.len());
        for i in 0..self.params.len() {
            let v = self.params[i].value;
            let h = 1e-6 * v.abs().max(1e-9);
            let at = |d: f64| {
                let mut p = self.params.clone();
                p[i].value = v + d;
                flow_law_of(self.law, &p).ok().map(|l| l.stress_mpa(x))
            };
            g.push((at(h)? - at(-h)?) / (2.0 * h));
        }
        let mut var = 0.0;
        for i in 0..g.len() {
            for j in 0..g.len() {
                var += g[i] * c[i][j] * g[j];
            }
        }
        (var.is_finite() && var >= 0.0).then(|| (f, var.sqrt()))
    }
}

/// Engineering UTS from Hollomon's law by Considere's criterion:
/// `UTS = K n^n exp(-n)` (MPa), reached at true strain `n`
/// (Considere 1885; Dieter, *Mechanical Metallurgy*, ch. 8, from memory).
pub fn considere_uts_mpa(k_mpa: f64, n: f64) -> Result<f64, ParamError> {
    param::positive("k_mpa", k_mpa)?;
    param::within("n", n, 0.0, 1.0, param::Ends::ClosedOpen)?;
    Ok(k_mpa * n.powf(n) * (-n).exp())
}

/// Engineering UTS (MPa) a flow law predicts and the true plastic strain at
/// which it is reached: the maximum of `sigma(eps) exp(-eps)` over
/// `0 <= eps <= 5` (engineering stress at constant volume, elastic strain
/// neglected; Considere's `d sigma / d eps = sigma` at the maximum). Found by
/// a scan of 500 steps and a golden-section refinement.
pub fn engineering_uts_mpa(law: &FlowLaw) -> (f64, f64) {
    let g = |e: f64| law.stress_mpa(e) * (-e).exp();
    const TOP: f64 = 5.0;
    const STEPS: usize = 500;
    let h = TOP / STEPS as f64;
    let mut ibest = 0;
    let mut gbest = g(0.0);
    for i in 1..=STEPS {
        let v = g(i as f64 * h);
        if v > gbest {
            gbest = v;
            ibest = i;
        }
    }
    let (mut a, mut b) = (
        (ibest as f64 - 1.0).max(0.0) * h,
        ((ibest + 1) as f64 * h).min(TOP),
    );
    let phi = 0.5 * (5f64.sqrt() - 1.0);
    let mut c = b - phi * (b - a);
    let mut d = a + phi * (b - a);
    let (mut gc, mut gd) = (g(c), g(d));
    for _ in 0..80 {
        if gc > gd {
            b = d;
            d = c;
            gd = gc;
            c = b - phi * (b - a);
            gc = g(c);
        } else {
            a = c;
            c = d;
            gc = gd;
            d = a + phi * (b - a);
            gd = g(d);
        }
    }
    let e = 0.5 * (a + b);
    let v = g(e);
    if v >= gbest {
        (v, e)
    } else {
        (gbest, ibest as f64 * h)
    }
}

/// Builds the schedule law for a fitted law's parameters; the elastic forms
/// become `perfectly-plastic` and `linear` (drawing neglects elastic strain).
pub(crate) fn flow_law_of(law: FitLaw, params: &[ParamEstimate]) -> Result<FlowLaw, String> {
    let p = |name: &str| {
        params
            .iter()
            .find(|q| q.name == name)
            .map(|q| q.value)
            .ok_or_else(|| format!("no `{name}`"))
    };
    let made = match law {
        FitLaw::PerfectlyPlastic | FitLaw::ElasticPerfectlyPlastic => {
            FlowLaw::perfectly_plastic(p("yield_mpa")?)
        }
        FitLaw::Linear | FitLaw::ElasticLinear => {
            FlowLaw::linear(p("yield_mpa")?, p("hardening_modulus_mpa")?)
        }
        FitLaw::Hollomon => FlowLaw::hollomon(p("k_mpa")?, p("n")?),
        FitLaw::Ludwik => FlowLaw::ludwik(p("sigma0_mpa")?, p("k_mpa")?, p("n")?),
        FitLaw::Swift => FlowLaw::swift(p("k_mpa")?, p("eps0")?, p("n")?),
        FitLaw::Voce => FlowLaw::voce(p("sigma0_mpa")?, p("saturation_mpa")?, p("eps_c")?),
    };
    made.map_err(|e| e.to_string())
}

/// A covariance matrix, `None` when singular.
type Covariance = Option<Vec<Vec<f64>>>;

/// Weighted total sum of squares about the weighted mean.
fn sst(p: &Points<'_>) -> f64 {
    let (mut sw, mut swy) = (0.0, 0.0);
    for (_, y, w) in p.iter() {
        sw += w;
        swy += w * y;
    }
    let mean = swy / sw;
    p.iter().map(|(_, y, w)| w * (y - mean) * (y - mean)).sum()
}

/// Builds a [`LawFit`] from parameters, covariance and weighted SSR.
#[allow(clippy::too_many_arguments)]
fn finish(
    law: FitLaw,
    names: &[&'static str],
    values: &[f64],
    covariance: Option<Vec<Vec<f64>>>,
    ssr: f64,
    p: &Points<'_>,
    converged: bool,
    iterations: usize,
) -> LawFit {
    let w = p.weight();
    let sst = sst(p);
    let params: Vec<ParamEstimate> = names
        .iter()
        .zip(values)
        .enumerate()
        .map(|(i, (&name, &value))| ParamEstimate {
            name,
            value,
            std_error: covariance
                .as_ref()
                .map(|c| c[i][i])
                .filter(|v| v.is_finite() && *v >= 0.0)
                .map(f64::sqrt),
        })
        .collect();
    let rms_mpa = (ssr / w).sqrt();
    let r2 = if sst > 0.0 { 1.0 - ssr / sst } else { f64::NAN };
    // A perfect fit has ln(0) = -inf; floor SSR so that AIC stays comparable.
    let aic = w * (ssr.max(f64::MIN_POSITIVE) / w).ln() + 2.0 * names.len() as f64;
    let flow_law = flow_law_of(law, &params).ok();
    let uts_mpa = flow_law.as_ref().map(|l| engineering_uts_mpa(l).0);
    LawFit {
        law,
        params,
        covariance,
        points: p.len(),
        rms_mpa,
        r2,
        aic,
        converged,
        iterations,
        flow_law,
        uts_mpa,
        stress_at_reach_mpa: None,
    }
}

/// Fits one plastic-strain law to true plastic strain `strain` and true
/// stress `stress_mpa` (MPa); points with strain at or below 0 are skipped
/// for Hollomon, Ludwik and Swift (whose `eps^n` needs `eps > 0`).
///
/// - perfectly plastic: `Y = mean(sigma)`;
/// - linear: least-squares line `Y + H eps`;
/// - Hollomon: a least-squares line `ln sigma = ln K + n ln eps` for the
///   start, then least squares on the stress residuals;
/// - Ludwik, Swift, Voce: Levenberg-Marquardt on the stress residuals, with
///   each positive parameter carried as its logarithm and n as a logistic
///   (so it stays in (0, 1)), Voce's ss as `s0 + exp(t)` (so ss > s0). Ludwik
///   and Swift start from log-log fits (Ludwik's of `sigma - s0` for trial
///   s0, Swift's of `ln(e0 + eps)` for trial e0), Voce from the best of a
///   log-spaced scan of ec with the other two solved linearly.
///
/// The total-strain forms need the modulus: use [`fit_elastic_form`].
pub fn fit_law(law: FitLaw, strain: &[f64], stress_mpa: &[f64]) -> Result<LawFit, FitError> {
    fit_law_weighted(law, strain, stress_mpa, &[])
}

/// [`fit_law`] with extra points `(true plastic strain, true stress MPa,
/// weight)`, such as the tensile strengths of drawn wire.
pub fn fit_law_weighted(
    law: FitLaw,
    strain: &[f64],
    stress_mpa: &[f64],
    extra: &[(f64, f64, f64)],
) -> Result<LawFit, FitError> {
    super::same_length("stress", stress_mpa, "strain", strain)?;
    if law.is_total_strain_form() {
        return Err(FitError::Param(ParamError::new(
            "law",
            law.name(),
            "a total-strain form needs the modulus: use fit_elastic_form",
        )));
    }
    let usable = |e: f64, s: f64| {
        e.is_finite()
            && s.is_finite()
            && (e > 0.0
                || matches!(
                    law,
                    FitLaw::PerfectlyPlastic | FitLaw::Linear | FitLaw::Voce
                ))
            && (s > 0.0 || !matches!(law, FitLaw::Hollomon))
    };
    // Copy only when some point must be left out (keeps memory lean on big records).
    let all_usable = strain.iter().zip(stress_mpa).all(|(&e, &s)| usable(e, s));
    let owned: Option<(Vec<f64>, Vec<f64>)> = (!all_usable).then(|| {
        strain
            .iter()
            .zip(stress_mpa)
            .filter(|(&e, &s)| usable(e, s))
            .map(|(e, s)| (*e, *s))
            .unzip()
    });
    let (x, y) = match &owned {
        Some((x, y)) => (x.as_slice(), y.as_slice()),
        None => (strain, stress_mpa),
    };
    let extra: Vec<(f64, f64, f64)> = extra
        .iter()
        .copied()
        .filter(|&(e, s, w)| usable(e, s) && w > 0.0 && w.is_finite())
        .collect();
    let p = Points {
        x,
        y,
        extra: &extra,
    };
    if p.len() < law.points_needed() {
        return Err(FitError::TooFewForLaw {
            law: law.name(),
            found: p.len(),
            needed: law.points_needed(),
        });
    }
    Ok(match law {
        FitLaw::PerfectlyPlastic => fit_constant(&p),
        FitLaw::Linear => fit_linear(&p),
        FitLaw::Hollomon => fit_hollomon(&p),
        FitLaw::Ludwik => fit_ludwik(&p),
        FitLaw::Swift => fit_swift(&p),
        _ => fit_voce(&p),
    })
}

fn fit_constant(p: &Points<'_>) -> LawFit {
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
fn weighted_line(
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

fn fit_linear(p: &Points<'_>) -> LawFit {
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

fn logistic(t: f64) -> f64 {
    1.0 / (1.0 + (-t).exp())
}

fn logit(n: f64) -> f64 {
    let n = n.clamp(1e-6, 1.0 - 1e-6);
    (n / (1.0 - n)).ln()
}

/// Covariance in natural parameters `theta(t)` from `J^T W J` in `t`:
/// `D s^2 (J^T W J)^-1 D^T`, `D = d theta / d t`, `s^2 = SSR / (W - N)`.
fn natural_covariance<const N: usize>(
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

fn diag<const N: usize>(v: [f64; N]) -> [[f64; N]; N] {
    let mut d = [[0.0; N]; N];
    for i in 0..N {
        d[i][i] = v[i];
    }
    d
}

struct Hollomon;
struct Ludwik;
struct Swift;
struct Voce;

impl Model<2> for Hollomon {
    // t = (ln K, logit n)
    fn eval(&self, t: &[f64; 2], x: f64) -> (f64, [f64; 2]) {
        let n = logistic(t[1]);
        let lx = x.ln();
        let f = (t[0] + n * lx).exp();
        (f, [f, f * lx * n * (1.0 - n)])
    }
}

impl Model<3> for Ludwik {
    // t = (ln s0, ln K, logit n)
    fn eval(&self, t: &[f64; 3], x: f64) -> (f64, [f64; 3]) {
        let (s0, n) = (t[0].exp(), logistic(t[2]));
        let lx = x.ln();
        let p = (t[1] + n * lx).exp();
        (s0 + p, [s0, p, p * lx * n * (1.0 - n)])
    }
}

impl Model<3> for Swift {
    // t = (ln K, ln e0, logit n)
    fn eval(&self, t: &[f64; 3], x: f64) -> (f64, [f64; 3]) {
        let (e0, n) = (t[1].exp(), logistic(t[2]));
        let u = e0 + x;
        let lu = u.ln();
        let f = (t[0] + n * lu).exp();
        (f, [f, f * n / u * e0, f * lu * n * (1.0 - n)])
    }
}

impl Model<3> for Voce {
    // t = (ln s0, ln (ss - s0), ln ec)
    fn eval(&self, t: &[f64; 3], x: f64) -> (f64, [f64; 3]) {
        let (s0, d, ec) = (t[0].exp(), t[1].exp(), t[2].exp());
        let ex = (-x / ec).exp();
        (s0 + d * (1.0 - ex), [s0, d * (1.0 - ex), -d * ex * x / ec])
    }
}

/// Weighted SSR of a model at `t`, `inf` when not finite.
fn ssr_at<const N: usize, M: Model<N>>(model: &M, t: &[f64; N], p: &Points<'_>) -> f64 {
    let s: f64 = p
        .iter()
        .map(|(x, y, w)| w * (y - model.eval(t, x).0).powi(2))
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

fn fit_hollomon(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let (a, n) = log_line(&sp, |x| x, 0.0).unwrap_or((sp.y[0].max(1.0).ln(), 0.3));
    let out = solver::levenberg_marquardt(&Hollomon, [a, logit(n)], p);
    let (k, n) = (out.t[0].exp(), logistic(out.t[1]));
    let cov = natural_covariance(out.a, out.ssr, p.weight(), diag([k, n * (1.0 - n)]));
    finish(
        FitLaw::Hollomon,
        &["k_mpa", "n"],
        &[k, n],
        cov,
        out.ssr,
        p,
        out.converged,
        out.iterations,
    )
}

fn fit_ludwik(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let ymin = sp.iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
    let mut start = None;
    let mut best = f64::INFINITY;
    for frac in [0.1, 0.3, 0.5, 0.7, 0.9] {
        let s0 = frac * ymin;
        if let Some((a, n)) = log_line(&sp, |x| x, s0) {
            let t = [s0.ln(), a, logit(n)];
            let s = ssr_at(&Ludwik, &t, &sp);
            if s < best {
                best = s;
                start = Some(t);
            }
        }
    }
    let start = start.unwrap_or([(0.5 * ymin).ln(), ymin.ln(), 0.0]);
    let out = solver::levenberg_marquardt(&Ludwik, start, p);
    let (s0, k, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let cov = natural_covariance(out.a, out.ssr, p.weight(), diag([s0, k, n * (1.0 - n)]));
    finish(
        FitLaw::Ludwik,
        &["sigma0_mpa", "k_mpa", "n"],
        &[s0, k, n],
        cov,
        out.ssr,
        p,
        out.converged,
        out.iterations,
    )
}

fn fit_swift(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let xmin = sp.iter().map(|q| q.0).fold(f64::INFINITY, f64::min);
    let mut start = None;
    let mut best = f64::INFINITY;
    for e0 in [0.5 * xmin, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1] {
        if let Some((a, n)) = log_line(&sp, |x| e0 + x, 0.0) {
            let t = [a, e0.ln(), logit(n)];
            let s = ssr_at(&Swift, &t, &sp);
            if s < best {
                best = s;
                start = Some(t);
            }
        }
    }
    let ymax = sp.iter().map(|q| q.1).fold(0.0, f64::max);
    let start = start.unwrap_or([ymax.ln(), (0.01f64).ln(), 0.0]);
    let out = solver::levenberg_marquardt(&Swift, start, p);
    let (k, e0, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let cov = natural_covariance(out.a, out.ssr, p.weight(), diag([k, e0, n * (1.0 - n)]));
    finish(
        FitLaw::Swift,
        &["k_mpa", "eps0", "n"],
        &[k, e0, n],
        cov,
        out.ssr,
        p,
        out.converged,
        out.iterations,
    )
}

fn fit_voce(p: &Points<'_>) -> LawFit {
    let stride = Stride::of(p);
    let sp = stride.points();
    let xmax = sp.iter().map(|q| q.0).fold(0.0, f64::max).max(1e-6);
    let ymin = sp.iter().map(|q| q.1).fold(f64::INFINITY, f64::min);
    let ymax = sp.iter().map(|q| q.1).fold(0.0, f64::max);
    let mut start = [
        ymin.max(1e-3).ln(),
        (ymax - ymin).max(1e-3).ln(),
        (xmax / 3.0).ln(),
    ];
    let mut best = f64::INFINITY;
    // ec from xmax/50 to 10 xmax, 40 steps; s0 and ss - s0 by linear least squares.
    for i in 0..40 {
        let ec = xmax / 50.0 * (500f64).powf(i as f64 / 39.0);
        let z = sp.iter().map(|(x, y, w)| (1.0 - (-x / ec).exp(), y, w));
        let z: Vec<(f64, f64, f64)> = z.collect();
        if let Some((s0, d, ..)) = weighted_line(z.iter().copied()) {
            if s0 > 0.0 && d > 0.0 {
                let t = [s0.ln(), d.ln(), ec.ln()];
                let s = ssr_at(&Voce, &t, &sp);
                if s < best {
                    best = s;
                    start = t;
                }
            }
        }
    }
    let out = solver::levenberg_marquardt(&Voce, start, p);
    let (s0, d, ec) = (out.t[0].exp(), out.t[1].exp(), out.t[2].exp());
    let dm = [[s0, 0.0, 0.0], [s0, d, 0.0], [0.0, 0.0, ec]];
    let cov = natural_covariance(out.a, out.ssr, p.weight(), dm);
    finish(
        FitLaw::Voce,
        &["sigma0_mpa", "saturation_mpa", "eps_c"],
        &[s0, s0 + d, ec],
        cov,
        out.ssr,
        p,
        out.converged,
        out.iterations,
    )
}

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
    super::same_length("stress", stress_mpa, "strain", strain)?;
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn considere_closed_form_matches_the_scan() {
        // Considere: the maximum of K eps^n exp(-eps) is at eps = n.
        let law = FlowLaw::hollomon(530.0, 0.26).unwrap();
        let (uts, at) = engineering_uts_mpa(&law);
        assert!((at - 0.26).abs() < 1e-6, "{at}");
        assert!((uts - considere_uts_mpa(530.0, 0.26).unwrap()).abs() < 1e-9);
    }

    #[test]
    fn straight_hollomon_data_are_fitted_exactly() {
        let x: Vec<f64> = (1..40).map(|i| i as f64 * 0.01).collect();
        let y: Vec<f64> = x.iter().map(|e| 530.0 * e.powf(0.26)).collect();
        let f = fit_law(FitLaw::Hollomon, &x, &y).unwrap();
        assert!((f.param("k_mpa").unwrap() - 530.0).abs() < 1e-9);
        assert!((f.param("n").unwrap() - 0.26).abs() < 1e-12);
        assert!(f.rms_mpa < 1e-9);
    }

    #[test]
    fn solve_solves() {
        let a = [[4.0, 1.0, 0.5], [1.0, 3.0, 0.2], [0.5, 0.2, 2.0]];
        let z = solver::solve(a, [1.0, 2.0, 3.0]).unwrap();
        for r in 0..3 {
            let s: f64 = (0..3).map(|k| a[r][k] * z[k]).sum();
            assert!((s - [1.0, 2.0, 3.0][r]).abs() < 1e-12);
        }
        assert!(solver::solve(
            [[1.0, 2.0, 3.0], [2.0, 4.0, 6.0], [0.0, 0.0, 1.0]],
            [1.0; 3]
        )
        .is_none());
    }
}
