//! Fitting flow-stress laws to a tensile-test record.
//!
//! From an engineering stress-strain record this module finds Young's modulus
//! from the initial linear part, the 0.2 % offset yield stress and the maximum
//! load (uniform elongation), converts the points between yield and maximum
//! load to true stress and true plastic strain (`eps_t = ln(1 + e)`,
//! `sigma_t = s (1 + e)`, `eps_p = eps_t - sigma_t / E`: volume constancy, as in
//! Dieter, *Mechanical Metallurgy*, ch. 8, from memory) and fits each law of
//! [`crate::flow`] to them: perfectly plastic and linear hardening by ordinary
//! least squares, Hollomon by least squares on `ln sigma = ln K + n ln eps`,
//! Ludwik, Swift and Voce by a damped Gauss-Newton (Levenberg-Marquardt)
//! iteration written here for three parameters (Marquardt, SIAM J. Appl. Math.
//! 11 (1963) 431; from memory). Two total-strain forms, elastic-perfectly-plastic
//! and elastic-linear, are fitted to the whole record up to maximum load, with
//! the modulus held at its measured value. Each fit reports its standard errors
//! (`s^2 (J^T J)^-1`, `s^2 = SSR / (m - p)`), RMS error, R^2 and Akaike's
//! information criterion in its least-squares form `AIC = m ln(SSR/m) + 2 p`
//! (Burnham & Anderson, *Model Selection and Multimodel Inference*, from memory).
//!
//! Nothing here prints, reads files or draws: the caller gets a [`FitReport`]
//! with diagnostics (converged, iterations) and [`FitWarning`]s to word.

use std::fmt;

use crate::flow::FlowLaw;
use crate::param::{self, ParamError};

/// Fewest points in the plastic range that a fit accepts: a three-parameter
/// law needs a good margin over three.
pub const MIN_PLASTIC_POINTS: usize = 8;

/// Fewest points in the linear (elastic) part used for Young's modulus.
pub const MIN_ELASTIC_POINTS: usize = 5;

/// The offset of the offset yield stress: 0.2 % strain (common practice,
/// ASTM E8 / ISO 6892-1 proof stress Rp0.2).
pub const YIELD_OFFSET_STRAIN: f64 = 0.002;

/// How far (percent of the highest stress) the stress must fall after its
/// highest value for that to count as the maximum load rather than noise at
/// the end of a test stopped early.
pub const MAX_LOAD_DROP_PERCENT: f64 = 1.0;

/// Most Levenberg-Marquardt iterations before a fit is reported as not converged.
pub const MAX_ITERATIONS: usize = 200;

/// Why a record cannot be fitted. Each message names the field, the value
/// and what is allowed; `point` is the 1-based position of the data point
/// among those passed in.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    /// A scalar setting is out of range.
    #[error(transparent)]
    Param(#[from] ParamError),
    /// Two columns of one record have different lengths.
    #[error("`{field}` has {found} values but `{other}` has {expected}: each point needs both")]
    LengthMismatch {
        /// The shorter or longer column.
        field: &'static str,
        /// Its length.
        found: usize,
        /// The column it is compared with.
        other: &'static str,
        /// That column's length.
        expected: usize,
    },
    /// A value is NaN or infinite.
    #[error("point {point}: `{field}` = {value} is not allowed: must be a finite number")]
    NotFinite {
        /// 1-based point.
        point: usize,
        /// The column.
        field: &'static str,
        /// The value.
        value: f64,
    },
    /// A value is below zero.
    #[error("point {point}: `{field}` = {value} is not allowed: must be 0 or greater")]
    Negative {
        /// 1-based point.
        point: usize,
        /// The column.
        field: &'static str,
        /// The value.
        value: f64,
    },
    /// Strain does not increase from one point to the next.
    #[error("point {point}: `{field}` = {value} is not allowed: strain must increase from point to point (previous point: {previous})")]
    NotIncreasing {
        /// 1-based point.
        point: usize,
        /// The strain column.
        field: &'static str,
        /// The value.
        value: f64,
        /// The previous point's value.
        previous: f64,
    },
    /// The record as a whole is too short.
    #[error("the record has {}: at least {needed} are needed", points(*found))]
    TooFewPoints {
        /// Points given.
        found: usize,
        /// Points needed.
        needed: usize,
    },
    /// Too few points before half the maximum stress to find Young's modulus.
    #[error("the elastic range (the points before the stress first reaches half its highest, {below_mpa:.1} MPa) has {}: at least {needed} are needed to find Young's modulus; record the start of the test more densely", points(*found))]
    TooFewElasticPoints {
        /// Points found in the range.
        found: usize,
        /// Points needed.
        needed: usize,
        /// Half the highest stress, MPa: the range ends at the first point that reaches it.
        below_mpa: f64,
    },
    /// Too few points between yield and maximum load.
    #[error("the plastic range ({range}) has {}: at least {needed} are needed; record the test more densely", points(*found))]
    TooFewPlasticPoints {
        /// Points found in the range.
        found: usize,
        /// Points needed.
        needed: usize,
        /// The range, in words.
        range: String,
    },
    /// No rising linear part was found at the start of the record.
    #[error("no initial linear part: the stress does not rise at the start of the record, so Young's modulus cannot be found")]
    NoLinearPart,
    /// The curve never falls below the 0.2 % offset line.
    #[error("the record never yields: the stress stays above the 0.2 % offset line (E = {youngs_modulus_gpa:.4} GPa) up to maximum load")]
    NeverYields {
        /// The modulus used for the offset line, GPa.
        youngs_modulus_gpa: f64,
    },
    /// The stress never falls clearly after its highest value: the test
    /// stopped before maximum load.
    #[error("the record never reaches a maximum load: after its highest stress ({stress_mpa} MPa at point {point}) it falls by less than {MAX_LOAD_DROP_PERCENT} % to the last point; run the test past maximum load")]
    NoMaximumLoad {
        /// 1-based point of the highest stress.
        point: usize,
        /// The highest stress, MPa.
        stress_mpa: f64,
    },
    /// A law was fitted to fewer points than it needs.
    #[error("`{law}` needs at least {} with strain above 0 to fit; {found} given", points(*needed))]
    TooFewForLaw {
        /// The law.
        law: &'static str,
        /// Points given.
        found: usize,
        /// Points needed.
        needed: usize,
    },
}

/// "1 point", "5 points".
fn points(n: usize) -> String {
    if n == 1 {
        "1 point".into()
    } else {
        format!("{n} points")
    }
}

impl FitError {
    /// The 1-based data point an error is about, when it is about one.
    pub fn point(&self) -> Option<usize> {
        match self {
            FitError::NotFinite { point, .. }
            | FitError::Negative { point, .. }
            | FitError::NotIncreasing { point, .. }
            | FitError::NoMaximumLoad { point, .. } => Some(*point),
            _ => None,
        }
    }
}

/// What the two columns of a record are.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DataKind {
    /// Engineering strain (fraction) and engineering stress (MPa), elastic part included.
    Engineering,
    /// True plastic strain and true stress (MPa), already converted; fitted as given.
    True,
}

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
    /// Standard error, `sqrt` of the diagonal of `s^2 (J^T J)^-1`; `None`
    /// when the normal matrix is singular.
    pub std_error: Option<f64>,
}

/// The fit of one law.
#[derive(Debug, Clone, PartialEq)]
pub struct LawFit {
    /// Which law.
    pub law: FitLaw,
    /// Parameters in schedule-file order.
    pub params: Vec<ParamEstimate>,
    /// Points fitted.
    pub points: usize,
    /// Root-mean-square residual `sqrt(SSR / m)`, MPa.
    pub rms_mpa: f64,
    /// Coefficient of determination `1 - SSR / SST`.
    pub r2: f64,
    /// Akaike's criterion `m ln(SSR / m) + 2 p` (lower is better; comparable
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
}

/// Something a metallurgist should look at; never a refusal.
#[derive(Debug, Clone, PartialEq)]
pub enum FitWarning {
    /// An iterative fit stopped before meeting its tolerance.
    NotConverged {
        /// The law.
        law: FitLaw,
        /// Iterations taken.
        iterations: usize,
    },
    /// The fitted parameters do not make a law a schedule accepts.
    NotAFlowLaw {
        /// The law.
        law: FitLaw,
        /// Why, from the flow-law validation.
        reason: String,
    },
    /// Considere: the uniform strain should equal Hollomon's n; warned when
    /// they differ by more than 20 % of n.
    Considere {
        /// True plastic strain at maximum load.
        uniform_strain: f64,
        /// Hollomon exponent.
        n: f64,
    },
    /// The best law's predicted engineering UTS differs from the measured one
    /// by more than 3 %.
    UtsMismatch {
        /// The law.
        law: FitLaw,
        /// Predicted, MPa.
        fitted_mpa: f64,
        /// Measured, MPa.
        measured_mpa: f64,
    },
    /// Hollomon n outside 0.2 to 0.5 (common practice).
    ExponentUnusual {
        /// Hollomon exponent.
        n: f64,
    },
    /// Hollomon K outside G/1000 to G/100 (common practice).
    StrengthUnusual {
        /// Hollomon K, MPa.
        k_mpa: f64,
        /// G/1000, MPa.
        low_mpa: f64,
        /// G/100, MPa.
        high_mpa: f64,
    },
    /// The laws are fitted over a strain range that drawing goes far beyond.
    Extrapolated {
        /// Lowest fitted plastic strain.
        strain_from: f64,
        /// Highest fitted plastic strain.
        strain_to: f64,
        /// The strain a schedule reaches, when given.
        reach_strain: Option<f64>,
    },
}

impl fmt::Display for FitWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FitWarning::NotConverged { law, iterations } => write!(
                f,
                "{law}: the fit did not converge in {iterations} iterations; treat its figures as rough"
            ),
            FitWarning::NotAFlowLaw { law, reason } => write!(
                f,
                "{law}: the fitted parameters are not a law a schedule accepts ({reason})"
            ),
            FitWarning::Considere { uniform_strain, n } => write!(
                f,
                "Considere: uniform strain {uniform_strain:.4} differs from Hollomon n = {n:.4} by more than 20 %; the record may not follow a power law to maximum load"
            ),
            FitWarning::UtsMismatch {
                law,
                fitted_mpa,
                measured_mpa,
            } => write!(
                f,
                "{law}: predicted engineering UTS {fitted_mpa:.1} MPa differs from the measured {measured_mpa:.1} MPa by more than 3 %"
            ),
            FitWarning::ExponentUnusual { n } => write!(
                f,
                "Hollomon n = {n:.4} lies outside 0.2 to 0.5, the usual range for metals; check the record"
            ),
            FitWarning::StrengthUnusual {
                k_mpa,
                low_mpa,
                high_mpa,
            } => write!(
                f,
                "Hollomon K = {k_mpa:.1} MPa lies outside G/1000 to G/100 ({low_mpa:.1} to {high_mpa:.1} MPa); check the record and the shear modulus"
            ),
            FitWarning::Extrapolated {
                strain_from,
                strain_to,
                reach_strain,
            } => {
                write!(
                    f,
                    "the laws are fitted over true plastic strain {strain_from:.4} to {strain_to:.4} only"
                )?;
                match reach_strain {
                    Some(r) if *r > *strain_to => write!(
                        f,
                        "; the schedule reaches {r:.3}, {:.1} times the top of that range, where the laws part company (see the stress at the reach strain)",
                        r / strain_to
                    ),
                    Some(r) => write!(f, "; the schedule reaches {r:.3}, inside that range"),
                    None => write!(
                        f,
                        "; drawing goes far beyond (several units of strain): give the schedule's accumulated strain to see how far"
                    ),
                }
            }
        }
    }
}

/// Settings of [`fit_record`].
#[derive(Debug, Clone, PartialEq)]
pub struct FitOptions {
    /// What the two columns are.
    pub data: DataKind,
    /// Shear modulus G, GPa, for the K check (G/1000 to G/100); `None` skips it.
    pub shear_modulus_gpa: Option<f64>,
    /// The accumulated strain a schedule reaches, for the extrapolation warning
    /// and the stress at that strain; `None` skips them.
    pub reach_strain: Option<f64>,
}

impl Default for FitOptions {
    fn default() -> Self {
        Self {
            data: DataKind::Engineering,
            shear_modulus_gpa: None,
            reach_strain: None,
        }
    }
}

/// Everything found in one record.
#[derive(Debug, Clone, PartialEq)]
pub struct FitReport {
    /// What the columns were.
    pub data: DataKind,
    /// Points in the record.
    pub points_read: usize,
    /// Young's modulus from the initial linear part, GPa (engineering records).
    pub youngs_modulus_gpa: Option<f64>,
    /// Strain at which the linear part meets zero stress (toe correction,
    /// subtracted from every strain), engineering records.
    pub toe_strain: Option<f64>,
    /// 0.2 % offset yield stress, MPa (engineering records).
    pub yield_mpa: Option<f64>,
    /// Measured engineering UTS (maximum load over original area), MPa.
    pub uts_mpa: Option<f64>,
    /// True plastic strain at maximum load (uniform strain).
    pub uniform_strain: Option<f64>,
    /// True plastic strain of the fitted points.
    pub plastic_strain: Vec<f64>,
    /// True stress of the fitted points, MPa.
    pub true_stress_mpa: Vec<f64>,
    /// Total true strain up to maximum load (for the total-strain forms).
    pub total_strain: Vec<f64>,
    /// True stress up to maximum load, MPa.
    pub total_stress_mpa: Vec<f64>,
    /// Every fit, in [`FitLaw::ALL`] order (the total-strain forms only for
    /// engineering records).
    pub fits: Vec<LawFit>,
    /// The plastic-strain law with the lowest AIC among those that are valid laws.
    pub best: Option<FitLaw>,
    /// The reach strain given.
    pub reach_strain: Option<f64>,
    /// Checks that call for a look.
    pub warnings: Vec<FitWarning>,
}

impl FitReport {
    /// Lowest fitted plastic strain.
    pub fn strain_from(&self) -> f64 {
        self.plastic_strain
            .iter()
            .copied()
            .fold(f64::INFINITY, f64::min)
    }

    /// Highest fitted plastic strain.
    pub fn strain_to(&self) -> f64 {
        self.plastic_strain.iter().copied().fold(0.0, f64::max)
    }

    /// The fit of `law`, if it was made.
    pub fn fit(&self, law: FitLaw) -> Option<&LawFit> {
        self.fits.iter().find(|f| f.law == law)
    }
}

/// Cross-section of a round specimen, `A = pi d^2 / 4` (mm^2).
pub fn round_area_mm2(diameter_mm: f64) -> Result<f64, ParamError> {
    let d = param::positive("diameter_mm", diameter_mm)?;
    Ok(std::f64::consts::PI * d * d / 4.0)
}

/// Engineering strain `e = dL / L0` and stress `s = F / A0` (N/mm^2 = MPa)
/// from force (N) and extension (mm).
pub fn engineering_from_force(
    force_n: &[f64],
    extension_mm: &[f64],
    gauge_length_mm: f64,
    area_mm2: f64,
) -> Result<(Vec<f64>, Vec<f64>), FitError> {
    let l0 = param::positive("gauge_length_mm", gauge_length_mm)?;
    let a0 = param::positive("area_mm2", area_mm2)?;
    same_length("force", force_n, "extension", extension_mm)?;
    let strain = extension_mm.iter().map(|x| x / l0).collect();
    let stress = force_n.iter().map(|f| f / a0).collect();
    Ok((strain, stress))
}

fn same_length(
    field: &'static str,
    a: &[f64],
    other: &'static str,
    b: &[f64],
) -> Result<(), FitError> {
    if a.len() != b.len() {
        return Err(FitError::LengthMismatch {
            field,
            found: a.len(),
            other,
            expected: b.len(),
        });
    }
    Ok(())
}

/// Checks a record: equal lengths, finite, not negative, strain strictly increasing.
fn validate_record(strain: &[f64], stress_mpa: &[f64]) -> Result<(), FitError> {
    same_length("stress", stress_mpa, "strain", strain)?;
    for (i, (&e, &s)) in strain.iter().zip(stress_mpa).enumerate() {
        let point = i + 1;
        for (field, value) in [("strain", e), ("stress", s)] {
            if !value.is_finite() {
                return Err(FitError::NotFinite {
                    point,
                    field,
                    value,
                });
            }
            if value < 0.0 {
                return Err(FitError::Negative {
                    point,
                    field,
                    value,
                });
            }
        }
        if i > 0 && e <= strain[i - 1] {
            return Err(FitError::NotIncreasing {
                point,
                field: "strain",
                value: e,
                previous: strain[i - 1],
            });
        }
    }
    Ok(())
}

/// Young's modulus and toe strain from the initial linear part.
///
/// The steepest straight run of the curve before half the maximum stress:
/// least-squares lines through every window of `w` consecutive points
/// (`w` = a third of those points, 5 to 25), the window with the highest slope
/// kept (common practice for a record without a separate modulus test; the
/// tangent modulus only falls once yielding starts). Returns
/// `(E in MPa, toe strain)` where the line meets zero stress.
fn elastic_line(strain: &[f64], stress_mpa: &[f64], max_mpa: f64) -> Result<(f64, f64), FitError> {
    let end = stress_mpa
        .iter()
        .position(|&s| s >= 0.5 * max_mpa)
        .unwrap_or(stress_mpa.len());
    if end < MIN_ELASTIC_POINTS {
        return Err(FitError::TooFewElasticPoints {
            found: end,
            needed: MIN_ELASTIC_POINTS,
            below_mpa: 0.5 * max_mpa,
        });
    }
    let w = (end / 3).clamp(MIN_ELASTIC_POINTS, 25);
    let mut best: Option<(f64, f64)> = None;
    let mut sums = LineSums::default();
    for i in 0..end {
        sums.add(strain[i], stress_mpa[i]);
        if i >= w {
            sums.remove(strain[i - w], stress_mpa[i - w]);
        }
        if i + 1 >= w {
            if let Some((a, b)) = sums.line() {
                if b > 0.0 && best.is_none_or(|(_, bb)| b > bb) {
                    best = Some((a, b));
                }
            }
        }
    }
    let (a, e) = best.ok_or(FitError::NoLinearPart)?;
    Ok((e, -a / e))
}

/// Running sums for a least-squares line `y = a + b x`.
#[derive(Debug, Default, Clone, Copy)]
struct LineSums {
    m: f64,
    sx: f64,
    sy: f64,
    sxx: f64,
    sxy: f64,
    syy: f64,
}

impl LineSums {
    fn add(&mut self, x: f64, y: f64) {
        self.m += 1.0;
        self.sx += x;
        self.sy += y;
        self.sxx += x * x;
        self.sxy += x * y;
        self.syy += y * y;
    }
    fn remove(&mut self, x: f64, y: f64) {
        self.m -= 1.0;
        self.sx -= x;
        self.sy -= y;
        self.sxx -= x * x;
        self.sxy -= x * y;
        self.syy -= y * y;
    }
    fn sub(&self, o: &LineSums) -> LineSums {
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
    fn line(&self) -> Option<(f64, f64)> {
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

/// Fits every law to a tensile record and runs the metallurgist's checks.
///
/// For [`DataKind::Engineering`] `strain` is engineering strain (fraction)
/// and `stress_mpa` engineering stress: the modulus, offset yield and maximum
/// load are found first and the points from yield to maximum load are fitted
/// in true plastic strain. For [`DataKind::True`] the points with strain above
/// 0 are fitted as given and the total-strain forms are left out.
pub fn fit_record(
    strain: &[f64],
    stress_mpa: &[f64],
    options: &FitOptions,
) -> Result<FitReport, FitError> {
    if let Some(g) = options.shear_modulus_gpa {
        param::positive("shear_modulus_gpa", g)?;
    }
    if let Some(r) = options.reach_strain {
        param::positive("reach_strain", r)?;
    }
    validate_record(strain, stress_mpa)?;
    let mut report = match options.data {
        DataKind::Engineering => engineering_points(strain, stress_mpa)?,
        DataKind::True => true_points(strain, stress_mpa)?,
    };
    report.reach_strain = options.reach_strain;

    for law in FitLaw::PLASTIC {
        let fit = fit_law(law, &report.plastic_strain, &report.true_stress_mpa)?;
        report.fits.push(fit);
    }
    if let Some(e_gpa) = report.youngs_modulus_gpa {
        for law in [FitLaw::ElasticPerfectlyPlastic, FitLaw::ElasticLinear] {
            let fit = fit_elastic_form(law, &report.total_strain, &report.total_stress_mpa, e_gpa)?;
            report.fits.push(fit);
        }
    }
    for fit in &mut report.fits {
        if let (Some(law), Some(r)) = (&fit.flow_law, options.reach_strain) {
            fit.stress_at_reach_mpa = Some(law.stress_mpa(r));
        }
    }
    report.best = report
        .fits
        .iter()
        .filter(|f| !f.law.is_total_strain_form() && f.flow_law.is_some() && f.aic.is_finite())
        .min_by(|a, b| a.aic.total_cmp(&b.aic))
        .map(|f| f.law);
    report.warnings = checks(&report, options);
    Ok(report)
}

fn engineering_points(strain: &[f64], stress_mpa: &[f64]) -> Result<FitReport, FitError> {
    let m = strain.len();
    if m < 2 * MIN_ELASTIC_POINTS {
        return Err(FitError::TooFewPoints {
            found: m,
            needed: 2 * MIN_ELASTIC_POINTS,
        });
    }
    // Maximum load: the first highest stress, which the record must fall clearly below afterwards.
    let mut imax = 0;
    for i in 1..m {
        if stress_mpa[i] > stress_mpa[imax] {
            imax = i;
        }
    }
    let uts = stress_mpa[imax];
    if uts <= 0.0 {
        return Err(FitError::NoLinearPart);
    }
    let lowest_after = stress_mpa[imax..].iter().copied().fold(uts, f64::min);
    if lowest_after > uts * (1.0 - MAX_LOAD_DROP_PERCENT / 100.0) {
        return Err(FitError::NoMaximumLoad {
            point: imax + 1,
            stress_mpa: uts,
        });
    }
    let (e_mpa, toe) = elastic_line(strain, stress_mpa, uts)?;
    let youngs_modulus_gpa = e_mpa / 1000.0;
    // 0.2 % offset: the first point at or below the offset line, up to maximum load.
    let gap = |i: usize| stress_mpa[i] - e_mpa * (strain[i] - toe - YIELD_OFFSET_STRAIN);
    let iy = (1..=imax)
        .find(|&i| gap(i) <= 0.0 && gap(i - 1) > 0.0)
        .ok_or(FitError::NeverYields { youngs_modulus_gpa })?;
    let (g0, g1) = (gap(iy - 1), gap(iy));
    let t = g0 / (g0 - g1);
    let yield_mpa = stress_mpa[iy - 1] + t * (stress_mpa[iy] - stress_mpa[iy - 1]);

    let mut total_strain = Vec::with_capacity(imax + 1);
    let mut total_stress = Vec::with_capacity(imax + 1);
    let mut plastic_strain = Vec::with_capacity(imax + 1 - iy);
    let mut true_stress = Vec::with_capacity(imax + 1 - iy);
    for i in 0..=imax {
        let e = strain[i] - toe;
        let (et, st) = ((1.0 + e).ln(), stress_mpa[i] * (1.0 + e));
        total_strain.push(et);
        total_stress.push(st);
        let ep = et - st / e_mpa;
        if i >= iy && ep > 0.0 {
            plastic_strain.push(ep);
            true_stress.push(st);
        }
    }
    let uniform_strain = {
        let e = strain[imax] - toe;
        (1.0 + e).ln() - stress_mpa[imax] * (1.0 + e) / e_mpa
    };
    if plastic_strain.len() < MIN_PLASTIC_POINTS {
        return Err(FitError::TooFewPlasticPoints {
            found: plastic_strain.len(),
            needed: MIN_PLASTIC_POINTS,
            range: "0.2 % offset yield to maximum load".into(),
        });
    }
    Ok(FitReport {
        data: DataKind::Engineering,
        points_read: m,
        youngs_modulus_gpa: Some(youngs_modulus_gpa),
        toe_strain: Some(toe),
        yield_mpa: Some(yield_mpa),
        uts_mpa: Some(uts),
        uniform_strain: Some(uniform_strain),
        plastic_strain,
        true_stress_mpa: true_stress,
        total_strain,
        total_stress_mpa: total_stress,
        fits: Vec::new(),
        best: None,
        reach_strain: None,
        warnings: Vec::new(),
    })
}

fn true_points(strain: &[f64], stress_mpa: &[f64]) -> Result<FitReport, FitError> {
    let (x, y): (Vec<f64>, Vec<f64>) = strain
        .iter()
        .zip(stress_mpa)
        .filter(|(e, _)| **e > 0.0)
        .map(|(e, s)| (*e, *s))
        .unzip();
    if x.len() < MIN_PLASTIC_POINTS {
        return Err(FitError::TooFewPlasticPoints {
            found: x.len(),
            needed: MIN_PLASTIC_POINTS,
            range: "true plastic strain above 0".into(),
        });
    }
    Ok(FitReport {
        data: DataKind::True,
        points_read: strain.len(),
        youngs_modulus_gpa: None,
        toe_strain: None,
        yield_mpa: None,
        uts_mpa: None,
        uniform_strain: None,
        plastic_strain: x,
        true_stress_mpa: y,
        total_strain: Vec::new(),
        total_stress_mpa: Vec::new(),
        fits: Vec::new(),
        best: None,
        reach_strain: None,
        warnings: Vec::new(),
    })
}

fn checks(report: &FitReport, options: &FitOptions) -> Vec<FitWarning> {
    let mut out = Vec::new();
    for fit in &report.fits {
        if !fit.converged {
            out.push(FitWarning::NotConverged {
                law: fit.law,
                iterations: fit.iterations,
            });
        }
        if fit.flow_law.is_none() {
            out.push(FitWarning::NotAFlowLaw {
                law: fit.law,
                reason: flow_law_of(fit.law, &fit.params)
                    .err()
                    .unwrap_or_else(|| "parameters not finite".into()),
            });
        }
    }
    if let Some(h) = report.fit(FitLaw::Hollomon) {
        if let (Some(n), Some(k)) = (h.param("n"), h.param("k_mpa")) {
            if let Some(eu) = report.uniform_strain {
                if (eu - n).abs() > 0.2 * n {
                    out.push(FitWarning::Considere {
                        uniform_strain: eu,
                        n,
                    });
                }
            }
            if !(0.2..=0.5).contains(&n) {
                out.push(FitWarning::ExponentUnusual { n });
            }
            if let Some(g) = options.shear_modulus_gpa {
                let g_mpa = g * 1000.0;
                let (low_mpa, high_mpa) = (g_mpa / 1000.0, g_mpa / 100.0);
                if k < low_mpa || k > high_mpa {
                    out.push(FitWarning::StrengthUnusual {
                        k_mpa: k,
                        low_mpa,
                        high_mpa,
                    });
                }
            }
        }
    }
    if let (Some(best), Some(measured)) = (report.best.and_then(|b| report.fit(b)), report.uts_mpa)
    {
        if let Some(fitted) = best.uts_mpa {
            if (fitted - measured).abs() > 0.03 * measured {
                out.push(FitWarning::UtsMismatch {
                    law: best.law,
                    fitted_mpa: fitted,
                    measured_mpa: measured,
                });
            }
        }
    }
    out.push(FitWarning::Extrapolated {
        strain_from: report.strain_from(),
        strain_to: report.strain_to(),
        reach_strain: options.reach_strain,
    });
    out
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
fn flow_law_of(law: FitLaw, params: &[ParamEstimate]) -> Result<FlowLaw, String> {
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

/// Residual statistics of a fit: `(SSR, rms, r2, aic)` for `p` parameters.
fn statistics(y: &[f64], model: impl Fn(usize) -> f64, p: usize) -> (f64, f64, f64, f64) {
    let m = y.len() as f64;
    let mean = y.iter().sum::<f64>() / m;
    let (mut ssr, mut sst) = (0.0, 0.0);
    for (i, &yi) in y.iter().enumerate() {
        let r = yi - model(i);
        ssr += r * r;
        sst += (yi - mean) * (yi - mean);
    }
    let rms = (ssr / m).sqrt();
    let r2 = if sst > 0.0 { 1.0 - ssr / sst } else { f64::NAN };
    // A perfect fit has ln(0) = -inf; floor SSR so that AIC stays comparable.
    let aic = m * (ssr.max(f64::MIN_POSITIVE) / m).ln() + 2.0 * p as f64;
    (ssr, rms, r2, aic)
}

fn finish(
    law: FitLaw,
    params: Vec<ParamEstimate>,
    y: &[f64],
    model: impl Fn(usize) -> f64,
    converged: bool,
    iterations: usize,
) -> LawFit {
    let (_, rms_mpa, r2, aic) = statistics(y, model, params.len());
    let flow_law = flow_law_of(law, &params).ok();
    let uts_mpa = flow_law.as_ref().map(|l| engineering_uts_mpa(l).0);
    LawFit {
        law,
        params,
        points: y.len(),
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
/// - Hollomon: least-squares line `ln sigma = ln K + n ln eps`, so the
///   standard error of K is `K se(ln K)`;
/// - Ludwik, Swift, Voce: Levenberg-Marquardt on the stress residuals, with
///   each positive parameter carried as its logarithm and n as a logistic
///   (so it stays in (0, 1)), Voce's ss as `s0 + exp(t)` (so ss > s0). Ludwik
///   and Swift start from log-log fits like Hollomon's (Ludwik's of
///   `sigma - s0` for trial s0, Swift's of `ln(e0 + eps)` for trial e0), Voce
///   from the best of a log-spaced scan of ec with the other two solved linearly.
///
/// The total-strain forms need the modulus: use [`fit_elastic_form`].
pub fn fit_law(law: FitLaw, strain: &[f64], stress_mpa: &[f64]) -> Result<LawFit, FitError> {
    same_length("stress", stress_mpa, "strain", strain)?;
    let needed = match law {
        FitLaw::PerfectlyPlastic => 1,
        FitLaw::Linear | FitLaw::Hollomon => 2,
        _ => 4,
    };
    let (x, y): (Vec<f64>, Vec<f64>) = strain
        .iter()
        .zip(stress_mpa)
        .filter(|(e, s)| e.is_finite() && s.is_finite() && (**e > 0.0 || law_takes_zero(law)))
        .filter(|(_, s)| **s > 0.0 || !matches!(law, FitLaw::Hollomon))
        .map(|(e, s)| (*e, *s))
        .unzip();
    if x.len() < needed {
        return Err(FitError::TooFewForLaw {
            law: law.name(),
            found: x.len(),
            needed,
        });
    }
    if law.is_total_strain_form() {
        return Err(FitError::Param(ParamError::new(
            "law",
            law.name(),
            "a total-strain form needs the modulus: use fit_elastic_form",
        )));
    }
    Ok(match law {
        FitLaw::PerfectlyPlastic => fit_constant(&y),
        FitLaw::Linear => fit_linear(&x, &y),
        FitLaw::Hollomon => fit_hollomon(&x, &y),
        FitLaw::Ludwik => fit_ludwik(&x, &y),
        FitLaw::Swift => fit_swift(&x, &y),
        _ => fit_voce(&x, &y),
    })
}

fn law_takes_zero(law: FitLaw) -> bool {
    matches!(
        law,
        FitLaw::PerfectlyPlastic | FitLaw::Linear | FitLaw::Voce
    )
}

fn fit_constant(y: &[f64]) -> LawFit {
    let m = y.len() as f64;
    let mean = y.iter().sum::<f64>() / m;
    let ssr: f64 = y.iter().map(|v| (v - mean) * (v - mean)).sum();
    let se = (ssr / (m - 1.0) / m).sqrt();
    finish(
        FitLaw::PerfectlyPlastic,
        vec![estimate("yield_mpa", mean, se)],
        y,
        |_| mean,
        true,
        0,
    )
}

/// OLS line with standard errors: `(a, b, se_a, se_b, cov_ab)`.
fn ols(x: &[f64], y: &[f64]) -> Option<(f64, f64, f64, f64, f64)> {
    let m = x.len() as f64;
    let mx = x.iter().sum::<f64>() / m;
    let my = y.iter().sum::<f64>() / m;
    let (mut sxx, mut sxy) = (0.0, 0.0);
    for (xi, yi) in x.iter().zip(y) {
        sxx += (xi - mx) * (xi - mx);
        sxy += (xi - mx) * (yi - my);
    }
    if sxx <= 0.0 || !sxx.is_finite() {
        return None;
    }
    let b = sxy / sxx;
    let a = my - b * mx;
    let ssr: f64 = x
        .iter()
        .zip(y)
        .map(|(xi, yi)| (yi - a - b * xi).powi(2))
        .sum();
    let s2 = if m > 2.0 { ssr / (m - 2.0) } else { f64::NAN };
    let var_b = s2 / sxx;
    let var_a = s2 * (1.0 / m + mx * mx / sxx);
    Some((a, b, var_a.sqrt(), var_b.sqrt(), -mx * var_b))
}

fn fit_linear(x: &[f64], y: &[f64]) -> LawFit {
    let (a, b, sa, sb, _) = ols(x, y).unwrap_or((f64::NAN, f64::NAN, f64::NAN, f64::NAN, 0.0));
    finish(
        FitLaw::Linear,
        vec![
            estimate("yield_mpa", a, sa),
            estimate("hardening_modulus_mpa", b, sb),
        ],
        y,
        |i| a + b * x[i],
        a.is_finite() && b.is_finite(),
        0,
    )
}

fn estimate(name: &'static str, value: f64, se: f64) -> ParamEstimate {
    ParamEstimate {
        name,
        value,
        std_error: se.is_finite().then_some(se),
    }
}

fn fit_hollomon(x: &[f64], y: &[f64]) -> LawFit {
    let lx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ly: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let (a, n, sa, sn, _) = ols(&lx, &ly).unwrap_or((f64::NAN, f64::NAN, f64::NAN, f64::NAN, 0.0));
    let k = a.exp();
    finish(
        FitLaw::Hollomon,
        vec![estimate("k_mpa", k, k * sa), estimate("n", n, sn)],
        y,
        |i| k * (n * lx[i]).exp(),
        k.is_finite() && n.is_finite(),
        0,
    )
}

/// A three-parameter model in transformed parameters `t`: value and
/// gradient at one point, given `x` and `ln x`.
trait Model3 {
    fn eval(&self, t: &[f64; 3], x: f64, lnx: f64) -> (f64, [f64; 3]);
}

struct Ludwik;
struct Swift;
struct Voce;

fn logistic(t: f64) -> f64 {
    1.0 / (1.0 + (-t).exp())
}

fn logit(n: f64) -> f64 {
    let n = n.clamp(1e-6, 1.0 - 1e-6);
    (n / (1.0 - n)).ln()
}

impl Model3 for Ludwik {
    // t = (ln s0, ln K, logit n)
    fn eval(&self, t: &[f64; 3], _x: f64, lnx: f64) -> (f64, [f64; 3]) {
        let (s0, k, n) = (t[0].exp(), t[1].exp(), logistic(t[2]));
        let p = k * (n * lnx).exp();
        (s0 + p, [s0, p, p * lnx * n * (1.0 - n)])
    }
}

impl Model3 for Swift {
    // t = (ln K, ln e0, logit n)
    fn eval(&self, t: &[f64; 3], x: f64, _lnx: f64) -> (f64, [f64; 3]) {
        let (k, e0, n) = (t[0].exp(), t[1].exp(), logistic(t[2]));
        let u = e0 + x;
        let lu = u.ln();
        let f = k * (n * lu).exp();
        (f, [f, f * n / u * e0, f * lu * n * (1.0 - n)])
    }
}

impl Model3 for Voce {
    // t = (ln s0, ln (ss - s0), ln ec)
    fn eval(&self, t: &[f64; 3], x: f64, _lnx: f64) -> (f64, [f64; 3]) {
        let (s0, d, ec) = (t[0].exp(), t[1].exp(), t[2].exp());
        let ex = (-x / ec).exp();
        (s0 + d * (1.0 - ex), [s0, d * (1.0 - ex), -d * ex * x / ec])
    }
}

/// Outcome of a Levenberg-Marquardt run.
struct LmOutcome {
    t: [f64; 3],
    converged: bool,
    iterations: usize,
}

/// Sums `J^T J`, `J^T r` and SSR at `t`; `None` if any value is not finite.
#[allow(clippy::needless_range_loop)] // matrix algebra reads best with indices
fn normal_equations<M: Model3>(
    model: &M,
    t: &[f64; 3],
    x: &[f64],
    lnx: &[f64],
    y: &[f64],
) -> Option<([[f64; 3]; 3], [f64; 3], f64)> {
    let mut a = [[0.0; 3]; 3];
    let mut g = [0.0; 3];
    let mut ssr = 0.0;
    for i in 0..x.len() {
        let (f, j) = model.eval(t, x[i], lnx[i]);
        let r = y[i] - f;
        ssr += r * r;
        for p in 0..3 {
            g[p] += j[p] * r;
            for q in p..3 {
                a[p][q] += j[p] * j[q];
            }
        }
    }
    for p in 0..3 {
        for q in 0..p {
            a[p][q] = a[q][p];
        }
    }
    let ok = ssr.is_finite() && a.iter().flatten().all(|v| v.is_finite());
    ok.then_some((a, g, ssr))
}

/// Solves the 3x3 system `a z = b` by Gaussian elimination with partial
/// pivoting; `None` when singular.
#[allow(clippy::needless_range_loop)] // matrix algebra reads best with indices
fn solve3(mut a: [[f64; 3]; 3], mut b: [f64; 3]) -> Option<[f64; 3]> {
    for c in 0..3 {
        let piv = (c..3).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))?;
        if a[piv][c].abs() < 1e-300 || !a[piv][c].is_finite() {
            return None;
        }
        a.swap(c, piv);
        b.swap(c, piv);
        for r in c + 1..3 {
            let f = a[r][c] / a[c][c];
            for k in c..3 {
                a[r][k] -= f * a[c][k];
            }
            b[r] -= f * b[c];
        }
    }
    let mut z = [0.0; 3];
    for r in (0..3).rev() {
        let s: f64 = (r + 1..3).map(|k| a[r][k] * z[k]).sum();
        z[r] = (b[r] - s) / a[r][r];
    }
    z.iter().all(|v| v.is_finite()).then_some(z)
}

/// Levenberg-Marquardt with Marquardt's diagonal scaling: solve
/// `(J^T J + lambda diag(J^T J)) d = J^T r`, accept a step that lowers SSR
/// (lambda / 10), else raise lambda tenfold. Converged when an accepted step
/// lowers SSR by less than 1e-12 of itself and moves no parameter by more
/// than 1e-9 (transformed), or when no step can lower SSR at all.
fn levenberg_marquardt<M: Model3>(
    model: &M,
    start: [f64; 3],
    x: &[f64],
    lnx: &[f64],
    y: &[f64],
) -> LmOutcome {
    let mut t = start;
    let Some((mut a, mut g, mut ssr)) = normal_equations(model, &t, x, lnx, y) else {
        return LmOutcome {
            t,
            converged: false,
            iterations: 0,
        };
    };
    let mut lambda = 1e-3;
    for it in 1..=MAX_ITERATIONS {
        let mut accepted = None;
        while lambda <= 1e16 {
            let mut damped = a;
            for (p, row) in damped.iter_mut().enumerate() {
                row[p] += lambda * a[p][p].max(1e-300);
            }
            if let Some(d) = solve3(damped, g) {
                let trial = [t[0] + d[0], t[1] + d[1], t[2] + d[2]];
                if let Some((a2, g2, s2)) = normal_equations(model, &trial, x, lnx, y) {
                    if s2 < ssr {
                        accepted = Some((trial, d, a2, g2, s2));
                        lambda = (lambda * 0.1).max(1e-12);
                        break;
                    }
                }
            }
            lambda *= 10.0;
        }
        let Some((trial, d, a2, g2, s2)) = accepted else {
            // No step lowers SSR: t is a minimum to working precision.
            return LmOutcome {
                t,
                converged: true,
                iterations: it,
            };
        };
        let drop = ssr - s2;
        t = trial;
        a = a2;
        g = g2;
        ssr = s2;
        let small_step = d.iter().all(|v| v.abs() <= 1e-9);
        if drop <= 1e-12 * ssr && small_step {
            return LmOutcome {
                t,
                converged: true,
                iterations: it,
            };
        }
    }
    LmOutcome {
        t,
        converged: false,
        iterations: MAX_ITERATIONS,
    }
}

/// Standard errors of natural parameters from `s^2 (J^T J)^-1`, given the
/// gradient of the model in those parameters at each point.
fn std_errors3(y: &[f64], grad: impl Fn(usize) -> (f64, [f64; 3])) -> [Option<f64>; 3] {
    let mut a = [[0.0; 3]; 3];
    let mut ssr = 0.0;
    for (i, &yi) in y.iter().enumerate() {
        let (f, j) = grad(i);
        ssr += (yi - f) * (yi - f);
        for p in 0..3 {
            for q in 0..3 {
                a[p][q] += j[p] * j[q];
            }
        }
    }
    let dof = y.len() as f64 - 3.0;
    let s2 = ssr / dof;
    let mut out = [None; 3];
    for (p, slot) in out.iter_mut().enumerate() {
        let mut e = [0.0; 3];
        e[p] = 1.0;
        if let Some(col) = solve3(a, e) {
            let v = s2 * col[p];
            if v.is_finite() && v >= 0.0 {
                *slot = Some(v.sqrt());
            }
        }
    }
    out
}

/// SSR of a model at transformed parameters, `inf` when not finite.
fn ssr_at<M: Model3>(model: &M, t: &[f64; 3], x: &[f64], lnx: &[f64], y: &[f64]) -> f64 {
    let mut s = 0.0;
    for i in 0..x.len() {
        let r = y[i] - model.eval(t, x[i], lnx[i]).0;
        s += r * r;
    }
    if s.is_finite() {
        s
    } else {
        f64::INFINITY
    }
}

fn fit_ludwik(x: &[f64], y: &[f64]) -> LawFit {
    let lnx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ymin = y.iter().copied().fold(f64::INFINITY, f64::min);
    let mut start = None;
    let mut best = f64::INFINITY;
    for frac in [0.1, 0.3, 0.5, 0.7, 0.9] {
        let s0 = frac * ymin;
        let ly: Vec<f64> = y.iter().map(|v| (v - s0).max(1e-9 * ymin).ln()).collect();
        if let Some((a, n, ..)) = ols(&lnx, &ly) {
            let t = [s0.ln(), a, logit(n)];
            let s = ssr_at(&Ludwik, &t, x, &lnx, y);
            if s < best {
                best = s;
                start = Some(t);
            }
        }
    }
    let start = start.unwrap_or([(0.5 * ymin).ln(), ymin.ln(), 0.0]);
    let out = levenberg_marquardt(&Ludwik, start, x, &lnx, y);
    let (s0, k, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let se = std_errors3(y, |i| {
        let p = k * (n * lnx[i]).exp();
        (s0 + p, [1.0, p / k, p * lnx[i]])
    });
    finish(
        FitLaw::Ludwik,
        vec![
            ParamEstimate {
                name: "sigma0_mpa",
                value: s0,
                std_error: se[0],
            },
            ParamEstimate {
                name: "k_mpa",
                value: k,
                std_error: se[1],
            },
            ParamEstimate {
                name: "n",
                value: n,
                std_error: se[2],
            },
        ],
        y,
        |i| s0 + k * (n * lnx[i]).exp(),
        out.converged,
        out.iterations,
    )
}

fn fit_swift(x: &[f64], y: &[f64]) -> LawFit {
    let lnx: Vec<f64> = x.iter().map(|v| v.ln()).collect();
    let ly: Vec<f64> = y.iter().map(|v| v.ln()).collect();
    let xmin = x.iter().copied().fold(f64::INFINITY, f64::min);
    let mut start = None;
    let mut best = f64::INFINITY;
    for e0 in [0.5 * xmin, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1] {
        let lu: Vec<f64> = x.iter().map(|v| (e0 + v).ln()).collect();
        if let Some((a, n, ..)) = ols(&lu, &ly) {
            let t = [a, e0.ln(), logit(n)];
            let s = ssr_at(&Swift, &t, x, &lnx, y);
            if s < best {
                best = s;
                start = Some(t);
            }
        }
    }
    let ymax = y.iter().copied().fold(0.0, f64::max);
    let start = start.unwrap_or([ymax.ln(), (0.01f64).ln(), 0.0]);
    let out = levenberg_marquardt(&Swift, start, x, &lnx, y);
    let (k, e0, n) = (out.t[0].exp(), out.t[1].exp(), logistic(out.t[2]));
    let se = std_errors3(y, |i| {
        let u = e0 + x[i];
        let f = k * u.powf(n);
        (f, [f / k, f * n / u, f * u.ln()])
    });
    finish(
        FitLaw::Swift,
        vec![
            ParamEstimate {
                name: "k_mpa",
                value: k,
                std_error: se[0],
            },
            ParamEstimate {
                name: "eps0",
                value: e0,
                std_error: se[1],
            },
            ParamEstimate {
                name: "n",
                value: n,
                std_error: se[2],
            },
        ],
        y,
        |i| k * (e0 + x[i]).powf(n),
        out.converged,
        out.iterations,
    )
}

fn fit_voce(x: &[f64], y: &[f64]) -> LawFit {
    let lnx = vec![0.0; x.len()];
    let xmax = x.iter().copied().fold(0.0, f64::max).max(1e-6);
    let ymin = y.iter().copied().fold(f64::INFINITY, f64::min);
    let ymax = y.iter().copied().fold(0.0, f64::max);
    let mut start = [
        ymin.max(1e-3).ln(),
        (ymax - ymin).max(1e-3).ln(),
        (xmax / 3.0).ln(),
    ];
    let mut best = f64::INFINITY;
    // ec from xmax/50 to 10 xmax, 40 steps; s0 and ss - s0 by linear least squares.
    for i in 0..40 {
        let ec = xmax / 50.0 * (500f64).powf(i as f64 / 39.0);
        let z: Vec<f64> = x.iter().map(|v| 1.0 - (-v / ec).exp()).collect();
        if let Some((s0, d, ..)) = ols(&z, y) {
            if s0 > 0.0 && d > 0.0 {
                let t = [s0.ln(), d.ln(), ec.ln()];
                let s = ssr_at(&Voce, &t, x, &lnx, y);
                if s < best {
                    best = s;
                    start = t;
                }
            }
        }
    }
    let out = levenberg_marquardt(&Voce, start, x, &lnx, y);
    let (s0, d, ec) = (out.t[0].exp(), out.t[1].exp(), out.t[2].exp());
    let ss = s0 + d;
    let se = std_errors3(y, |i| {
        let ex = (-x[i] / ec).exp();
        (ss - d * ex, [ex, 1.0 - ex, -d * ex * x[i] / (ec * ec)])
    });
    finish(
        FitLaw::Voce,
        vec![
            ParamEstimate {
                name: "sigma0_mpa",
                value: s0,
                std_error: se[0],
            },
            ParamEstimate {
                name: "saturation_mpa",
                value: ss,
                std_error: se[1],
            },
            ParamEstimate {
                name: "eps_c",
                value: ec,
                std_error: se[2],
            },
        ],
        y,
        |i| ss - d * (-x[i] / ec).exp(),
        out.converged,
        out.iterations,
    )
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
/// plastic part the plastic part is solved in closed form (running sums) and
/// the split whose breakpoint lies between its two points with the lowest
/// SSR is kept. Standard errors as `s^2 (J^T J)^-1` over all points.
pub fn fit_elastic_form(
    law: FitLaw,
    strain: &[f64],
    stress_mpa: &[f64],
    youngs_modulus_gpa: f64,
) -> Result<LawFit, FitError> {
    let e = param::positive("youngs_modulus_gpa", youngs_modulus_gpa)? * 1000.0;
    same_length("stress", stress_mpa, "strain", strain)?;
    validate_record(strain, stress_mpa).or_else(|err| match err {
        // Total true strain may start a little below 0 after the toe correction.
        FitError::Negative {
            field: "strain", ..
        } => Ok(()),
        other => Err(other),
    })?;
    let m = strain.len();
    if m < 4 {
        return Err(FitError::TooFewForLaw {
            law: law.name(),
            found: m,
            needed: 4,
        });
    }
    let (x, y) = (strain, stress_mpa);
    // Prefix sums of the elastic residual (y - E x)^2 and of the line sums.
    let mut el = vec![0.0; m + 1];
    let mut pre = vec![LineSums::default(); m + 1];
    for i in 0..m {
        let r = y[i] - e * x[i];
        el[i + 1] = el[i] + r * r;
        let mut s = pre[i];
        s.add(x[i], y[i]);
        pre[i + 1] = s;
    }
    let total = pre[m];
    let mut best: Option<(f64, f64, f64)> = None; // (ssr, Y, Ht)
    for k in 0..m - 1 {
        // points 0..k elastic, k..m plastic
        let tail = total.sub(&pre[k]);
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
        let ssr = el[k] + ssr_tail;
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
    let params = match law {
        FitLaw::ElasticPerfectlyPlastic => {
            let mp = x.iter().filter(|&&v| e * v > yld).count() as f64;
            let se = (ssr / (m as f64 - 1.0) / mp).sqrt();
            vec![estimate("yield_mpa", yld, se)]
        }
        _ => {
            let h = e * ht / (e - ht);
            // d f / d Y = 1 - Ht/E, d f / d H = (eps - Y/E) dHt/dH, dHt/dH = E^2/(E+H)^2
            let dht = e * e / ((e + h) * (e + h));
            let (mut a11, mut a12, mut a22) = (0.0, 0.0, 0.0);
            for &v in x.iter().filter(|&&v| e * v > yld) {
                let j1 = 1.0 - ht / e;
                let j2 = (v - yld / e) * dht;
                a11 += j1 * j1;
                a12 += j1 * j2;
                a22 += j2 * j2;
            }
            let det = a11 * a22 - a12 * a12;
            let s2 = ssr / (m as f64 - 2.0);
            let (sy, sh) = if det > 0.0 {
                ((s2 * a22 / det).sqrt(), (s2 * a11 / det).sqrt())
            } else {
                (f64::NAN, f64::NAN)
            };
            vec![
                estimate("yield_mpa", yld, sy),
                estimate("hardening_modulus_mpa", h, sh),
            ]
        }
    };
    Ok(finish(law, params, y, |i| model(x[i]), converged, 0))
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
    fn solve3_solves() {
        let a = [[4.0, 1.0, 0.5], [1.0, 3.0, 0.2], [0.5, 0.2, 2.0]];
        let z = solve3(a, [1.0, 2.0, 3.0]).unwrap();
        for r in 0..3 {
            let s: f64 = (0..3).map(|k| a[r][k] * z[k]).sum();
            assert!((s - [1.0, 2.0, 3.0][r]).abs() < 1e-12);
        }
        assert!(solve3(
            [[1.0, 2.0, 3.0], [2.0, 4.0, 6.0], [0.0, 0.0, 1.0]],
            [1.0; 3]
        )
        .is_none());
    }
}
