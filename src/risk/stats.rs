//! Streaming statistics: counts, a fixed-bin histogram of the draw ratio,
//! and the sums a Pearson correlation needs, merged chunk by chunk in a fixed
//! order so that the result does not depend on how many threads ran.
//!
//! - Probability `p = k / N` with the binomial standard error
//!   `sqrt(p (1 - p) / N)`; with no event, the 95 % upper bound `3 / N`
//!   ("rule of three", Hanley & Lippman-Hand 1983; from memory).
//! - Percentiles from a histogram of 4,000 bins of 0.0005 on a draw ratio of
//!   0 to 2, interpolated linearly within the bin and clamped to the least
//!   and greatest ratio seen: the figure is within half a bin (0.00025) of the
//!   sample percentile; a percentile past a ratio of 2 is reported as absent.
//! - Correlation `r = S_zy / sqrt(S_zz S_yy)` from running sums, with `y`
//!   shifted by the nominal ratio to keep the sums well conditioned.

/// Number of draw-ratio bins.
pub const RATIO_BINS: usize = 4000;
/// Width of one draw-ratio bin.
pub const RATIO_BIN_WIDTH: f64 = 0.0005;
/// Upper end of the binned draw-ratio range.
pub const RATIO_HIST_MAX: f64 = RATIO_BINS as f64 * RATIO_BIN_WIDTH;

/// Counts of a ratio in fixed bins on [0, 2), with one bin below and one above.
#[derive(Debug, Clone, PartialEq)]
pub struct Histogram {
    counts: Vec<u32>,
}

impl Default for Histogram {
    fn default() -> Self {
        Self {
            counts: vec![0; RATIO_BINS + 2],
        }
    }
}

impl Histogram {
    /// Counts one value.
    pub fn add(&mut self, x: f64) {
        let i = if x < 0.0 {
            0
        } else if x >= RATIO_HIST_MAX {
            RATIO_BINS + 1
        } else {
            ((x / RATIO_BIN_WIDTH) as usize).min(RATIO_BINS - 1) + 1
        };
        self.counts[i] += 1;
    }

    /// Adds another histogram's counts.
    pub fn merge(&mut self, other: &Histogram) {
        for (a, b) in self.counts.iter_mut().zip(&other.counts) {
            *a += b;
        }
    }

    /// The `q`-quantile (0 < q < 1) of `total` counted values whose least
    /// and greatest are `lo` and `hi`; `None` when it lies past the binned range.
    pub fn quantile(&self, q: f64, total: u64, lo: f64, hi: f64) -> Option<f64> {
        if total == 0 {
            return None;
        }
        let want = q * total as f64;
        let mut below = 0.0;
        for (i, &c) in self.counts.iter().enumerate() {
            let c = c as f64;
            if c > 0.0 && below + c >= want {
                let x = match i {
                    0 => lo,
                    i if i == RATIO_BINS + 1 => return None,
                    i => {
                        let left = (i - 1) as f64 * RATIO_BIN_WIDTH;
                        left + RATIO_BIN_WIDTH * ((want - below) / c).clamp(0.0, 1.0)
                    }
                };
                return Some(x.clamp(lo, hi));
            }
            below += c;
        }
        Some(hi)
    }
}

/// What is counted for one pass.
#[derive(Debug, Clone, PartialEq)]
pub struct PassTally {
    /// Histogram of the draw ratio.
    pub ratio: Histogram,
    /// Samples with the draw ratio at or over 1 (break).
    pub breaks: u64,
    /// Samples over the warn line.
    pub over_warn: u64,
    /// Samples over the max line.
    pub over_max: u64,
    /// Samples over the block power.
    pub over_power: u64,
    /// Least draw ratio seen.
    pub lowest: f64,
    /// Greatest draw ratio seen.
    pub highest: f64,
    /// Sum of `y = ratio - nominal`.
    pub sum_y: f64,
    /// Sum of `y^2`.
    pub sum_yy: f64,
    /// Per input: sums of `z`, `z^2`, `z y`.
    pub inputs: Vec<[f64; 3]>,
}

impl PassTally {
    fn new(inputs: usize) -> Self {
        Self {
            ratio: Histogram::default(),
            breaks: 0,
            over_warn: 0,
            over_max: 0,
            over_power: 0,
            lowest: f64::INFINITY,
            highest: f64::NEG_INFINITY,
            sum_y: 0.0,
            sum_yy: 0.0,
            inputs: vec![[0.0; 3]; inputs],
        }
    }

    fn merge(&mut self, o: &PassTally) {
        self.ratio.merge(&o.ratio);
        self.breaks += o.breaks;
        self.over_warn += o.over_warn;
        self.over_max += o.over_max;
        self.over_power += o.over_power;
        self.lowest = self.lowest.min(o.lowest);
        self.highest = self.highest.max(o.highest);
        self.sum_y += o.sum_y;
        self.sum_yy += o.sum_yy;
        for (a, b) in self.inputs.iter_mut().zip(&o.inputs) {
            for k in 0..3 {
                a[k] += b[k];
            }
        }
    }

    /// Pearson correlation of input `k`'s score with the draw ratio over `n` samples.
    pub fn correlation(&self, k: usize, n: u64) -> Option<f64> {
        let n = n as f64;
        let [sz, szz, szy] = self.inputs[k];
        let vz = szz - sz * sz / n;
        let vy = self.sum_yy - self.sum_y * self.sum_y / n;
        let c = szy - sz * self.sum_y / n;
        if vz <= 0.0 || vy <= 1e-24 * n {
            return None;
        }
        Some((c / (vz * vy).sqrt()).clamp(-1.0, 1.0))
    }
}

/// Everything counted over a run (or one chunk of it).
#[derive(Debug, Clone, PartialEq)]
pub struct Tally {
    /// Samples evaluated.
    pub accepted: u64,
    /// Samples whose drawn inputs the model refused (outside a parameter's range).
    pub rejected: u64,
    /// The first refused sample and why.
    pub first_rejection: Option<(u64, String)>,
    /// Samples in which some pass breaks.
    pub any_break: u64,
    /// Samples in which some pass is over the max line.
    pub any_over_max: u64,
    /// Histogram of each sample's greatest draw ratio over its passes.
    pub worst: Histogram,
    /// Least and greatest of each sample's greatest ratio.
    pub worst_range: (f64, f64),
    /// One per draw pass.
    pub passes: Vec<PassTally>,
}

impl Tally {
    /// An empty tally for `passes` draw passes and `inputs` candidate inputs.
    pub fn new(passes: usize, inputs: usize) -> Self {
        Self {
            accepted: 0,
            rejected: 0,
            first_rejection: None,
            any_break: 0,
            any_over_max: 0,
            worst: Histogram::default(),
            worst_range: (f64::INFINITY, f64::NEG_INFINITY),
            passes: (0..passes).map(|_| PassTally::new(inputs)).collect(),
        }
    }

    /// Adds a later chunk's tally (chunks must be merged in index order for
    /// the sums to be reproducible to the last bit).
    pub fn merge(&mut self, o: &Tally) {
        self.accepted += o.accepted;
        self.rejected += o.rejected;
        if self.first_rejection.is_none() {
            self.first_rejection.clone_from(&o.first_rejection);
        }
        self.any_break += o.any_break;
        self.any_over_max += o.any_over_max;
        self.worst.merge(&o.worst);
        self.worst_range = (
            self.worst_range.0.min(o.worst_range.0),
            self.worst_range.1.max(o.worst_range.1),
        );
        for (a, b) in self.passes.iter_mut().zip(&o.passes) {
            a.merge(b);
        }
    }
}

/// A probability `k / n` and its binomial standard error.
pub fn probability(k: u64, n: u64) -> (f64, f64) {
    if n == 0 {
        return (f64::NAN, f64::NAN);
    }
    let p = k as f64 / n as f64;
    (p, (p * (1.0 - p) / n as f64).sqrt())
}

/// Samples needed for the 95 % interval of probability `p` to be within
/// `+-relative` of it: `1.96^2 (1 - p) / (p relative^2)`.
pub fn samples_for(p: f64, relative: f64) -> u64 {
    (1.96f64.powi(2) * (1.0 - p) / (p * relative * relative)).ceil() as u64
}

/// A probability (a fraction) as a percentage to two significant digits:
/// 3e-4 -> "0.030", 3e-6 -> "0.00030", 0.3 -> "30".
pub fn percent_2sig(p: f64) -> String {
    let pct = 100.0 * p;
    if pct >= 10.0 || pct <= 0.0 || !pct.is_finite() {
        return format!("{pct:.0}");
    }
    let decimals = (1.0 - pct.log10().floor()).max(0.0) as usize;
    format!("{pct:.decimals$}")
}

#[cfg(test)]
mod tests {
    #[test]
    fn a_percentage_shows_two_significant_digits() {
        // Worked by hand: 3/10,000 = 0.03 %, 3/1e6 = 0.0003 %, 0.3 = 30 %.
        assert_eq!(percent_2sig(3.0e-4), "0.030");
        assert_eq!(percent_2sig(3.0e-6), "0.00030");
        assert_eq!(percent_2sig(0.3), "30");
        assert_eq!(percent_2sig(0.03), "3.0");
        assert_eq!(percent_2sig(1.0), "100");
        assert_eq!(percent_2sig(0.0), "0");
    }

    use super::*;

    #[test]
    fn quantiles_of_a_uniform_grid_are_within_half_a_bin() {
        // 0.0001, 0.0002, ..., 1.0: the q-quantile of this set is q (by definition).
        let mut h = Histogram::default();
        for i in 1..=10_000 {
            h.add(i as f64 * 1e-4);
        }
        for &q in &[0.05, 0.5, 0.95, 0.99] {
            let x = h.quantile(q, 10_000, 1e-4, 1.0).unwrap();
            assert!((x - q).abs() <= 0.5 * RATIO_BIN_WIDTH + 1e-4, "{q}: {x}");
        }
    }

    #[test]
    fn default_sample_count_puts_one_percent_within_twenty_percent() {
        // 1.96^2 x 0.99 / (0.01 x 0.2^2) = 9507.96 (arithmetic).
        assert_eq!(samples_for(0.01, 0.2), 9508);
    }
}
