"""SciPy cross-check of coldpass's Sachs drawing stress and mean flow stress.

Over a fixed grid of flow laws (every kind, a table with both `beyond`
settings) and passes (entry strain, pass strain, die semi-angle, Coulomb
friction, back tension), computes independently of coldpass:

- the Sachs slab solution for a conical die integrated with the law itself
  (Dieter, *Mechanical Metallurgy*, ch. 19; Sachs 1927):
  sigma_d = sigma_b e^(-B eps) + (1+B) int_0^eps sigma_f(eps_a+t) e^(-B(eps-t)) dt,
  B = mu cot(alpha), eps = 2 ln(D0/D1);
- the mean flow stress (1/eps) int_{eps_a}^{eps_a+eps} sigma_f de,

by scipy.integrate.quad (epsabs=0, epsrel=1e-13, limit=200, split at the
table's kinks), and writes core_reference.json beside this script. The
output is deterministic (fixed grid, sorted keys, values rounded to 12
significant digits) so that CI can regenerate it and diff it against the
committed file. tests/scipy_core.rs reads it.
"""

import json
import math
import os

from scipy.integrate import quad

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "core_reference.json")

ENTRY_DIAMETER_MM = 10.0
TABLE = [[0.0, 100.0], [0.3, 220.0], [0.9, 300.0], [1.5, 360.0]]
# A table whose flow stress falls over its middle segment (still valid).
TABLE_DIP = [[0.0, 150.0], [0.4, 320.0], [0.8, 300.0], [1.4, 340.0]]

# Law specs in coldpass's serde shape. Hollomon constants from Dieter Example
# 19.1 and Kalpakjian & Schmid Table 2.3 (annealed copper); the rest are
# plausible shapes, the check is the identity, not the material.
LAWS = [
    {"law": "perfectly-plastic", "yield_mpa": 250.0},
    {"law": "linear", "yield_mpa": 200.0, "hardening_modulus_mpa": 150.0},
    {"law": "hollomon", "k_mpa": 1300.0, "n": 0.3},
    {"law": "hollomon", "k_mpa": 315.0, "n": 0.54},
    {"law": "ludwik", "sigma0_mpa": 120.0, "k_mpa": 400.0, "n": 0.45},
    {"law": "swift", "k_mpa": 600.0, "eps0": 0.02, "n": 0.3},
    {"law": "voce", "sigma0_mpa": 80.0, "saturation_mpa": 470.0, "eps_c": 0.8},
    {"law": "points", "points": TABLE, "beyond": "slope"},
    {"law": "points", "points": TABLE, "beyond": "flat"},
    {"law": "points", "points": TABLE_DIP, "beyond": "flat"},
]
# Passes inside the tables, across their last point and wholly beyond it.
STRAINS_BEFORE = [0.0, 0.35, 1.3, 2.2]
PASS_STRAINS = [0.05, math.log(1.0 / 0.8), 0.6]
DIES = [(3.0, 0.03), (6.0, 0.09), (15.0, 0.12), (8.0, 0.0)]  # (semi-angle deg, mu)
BACK_TENSIONS_MPA = [0.0, 60.0]

QUAD = {"epsabs": 0.0, "epsrel": 1e-13, "limit": 200}


def round12(x):
    return float(f"{x:.12g}")


def table_stress(points, beyond, e):
    last = points[-1]
    if e >= last[0] and beyond == "flat":
        return last[1]
    i = 0
    while i + 2 < len(points) and e >= points[i + 1][0]:
        i += 1
    (e0, s0), (e1, s1) = points[i], points[i + 1]
    return s0 + (s1 - s0) * (e - e0) / (e1 - e0)


def flow_stress(law, e):
    """sigma_f(e), MPa, as on the reference sheet's flow-law table."""
    kind = law["law"]
    if kind == "perfectly-plastic":
        return law["yield_mpa"]
    if kind == "linear":
        return law["yield_mpa"] + law["hardening_modulus_mpa"] * e
    if kind == "hollomon":
        return law["k_mpa"] * e ** law["n"]
    if kind == "ludwik":
        return law["sigma0_mpa"] + law["k_mpa"] * e ** law["n"]
    if kind == "swift":
        return law["k_mpa"] * (law["eps0"] + e) ** law["n"]
    if kind == "voce":
        ss, s0 = law["saturation_mpa"], law["sigma0_mpa"]
        return ss - (ss - s0) * math.exp(-e / law["eps_c"])
    if kind == "points":
        return table_stress(law["points"], law["beyond"], e)
    raise ValueError(kind)


def kinks(law, lo, hi):
    if law["law"] != "points":
        return None
    inside = [p[0] for p in law["points"] if lo < p[0] < hi]
    return inside or None


def integrate(f, a, b, points):
    value, abserr = quad(f, a, b, points=points, **QUAD)
    if not abserr <= 1e-11 * abs(value):
        raise RuntimeError(f"quad did not converge on [{a}, {b}]: {value} +- {abserr}")
    return value


def case(law, strain_before, pass_strain, semi_angle_deg, mu, back):
    d0 = ENTRY_DIAMETER_MM
    d1 = round12(d0 * math.exp(-0.5 * pass_strain))
    # Everything below uses the stored diameters, so the file describes the case exactly.
    eps = 2.0 * math.log(d0 / d1)
    ea = strain_before
    b = mu / math.tan(math.radians(semi_angle_deg))
    breaks = kinks(law, ea, ea + eps)
    shifted = None if breaks is None else [x - ea for x in breaks]
    weighted = integrate(
        lambda t: flow_stress(law, ea + t) * math.exp(-b * (eps - t)), 0.0, eps, shifted
    )
    sachs = back * math.exp(-b * eps) + (1.0 + b) * weighted
    mean = integrate(lambda e: flow_stress(law, e), ea, ea + eps, breaks) / eps
    return {
        "law": law,
        "entry_diameter_mm": d0,
        "exit_diameter_mm": d1,
        "strain_before": strain_before,
        "semi_angle_deg": semi_angle_deg,
        "friction": mu,
        "back_tension_mpa": back,
        "sachs_mpa": round12(sachs),
        "mean_flow_stress_mpa": round12(mean),
    }


def main():
    cases = [
        case(law, ea, eps, deg, mu, back)
        for law in LAWS
        for ea in STRAINS_BEFORE
        for eps in PASS_STRAINS
        for deg, mu in DIES
        for back in BACK_TENSIONS_MPA
    ]
    about = (
        "Sachs drawing stress (integral form, Dieter ch. 19) and mean flow stress "
        "by scipy.integrate.quad; regenerate with python3 tests/scipy/core_reference.py"
    )
    lines = ["{", f' "about": {json.dumps(about)},', ' "cases": [']
    rows = [json.dumps(c, sort_keys=True) for c in cases]
    lines += ["  " + r + ("," if i + 1 < len(rows) else "") for i, r in enumerate(rows)]
    lines += [" ]", "}"]
    with open(OUT, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
