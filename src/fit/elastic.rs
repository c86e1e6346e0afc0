//! The elastic part and yield, read as a test lab reads them. Definitions
//! follow ISO 6892-1 (tensile testing of metallic materials at room
//! temperature; from memory), which ASTM E8/E8M matches on these points:
//!
//! - **Modulus**: one least-squares line over the stress band
//!   [`BAND_LOW`] to [`BAND_HIGH`] of the yield strength (Rp0.2 for
//!   continuous yielding, the upper yield strength ReH for discontinuous):
//!   below 10 % the grips seat and the load cell's zero shows; above 40 %
//!   annealed metals already depart from the line (the band ISO 6892-1's
//!   annex on the modulus suggests, from memory). The points are chosen by
//!   their strain on the previous line, not by their noisy stress, so that the
//!   choice does not bias the slope, and the band is iterated with the yield
//!   strength it gives until the points no longer change. One line through
//!   every point in the band: its standard error falls with more points and
//!   the estimate does not depend on how densely the record is sampled.
//! - **Proof strength Rp0.2**: where the curve meets the line of slope E
//!   offset by 0.2 % strain (linear interpolation between the points around
//!   the first crossing).
//! - **Yield drop**: the stress falls from a peak (the upper yield strength
//!   ReH) by more than [`DROP_FRACTION`] of it (and 8 noise deviations), and
//!   stays down (see [`DROP_PERSISTENCE`]), at a
//!   plastic strain below [`YIELD_DROP_MAX_PLASTIC_STRAIN`], and the curve
//!   later rises again above the plateau (work hardening resumes). The lower
//!   yield strength ReL is the lowest stress of the plateau; the yield point
//!   extension (Lueders strain, ISO's Ae) is the strain from ReH to the start
//!   of uniform work hardening: where the plateau's level (the median of the
//!   points within [`PLATEAU_BAND`] of it, or 4 noise deviations) meets a
//!   line through the rising curve just after the plateau.
//! - **Maximum force Fm** and tensile strength Rm: the highest stress after
//!   work hardening has begun (after the plateau for discontinuous yielding).

use super::laws::LineSums;
use super::FitError;

/// Lower end of the modulus band, fraction of the yield strength: below
/// it the grips seat and the load cell's zero shows (ISO 6892-1's modulus
/// annex suggests a band of this kind, from memory; docs/physics.md).
pub const BAND_LOW: f64 = 0.10;
/// Upper end of the modulus band, fraction of the yield strength: above it
/// annealed copper and aluminium already bend away (same source).
pub const BAND_HIGH: f64 = 0.40;
/// The offset of the proof strength: 0.2 % strain (ISO 6892-1 Rp0.2, ASTM E8 offset method).
pub const YIELD_OFFSET_STRAIN: f64 = 0.002;
/// Fewest points in the modulus band (a choice of this tool: the line's
/// two parameters leave three degrees of freedom for its standard error).
pub const MIN_ELASTIC_POINTS: usize = 5;
/// A fall of this fraction of the peak stress (or 8 noise deviations, if
/// more) counts as a yield drop (a choice of this tool; docs/physics.md).
pub const DROP_FRACTION: f64 = 0.01;
/// Fraction of the record's points a drop must stay down for (5 at least;
/// a choice of this tool, docs/physics.md "Yield").
pub const DROP_PERSISTENCE: f64 = 0.002;
/// A yield drop happens at the end of the elastic line: a peak at a larger
/// plastic strain is not an upper yield point.
pub const YIELD_DROP_MAX_PLASTIC_STRAIN: f64 = 0.01;
/// Width of the plateau band, fraction of the plateau's median stress (a
/// choice of this tool).
pub const PLATEAU_BAND: f64 = 0.015;
/// How far (percent of the highest stress) the stress must fall after its
/// highest value for that to count as the maximum load rather than noise at
/// the end of a test stopped early.
pub const MAX_LOAD_DROP_PERCENT: f64 = 1.0;

/// Young's modulus from the band.
#[derive(Debug, Clone, PartialEq)]
pub struct Modulus {
    /// Slope, MPa.
    pub modulus_mpa: f64,
    /// Standard error of the slope, MPa (OLS, independent noise assumed).
    pub std_error_mpa: f64,
    /// Strain at which the line meets zero stress (toe correction).
    pub toe_strain: f64,
    /// The stress band, MPa.
    pub band_mpa: (f64, f64),
    /// Points in the band.
    pub points: usize,
}

/// How the record yields.
#[derive(Debug, Clone, PartialEq)]
pub enum Yielding {
    /// Continuous: the 0.2 % proof strength.
    Continuous {
        /// Rp0.2, MPa.
        proof_mpa: f64,
        /// Index of the first point past the offset line.
        index: usize,
    },
    /// A yield drop and a Lueders plateau.
    Discontinuous {
        /// ReH, MPa.
        upper_mpa: f64,
        /// ReL, MPa.
        lower_mpa: f64,
        /// Yield point extension (engineering strain).
        lueders_strain: f64,
        /// Index of the last plateau point: hardening is fitted after it.
        plateau_end: usize,
    },
}

/// The elastic part, yield and maximum load of an engineering record.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    /// Young's modulus.
    pub modulus: Modulus,
    /// Yield.
    pub yielding: Yielding,
    /// Index of the maximum force after work hardening begins.
    pub max_index: usize,
}

/// The least-squares line over `range`, `(a, b, se_b)`.
fn line_over(
    strain: &[f64],
    stress: &[f64],
    range: std::ops::Range<usize>,
) -> Option<(f64, f64, f64)> {
    let mut s = LineSums::default();
    for i in range.clone() {
        s.add(strain[i], stress[i]);
    }
    let (a, b) = s.line()?;
    let m = s.m;
    let dxx = s.sxx - s.sx * s.sx / m;
    let ssr: f64 = range.map(|i| (stress[i] - a - b * strain[i]).powi(2)).sum();
    let se = (ssr / (m - 2.0) / dxx).sqrt();
    Some((a, b, se))
}

/// The contiguous range of points, before `limit`, whose values first lie
/// in `[lo, hi]`: from the first at or above `lo` to the first after it above
/// `hi` (a preliminary choice by stress, or by strain).
fn first_run_within(values: &[f64], lo: f64, hi: f64, limit: usize) -> std::ops::Range<usize> {
    let start = values[..limit]
        .iter()
        .position(|&v| v >= lo)
        .unwrap_or(limit);
    let end = values[start..limit]
        .iter()
        .position(|&v| v > hi)
        .map_or(limit, |k| start + k);
    start..end
}

/// The contiguous range of points, before `limit`, whose strain lies where
/// the line `a + b e` is in `[lo, hi]`.
fn range_by_strain(
    strain: &[f64],
    a: f64,
    b: f64,
    lo: f64,
    hi: f64,
    limit: usize,
) -> std::ops::Range<usize> {
    first_run_within(strain, (lo - a) / b, (hi - a) / b, limit)
}

/// The modulus over the band `[BAND_LOW, BAND_HIGH] x reference`, points
/// chosen by strain on `line` (or by stress when there is none yet).
fn modulus_in_band(
    strain: &[f64],
    stress: &[f64],
    reference_mpa: f64,
    line: Option<(f64, f64)>,
    limit: usize,
) -> Result<(Modulus, std::ops::Range<usize>), FitError> {
    let (lo, hi) = (BAND_LOW * reference_mpa, BAND_HIGH * reference_mpa);
    let range = match line {
        Some((a, b)) => range_by_strain(strain, a, b, lo, hi, limit),
        None => first_run_within(stress, lo, hi, limit),
    };
    if range.len() < MIN_ELASTIC_POINTS {
        return Err(FitError::TooFewElasticPoints {
            found: range.len(),
            needed: MIN_ELASTIC_POINTS,
            from_mpa: lo,
            to_mpa: hi,
        });
    }
    let (a, b, se) = line_over(strain, stress, range.clone()).ok_or(FitError::NoLinearPart)?;
    if b.is_nan() || b <= 0.0 {
        return Err(FitError::NoLinearPart);
    }
    Ok((
        Modulus {
            modulus_mpa: b,
            std_error_mpa: se,
            toe_strain: -a / b,
            band_mpa: (lo, hi),
            points: range.len(),
        },
        range,
    ))
}

/// Rp0.2 with the line `E (e - toe - 0.002)`: `(stress, index of the first
/// point past the line)`.
fn proof_strength(
    strain: &[f64],
    stress: &[f64],
    m: &Modulus,
    upto: usize,
) -> Option<(f64, usize)> {
    let gap =
        |i: usize| stress[i] - m.modulus_mpa * (strain[i] - m.toe_strain - YIELD_OFFSET_STRAIN);
    let iy = (1..=upto).find(|&i| gap(i) <= 0.0 && gap(i - 1) > 0.0)?;
    let (g0, g1) = (gap(iy - 1), gap(iy));
    let t = g0 / (g0 - g1);
    Some((stress[iy - 1] + t * (stress[iy] - stress[iy - 1]), iy))
}

/// The first peak after which the stress falls by the drop threshold and
/// stays down: `(peak index, index of the first point below the threshold)`.
/// Staying down (the median of the next [`DROP_PERSISTENCE`] points, at
/// least 5, below the threshold too) tells a yield drop from the noise of a
/// densely sampled elastic line, whose running maximum rides on the noise's
/// extremes.
fn first_drop(stress: &[f64], noise: f64) -> Option<(usize, usize)> {
    let n = stress.len();
    let k = ((n as f64 * DROP_PERSISTENCE) as usize).max(5);
    let mut ip = 0;
    for i in 1..n {
        if stress[i] > stress[ip] {
            ip = i;
            continue;
        }
        let thr = stress[ip] - (DROP_FRACTION * stress[ip]).max(8.0 * noise);
        if stress[i] < thr && i + k <= n && median(&stress[i..i + k]) < thr {
            return Some((ip, i));
        }
    }
    None
}

fn median(v: &[f64]) -> f64 {
    let mut w = v.to_vec();
    let mid = w.len() / 2;
    let (_, m, _) = w.select_nth_unstable_by(mid, f64::total_cmp);
    *m
}

/// Analyses a cleaned engineering record (strain fraction, stress MPa);
/// `noise` is the stress noise (MPa) and `fractured` whether the record
/// ends in a fracture (then the last point is a maximum load even without a
/// fall after it).
pub fn analyse(
    strain: &[f64],
    stress: &[f64],
    noise: f64,
    fractured: bool,
) -> Result<Analysis, FitError> {
    let n = stress.len();
    let imax_all = (0..n).fold(0, |b, i| if stress[i] > stress[b] { i } else { b });
    let (ip, id) = first_drop(stress, noise).unwrap_or((imax_all, n));
    // Preliminary line: 5 % to 20 % of the first peak, chosen by stress.
    let (pre, _) = modulus_in_band(strain, stress, 0.5 * stress[ip], None, ip.max(1))?;
    let mut line = (-pre.toe_strain * pre.modulus_mpa, pre.modulus_mpa);

    // A yield drop: a peak at the end of the elastic line and hardening later.
    if id < n {
        let plastic_at_peak = strain[ip] - pre.toe_strain - stress[ip] / pre.modulus_mpa;
        if plastic_at_peak < YIELD_DROP_MAX_PLASTIC_STRAIN {
            if let Some(found) = lueders(strain, stress, noise, ip, id, fractured)? {
                // The band is fixed by ReH; iterate the line until its points stay put.
                let (mut modulus, mut last) =
                    modulus_in_band(strain, stress, stress[ip], Some(line), ip)?;
                for _ in 0..20 {
                    line = (
                        -modulus.toe_strain * modulus.modulus_mpa,
                        modulus.modulus_mpa,
                    );
                    let (m, range) = modulus_in_band(strain, stress, stress[ip], Some(line), ip)?;
                    modulus = m;
                    if range == last {
                        break;
                    }
                    last = range;
                }
                return Ok(Analysis {
                    modulus,
                    yielding: found.0,
                    max_index: found.1,
                });
            }
        }
    }
    let imax = imax_all;
    max_load_reached(stress, imax, fractured)?;
    // Continuous yielding: iterate the band on Rp0.2 until its points stay put.
    let mut reference = 0.5 * stress[ip];
    let mut last_range = None;
    for _ in 0..20 {
        let (m, range) = modulus_in_band(strain, stress, reference, Some(line), imax.max(1))?;
        let (rp, iy) = proof_strength(strain, stress, &m, imax).ok_or(FitError::NeverYields {
            youngs_modulus_gpa: m.modulus_mpa / 1000.0,
        })?;
        line = (-m.toe_strain * m.modulus_mpa, m.modulus_mpa);
        if last_range.as_ref() == Some(&range) {
            return Ok(Analysis {
                modulus: m,
                yielding: Yielding::Continuous {
                    proof_mpa: rp,
                    index: iy,
                },
                max_index: imax,
            });
        }
        last_range = Some(range);
        reference = rp;
    }
    // No fixed point in 20 rounds (points on the band's edge): the last one stands.
    let (m, _) = modulus_in_band(strain, stress, reference, Some(line), imax.max(1))?;
    let (rp, iy) = proof_strength(strain, stress, &m, imax).ok_or(FitError::NeverYields {
        youngs_modulus_gpa: m.modulus_mpa / 1000.0,
    })?;
    Ok(Analysis {
        modulus: m,
        yielding: Yielding::Continuous {
            proof_mpa: rp,
            index: iy,
        },
        max_index: imax,
    })
}

/// The record must fall clearly after its maximum (or end in a fracture).
fn max_load_reached(stress: &[f64], imax: usize, fractured: bool) -> Result<(), FitError> {
    let top = stress[imax];
    if top <= 0.0 {
        return Err(FitError::NoLinearPart);
    }
    let lowest_after = stress[imax..].iter().copied().fold(top, f64::min);
    if !fractured && lowest_after > top * (1.0 - MAX_LOAD_DROP_PERCENT / 100.0) {
        return Err(FitError::NoMaximumLoad {
            point: imax + 1,
            stress_mpa: top,
        });
    }
    Ok(())
}

/// The plateau after a drop at `ip` (peak) / `id` (first point below):
/// `None` when no hardening follows (the drop was the maximum load).
fn lueders(
    strain: &[f64],
    stress: &[f64],
    noise: f64,
    ip: usize,
    id: usize,
    fractured: bool,
) -> Result<Option<(Yielding, usize)>, FitError> {
    let n = stress.len();
    // Plateau level: start from the lowest stress between the drop and the
    // maximum force after it, then the median of the plateau so found.
    let imax2 = (id..n).fold(id, |b, i| if stress[i] > stress[b] { i } else { b });
    let mut level = stress[id..=imax2]
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    let mut end = id;
    for _ in 0..3 {
        let band = (PLATEAU_BAND * level).max(4.0 * noise);
        // The plateau ends before the maximum force after it.
        end = (id..=imax2)
            .rev()
            .find(|&i| stress[i] <= level + band)
            .unwrap_or(id);
        level = median(&stress[id..=end]);
    }
    let band = (PLATEAU_BAND * level).max(4.0 * noise);
    let imax2 = (end..n).fold(end, |b, i| if stress[i] > stress[b] { i } else { b });
    if stress[imax2] <= level + 2.0 * band || imax2 <= end {
        return Ok(None);
    }
    max_load_reached(stress, imax2, fractured)?;
    let lower = stress[id..=end]
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    // Start of work hardening: where the plateau level meets a line through
    // the rising curve just after the plateau (its first 4 band widths), as a
    // lab draws it on the chart.
    let mut sums = LineSums::default();
    for j in end + 1..=imax2 {
        if stress[j] > level + 4.0 * band {
            break;
        }
        sums.add(strain[j], stress[j]);
    }
    let mut hardening_from = strain[end];
    if let Some((a, b)) = sums.line() {
        let at = (level - a) / b;
        if b > 0.0 && at.is_finite() && at > strain[id] && at < strain[imax2] {
            hardening_from = at;
        }
    }
    let end = (id..=imax2)
        .rev()
        .find(|&i| strain[i] <= hardening_from)
        .unwrap_or(end);
    Ok(Some((
        Yielding::Discontinuous {
            upper_mpa: stress[ip],
            lower_mpa: lower,
            lueders_strain: hardening_from - strain[ip],
            plateau_end: end,
        },
        imax2,
    )))
}
