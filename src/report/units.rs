//! Units a report is shown in: SI (mm, MPa, kN, m/s, kW, C) or US customary
//! (in, ksi, lbf, ft/min, hp, F). The core always works in SI; only the
//! report converts, and every header names its unit.
//!
//! Factors (exact by definition unless said):
//! - 1 in = 25.4 mm (international yard and pound agreement, 1959);
//! - 1 lbf = 4.448 221 615 260 5 N (standard gravity 9.806 65 m/s^2 times the
//!   avoirdupois pound 0.453 592 37 kg), so 1 ksi = 6.894 757 293 168 MPa;
//! - 1 ft = 0.3048 m, so 1 m/s = 196.850 393 7 ft/min;
//! - 1 hp (mechanical) = 550 ft lbf/s = 745.699 871 582 270 W;
//! - F = C * 9/5 + 32; a temperature rise in F is 9/5 of one in C.
//!
//! Source: NIST Special Publication 811 (2008), Appendix B.

use clap::ValueEnum;

/// Newtons in a pound-force, the pound-force per square inch and the
/// horsepower: the core's factors (`coldpass::size::quantity`, which reads
/// the same units in files), so a file and its report convert alike.
pub use coldpass::size::quantity::{N_PER_LBF, W_PER_HP};
/// MPa in a ksi: 1000 lbf on a square inch (`PA_PER_PSI * 1000 / 1e6`).
pub const MPA_PER_KSI: f64 = coldpass::size::quantity::PA_PER_PSI * 1.0e-3;

/// Which units a report is shown in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub enum Units {
    /// mm, MPa, kN, m/s, kW, C.
    #[default]
    Si,
    /// in, ksi, lbf, ft/min, hp, F.
    Us,
}

/// What a figure measures; the report's value is in the core's SI unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// A pure number (strain, ratio, Delta, friction): never converted.
    Plain,
    /// A fraction shown in percent.
    Percent,
    /// Degrees of angle: never converted.
    Degrees,
    /// A diameter or length, mm.
    Length,
    /// A stress, MPa.
    Stress,
    /// A force, kN.
    Force,
    /// A speed, m/s.
    Speed,
    /// A power, kW.
    Power,
    /// A temperature, C.
    Temperature,
    /// A temperature difference, C.
    TemperatureRise,
}

impl Quantity {
    /// The unit label in `units` (empty for a pure number).
    pub fn label(self, units: Units) -> &'static str {
        use Quantity::*;
        match (self, units) {
            (Plain, _) => "",
            (Percent, _) => "%",
            (Degrees, _) => "deg",
            (Length, Units::Si) => "mm",
            (Length, Units::Us) => "in",
            (Stress, Units::Si) => "MPa",
            (Stress, Units::Us) => "ksi",
            (Force, Units::Si) => "kN",
            (Force, Units::Us) => "lbf",
            (Speed, Units::Si) => "m/s",
            (Speed, Units::Us) => "ft/min",
            (Power, Units::Si) => "kW",
            (Power, Units::Us) => "hp",
            (Temperature | TemperatureRise, Units::Si) => "C",
            (Temperature | TemperatureRise, Units::Us) => "F",
        }
    }

    /// `si` (in the core's unit: mm, MPa, kN, m/s, kW, C, or a fraction for
    /// `Percent`) converted to `units`.
    pub fn convert(self, si: f64, units: Units) -> f64 {
        use Quantity::*;
        match (self, units) {
            (Percent, _) => 100.0 * si,
            (Plain | Degrees, _) | (_, Units::Si) => si,
            (Length, Units::Us) => si / MM_PER_INCH,
            (Stress, Units::Us) => si / MPA_PER_KSI,
            (Force, Units::Us) => si * 1.0e3 / N_PER_LBF,
            (Speed, Units::Us) => si * 60.0 / coldpass::size::quantity::M_PER_FOOT,
            (Power, Units::Us) => si * 1.0e3 / W_PER_HP,
            (Temperature, Units::Us) => si * 9.0 / 5.0 + 32.0,
            (TemperatureRise, Units::Us) => si * 9.0 / 5.0,
        }
    }

    /// Decimals that show a figure to about the same resolution in either
    /// unit system, given the decimals used in SI.
    pub fn decimals(self, si_decimals: usize, units: Units) -> usize {
        use Quantity::*;
        match (self, units) {
            (_, Units::Si) => si_decimals,
            // 1 in = 25.4 mm: one more decimal keeps micrometre resolution.
            (Length, Units::Us) => si_decimals + 1,
            // 1 ksi = 6.9 MPa: one more decimal.
            (Stress, Units::Us) => si_decimals + 1,
            // 1 kN = 225 lbf: two fewer decimals.
            (Force, Units::Us) => si_decimals.saturating_sub(2),
            // 1 m/s = 197 ft/min: two fewer decimals.
            (Speed, Units::Us) => si_decimals.saturating_sub(2),
            _ => si_decimals,
        }
    }
}

/// Millimetres in an inch, as the core defines it.
pub use coldpass::size::MM_PER_INCH;

#[cfg(test)]
mod tests {
    use super::*;

    // NIST SP 811 (2008) Appendix B.8/B.9 conversion factors.
    #[test]
    fn factors_match_nist_sp811() {
        // 1 psi = 6.894 757 E+03 Pa, so 1 ksi = 6.894 757 MPa.
        assert!((MPA_PER_KSI - 6.894_757).abs() < 5e-7, "{MPA_PER_KSI}");
        // 1 hp (550 ft lbf/s) = 7.456 999 E+02 W.
        assert!((W_PER_HP - 745.6999).abs() < 5e-5, "{W_PER_HP}");
        // 1 ft/min = 5.08 E-03 m/s (exact).
        let one_ft_min = Quantity::Speed.convert(5.08e-3, Units::Us);
        assert!((one_ft_min - 1.0).abs() < 1e-12);
        // 1 lbf = 4.448 222 N.
        assert!((Quantity::Force.convert(4.448_222e-3, Units::Us) - 1.0).abs() < 1e-6);
        // 1 in = 25.4 mm (exact).
        assert_eq!(Quantity::Length.convert(25.4, Units::Us), 1.0);
        // Water freezes at 0 C = 32 F and boils at 100 C = 212 F (ITS-90, 1 atm).
        assert_eq!(Quantity::Temperature.convert(0.0, Units::Us), 32.0);
        assert!((Quantity::Temperature.convert(100.0, Units::Us) - 212.0).abs() < 1e-12);
        assert!((Quantity::TemperatureRise.convert(100.0, Units::Us) - 180.0).abs() < 1e-12);
        // SI leaves every figure as it is; a fraction shows in percent.
        assert_eq!(Quantity::Stress.convert(123.0, Units::Si), 123.0);
        assert_eq!(Quantity::Percent.convert(0.25, Units::Us), 25.0);
    }

    #[test]
    fn every_quantity_names_a_unit_but_pure_numbers() {
        use Quantity::*;
        for q in [
            Percent,
            Degrees,
            Length,
            Stress,
            Force,
            Speed,
            Power,
            Temperature,
            TemperatureRise,
        ] {
            assert!(!q.label(Units::Si).is_empty() && !q.label(Units::Us).is_empty());
        }
        assert_eq!(Plain.label(Units::Us), "");
    }
}
