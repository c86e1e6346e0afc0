//! Fitting flow-stress laws to a tensile-test record.
//!
//! The steps, one file each:
//!
//! 1. [`record`]: reading the record (force and extension to engineering
//!    stress and strain) and cleaning a raw export to its monotone loading
//!    envelope (repeats, backward steps, unload-reload loops, spikes, the
//!    points after fracture), saying what was merged or dropped;
//! 2. [`elastic`]: the elastic part and yield as ISO 6892-1 defines them
//!    (modulus over a stress band, Rp0.2, or ReH, ReL and the Lueders
//!    strain), and the maximum force;
//! 3. [`laws`] and [`solver`]: true stress and true plastic strain
//!    (`eps_t = ln(1 + e)`, `sigma_t = s (1 + e)`, `eps_p = eps_t - sigma_t / E`:
//!    volume constancy, Dieter, *Mechanical Metallurgy*, ch. 8, from memory)
//!    fitted by every law of [`crate::flow`] on one criterion, least squares
//!    on the stress, with standard errors `s^2 (J^T W J)^-1` and Akaike's
//!    criterion `AIC = W ln(SSR/W) + 2 p` (Burnham & Anderson, *Model
//!    Selection and Multimodel Inference*, from memory);
//! 4. [`specimens`]: the set of specimens, the scatter of the parameters.
//!
//! Nothing here prints, reads files or draws: the caller gets a [`FitReport`]
//! with diagnostics (converged, iterations) and [`FitWarning`]s to word.

pub mod elastic;
pub mod laws;
pub mod record;
pub mod solver;
pub mod specimens;

mod warning;

use crate::param::{self, ParamError};

pub use elastic::{Modulus, Yielding, MIN_ELASTIC_POINTS, YIELD_OFFSET_STRAIN};
pub use laws::{
    considere_uts_mpa, engineering_uts_mpa, fit_elastic_form, fit_law, fit_law_weighted,
    hollomon_log_space, FitLaw, LawFit, ParamEstimate,
};
pub use record::{engineering_from_force, engineering_in_place, round_area_mm2, Cleaning, Spike};
pub use solver::MAX_ITERATIONS;
pub use specimens::{fit_uncertainty, set_law, set_scatter, Scatter, ScatterSource};
pub use warning::FitWarning;

/// Fewest points in the plastic range that a fit accepts: a three-parameter
/// law needs a good margin over three.
pub const MIN_PLASTIC_POINTS: usize = 8;

/// Most accumulated strain `--reach-strain` and a drawn-wire point accept:
/// 99.995 % total reduction is a strain of 10, beyond any drawing.
pub const MAX_REACH_STRAIN: f64 = 10.0;

/// Residuals count as much larger than the record's noise above this ratio.
pub const RESIDUAL_NOISE_RATIO: f64 = 3.0;

/// Lag-1 autocorrelation of the residuals above which they count as
/// strongly correlated (independent residuals give about 0).
pub const RESIDUAL_AUTOCORRELATION: f64 = 0.5;

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
    /// A value is beyond what any tensile test gives.
    #[error("point {point}: `{field}` = {value} is not allowed: must be {allowed}")]
    OutOfRange {
        /// 1-based point.
        point: usize,
        /// The column.
        field: &'static str,
        /// The value.
        value: f64,
        /// The allowed range, in words.
        allowed: String,
    },
    /// The record as a whole is too short.
    #[error("the record has {}: at least {needed} are needed", points(*found))]
    TooFewPoints {
        /// Points given.
        found: usize,
        /// Points needed.
        needed: usize,
    },
    /// Too few points in the modulus band.
    #[error("the elastic range used for Young's modulus (stress {from_mpa:.1} to {to_mpa:.1} MPa, 10 % to 40 % of the yield strength) has {}: at least {needed} are needed; record the start of the test more densely", points(*found))]
    TooFewElasticPoints {
        /// Points found in the band.
        found: usize,
        /// Points needed.
        needed: usize,
        /// Lower end of the band, MPa.
        from_mpa: f64,
        /// Upper end of the band, MPa.
        to_mpa: f64,
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
    #[error("the record never reaches a maximum load: after its highest stress ({stress_mpa} MPa at point {point}) it falls by less than {} % to the last point; run the test past maximum load", elastic::MAX_LOAD_DROP_PERCENT)]
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
    /// A set needs two specimens or more.
    #[error("a set of specimens needs at least 2 records; {found} given")]
    SetTooSmall {
        /// Records given.
        found: usize,
    },
    /// A law is missing from one specimen of a set.
    #[error("`{law}` has no valid fit for specimen {specimen}, so the set has no scatter for it; choose another law")]
    NotInEverySpecimen {
        /// The law.
        law: &'static str,
        /// 1-based specimen.
        specimen: usize,
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
            | FitError::OutOfRange { point, .. }
            | FitError::NoMaximumLoad { point, .. } => Some(*point),
            _ => None,
        }
    }

    fn with_point(mut self, map: impl Fn(usize) -> usize) -> FitError {
        if let FitError::NoMaximumLoad { point, .. } = &mut self {
            *point = map(*point - 1);
        }
        self
    }
}

pub(crate) fn same_length(
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

/// What the two columns of a record are.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DataKind {
    /// Engineering strain (fraction) and engineering stress (MPa), elastic part included.
    Engineering,
    /// True plastic strain and true stress (MPa), already converted; fitted as given.
    True,
}

/// A material class whose Young's modulus the record should show.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MaterialClass {
    /// Carbon and low-alloy steel.
    Steel,
    /// Austenitic stainless steel.
    Stainless,
    /// Copper.
    Copper,
    /// Brass.
    Brass,
    /// Aluminium and its alloys.
    Aluminium,
    /// Titanium and its alloys.
    Titanium,
    /// Nickel and its alloys.
    Nickel,
}

impl MaterialClass {
    /// Every class.
    pub const ALL: [MaterialClass; 7] = [
        MaterialClass::Steel,
        MaterialClass::Stainless,
        MaterialClass::Copper,
        MaterialClass::Brass,
        MaterialClass::Aluminium,
        MaterialClass::Titanium,
        MaterialClass::Nickel,
    ];

    /// The name on the command line.
    pub fn name(self) -> &'static str {
        match self {
            MaterialClass::Steel => "steel",
            MaterialClass::Stainless => "stainless",
            MaterialClass::Copper => "copper",
            MaterialClass::Brass => "brass",
            MaterialClass::Aluminium => "aluminium",
            MaterialClass::Titanium => "titanium",
            MaterialClass::Nickel => "nickel",
        }
    }

    /// Young's modulus of the class at room temperature, GPa, `(low, high)`
    /// (handbook values, e.g. ASM Metals Handbook and Callister's appendix
    /// tables, from memory: steel 200-210, austenitic stainless 190-200,
    /// copper 110-130, brass 97-110, aluminium 68-72, titanium 105-120,
    /// nickel 200-210).
    pub fn modulus_gpa(self) -> (f64, f64) {
        match self {
            MaterialClass::Steel => (200.0, 210.0),
            MaterialClass::Stainless => (190.0, 200.0),
            MaterialClass::Copper => (110.0, 130.0),
            MaterialClass::Brass => (97.0, 110.0),
            MaterialClass::Aluminium => (68.0, 72.0),
            MaterialClass::Titanium => (105.0, 120.0),
            MaterialClass::Nickel => (200.0, 210.0),
        }
    }
}

/// How far outside its class's range a modulus may lie before a warning,
/// fraction (an extensometer record gives the modulus within a few percent;
/// one from the crosshead reads far low because the machine stretches too).
pub const MODULUS_CLASS_TOLERANCE: f64 = 0.15;

/// Young's modulus outside this range (GPa) is not a metal's: indium and
/// lead are near 11-16 GPa, osmium near 550 GPa (handbook values, from memory).
pub const MODULUS_PLAUSIBLE_GPA: (f64, f64) = (5.0, 600.0);

/// A tensile strength measured on drawn wire: the wire's true flow stress at
/// its accumulated drawing strain (drawn wire reaches maximum load almost at
/// once, so its tensile strength is close to its flow stress; common practice).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DrawnPoint {
    /// True plastic strain of the wire, `2 ln(d0 / d)` from the tested size.
    pub strain: f64,
    /// Tensile strength of the drawn wire, MPa.
    pub tensile_strength_mpa: f64,
}

impl DrawnPoint {
    /// From the tested (start) and drawn diameters: strain `2 ln(d0 / d)`.
    pub fn from_diameters(
        start_mm: f64,
        drawn_mm: f64,
        tensile_strength_mpa: f64,
    ) -> Result<DrawnPoint, ParamError> {
        let d0 = record::diameter("start_diameter_mm", start_mm)?;
        let d = param::within("drawn_diameter_mm", drawn_mm, 0.0, d0, param::Ends::Open)?;
        DrawnPoint::new(2.0 * (d0 / d).ln(), tensile_strength_mpa)
    }

    /// Checked: strain in (0, [`MAX_REACH_STRAIN`]], strength in (0, 20,000] MPa.
    pub fn new(strain: f64, tensile_strength_mpa: f64) -> Result<DrawnPoint, ParamError> {
        let strain = param::within(
            "drawn_strain",
            strain,
            0.0,
            MAX_REACH_STRAIN,
            param::Ends::OpenClosed,
        )?;
        let s = param::within(
            "tensile_strength_mpa",
            tensile_strength_mpa,
            0.0,
            record::MAX_STRESS_MPA,
            param::Ends::OpenClosed,
        )?;
        Ok(DrawnPoint {
            strain,
            tensile_strength_mpa: s,
        })
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
    /// The material class whose modulus the record should show.
    pub material: Option<MaterialClass>,
    /// Tensile strengths of drawn wire, fitted with the record in a second set of fits.
    pub drawn: Vec<DrawnPoint>,
}

impl Default for FitOptions {
    fn default() -> Self {
        Self {
            data: DataKind::Engineering,
            shear_modulus_gpa: None,
            reach_strain: None,
            material: None,
            drawn: Vec::new(),
        }
    }
}

impl FitOptions {
    /// Checks the ranges: reach strain in (0, 10], shear modulus in [1, 300] GPa
    /// (lead about 6 GPa, iridium about 210 GPa; handbook values, from memory).
    pub fn validate(&self) -> Result<(), ParamError> {
        if let Some(g) = self.shear_modulus_gpa {
            param::within("shear_modulus_gpa", g, 1.0, 300.0, param::Ends::Closed)?;
        }
        if let Some(r) = self.reach_strain {
            param::within(
                "reach_strain",
                r,
                0.0,
                MAX_REACH_STRAIN,
                param::Ends::OpenClosed,
            )?;
        }
        for d in &self.drawn {
            DrawnPoint::new(d.strain, d.tensile_strength_mpa)?;
        }
        Ok(())
    }
}

/// Everything found in one record.
#[derive(Debug, Clone, PartialEq)]
pub struct FitReport {
    /// What the columns were.
    pub data: DataKind,
    /// Points in the record.
    pub points_read: usize,
    /// What cleaning the record merged or dropped.
    pub cleaning: Cleaning,
    /// Noise of the stress column, MPa (from second differences).
    pub noise_mpa: f64,
    /// Young's modulus, band and standard error (engineering records).
    pub modulus: Option<Modulus>,
    /// Young's modulus from the band, GPa (engineering records).
    pub youngs_modulus_gpa: Option<f64>,
    /// Strain at which the elastic line meets zero stress (toe correction,
    /// subtracted from every strain), engineering records.
    pub toe_strain: Option<f64>,
    /// How the record yields (engineering records).
    pub yielding: Option<Yielding>,
    /// Yield strength, MPa: Rp0.2 for continuous yielding, ReL for a yield drop.
    pub yield_mpa: Option<f64>,
    /// Measured engineering tensile strength (maximum force after yield over
    /// original area), MPa.
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
    /// The converged, valid plastic-strain law with the lowest AIC.
    pub best: Option<FitLaw>,
    /// Drawn-wire points given.
    pub drawn: Vec<DrawnPoint>,
    /// The plastic-strain laws fitted to the record and the drawn-wire points.
    pub drawn_fits: Vec<LawFit>,
    /// The best of `drawn_fits`.
    pub best_with_drawn: Option<FitLaw>,
    /// The reach strain given.
    pub reach_strain: Option<f64>,
    /// Checks that call for a look.
    pub warnings: Vec<FitWarning>,
}

impl FitReport {
    /// A report of the points only, before any law is fitted: true plastic
    /// strain and true stress (MPa), nothing measured from an engineering
    /// curve, no fits, no warnings.
    fn points_only(
        data: DataKind,
        points_read: usize,
        noise_mpa: f64,
        plastic_strain: Vec<f64>,
        true_stress_mpa: Vec<f64>,
    ) -> FitReport {
        FitReport {
            data,
            points_read,
            cleaning: Cleaning::default(),
            noise_mpa,
            modulus: None,
            youngs_modulus_gpa: None,
            toe_strain: None,
            yielding: None,
            yield_mpa: None,
            uts_mpa: None,
            uniform_strain: None,
            plastic_strain,
            true_stress_mpa,
            total_strain: Vec::new(),
            total_stress_mpa: Vec::new(),
            fits: Vec::new(),
            best: None,
            drawn: Vec::new(),
            drawn_fits: Vec::new(),
            best_with_drawn: None,
            reach_strain: None,
            warnings: Vec::new(),
        }
    }

    /// Lowest fitted plastic strain.
    pub fn strain_from(&self) -> f64 {
        self.plastic_strain
            .iter()
            .copied()
            .fold(f64::INFINITY, f64::min)
    }

    /// Highest fitted plastic strain of the record.
    pub fn strain_to(&self) -> f64 {
        self.plastic_strain.iter().copied().fold(0.0, f64::max)
    }

    /// Largest true plastic strain of the fitted data, drawn points included:
    /// how far the fitted law holds (`flow_valid_to_strain`).
    pub fn valid_to_strain(&self) -> f64 {
        self.drawn
            .iter()
            .map(|d| d.strain)
            .fold(self.strain_to(), f64::max)
    }

    /// The fit of `law` to the record, if it was made.
    pub fn fit(&self, law: FitLaw) -> Option<&LawFit> {
        self.fits.iter().find(|f| f.law == law)
    }

    /// The fit of `law` to the record and the drawn points, if made.
    pub fn drawn_fit(&self, law: FitLaw) -> Option<&LawFit> {
        self.drawn_fits.iter().find(|f| f.law == law)
    }
}

/// Fits every law to a tensile record and runs the metallurgist's checks.
///
/// For [`DataKind::Engineering`] `strain` is engineering strain (fraction)
/// and `stress_mpa` engineering stress: the record is cleaned, the modulus,
/// yield and maximum load are found, and the points from yield (after the
/// Lueders plateau, if any) to maximum load are fitted in true plastic
/// strain. For [`DataKind::True`] the points with strain above 0 are fitted
/// as given and the total-strain forms are left out.
pub fn fit_record(
    strain: &[f64],
    stress_mpa: &[f64],
    options: &FitOptions,
) -> Result<FitReport, FitError> {
    fit_record_owned(strain.to_vec(), stress_mpa.to_vec(), options)
}

/// [`fit_record`] on columns it may clean and convert in place (no copy of
/// the record: the binary's path for big records).
pub fn fit_record_owned(
    mut strain: Vec<f64>,
    mut stress_mpa: Vec<f64>,
    options: &FitOptions,
) -> Result<FitReport, FitError> {
    options.validate()?;
    record::validate(&strain, &stress_mpa)?;
    let mut report = match options.data {
        DataKind::Engineering => engineering_points(strain, stress_mpa)?,
        DataKind::True => {
            let n = strain.len();
            let w = compact(&mut strain, &mut stress_mpa, |e, _| e > 0.0);
            true_points(strain, stress_mpa, n, w)?
        }
    };
    report.reach_strain = options.reach_strain;
    report.drawn = options.drawn.clone();
    fit_all(&mut report)?;
    report.warnings = warning::checks(&report, options);
    Ok(report)
}

/// Keeps the points `keep` accepts, in place; returns how many.
fn compact(x: &mut Vec<f64>, y: &mut Vec<f64>, keep: impl Fn(f64, f64) -> bool) -> usize {
    let mut w = 0;
    for r in 0..x.len() {
        if keep(x[r], y[r]) {
            x[w] = x[r];
            y[w] = y[r];
            w += 1;
        }
    }
    x.truncate(w);
    y.truncate(w);
    w
}

fn fit_all(report: &mut FitReport) -> Result<(), FitError> {
    report.fits = fit_plastic_laws(&report.plastic_strain, &report.true_stress_mpa, &[])?;
    if let Some(e_gpa) = report.youngs_modulus_gpa {
        for law in [FitLaw::ElasticPerfectlyPlastic, FitLaw::ElasticLinear] {
            let fit = fit_elastic_form(law, &report.total_strain, &report.total_stress_mpa, e_gpa)?;
            report.fits.push(fit);
        }
    }
    if !report.drawn.is_empty() {
        // The drawn points together weigh as much as the record's points.
        let w = report.plastic_strain.len() as f64 / report.drawn.len() as f64;
        let extra: Vec<(f64, f64, f64)> = report
            .drawn
            .iter()
            .map(|d| (d.strain, d.tensile_strength_mpa, w))
            .collect();
        report.drawn_fits =
            fit_plastic_laws(&report.plastic_strain, &report.true_stress_mpa, &extra)?;
    }
    let reach = report.reach_strain;
    for fit in report.fits.iter_mut().chain(report.drawn_fits.iter_mut()) {
        if let (Some(law), Some(r)) = (&fit.flow_law, reach) {
            fit.stress_at_reach_mpa = Some(law.stress_mpa(r)).filter(|v| v.is_finite());
        }
    }
    report.best = best_of(&report.fits);
    report.best_with_drawn = best_of(&report.drawn_fits);
    Ok(())
}

/// Every plastic-strain law, in [`FitLaw::PLASTIC`] order; Swift and Voce
/// on a second thread beside the others (the fits are independent, so the
/// result is the same as one after the other).
fn fit_plastic_laws(
    x: &[f64],
    y: &[f64],
    extra: &[(f64, f64, f64)],
) -> Result<Vec<LawFit>, FitError> {
    // Hollomon, Ludwik and Swift leave out points at strain 0 or below:
    // one shared copy without them (when there are any) instead of one per
    // law, so that the three fit the same points without copying the record
    // three times (fit_law_weighted then keeps them all, in the same order).
    let positive = |e: f64, s: f64| e.is_finite() && s.is_finite() && e > 0.0;
    let all_positive = x.iter().zip(y).all(|(&e, &s)| positive(e, s));
    let owned: Option<(Vec<f64>, Vec<f64>)> = (!all_positive).then(|| {
        x.iter()
            .zip(y)
            .filter(|(&e, &s)| positive(e, s))
            .map(|(e, s)| (*e, *s))
            .unzip()
    });
    let (px, py) = match &owned {
        Some((px, py)) => (px.as_slice(), py.as_slice()),
        None => (x, y),
    };
    let one = |laws: &[FitLaw]| -> Result<Vec<LawFit>, FitError> {
        laws.iter()
            .map(|&l| match l {
                FitLaw::Hollomon | FitLaw::Ludwik | FitLaw::Swift => {
                    fit_law_weighted(l, px, py, extra)
                }
                _ => fit_law_weighted(l, x, y, extra),
            })
            .collect()
    };
    let (here, other) = std::thread::scope(|s| {
        let other = s.spawn(|| one(&[FitLaw::Swift, FitLaw::Voce]));
        let here = one(&[
            FitLaw::PerfectlyPlastic,
            FitLaw::Linear,
            FitLaw::Hollomon,
            FitLaw::Ludwik,
        ]);
        (here, other.join())
    });
    let mut fits = here?;
    fits.extend(other.unwrap_or_else(|e| std::panic::resume_unwind(e))?);
    Ok(fits)
}

/// The converged, valid plastic-strain law with the lowest finite AIC.
pub fn best_of(fits: &[LawFit]) -> Option<FitLaw> {
    fits.iter()
        .filter(|f| {
            !f.law.is_total_strain_form()
                && f.converged
                && f.flow_law.is_some()
                && f.aic.is_finite()
        })
        .min_by(|a, b| a.aic.total_cmp(&b.aic))
        .map(|f| f.law)
}

fn engineering_points(mut strain: Vec<f64>, mut stress: Vec<f64>) -> Result<FitReport, FitError> {
    let points_read = strain.len();
    let cleaning = record::clean(&mut strain, &mut stress)?;
    let m = strain.len();
    if m < 2 * MIN_ELASTIC_POINTS {
        return Err(FitError::TooFewPoints {
            found: m,
            needed: 2 * MIN_ELASTIC_POINTS,
        });
    }
    let noise = record::noise_mpa(&stress);
    let a = elastic::analyse(&strain, &stress, noise, cleaning.fractured)
        .map_err(|e| e.with_point(|i| cleaning.original_point(i)))?;
    let (e_mpa, toe) = (a.modulus.modulus_mpa, a.modulus.toe_strain);
    let imax = a.max_index;
    let (start, yield_mpa, range) = match a.yielding {
        Yielding::Continuous { proof_mpa, index } => {
            (index, proof_mpa, "0.2 % proof strength to maximum load")
        }
        Yielding::Discontinuous {
            lower_mpa,
            plateau_end,
            ..
        } => (
            plateau_end,
            lower_mpa,
            "end of the Lueders plateau to maximum load",
        ),
    };
    let uts = stress[imax];
    // True stress and strain in place, up to maximum load.
    strain.truncate(imax + 1);
    stress.truncate(imax + 1);
    for (e, s) in strain.iter_mut().zip(stress.iter_mut()) {
        let ec = *e - toe;
        *e = ec.ln_1p();
        *s *= 1.0 + ec;
    }
    let plastic = |i: usize| strain[i] - stress[i] / e_mpa;
    let count = (start..=imax).filter(|&i| plastic(i) > 0.0).count();
    let mut plastic_strain = Vec::with_capacity(count);
    let mut true_stress = Vec::with_capacity(count);
    for (&et, &st) in strain[start..=imax].iter().zip(&stress[start..=imax]) {
        let ep = et - st / e_mpa;
        if ep > 0.0 {
            plastic_strain.push(ep);
            true_stress.push(st);
        }
    }
    let uniform_strain = plastic(imax);
    if plastic_strain.len() < MIN_PLASTIC_POINTS {
        return Err(FitError::TooFewPlasticPoints {
            found: plastic_strain.len(),
            needed: MIN_PLASTIC_POINTS,
            range: range.into(),
        });
    }
    Ok(FitReport {
        cleaning,
        youngs_modulus_gpa: Some(e_mpa / 1000.0),
        toe_strain: Some(toe),
        modulus: Some(a.modulus),
        yielding: Some(a.yielding),
        yield_mpa: Some(yield_mpa),
        uts_mpa: Some(uts),
        uniform_strain: Some(uniform_strain),
        total_strain: strain,
        total_stress_mpa: stress,
        ..FitReport::points_only(
            DataKind::Engineering,
            points_read,
            noise,
            plastic_strain,
            true_stress,
        )
    })
}

fn true_points(
    x: Vec<f64>,
    y: Vec<f64>,
    points_read: usize,
    kept: usize,
) -> Result<FitReport, FitError> {
    if kept < MIN_PLASTIC_POINTS {
        return Err(FitError::TooFewPlasticPoints {
            found: kept,
            needed: MIN_PLASTIC_POINTS,
            range: "true plastic strain above 0".into(),
        });
    }
    let noise = record::noise_mpa(&y);
    Ok(FitReport::points_only(
        DataKind::True,
        points_read,
        noise,
        x,
        y,
    ))
}

/// Residual checks of one fit on the record points: `(rms MPa, lag-1
/// autocorrelation)` of `sigma_i - law(eps_i)`.
pub fn residual_checks(fit: &LawFit, strain: &[f64], stress_mpa: &[f64]) -> Option<(f64, f64)> {
    let law = fit.flow_law.as_ref()?;
    let (mut ss, mut lag, mut prev) = (0.0, 0.0, None);
    for (&x, &y) in strain.iter().zip(stress_mpa) {
        let r = y - law.stress_mpa(x);
        ss += r * r;
        if let Some(p) = prev {
            lag += p * r;
        }
        prev = Some(r);
    }
    let m = strain.len() as f64;
    let out = ((ss / m).sqrt(), lag / ss);
    (out.0.is_finite() && out.1.is_finite()).then_some(out)
}
