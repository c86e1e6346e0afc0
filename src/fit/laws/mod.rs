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
//!
//! The files: `mod.rs` the laws, a fit's figures and the dispatch; `uts.rs` the
//! engineering UTS a law predicts (Considere); `linear.rs` the closed-form fits
//! (constant, line); `nonlinear.rs` Hollomon, Ludwik, Swift and Voce by
//! Levenberg-Marquardt; `elastic_form.rs` the total-strain forms.

use std::fmt;

use super::solver::Points;
use super::FitError;
use crate::flow::FlowLaw;
use crate::param::ParamError;

mod elastic_form;
mod linear;
mod nonlinear;
mod uts;

pub use elastic_form::fit_elastic_form;
pub(crate) use elastic_form::LineSums;
use linear::{fit_constant, fit_linear};
pub use nonlinear::hollomon_log_space;
use nonlinear::{fit_hollomon, fit_ludwik, fit_swift, fit_voce};
pub use uts::{considere_uts_mpa, engineering_uts_mpa};

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
    pub const ALL: [FitLaw; 8] = {
        let p = FitLaw::PLASTIC;
        [
            p[0],
            p[1],
            p[2],
            p[3],
            p[4],
            p[5],
            FitLaw::ElasticPerfectlyPlastic,
            FitLaw::ElasticLinear,
        ]
    };

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
pub(super) type Covariance = Option<Vec<Vec<f64>>>;

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
pub(super) fn finish(
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fit::solver;

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
