//! The Considere strain of a sampled flow law, to the last bit the figure
//! [`strength::considere_strain`] gives (and so `check`), in about a third
//! of its evaluations of the law.
//!
//! [`strength::considere_strain`] looks for the first point of the
//! geometric scan `e_k = 10^-6 x 1.2^k` where the excess
//! `sigma'(e) - sigma(e)` (central-difference slope) is no longer positive,
//! then bisects between `e_{k-1}` and `e_k`. The scan from `10^-6` costs
//! about 70 evaluations of the excess for a Considere strain near 0.4; the
//! bisection about 40.
//!
//! For the laws whose excess crosses zero once (it falls with strain):
//! Hollomon `K e^(n-1) (n - e)`, Swift `K (e0+e)^(n-1) (n - e0 - e)`, Ludwik
//! `K e^(n-1) (n - e) - s0`, Voce `(ss - s0)(1 + 1/ec) e^(-e/ec) - ss`,
//! linear `H - Y - H e` and perfectly plastic `-Y` (Considere 1885; Dieter,
//! Mechanical Metallurgy, ch. 8), every scan point below the crossing has a
//! positive excess and every one above it a non-positive one. So the first
//! non-positive point can be found by walking from the scan index of the
//! nominal law (a sample's law is near it): the two points that bracket the
//! crossing are evaluated exactly as the full scan would, and the bisection
//! that follows is the same code on the same bracket, so the result is the
//! same bits. Tables (`points`) are not monotone in their slope and take the
//! full scan. `tests::fast_equals_the_full_scan_to_the_bit` holds the two
//! equal over laws drawn across each family's range.

use crate::evaluation::strength;
use crate::flow::{FlowLaw, FlowLawSpec};

/// First point of the scan, as in [`strength::considere_strain`].
const SCAN_START: f64 = 1e-6;
/// Growth of the scan, as there.
const SCAN_GROWTH: f64 = 1.2;
/// Largest strain searched, as there.
const SEARCH_MAX_STRAIN: f64 = 20.0;

/// The scan points and the index where the nominal law's crossing lies.
#[derive(Debug, Clone)]
pub struct ConsidereSolver {
    /// `e_0 = 10^-6`, `e_k = e_{k-1} x 1.2` (by repeated multiplication, as
    /// the full scan makes them), up to the first point past 20.
    scan: Vec<f64>,
    /// Index of the first non-positive scan point of the nominal law.
    start: usize,
}

// `slope`, `excess` and `bisect` repeat `evaluation::strength`'s on purpose:
// calling those (public, #[inline]) instead made 100,000 Hollomon samples of
// the 25-pass bench schedule take 1.03 s instead of 0.64 s (release,
// `perf stat -r 3`), the copies here being inlined into this loop where the
// others were not. `fast_equals_the_full_scan_to_the_bit` holds the copies
// to check's bits.
fn slope(law: &FlowLaw, e: f64) -> f64 {
    let h = 1e-5 * e.max(1e-3);
    let lo = (e - h).max(0.0);
    (law.stress_mpa(e + h) - law.stress_mpa(lo)) / (e + h - lo)
}

fn excess(law: &FlowLaw, e: f64) -> f64 {
    slope(law, e) - law.stress_mpa(e)
}

/// Whether the law's excess `sigma' - sigma` falls through zero once.
fn crosses_once(law: &FlowLaw) -> bool {
    !matches!(law.spec(), FlowLawSpec::Points { .. })
}

impl ConsidereSolver {
    /// A solver warmed on `nominal`.
    pub fn new(nominal: &FlowLaw) -> Self {
        let mut scan = vec![SCAN_START];
        let mut e = SCAN_START;
        while e <= SEARCH_MAX_STRAIN {
            e *= SCAN_GROWTH;
            scan.push(e);
        }
        let start = (0..scan.len())
            .find(|&k| scan[k] <= SEARCH_MAX_STRAIN && excess(nominal, scan[k]) <= 0.0)
            .unwrap_or(scan.len() - 2)
            .max(1);
        Self { scan, start }
    }

    /// The Considere strain of `law`: the same value as
    /// [`strength::considere_strain`]`(law)`.
    pub fn strain(&self, law: &FlowLaw) -> Option<f64> {
        match self.scan(law) {
            Scan::Solved(e) => e,
            Scan::Bracket { lo, hi } => Some(bisect(law, lo, hi)),
        }
    }

    /// The scan part of [`ConsidereSolver::strain`]: the answer, or the
    /// bracket `[lo, hi]` the bisection ([`bisect`]) narrows to it.
    pub fn scan(&self, law: &FlowLaw) -> Scan {
        if !crosses_once(law) {
            return Scan::Solved(strength::considere_strain(law));
        }
        let s = &self.scan;
        // As the scan reads it: a NaN excess counts as still positive.
        let positive = |k: usize| {
            let v = excess(law, s[k]);
            v > 0.0 || v.is_nan()
        };
        // The first non-positive scan point k (k = 0: necks at yield).
        let mut k = self.start;
        if positive(k) {
            loop {
                k += 1;
                if s[k] > SEARCH_MAX_STRAIN {
                    return Scan::Solved(None);
                }
                if !positive(k) {
                    break;
                }
            }
        } else {
            while k > 0 && !positive(k - 1) {
                k -= 1;
            }
        }
        if k == 0 {
            return Scan::Solved(Some(0.0));
        }
        Scan::Bracket {
            lo: s[k - 1],
            hi: s[k],
        }
    }
}

/// What the scan found.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Scan {
    /// The answer itself (no Considere strain below 20, 0 at yield, or a
    /// table's full solve).
    Solved(Option<f64>),
    /// The Considere strain lies in `[lo, hi]` (for the laws that cross
    /// once, the engineering stress `sigma(e) e^-e` rises to it and falls
    /// after: unimodal on the bracket).
    Bracket {
        /// Last scan point with a positive excess.
        lo: f64,
        /// First with a non-positive one.
        hi: f64,
    },
}

/// The bisection of [`strength::considere_strain`] from the bracket
/// `[lo, hi]` of [`ConsidereSolver::scan`]: the same steps, the same bits.
pub fn bisect(law: &FlowLaw, lo: f64, hi: f64) -> f64 {
    let (mut lo, mut hi) = (lo, hi);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if excess(law, mid) > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-13 * hi {
            break;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    use crate::risk::test_uniforms as uniforms;

    fn check_family(nominal: FlowLaw, mut sample: impl FnMut() -> Option<FlowLaw>) {
        let solver = ConsidereSolver::new(&nominal);
        assert_eq!(
            solver.strain(&nominal).map(f64::to_bits),
            strength::considere_strain(&nominal).map(f64::to_bits)
        );
        for _ in 0..3000 {
            let Some(law) = sample() else { continue };
            let fast = solver.strain(&law);
            let full = strength::considere_strain(&law);
            assert_eq!(
                fast.map(f64::to_bits),
                full.map(f64::to_bits),
                "{law:?}: {fast:?} vs {full:?}"
            );
        }
    }

    #[test]
    fn fast_equals_the_full_scan_to_the_bit() {
        let mut u = uniforms(7);
        check_family(FlowLaw::hollomon(530.0, 0.26).unwrap(), || {
            FlowLaw::hollomon(u(100.0, 1500.0), u(0.0, 0.95)).ok()
        });
        let mut u = uniforms(8);
        check_family(FlowLaw::swift(500.0, 0.02, 0.45).unwrap(), || {
            FlowLaw::swift(u(100.0, 1500.0), u(0.0, 0.6), u(0.0, 0.95)).ok()
        });
        let mut u = uniforms(9);
        check_family(FlowLaw::ludwik(100.0, 400.0, 0.4).unwrap(), || {
            FlowLaw::ludwik(u(0.0, 400.0), u(50.0, 1200.0), u(0.05, 0.95)).ok()
        });
        let mut u = uniforms(10);
        check_family(FlowLaw::voce(80.0, 470.0, 0.8).unwrap(), || {
            let s0 = u(10.0, 500.0);
            FlowLaw::voce(s0, s0 + u(0.0, 800.0), u(0.01, 5.0)).ok()
        });
        let mut u = uniforms(11);
        check_family(FlowLaw::linear(200.0, 800.0).unwrap(), || {
            FlowLaw::linear(u(10.0, 500.0), u(0.0, 2000.0)).ok()
        });
        check_family(FlowLaw::perfectly_plastic(250.0).unwrap(), || {
            FlowLaw::perfectly_plastic(300.0).ok()
        });
    }

    #[test]
    fn a_law_far_from_the_nominal_is_still_found() {
        // Warmed on n = 0.05, asked about n = 0.9 and the reverse.
        let a = FlowLaw::hollomon(500.0, 0.05).unwrap();
        let b = FlowLaw::hollomon(500.0, 0.9).unwrap();
        for (warm, ask) in [(&a, &b), (&b, &a)] {
            let s = ConsidereSolver::new(warm);
            assert_eq!(s.strain(ask), strength::considere_strain(ask));
        }
    }
}
