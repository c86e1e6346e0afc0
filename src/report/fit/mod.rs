//! Report formats for `coldpass fit`: a table for people, JSON / YAML / CSV
//! for programs, an SVG chart, and the `flow:` block for a schedule file.
//! Every format uses the same keys and carries the caution line.

use std::collections::BTreeMap;
use std::fmt::Write as _;

use anyhow::{Context, Result};
use plotters::prelude::*;
use serde::Serialize;

use super::table::{build, stack, terminal_width, wrap_long_lines};
use super::units::{Quantity, Units, MPA_PER_KSI};

use coldpass::fit::{self, DataKind, FitLaw, FitReport, LawFit, Scatter, Yielding};
use coldpass::FlowLaw;

/// The caution every report carries.
pub const CAUTION: &str = "Caution: fitted laws describe this record only; figures are planning estimates to confirm by trial. Wire under tension whips when it breaks and running capstans trap hands; follow the machine maker's limits, local codes and licensed practice.";

/// Where the record came from, for headings.
pub struct Source {
    /// The file as given.
    pub file: String,
    /// How its columns were read.
    pub columns: String,
}

mod chart;
mod csv_rows;
mod json;
mod law;
mod table;
use json::*;

pub use chart::svg;
pub use csv_rows::csv_all;
pub use json::{json_all, yaml_all};
pub use law::{law_yaml, set_law_yaml};
pub use table::{law_header, param_text, table_all};

fn finite(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

fn data_name(d: DataKind) -> &'static str {
    match d {
        DataKind::Engineering => "engineering",
        DataKind::True => "true",
    }
}

/// What the standard errors assume, said beside them in every format.
pub const STD_ERROR_NOTE: &str = "standard errors assume the law is right and the residuals independent (see the warnings for where the record says otherwise)";

/// A number to `digits` significant figures, without exponent for everyday sizes.
fn sig(v: f64, digits: usize) -> String {
    if !v.is_finite() {
        return "-".into();
    }
    if v == 0.0 {
        return "0".into();
    }
    let mag = v.abs().log10().floor() as i32;
    let decimals = (digits as i32 - 1 - mag).max(0) as usize;
    format!("{v:.decimals$}")
}

/// A number to `decimals` places, or "not finite" (an overflow) when it is not.
fn fixed(v: f64, decimals: usize) -> String {
    if v.is_finite() {
        format!("{v:.decimals$}")
    } else {
        "not finite".into()
    }
}

fn opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| "-".into(), |x| sig(x, digits))
}

/// The law of a set of specimens and its scatter.
pub struct Set {
    /// The scatter (mean, sd, correlation) of the chosen law.
    pub scatter: Scatter,
    /// Whether the specimens' fits with drawn-wire points were used.
    pub with_drawn: bool,
}

impl Set {
    /// The set of several reports (`None` for one): `law` or the law with
    /// the lowest summed AIC.
    pub fn of(reports: &[FitReport], law: Option<FitLaw>) -> Result<Option<Set>> {
        if reports.len() < 2 {
            return Ok(None);
        }
        let with_drawn = reports.iter().all(|r| !r.drawn_fits.is_empty());
        let law = match law {
            Some(l) => l,
            None => fit::set_law(reports, with_drawn)
                .context("no law converged to a valid fit in every specimen")?,
        };
        let scatter = fit::set_scatter(reports, law, with_drawn)?;
        Ok(Some(Set {
            scatter,
            with_drawn,
        }))
    }
}
