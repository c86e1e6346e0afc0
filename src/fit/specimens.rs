//! The set of specimens: the law of several tensile tests of one material,
//! with the scatter of its parameters (mean, sample standard deviation,
//! Pearson correlation between each pair), for a risk analysis to sample
//! from. With one specimen the scatter is the fit's own uncertainty: the
//! standard errors and correlations of its covariance (which assume the law
//! is right), labelled as such.

use super::laws::{flow_law_of, FitLaw, LawFit, ParamEstimate};
use super::{FitError, FitReport};
use crate::flow::FlowLaw;

/// Where a scatter comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ScatterSource {
    /// Several specimens: standard deviation across them.
    Specimens,
    /// One specimen: the fit's standard errors.
    FitUncertainty,
}

/// The parameters of a law and their scatter.
#[derive(Debug, Clone, PartialEq)]
pub struct Scatter {
    /// The law.
    pub law: FitLaw,
    /// Parameter keys, schedule-file order.
    pub names: Vec<&'static str>,
    /// Mean of each parameter (the fitted value for one specimen).
    pub mean: Vec<f64>,
    /// Sample standard deviation (`n - 1`) of each, or its standard error.
    pub sd: Vec<f64>,
    /// Correlation of each pair `(a, b, r)`, `a` before `b`.
    pub correlation: Vec<(&'static str, &'static str, f64)>,
    /// Specimens.
    pub specimens: usize,
    /// Where the scatter comes from.
    pub source: ScatterSource,
}

impl Scatter {
    /// The law at the mean parameters, as a schedule takes it.
    pub fn flow_law(&self) -> Result<FlowLaw, String> {
        let p: Vec<ParamEstimate> = self
            .names
            .iter()
            .zip(&self.mean)
            .map(|(&name, &value)| ParamEstimate {
                name,
                value,
                std_error: None,
            })
            .collect();
        flow_law_of(self.law, &p)
    }
}

/// The law for a set: among the plastic-strain laws fitted, converged and
/// valid in every specimen, the one with the lowest sum of AIC (of the fits
/// with the drawn-wire points when `with_drawn`).
pub fn set_law(reports: &[FitReport], with_drawn: bool) -> Option<FitLaw> {
    FitLaw::PLASTIC
        .into_iter()
        .filter_map(|law| {
            let mut total = 0.0;
            for r in reports {
                let f = if with_drawn {
                    r.drawn_fit(law)?
                } else {
                    r.fit(law)?
                };
                if !f.converged || f.flow_law.is_none() || !f.aic.is_finite() {
                    return None;
                }
                total += f.aic;
            }
            Some((law, total))
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(l, _)| l)
}

/// Mean, sample standard deviation and correlation of `law`'s parameters
/// over several specimens' fits.
pub fn set_scatter(
    reports: &[FitReport],
    law: FitLaw,
    with_drawn: bool,
) -> Result<Scatter, FitError> {
    if reports.len() < 2 {
        return Err(FitError::SetTooSmall {
            found: reports.len(),
        });
    }
    let fits: Vec<&LawFit> = reports
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let f = if with_drawn {
                r.drawn_fit(law)
            } else {
                r.fit(law)
            };
            f.filter(|f| f.flow_law.is_some())
                .ok_or(FitError::NotInEverySpecimen {
                    law: law.name(),
                    specimen: i + 1,
                })
        })
        .collect::<Result<_, _>>()?;
    let names: Vec<&'static str> = fits[0].params.iter().map(|p| p.name).collect();
    let k = fits.len() as f64;
    let col = |j: usize| fits.iter().map(move |f| f.params[j].value);
    let mean: Vec<f64> = (0..names.len()).map(|j| col(j).sum::<f64>() / k).collect();
    let cov = |a: usize, b: usize| {
        col(a)
            .zip(col(b))
            .map(|(x, y)| (x - mean[a]) * (y - mean[b]))
            .sum::<f64>()
            / (k - 1.0)
    };
    let sd: Vec<f64> = (0..names.len()).map(|j| cov(j, j).sqrt()).collect();
    let mut correlation = Vec::new();
    for a in 0..names.len() {
        for b in a + 1..names.len() {
            let r = cov(a, b) / (sd[a] * sd[b]);
            if r.is_finite() {
                correlation.push((names[a], names[b], r));
            }
        }
    }
    Ok(Scatter {
        law,
        names,
        mean,
        sd,
        correlation,
        specimens: fits.len(),
        source: ScatterSource::Specimens,
    })
}

/// One specimen: the fit's standard errors and correlations, `None` when
/// the covariance is singular.
pub fn fit_uncertainty(fit: &LawFit) -> Option<Scatter> {
    let c = fit.covariance.as_ref()?;
    let names: Vec<&'static str> = fit.params.iter().map(|p| p.name).collect();
    let sd: Vec<f64> = (0..names.len()).map(|j| c[j][j].sqrt()).collect();
    if sd.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mut correlation = Vec::new();
    for a in 0..names.len() {
        for b in a + 1..names.len() {
            if let Some(r) = fit.correlation(a, b) {
                correlation.push((names[a], names[b], r));
            }
        }
    }
    Some(Scatter {
        law: fit.law,
        names,
        mean: fit.params.iter().map(|p| p.value).collect(),
        sd,
        correlation,
        specimens: 1,
        source: ScatterSource::FitUncertainty,
    })
}
