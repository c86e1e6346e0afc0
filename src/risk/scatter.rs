//! The `scatter` block of a schedule file and the flow-law scatter that
//! `fit` writes beside `flow:` (`material.flow_scatter`).
//!
//! ```yaml
//! scatter:
//!   friction: {distribution: lognormal, cv: 0.15, between_dies: 0.7}
//!   semi_angle_deg: {distribution: uniform, tolerance: 0.5, between_dies: 0}
//!   die_diameter_mm: {distribution: truncated-normal, sd: 0.004, below: 0, above: 0.012, between_dies: 0}
//!   rod_diameter_mm: {distribution: normal, sd: 0.05}
//!   back_tension_mpa: {distribution: normal, cv: 0.1, between_dies: 1}
//!   flow: {sd: {k_mpa: 12}, correlation: [{between: [k_mpa, n], r: 0.8}]}
//! ```
//!
//! The flow law's parameters scatter as a multivariate normal: standard
//! deviations per flow-block key and their correlation, drawn as `d = L z`
//! with `L` the Cholesky factor of the covariance (Golub & Van Loan, *Matrix
//! Computations*; from memory).

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use super::distribution::{Law, Spread};
use crate::flow::{FlowLaw, FlowLawSpec};
use crate::param::{self, Ends, ParamError};

/// What scatters, in a schedule file's `scatter` block. Each key is optional;
/// an input without a key stays at its nominal value.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Scatter {
    /// Coulomb friction mu of every die (the shear factor m moves with it in
    /// proportion). Needs `between_dies`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub friction: Option<Spread>,
    /// Die semi-angle, degrees. Needs `between_dies`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub semi_angle_deg: Option<Spread>,
    /// Die (exit) diameter, mm: making tolerance and wear. Needs `between_dies`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub die_diameter_mm: Option<Spread>,
    /// Rod (start) diameter, mm.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rod_diameter_mm: Option<Spread>,
    /// Back tension, MPa, on the passes that have one. Needs `between_dies`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub back_tension_mpa: Option<Spread>,
    /// The flow law's parameters; overrides `material.flow_scatter`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub flow: Option<FlowScatter>,
}

/// The scatter of a flow law's parameters: `{sd: {k_mpa: 12, n: 0.01},
/// correlation: [{between: [k_mpa, n], r: 0.8}], specimens: 3}`. Keys are the
/// flow block's own (`k_mpa`, `n`, `sigma0_mpa`, ...).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FlowScatter {
    /// Standard deviation of each parameter that scatters, in its own units.
    pub sd: BTreeMap<String, f64>,
    /// Correlations between pairs of parameters (0 for a pair not listed).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub correlation: Vec<Correlation>,
    /// How many specimens the standard deviations come from (for the warning
    /// that an sd from few specimens is itself uncertain).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub specimens: Option<u32>,
}

/// The correlation of two flow-law parameters.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Correlation {
    /// The two parameters (flow block keys).
    pub between: [String; 2],
    /// Pearson correlation, in (-1, 1).
    pub r: f64,
}

/// The numeric keys of a flow law, in the order the file writes them.
pub fn flow_keys(spec: &FlowLawSpec) -> &'static [&'static str] {
    match spec {
        FlowLawSpec::PerfectlyPlastic { .. } => &["yield_mpa"],
        FlowLawSpec::Linear { .. } => &["yield_mpa", "hardening_modulus_mpa"],
        FlowLawSpec::Hollomon { .. } => &["k_mpa", "n"],
        FlowLawSpec::Ludwik { .. } => &["sigma0_mpa", "k_mpa", "n"],
        FlowLawSpec::Swift { .. } => &["k_mpa", "eps0", "n"],
        FlowLawSpec::Voce { .. } => &["sigma0_mpa", "saturation_mpa", "eps_c"],
        FlowLawSpec::Points { .. } => &[],
    }
}

/// A mutable reference to the parameter `key` of a flow law, if it has one.
pub fn flow_param<'a>(spec: &'a mut FlowLawSpec, key: &str) -> Option<&'a mut f64> {
    use FlowLawSpec as S;
    Some(match (spec, key) {
        (S::PerfectlyPlastic { yield_mpa }, "yield_mpa") => yield_mpa,
        (S::Linear { yield_mpa, .. }, "yield_mpa") => yield_mpa,
        (
            S::Linear {
                hardening_modulus_mpa,
                ..
            },
            "hardening_modulus_mpa",
        ) => hardening_modulus_mpa,
        (S::Hollomon { k_mpa, .. }, "k_mpa") => k_mpa,
        (S::Hollomon { n, .. }, "n") => n,
        (S::Ludwik { sigma0_mpa, .. }, "sigma0_mpa") => sigma0_mpa,
        (S::Ludwik { k_mpa, .. }, "k_mpa") => k_mpa,
        (S::Ludwik { n, .. }, "n") => n,
        (S::Swift { k_mpa, .. }, "k_mpa") => k_mpa,
        (S::Swift { eps0, .. }, "eps0") => eps0,
        (S::Swift { n, .. }, "n") => n,
        (S::Voce { sigma0_mpa, .. }, "sigma0_mpa") => sigma0_mpa,
        (S::Voce { saturation_mpa, .. }, "saturation_mpa") => saturation_mpa,
        (S::Voce { eps_c, .. }, "eps_c") => eps_c,
        _ => return None,
    })
}

/// A flow scatter checked against its law: the parameter keys in order and
/// the lower-triangular Cholesky factor of their covariance.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowSpread {
    /// The parameters that scatter (flow block keys), in the file's key order.
    pub keys: Vec<&'static str>,
    /// Row-major lower-triangular factor `L`, `L L^T = covariance`.
    pub cholesky: Vec<f64>,
    /// Standard deviations, in `keys` order.
    pub sd: Vec<f64>,
    /// Specimens the sd came from, if given.
    pub specimens: Option<u32>,
}

impl FlowScatter {
    /// Checks the scatter against `law` (`key` is where it was written) and
    /// factors its covariance.
    pub fn spread(&self, law: &FlowLaw, key: &str) -> Result<FlowSpread, ParamError> {
        let allowed = flow_keys(law.spec());
        for name in self.sd.keys() {
            if !allowed.contains(&name.as_str()) {
                return Err(ParamError::new(
                    format!("{key}.sd"),
                    name,
                    format!(
                        "is not a parameter of the {} law; allowed: {}",
                        law.name(),
                        if allowed.is_empty() {
                            "none (a points table does not scatter by parameter)".to_string()
                        } else {
                            allowed.join(", ")
                        }
                    ),
                ));
            }
        }
        let keys: Vec<&'static str> = allowed
            .iter()
            .copied()
            .filter(|k| self.sd.contains_key(*k))
            .collect();
        let sd: Vec<f64> = keys
            .iter()
            .map(|k| param::non_negative(&format!("{key}.sd.{k}"), self.sd[*k]))
            .collect::<Result<_, _>>()?;
        let n = keys.len();
        let mut corr = vec![0.0; n * n];
        for i in 0..n {
            corr[i * n + i] = 1.0;
        }
        for (c, item) in self.correlation.iter().enumerate() {
            let at = format!("{key}.correlation[{c}]");
            param::within(&format!("{at}.r"), item.r, -1.0, 1.0, Ends::Open)?;
            let index = |name: &String| {
                keys.iter().position(|k| k == name).ok_or_else(|| {
                    ParamError::new(
                        format!("{at}.between"),
                        name,
                        format!("names no parameter under sd; allowed: {}", keys.join(", ")),
                    )
                })
            };
            let (i, j) = (index(&item.between[0])?, index(&item.between[1])?);
            if i == j {
                return Err(ParamError::new(
                    format!("{at}.between"),
                    &item.between[0],
                    "a correlation is between two different parameters",
                ));
            }
            corr[i * n + j] = item.r;
            corr[j * n + i] = item.r;
        }
        let mut cov = corr;
        for i in 0..n {
            for j in 0..n {
                cov[i * n + j] *= sd[i] * sd[j];
            }
        }
        let cholesky = cholesky(&cov, n).map_err(|_| {
            ParamError::new(
                format!("{key}.correlation"),
                format!("{:?}", self.correlation.iter().map(|c| c.r).collect::<Vec<_>>()),
                "the correlations together are impossible (the matrix is not positive semi-definite)",
            )
        })?;
        Ok(FlowSpread {
            keys,
            cholesky,
            sd,
            specimens: self.specimens,
        })
    }
}

/// Cholesky factor of a symmetric positive semi-definite `n x n` matrix
/// (row-major); a zero pivot (a parameter with sd 0) gives a zero column.
fn cholesky(a: &[f64], n: usize) -> Result<Vec<f64>, ()> {
    let mut l = vec![0.0; n * n];
    for i in 0..n {
        for j in 0..=i {
            let mut s = a[i * n + j];
            for k in 0..j {
                s -= l[i * n + k] * l[j * n + k];
            }
            if i == j {
                let scale = a[i * n + i].abs().max(f64::MIN_POSITIVE);
                if s < -1e-12 * scale {
                    return Err(());
                }
                l[i * n + i] = s.max(0.0).sqrt();
            } else {
                let d = l[j * n + j];
                l[i * n + j] = if d > 0.0 { s / d } else { 0.0 };
            }
        }
    }
    Ok(l)
}

/// The scatter of each per-die input checked, with its correlation between dies.
#[derive(Debug, Clone, PartialEq)]
pub struct DieSpread {
    /// The distribution.
    pub law: Law,
    /// Correlation between any two dies, in [0, 1].
    pub between_dies: f64,
}

/// A per-die spread: its law and the required `between_dies`.
pub fn die_spread(spread: &Spread, key: &str) -> Result<DieSpread, ParamError> {
    let law = spread.law(key)?;
    let r = spread.between_dies.ok_or_else(|| {
        ParamError::new(
            format!("{key}.between_dies"),
            "missing",
            "give the correlation between dies in [0, 1]: 1 when one cause moves every die alike (a lubricant lot, the dancer), 0 when each die scatters on its own",
        )
    })?;
    Ok(DieSpread {
        law,
        between_dies: r,
    })
}

/// A spread of an input that is one value per sample (`rod_diameter_mm`),
/// which takes no `between_dies`.
pub fn single_spread(spread: &Spread, key: &str) -> Result<Law, ParamError> {
    if let Some(r) = spread.between_dies {
        return Err(ParamError::new(
            format!("{key}.between_dies"),
            r,
            "the rod has one diameter; between_dies belongs to the per-die inputs",
        ));
    }
    spread.law(key)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cholesky_reproduces_the_covariance() {
        // L L^T = A for A = [[4, 2], [2, 3]]: L = [[2, 0], [1, sqrt 2]] (by hand).
        let l = cholesky(&[4.0, 2.0, 2.0, 3.0], 2).unwrap();
        assert_eq!(l[0], 2.0);
        assert_eq!(l[2], 1.0);
        assert!((l[3] - 2f64.sqrt()).abs() < 1e-15);
        assert!(cholesky(&[1.0, 2.0, 2.0, 1.0], 2).is_err());
    }

    #[test]
    fn flow_scatter_names_unknown_keys() {
        let law = FlowLaw::hollomon(530.0, 0.26).unwrap();
        let s = FlowScatter {
            sd: [("yield_mpa".to_string(), 10.0)].into_iter().collect(),
            correlation: vec![],
            specimens: None,
        };
        let e = s
            .spread(&law, "material.flow_scatter")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("material.flow_scatter.sd") && e.contains("k_mpa, n"),
            "{e}"
        );
    }
}
