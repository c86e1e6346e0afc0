//! A pass with its die-independent part computed once: geometry, flow
//! stresses, the mean flow stress and the angle-independent part of the
//! Sachs integral. Design, risk and the optimum-angle search evaluate many
//! dies (angles, frictions, lands) on the same sizes and stock; each die then
//! costs a few transcendental functions.
//!
//! ```
//! use coldpass::{Die, DrawPass, FlowLaw, Method, Settings};
//! use coldpass::pass::PreparedPass;
//!
//! let law = FlowLaw::hollomon(530.0, 0.26).unwrap();
//! let pass = DrawPass {
//!     entry_diameter_mm: 5.0,
//!     exit_diameter_mm: 4.5,
//!     strain_before: 0.3,
//!     back_tension_mpa: 0.0,
//!     die: Die::new(6.0, 0.05).unwrap(),
//! };
//! let prepared = PreparedPass::new(&law, &pass, &Settings::default()).unwrap();
//! for deg in [4.0, 6.0, 8.0] {
//!     let die = Die::new(deg, 0.05).unwrap();
//!     let s = prepared.stresses(&die).unwrap();
//!     assert!(s.redundant > s.sachs);
//! }
//! ```

use crate::flow::FlowLaw;
use crate::param;

use super::sachs::{self, SachsForm};
use super::{
    area_reduction, avitzur_f_of, delta, finite_or_overflow, land_exit_stress, true_strain, Die,
    DrawPass, DrawStresses, Method, PassError, PassMechanics, Settings,
};

/// A pass whose die-independent part is computed once (see the module
/// documentation). Build it with [`PreparedPass::new`], then ask for any die
/// with [`PreparedPass::stresses`], [`PreparedPass::mechanics`] or
/// [`PreparedPass::optimum_semi_angle`].
#[derive(Debug, Clone)]
pub struct PreparedPass<'a> {
    pub(super) law: &'a FlowLaw,
    entry_diameter_mm: f64,
    exit_diameter_mm: f64,
    pub(super) strain_before: f64,
    pub(super) eps: f64,
    reduction: f64,
    pub(super) mean: f64,
    back: f64,
    flow_entry: f64,
    flow_exit: f64,
    c: f64,
    form: SachsForm,
    /// The pass's own die, validated with the pass.
    die: Die,
}

/// The die's part of a pass for one evaluation, angle aside.
#[derive(Debug, Clone, Copy)]
pub(super) struct DieTerms {
    mu: f64,
    m: f64,
    m_derived: bool,
    land_over_rf: f64,
    /// `e^(-4 mu L / d)` of the slab land balance; `None` without a land.
    land_decay: Option<f64>,
    efficiency: Option<f64>,
}

impl DieTerms {
    fn new(die: &Die, exit_diameter_mm: f64) -> Self {
        let (m, m_derived) = die.shear_factor();
        let land = die.land_length_mm;
        DieTerms {
            mu: die.friction,
            m,
            m_derived,
            land_over_rf: land / (0.5 * exit_diameter_mm),
            land_decay: (land > 0.0).then(|| (-4.0 * die.friction * land / exit_diameter_mm).exp()),
            efficiency: die.efficiency,
        }
    }
}

impl<'a> PreparedPass<'a> {
    /// Validates the pass (sizes, strain, back tension and its die) and the
    /// settings, and computes the die-independent part.
    #[inline]
    pub fn new(law: &'a FlowLaw, pass: &DrawPass, settings: &Settings) -> Result<Self, PassError> {
        pass.validate()?;
        param::non_negative("redundant_c", settings.redundant_c)?;
        let eps = true_strain(pass.entry_diameter_mm, pass.exit_diameter_mm);
        let ea = pass.strain_before;
        let flow = sachs::FlowParts::new(law, ea, eps)?;
        Ok(PreparedPass {
            law,
            entry_diameter_mm: pass.entry_diameter_mm,
            exit_diameter_mm: pass.exit_diameter_mm,
            strain_before: ea,
            eps,
            reduction: area_reduction(pass.entry_diameter_mm, pass.exit_diameter_mm),
            mean: flow.mean_mpa,
            back: pass.back_tension_mpa,
            flow_entry: flow.entry_mpa,
            flow_exit: flow.exit_mpa,
            c: settings.redundant_c,
            form: flow.form,
            die: pass.die,
        })
    }

    /// [`PreparedPass::mechanics`] with the pass's own die (validated with
    /// the pass): what [`super::analyse_pass`] gives.
    #[inline]
    pub fn own_mechanics(&self) -> Result<PassMechanics, PassError> {
        self.mechanics_of(&self.die)
    }

    /// [`PreparedPass::optimum_semi_angle`] with the pass's own die's
    /// friction, land and efficiency: what [`super::optimum_semi_angle`] gives.
    pub fn own_optimum_semi_angle(
        &self,
        method: Method,
    ) -> Result<Option<super::OptimumAngle>, PassError> {
        self.optimum_of(&self.die, method)
    }

    /// Pass true strain `2 ln(D0/D1)`.
    pub fn pass_strain(&self) -> f64 {
        self.eps
    }

    /// Mean flow stress over the pass, MPa.
    pub fn mean_flow_stress_mpa(&self) -> f64 {
        self.mean
    }

    /// Flow stress at exit, MPa.
    pub fn flow_stress_exit_mpa(&self) -> f64 {
        self.flow_exit
    }

    /// The drawing stress by every method with `die` (validated) in place of
    /// the pass's own die, MPa.
    pub fn stresses(&self, die: &Die) -> Result<DrawStresses, PassError> {
        die.validate()?;
        let t = DieTerms::new(die, self.exit_diameter_mm);
        self.all_stresses(&t, die.semi_angle_deg.to_radians())
    }

    /// The drawing stress by `method` with `die` (validated), MPa.
    pub fn stress_mpa(&self, die: &Die, method: Method) -> Result<f64, PassError> {
        die.validate()?;
        let t = DieTerms::new(die, self.exit_diameter_mm);
        finite_or_overflow(
            "drawing stress",
            self.stress(&t, method, die.semi_angle_deg.to_radians())?,
        )
    }

    /// Everything [`super::analyse_pass`] gives, with `die` (validated).
    pub fn mechanics(&self, die: &Die) -> Result<PassMechanics, PassError> {
        die.validate()?;
        self.mechanics_of(die)
    }

    /// [`PreparedPass::mechanics`] with `die` already validated.
    #[inline]
    fn mechanics_of(&self, die: &Die) -> Result<PassMechanics, PassError> {
        let t = DieTerms::new(die, self.exit_diameter_mm);
        let angle = AngleTerms::of(die.semi_angle_deg);
        let alpha = angle.alpha;
        let strain_after = self.strain_before + self.eps;
        let shape = delta(alpha, self.reduction);
        let result = PassMechanics {
            entry_diameter_mm: self.entry_diameter_mm,
            exit_diameter_mm: self.exit_diameter_mm,
            area_reduction: self.reduction,
            elongation: self.eps.exp(),
            pass_strain: self.eps,
            strain_before: self.strain_before,
            strain_after,
            delta: shape,
            redundant_factor: self.factor_of(shape),
            flow_stress_entry_mpa: self.flow_entry,
            flow_stress_exit_mpa: self.flow_exit,
            mean_flow_stress_mpa: self.mean,
            friction_factor: t.m,
            friction_factor_derived: t.m_derived,
            back_tension_mpa: self.back,
            draw_stress_mpa: self.all_stresses_with_delta(&t, angle, shape)?,
        };
        // Valid but extreme inputs (a law constant near f64::MAX, a subnormal
        // yield stress) can overflow; report that rather than return infinities.
        let s = &result.draw_stress_mpa;
        for (quantity, value) in [
            ("elongation", result.elongation),
            ("deformation-zone shape Delta", result.delta),
            ("redundant-work factor", result.redundant_factor),
            ("entry flow stress", result.flow_stress_entry_mpa),
            ("exit flow stress", result.flow_stress_exit_mpa),
            ("drawing stress by ideal work", s.ideal),
            ("drawing stress by efficiency", s.efficiency.unwrap_or(0.0)),
            ("drawing stress by sachs", s.sachs),
            ("drawing stress by siebel", s.siebel),
            ("drawing stress by redundant work", s.redundant),
            ("drawing stress by upper bound", s.upper_bound),
        ] {
            finite_or_overflow(quantity, value)?;
        }
        Ok(result)
    }

    /// The Sachs drawing stress on the cone's exit by adaptive quadrature of
    /// the integral (no series, no closed form), MPa: the reference the fast
    /// path is checked against. Ignores the land.
    pub fn sachs_cone_by_quadrature_mpa(&self, die: &Die) -> Result<f64, PassError> {
        die.validate()?;
        let b = die.friction / die.semi_angle_deg.to_radians().tan();
        let i = sachs::integral_by_quadrature(self.law, self.strain_before, self.eps, b)?;
        Ok(self.back * (-b * self.eps).exp() + (1.0 + b) * i)
    }

    fn all_stresses(&self, t: &DieTerms, alpha: f64) -> Result<DrawStresses, PassError> {
        self.all_stresses_with_delta(t, alpha, delta(alpha, self.reduction))
    }

    /// Every method's stress, with `shape = delta(alpha, r)` already at hand.
    fn all_stresses_with_delta<A: Angle>(
        &self,
        t: &DieTerms,
        alpha: A,
        shape: f64,
    ) -> Result<DrawStresses, PassError> {
        let cone = self.sachs_cone(t, alpha)?;
        Ok(DrawStresses {
            ideal: self.ideal(),
            efficiency: match t.efficiency {
                Some(_) => Some(self.ideal_over_efficiency(t)?),
                None => None,
            },
            sachs: self.land(t, cone),
            siebel: self.land(t, self.siebel_cone(t, alpha)),
            redundant: self.land(t, self.redundant_cone_of(shape, cone)),
            upper_bound: self.upper_bound(t, alpha),
        })
    }

    /// The drawing stress by `method` with `die` (validated) and its angle's
    /// terms computed once ([`AngleTerms::new`] of `die.semi_angle_deg`), MPa:
    /// the same figures as [`PreparedPass::stress_mpa`], to the bit, without
    /// recomputing the angle's tangent, sine, cosine and Avitzur's `f(alpha)`
    /// for every pass that tries the same stock angle.
    pub fn stress_mpa_at(
        &self,
        die: &Die,
        angle: &AngleTerms,
        method: Method,
    ) -> Result<f64, PassError> {
        die.validate()?;
        debug_assert_eq!(angle.alpha, die.semi_angle_deg.to_radians());
        let t = DieTerms::new(die, self.exit_diameter_mm);
        finite_or_overflow("drawing stress", self.stress(&t, method, *angle)?)
    }

    #[inline]
    pub(super) fn stress<A: Angle>(
        &self,
        t: &DieTerms,
        method: Method,
        alpha: A,
    ) -> Result<f64, PassError> {
        Ok(match method {
            Method::Ideal => self.ideal(),
            Method::Efficiency => self.ideal_over_efficiency(t)?,
            Method::Sachs => self.land(t, self.sachs_cone(t, alpha)?),
            Method::Siebel => self.land(t, self.siebel_cone(t, alpha)),
            Method::Redundant => {
                let cone = self.sachs_cone(t, alpha)?;
                self.land(t, self.redundant_cone(alpha, cone))
            }
            Method::UpperBound => self.upper_bound(t, alpha),
            Method::Max => {
                let cone = self.sachs_cone(t, alpha)?;
                self.land(t, cone)
                    .max(self.land(t, self.siebel_cone(t, alpha)))
                    .max(self.land(t, self.redundant_cone(alpha, cone)))
                    .max(self.upper_bound(t, alpha))
            }
        })
    }

    pub(super) fn die_terms(&self, die: &Die) -> DieTerms {
        DieTerms::new(die, self.exit_diameter_mm)
    }

    /// The slab balance on the land: `Y - (Y - sigma_cone) e^(-4 mu L / d)`.
    #[inline]
    fn land(&self, t: &DieTerms, cone: f64) -> f64 {
        match t.land_decay {
            Some(decay) => land_exit_stress(cone, self.flow_exit, decay),
            None => cone,
        }
    }

    fn ideal(&self) -> f64 {
        self.back + self.mean * self.eps
    }

    fn ideal_over_efficiency(&self, t: &DieTerms) -> Result<f64, PassError> {
        let eta = t.efficiency.ok_or(PassError::MissingEfficiency)?;
        Ok(self.back + self.mean * self.eps / eta)
    }

    fn sachs_cone<A: Angle>(&self, t: &DieTerms, alpha: A) -> Result<f64, PassError> {
        let b = t.mu / alpha.tan();
        let decay = (-b * self.eps).exp();
        let integral = match self.form.integral(b, self.eps, decay) {
            Some(v) => v,
            None => sachs::integral_by_quadrature(self.law, self.strain_before, self.eps, b)?,
        };
        Ok(self.back * decay + (1.0 + b) * integral)
    }

    fn siebel_cone<A: Angle>(&self, t: &DieTerms, alpha: A) -> f64 {
        let alpha = alpha.rad();
        self.back + self.mean * ((1.0 + t.mu / alpha) * self.eps + 2.0 / 3.0 * alpha)
    }

    fn redundant_factor<A: Angle>(&self, alpha: A) -> f64 {
        self.factor_of(delta(alpha.rad(), self.reduction))
    }

    /// `Phi = 1 + C (Delta - 1)` for `Delta > 1`, else 1.
    #[inline]
    fn factor_of(&self, d: f64) -> f64 {
        if d > 1.0 {
            1.0 + self.c * (d - 1.0)
        } else {
            1.0
        }
    }

    fn redundant_cone<A: Angle>(&self, alpha: A, sachs_cone: f64) -> f64 {
        sachs_cone + (self.redundant_factor(alpha) - 1.0) * self.mean * self.eps
    }

    /// [`Self::redundant_cone`] with `Delta` already at hand.
    #[inline]
    fn redundant_cone_of(&self, shape: f64, sachs_cone: f64) -> f64 {
        sachs_cone + (self.factor_of(shape) - 1.0) * self.mean * self.eps
    }

    #[inline]
    pub(super) fn upper_bound<A: Angle>(&self, t: &DieTerms, angle: A) -> f64 {
        let (s, c) = angle.sin_cos();
        let alpha = angle.rad();
        let cot = c / s;
        let half = 0.5 * self.eps; // ln(R0/Rf)
        let k = 2.0 / 3f64.sqrt();
        self.back
            + self.mean
                * (2.0 * angle.avitzur_f(s, c) * half
                    + k * (alpha / (s * s) - cot)
                    + k * t.m * (cot * half + t.land_over_rf))
    }
}

/// A die semi-angle's own terms, in radians: the angle, its tangent, sine and
/// cosine and Avitzur's `f(alpha)` ([`super::avitzur_f`]), computed once for a
/// stock angle that many passes try ([`PreparedPass::stress_mpa_at`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AngleTerms {
    alpha: f64,
    tan: f64,
    sin: f64,
    cos: f64,
    avitzur_f: f64,
}

thread_local! {
    /// The last semi-angle's terms (by its bits) on this thread: a schedule's
    /// passes mostly share one die angle, and a risk sample runs the same
    /// dies again, so each pass's mechanics finds its angle's terms here.
    static LAST_ANGLE: std::cell::Cell<Option<(u64, AngleTerms)>> =
        const { std::cell::Cell::new(None) };
}

impl AngleTerms {
    /// [`AngleTerms::new`] of `semi_angle_deg`, from the last angle's terms
    /// when it is the same (the same bits either way).
    #[inline]
    pub(super) fn of(semi_angle_deg: f64) -> Self {
        let key = semi_angle_deg.to_bits();
        LAST_ANGLE.with(|c| match c.get() {
            Some((k, t)) if k == key => t,
            _ => {
                let t = AngleTerms::new(semi_angle_deg);
                c.set(Some((key, t)));
                t
            }
        })
    }

    /// The terms of a semi-angle of `semi_angle_deg` degrees (the radians as
    /// `f64::to_radians` gives them, so every figure is the one computed on
    /// the fly).
    pub fn new(semi_angle_deg: f64) -> Self {
        let alpha = semi_angle_deg.to_radians();
        let (sin, cos) = alpha.sin_cos();
        AngleTerms {
            alpha,
            tan: alpha.tan(),
            sin,
            cos,
            avitzur_f: avitzur_f_of(sin, cos),
        }
    }
}

/// A semi-angle as the stress formulas need it: computed on the fly (`f64`,
/// radians) or once ([`AngleTerms`]); both give the same bits.
pub(super) trait Angle: Copy {
    fn rad(self) -> f64;
    fn tan(self) -> f64;
    fn sin_cos(self) -> (f64, f64);
    /// Avitzur's `f` from this angle's sine and cosine.
    fn avitzur_f(self, s: f64, c: f64) -> f64;
}

impl Angle for f64 {
    #[inline]
    fn rad(self) -> f64 {
        self
    }
    #[inline]
    fn tan(self) -> f64 {
        f64::tan(self)
    }
    #[inline]
    fn sin_cos(self) -> (f64, f64) {
        f64::sin_cos(self)
    }
    #[inline]
    fn avitzur_f(self, s: f64, c: f64) -> f64 {
        avitzur_f_of(s, c)
    }
}

impl Angle for AngleTerms {
    #[inline]
    fn rad(self) -> f64 {
        self.alpha
    }
    #[inline]
    fn tan(self) -> f64 {
        self.tan
    }
    #[inline]
    fn sin_cos(self) -> (f64, f64) {
        (self.sin, self.cos)
    }
    #[inline]
    fn avitzur_f(self, _s: f64, _c: f64) -> f64 {
        self.avitzur_f
    }
}
