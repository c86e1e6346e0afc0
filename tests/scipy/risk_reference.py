"""SciPy reference for coldpass risk: break probabilities of one-pass
schedules under scatter, computed by scipy.stats and numerical integration
from the published Sachs slab solution (Dieter, *Mechanical Metallurgy*,
ch. 19; Sachs 1927), independently of coldpass:

    sigma_d = sigma_b e^(-B eps) + (1+B) int_0^eps sigma_f(t) e^(-B(eps-t)) dt,
    B = mu cot(alpha), eps = 2 ln(D0/D1),

and for a perfectly plastic law the closed form
    sigma_d / Y = (sigma_b / Y) e^(-B eps) + (1+B)/B (1 - e^(-B eps)).

A pass breaks when the draw ratio sigma_d / sigma_f(eps) reaches 1.

Cases:
- linearised-sachs: perfectly plastic, normal friction with a small sd; the
  break probability by the linearised formula
  P = 1 - Phi((1 - R0) / (R'(mu0) sd)) and exactly, 1 - Phi((mu* - mu0)/sd)
  with R(mu*) = 1 found by brentq;
- friction-and-back-tension: perfectly plastic, lognormal friction (mean at
  the nominal, cv) and truncated-normal back tension; P(R >= t) =
  int f_mu(mu) S_bt(b*(mu, t)) dmu by scipy.integrate.quad, with f_mu from
  scipy.stats.lognorm and S_bt from scipy.stats.truncnorm, for the break,
  warn and max lines; the median and 95th percentile of R by brentq on it,
  with the sampling standard error of each, sqrt(q(1-q)/N) / pdf;
- hollomon-n: Hollomon law, n normal (K scattering too, correlated with n,
  which a ratio without back tension does not feel); the Sachs integral by
  quad, the n at which R = 1 by brentq, P = Phi((n* - n0)/sd).

Writes risk_reference.json beside this script, deterministically (fixed
inputs, sorted keys, 12 significant digits) so CI can regenerate and diff it.
tests/risk_scipy.rs reads it.
"""

import json
import math
import os

from scipy import stats
from scipy.integrate import quad
from scipy.optimize import brentq

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "risk_reference.json")


def sig(x):
    return float(f"{x:.12g}")


def pp_ratio(mu, alpha_deg, eps, back_over_y):
    b = mu / math.tan(math.radians(alpha_deg))
    decay = math.exp(-b * eps)
    return back_over_y * decay + (1.0 + b) / b * (1.0 - decay)


def schedule(d0, d1, alpha, mu, law, method, warn, mx, back=None):
    step = {"exit": d1}
    if back is not None:
        step["back_tension_mpa"] = back
    return {
        "title": "reference case",
        "material": {"density_kg_m3": 7850, "specific_heat_j_kg_k": 470, "flow": law},
        "start": {"diameter": d0},
        "dies": {"semi_angle_deg": alpha, "friction": mu},
        "limits": {"method": method, "draw_ratio_warn": warn, "draw_ratio_max": mx},
        "passes": [step],
    }


def linearised_sachs():
    d0, alpha, mu0, sd, y = 5.0, 6.0, 0.08, 0.001, 300.0
    samples = 20000
    # The pass strain that puts the break 0.85 sd above the nominal friction.
    eps = brentq(lambda e: pp_ratio(mu0 + 0.85 * sd, alpha, e, 0.0) - 1.0, 0.05, 2.0, xtol=1e-15)
    d1 = round(d0 * math.exp(-eps / 2.0), 6)
    eps = 2.0 * math.log(d0 / d1)
    r0 = pp_ratio(mu0, alpha, eps, 0.0)
    cot = 1.0 / math.tan(math.radians(alpha))
    b = mu0 * cot
    e = math.exp(-b * eps)
    dr_db = -(1.0 - e) / b**2 + (1.0 + b) / b * eps * e
    slope = dr_db * cot
    p_lin = 1.0 - stats.norm.cdf((1.0 - r0) / (slope * sd))
    mu_star = brentq(lambda m: pp_ratio(m, alpha, eps, 0.0) - 1.0, mu0 - 10 * sd, mu0 + 10 * sd, xtol=1e-16)
    p_exact = stats.norm.sf((mu_star - mu0) / sd)
    se = math.sqrt(p_lin * (1 - p_lin) / samples)
    # The linearisation must be good to well inside the sampling error.
    assert abs(p_exact - p_lin) < 0.5 * se, (p_exact, p_lin, se)
    return {
        "name": "linearised-sachs",
        "schedule": schedule(d0, d1, alpha, mu0, {"law": "perfectly-plastic", "yield_mpa": y}, "sachs", 0.9, 0.95),
        "scatter": {"friction": {"distribution": "normal", "sd": sd, "between_dies": 0}},
        "samples": samples,
        "nominal_draw_ratio": sig(r0),
        "break_probability_linearised": sig(p_lin),
        "break_probability_exact": sig(p_exact),
    }


def friction_and_back_tension():
    d0, alpha, y = 5.0, 8.0, 300.0
    mu0, cv = 0.07, 0.2
    bt0, bt_sd, bt_lim = 60.0, 20.0, 40.0
    warn, mx = 0.9, 0.95
    samples = 50000
    eps = brentq(lambda e: pp_ratio(mu0, alpha, e, bt0 / y) - 0.92, 0.05, 2.0, xtol=1e-15)
    d1 = round(d0 * math.exp(-eps / 2.0), 6)
    eps = 2.0 * math.log(d0 / d1)
    s = math.sqrt(math.log1p(cv * cv))
    fmu = stats.lognorm(s, scale=mu0 * math.exp(-0.5 * s * s))
    fbt = stats.truncnorm(-bt_lim / bt_sd, bt_lim / bt_sd, loc=bt0, scale=bt_sd)
    cot = 1.0 / math.tan(math.radians(alpha))

    def exceed(t):
        def integrand(m):
            b = m * cot
            e = math.exp(-b * eps)
            b_star = y * (t - (1.0 + b) / b * (1.0 - e)) / e
            return fmu.pdf(m) * fbt.sf(b_star)

        lo, hi = fmu.ppf(1e-15), fmu.ppf(1 - 1e-15)
        return quad(integrand, lo, hi, epsabs=0, epsrel=1e-12, limit=400)[0]

    def quantile(q):
        t = brentq(lambda t: (1.0 - exceed(t)) - q, 0.5, 1.5, xtol=1e-13)
        h = 1e-5
        pdf = (exceed(t - h) - exceed(t + h)) / (2 * h)
        return t, math.sqrt(q * (1 - q) / samples) / pdf

    p50, se50 = quantile(0.5)
    p95, se95 = quantile(0.95)
    return {
        "name": "friction-and-back-tension",
        "schedule": schedule(d0, d1, alpha, mu0, {"law": "perfectly-plastic", "yield_mpa": y}, "sachs", warn, mx, back=bt0),
        "scatter": {
            "friction": {"distribution": "lognormal", "cv": cv, "between_dies": 0},
            "back_tension_mpa": {"distribution": "truncated-normal", "sd": bt_sd, "tolerance": bt_lim, "between_dies": 0},
        },
        "samples": samples,
        "nominal_draw_ratio": sig(pp_ratio(mu0, alpha, eps, bt0 / y)),
        "break_probability": sig(exceed(1.0)),
        "over_warn_probability": sig(exceed(warn)),
        "over_max_probability": sig(exceed(mx)),
        "draw_ratio_p50": sig(p50),
        "draw_ratio_p50_standard_error": sig(se50),
        "draw_ratio_p95": sig(p95),
        "draw_ratio_p95_standard_error": sig(se95),
    }


def hollomon_n():
    d0, alpha, mu = 5.5, 6.0, 0.10
    k, n0, sd_n, sd_k, r = 530.0, 0.26, 0.03, 15.0, 0.8
    samples = 40000
    cot = 1.0 / math.tan(math.radians(alpha))
    b = mu * cot

    def ratio(n, eps):
        integral = quad(lambda t: k * t**n * math.exp(-b * (eps - t)), 0.0, eps, epsabs=0, epsrel=1e-13, limit=200)[0]
        return (1.0 + b) * integral / (k * eps**n)

    eps = brentq(lambda e: ratio(n0 - 1.0 * sd_n, e) - 1.0, 0.1, 2.0, xtol=1e-15)
    d1 = round(d0 * math.exp(-eps / 2.0), 6)
    eps = 2.0 * math.log(d0 / d1)
    n_star = brentq(lambda n: ratio(n, eps) - 1.0, n0 - 8 * sd_n, n0 + 8 * sd_n, xtol=1e-15)
    return {
        "name": "hollomon-n",
        "schedule": schedule(d0, d1, alpha, mu, {"law": "hollomon", "k_mpa": k, "n": n0}, "sachs", 0.9, 0.95),
        "flow_scatter": {"sd": {"k_mpa": sd_k, "n": sd_n}, "correlation": [{"between": ["k_mpa", "n"], "r": r}]},
        "samples": samples,
        "nominal_draw_ratio": sig(ratio(n0, eps)),
        "break_probability": sig(stats.norm.cdf((n_star - n0) / sd_n)),
    }


def main():
    out = {
        "about": "coldpass risk reference: see tests/scipy/risk_reference.py",
        "cases": [linearised_sachs(), friction_and_back_tension(), hollomon_n()],
    }
    with open(OUT, "w") as f:
        json.dump(out, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
