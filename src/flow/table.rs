//! The piecewise-linear table law: validation of its points, the segment of
//! a strain, and the stress, exact integral (trapezoid rule on each segment)
//! and inverse, with its behaviour beyond the last point ([`super::Beyond`]).

use super::Beyond;
use crate::param::{self, ParamError};

pub(super) fn validate_points(points: &[[f64; 2]], beyond: Beyond) -> Result<(), ParamError> {
    if points.len() < 2 {
        return Err(ParamError::new(
            "points",
            format!("{} point(s)", points.len()),
            "needs at least 2 [strain, stress_mpa] points",
        ));
    }
    for (i, p) in points.iter().enumerate() {
        // Name the point only when it is bad: valid tables format nothing.
        if !p[0].is_finite() {
            param::finite(&format!("points[{i}] strain"), p[0])?;
        }
        if !(p[1].is_finite() && p[1] > 0.0) {
            param::positive(&format!("points[{i}] stress_mpa"), p[1])?;
        }
    }
    if points[0][0] != 0.0 {
        return Err(ParamError::new(
            "points[0] strain",
            points[0][0],
            "the first point must be at strain 0",
        ));
    }
    for i in 1..points.len() {
        if points[i][0] <= points[i - 1][0] {
            return Err(ParamError::new(
                format!("points[{i}] strain"),
                points[i][0],
                format!(
                    "strains must increase strictly (previous point: {})",
                    points[i - 1][0]
                ),
            ));
        }
    }
    let n = points.len();
    if beyond == Beyond::Slope && points[n - 1][1] < points[n - 2][1] {
        return Err(ParamError::new(
            "beyond",
            "slope",
            "the last segment falls, so holding its slope would drive the stress to zero; use `beyond: flat`",
        ));
    }
    Ok(())
}

/// Index of the segment holding `e` (the last segment beyond the table).
pub(super) fn segment(points: &[[f64; 2]], e: f64) -> usize {
    let n = points.len();
    // Tables are short: a linear scan from the start beats a binary search here.
    let mut i = 0;
    while i + 2 < n && e >= points[i + 1][0] {
        i += 1;
    }
    i
}

pub(super) fn table_stress(points: &[[f64; 2]], beyond: Beyond, e: f64) -> f64 {
    let n = points.len();
    let last = points[n - 1];
    if e >= last[0] && beyond == Beyond::Flat {
        return last[1];
    }
    let i = segment(points, e);
    let (a, b) = (points[i], points[i + 1]);
    a[1] + (b[1] - a[1]) * (e - a[0]) / (b[0] - a[0])
}

pub(super) fn table_integral(points: &[[f64; 2]], beyond: Beyond, e1: f64, e2: f64) -> f64 {
    // Exact: the law is linear between consecutive points (and beyond the last).
    let mut cuts = vec![e1];
    cuts.extend(points.iter().map(|p| p[0]).filter(|&x| x > e1 && x < e2));
    cuts.push(e2);
    cuts.windows(2)
        .map(|w| {
            0.5 * (table_stress(points, beyond, w[0]) + table_stress(points, beyond, w[1]))
                * (w[1] - w[0])
        })
        .sum()
}

pub(super) fn table_inverse(points: &[[f64; 2]], s: f64) -> f64 {
    for w in points.windows(2) {
        let (a, b) = (w[0], w[1]);
        if (a[1] < s && s <= b[1]) || (s == a[1]) {
            return a[0] + (s - a[1]) * (b[0] - a[0]) / (b[1] - a[1]);
        }
    }
    // Beyond the table with a rising last slope (the caller has ruled out the rest).
    let n = points.len();
    let (a, b) = (points[n - 2], points[n - 1]);
    b[0] + (s - b[1]) * (b[0] - a[0]) / (b[1] - a[1])
}
