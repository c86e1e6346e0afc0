//! Stresses as a law's keys are written in a file: a plain number of MPa or
//! a number with a stress unit (`"60 ksi"`, `"414 MPa"`; the factors of
//! [`crate::size::quantity`], NIST SP 811), read for serde's
//! `deserialize_with` with errors that name the key.

use serde::Deserialize;

use crate::param::ParamError;
use crate::size::quantity::{self, Kind};

/// A stress as written in a law: its value in MPa, or why it cannot be
/// read (the text as written and the rule), for an error naming its key.
enum WrittenStress {
    Mpa(f64),
    Bad { value: String, why: String },
}

impl WrittenStress {
    /// The value in MPa, or a [`ParamError`] naming `key`, the value and the
    /// units allowed (`` `k_mpa` = "60 ksx" is not allowed: `ksx` is not a unit ...``).
    fn named(self, key: &str) -> Result<f64, ParamError> {
        match self {
            WrittenStress::Mpa(x) => Ok(x),
            WrittenStress::Bad { value, why } => Err(ParamError::new(key, value, why)),
        }
    }

    /// A value of the wrong kind (a list, a flag, nothing), shown as `shown`.
    fn wrong(shown: impl Into<String>) -> Self {
        WrittenStress::Bad {
            value: shown.into(),
            why: format!("must be {}", Kind::Stress.allowed()),
        }
    }
}

impl<'de> Deserialize<'de> for WrittenStress {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(WrittenStressVisitor)
    }
}

/// Reads a number as MPa and a text by [`quantity::parse`]; anything else
/// is kept as a bad value (a list or a mapping read through) so the caller
/// names the key.
struct WrittenStressVisitor;

impl<'de> serde::de::Visitor<'de> for WrittenStressVisitor {
    type Value = WrittenStress;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&Kind::Stress.allowed())
    }
    fn visit_f64<E>(self, v: f64) -> Result<WrittenStress, E> {
        Ok(WrittenStress::Mpa(v))
    }
    fn visit_i64<E>(self, v: i64) -> Result<WrittenStress, E> {
        Ok(WrittenStress::Mpa(v as f64))
    }
    fn visit_u64<E>(self, v: u64) -> Result<WrittenStress, E> {
        Ok(WrittenStress::Mpa(v as f64))
    }
    fn visit_str<E>(self, v: &str) -> Result<WrittenStress, E> {
        Ok(match quantity::parse(v, Kind::Stress) {
            Ok(x) => WrittenStress::Mpa(x),
            Err(e) => WrittenStress::Bad {
                value: e.value,
                why: format!("{}; allowed {}", e.why, e.allowed),
            },
        })
    }
    fn visit_bool<E>(self, v: bool) -> Result<WrittenStress, E> {
        Ok(WrittenStress::wrong(v.to_string()))
    }
    fn visit_unit<E>(self) -> Result<WrittenStress, E> {
        Ok(WrittenStress::wrong("nothing"))
    }
    fn visit_none<E>(self) -> Result<WrittenStress, E> {
        Ok(WrittenStress::wrong("nothing"))
    }
    fn visit_seq<A: serde::de::SeqAccess<'de>>(self, mut a: A) -> Result<WrittenStress, A::Error> {
        while a.next_element::<serde::de::IgnoredAny>()?.is_some() {}
        Ok(WrittenStress::wrong("a list"))
    }
    fn visit_map<A: serde::de::MapAccess<'de>>(self, mut a: A) -> Result<WrittenStress, A::Error> {
        while a
            .next_entry::<serde::de::IgnoredAny, serde::de::IgnoredAny>()?
            .is_some()
        {}
        Ok(WrittenStress::wrong("a mapping"))
    }
}

/// `serde(deserialize_with)` readers for the laws' stress keys, one per key
/// so that an error names it.
macro_rules! stress_keys {
    ($($key:ident),*) => {$(
        #[doc = concat!("Reads `", stringify!($key), "`: a number of MPa or a number with a stress unit.")]
        pub(super) fn $key<'de, D: serde::Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
            WrittenStress::deserialize(d)?
                .named(stringify!($key))
                .map_err(serde::de::Error::custom)
        }
    )*};
}

stress_keys!(
    yield_mpa,
    hardening_modulus_mpa,
    k_mpa,
    sigma0_mpa,
    saturation_mpa
);

/// One `[strain, stress]` point of a table, read as a two-element array: a
/// short or long one is refused as serde refuses `[f64; 2]` ("invalid
/// length 1, expected an array of length 2").
struct TablePoint(f64, WrittenStress);

impl<'de> Deserialize<'de> for TablePoint {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_tuple(2, TablePointVisitor)
    }
}

/// Reads a [`TablePoint`] from a sequence of exactly two values.
struct TablePointVisitor;

impl<'de> serde::de::Visitor<'de> for TablePointVisitor {
    type Value = TablePoint;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("an array of length 2")
    }

    fn visit_seq<A: serde::de::SeqAccess<'de>>(self, mut a: A) -> Result<TablePoint, A::Error> {
        use serde::de::Error;
        let strain = a
            .next_element::<f64>()?
            .ok_or_else(|| A::Error::invalid_length(0, &self))?;
        let stress = a
            .next_element::<WrittenStress>()?
            .ok_or_else(|| A::Error::invalid_length(1, &self))?;
        let mut extra = 0;
        while a.next_element::<serde::de::IgnoredAny>()?.is_some() {
            extra += 1;
        }
        if extra > 0 {
            return Err(A::Error::invalid_length(2 + extra, &self));
        }
        Ok(TablePoint(strain, stress))
    }
}

/// A table's `[strain, stress]` pairs: the strain a plain number, the stress
/// a plain number of MPa or a number with a stress unit (`[0.5, "36 ksi"]`);
/// a bad stress is named `points[i] stress_mpa`, as validation names it.
pub(super) fn stress_points<'de, D: serde::Deserializer<'de>>(
    d: D,
) -> Result<Vec<[f64; 2]>, D::Error> {
    Vec::<TablePoint>::deserialize(d)?
        .into_iter()
        .enumerate()
        .map(|(i, TablePoint(e, s))| Ok([e, s.named(&format!("points[{i}] stress_mpa"))?]))
        .collect::<Result<_, ParamError>>()
        .map_err(serde::de::Error::custom)
}
