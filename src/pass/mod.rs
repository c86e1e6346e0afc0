//! The mechanics of one drawing pass through a conical die.
//!
//! From the entry and exit diameter: area reduction `r = 1 - (D1/D0)^2`, true
//! strain `eps = 2 ln(D0/D1)` and the deformation-zone shape
//! `Delta = (alpha/r) (1 + sqrt(1-r))^2` (Hosford & Caddell, *Metal Forming*;
//! from memory). From the flow law and the die, the drawing stress on the exit
//! section by six methods:
//!
//! - `ideal`: homogeneous work, `sigma_b + sigma_bar eps`;
//! - `efficiency`: `sigma_b + sigma_bar eps / eta`;
//! - `sachs`: the slab solution with Coulomb friction, `B = mu cot(alpha)`,
//!   integrated through the die with the actual law:
//!   `sigma_d = sigma_b e^(-B eps) + (1+B) int_0^eps sigma_f(eps_a+t) e^(-B(eps-t)) dt`
//!   (Dieter, *Mechanical Metallurgy*, ch. 19; Sachs 1927). With a constant flow
//!   stress this is the closed form `sigma_bar (1+B)/B [1 - (A1/A0)^B] + sigma_b (A1/A0)^B`;
//! - `siebel`: `sigma_b + sigma_bar [(1 + mu/alpha) eps + (2/3) alpha]`, the
//!   2/3 redundant term of Siebel's form as given by Dieter (Valberg, *Applied
//!   Metal Forming*, eq. 22-27, uses 4/(3 sqrt 3) = 0.770 instead);
//! - `redundant`: `sachs + (Phi - 1) sigma_bar eps`, `Phi = 1 + C (Delta - 1)`
//!   for `Delta > 1` (Hosford & Caddell; C about 0.21 from Caddell & Atkins,
//!   J. Eng. Ind. 90 (1968) 411; from memory);
//! - `upper-bound`: Avitzur's solution for a conical die with shear factor m
//!   (Avitzur, J. Eng. Ind. 85 (1963) 89; from memory):
//!   `sigma_d/sigma_bar = sigma_b/sigma_bar + 2 f(alpha) ln(R0/Rf)
//!   + (2/sqrt 3)[alpha/sin^2(alpha) - cot(alpha)] + (2m/sqrt 3)[cot(alpha) ln(R0/Rf) + L/Rf]`.
//!
//! Back tension adds to every method as the slab and upper-bound solutions
//! prescribe; for ideal, efficiency and Siebel it is added whole (the energy
//! balance of a die with a back pull). Angles are degrees at the interface and
//! radians inside.
//!
//! A die land (bearing) of length `L` acts on the cone's exit stress of
//! Sachs, Siebel and redundant through the slab balance
//! `Y - (Y - sigma_cone) e^(-4 mu L / d)` ([`land_exit_stress`]); the upper
//! bound carries Avitzur's own land term. Ideal and efficiency see no land.
//!
//! [`PreparedPass`] computes the die-independent part of a pass once (sizes,
//! flow stresses, the angle-independent part of the Sachs integral) for
//! callers that try many dies; [`analyse_pass`] and [`optimum_semi_angle`]
//! are thin wrappers over it. The files of this folder: `prepared.rs` (the
//! prepared pass and every method), `sachs.rs` (the Sachs integral by law),
//! `optimum.rs` (Brent's search for the optimum angle).

use serde::{Deserialize, Serialize};
use std::f64::consts::PI;
use std::fmt;
use std::str::FromStr;

use crate::flow::{FlowError, FlowLaw};
use crate::param::{self, Ends, ParamError};
use crate::quad;

pub(crate) mod optimum;
mod prepared;
mod sachs;

pub use prepared::{AngleTerms, PreparedPass};

/// Why a pass cannot be evaluated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PassError {
    /// A parameter is out of range.
    #[error(transparent)]
    Param(#[from] ParamError),
    /// The flow law could not answer (a quadrature miss, say).
    #[error(transparent)]
    Flow(#[from] FlowError),
    /// The efficiency method was asked for and the die has no efficiency.
    #[error("the efficiency method needs a drawing efficiency (`efficiency`, in (0, 1]) and none was given")]
    MissingEfficiency,
    /// A result is too large (or too small) for floating point: valid but
    /// extreme sizes, flow-law constants or back tension.
    #[error("the {quantity} of the pass overflows floating point ({value}); the sizes, flow law or back tension are too extreme")]
    Overflow {
        /// What overflowed, in words (`drawing stress by sachs`).
        quantity: &'static str,
        /// The value it came to (an infinity or NaN).
        value: f64,
    },
}

/// `value` if it is finite, else [`PassError::Overflow`] naming `quantity`.
fn finite_or_overflow(quantity: &'static str, value: f64) -> Result<f64, PassError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(PassError::Overflow { quantity, value })
    }
}

impl From<quad::QuadratureError> for PassError {
    fn from(e: quad::QuadratureError) -> Self {
        PassError::Flow(FlowError::Quadrature(e))
    }
}

/// A method of estimating the drawing stress.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    /// Homogeneous (ideal) work.
    Ideal,
    /// Ideal work over a drawing efficiency.
    Efficiency,
    /// Sachs slab solution with Coulomb friction.
    Sachs,
    /// Siebel's approximate formula.
    Siebel,
    /// Sachs plus Hosford-Caddell redundant work.
    Redundant,
    /// Avitzur's upper bound.
    UpperBound,
    /// A conservative envelope: the largest of sachs, siebel, redundant and
    /// upper-bound (well above the published cases, README "Validation").
    Max,
}

impl Method {
    /// Every method, in report order.
    pub const ALL: [Method; 7] = [
        Method::Ideal,
        Method::Efficiency,
        Method::Sachs,
        Method::Siebel,
        Method::Redundant,
        Method::UpperBound,
        Method::Max,
    ];

    /// The name as written in files and on the command line (`upper-bound`).
    pub fn name(self) -> &'static str {
        match self {
            Method::Ideal => "ideal",
            Method::Efficiency => "efficiency",
            Method::Sachs => "sachs",
            Method::Siebel => "siebel",
            Method::Redundant => "redundant",
            Method::UpperBound => "upper-bound",
            Method::Max => "max",
        }
    }

    /// Whether the method's drawing stress depends on the die angle.
    pub fn depends_on_angle(self) -> bool {
        !matches!(self, Method::Ideal | Method::Efficiency)
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Method {
    type Err = ParamError;
    fn from_str(s: &str) -> Result<Self, ParamError> {
        Method::ALL
            .into_iter()
            .find(|m| m.name() == s)
            .ok_or_else(|| {
                ParamError::new(
                    "method",
                    s,
                    "must be one of ideal, efficiency, sachs, siebel, redundant, upper-bound, max",
                )
            })
    }
}

/// The shear factor m taken per unit Coulomb friction when a die gives only
/// mu: `m = min(1, DERIVED_SHEAR_FACTOR_PER_MU * mu)`.
///
/// Chosen from the validation table (README, "Validation"; docs/physics.md):
/// the former `sqrt(3) mu` (friction shear `m k` equal to `mu p` at a die
/// pressure `p` equal to the flow stress) put the upper bound 17 to 31 %
/// above every published case; `m = mu` (a mean die pressure of about
/// `sigma_f / sqrt 3`, near what the slab solution gives in the cone) brings
/// it within about 10 %. Give `friction_factor` to set m directly.
pub const DERIVED_SHEAR_FACTOR_PER_MU: f64 = 1.0;

/// The rule for m when only mu is given, in words, for notes and reports.
pub const DERIVED_SHEAR_FACTOR_RULE: &str = "min(1, mu)";

/// A conical die and its lubrication.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Die {
    /// Die semi-angle alpha, degrees, in (0, 45). Catalogues often quote the
    /// included angle, which is twice this.
    pub semi_angle_deg: f64,
    /// Coulomb friction coefficient mu, in [0, 0.5] (slab and Siebel methods).
    pub friction: f64,
    /// Shear friction factor m, in [0, 1] (upper bound); `None` derives
    /// `m = min(1, mu)` ([`DERIVED_SHEAR_FACTOR_PER_MU`]).
    pub friction_factor: Option<f64>,
    /// Die land (bearing) length L, mm, 0 or more: the slab land balance in
    /// Sachs, Siebel and redundant ([`land_exit_stress`]), Avitzur's land
    /// term in the upper bound. [`land_is_long`] flags a long one.
    pub land_length_mm: f64,
    /// Drawing efficiency eta, in (0, 1] (efficiency method).
    pub efficiency: Option<f64>,
}

impl Die {
    /// A die with semi-angle `semi_angle_deg` (degrees) and Coulomb friction
    /// `friction`, no land, shear factor derived from mu, no efficiency.
    pub fn new(semi_angle_deg: f64, friction: f64) -> Result<Self, PassError> {
        let die = Die {
            semi_angle_deg,
            friction,
            friction_factor: None,
            land_length_mm: 0.0,
            efficiency: None,
        };
        die.validate()?;
        Ok(die)
    }

    /// Checks: semi-angle in (0, 45) degrees; mu in [0, 0.5]; m in [0, 1];
    /// land 0 or more; efficiency in (0, 1].
    #[inline]
    pub fn validate(&self) -> Result<(), PassError> {
        // Valid dies (every call in design and risk runs) cost a few
        // comparisons; a NaN fails them and the checks below name it.
        let valid = self.semi_angle_deg > 0.0
            && self.semi_angle_deg < 45.0
            && self.friction >= 0.0
            && self.friction <= 0.5
            && self
                .friction_factor
                .is_none_or(|m| (0.0..=1.0).contains(&m))
            && self.land_length_mm >= 0.0
            && self.land_length_mm.is_finite()
            && self.efficiency.is_none_or(|eta| eta > 0.0 && eta <= 1.0);
        if valid {
            return Ok(());
        }
        self.validate_each()
    }

    /// Each check of [`Die::validate`] in turn, for the error it gives.
    #[cold]
    #[inline(never)]
    fn validate_each(&self) -> Result<(), PassError> {
        param::within("semi_angle_deg", self.semi_angle_deg, 0.0, 45.0, Ends::Open)?;
        param::within("friction", self.friction, 0.0, 0.5, Ends::Closed)?;
        if let Some(m) = self.friction_factor {
            param::within("friction_factor", m, 0.0, 1.0, Ends::Closed)?;
        }
        param::non_negative("land_length_mm", self.land_length_mm)?;
        if let Some(eta) = self.efficiency {
            param::within("efficiency", eta, 0.0, 1.0, Ends::OpenClosed)?;
        }
        Ok(())
    }

    /// The shear factor used by the upper bound and whether it was derived
    /// from mu as `m = min(1, DERIVED_SHEAR_FACTOR_PER_MU * mu)` (see
    /// [`DERIVED_SHEAR_FACTOR_PER_MU`] for the choice).
    pub fn shear_factor(&self) -> (f64, bool) {
        match self.friction_factor {
            Some(m) => (m, false),
            None => ((DERIVED_SHEAR_FACTOR_PER_MU * self.friction).min(1.0), true),
        }
    }
}

/// One draw: sizes, the cold work already in the stock, back tension and die.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DrawPass {
    /// Entry diameter D0, mm, greater than 0.
    pub entry_diameter_mm: f64,
    /// Exit diameter D1, mm, greater than 0 and below D0.
    pub exit_diameter_mm: f64,
    /// Accumulated true strain since the last anneal at entry, 0 or more.
    pub strain_before: f64,
    /// Back tension on the entry section, MPa, 0 or more.
    pub back_tension_mpa: f64,
    /// The die.
    pub die: Die,
}

impl DrawPass {
    /// Checks the sizes, strain and back tension, then the die.
    #[inline]
    pub fn validate(&self) -> Result<(), PassError> {
        // As in Die::validate: valid passes cost a few comparisons.
        let valid = self.entry_diameter_mm.is_finite()
            && self.exit_diameter_mm > 0.0
            && self.exit_diameter_mm < self.entry_diameter_mm
            && self.strain_before >= 0.0
            && self.strain_before.is_finite()
            && self.back_tension_mpa >= 0.0
            && self.back_tension_mpa.is_finite();
        if valid {
            return self.die.validate();
        }
        self.validate_each()
    }

    /// Each check of [`DrawPass::validate`] in turn, for the error it gives.
    #[cold]
    #[inline(never)]
    fn validate_each(&self) -> Result<(), PassError> {
        param::positive("entry_diameter_mm", self.entry_diameter_mm)?;
        param::positive("exit_diameter_mm", self.exit_diameter_mm)?;
        if self.exit_diameter_mm >= self.entry_diameter_mm {
            return Err(ParamError::new(
                "exit_diameter_mm",
                self.exit_diameter_mm,
                format!(
                    "must be below the entry diameter ({} mm)",
                    self.entry_diameter_mm
                ),
            )
            .into());
        }
        param::non_negative("strain_before", self.strain_before)?;
        param::non_negative("back_tension_mpa", self.back_tension_mpa)?;
        self.die.validate()
    }
}

/// Model constants that are not properties of the die or the stock.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Settings {
    /// C in the redundant-work factor `Phi = 1 + C (Delta - 1)`; 0.21 for wire
    /// (Hosford & Caddell, from memory), 0 or more.
    pub redundant_c: f64,
}

impl Default for Settings {
    fn default() -> Self {
        Settings { redundant_c: 0.21 }
    }
}

/// The drawing stress by each method, MPa.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct DrawStresses {
    /// Ideal (homogeneous) work.
    pub ideal: f64,
    /// Ideal work over the efficiency; `None` without an efficiency.
    pub efficiency: Option<f64>,
    /// Sachs slab solution.
    pub sachs: f64,
    /// Siebel.
    pub siebel: f64,
    /// Sachs plus redundant work.
    pub redundant: f64,
    /// Avitzur upper bound.
    pub upper_bound: f64,
}

impl DrawStresses {
    /// The stress by `method` (MPa); `max` is the largest of sachs, siebel,
    /// redundant and upper-bound.
    pub fn get(&self, method: Method) -> Result<f64, PassError> {
        Ok(match method {
            Method::Ideal => self.ideal,
            Method::Efficiency => self.efficiency.ok_or(PassError::MissingEfficiency)?,
            Method::Sachs => self.sachs,
            Method::Siebel => self.siebel,
            Method::Redundant => self.redundant,
            Method::UpperBound => self.upper_bound,
            Method::Max => self
                .sachs
                .max(self.siebel)
                .max(self.redundant)
                .max(self.upper_bound),
        })
    }
}

/// Everything one pass gives that does not depend on line speed.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PassMechanics {
    /// Entry diameter, mm.
    pub entry_diameter_mm: f64,
    /// Exit diameter (the die size), mm.
    pub exit_diameter_mm: f64,
    /// Fractional area reduction `1 - (D1/D0)^2`.
    pub area_reduction: f64,
    /// Elongation (length ratio) `A0/A1`.
    pub elongation: f64,
    /// Pass true strain `2 ln(D0/D1)`.
    pub pass_strain: f64,
    /// Accumulated strain at entry.
    pub strain_before: f64,
    /// Accumulated strain at exit.
    pub strain_after: f64,
    /// Deformation-zone shape `Delta = (alpha/r)(1 + sqrt(1-r))^2`.
    pub delta: f64,
    /// Redundant-work factor `Phi = 1 + C (Delta - 1)`, at least 1.
    pub redundant_factor: f64,
    /// Flow stress at entry, MPa.
    pub flow_stress_entry_mpa: f64,
    /// Flow stress at exit, MPa (what the drawn section can carry).
    pub flow_stress_exit_mpa: f64,
    /// Mean flow stress over the pass, MPa.
    pub mean_flow_stress_mpa: f64,
    /// Shear factor m used by the upper bound.
    pub friction_factor: f64,
    /// Whether m was derived from mu rather than given.
    pub friction_factor_derived: bool,
    /// Back tension, MPa.
    pub back_tension_mpa: f64,
    /// Drawing stress by each method, MPa.
    pub draw_stress_mpa: DrawStresses,
}

impl PassMechanics {
    /// Draw ratio `sigma_d / sigma_f(exit)` for `method`: below 1 in theory,
    /// 0.6 to 0.8 as a working ceiling (common practice).
    pub fn draw_ratio(&self, method: Method) -> Result<f64, PassError> {
        // A flow stress that underflows to 0 would give an infinite ratio.
        finite_or_overflow(
            "draw ratio",
            self.draw_stress_mpa.get(method)? / self.flow_stress_exit_mpa,
        )
    }
}

/// The semi-angle that minimises a method's drawing stress.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct OptimumAngle {
    /// Optimum semi-angle, degrees.
    pub semi_angle_deg: f64,
    /// The drawing stress there, MPa.
    pub draw_stress_mpa: f64,
    /// True when the minimum lies at an end of the search range (the stress
    /// still falls beyond it, as Sachs's does with a wider die).
    pub at_search_limit: bool,
}

/// Lowest semi-angle searched by [`optimum_semi_angle`], degrees.
pub const OPTIMUM_SEARCH_MIN_DEG: f64 = 1.0;
/// Highest semi-angle searched by [`optimum_semi_angle`], degrees.
pub const OPTIMUM_SEARCH_MAX_DEG: f64 = 20.0;

/// Fractional area reduction `r = 1 - (D1/D0)^2`.
pub fn area_reduction(entry_diameter_mm: f64, exit_diameter_mm: f64) -> f64 {
    let q = exit_diameter_mm / entry_diameter_mm;
    1.0 - q * q
}

/// True (homogeneous) strain `eps = ln(A0/A1) = 2 ln(D0/D1)`.
pub fn true_strain(entry_diameter_mm: f64, exit_diameter_mm: f64) -> f64 {
    2.0 * (entry_diameter_mm / exit_diameter_mm).ln()
}

/// Deformation-zone shape for axisymmetric drawing,
/// `Delta = (alpha / r) (1 + sqrt(1 - r))^2`, alpha in radians, r the area
/// reduction (Hosford & Caddell, from memory).
pub fn delta(semi_angle_rad: f64, area_reduction: f64) -> f64 {
    let s = 1.0 + (1.0 - area_reduction).sqrt();
    semi_angle_rad / area_reduction * s * s
}

/// Avitzur's `f(alpha) = (1/sin^2 a) {1 - cos a sqrt(1 - (11/12) sin^2 a) +
/// (1/sqrt 132) ln[(1 + sqrt(11/12)) / (sqrt(11/12) cos a + sqrt(1 - (11/12) sin^2 a))]}`,
/// alpha in radians; tends to 1 as alpha tends to 0 (Avitzur 1963; from memory).
pub fn avitzur_f(alpha_rad: f64) -> f64 {
    let (s, c) = alpha_rad.sin_cos();
    avitzur_f_of(s, c)
}

/// [`avitzur_f`] from `sin(alpha)` and `cos(alpha)` already at hand.
#[inline]
pub(crate) fn avitzur_f_of(s: f64, c: f64) -> f64 {
    let s2 = s * s;
    let k = 11.0 / 12.0;
    let root = (1.0 - k * s2).sqrt();
    let log = ((1.0 + k.sqrt()) / (k.sqrt() * c + root)).ln();
    (1.0 - c * root + log / 132f64.sqrt()) / s2
}

/// Drawing force `F = sigma_d A1`, kN, from the stress (MPa) and exit diameter (mm).
pub fn force_kn(draw_stress_mpa: f64, exit_diameter_mm: f64) -> f64 {
    draw_stress_mpa * PI * exit_diameter_mm * exit_diameter_mm / 4.0 / 1000.0
}

/// Pulling power `P = F v1`, kW, from the force (kN) and exit speed (m/s).
pub fn power_kw(force_kn: f64, exit_speed_m_s: f64) -> f64 {
    force_kn * exit_speed_m_s
}

/// Mean adiabatic temperature rise of the wire, deg C:
/// `dT = beta w / (rho c)` with w the work per unit volume done in the die
/// (MPa = MJ/m^3; the drawing stress less the back tension), beta the fraction
/// turned into heat (0.9 to 0.95, Taylor-Quinney; from memory). This is the
/// bulk mean; the surface runs much hotter.
pub fn temperature_rise_c(
    work_mpa: f64,
    density_kg_m3: f64,
    specific_heat_j_kg_k: f64,
    heat_fraction: f64,
) -> f64 {
    heat_fraction * work_mpa * 1.0e6 / (density_kg_m3 * specific_heat_j_kg_k)
}

/// Common-practice ceiling of the land (bearing) length over the exit
/// diameter, `L/d`, above which [`land_is_long`] calls a land long for the
/// size. Wire-die bearings are commonly made 0.3 to 0.5 d (from memory of
/// die-makers' guidance; short for fine wire, longer for bar to hold size
/// as the bearing wears); 0.6 d leaves room above that usual band.
pub const LAND_LONG_RATIO: f64 = 0.6;

/// Whether a die land of `land_length_mm` is long for an exit diameter of
/// `exit_diameter_mm`: `L/d` above [`LAND_LONG_RATIO`] (common practice).
/// A long land adds friction on the drawn section without helping the draw.
/// Exactly 0.6 d (to a part in a billion, so that a land written as 0.6 d is
/// not called long by rounding) is not long.
pub fn land_is_long(land_length_mm: f64, exit_diameter_mm: f64) -> bool {
    land_length_mm > LAND_LONG_RATIO * exit_diameter_mm * (1.0 + 1e-9)
}

/// The drawing stress at the end of a parallel die land (bearing), MPa:
/// `sigma_exit = Y - (Y - sigma_cone) decay`, `decay = e^(-4 mu L / d)`, with
/// `sigma_cone` the stress where the cone ends, `Y` the flow stress of the
/// drawn wire, `L` the land length and `d` the exit diameter.
///
/// Slab balance on the land (the standard slab treatment of a parallel
/// land, as in Hosford & Caddell, *Metal Forming*, drawing chapter; from
/// memory): the wire yields under the axial tension `sigma_x` and the die
/// pressure `p`, so `p = Y - sigma_x`; the axial force balance of a slice
/// `dx` of radius `r` is `pi r^2 d sigma_x = 2 pi r mu p dx`, i.e.
/// `d sigma_x / dx = (2 mu / r)(Y - sigma_x)`, whose solution over `L` is the
/// formula with `2 L / r = 4 L / d`. With no land (`decay = 1`) it returns
/// `sigma_cone` unchanged, and so it does when `sigma_cone >= Y`: the die
/// pressure `Y - sigma_x` cannot be negative, so a section already pulled to
/// its flow stress feels no land friction (and the pass fails its draw ratio
/// anyway).
pub fn land_exit_stress(sigma_cone_mpa: f64, flow_stress_mpa: f64, decay: f64) -> f64 {
    if decay == 1.0 || sigma_cone_mpa >= flow_stress_mpa {
        return sigma_cone_mpa;
    }
    flow_stress_mpa - (flow_stress_mpa - sigma_cone_mpa) * decay
}

/// `e^(-4 mu L / d)`, the land's decay factor in [`land_exit_stress`].
pub fn land_decay(friction: f64, land_length_mm: f64, exit_diameter_mm: f64) -> f64 {
    (-4.0 * friction * land_length_mm / exit_diameter_mm).exp()
}

/// Evaluates one pass: geometry, flow stresses and the drawing stress by every
/// method (see the module documentation for the formulas). The same as
/// `PreparedPass::new(law, pass, settings)?.mechanics(&pass.die)`.
pub fn analyse_pass(
    law: &FlowLaw,
    pass: &DrawPass,
    settings: &Settings,
) -> Result<PassMechanics, PassError> {
    PreparedPass::new(law, pass, settings)?.own_mechanics()
}

/// The semi-angle in [1, 20] degrees that minimises `method`'s drawing stress
/// for this pass (the pass's own angle is ignored), or `None` for methods that
/// do not depend on the angle (ideal, efficiency).
///
/// Brent's minimisation over the whole range to 1e-4 degree, about 10 to 12
/// probes (see [`PreparedPass::optimum_semi_angle`]). For Siebel the result
/// agrees with the closed form `alpha* = sqrt(1.5 mu eps)` when that lies in
/// the range.
pub fn optimum_semi_angle(
    law: &FlowLaw,
    pass: &DrawPass,
    settings: &Settings,
    method: Method,
) -> Result<Option<OptimumAngle>, PassError> {
    PreparedPass::new(law, pass, settings)?.own_optimum_semi_angle(method)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A pass of annealed stock from `d0` to `d1` mm with a back pull.
    fn annealed_pass(d0: f64, d1: f64, back_tension_mpa: f64, die: Die) -> DrawPass {
        DrawPass {
            entry_diameter_mm: d0,
            exit_diameter_mm: d1,
            strain_before: 0.0,
            back_tension_mpa,
            die,
        }
    }

    fn dieter_19_1() -> (FlowLaw, DrawPass) {
        // Dieter, Mechanical Metallurgy, Example 19.1 (published): K = 1300 MPa,
        // n = 0.3, annealed, r = 0.20, alpha = 6 deg, mu = 0.09. Its check
        // values are held in tests/core_reference.rs.
        let law = FlowLaw::hollomon(1300.0, 0.3).unwrap();
        let die = Die::new(6.0, 0.09).unwrap();
        (law, annealed_pass(10.0, 10.0 * 0.8f64.sqrt(), 0.0, die))
    }

    #[test]
    fn sachs_optimum_runs_to_the_widest_die() {
        let (law, pass) = dieter_19_1();
        let o = optimum_semi_angle(&law, &pass, &Settings::default(), Method::Sachs)
            .unwrap()
            .unwrap();
        assert!(o.at_search_limit && (o.semi_angle_deg - 20.0).abs() < 1e-9);
        assert_eq!(
            optimum_semi_angle(&law, &pass, &Settings::default(), Method::Ideal).unwrap(),
            None
        );
    }

    #[test]
    fn bad_die_names_the_parameter() {
        let e = Die::new(50.0, 0.05).unwrap_err().to_string();
        assert!(e.contains("semi_angle_deg") && e.contains("50"), "{e}");
        let e = Die::new(6.0, 0.7).unwrap_err().to_string();
        assert!(e.contains("friction") && e.contains("[0, 0.5]"), "{e}");
    }

    #[test]
    fn method_names_round_trip() {
        for m in Method::ALL {
            assert_eq!(m.name().parse::<Method>().unwrap(), m);
        }
        assert!("fast".parse::<Method>().is_err());
    }

    #[test]
    fn huge_flow_stress_gives_an_overflow_error_not_infinite_stresses() {
        // Each term is finite; back tension plus sigma_bar eps is not.
        let law = FlowLaw::perfectly_plastic(1e308).unwrap();
        let pass = annealed_pass(10.0, 5.0, 1e308, Die::new(6.0, 0.05).unwrap());
        let e = analyse_pass(&law, &pass, &Settings::default()).unwrap_err();
        assert!(matches!(e, PassError::Overflow { .. }), "{e}");
        let e = optimum_semi_angle(&law, &pass, &Settings::default(), Method::Siebel).unwrap_err();
        assert!(matches!(e, PassError::Overflow { .. }), "{e}");
    }

    #[test]
    fn subnormal_flow_stress_gives_an_overflow_error_not_an_infinite_draw_ratio() {
        let law = FlowLaw::perfectly_plastic(5e-324).unwrap();
        let pass = annealed_pass(0.05, 0.0499, 167.0, Die::new(0.5, 0.0).unwrap());
        let r = analyse_pass(&law, &pass, &Settings::default()).unwrap();
        assert!(matches!(
            r.draw_ratio(Method::Ideal),
            Err(PassError::Overflow { .. })
        ));
    }
}
