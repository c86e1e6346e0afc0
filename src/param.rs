//! Validation of numeric inputs shared by every part of the core.
//!
//! Each check returns a [`ParamError`] naming the parameter, the value it was
//! given and what is allowed, so that a front end can pass the message to the
//! user unchanged.

use std::fmt;

/// A parameter that is out of its allowed range, with its name, its value and
/// the rule it breaks.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("`{name}` = {value} is not allowed: {allowed}")]
pub struct ParamError {
    /// The parameter's name as the user writes it (`n`, `semi_angle_deg`).
    pub name: String,
    /// The value given, as text.
    pub value: String,
    /// What is allowed, in words (`must be in [0, 1)`).
    pub allowed: String,
}

impl ParamError {
    /// An error for parameter `name` with value `value` and rule `allowed`.
    pub fn new(
        name: impl Into<String>,
        value: impl fmt::Display,
        allowed: impl Into<String>,
    ) -> Self {
        Self {
            name: name.into(),
            value: value.to_string(),
            allowed: allowed.into(),
        }
    }
}

/// `value` must be a finite number.
#[inline]
pub fn finite(name: &str, value: f64) -> Result<f64, ParamError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(ParamError::new(name, value, "must be a finite number"))
    }
}

/// `value` must be finite and strictly positive.
#[inline]
pub fn positive(name: &str, value: f64) -> Result<f64, ParamError> {
    finite(name, value)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(ParamError::new(name, value, "must be greater than 0"))
    }
}

/// `value` must be finite and zero or positive.
#[inline]
pub fn non_negative(name: &str, value: f64) -> Result<f64, ParamError> {
    finite(name, value)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(ParamError::new(name, value, "must be 0 or greater"))
    }
}

/// Which ends of a range belong to it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Ends {
    /// `[lo, hi]`
    Closed,
    /// `[lo, hi)`
    ClosedOpen,
    /// `(lo, hi]`
    OpenClosed,
    /// `(lo, hi)`
    Open,
}

/// `value` must be finite and lie in the range `lo..hi` with the given ends.
///
/// The message is built only when the check fails: valid input costs two
/// comparisons, no formatting (this check runs on every pass of every
/// candidate in design and risk runs).
#[inline]
pub fn within(name: &str, value: f64, lo: f64, hi: f64, ends: Ends) -> Result<f64, ParamError> {
    let ok = value.is_finite()
        && match ends {
            Ends::Closed => value >= lo && value <= hi,
            Ends::ClosedOpen => value >= lo && value < hi,
            Ends::OpenClosed => value > lo && value <= hi,
            Ends::Open => value > lo && value < hi,
        };
    if ok {
        return Ok(value);
    }
    finite(name, value)?;
    Err(out_of_range(name, value, lo, hi, ends))
}

#[cold]
#[inline(never)]
fn out_of_range(name: &str, value: f64, lo: f64, hi: f64, ends: Ends) -> ParamError {
    let text = match ends {
        Ends::Closed => format!("must be in [{lo}, {hi}]"),
        Ends::ClosedOpen => format!("must be in [{lo}, {hi})"),
        Ends::OpenClosed => format!("must be in ({lo}, {hi}]"),
        Ends::Open => format!("must be in ({lo}, {hi})"),
    };
    ParamError::new(name, value, text)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_name_the_parameter_value_and_rule() {
        let e = within("n", 1.2, 0.0, 1.0, Ends::ClosedOpen).unwrap_err();
        assert_eq!(e.to_string(), "`n` = 1.2 is not allowed: must be in [0, 1)");
        let e = positive("k_mpa", f64::NAN).unwrap_err();
        assert_eq!(
            e.to_string(),
            "`k_mpa` = NaN is not allowed: must be a finite number"
        );
        assert!(non_negative("x", 0.0).is_ok());
        assert!(within("mu", 0.5, 0.0, 0.5, Ends::Closed).is_ok());
        assert!(within("alpha", 45.0, 0.0, 45.0, Ends::Open).is_err());
    }
}
