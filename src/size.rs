//! Wire and bar sizes: millimetres, inches, American Wire Gauge, and the two
//! British gauges, SWG and BWG.
//!
//! AWG (ASTM B258): `d = 0.005 in * 92^((36 - G)/39)`, with 0, 00, 000 and 0000
//! (also written 1/0 .. 4/0) as G = 0, -1, -2, -3. Gauges 0000 to 56 are
//! accepted (the range of the B258 table; from memory).
//!
//! SWG, the Imperial Standard Wire Gauge (Order in Council of 23 August 1883,
//! in force 1 March 1884; later British Standard BS 3737): a table, not a
//! formula, in thousandths of an inch from 7/0 (0.500 in) to 50 (0.001 in).
//!
//! BWG, the Birmingham (Stubs' iron) wire gauge: a table from 5/0 (0.500 in)
//! to 36 (0.004 in), still used for tube walls and hypodermic tubing.
//!
//! Values with other units (stresses, forces, speeds, powers, temperatures)
//! are read by [`quantity`].
//!
//! Both tables are written here from memory of the published tables; the
//! tests check them against sizes quoted in millimetres and the tables' own
//! step pattern.

use serde::{Deserialize, Serialize};
use std::fmt;

pub mod quantity;

use crate::param::ParamError;

/// Millimetres in an inch (exact by definition).
pub const MM_PER_INCH: f64 = 25.4;

/// Diameter (mm) of American Wire Gauge `gauge` (G = -3 for 0000 ... 56),
/// `0.005 in * 92^((36 - G)/39) * 25.4`.
pub fn awg_diameter_mm(gauge: i32) -> f64 {
    0.005 * 92f64.powf((36 - gauge) as f64 / 39.0) * MM_PER_INCH
}

/// SWG sizes in thousandths of an inch, 7/0 first (index 0) to 50 (index 56):
/// index `i` is gauge `i - 6` (0 is index 6).
const SWG_MILS: [f64; 57] = [
    500.0, 464.0, 432.0, 400.0, 372.0, 348.0, 324.0, // 7/0 .. 0
    300.0, 276.0, 252.0, 232.0, 212.0, 192.0, 176.0, 160.0, 144.0, 128.0, // 1 .. 10
    116.0, 104.0, 92.0, 80.0, 72.0, 64.0, 56.0, 48.0, 40.0, 36.0, // 11 .. 20
    32.0, 28.0, 24.0, 22.0, 20.0, 18.0, 16.4, 14.8, 13.6, 12.4, // 21 .. 30
    11.6, 10.8, 10.0, 9.2, 8.4, 7.6, 6.8, 6.0, 5.2, 4.8, // 31 .. 40
    4.4, 4.0, 3.6, 3.2, 2.8, 2.4, 2.0, 1.6, 1.2, 1.0, // 41 .. 50
];

/// BWG sizes in thousandths of an inch, 5/0 first (index 0) to 36 (index 40):
/// index `i` is gauge `i - 4` (0 is index 4).
const BWG_MILS: [f64; 41] = [
    500.0, 454.0, 425.0, 380.0, 340.0, // 5/0 .. 0
    300.0, 284.0, 259.0, 238.0, 220.0, 203.0, 180.0, 165.0, 148.0, 134.0, // 1 .. 10
    120.0, 109.0, 95.0, 83.0, 72.0, 65.0, 58.0, 49.0, 42.0, 35.0, // 11 .. 20
    32.0, 28.0, 25.0, 22.0, 20.0, 18.0, 16.0, 14.0, 13.0, 12.0, // 21 .. 30
    10.0, 9.0, 8.0, 7.0, 5.0, 4.0, // 31 .. 36
];

/// Diameter (mm) of Standard Wire Gauge `gauge` (-6 for 7/0 ... 50), or
/// `None` outside the table.
pub fn swg_diameter_mm(gauge: i32) -> Option<f64> {
    let i = usize::try_from(gauge + 6).ok()?;
    SWG_MILS.get(i).map(|mils| mils / 1000.0 * MM_PER_INCH)
}

/// Diameter (mm) of Birmingham Wire Gauge `gauge` (-4 for 5/0 ... 36), or
/// `None` outside the table.
pub fn bwg_diameter_mm(gauge: i32) -> Option<f64> {
    let i = usize::try_from(gauge + 4).ok()?;
    BWG_MILS.get(i).map(|mils| mils / 1000.0 * MM_PER_INCH)
}

/// Reads a British gauge number: `14`, `0`, `00` .. `0000000`, `2/0` .. `7/0`;
/// zeros count down from 0 (00 = -1).
fn parse_british_gauge(g: &str) -> Option<i32> {
    let g = g.trim_start_matches(['#', ' ']).trim();
    if let Some(n) = g.strip_suffix("/0") {
        let n: i32 = n.trim().parse().ok()?;
        return (1..=7).contains(&n).then_some(1 - n);
    }
    if !g.is_empty() && g.chars().all(|c| c == '0') {
        return Some(1 - g.len() as i32);
    }
    g.parse::<i32>().ok().filter(|n| *n >= 1)
}

/// A diameter as written in a file (`8.0`, `"8 mm"`, `"0.315 in"`, `"AWG 10"`)
/// and its value in millimetres.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(try_from = "SizeText", into = "SizeText")]
pub struct Diameter {
    mm: f64,
    written: Option<String>,
}

/// A diameter in a file: a number of millimetres or a string with a unit or gauge.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum SizeText {
    /// Millimetres.
    Mm(f64),
    /// `"8 mm"`, `"0.315 in"`, `"AWG 10"`, `"AWG 4/0"`.
    Text(String),
}

impl Diameter {
    /// A diameter of `mm` millimetres, which must be finite and greater than 0.
    pub fn from_mm(mm: f64) -> Result<Self, ParamError> {
        if !(mm.is_finite() && mm > 0.0) {
            return Err(ParamError::new(
                "diameter",
                mm,
                "must be a number of mm greater than 0",
            ));
        }
        Ok(Diameter { mm, written: None })
    }

    /// Parses `"8"`, `"8 mm"`, `"0.315 in"`, `"0.315\""`, `"AWG 10"`, `"AWG 00"`,
    /// `"AWG 2/0"`, `"SWG 14"`, `"SWG 7/0"`, `"BWG 18"`.
    pub fn parse(text: &str) -> Result<Self, ParamError> {
        let t = text.trim();
        let lower = t.to_ascii_lowercase();
        let allowed = "must be a number of mm, a number with a unit (\"8 mm\", \"0.315 in\") or a gauge (\"AWG 10\", \"AWG 4/0\", \"SWG 14\", \"BWG 18\")";
        let british = [
            (
                "swg",
                swg_diameter_mm as fn(i32) -> Option<f64>,
                "SWG 7/0 to SWG 50",
            ),
            (
                "bwg",
                bwg_diameter_mm as fn(i32) -> Option<f64>,
                "BWG 5/0 to BWG 36",
            ),
        ];
        let mm = if let Some((name, size, range, g)) = british
            .iter()
            .find_map(|(p, f, r)| lower.strip_prefix(p).map(|g| (p, f, r, g)))
        {
            parse_british_gauge(g).and_then(size).ok_or_else(|| {
                ParamError::new(
                    "diameter",
                    format!("\"{t}\""),
                    format!(
                        "allowed {range} (not a known {} gauge)",
                        name.to_ascii_uppercase()
                    ),
                )
            })?
        } else if let Some(g) = lower.strip_prefix("awg") {
            let gauge = parse_gauge(g.trim()).ok_or_else(|| {
                ParamError::new(
                    "diameter",
                    format!("\"{t}\""),
                    "allowed AWG 0000 (4/0) to AWG 56 (not a known wire gauge)",
                )
            })?;
            awg_diameter_mm(gauge)
        } else {
            let (num, factor) = if let Some(n) = lower.strip_suffix("mm") {
                (n, 1.0)
            } else if let Some(n) = lower
                .strip_suffix("inch")
                .or_else(|| lower.strip_suffix("in"))
            {
                (n, MM_PER_INCH)
            } else if let Some(n) = lower.strip_suffix('"') {
                (n, MM_PER_INCH)
            } else {
                (lower.as_str(), 1.0)
            };
            let v: f64 = num
                .trim()
                .parse()
                .map_err(|_| ParamError::new("diameter", format!("\"{t}\""), allowed))?;
            v * factor
        };
        let mut d = Diameter::from_mm(mm).map_err(|_| {
            ParamError::new("diameter", format!("\"{t}\""), "must be greater than 0")
        })?;
        d.written = Some(t.to_string());
        Ok(d)
    }

    /// The diameter in millimetres.
    pub fn mm(&self) -> f64 {
        self.mm
    }

    /// The text it was written as, when it was a string (`"AWG 10"`).
    pub fn written(&self) -> Option<&str> {
        self.written.as_deref()
    }
}

impl fmt::Display for Diameter {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match &self.written {
            Some(w) => write!(f, "{w}"),
            None => write!(f, "{} mm", self.mm),
        }
    }
}

fn parse_gauge(g: &str) -> Option<i32> {
    let g = g.trim_start_matches(['#', ' ']);
    let gauge = match g {
        "0000" | "4/0" => -3,
        "000" | "3/0" => -2,
        "00" | "2/0" => -1,
        "0" | "1/0" => 0,
        _ => g.parse::<i32>().ok().filter(|n| (1..=56).contains(n))?,
    };
    Some(gauge)
}

impl TryFrom<SizeText> for Diameter {
    type Error = ParamError;
    fn try_from(s: SizeText) -> Result<Self, ParamError> {
        match s {
            SizeText::Mm(mm) => Diameter::from_mm(mm),
            SizeText::Text(t) => Diameter::parse(&t),
        }
    }
}

impl From<Diameter> for SizeText {
    fn from(d: Diameter) -> Self {
        match d.written {
            Some(w) => SizeText::Text(w),
            None => SizeText::Mm(d.mm),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SWG against sizes quoted in millimetres (BS 3737 metric equivalents,
    /// from memory): 7/0 = 12.700 mm, 0 = 8.230 mm, 10 = 3.251 mm, 14 =
    /// 2.032 mm, 16 = 1.626 mm, 20 = 0.914 mm, 30 = 0.315 mm, 40 = 0.122 mm,
    /// 50 = 0.0254 mm.
    #[test]
    fn swg_matches_its_published_sizes() {
        for (text, mm) in [
            ("SWG 7/0", 12.700),
            ("SWG 0000000", 12.700),
            ("SWG 0", 8.230),
            ("SWG 10", 3.251),
            ("swg 14", 2.032),
            ("SWG 16", 1.626),
            ("SWG 20", 0.914),
            ("SWG 30", 0.315),
            ("SWG 40", 0.122),
            ("SWG 50", 0.0254),
        ] {
            let d = Diameter::parse(text).unwrap().mm();
            assert!((d - mm).abs() < 5e-4 + 1e-12, "{text}: {d} vs {mm}");
        }
        // The 1884 table falls in even steps over runs of gauges (thousandths
        // of an inch): 16 from 7 to 10 and 8 from 14 to 19.
        assert!(SWG_MILS.windows(2).all(|w| w[1] < w[0]), "strictly falling");
        let step = |a: i32, b: i32| {
            (swg_diameter_mm(a).unwrap() - swg_diameter_mm(b).unwrap()) / MM_PER_INCH * 1000.0
        };
        for g in 7..10 {
            assert!((step(g, g + 1) - 16.0).abs() < 1e-9, "SWG {g}");
        }
        for g in 14..19 {
            assert!((step(g, g + 1) - 8.0).abs() < 1e-9, "SWG {g}");
        }
        assert!(swg_diameter_mm(51).is_none() && swg_diameter_mm(-7).is_none());
        let e = Diameter::parse("SWG 60").unwrap_err().to_string();
        assert!(
            e.contains("SWG 60") && e.contains("SWG 7/0 to SWG 50"),
            "{e}"
        );
    }

    /// BWG against sizes in common use (from memory): 18 BWG = 0.049 in
    /// (1.245 mm, hypodermic and instrument tube walls), 10 BWG = 0.134 in
    /// (3.404 mm, boiler tubes), 14 BWG = 0.083 in (2.108 mm), 5/0 = 0.500 in,
    /// 36 = 0.004 in.
    #[test]
    fn bwg_matches_its_published_sizes() {
        for (text, inch) in [
            ("BWG 18", 0.049),
            ("BWG 10", 0.134),
            ("BWG 14", 0.083),
            ("BWG 5/0", 0.500),
            ("BWG 00000", 0.500),
            ("BWG 0", 0.340),
            ("BWG 36", 0.004),
        ] {
            let d = Diameter::parse(text).unwrap().mm();
            assert!((d - inch * 25.4).abs() < 1e-9, "{text}: {d}");
        }
        assert!(BWG_MILS.windows(2).all(|w| w[1] < w[0]), "strictly falling");
        assert!(Diameter::parse("BWG 6/0").is_err());
        assert!(Diameter::parse("BWG 37").is_err());
        // SWG and BWG differ: 18 SWG is 0.048 in, 18 BWG 0.049 in.
        assert!(swg_diameter_mm(18).unwrap() < bwg_diameter_mm(18).unwrap());
    }

    #[test]
    fn units_and_gauges() {
        assert_eq!(Diameter::parse("8 mm").unwrap().mm(), 8.0);
        assert!((Diameter::parse("0.315 in").unwrap().mm() - 8.001).abs() < 1e-9);
        assert_eq!(
            Diameter::parse("AWG 4/0").unwrap().mm(),
            Diameter::parse("awg 0000").unwrap().mm()
        );
        let e = Diameter::parse("AWG 99").unwrap_err().to_string();
        assert!(e.contains("AWG 99") && e.contains("4/0"), "{e}");
        assert!(Diameter::parse("-3 mm").is_err());
        assert!(Diameter::parse("eight").is_err());
        assert!(Diameter::from_mm(f64::NAN).is_err());
    }
}
