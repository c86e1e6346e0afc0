//! Strength of drawn wire from the flow law: the Considere strain, where
//! `d sigma / d eps = sigma` and a tensile test necks (Considere 1885;
//! Dieter, Mechanical Metallurgy, ch. 8), and the tensile strength of wire
//! pre-strained by drawing to `eps_p`:
//!
//! - `eps_p >= eps_u`: the wire necks at once, `UTS = sigma(eps_p)`;
//! - `eps_p < eps_u`: it still hardens uniformly to `eps_u`, and on the drawn
//!   wire's own section `UTS = sigma(eps_u) exp(eps_p - eps_u)`.
//!
//! For Hollomon `sigma = K eps^n`, `eps_u = n` and the annealed strength is
//! `K n^n e^-n` (Hosford & Caddell, Metal Forming, ch. 3; from memory). The
//! solve uses only [`FlowLaw::stress_mpa`]: a central-difference slope, a
//! geometric scan for the first sign change of `sigma' - sigma`, then
//! bisection; a table's kink that meets the condition is taken exactly.

use crate::flow::FlowLaw;

/// Offset strain at which annealed stock is taken to yield (the 0.2 %
/// offset of the tensile test; ASTM E8, common practice).
pub const YIELD_OFFSET_STRAIN: f64 = 0.002;

/// Largest strain searched for the Considere condition.
const SEARCH_MAX_STRAIN: f64 = 20.0;

/// `d sigma/d eps` of `law` at strain `e` (MPa), by a central difference of
/// step `h = 1e-5 max(e, 1e-3)` (one-sided at 0).
fn slope(law: &FlowLaw, e: f64) -> f64 {
    let h = 1e-5 * e.max(1e-3);
    let lo = (e - h).max(0.0);
    (law.stress_mpa(e + h) - law.stress_mpa(lo)) / (e + h - lo)
}

/// The Considere excess `d sigma/d eps - sigma` at strain `e` (MPa): positive
/// while the wire still hardens faster than its section shrinks, so a test
/// piece at `e` stretches uniformly (Considere 1885; Dieter, ch. 8). The
/// slope is [`considere_strain`]'s central difference.
pub fn excess(law: &FlowLaw, e: f64) -> f64 {
    slope(law, e) - law.stress_mpa(e)
}

/// The Considere strain `eps_u` of `law` (where `d sigma/d eps = sigma`):
/// `Some(0)` when the law already fails the condition at yield (perfectly
/// plastic), `None` when it still holds at strain 20.
pub fn considere_strain(law: &FlowLaw) -> Option<f64> {
    let mut lo = 1e-6;
    if excess(law, lo) <= 0.0 {
        return Some(0.0);
    }
    let mut hi = lo;
    loop {
        hi *= 1.2;
        if hi > SEARCH_MAX_STRAIN {
            return None;
        }
        if excess(law, hi) <= 0.0 {
            break;
        }
        lo = hi;
    }
    Some(at_kink(law, bisect(law, lo, hi)))
}

/// Bisection of `d sigma/d eps - sigma` (central-difference slope) on a
/// bracket `[lo, hi]` whose excess is positive at `lo` and not at `hi`, to
/// `1e-13` relative: the midpoint of the last bracket, a strain. The one
/// bisection of [`considere_strain`]; a caller with its own bracket gets
/// the same bits from it.
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

/// A tabulated law whose slope jumps across `sigma` at a point (a kink)
/// meets the Considere condition exactly there; the central difference
/// straddling the kink puts the bisection a little off it (5e-7 in
/// strength on a three-point table). Returns the kink when `e` lies within
/// the difference step of one whose one-sided slopes bracket the stress,
/// else `e`. Smooth laws have no break strains and pass through unchanged.
fn at_kink(law: &FlowLaw, e: f64) -> f64 {
    for k in law.break_strains() {
        let h = 1e-5 * k.max(1e-3);
        if k <= 0.0 || (k - e).abs() > 4.0 * h {
            continue;
        }
        let d = 1e-3 * h;
        let s = law.stress_mpa(k);
        let left = (s - law.stress_mpa(k - d)) / d;
        let right = (law.stress_mpa(k + d) - s) / d;
        if left >= s && right <= s {
            return k;
        }
    }
    e
}

/// Tensile strength (engineering, on the drawn section), MPa, of wire
/// drawn to `strain` under `law` whose Considere strain is `eps_u`.
pub fn tensile_strength_mpa(law: &FlowLaw, eps_u: Option<f64>, strain: f64) -> Option<f64> {
    let eps_u = eps_u?;
    Some(if strain >= eps_u {
        law.stress_mpa(strain)
    } else {
        law.stress_mpa(eps_u) * (strain - eps_u).exp()
    })
}

/// The yield the back tension is held against at a die entry, MPa: the
/// law's flow stress, at the offset strain when the stock enters annealed
/// (or `yield_mpa` when the file gives it), never 0.
pub fn entry_yield_mpa(law: &FlowLaw, strain_before: f64, yield_mpa: Option<f64>) -> f64 {
    if strain_before < YIELD_OFFSET_STRAIN {
        yield_mpa.unwrap_or_else(|| law.stress_mpa(YIELD_OFFSET_STRAIN))
    } else {
        law.stress_mpa(strain_before)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hollomon_necks_at_n_and_has_k_n_to_the_n_over_e_to_the_n() {
        // Considere for Hollomon: eps_u = n (Dieter ch. 8, published).
        let law = FlowLaw::hollomon(530.0, 0.26).unwrap();
        let eu = considere_strain(&law).unwrap();
        // The bisection stops at 1e-13; the central-difference slope leaves ~1e-11.
        assert!((eu - 0.26).abs() < 1e-10, "{eu}");
        let uts = tensile_strength_mpa(&law, Some(eu), 0.0).unwrap();
        let hand = 530.0 * 0.26f64.powf(0.26) * (-0.26f64).exp();
        assert!((uts / hand - 1.0).abs() < 1e-12, "{uts} vs {hand}");
    }

    #[test]
    fn swift_necks_at_n_less_eps0_and_voce_at_its_closed_form() {
        // Swift K (eps0 + eps)^n: n / (eps0 + eps) = 1 gives eps_u = n - eps0.
        let swift = FlowLaw::swift(500.0, 0.02, 0.45).unwrap();
        assert!((considere_strain(&swift).unwrap() - 0.43).abs() < 1e-10);
        // Voce s - (s - s0) e^{-eps/c}: (s - s0)/c e^{-e/c} = s - (s - s0) e^{-e/c}
        // gives e^{-e/c} = s c / ((s - s0)(1 + c)).
        let (s0, s, c) = (100.0, 300.0, 0.2);
        let voce = FlowLaw::voce(s0, s, c).unwrap();
        let hand = -c * (s * c / ((s - s0) * (1.0 + c))).ln();
        assert!((considere_strain(&voce).unwrap() - hand).abs() < 1e-10);
    }

    #[test]
    fn perfectly_plastic_necks_at_yield() {
        let law = FlowLaw::perfectly_plastic(250.0).unwrap();
        assert_eq!(considere_strain(&law), Some(0.0));
        assert_eq!(tensile_strength_mpa(&law, Some(0.0), 0.5), Some(250.0));
    }

    #[test]
    fn annealed_hollomon_yield_is_positive() {
        // K eps^n at eps = 0 is 0; at the 0.002 offset it is K 0.002^n.
        let law = FlowLaw::hollomon(320.0, 0.54).unwrap();
        let y = entry_yield_mpa(&law, 0.0, None);
        assert!((y - 320.0 * 0.002f64.powf(0.54)).abs() < 1e-12 && y > 0.0);
        assert_eq!(entry_yield_mpa(&law, 0.0, Some(60.0)), 60.0);
    }
}
