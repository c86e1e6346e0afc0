//! Reading the record: from force and extension to engineering stress and
//! strain, and cleaning a raw test-machine export down to its monotone
//! loading envelope.
//!
//! What a raw export holds and what is done with it (each counted in
//! [`Cleaning`] so that the report can say what was merged or dropped):
//!
//! - **repeated strain readings** (a slow extensometer, strain exported at
//!   few decimals): merged into one point at the mean stress;
//! - **small backward steps** (extensometer noise, export rounding): the
//!   backward point is dropped;
//! - **unload-reload loops**: from the first point whose strain goes back
//!   with a clear fall in stress, every point is dropped until the reloading
//!   curve is back at the strain and stress where the unloading began (the
//!   envelope is what a monotone test would have given, common practice);
//! - **spikes** (one absurd cell: a stress of 1e6 MPa, a force slipped by a
//!   factor of 10): a point far outside both its neighbours, which agree with
//!   each other, is named and dropped; it never reaches the UTS;
//! - **after fracture**: once the stress falls below
//!   [`FRACTURE_FRACTION`] of its highest value, the rest is dropped.
//!
//! Everything is done in place on the two columns: no copy of the record.

use super::FitError;
use crate::param::{self, ParamError};

/// A point is a spike when it lies this fraction of the record's median
/// stress (or 20 noise deviations, if more) away from both neighbours, and
/// the neighbours agree within half of that (common practice; a real yield
/// drop falls from a point that its left neighbour is close to).
pub const SPIKE_FRACTION: f64 = 0.25;

/// Fraction of the highest stress below which the specimen counts as broken
/// (common practice: the force falls to a few percent at fracture).
pub const FRACTURE_FRACTION: f64 = 0.1;

/// Highest stress a record may hold, MPa, after spikes are dropped: the
/// strongest drawn wires reach about 6,000 MPa, so a record above 20,000 MPa
/// is in the wrong unit or not a tensile test.
pub const MAX_STRESS_MPA: f64 = 20_000.0;

/// Most negative strain a record may hold: an extensometer zeroed at the
/// start reads a few microstrain below 0 (0.1 % allows far more).
pub const MAX_NEGATIVE_STRAIN: f64 = 0.001;

/// Highest engineering strain a record may hold (2000 %).
pub const MAX_STRAIN: f64 = 20.0;

/// Largest specimen or wire diameter a record may name, mm.
pub(crate) const MAX_DIAMETER_MM: f64 = 1000.0;

/// `value` as a diameter named `name`: in (0, [`MAX_DIAMETER_MM`]] mm.
pub(crate) fn diameter(name: &str, value: f64) -> Result<f64, ParamError> {
    param::within(name, value, 0.0, MAX_DIAMETER_MM, param::Ends::OpenClosed)
}

/// Cross-section of a round specimen, `A = pi d^2 / 4` (mm^2).
pub fn round_area_mm2(diameter_mm: f64) -> Result<f64, ParamError> {
    let d = diameter("diameter_mm", diameter_mm)?;
    Ok(std::f64::consts::PI * d * d / 4.0)
}

/// Engineering strain `e = dL / L0` and stress `s = F / A0` (N/mm^2 = MPa)
/// from force (N) and extension (mm).
pub fn engineering_from_force(
    force_n: &[f64],
    extension_mm: &[f64],
    gauge_length_mm: f64,
    area_mm2: f64,
) -> Result<(Vec<f64>, Vec<f64>), FitError> {
    let mut f = force_n.to_vec();
    let mut x = extension_mm.to_vec();
    super::same_length("force", force_n, "extension", extension_mm)?;
    engineering_in_place(&mut f, &mut x, gauge_length_mm, area_mm2)?;
    Ok((x, f))
}

/// [`engineering_from_force`] in place: `force_n` becomes stress (MPa),
/// `extension_mm` becomes strain.
pub fn engineering_in_place(
    force_n: &mut [f64],
    extension_mm: &mut [f64],
    gauge_length_mm: f64,
    area_mm2: f64,
) -> Result<(), FitError> {
    let l0 = param::within(
        "gauge_length_mm",
        gauge_length_mm,
        0.0,
        10_000.0,
        param::Ends::OpenClosed,
    )?;
    let a0 = param::within("area_mm2", area_mm2, 0.0, 1e6, param::Ends::OpenClosed)?;
    for v in force_n.iter_mut() {
        *v /= a0;
    }
    for v in extension_mm.iter_mut() {
        *v /= l0;
    }
    Ok(())
}

/// A spike that was dropped.
#[derive(Debug, Clone, PartialEq)]
pub struct Spike {
    /// 1-based point in the record as given.
    pub point: usize,
    /// Which column held it.
    pub field: &'static str,
    /// Its value.
    pub value: f64,
    /// The mean of its two neighbours.
    pub neighbours: f64,
}

/// What cleaning did to a record.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Cleaning {
    /// Points merged into the point before because their strain repeated it.
    pub repeats_merged: usize,
    /// Points dropped because their strain stepped back within noise.
    pub backsteps_dropped: usize,
    /// Unload-reload loops cut out.
    pub unload_loops: usize,
    /// Points dropped inside those loops.
    pub unload_points_dropped: usize,
    /// Spikes dropped.
    pub spikes: Vec<Spike>,
    /// Points dropped after fracture.
    pub after_fracture_dropped: usize,
    /// Whether the record ends in a fracture (the stress fell below
    /// [`FRACTURE_FRACTION`] of its highest).
    pub fractured: bool,
    /// Where kept points came from: `(first kept index, points dropped
    /// before it)` at each change, to name the original point of a kept one.
    pub shifts: Vec<(usize, usize)>,
}

impl Cleaning {
    /// Points dropped or merged, in all.
    pub fn changed(&self) -> usize {
        self.repeats_merged
            + self.backsteps_dropped
            + self.unload_points_dropped
            + self.spikes.len()
            + self.after_fracture_dropped
    }

    /// The 1-based point of the record as given for kept index `i`.
    pub fn original_point(&self, i: usize) -> usize {
        let shift = match self.shifts.binary_search_by(|s| s.0.cmp(&i)) {
            Ok(k) => self.shifts[k].1,
            Err(0) => 0,
            Err(k) => self.shifts[k - 1].1,
        };
        i + shift + 1
    }
}

/// Checks every value: finite, not negative (strain down to
/// -[`MAX_NEGATIVE_STRAIN`]).
pub fn validate(strain: &[f64], stress_mpa: &[f64]) -> Result<(), FitError> {
    super::same_length("stress", stress_mpa, "strain", strain)?;
    for (i, (&e, &s)) in strain.iter().zip(stress_mpa).enumerate() {
        let point = i + 1;
        for (field, value) in [("strain", e), ("stress", s)] {
            if !value.is_finite() {
                return Err(FitError::NotFinite {
                    point,
                    field,
                    value,
                });
            }
            // An extensometer zeroed at the start reads a little below 0
            // (common practice accepts it); anything more is refused.
            let floor = if field == "strain" {
                -MAX_NEGATIVE_STRAIN
            } else {
                0.0
            };
            if value < floor {
                return Err(FitError::Negative {
                    point,
                    field,
                    value,
                });
            }
        }
    }
    Ok(())
}

/// Noise of the stress column, MPa: from the second differences
/// `s[i+1] - 2 s[i] + s[i-1]`, whose deviation is `sqrt 6` times the noise's
/// for independent noise on a smooth curve; the median absolute deviation
/// (`1.4826 MAD`) keeps yield drops and curvature out. Estimated on at most
/// 4,000 triples spread over the record.
pub fn noise_mpa(stress_mpa: &[f64]) -> f64 {
    let m = stress_mpa.len();
    if m < 3 {
        return 0.0;
    }
    let k = (m - 2).div_ceil(4000).max(1);
    let mut d: Vec<f64> = (1..m - 1)
        .step_by(k)
        .map(|i| (stress_mpa[i + 1] - 2.0 * stress_mpa[i] + stress_mpa[i - 1]).abs())
        .collect();
    let mid = d.len() / 2;
    let (_, med, _) = d.select_nth_unstable_by(mid, f64::total_cmp);
    1.4826 * *med / 6f64.sqrt()
}

fn median_of(values: &[f64]) -> f64 {
    let k = values.len().div_ceil(4000).max(1);
    let mut v: Vec<f64> = values.iter().step_by(k).copied().collect();
    if v.is_empty() {
        return 0.0;
    }
    let mid = v.len() / 2;
    let (_, med, _) = v.select_nth_unstable_by(mid, f64::total_cmp);
    *med
}

/// Drops spikes in place (see the module doc); returns them.
fn drop_spikes(strain: &mut Vec<f64>, stress: &mut Vec<f64>, c: &mut Cleaning) {
    let m = stress.len();
    if m < 3 {
        return;
    }
    let noise = noise_mpa(stress);
    let s_scale = median_of(stress).abs();
    let e_scale = median_of(strain).abs();
    let ts = (SPIKE_FRACTION * s_scale).max(20.0 * noise);
    let te = SPIKE_FRACTION * e_scale;
    let spike = |v: &[f64], i: usize, t: f64| {
        let (a, b, c) = (v[i - 1], v[i], v[i + 1]);
        t > 0.0
            && (b - a).abs() > t
            && (b - c).abs() > t
            && (a - c).abs() < 0.5 * t
            && (b - a).signum() == (b - c).signum()
    };
    let mut bad = Vec::new();
    for i in 1..m - 1 {
        if spike(stress, i, ts) {
            bad.push((
                i,
                "stress",
                stress[i],
                0.5 * (stress[i - 1] + stress[i + 1]),
            ));
        } else if spike(strain, i, te) {
            bad.push((
                i,
                "strain",
                strain[i],
                0.5 * (strain[i - 1] + strain[i + 1]),
            ));
        }
    }
    if bad.is_empty() {
        return;
    }
    let mut w = 0;
    let mut next = 0;
    for r in 0..m {
        if next < bad.len() && bad[next].0 == r {
            next += 1;
            continue;
        }
        strain[w] = strain[r];
        stress[w] = stress[r];
        w += 1;
    }
    strain.truncate(w);
    stress.truncate(w);
    c.spikes = bad
        .into_iter()
        .map(|(i, field, value, neighbours)| Spike {
            point: i + 1,
            field,
            value,
            neighbours,
        })
        .collect();
}

/// Cleans a record in place to its monotone loading envelope (see the
/// module doc) and says what was done. Call [`validate`] first.
pub fn clean(strain: &mut Vec<f64>, stress: &mut Vec<f64>) -> Result<Cleaning, FitError> {
    let mut c = Cleaning::default();
    drop_spikes(strain, stress, &mut c);
    // Original positions: spikes are few, so a kept index maps through them and `shifts`.
    let spike_points: Vec<usize> = c.spikes.iter().map(|s| s.point - 1).collect();
    let origin_of_spiked = |i: usize| {
        // index in the spike-free record -> index in the record as given
        let mut o = i;
        for &p in &spike_points {
            if p <= o {
                o += 1;
            }
        }
        o
    };
    let m = stress.len();
    if m == 0 {
        return Ok(c);
    }
    let top = stress.iter().copied().fold(0.0, f64::max);
    if top > MAX_STRESS_MPA {
        let i = stress.iter().position(|&s| s > MAX_STRESS_MPA).unwrap_or(0);
        return Err(FitError::OutOfRange {
            point: origin_of_spiked(i) + 1,
            field: "stress",
            value: stress[i],
            allowed: format!("0 to {MAX_STRESS_MPA} MPa (is the stress unit right?)"),
        });
    }
    if let Some(i) = strain.iter().position(|&e| e > MAX_STRAIN) {
        return Err(FitError::OutOfRange {
            point: origin_of_spiked(i) + 1,
            field: "strain",
            value: strain[i],
            allowed: format!("0 to {MAX_STRAIN} (is the strain unit right?)"),
        });
    }
    let noise = noise_mpa(stress);
    // Fracture: the first point after the highest stress below FRACTURE_FRACTION of it.
    let imax = (0..m).fold(0, |b, i| if stress[i] > stress[b] { i } else { b });
    let end = (imax..m)
        .find(|&i| stress[i] < FRACTURE_FRACTION * top)
        .unwrap_or(m);
    c.fractured = end < m;
    c.after_fracture_dropped = m - end;

    let mut w = 0usize; // next write position
    let mut merged = 1.0; // points merged into the last kept one
    let mut unload: Option<(f64, f64)> = None; // (strain, stress) where unloading began
    let mut dropped = 0usize;
    let note_shift = |c: &mut Cleaning, w: usize, dropped: usize| {
        if c.shifts.last().map_or(0, |s| s.1) != dropped {
            c.shifts.push((w, dropped));
        }
    };
    for r in 0..end {
        let (e, s) = (strain[r], stress[r]);
        if let Some((e0, s0)) = unload {
            let back = e > e0 && s >= s0 - (0.02 * s0).max(6.0 * noise);
            if !back {
                c.unload_points_dropped += 1;
                dropped += 1;
                continue;
            }
            unload = None;
        }
        if w == 0 {
            note_shift(&mut c, w, origin_of_spiked(r) - r + dropped);
            strain[0] = e;
            stress[0] = s;
            w = 1;
            merged = 1.0;
            continue;
        }
        let (el, sl) = (strain[w - 1], stress[w - 1]);
        if e == el {
            stress[w - 1] = (sl * merged + s) / (merged + 1.0);
            merged += 1.0;
            c.repeats_merged += 1;
            dropped += 1;
            continue;
        }
        if e < el {
            let fall = sl - s;
            if fall > (0.02 * sl).max(6.0 * noise) {
                c.unload_loops += 1;
                c.unload_points_dropped += 1;
                unload = Some((el, sl));
            } else {
                c.backsteps_dropped += 1;
            }
            dropped += 1;
            continue;
        }
        note_shift(&mut c, w, origin_of_spiked(r) - r + dropped);
        strain[w] = e;
        stress[w] = s;
        w += 1;
        merged = 1.0;
    }
    strain.truncate(w);
    stress.truncate(w);
    Ok(c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn repeats_are_merged_at_their_mean_and_backsteps_dropped() {
        let mut e = vec![0.0, 0.001, 0.001, 0.002, 0.0019999, 0.003];
        let mut s = vec![0.0, 10.0, 12.0, 20.0, 19.9, 30.0];
        let c = clean(&mut e, &mut s).unwrap();
        assert_eq!(e, vec![0.0, 0.001, 0.002, 0.003]);
        assert_eq!(s, vec![0.0, 11.0, 20.0, 30.0]);
        assert_eq!((c.repeats_merged, c.backsteps_dropped), (1, 1));
        // kept point 3 (index 2) was the 4th point given
        assert_eq!(c.original_point(2), 4);
        assert_eq!(c.original_point(3), 6);
    }

    #[test]
    fn a_single_absurd_stress_is_a_spike() {
        let mut e: Vec<f64> = (0..50).map(|i| i as f64 * 0.001).collect();
        let mut s: Vec<f64> = (0..50).map(|i| 100.0 + i as f64).collect();
        s[20] = 1e6;
        let c = clean(&mut e, &mut s).unwrap();
        assert_eq!(c.spikes.len(), 1);
        assert_eq!(c.spikes[0].point, 21);
        assert_eq!(s.len(), 49);
        assert!(s.iter().all(|&v| v < 200.0));
        assert_eq!(c.original_point(20), 22);
    }
}
