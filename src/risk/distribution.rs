//! How one input scatters about its nominal value, and the standard normal
//! functions the sampling needs.
//!
//! Every input is driven by a standard normal score `z` (so that inputs can be
//! correlated through a Gaussian copula) and mapped to its own distribution
//! by the inverse of its cumulative distribution function:
//!
//! - normal: `x = m + s z`;
//! - lognormal with mean `m` and coefficient of variation `c`:
//!   `x = m exp(s z - s^2/2)`, `s^2 = ln(1 + c^2)` (the mean stays `m`);
//! - uniform on `[m - below, m + above]`: `x = lo + (hi - lo) Phi(z)`;
//! - normal of standard deviation `s` truncated to `[m - below, m + above]`:
//!   `x = m + s Phi^-1(Phi(a) + Phi(z) (Phi(b) - Phi(a)))`, `a = -below/s`, `b = above/s`.
//!
//! (Standard results, e.g. Johnson, Kotz & Balakrishnan, *Continuous
//! Univariate Distributions*; from memory.)

use serde::{Deserialize, Serialize};

use crate::param::{self, Ends, ParamError};

/// The shape of a scatter.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Shape {
    /// Normal about the nominal value, with `sd` or `cv`.
    Normal,
    /// Lognormal with its mean at the nominal value, with `cv` (or `sd`).
    Lognormal,
    /// Uniform within `tolerance` (plus or minus) or `below`/`above` the nominal.
    Uniform,
    /// Normal with `sd` or `cv`, cut to `tolerance` or `below`/`above` the nominal.
    TruncatedNormal,
}

impl Shape {
    /// The name as written in the file.
    pub fn name(self) -> &'static str {
        match self {
            Shape::Normal => "normal",
            Shape::Lognormal => "lognormal",
            Shape::Uniform => "uniform",
            Shape::TruncatedNormal => "truncated-normal",
        }
    }
}

/// One input's scatter as written in the file: `{distribution: normal, sd: 0.01}`.
/// The distribution is centred on (normal, uniform with a tolerance,
/// truncated normal) or has its mean at (lognormal) the nominal value the
/// schedule gives.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Spread {
    /// `normal`, `lognormal`, `uniform` or `truncated-normal`.
    pub distribution: Shape,
    /// Standard deviation, in the input's own units.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sd: Option<f64>,
    /// Coefficient of variation (standard deviation over the nominal value).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cv: Option<f64>,
    /// Plus-or-minus limit about the nominal (uniform, truncated normal).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub tolerance: Option<f64>,
    /// How far below the nominal the value may go (uniform, truncated normal).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub below: Option<f64>,
    /// How far above the nominal the value may go (uniform, truncated normal).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub above: Option<f64>,
    /// For an input every die has (friction, semi-angle, die diameter, back
    /// tension): the correlation of its scatter between any two dies, in
    /// [0, 1]: 1 when one cause moves every die alike (a lubricant lot), 0 when
    /// each die scatters on its own.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub between_dies: Option<f64>,
}

/// A spread checked and reduced to what sampling needs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Law {
    /// `m + sd z`, or `m + cv |m| z`.
    Normal { sd: Option<f64>, cv: Option<f64> },
    /// `m exp(s z - s^2/2)`, `s^2 = ln(1 + cv^2)`; `sd` means `cv = sd / m`.
    Lognormal { sd: Option<f64>, cv: Option<f64> },
    /// Uniform on `[m - below, m + above]`.
    Uniform { below: f64, above: f64 },
    /// Normal truncated to `[m - below, m + above]` (either may be infinite).
    Truncated {
        sd: Option<f64>,
        cv: Option<f64>,
        below: f64,
        above: f64,
    },
}

fn bad(key: &str, value: impl std::fmt::Display, allowed: impl Into<String>) -> ParamError {
    ParamError::new(key, value, allowed)
}

impl Spread {
    /// Checks the keys that go with the distribution and their ranges;
    /// `key` is the path in the file, for the message.
    pub fn law(&self, key: &str) -> Result<Law, ParamError> {
        let k = |name: &str| format!("{key}.{name}");
        for (name, v) in [
            ("sd", self.sd),
            ("cv", self.cv),
            ("tolerance", self.tolerance),
            ("below", self.below),
            ("above", self.above),
        ] {
            if let Some(v) = v {
                param::non_negative(&k(name), v)?;
            }
        }
        if let Some(r) = self.between_dies {
            param::within(&k("between_dies"), r, 0.0, 1.0, Ends::Closed)?;
        }
        let spread_size = |shape: Shape| -> Result<(Option<f64>, Option<f64>), ParamError> {
            match (self.sd, self.cv) {
                (Some(_), Some(_)) => Err(bad(
                    &k("sd"),
                    self.sd.unwrap_or_default(),
                    format!("give sd or cv for a {} scatter, not both", shape.name()),
                )),
                (None, None) => Err(bad(
                    &k("sd"),
                    "missing",
                    format!(
                        "a {} scatter needs sd (in the input's units) or cv (a fraction of the nominal)",
                        shape.name()
                    ),
                )),
                (sd, cv) => Ok((sd, cv)),
            }
        };
        let limits = |shape: Shape| -> Result<(f64, f64), ParamError> {
            match (self.tolerance, self.below, self.above) {
                (Some(_), Some(_), _) | (Some(_), _, Some(_)) => Err(bad(
                    &k("tolerance"),
                    self.tolerance.unwrap_or_default(),
                    "give tolerance (plus or minus) or below/above, not both",
                )),
                (Some(t), None, None) => Ok((t, t)),
                (None, None, None) => Err(bad(
                    &k("tolerance"),
                    "missing",
                    format!(
                        "a {} scatter needs tolerance (plus or minus) or below and/or above the nominal",
                        shape.name()
                    ),
                )),
                (None, b, a) => Ok((
                    b.unwrap_or(if shape == Shape::Uniform { 0.0 } else { f64::INFINITY }),
                    a.unwrap_or(if shape == Shape::Uniform { 0.0 } else { f64::INFINITY }),
                )),
            }
        };
        let no_limits = |shape: Shape| -> Result<(), ParamError> {
            if self.tolerance.is_some() || self.below.is_some() || self.above.is_some() {
                return Err(bad(
                    &k("tolerance"),
                    self.tolerance
                        .or(self.below)
                        .or(self.above)
                        .unwrap_or_default(),
                    format!(
                        "a {} scatter has no limits; use distribution: truncated-normal to cut it",
                        shape.name()
                    ),
                ));
            }
            Ok(())
        };
        Ok(match self.distribution {
            s @ Shape::Normal => {
                no_limits(s)?;
                let (sd, cv) = spread_size(s)?;
                Law::Normal { sd, cv }
            }
            s @ Shape::Lognormal => {
                no_limits(s)?;
                let (sd, cv) = spread_size(s)?;
                Law::Lognormal { sd, cv }
            }
            s @ Shape::Uniform => {
                if self.sd.is_some() || self.cv.is_some() {
                    return Err(bad(
                        &k("sd"),
                        self.sd.or(self.cv).unwrap_or_default(),
                        "a uniform scatter is set by tolerance or below/above, not sd or cv",
                    ));
                }
                let (below, above) = limits(s)?;
                Law::Uniform { below, above }
            }
            s @ Shape::TruncatedNormal => {
                let (sd, cv) = spread_size(s)?;
                let (below, above) = limits(s)?;
                Law::Truncated {
                    sd,
                    cv,
                    below,
                    above,
                }
            }
        })
    }
}

/// Standard normal cumulative distribution `Phi(z) = erfc(-z/sqrt 2)/2`.
pub fn normal_cdf(z: f64) -> f64 {
    0.5 * libm::erfc(-z / std::f64::consts::SQRT_2)
}

/// Standard normal density `phi(z) = exp(-z^2/2)/sqrt(2 pi)`.
pub fn normal_pdf(z: f64) -> f64 {
    (-0.5 * z * z).exp() / (2.0 * std::f64::consts::PI).sqrt()
}

/// Inverse standard normal CDF for `p` in (0, 1): Acklam's rational
/// approximation (relative error 1.15e-9), refined by one Halley step on
/// `Phi(z) - p`, which brings it to about 1e-15.
pub fn normal_quantile(p: f64) -> f64 {
    let x = normal_quantile_approx(p);
    if !x.is_finite() {
        return x;
    }
    // One Halley step (Acklam's refinement).
    let e = normal_cdf(x) - p;
    let u = e * (2.0 * std::f64::consts::PI).sqrt() * (0.5 * x * x).exp();
    x - u / (1.0 + 0.5 * x * u)
}

/// Acklam's rational approximation of the inverse standard normal CDF
/// without refinement: relative error below 1.15e-9 (Acklam, 2003; from
/// memory), ample for placing a sample and four times cheaper than
/// [`normal_quantile`].
pub fn normal_quantile_approx(p: f64) -> f64 {
    if p <= 0.0 {
        return f64::NEG_INFINITY;
    }
    if p >= 1.0 {
        return f64::INFINITY;
    }
    const A: [f64; 6] = [
        -3.969_683_028_665_376e1,
        2.209_460_984_245_205e2,
        -2.759_285_104_469_687e2,
        1.383_577_518_672_69e2,
        -3.066_479_806_614_716e1,
        2.506_628_277_459_239,
    ];
    const B: [f64; 5] = [
        -5.447_609_879_822_406e1,
        1.615_858_368_580_409e2,
        -1.556_989_798_598_866e2,
        6.680_131_188_771_972e1,
        -1.328_068_155_288_572e1,
    ];
    const C: [f64; 6] = [
        -7.784_894_002_430_293e-3,
        -3.223_964_580_411_365e-1,
        -2.400_758_277_161_838,
        -2.549_732_539_343_734,
        4.374_664_141_464_968,
        2.938_163_982_698_783,
    ];
    const D: [f64; 4] = [
        7.784_695_709_041_462e-3,
        3.224_671_290_700_398e-1,
        2.445_134_137_142_996,
        3.754_408_661_907_416,
    ];
    let lo = 0.02425;
    if p < lo {
        let q = (-2.0 * p.ln()).sqrt();
        (((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5])
            / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0)
    } else if p <= 1.0 - lo {
        let q = p - 0.5;
        let r = q * q;
        (((((A[0] * r + A[1]) * r + A[2]) * r + A[3]) * r + A[4]) * r + A[5]) * q
            / (((((B[0] * r + B[1]) * r + B[2]) * r + B[3]) * r + B[4]) * r + 1.0)
    } else {
        let q = (-2.0 * (1.0 - p).ln()).sqrt();
        -(((((C[0] * q + C[1]) * q + C[2]) * q + C[3]) * q + C[4]) * q + C[5])
            / ((((D[0] * q + D[1]) * q + D[2]) * q + D[3]) * q + 1.0)
    }
}

/// A spread fixed to one nominal value, with its constants worked out
/// once, so that drawing a value is a few operations.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Sampler {
    /// No scatter: always `m`.
    Fixed(f64),
    /// `m + s z`.
    Normal { m: f64, s: f64 },
    /// `m exp(s z - s^2/2)`.
    Lognormal { m: f64, s: f64 },
    /// `lo + width Phi(z)`.
    Uniform { lo: f64, width: f64 },
    /// `m + s Phi^-1(pa + Phi(z) dp)`, clamped to `[a, b]` in units of `s`.
    Truncated {
        m: f64,
        s: f64,
        a: f64,
        b: f64,
        pa: f64,
        dp: f64,
    },
}

impl Sampler {
    /// The value for standard normal score `z`.
    pub fn value(&self, z: f64) -> f64 {
        match *self {
            Sampler::Fixed(m) => m,
            Sampler::Normal { m, s } => m + s * z,
            Sampler::Lognormal { m, s } => m * (s * z - 0.5 * s * s).exp(),
            Sampler::Uniform { lo, width } => lo + width * normal_cdf(z),
            Sampler::Truncated { m, s, a, b, pa, dp } => {
                let t = normal_quantile_approx(pa + normal_cdf(z) * dp).clamp(a, b);
                m + s * t
            }
        }
    }
}

impl Law {
    /// The sampler for nominal value `m`. A zero spread gives `Fixed(m)`, so
    /// that every sample is `m` exactly.
    pub fn at(&self, m: f64) -> Sampler {
        let size =
            |sd: Option<f64>, cv: Option<f64>| sd.unwrap_or_else(|| cv.unwrap_or(0.0) * m.abs());
        match *self {
            Law::Normal { sd, cv } => {
                let s = size(sd, cv);
                if s == 0.0 {
                    Sampler::Fixed(m)
                } else {
                    Sampler::Normal { m, s }
                }
            }
            Law::Lognormal { sd, cv } => {
                let c = match (sd, cv) {
                    (Some(s), _) if m > 0.0 => s / m,
                    (_, Some(c)) => c,
                    _ => 0.0,
                };
                if c == 0.0 || m <= 0.0 {
                    Sampler::Fixed(m)
                } else {
                    Sampler::Lognormal {
                        m,
                        s: (c * c).ln_1p().sqrt(),
                    }
                }
            }
            Law::Uniform { below, above } => {
                if below == 0.0 && above == 0.0 {
                    Sampler::Fixed(m)
                } else {
                    Sampler::Uniform {
                        lo: m - below,
                        width: below + above,
                    }
                }
            }
            Law::Truncated {
                sd,
                cv,
                below,
                above,
            } => {
                let s = size(sd, cv);
                if s == 0.0 {
                    return Sampler::Fixed(m);
                }
                let (a, b) = (-below / s, above / s);
                let (pa, pb) = (normal_cdf(a), normal_cdf(b));
                Sampler::Truncated {
                    m,
                    s,
                    a,
                    b,
                    pa,
                    dp: pb - pa,
                }
            }
        }
    }

    /// The sampled value for nominal `m` and standard normal score `z`.
    /// A zero spread returns `m` exactly.
    pub fn value(&self, m: f64, z: f64) -> f64 {
        self.at(m).value(z)
    }

    /// Whether the spread is zero (the input does not scatter at all).
    pub fn is_zero(&self) -> bool {
        match *self {
            Law::Normal { sd, cv } | Law::Lognormal { sd, cv } | Law::Truncated { sd, cv, .. } => {
                sd.unwrap_or(0.0) == 0.0 && cv.unwrap_or(0.0) == 0.0
            }
            Law::Uniform { below, above } => below == 0.0 && above == 0.0,
        }
    }

    /// The same spread with its size multiplied by `factor` (sd, cv and
    /// uniform limits; the truncation limits of a truncated normal stay).
    pub fn scaled(&self, factor: f64) -> Law {
        let f = |x: Option<f64>| x.map(|v| v * factor);
        match *self {
            Law::Normal { sd, cv } => Law::Normal {
                sd: f(sd),
                cv: f(cv),
            },
            Law::Lognormal { sd, cv } => Law::Lognormal {
                sd: f(sd),
                cv: f(cv),
            },
            Law::Uniform { below, above } => Law::Uniform {
                below: below * factor,
                above: above * factor,
            },
            Law::Truncated {
                sd,
                cv,
                below,
                above,
            } => Law::Truncated {
                sd: f(sd),
                cv: f(cv),
                below,
                above,
            },
        }
    }

    /// The same law with every figure in the input's unit (`sd`, `below`,
    /// `above`) multiplied by `factor` (> 0), for showing it in another
    /// unit: `factor` = 1/25.4 turns mm into inches. `cv` is relative and
    /// stays; the shape is unchanged because a change of unit is linear.
    /// (Unlike [`Law::scaled`], which widens the spread, truncation included.)
    pub fn in_unit(&self, factor: f64) -> Law {
        let f = |x: Option<f64>| x.map(|v| v * factor);
        match *self {
            Law::Normal { sd, cv } => Law::Normal { sd: f(sd), cv },
            Law::Lognormal { sd, cv } => Law::Lognormal { sd: f(sd), cv },
            Law::Uniform { below, above } => Law::Uniform {
                below: below * factor,
                above: above * factor,
            },
            Law::Truncated {
                sd,
                cv,
                below,
                above,
            } => Law::Truncated {
                sd: f(sd),
                cv,
                below: below * factor,
                above: above * factor,
            },
        }
    }

    /// Whether [`Law::describe`] shows a figure in the input's unit (an
    /// `sd` or a limit), not only the relative `cv`.
    pub fn has_figure_in_unit(&self) -> bool {
        match *self {
            Law::Normal { sd, .. } | Law::Lognormal { sd, .. } => sd.is_some(),
            Law::Uniform { .. } | Law::Truncated { .. } => true,
        }
    }

    /// A short description for the report (`normal, sd 0.01`).
    pub fn describe(&self) -> String {
        let size = |sd: Option<f64>, cv: Option<f64>| match (sd, cv) {
            (Some(s), _) => format!("sd {s}"),
            (_, Some(c)) => format!("cv {c}"),
            _ => String::new(),
        };
        // One side of the range about the nominal: `nominal -0.5`, or the
        // nominal itself when that side has no room (never `-0`).
        let side = |sign: char, x: f64| {
            if x == 0.0 {
                "nominal".to_string()
            } else if x.is_finite() {
                format!("nominal {sign}{x}")
            } else {
                format!("nominal {sign}inf")
            }
        };
        match *self {
            Law::Normal { sd, cv } => format!("normal, {}", size(sd, cv)),
            Law::Lognormal { sd, cv } => format!("lognormal, {}", size(sd, cv)),
            Law::Uniform { below, above } => {
                format!("uniform, {} to {}", side('-', below), side('+', above))
            }
            Law::Truncated {
                sd,
                cv,
                below,
                above,
            } => format!(
                "truncated normal, {}, within {} to {}",
                size(sd, cv),
                side('-', below),
                side('+', above)
            ),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_law_in_another_unit_samples_the_same_values_in_that_unit() {
        // A change of unit is x' = x / c: a sample m + sd z becomes
        // m/c + (sd/c) z, so the law in the new unit drawn at m/c with the
        // same normal score gives the old value over c (definition of a
        // linear change of variable). c = 25.4 (mm per inch, exact).
        let c = 25.4;
        for law in [
            Law::Normal {
                sd: Some(0.05),
                cv: None,
            },
            Law::Uniform {
                below: 0.01,
                above: 0.03,
            },
            Law::Truncated {
                sd: Some(0.006),
                cv: None,
                below: 0.0,
                above: 0.02,
            },
            Law::Truncated {
                sd: None,
                cv: Some(0.002),
                below: 0.004,
                above: 0.02,
            },
        ] {
            let inch = law.in_unit(1.0 / c);
            for z in [-2.5, -1.0, 0.0, 0.3, 1.7, 3.0] {
                let mm = law.value(4.0, z);
                let got = inch.value(4.0 / c, z);
                assert!(
                    (got - mm / c).abs() < 1e-12,
                    "{law:?} z {z}: {got} vs {}",
                    mm / c
                );
            }
        }
    }

    #[test]
    fn quantile_inverts_the_cdf() {
        // Phi^-1(Phi(z)) = z: the definition of an inverse. (Far in the upper
        // tail p = Phi(z) itself rounds: 1 - p keeps only about 16 - |log10(1 - p)|
        // digits, so the check stops at z = 3 there.)
        for &z in &[-8.0, -5.0, -2.5, -1.0, -0.1, 0.0, 0.3, 1.7, 3.0] {
            let back = normal_quantile(normal_cdf(z));
            assert!((back - z).abs() < 1e-12 * z.abs().max(1.0), "{z} -> {back}");
        }
    }

    #[test]
    fn the_unrefined_quantile_is_within_its_stated_error() {
        // Acklam's stated bound, relative error below 1.15e-9.
        for i in 1..2000 {
            let p = i as f64 / 2000.0;
            let (a, b) = (normal_quantile_approx(p), normal_quantile(p));
            assert!(
                (a - b).abs() <= 1.2e-9 * b.abs().max(1e-3),
                "{p}: {a} vs {b}"
            );
        }
    }

    #[test]
    fn cdf_matches_table_values() {
        // Abramowitz & Stegun Table 26.1 (published): Phi(1) = 0.8413447461,
        // Phi(1.96) = 0.9750021049, Phi(-3) = 0.0013498980.
        assert!((normal_cdf(1.0) - 0.841_344_746_1).abs() < 1e-10);
        assert!((normal_cdf(1.96) - 0.975_002_104_9).abs() < 1e-10);
        assert!((normal_cdf(-3.0) - 0.001_349_898_0).abs() < 1e-10);
    }

    #[test]
    fn lognormal_keeps_its_mean_and_cv() {
        // E[exp(sZ - s^2/2)] = 1 and Var = exp(s^2) - 1 = cv^2 (lognormal moments),
        // checked by midpoint integration over the normal score z.
        let law = Law::Lognormal {
            sd: None,
            cv: Some(0.3),
        };
        let (mut m1, mut m2) = (0.0, 0.0);
        let n = 200_000;
        let h = 20.0 / n as f64;
        for i in 0..n {
            let z = -10.0 + (i as f64 + 0.5) * h;
            let x = law.value(2.0, z);
            m1 += x * normal_pdf(z) * h;
            m2 += x * x * normal_pdf(z) * h;
        }
        assert!((m1 - 2.0).abs() < 1e-9);
        let cv = (m2 - m1 * m1).sqrt() / m1;
        assert!((cv - 0.3).abs() < 1e-9);
    }

    #[test]
    fn truncated_normal_stays_within_its_limits() {
        let law = Law::Truncated {
            sd: Some(1.0),
            cv: None,
            below: 0.0,
            above: 2.0,
        };
        for &z in &[-40.0, -3.0, 0.0, 3.0, 40.0] {
            let x = law.value(10.0, z);
            assert!((10.0..=12.0).contains(&x), "{z} -> {x}");
        }
        // The median of a normal cut to [0, 2] sd above its centre:
        // Phi^-1((Phi(0) + Phi(2))/2) (the definition of the median).
        let med = law.value(0.0, 0.0);
        // (Sampling uses the unrefined quantile: within its 1.15e-9 bound.)
        let want = normal_quantile(0.5 * (0.5 + normal_cdf(2.0)));
        assert!((med - want).abs() < 1.2e-9 * want.abs());
    }

    #[test]
    fn spread_needs_the_keys_of_its_shape() {
        let s = Spread {
            distribution: Shape::Uniform,
            sd: Some(0.1),
            cv: None,
            tolerance: None,
            below: None,
            above: None,
            between_dies: None,
        };
        let e = s.law("scatter.friction").unwrap_err().to_string();
        assert!(e.contains("scatter.friction.sd"), "{e}");
        let s = Spread {
            distribution: Shape::Normal,
            sd: None,
            ..s
        };
        let e = s.law("scatter.friction").unwrap_err().to_string();
        assert!(e.contains("needs sd"), "{e}");
    }
}
