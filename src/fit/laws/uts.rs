//! The engineering UTS a flow law predicts: Considere's maximum of
//! `sigma(eps) exp(-eps)` (Considere 1885; Dieter, *Mechanical Metallurgy*, ch. 8).

use crate::flow::FlowLaw;
use crate::param::{self, ParamError};

/// Engineering UTS from Hollomon's law by Considere's criterion:
/// `UTS = K n^n exp(-n)` (MPa), reached at true strain `n`
/// (Considere 1885; Dieter, *Mechanical Metallurgy*, ch. 8, from memory).
pub fn considere_uts_mpa(k_mpa: f64, n: f64) -> Result<f64, ParamError> {
    param::positive("k_mpa", k_mpa)?;
    param::within("n", n, 0.0, 1.0, param::Ends::ClosedOpen)?;
    Ok(k_mpa * n.powf(n) * (-n).exp())
}

/// Engineering UTS (MPa) a flow law predicts and the true plastic strain at
/// which it is reached: the maximum of `sigma(eps) exp(-eps)` over
/// `0 <= eps <= 5` (engineering stress at constant volume, elastic strain
/// neglected; Considere's `d sigma / d eps = sigma` at the maximum). Found by
/// a scan of 500 steps and a golden-section refinement.
pub fn engineering_uts_mpa(law: &FlowLaw) -> (f64, f64) {
    let g = |e: f64| law.stress_mpa(e) * (-e).exp();
    const TOP: f64 = 5.0;
    const STEPS: usize = 500;
    let h = TOP / STEPS as f64;
    let mut ibest = 0;
    let mut gbest = g(0.0);
    for i in 1..=STEPS {
        let v = g(i as f64 * h);
        if v > gbest {
            gbest = v;
            ibest = i;
        }
    }
    let (mut a, mut b) = (
        (ibest as f64 - 1.0).max(0.0) * h,
        ((ibest + 1) as f64 * h).min(TOP),
    );
    let phi = 0.5 * (5f64.sqrt() - 1.0);
    let mut c = b - phi * (b - a);
    let mut d = a + phi * (b - a);
    let (mut gc, mut gd) = (g(c), g(d));
    for _ in 0..80 {
        if gc > gd {
            b = d;
            d = c;
            gd = gc;
            c = b - phi * (b - a);
            gc = g(c);
        } else {
            a = c;
            c = d;
            gc = gd;
            d = a + phi * (b - a);
            gd = g(d);
        }
    }
    let e = 0.5 * (a + b);
    let v = g(e);
    if v >= gbest {
        (v, e)
    } else {
        (gbest, ibest as f64 * h)
    }
}
