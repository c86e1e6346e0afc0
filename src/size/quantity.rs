//! Values written with their unit in a file: stresses (`"20 ksi"`,
//! `"150 MPa"`), forces (`"500 lbf"`, `"2 kN"`), speeds (`"1500 ft/min"`,
//! `"8 m/s"`), powers (`"30 hp"`, `"22 kW"`), temperatures (`"300 F"`) and
//! lengths (`"24 in"`). A plain number keeps the unit its key names
//! (`back_tension_mpa: 20` is 20 MPa), so every file written before stays
//! the same.
//!
//! Conversion factors: NIST Special Publication 811 (2008 edition, A.
//! Thompson and B. N. Taylor, "Guide for the Use of the International System
//! of Units"), Appendix B.8 and B.9. They are built here from the exact
//! definitions that table rests on: the international foot 0.3048 m and inch
//! 0.0254 m, the avoirdupois pound 0.453 592 37 kg and standard gravity
//! 9.806 65 m/s^2 (so 1 lbf = 4.448 221 615 260 5 N, 1 psi = 6 894.757 Pa,
//! 1 hp = 550 ft lbf/s = 745.699 9 W); `t/C = (t/F - 32) / 1.8` and
//! `t/C = T/K - 273.15` (SP 811, 4.2.1.1 and B.9). The tests hold each
//! factor to SP 811's printed seven digits.

use std::fmt;

use serde::de::{Deserializer, Error as DeError, Visitor};

/// The international foot, m (exact; SP 811 B.9).
pub const M_PER_FOOT: f64 = 0.3048;
/// The international inch, m (exact; SP 811 B.9).
pub const M_PER_INCH: f64 = 0.0254;
/// The avoirdupois pound, kg (exact; SP 811 B.9).
pub const KG_PER_POUND: f64 = 0.453_592_37;
/// Standard acceleration of gravity, m/s^2 (exact; SP 811 B.9, footnote on
/// kilogram-force).
pub const STANDARD_GRAVITY_M_S2: f64 = 9.806_65;
/// Newtons in a pound-force, `0.453 592 37 kg * 9.806 65 m/s^2` (exact).
pub const N_PER_LBF: f64 = KG_PER_POUND * STANDARD_GRAVITY_M_S2;
/// Pascals in a pound-force per square inch, `N_PER_LBF / 0.0254^2`.
pub const PA_PER_PSI: f64 = N_PER_LBF / (M_PER_INCH * M_PER_INCH);
/// Watts in a (mechanical) horsepower, `550 ft lbf/s`.
pub const W_PER_HP: f64 = 550.0 * M_PER_FOOT * N_PER_LBF;
/// Watts in a metric horsepower (PS), `75 kgf m/s`.
pub const W_PER_METRIC_HP: f64 = 75.0 * STANDARD_GRAVITY_M_S2;

/// What a value in a file measures, with the unit a plain number is taken in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// A stress; a plain number is MPa.
    Stress,
    /// A force; a plain number is kN.
    Force,
    /// A speed; a plain number is m/s.
    Speed,
    /// A power; a plain number is kW.
    Power,
    /// A temperature (not a difference); a plain number is deg C.
    Temperature,
    /// A length or diameter; a plain number is mm.
    Length,
}

/// One unit a value may be written in: `value_in_key_unit = x * scale + offset`.
struct Unit {
    /// How it is shown in a message.
    symbol: &'static str,
    /// Spellings accepted, lower case with spaces, `°` and `^` removed.
    spellings: &'static [&'static str],
    kind: Kind,
    scale: f64,
    offset: f64,
}

const fn unit(
    symbol: &'static str,
    spellings: &'static [&'static str],
    kind: Kind,
    scale: f64,
) -> Unit {
    Unit {
        symbol,
        spellings,
        kind,
        scale,
        offset: 0.0,
    }
}

/// Every unit accepted, the key's own unit first in each kind.
const UNITS: &[Unit] = &[
    unit("MPa", &["mpa"], Kind::Stress, 1.0),
    unit("N/mm2", &["n/mm2", "n/mm²"], Kind::Stress, 1.0),
    unit("GPa", &["gpa"], Kind::Stress, 1.0e3),
    unit("kPa", &["kpa"], Kind::Stress, 1.0e-3),
    unit("bar", &["bar"], Kind::Stress, 0.1),
    unit("ksi", &["ksi"], Kind::Stress, PA_PER_PSI * 1.0e-3),
    unit(
        "psi",
        &["psi", "lbf/in2"],
        Kind::Stress,
        PA_PER_PSI * 1.0e-6,
    ),
    unit(
        "kgf/mm2",
        &["kgf/mm2", "kgf/mm²"],
        Kind::Stress,
        STANDARD_GRAVITY_M_S2,
    ),
    unit("kN", &["kn"], Kind::Force, 1.0),
    unit("N", &["n"], Kind::Force, 1.0e-3),
    unit("lbf", &["lbf"], Kind::Force, N_PER_LBF * 1.0e-3),
    unit("kip", &["kip", "kips"], Kind::Force, N_PER_LBF),
    unit(
        "kgf",
        &["kgf", "kp"],
        Kind::Force,
        STANDARD_GRAVITY_M_S2 * 1.0e-3,
    ),
    unit("m/s", &["m/s"], Kind::Speed, 1.0),
    unit("m/min", &["m/min"], Kind::Speed, 1.0 / 60.0),
    unit("ft/min", &["ft/min", "fpm"], Kind::Speed, M_PER_FOOT / 60.0),
    unit("ft/s", &["ft/s", "fps"], Kind::Speed, M_PER_FOOT),
    unit("kW", &["kw"], Kind::Power, 1.0),
    unit("W", &["w"], Kind::Power, 1.0e-3),
    unit("hp", &["hp"], Kind::Power, W_PER_HP * 1.0e-3),
    unit("PS", &["ps"], Kind::Power, W_PER_METRIC_HP * 1.0e-3),
    unit("C", &["c", "degc"], Kind::Temperature, 1.0),
    Unit {
        symbol: "F",
        spellings: &["f", "degf"],
        kind: Kind::Temperature,
        scale: 1.0 / 1.8,
        offset: -32.0 / 1.8,
    },
    Unit {
        symbol: "K",
        spellings: &["k"],
        kind: Kind::Temperature,
        scale: 1.0,
        offset: -273.15,
    },
    unit("mm", &["mm"], Kind::Length, 1.0),
    unit("cm", &["cm"], Kind::Length, 10.0),
    unit("m", &["m"], Kind::Length, 1.0e3),
    unit("in", &["in", "inch", "inches", "\""], Kind::Length, 25.4),
    unit("ft", &["ft", "'"], Kind::Length, 304.8),
];

impl Kind {
    /// `a stress`, `a force`, ...
    pub fn noun(self) -> &'static str {
        match self {
            Kind::Stress => "a stress",
            Kind::Force => "a force",
            Kind::Speed => "a speed",
            Kind::Power => "a power",
            Kind::Temperature => "a temperature",
            Kind::Length => "a length",
        }
    }

    /// The unit a plain number is read in (`MPa`).
    pub fn key_unit(self) -> &'static str {
        self.units().next().map_or("", |u| u.symbol)
    }

    fn units(self) -> impl Iterator<Item = &'static Unit> {
        UNITS.iter().filter(move |u| u.kind == self)
    }

    /// The units accepted, as a list for a message (`MPa, N/mm2, ...`).
    pub fn symbols(self) -> String {
        self.units()
            .map(|u| u.symbol)
            .collect::<Vec<_>>()
            .join(", ")
    }

    /// Two examples of a value with its unit.
    fn examples(self) -> &'static str {
        match self {
            Kind::Stress => "\"150 MPa\", \"20 ksi\"",
            Kind::Force => "\"2 kN\", \"500 lbf\"",
            Kind::Speed => "\"8 m/s\", \"1500 ft/min\"",
            Kind::Power => "\"22 kW\", \"30 hp\"",
            Kind::Temperature => "\"150 C\", \"300 F\"",
            Kind::Length => "\"600 mm\", \"24 in\"",
        }
    }

    /// What a value of this kind may be, in words: `a number of MPa, or a
    /// number and one of MPa, N/mm2, ... ("150 MPa", "20 ksi")`.
    pub fn allowed(self) -> String {
        format!(
            "a number of {}, or a number and one of {} ({})",
            self.key_unit(),
            self.symbols(),
            self.examples()
        )
    }
}

/// Longest text read as a value with its unit, bytes (the number is found
/// by trying every split, so the length is bounded first).
pub const LONGEST_VALUE: usize = 64;

/// Why a value with a unit cannot be read.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("= {value}: {why}; allowed {allowed}")]
pub struct QuantityError {
    /// The text as written, quoted.
    pub value: String,
    /// What is wrong with it.
    pub why: String,
    /// What is allowed, in words.
    pub allowed: String,
}

/// Reads `text` (`"20 ksi"`, `"300 F"`, `"8"`) as `kind`, in the unit a
/// plain number of that kind is read in (MPa, kN, m/s, kW, C, mm): a number,
/// optionally followed by one of the kind's units (any case; spaces, `°` and
/// `^` ignored, so `"300 °F"`, `"150 N/mm^2"` and `"1500 FT/MIN"` read).
pub fn parse(text: &str, kind: Kind) -> Result<f64, QuantityError> {
    let t = text.trim();
    let fail = |why: String| QuantityError {
        value: if t.len() > LONGEST_VALUE {
            format!("\"{}...\"", t.chars().take(40).collect::<String>())
        } else {
            format!("\"{t}\"")
        },
        why,
        allowed: kind.allowed(),
    };
    if t.len() > LONGEST_VALUE {
        return Err(fail(format!(
            "a value with its unit is at most {LONGEST_VALUE} characters"
        )));
    }
    // The longest leading run that reads as a number; the rest is the unit.
    let split = (1..=t.len())
        .rev()
        .filter(|&i| t.is_char_boundary(i))
        .find(|&i| t[..i].trim().parse::<f64>().is_ok());
    let Some(split) = split else {
        return Err(fail("it does not start with a number".into()));
    };
    let x: f64 = t[..split].trim().parse().unwrap_or(f64::NAN);
    if !x.is_finite() {
        return Err(fail("the number must be finite".into()));
    }
    let written = &t[split..];
    let spelled: String = written
        .chars()
        .filter(|c| !c.is_whitespace() && !matches!(c, '°' | '^'))
        .flat_map(char::to_lowercase)
        .collect();
    if spelled.is_empty() {
        return Ok(x);
    }
    // A spelling may name units of two kinds; the key's kind wins.
    let mut same_spelling = UNITS
        .iter()
        .filter(|u| u.spellings.contains(&spelled.as_str()));
    let found = same_spelling
        .clone()
        .find(|u| u.kind == kind)
        .or_else(|| same_spelling.next());
    match found {
        Some(u) if u.kind == kind => Ok(x * u.scale + u.offset),
        Some(u) => Err(fail(format!(
            "{} is the unit of {}, where {} is needed",
            u.symbol,
            u.kind.noun(),
            kind.noun()
        ))),
        None if written.starts_with(',')
            && written[1..].starts_with(|c: char| c.is_ascii_digit()) =>
        {
            Err(fail(
                "the decimal is written with a comma: write it with a point (1.5, not 1,5)".into(),
            ))
        }
        None => Err(fail(format!(
            "`{}` is not a unit of {}",
            written.trim(),
            kind.noun()
        ))),
    }
}

/// Reads a number or a text with a unit as `0`.
struct QuantityVisitor(Kind);

impl<'de> Visitor<'de> for QuantityVisitor {
    type Value = f64;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0.allowed())
    }

    fn visit_f64<E: DeError>(self, v: f64) -> Result<f64, E> {
        Ok(v)
    }

    fn visit_i64<E: DeError>(self, v: i64) -> Result<f64, E> {
        Ok(v as f64)
    }

    fn visit_u64<E: DeError>(self, v: u64) -> Result<f64, E> {
        Ok(v as f64)
    }

    fn visit_i128<E: DeError>(self, v: i128) -> Result<f64, E> {
        Ok(v as f64)
    }

    fn visit_u128<E: DeError>(self, v: u128) -> Result<f64, E> {
        Ok(v as f64)
    }

    fn visit_str<E: DeError>(self, v: &str) -> Result<f64, E> {
        parse(v, self.0).map_err(E::custom)
    }
}

/// Reads `null` as none, anything else as a value of `0`.
struct OptionVisitor(Kind);

impl<'de> Visitor<'de> for OptionVisitor {
    type Value = Option<f64>;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0.allowed())
    }

    fn visit_none<E: DeError>(self) -> Result<Option<f64>, E> {
        Ok(None)
    }

    fn visit_unit<E: DeError>(self) -> Result<Option<f64>, E> {
        Ok(None)
    }

    fn visit_some<D: Deserializer<'de>>(self, d: D) -> Result<Option<f64>, D::Error> {
        d.deserialize_any(QuantityVisitor(self.0)).map(Some)
    }
}

/// A value of `kind` from a file: a number in the key's unit or a text with a unit.
pub fn deserialize<'de, D: Deserializer<'de>>(d: D, kind: Kind) -> Result<f64, D::Error> {
    d.deserialize_any(QuantityVisitor(kind))
}

/// An optional value of `kind` (`null` or absent is none).
pub fn deserialize_option<'de, D: Deserializer<'de>>(
    d: D,
    kind: Kind,
) -> Result<Option<f64>, D::Error> {
    d.deserialize_option(OptionVisitor(kind))
}

/// `serde(deserialize_with)` readers, one per kind, for `f64` and
/// `Option<f64>` keys: `#[serde(deserialize_with = "quantity::de::stress")]`.
pub mod de {
    use super::{deserialize, deserialize_option, Kind};
    use serde::Deserializer;

    macro_rules! readers {
        ($($one:ident, $opt:ident, $kind:expr;)*) => {$(
            #[doc = concat!("A `", stringify!($one), "` key's value (number or text with a unit).")]
            pub fn $one<'de, D: Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
                deserialize(d, $kind)
            }
            #[doc = concat!("An optional `", stringify!($one), "` key's value.")]
            pub fn $opt<'de, D: Deserializer<'de>>(d: D) -> Result<Option<f64>, D::Error> {
                deserialize_option(d, $kind)
            }
        )*};
    }

    readers! {
        stress, opt_stress, Kind::Stress;
        force, opt_force, Kind::Force;
        speed, opt_speed, Kind::Speed;
        power, opt_power, Kind::Power;
        temperature, opt_temperature, Kind::Temperature;
        length, opt_length, Kind::Length;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `ours` agrees with a factor NIST SP 811 (2008) Appendix B prints to
    /// seven significant digits as `mantissa E exponent`: within half a unit
    /// of its last printed digit.
    fn agrees_with_sp811(ours: f64, mantissa: f64, exponent: i32) {
        let printed = mantissa * 10f64.powi(exponent);
        let half_last_digit = 0.5e-6 * 10f64.powi(exponent);
        assert!(
            (ours - printed).abs() <= half_last_digit * (1.0 + 1e-6),
            "{ours} against SP 811's {mantissa}E{exponent}"
        );
    }

    /// Each factor against NIST SP 811 (2008) Appendix B.8 ("Factors for
    /// units listed alphabetically"), in SI base units.
    #[test]
    fn factors_match_nist_sp811_appendix_b8() {
        // pound-force (lbf) to newton (N): 4.448 222 E+00.
        agrees_with_sp811(parse("1 lbf", Kind::Force).unwrap() * 1e3, 4.448_222, 0);
        // kip (1 kip = 1000 lbf) to newton: 4.448 222 E+03.
        agrees_with_sp811(parse("1 kip", Kind::Force).unwrap() * 1e3, 4.448_222, 3);
        // kilogram-force (kgf) to newton: 9.806 65 E+00 (exact).
        assert_eq!(parse("1 kgf", Kind::Force).unwrap() * 1e3, 9.806_65);
        // pound-force per square inch (psi) to pascal: 6.894 757 E+03.
        agrees_with_sp811(parse("1 psi", Kind::Stress).unwrap() * 1e6, 6.894_757, 3);
        // kip per square inch (ksi) to pascal: 6.894 757 E+06.
        agrees_with_sp811(parse("1 ksi", Kind::Stress).unwrap() * 1e6, 6.894_757, 6);
        // kilogram-force per square millimeter to pascal: 9.806 65 E+06.
        agrees_with_sp811(parse("1 kgf/mm2", Kind::Stress).unwrap() * 1e6, 9.806_65, 6);
        // bar to pascal: 1.0 E+05 (exact).
        assert!((parse("1 bar", Kind::Stress).unwrap() - 0.1).abs() < 1e-15);
        // foot per minute to meter per second: 5.08 E-03 (exact).
        assert!((parse("1 ft/min", Kind::Speed).unwrap() - 5.08e-3).abs() < 1e-18);
        // foot per second to meter per second: 3.048 E-01 (exact).
        assert_eq!(parse("1 ft/s", Kind::Speed).unwrap(), 0.3048);
        // meter per minute: 1/60 m/s, 1.666 667 E-02.
        agrees_with_sp811(parse("1 m/min", Kind::Speed).unwrap(), 1.666_667, -2);
        // horsepower (550 ft lbf/s) to watt: 7.456 999 E+02.
        agrees_with_sp811(parse("1 hp", Kind::Power).unwrap() * 1e3, 7.456_999, 2);
        // horsepower (metric) to watt: 7.354 988 E+02.
        agrees_with_sp811(parse("1 PS", Kind::Power).unwrap() * 1e3, 7.354_988, 2);
        // inch to meter: 2.54 E-02 (exact); foot 3.048 E-01 (exact).
        assert_eq!(parse("1 in", Kind::Length).unwrap(), 25.4);
        assert_eq!(parse("1 ft", Kind::Length).unwrap(), 304.8);
    }

    /// Temperatures by SP 811 B.9: `t/C = (t/F - 32)/1.8`, `t/C = T/K -
    /// 273.15`; checked at the fixed points of water at 1 atm (0 C = 32 F =
    /// 273.15 K, 100 C = 212 F) and -40, where the two scales meet.
    #[test]
    fn temperatures_convert_with_their_offset() {
        for (text, c) in [
            ("32 F", 0.0),
            ("212 F", 100.0),
            ("-40 F", -40.0),
            ("300 °F", 148.888_888_888_888_9),
            ("273.15 K", 0.0),
            ("150 C", 150.0),
            ("150 degC", 150.0),
        ] {
            let got = parse(text, Kind::Temperature).unwrap();
            assert!((got - c).abs() < 1e-12, "{text}: {got}");
        }
    }

    #[test]
    fn spellings_case_and_spaces_do_not_matter() {
        for (text, kind, want) in [
            ("20 ksi", Kind::Stress, 137.895_145_863_367_2),
            ("20KSI", Kind::Stress, 137.895_145_863_367_2),
            ("150 N/mm^2", Kind::Stress, 150.0),
            ("150 n/mm²", Kind::Stress, 150.0),
            ("1500 FT/MIN", Kind::Speed, 7.62),
            ("1500 fpm", Kind::Speed, 7.62),
            ("8 m/s", Kind::Speed, 8.0),
            ("2 kN", Kind::Force, 2.0),
            ("2000 N", Kind::Force, 2.0),
            ("22 kW", Kind::Power, 22.0),
            ("1.5e3 W", Kind::Power, 1.5),
            ("8", Kind::Stress, 8.0),
            (" 8 ", Kind::Power, 8.0),
        ] {
            let got = parse(text, kind).unwrap();
            assert!(
                (got - want).abs() <= 1e-12 * want.abs(),
                "{text}: {got} vs {want}"
            );
        }
    }

    #[test]
    fn a_wrong_unit_names_the_value_and_the_units_allowed() {
        let e = parse("20 ksx", Kind::Stress).unwrap_err().to_string();
        assert!(
            e.starts_with("= \"20 ksx\": `ksx` is not a unit of a stress; allowed a number of MPa")
                && e.contains("ksi")
                && e.contains("psi"),
            "{e}"
        );
        let e = parse("2 kN", Kind::Stress).unwrap_err().to_string();
        assert!(
            e.contains("kN is the unit of a force, where a stress is needed"),
            "{e}"
        );
        let e = parse("hot", Kind::Temperature).unwrap_err().to_string();
        assert!(
            e.contains("does not start with a number") && e.contains("F"),
            "{e}"
        );
        let e = parse("1,5 ksi", Kind::Stress).unwrap_err().to_string();
        assert!(e.contains("with a point"), "{e}");
        assert!(parse("", Kind::Stress).is_err());
        let long = format!("1 {}", "x".repeat(10_000));
        let e = parse(&long, Kind::Stress).unwrap_err().to_string();
        assert!(e.len() < 400 && e.contains("at most 64"), "{e}");
        assert!(parse("inf F", Kind::Temperature).is_err());
        assert!(parse("NaN MPa", Kind::Stress).is_err());
    }
}
