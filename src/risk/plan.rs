//! The sampling plan: for sample `i` of `N` and input dimension `k`, a
//! uniform `u` in (0, 1) and its standard normal score `z = Phi^-1(u)`.
//!
//! - Plain Monte Carlo: `u` from the sample's own random stream.
//! - Latin hypercube (McKay, Beckman & Conover, 1979): each dimension's
//!   range is cut into `N` equal strata and every stratum is used once:
//!   `u = (pi_k(i) + v) / N` with `pi_k` a random permutation of `0..N` and
//!   `v` uniform in (0, 1). Owen (1997) showed its variance is at most
//!   `N/(N-1)` times that of Monte Carlo for any square-integrable output
//!   (from memory), so the binomial standard error is a safe upper figure.
//!
//! Each sample draws from its own ChaCha8 stream, selected by the sample's
//! index (the seed picks the key), and the permutations are keyed hashed
//! permutations with cycle walking (Kensler 2013; Black & Rogaway 2002),
//! computed on the fly instead of stored: so sample `i` is the same whatever thread draws it, and
//! memory does not grow with `N`.

use rand_chacha::ChaCha8Rng;
use rand_core::{RngCore, SeedableRng};
use serde::Serialize;

use super::distribution::normal_quantile_approx;

/// How the samples are placed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum Sampling {
    /// Latin hypercube: every one of N equal-probability strata of every input used once.
    #[default]
    LatinHypercube,
    /// Plain Monte Carlo: independent draws.
    MonteCarlo,
}

impl Sampling {
    /// The name as written on the command line and in reports.
    pub fn name(self) -> &'static str {
        match self {
            Sampling::LatinHypercube => "latin-hypercube",
            Sampling::MonteCarlo => "monte-carlo",
        }
    }
}

/// SplitMix64's finaliser (Steele, Lea & Flood, 2014): a bijective mixer of 64 bits.
fn mix(mut x: u64) -> u64 {
    x = x.wrapping_add(0x9E37_79B9_7F4A_7C15);
    x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    x ^ (x >> 31)
}

/// A pseudo-random permutation of `0..n` keyed by `key`, after Kensler's
/// hashed permutation for stratified sampling (Kensler, "Correlated
/// Multi-Jittered Sampling", Pixar 2013): rounds of steps that are each
/// one-to-one on the integers below `2^bits` (xor with a key, multiplication
/// by an odd number, xorshifts, all modulo `2^bits`), with `2^bits` the
/// smallest power of two at or above `n`, walked until the image lands below
/// `n` (cycle walking keeps it a permutation of `0..n`; at most two steps on
/// average since `2^bits < 2n`).
#[derive(Debug, Clone, Copy)]
pub struct Permutation {
    n: u64,
    mask: u64,
    shift: u32,
    round_keys: [u64; 3],
}

impl Permutation {
    /// The permutation of `0..n` for `key`.
    pub fn new(n: u64, key: u64) -> Self {
        let bits = (64 - (n.max(2) - 1).leading_zeros()).max(1);
        let mask = if bits == 64 {
            u64::MAX
        } else {
            (1u64 << bits) - 1
        };
        let mut round_keys = [0; 3];
        for (r, k) in round_keys.iter_mut().enumerate() {
            *k = mix(key ^ r as u64);
        }
        Self {
            n,
            mask,
            shift: (bits / 2).max(1),
            round_keys,
        }
    }

    fn round(&self, mut x: u64) -> u64 {
        let m = self.mask;
        for k in self.round_keys {
            x ^= k & m;
            x = x.wrapping_mul(0xBF58_476D_1CE4_E5B9) & m;
            x ^= x >> self.shift;
            x = x.wrapping_mul(0x94D0_49BB_1331_11EB | 1) & m;
            x ^= (x << 1) & m;
            x = x.wrapping_add(k >> 32) & m;
        }
        x
    }

    /// The image of `i` (< n).
    pub fn at(&self, i: u64) -> u64 {
        let mut x = self.round(i);
        while x >= self.n {
            x = self.round(x);
        }
        x
    }
}

/// A uniform in the open interval (0, 1) from 53 random bits.
fn open_unit(bits: u64) -> f64 {
    ((bits >> 11) as f64 + 0.5) * (1.0 / (1u64 << 53) as f64)
}

/// Where every sample's inputs come from.
#[derive(Debug, Clone)]
pub struct Plan {
    /// Number of samples N.
    pub samples: u64,
    /// The seed.
    pub seed: u64,
    /// Latin hypercube or Monte Carlo.
    pub sampling: Sampling,
    permutations: Vec<Permutation>,
}

impl Plan {
    /// A plan of `samples` samples in `dims` input dimensions.
    pub fn new(samples: u64, seed: u64, sampling: Sampling, dims: usize) -> Self {
        let permutations = match sampling {
            Sampling::LatinHypercube => (0..dims as u64)
                .map(|k| Permutation::new(samples, mix(seed ^ mix(k.wrapping_add(1)))))
                .collect(),
            Sampling::MonteCarlo => Vec::new(),
        };
        Self {
            samples,
            seed,
            sampling,
            permutations,
        }
    }

    /// A generator for this plan; [`Plan::scores`] repositions it per sample.
    pub fn generator(&self) -> ChaCha8Rng {
        ChaCha8Rng::seed_from_u64(self.seed)
    }

    /// The standard normal scores of sample `index`, one per dimension, into `out`.
    pub fn scores(&self, index: u64, rng: &mut ChaCha8Rng, out: &mut [f64]) {
        rng.set_stream(index);
        rng.set_word_pos(0);
        let n = self.samples as f64;
        for (k, z) in out.iter_mut().enumerate() {
            let v = open_unit(rng.next_u64());
            let u = match self.sampling {
                Sampling::MonteCarlo => v,
                Sampling::LatinHypercube => (self.permutations[k].at(index) as f64 + v) / n,
            };
            *z = normal_quantile_approx(u);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn permutation_uses_every_index_once() {
        for &n in &[1u64, 2, 3, 7, 64, 1000, 4097] {
            let p = Permutation::new(n, 12345);
            let mut seen = vec![false; n as usize];
            for i in 0..n {
                let j = p.at(i) as usize;
                assert!(!seen[j], "n = {n}: {j} twice");
                seen[j] = true;
            }
        }
    }

    #[test]
    fn two_dimensions_are_not_paired_in_order() {
        // Two keyed permutations of 0..N should be unrelated: their rank
        // correlation is about N(0, 1/N) for random permutations (Kendall &
        // Stuart, from memory), so below 4/sqrt(N) in all but 1 case in 10^4.
        let n = 10_000u64;
        let (a, b) = (Permutation::new(n, 1), Permutation::new(n, 2));
        let m = (n as f64 - 1.0) / 2.0;
        let (mut sab, mut saa) = (0.0, 0.0);
        for i in 0..n {
            let (x, y) = (a.at(i) as f64 - m, b.at(i) as f64 - m);
            sab += x * y;
            saa += x * x;
        }
        assert!((sab / saa).abs() < 4.0 / (n as f64).sqrt(), "{}", sab / saa);
        // Nor is either one the identity or a shift of it.
        let moved = (0..n).filter(|&i| a.at(i) == i).count();
        assert!(moved < 10, "{moved} fixed points");
    }

    #[test]
    fn latin_hypercube_puts_one_sample_in_each_stratum() {
        // The defining property (McKay et al. 1979): for every dimension, the
        // N values of u fall one in each of the N strata [j/N, (j+1)/N).
        let plan = Plan::new(500, 7, Sampling::LatinHypercube, 3);
        let mut rng = plan.generator();
        let mut z = [0.0; 3];
        let mut hit = vec![[false; 3]; 500];
        for i in 0..500 {
            plan.scores(i, &mut rng, &mut z);
            for k in 0..3 {
                let u = super::super::distribution::normal_cdf(z[k]);
                let j = ((u * 500.0) as usize).min(499);
                assert!(!hit[j][k]);
                hit[j][k] = true;
            }
        }
    }

    #[test]
    fn a_sample_does_not_depend_on_what_was_drawn_before() {
        let plan = Plan::new(100, 3, Sampling::MonteCarlo, 4);
        let (mut a, mut b) = ([0.0; 4], [0.0; 4]);
        let mut r1 = plan.generator();
        plan.scores(42, &mut r1, &mut a);
        let mut r2 = plan.generator();
        for i in 0..42 {
            plan.scores(i, &mut r2, &mut b);
        }
        plan.scores(42, &mut r2, &mut b);
        assert_eq!(a, b);
    }
}
