//! Wire and bar sizes: millimetres, inches and American Wire Gauge.
//!
//! AWG (ASTM B258): `d = 0.005 in * 92^((36 - G)/39)`, with 0, 00, 000 and 0000
//! (also written 1/0 .. 4/0) as G = 0, -1, -2, -3. Gauges 0000 to 56 are
//! accepted (the range of the B258 table; from memory).

use serde::{Deserialize, Serialize};
use std::fmt;

use crate::param::ParamError;

/// Millimetres in an inch (exact by definition).
pub const MM_PER_INCH: f64 = 25.4;

/// Diameter (mm) of American Wire Gauge `gauge` (G = -3 for 0000 ... 56),
/// `0.005 in * 92^((36 - G)/39) * 25.4`.
pub fn awg_diameter_mm(gauge: i32) -> f64 {
    0.005 * 92f64.powf((36 - gauge) as f64 / 39.0) * MM_PER_INCH
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

    /// Parses `"8"`, `"8 mm"`, `"0.315 in"`, `"0.315\""`, `"AWG 10"`, `"AWG 00"`, `"AWG 2/0"`.
    pub fn parse(text: &str) -> Result<Self, ParamError> {
        let t = text.trim();
        let lower = t.to_ascii_lowercase();
        let allowed = "must be a number of mm, a number with a unit (\"8 mm\", \"0.315 in\") or a gauge (\"AWG 10\", \"AWG 4/0\")";
        let mm = if let Some(g) = lower.strip_prefix("awg") {
            let gauge = parse_gauge(g.trim()).ok_or_else(|| {
                ParamError::new(
                    "diameter",
                    format!("\"{t}\""),
                    "is not a known wire gauge: AWG 0000 (4/0) to AWG 56 are allowed",
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
